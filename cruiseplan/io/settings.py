"""The settings file: display-unit preferences of a user or a project.

One file, the first found of:

1. ``$CRUISEPLAN_SETTINGS`` when the variable is set (a path; empty: no settings file);
2. ``cruiseplan.toml`` in the current folder;
3. ``$XDG_CONFIG_HOME/cruiseplan/settings.toml`` (``~/.config/cruiseplan/settings.toml``
   when ``XDG_CONFIG_HOME`` is unset).

Its only table today is ``[units]``::

    [units]
    system = "aviation"          # or "si"; optional (default: the airframe's)

    [units.overrides]            # optional, per kind of quantity
    volume = "L"
    mass = "kg"

The command line wins over the file: ``--units`` replaces ``system`` and each ``--unit
KIND=UNIT`` replaces the file's override of that kind. Errors name the file and field.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from cruiseplan.errors import CruiseplanError
from cruiseplan.io.schema import SchemaReader, read_toml
from cruiseplan.units import UNIT_SYSTEMS, check_override

#: Environment variable naming the settings file (empty: none).
SETTINGS_ENV = "CRUISEPLAN_SETTINGS"


class SettingsFileError(CruiseplanError):
    """A settings file that cannot be read or has a wrong field."""


@dataclass(frozen=True)
class Settings:
    """Display-unit preferences read from a settings file.

    Attributes
    ----------
    system : str or None
        ``"aviation"`` or ``"si"``; None when the file gives none.
    overrides : tuple of (str, str)
        Kind of quantity and display unit, e.g. ``(("volume", "L"),)``.
    source : pathlib.Path or None
        The file read; None when there is none.
    """

    system: str | None = None
    overrides: tuple = ()
    source: Path | None = None


def settings_path() -> Path | None:
    """The settings file in effect, or None.

    Returns
    -------
    pathlib.Path or None
        ``$CRUISEPLAN_SETTINGS`` when set (None when it is empty), else
        ``./cruiseplan.toml`` or the user's ``cruiseplan/settings.toml`` when they exist.
    """
    env = os.environ.get(SETTINGS_ENV)
    if env is not None:
        return Path(env).expanduser() if env.strip() else None
    local = Path("cruiseplan.toml")
    if local.is_file():
        return local
    config = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    user = Path(config) / "cruiseplan" / "settings.toml"
    return user if user.is_file() else None


def read_settings(path=None) -> Settings:
    """Read the settings file.

    Parameters
    ----------
    path : str or pathlib.Path, optional
        The file; by default :func:`settings_path`.

    Returns
    -------
    Settings
        Empty settings when there is no file.

    Raises
    ------
    SettingsFileError
        For a file that cannot be read, is not TOML, has unknown tables or fields, an
        unknown system or kind, or a unit of the wrong dimension; the message names the
        file and the field.
    """
    path = settings_path() if path is None else Path(path)
    if path is None:
        return Settings()
    data, _ = read_toml(path, SettingsFileError)
    r = SchemaReader(path, data, SettingsFileError)
    r.check_fields(data, ("units",), "top level")
    units = r.section("units", ("system", "overrides"), required=False)
    system = None
    if "system" in units:
        system = r.choice("[units]", units, "system", UNIT_SYSTEMS)
    raw = units.get("overrides", {})
    if not isinstance(raw, dict):
        r.fail("[units] overrides", "expected a table [units.overrides] of KIND = \"UNIT\"")
    overrides = []
    for kind, unit in raw.items():
        if not isinstance(unit, str):
            r.fail(f"[units.overrides] {kind}", f"{unit!r} is not a unit text such as \"L\"")
        try:
            overrides.append((kind, check_override(kind, unit, what="")))
        except CruiseplanError as exc:
            r.fail(f"[units.overrides] {kind}", str(exc).strip())
    return Settings(system, tuple(overrides), path)
