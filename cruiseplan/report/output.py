"""Tables for people and programs: text, markdown, CSV and JSON, in SI or aviation units.

A :class:`Report` is a title, a few header lines (what the figures hold for), columns with
their units, notes and the cautions. Rendering is pure string work; writing goes through
:func:`write_atomic` (or :func:`write_files_atomic` for a CSV and its sidecar), so an error
never leaves a half-written file. No matplotlib here.

Text and markdown show each column's display values (``Column.values``, formatted with
``Column.fmt``). CSV and JSON are for programs: they carry each column's *machine* values
(``Column.data`` in ``Column.data_unit`` when given, else ``Column.values``) at full
precision, so a duration shown as ``h:mm`` is a number of minutes there. A plain CSV is one
header row ``name [unit]`` and the rows; its provenance (title, header lines, notes,
cautions, :meth:`Report.provenance`) goes to a sidecar file or, on request, into ``#``
comment lines ahead of the table. A JSON document carries :data:`SCHEMA_VERSION`, the
figures of the header as numbers with their units (``meta``), the prose lines
(``meta_text``) and validates against ``schema/report.schema.json``.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os
import re
import stat
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from cruiseplan.errors import CruiseplanError, lookup

#: A fixed-point format of one float, ``{:.1f}`` or ``{:+.2f}``: formatted column-wise.
_FIXED = re.compile(r"^\{:(\+?)\.(\d+)f\}$")

#: Version of the JSON document layout (``schema_version``); raised on any change that a
#: reader could notice (fields renamed, removed or given another meaning).
SCHEMA_VERSION = 2


@dataclass
class Column:
    """One column: a name, a unit label ('' when dimensionless), values and a format.

    ``values`` are what people read (numbers in ``unit`` formatted with ``fmt``, or words,
    e.g. ``"6:14"`` for a duration in ``h:mm``). ``data``, when given, holds the same
    figures for programs, numbers in ``data_unit`` (e.g. minutes for an ``h:mm`` column):
    CSV and JSON write ``data`` and ``data_unit`` instead of ``values`` and ``unit``.
    """

    name: str
    unit: str
    values: list
    fmt: str = "{:.1f}"
    data: list | None = None
    data_unit: str | None = None

    @property
    def header(self) -> str:
        """Header with the unit in brackets."""
        return f"{self.name} [{self.unit}]" if self.unit else self.name

    @property
    def machine_unit(self) -> str:
        """Unit of the machine values (CSV, JSON): ``data_unit`` if given, else ``unit``."""
        return self.unit if self.data_unit is None else self.data_unit

    @property
    def machine_header(self) -> str:
        """CSV header: ``name [machine unit]``, or the name alone when dimensionless."""
        u = self.machine_unit
        return f"{self.name} [{u}]" if u else self.name

    def machine(self, i: int):
        """Machine value of row ``i``: a float, int or str at full precision, or None.

        Parameters
        ----------
        i : int
            Row index [-].

        Returns
        -------
        float, int, str or None
            ``data[i]`` (else ``values[i]``) in :attr:`machine_unit`; numpy scalars as
            Python numbers; None for a missing or non-finite value and for ``"-"``.
        """
        v = (self.values if self.data is None else self.data)[i]
        if v is None or isinstance(v, str) and v == "-":
            return None
        if isinstance(v, (bool, np.bool_)):
            return bool(v)
        if isinstance(v, (int, np.integer)):
            return int(v)
        if isinstance(v, (float, np.floating)):
            return float(v) if math.isfinite(v) else None
        return v

    def machine_cells(self) -> list:
        """Every row's CSV cell, worked out column-wise (see :meth:`machine`).

        Returns
        -------
        list of str
            Numbers at full precision (``repr``), words as given, ``""`` where there is
            no value.
        """
        vals = self.values if self.data is None else self.data
        if isinstance(vals, np.ndarray) and vals.dtype.kind == "f":
            vals = vals.tolist()
        kinds = set(map(type, vals))
        if vals and kinds <= {float, type(None)} and float in kinds:
            return _per_distinct(np.asarray(vals, dtype=float), float.__repr__, "")
        if kinds == {str}:
            return _csv_quoted(["" if v == "-" else v for v in vals])
        return _csv_quoted([_csv_cell(self.machine(i)) for i in range(len(vals))])

    def cells(self) -> list:
        """Every row's formatted cell, worked out column-wise (see :meth:`cell`).

        Returns
        -------
        list of str
            As :meth:`cell` for each row.
        """
        vals = self.values
        if isinstance(vals, np.ndarray) and vals.dtype.kind == "f":
            vals = vals.tolist()
        m = _FIXED.match(self.fmt)
        if m and not m.group(1) and vals and set(map(type, vals)) == {float}:
            arr = np.asarray(vals, dtype=float)
            finite = np.isfinite(arr)
            digits = int(m.group(2))
            # A value that rounds to zero prints without a sign.
            half = 0.5 * 10.0 ** -digits
            arr = np.where(finite & (np.abs(arr) < half), 0.0, arr) + 0.0
            return _per_distinct(arr, self.fmt.format, "-")
        return [self.cell(i) for i in range(len(vals))]

    def cell(self, i: int) -> str:
        """Formatted cell ``i``; '-' for a missing value.

        Parameters
        ----------
        i : int
            Row index [-].

        Returns
        -------
        str
            The value formatted with ``fmt`` (in the column's ``unit``), a string value
            as given, or ``"-"`` for None or a non-finite float.
        """
        v = self.values[i]
        if v is None or (isinstance(v, float) and not math.isfinite(v)):
            return "-"
        if isinstance(v, str):
            return v
        text = self.fmt.format(v)
        # A value that rounds to zero prints without a sign.
        return text[1:] if text.startswith("-") and not text.strip("-0.") else text


@dataclass
class Report:
    """A printable table with its context and cautions."""

    title: str
    meta: list
    columns: list
    notes: list = field(default_factory=list)
    cautions: tuple = ()
    summary: dict = field(default_factory=dict)
    #: Figures the header states, as numbers with their units: ``{"mass": (745.0, "kg"),
    #: "isa_dev": (10.0, "K"), ...}`` (SI); JSON writes them under ``meta``.
    quantities: dict = field(default_factory=dict)

    @property
    def n_rows(self) -> int:
        """Number of rows."""
        return len(self.columns[0].values) if self.columns else 0

    def render(self, fmt: str) -> str:
        """Render as ``text``, ``markdown``, ``csv`` or ``json``.

        Parameters
        ----------
        fmt : str
            Output format, a key of :data:`RENDERERS`.

        Returns
        -------
        str
            The rendered table.

        Raises
        ------
        CruiseplanError
            For an unknown output format.
        """
        return lookup(RENDERERS, fmt, "output format")(self)

    def provenance(self) -> str:
        """What a plain CSV leaves out: title, header lines, notes and cautions.

        Returns
        -------
        str
            Plain text, the content of the ``FILE.meta.txt`` sidecar of a CSV file.
        """
        out = [self.title, "=" * len(self.title)] + self.meta
        if self.notes:
            out += [""] + self.notes
        if self.cautions:
            out += ["", "CAUTION:"] + [f"  * {c}" for c in self.cautions]
        return "\n".join(out) + "\n"

    def csv(self, header: bool = False) -> str:
        """Render as CSV: one header row ``name [unit]``, then the rows.

        Parameters
        ----------
        header : bool, optional
            Put the provenance (title, header lines, notes, cautions) ahead of the table
            as ``#`` comment lines; by default the CSV is a plain table.

        Returns
        -------
        str
            Numbers at full precision (``repr`` of the float) in each column's machine
            unit, words as given, empty cells where there is no value.
        """
        buf = io.StringIO()
        if header:
            for m in ([self.title] + self.meta + self.notes
                      + [f"CAUTION: {c}" for c in self.cautions]):
                buf.write(f"# {m}\n")
        w = csv.writer(buf, lineterminator="\n")
        w.writerow([c.machine_header for c in self.columns])
        # Column-wise: each column's cells at once, then the rows joined.
        cols = [c.machine_cells() for c in self.columns]
        if self.n_rows:
            buf.write("\n".join(map(",".join, zip(*cols))))
            buf.write("\n")
        return buf.getvalue()

    def files(self, fmt: str, output=None, *, csv_header: bool = False) -> dict:
        """The files an output of this report consists of, rendered.

        Parameters
        ----------
        fmt : str
            Output format, a key of :data:`RENDERERS`.
        output : str or pathlib.Path, optional
            File to write; None for standard output.
        csv_header : bool, optional
            CSV only: the provenance as ``#`` lines in the CSV itself rather than in the
            sidecar ``FILE.meta.txt`` (:func:`sidecar_path`).

        Returns
        -------
        dict
            Path (None for standard output) to text: a CSV written to a file without
            ``csv_header`` gives two entries, the table and its sidecar; anything else one.
        """
        if fmt != "csv":
            return {output: self.render(fmt)}
        files = {output: self.csv(header=csv_header)}
        if output and not csv_header:
            files[sidecar_path(output)] = self.provenance()
        return files


def _per_distinct(arr, text, missing: str) -> list:
    """``text(v)`` of each value, worked out once per distinct value; ``missing`` for NaN.

    A grid repeats each altitude's figures for every speed (and each speed's for every
    altitude): formatting the distinct values only, then spreading them, is the
    column-wise part that makes a 1e6-point table quick. A column of mostly distinct
    values (judged on a sample) is formatted straight through.
    """
    arr = np.asarray(arr, dtype=float).ravel()
    finite = np.isfinite(arr)
    values = arr[finite]
    sample = values[:20000]
    if values.size < 64 or np.unique(sample).size > 0.5 * sample.size:
        words = list(map(text, values.tolist()))
    else:
        distinct, inverse = np.unique(values, return_inverse=True)
        words = np.array(list(map(text, distinct.tolist())), dtype=object)[
            inverse.ravel()].tolist()
    if finite.all():
        return words
    out = [missing] * arr.size
    for i, w in zip(np.flatnonzero(finite).tolist(), words):
        out[i] = w
    return out


def hours_minutes(seconds) -> str:
    """Format a duration in seconds as h:mm.

    Parameters
    ----------
    seconds : float or None
        Duration [s], rounded to the minute.

    Returns
    -------
    str
        ``"h:mm"``, or ``"-"`` for None or a non-finite value.
    """
    if seconds is None or not math.isfinite(seconds):
        return "-"
    return _minutes_text(round(seconds / 60.0))


def hours_minutes_list(seconds) -> list:
    """:func:`hours_minutes` of each duration, column-wise; None where there is no value.

    The durations are rounded to whole minutes first, so a long column (a 1e6-point grid's
    endurance) has few distinct values to format.

    Parameters
    ----------
    seconds : sequence of float or None
        Durations [s]; None or NaN for a missing value.

    Returns
    -------
    list of str or None
        ``"h:mm"`` each, as :func:`hours_minutes` gives it; None where missing.
    """
    arr = np.array([np.nan if t is None else t for t in seconds], dtype=float)
    with np.errstate(invalid="ignore"):
        minutes = np.round(arr / 60.0)  # half to even, as Python's round()
    return _per_distinct(minutes, _minutes_text, None)


def _minutes_text(minutes: float) -> str:
    m = int(minutes)
    return f"{m // 60}:{m % 60:02d}"


#: Columns of words rather than numbers (left-aligned in text tables).
_TEXT_COLUMNS = {"status", "segment", "leg", "verdict", "reason", "setting", "note"}


def _text(rep: Report) -> str:
    # Two header lines, name over [unit], keep printed tables narrow.
    names = [c.name for c in rep.columns]
    units = [f"[{c.unit}]" if c.unit else "" for c in rep.columns]
    columns = [c.cells() for c in rep.columns]
    widths = [max([len(n), len(u)] + [len(x) for x in col])
              for n, u, col in zip(names, units, columns)]
    left = [c.name in _TEXT_COLUMNS for c in rep.columns]

    def line(items):
        # Numbers right-aligned, words left-aligned.
        return "  ".join(s.ljust(w) if lft else s.rjust(w)
                         for s, w, lft in zip(items, widths, left)).rstrip()

    # Column-wise: each column padded at once, then the rows joined.
    padded = [[x.ljust(w) for x in col] if lft else [x.rjust(w) for x in col]
              for col, w, lft in zip(columns, widths, left)]
    out = [rep.title, "=" * len(rep.title)]
    out += rep.meta
    out += ["", line(names), line(units), line(["-" * w for w in widths])]
    out += ["  ".join(r).rstrip() for r in zip(*padded)]
    if rep.notes:
        out += [""] + rep.notes
    if rep.cautions:
        out += ["", "CAUTION:"] + [f"  * {c}" for c in rep.cautions]
    return "\n".join(out) + "\n"


def _markdown(rep: Report) -> str:
    out = [f"## {rep.title}", ""]
    out += [f"- {m}" for m in rep.meta] + [""]
    out.append("| " + " | ".join(c.header for c in rep.columns) + " |")
    out.append("|" + "|".join("---:" for _ in rep.columns) + "|")
    columns = [c.cells() for c in rep.columns]
    out += ["| " + " | ".join(r) + " |" for r in zip(*columns)]
    if rep.notes:
        out += [""] + [f"{n}  " for n in rep.notes]
    if rep.cautions:
        out += ["", "**Cautions**", ""] + [f"- {c}" for c in rep.cautions]
    return "\n".join(out) + "\n"


def sidecar_path(output) -> Path:
    """The provenance sidecar of a CSV file: ``FILE.csv`` -> ``FILE.meta.txt``.

    Parameters
    ----------
    output : str or pathlib.Path
        The CSV file.

    Returns
    -------
    pathlib.Path
        The same folder and stem, suffix ``.meta.txt``.
    """
    return Path(output).with_suffix(".meta.txt")


def _csv_cell(v) -> str:
    # Full precision: repr of a float round-trips exactly.
    if v is None:
        return ""
    if isinstance(v, float):
        return repr(v)
    return str(v)


def _csv_quoted(cells: list) -> list:
    """CSV cells quoted where they hold a comma, a quote or a line break."""
    if not any(("," in x or '"' in x or "\n" in x or "\r" in x) for x in cells):
        return cells
    return ['"' + x.replace('"', '""') + '"' if ("," in x or '"' in x or "\n" in x
                                                or "\r" in x) else x for x in cells]


def _csv(rep: Report) -> str:
    return rep.csv()


def _jsonable(v):
    if isinstance(v, (np.floating, float)):
        return float(v) if math.isfinite(v) else None
    if isinstance(v, np.integer):
        return int(v)
    return v


def _json(rep: Report) -> str:
    doc = {
        "schema_version": SCHEMA_VERSION,
        "title": rep.title,
        "meta": {k: {"value": _jsonable(v), "unit": u} for k, (v, u) in rep.quantities.items()},
        "meta_text": rep.meta,
        "columns": [{"name": c.name, "unit": c.machine_unit} for c in rep.columns],
        "rows": [[c.machine(i) for c in rep.columns] for i in range(rep.n_rows)],
        "notes": rep.notes,
        "cautions": list(rep.cautions),
    }
    if rep.summary:
        doc["summary"] = {k: _jsonable(v) for k, v in rep.summary.items()}
    return json.dumps(doc, indent=1) + "\n"


RENDERERS = {"text": _text, "markdown": _markdown, "csv": _csv, "json": _json}


def is_special(path) -> bool:
    """Whether ``path`` is an existing file that is neither regular nor a folder.

    A device (``/dev/null``, ``/dev/stdout``), a pipe or a socket: written as it is,
    streamed, never swapped for a regular file.

    Parameters
    ----------
    path : str or pathlib.Path
        A path.

    Returns
    -------
    bool
        True for a special file.
    """
    try:
        mode = os.stat(path).st_mode
    except OSError:
        return False
    return not (stat.S_ISREG(mode) or stat.S_ISDIR(mode))


def check_output(path, option: str = "--output", *, inputs=()) -> Path:
    """Check, before anything is computed, that ``path`` can be written as an output.

    Parameters
    ----------
    path : str or pathlib.Path
        The output file.
    option : str, optional
        The option that names it, for messages.
    inputs : iterable of str or pathlib.Path, optional
        The files this run reads: an output is never one of them.

    Returns
    -------
    pathlib.Path
        ``path``.

    Raises
    ------
    CruiseplanError
        For an empty name, a folder, a folder that does not exist, a path that is one of
        the ``inputs``, or an existing regular file that cannot be replaced.
    """
    if str(path) == "":
        raise CruiseplanError(f"{option}: empty file name")
    path = Path(path)
    if is_special(path):
        return path
    if path.is_dir():
        raise CruiseplanError(f"{option} {path}: is a folder; give a file name")
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise CruiseplanError(f"{option} {path}: folder {folder} does not exist")
    for source in inputs:
        if source is None:
            continue
        try:
            same = path.exists() and os.path.samefile(path, source)
        except OSError:
            same = False
        if same or path.resolve() == Path(source).resolve():
            raise CruiseplanError(f"{option} {path}: is an input of this command "
                                  f"({source}); write the output to a new file")
    if not os.access(folder, os.W_OK):
        raise CruiseplanError(f"{option} {path}: folder {folder} is not writable")
    return path


def check_outputs(outputs: dict, *, inputs=()) -> None:
    """:func:`check_output` on each output, and no two outputs the same file.

    Parameters
    ----------
    outputs : dict
        Option name (``"--output"``, ``"--plot"``) to path, None for one not given.
    inputs : iterable of str or pathlib.Path, optional
        The files this run reads.

    Raises
    ------
    CruiseplanError
        As :func:`check_output`, or for two options naming the same file.
    """
    seen = {}
    for option, path in outputs.items():
        if path is None:
            continue
        check_output(path, option, inputs=inputs)
        key = Path(path).resolve()
        if key in seen and not is_special(path):
            raise CruiseplanError(f"{seen[key]} and {option} name the same file {path}")
        seen[key] = option


def write_atomic(path, text: str) -> None:
    """Write ``text`` to ``path`` through a temporary file, so no partial file remains.

    Parameters
    ----------
    path : str or pathlib.Path
        Destination.
    text : str
        Content.

    Raises
    ------
    CruiseplanError
        If the destination folder does not exist.
    """
    write_files_atomic({path: text})


def _new_file_mode() -> int:
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def write_files_atomic(files: dict) -> None:
    """Write several files whole or not at all (a CSV and its sidecar, a card and its twin).

    Every regular file is first written to a temporary file beside its destination; only
    when all are written are they renamed into place. An error before that leaves no new
    file and no temporary file behind, and every previous file as it was; should a rename
    fail, the files this run already replaced get their previous content back (and those
    it created are removed). A special file (a device such as ``/dev/stdout``, a pipe) is
    not replaced: its content is streamed into it as it is, once the regular files are
    staged.

    Parameters
    ----------
    files : dict
        Destination (str or pathlib.Path) to text (str) or bytes.

    Raises
    ------
    CruiseplanError
        If a destination folder does not exist or a destination is a folder.
    """
    staged, special, backups, done = [], [], {}, []
    try:
        for path, data in files.items():
            path = Path(path)
            data = data.encode("utf-8") if isinstance(data, str) else data
            if is_special(path):
                special.append((path, data))
                continue
            if path.is_dir():
                raise CruiseplanError(f"cannot write {path}: it is a folder")
            folder = path.parent if str(path.parent) else Path(".")
            if not folder.is_dir():
                raise CruiseplanError(f"cannot write {path}: folder {folder} does not exist")
            fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{path.name}.", suffix=".tmp")
            staged.append((tmp, path))
            with os.fdopen(fd, "wb") as fh:
                # mkstemp makes the file private (0600); give it the usual mode.
                os.fchmod(fh.fileno(), _new_file_mode())
                fh.write(data)
        for path, data in special:
            with open(path, "wb") as fh:
                fh.write(data)
        for tmp, path in staged:
            if path.is_file():
                # Keep the previous file (a hard link, no copy) until all are in place.
                backup = tempfile.mktemp(dir=path.parent, prefix=f".{path.name}.",
                                         suffix=".old")
                try:
                    os.link(path, backup)
                    backups[path] = backup
                except OSError:
                    pass
            os.replace(tmp, path)
            done.append(path)
    except BaseException:
        for path in done:  # put back what this run replaced; remove what it created
            if path in backups:
                os.replace(backups.pop(path), path)
            else:
                path.unlink(missing_ok=True)
        for tmp, _ in staged:
            if os.path.exists(tmp):
                os.unlink(tmp)
        raise
    finally:
        for backup in backups.values():
            if os.path.exists(backup):
                os.unlink(backup)


def write_bytes_atomic(path, data: bytes) -> None:
    """Write bytes to ``path`` through a temporary file in the same folder.

    Parameters
    ----------
    path : str or pathlib.Path
        Destination (a special file such as ``/dev/stdout`` is written as it is).
    data : bytes
        Content.

    Raises
    ------
    CruiseplanError
        If the destination folder does not exist.
    """
    write_files_atomic({path: data})
