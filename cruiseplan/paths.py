"""Where the bundled airframe and mission files live.

They are read from the repository's ``airframes/`` and ``missions/`` folders beside the
package (the editable install that ``make`` sets up). A packaged build may copy them into
``cruiseplan/_bundled/``, which is searched first.
"""

from pathlib import Path

_PACKAGE_DIR = Path(__file__).resolve().parent

#: Folders searched for bundled airframes, in order.
AIRFRAME_DIRS = (_PACKAGE_DIR / "_bundled" / "airframes", _PACKAGE_DIR.parent / "airframes")
#: Folders searched for bundled missions, in order.
MISSION_DIRS = (_PACKAGE_DIR / "_bundled" / "missions", _PACKAGE_DIR.parent / "missions")


def shown_path(source) -> str:
    """A bundled airframe or mission file by its name, any other file by its path."""
    src = Path(source)
    return f"bundled {src.name}" if src.parent in AIRFRAME_DIRS + MISSION_DIRS else str(src)
