"""One schema reader for the TOML files: typed, range-checked values, errors that name the field.

Every dimensional value in a file is a string with its unit (``area = "12.5 m^2"``),
parsed by :func:`cruiseplan.units.parse_quantity`; dimensionless coefficients are plain
numbers. Unknown sections or fields are errors (a misspelt ``cdo`` must not fall back to a
default). Every error is one line naming the file, the field, the value and what was
expected, raised as the file kind's :class:`~cruiseplan.errors.CruiseplanError` subclass.
"""

from __future__ import annotations

import hashlib
import math
import stat
import tomllib
from dataclasses import dataclass
from pathlib import Path

from cruiseplan.errors import UnitError
from cruiseplan.units import parse_quantity


@dataclass(frozen=True)
class Field:
    """Schema of one field.

    Attributes
    ----------
    unit : str or None
        SI unit the value is converted to; None for a plain number.
    lo, hi : float
        Range allowed (in ``unit``).
    required : bool
        Whether the field must be given.
    example : str
        An example as written in a file, for messages.
    lo_open : bool
        The low end is excluded (``> lo``).
    default_unit : str or None
        Unit of a bare number; None: a dimensional value needs its unit written.
    """

    unit: str | None
    lo: float = -math.inf
    hi: float = math.inf
    required: bool = True
    example: str = ""
    lo_open: bool = False
    default_unit: str | None = None


def number(lo=-math.inf, hi=math.inf, required=True, example="", lo_open=False) -> Field:
    """A plain-number field (a coefficient) from ``lo`` to ``hi``.

    Parameters
    ----------
    lo, hi : float
        Range allowed [-].
    required : bool
        Whether the field must be given.
    example : str
        An example as written in a file.
    lo_open : bool
        Exclude ``lo`` itself.

    Returns
    -------
    Field
        The spec.
    """
    return Field(None, lo, hi, required, example, lo_open)


def quantity(unit, lo=0.0, hi=math.inf, required=True, example="", lo_open=True,
             default_unit=None) -> Field:
    """A dimensional field in ``unit``, above ``lo`` (excluded by default).

    Parameters
    ----------
    unit : str
        SI unit the value is converted to.
    lo, hi : float
        Range allowed [in ``unit``].
    required : bool
        Whether the field must be given.
    example : str
        An example as written in a file.
    lo_open : bool
        Exclude ``lo`` itself.
    default_unit : str, optional
        Unit of a bare number; None: the unit must be written.

    Returns
    -------
    Field
        The spec.
    """
    return Field(unit, lo, hi, required, example, lo_open, default_unit)


#: Largest TOML file read [bytes]: an airframe, mission or study file is a few kB.
MAX_TOML_BYTES = 4 * 2**20


def read_regular_file(path, error, what: str = "file", max_bytes: int = MAX_TOML_BYTES):
    """The bytes of a regular file of at most ``max_bytes``, or a one-line error.

    A folder, a device (``/dev/zero``), a pipe or a socket is refused before it is
    opened, so a read never hangs nor grows without bound.

    Parameters
    ----------
    path : str or pathlib.Path
        The file.
    error : type
        The :class:`~cruiseplan.errors.CruiseplanError` subclass to raise.
    what : str, optional
        What the file is, for messages (``"flight log"``).
    max_bytes : int, optional
        Largest size accepted [bytes].

    Returns
    -------
    bytes
        The file's content.

    Raises
    ------
    CruiseplanError
        ``error``, for a missing file, one that is not a regular file, one larger than
        ``max_bytes``, or one that cannot be read.
    """
    path = Path(path)
    try:
        st = path.stat()
    except OSError as exc:
        raise error(f"{path}: cannot read the {what} ({exc.strerror})") from None
    except ValueError:  # e.g. a NUL byte in the name
        raise error(f"{path!r}: not a valid file name") from None
    if stat.S_ISDIR(st.st_mode):
        raise error(f"{path}: is a folder, not a {what}")
    if not stat.S_ISREG(st.st_mode):
        raise error(f"{path}: not a regular file (a device, pipe or socket); give a {what}")
    if st.st_size > max_bytes:
        raise error(f"{path}: {st.st_size} bytes; a {what} is at most "
                    f"{max_bytes // 2**20} MB")
    try:
        with path.open("rb") as fh:
            raw = fh.read(max_bytes + 1)
    except OSError as exc:
        raise error(f"{path}: cannot read the {what} ({exc.strerror})") from None
    if len(raw) > max_bytes:
        raise error(f"{path}: larger than {max_bytes // 2**20} MB; a {what} is smaller")
    return raw


