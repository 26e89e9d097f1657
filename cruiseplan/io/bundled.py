"""The bundled airframe, mission and study files: where they are and how a name finds one.

The repository's top-level ``airframes/``, ``missions/`` and ``studies/`` folders are the
source. A wheel or sdist carries them inside the package as ``cruiseplan/_bundled/airframes``
(and ``missions``, ``studies``; see ``pyproject.toml``), which are searched first; a source
checkout or editable install reads the repository folders.
"""

from __future__ import annotations

from pathlib import Path

from cruiseplan.errors import AirframeFileError, MissionFileError, StudyFileError, lookup

_PACKAGE_DIR = Path(__file__).resolve().parent.parent

#: Folders searched for each kind of bundled file, in order.
BUNDLED_DIRS = {
    "airframe": (_PACKAGE_DIR / "_bundled" / "airframes", _PACKAGE_DIR.parent / "airframes"),
    "mission": (_PACKAGE_DIR / "_bundled" / "missions", _PACKAGE_DIR.parent / "missions"),
    "study": (_PACKAGE_DIR / "_bundled" / "studies", _PACKAGE_DIR.parent / "studies"),
}
_ERRORS = {"airframe": AirframeFileError, "mission": MissionFileError,
           "study": StudyFileError}


def bundled_files(kind: str) -> dict:
    """Bundled files of one kind by name (file stem), sorted.

    Parameters
    ----------
    kind : {"airframe", "mission", "study"}
        Which files.

    Returns
    -------
    dict
        Name to :class:`pathlib.Path`; empty when none are installed.
    """
    for folder in lookup(BUNDLED_DIRS, kind, "kind of bundled file"):
        if folder.is_dir():
            return {p.stem: p for p in sorted(folder.glob("*.toml"))}
    return {}


def find_file(name_or_path, kind: str) -> Path:
    """Resolve a bundled name or a file path to a path.

    Parameters
    ----------
    name_or_path : str or pathlib.Path
        ``"demo-trainer"`` or ``"my/plane.toml"``.
    kind : {"airframe", "mission", "study"}
        Which kind of file.

    Returns
    -------
    pathlib.Path
        The file.

    Raises
    ------
    AirframeFileError or MissionFileError
        When neither a bundled name nor an existing file; the bundled names are listed.
    """
    text = str(name_or_path)
    bundled = bundled_files(kind)
    if text in bundled:
        return bundled[text]
    path = Path(text)
    if path.is_file():
        return path
    raise _ERRORS[kind](f"{text}: no such {kind} file, nor a bundled {kind} "
                        f"(bundled: {', '.join(bundled) or 'none'})")


def shown_path(source) -> str:
    """A bundled airframe or mission file by its name, any other file by its path.

    Parameters
    ----------
    source : str or pathlib.Path
        The file.

    Returns
    -------
    str
        ``"bundled NAME.toml"`` or the path.
    """
    src = Path(source)
    folders = BUNDLED_DIRS["airframe"] + BUNDLED_DIRS["mission"]
    return f"bundled {src.name}" if src.parent in folders else str(src)