def read_toml(path, error) -> tuple:
    """Read a TOML file.

    Parameters
    ----------
    path : str or pathlib.Path
        The file.
    error : type
        The :class:`~cruiseplan.errors.CruiseplanError` subclass to raise.

    Returns
    -------
    data : dict
        The parsed tables.
    checksum : str
        SHA-256 of the file's bytes.

    Raises
    ------
    CruiseplanError
        ``error``, when the file cannot be read or is not valid TOML.
    """
    path = Path(path)
    raw = read_regular_file(path, error)
    return parse_toml(raw, path, error), hashlib.sha256(raw).hexdigest()


def parse_toml(raw: bytes, source, error) -> dict:
    """Parse TOML bytes, naming ``source`` in errors.

    Parameters
    ----------
    raw : bytes
        UTF-8 TOML text.
    source : str or pathlib.Path
        Where the text came from, for messages.
    error : type
        The :class:`~cruiseplan.errors.CruiseplanError` subclass to raise.

    Returns
    -------
    dict
        The parsed tables.
    """
    try:
        return tomllib.loads(raw.decode("utf-8"))
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
        raise error(f"{source}: not valid TOML ({exc})") from None
    except RecursionError:
        raise error(f"{source}: not valid TOML (nested too deeply)") from None


class SchemaReader:
    """Reads typed, range-checked values from one file's tables.

    Parameters
    ----------
    source : str or pathlib.Path
        The file, named in every error.
    data : dict
        Its parsed tables.
    error : type
        The :class:`~cruiseplan.errors.CruiseplanError` subclass to raise.
    """

    def __init__(self, source, data: dict, error):
        self.source = source
        self.data = data
        self.error = error

    def fail(self, where: str, message: str):
        """Raise the file's error: ``FILE: WHERE: MESSAGE``.

        Parameters
        ----------
        where : str
            The table and field, e.g. ``"[wing] area"``.
        message : str
            What is wrong and what was expected.

        Raises
        ------
        CruiseplanError
            The file kind's error class.
        """
        raise self.error(f"{self.source}: {where}: {message}")

    def section(self, name: str, allowed, *, required: bool = True, where: str | None = None,
                data: dict | None = None) -> dict:
        """A table whose fields must be among ``allowed``.

        Parameters
        ----------
        name : str
            Its key in ``data`` (the file's top level by default).
        allowed : iterable of str or None
            Field names allowed; None: checked later (by the kind the table names).
        required : bool
            Missing is an error; otherwise an empty table is returned.
        where : str, optional
            How errors name it (``"[name]"`` by default).
        data : dict, optional
            The table holding it.

        Returns
        -------
        dict
            The table.
        """
        where = where or f"[{name}]"
        data = self.data if data is None else data
        sec = data.get(name)
        if sec is None:
            if required:
                self.fail(where, "section missing")
            return {}
        if not isinstance(sec, dict):
            self.fail(where, "expected a table of fields")
        if allowed is not None:
            self.check_fields(sec, allowed, where)
        return sec

    def check_fields(self, table: dict, allowed, where: str):
        """Fail on the first field of ``table`` not in ``allowed``.

        Parameters
        ----------
        table : dict
            The table read.
        allowed : iterable of str
            Field names allowed.
        where : str
            How errors name the table.

        Raises
        ------
        CruiseplanError
            Naming the unknown field and listing the allowed ones.
        """
        unknown = sorted(set(table) - set(allowed))
        if unknown:
            self.fail(f"{where} {unknown[0]}",
                      f"unknown field; expected one of {', '.join(sorted(allowed))}")

    def value(self, where: str, table: dict, key: str, spec: Field):
        """Read one field by its :class:`Field` spec.

        Parameters
        ----------
        where : str
            The table's name for messages (``"[wing]"`` or ``"leg 2 'home'"``); a bare
            name is put in brackets.
        table : dict
            The table holding the field.
        key : str
            The field.
        spec : Field
            What the value must be.

        Returns
        -------
        float or None
            In SI (or the plain number); None when absent and not required.
        """
        where = where if where.startswith(("[", "leg")) else f"[{where}]"
        here = f"{where} {key}"
        if key not in table:
            if spec.required:
                self.fail(here, f"missing; expected e.g. {key} = {spec.example}")
            return None
        raw = table[key]
        if isinstance(raw, bool) or not isinstance(raw, (str, int, float)):
            self.fail(here, f"{raw!r} is not a quantity, e.g. {key} = {spec.example}")
        if spec.unit is None:
            if not isinstance(raw, (int, float)):
                self.fail(here, f"{raw!r} should be a plain number, e.g. {spec.example}")
            value = float(raw)
        else:
            if not isinstance(raw, str) and spec.default_unit is None:
                self.fail(here, f"{raw!r} needs a unit, written as a string, "
                                f"e.g. {key} = {spec.example}")
            try:
                value = parse_quantity(raw, spec.unit, default_unit=spec.default_unit,
                                       what=key)
            except UnitError:
                self.fail(here, f"{raw!r} is not a quantity in units compatible with "
                                f"{spec.unit or 'a plain number'}, e.g. {spec.example}")
        low_bad = value <= spec.lo if spec.lo_open else value < spec.lo
        if not math.isfinite(value) or low_bad or value > spec.hi:
            unit = f" {spec.unit}" if spec.unit else ""
            bound = ">" if spec.lo_open else ">="
            low = f"{bound} {spec.lo:g}{unit}" if math.isfinite(spec.lo) else "a finite value"
            hi = f" and <= {spec.hi:g}{unit}" if math.isfinite(spec.hi) else ""
            self.fail(here, f"{raw!r} is out of range; expected {low}{hi}")
        return value

    def values(self, name: str, schema: dict) -> dict:
        """All :class:`Field` values of a required section (others of the schema: None).

        Parameters
        ----------
        name : str
            The section.
        schema : dict
            Field name to :class:`Field`, or to None for fields read otherwise.

        Returns
        -------
        dict
            Field name to value, for the fields with a spec.
        """
        sec = self.section(name, schema)
        return {k: self.value(name, sec, k, spec) for k, spec in schema.items()
                if spec is not None}

    def choice(self, where: str, table: dict, key: str, options, default=None):
        """A field that must be one of ``options`` (listed in the error).

        Parameters
        ----------
        where : str
            The table's name for messages.
        table : dict
            The table holding the field.
        key : str
            The field.
        options : iterable of str
            The names allowed.
        default : str, optional
            The value when the field is absent.

        Returns
        -------
        str
            The name given.

        Raises
        ------
        CruiseplanError
            When it is not one of ``options``.
        """
        raw = table.get(key, default)
        if not isinstance(raw, str) or raw not in options:
            where = where if where.startswith(("[", "leg")) else f"[{where}]"
            self.fail(f"{where} {key}", f"{raw!r} is not one of {', '.join(sorted(options))}")
        return raw

    def number_list(self, where, table, key, lo=-math.inf, hi=math.inf, unit=None) -> tuple:
        """A list of plain numbers (or of quantities in ``unit``), each in (lo, hi].

        Parameters
        ----------
        where : str
            The table's name for messages.
        table : dict
            The table holding the list.
        key : str
            The field.
        lo, hi : float
            Range of each value [-, or ``unit``].
        unit : str, optional
            SI unit of quantities written with their units; None: plain numbers.

        Returns
        -------
        tuple of float
            The values in SI.

        Raises
        ------
        CruiseplanError
            For a missing or empty list or a value out of range.
        """
        here = f"[{where}] {key}"
        raw = table.get(key)
        if not isinstance(raw, list) or len(raw) < 1:
            self.fail(here, f"expected a list of values, got {raw!r}")
        out = []
        for item in raw:
            if unit is None:
                if isinstance(item, bool) or not isinstance(item, (int, float)):
                    self.fail(here, f"{item!r} should be a plain number")
                v = float(item)
            else:
                try:
                    v = parse_quantity(item, unit, what=key) if isinstance(item, str) else None
                except UnitError:
                    v = None
                if v is None:
                    self.fail(here, f"{item!r} is not a quantity compatible with {unit}")
            if not (lo < v <= hi):
                self.fail(here, f"{item!r} is out of range ({lo:g}, {hi:g}]")
            out.append(v)
        return tuple(out)

    def table_list(self, table: dict, key: str, where: str, schema: dict) -> list:
        """Values of each table in a TOML array of tables, e.g. ``[[polar.components]]``.

        Parameters
        ----------
        table : dict
            The table holding the array.
        key : str
            The array's name.
        where : str
            The parent table's name for messages.
        schema : dict
            Field name to :class:`Field` (read by it) or None (passed through).

        Returns
        -------
        list of dict
            One per table, with ``_where`` naming it.
        """
        raw = table.get(key, [])
        if not isinstance(raw, list) or not all(isinstance(t, dict) for t in raw):
            self.fail(f"[{where}.{key}]", "expected a list of tables ([[...]] entries)")
        out = []
        for i, tbl in enumerate(raw, 1):
            name = f"{where}.{key}[{i}]"
            self.check_fields(tbl, schema, f"[{name}]")
            vals = {k: self.value(name, tbl, k, spec) for k, spec in schema.items()
                    if spec is not None}
            vals.update({k: tbl[k] for k, spec in schema.items() if spec is None and k in tbl})
            vals["_where"] = name
            out.append(vals)
        return out
