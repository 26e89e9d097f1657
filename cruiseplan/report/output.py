"""Tables for people and programs: text, markdown, CSV and JSON, in SI or aviation units.

A :class:`Report` is a title, a few header lines (what the figures hold for), columns with
their units, notes and the cautions. Rendering is pure string work; writing goes through
:func:`write_atomic`, so an error never leaves a half-written file. No matplotlib here.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from cruiseplan.errors import CruiseplanError, lookup


@dataclass
class Column:
    """One column: a name, a unit label ('' when dimensionless), values and a format."""

    name: str
    unit: str
    values: list
    fmt: str = "{:.1f}"

    @property
    def header(self) -> str:
        """Header with the unit in brackets."""
        return f"{self.name} [{self.unit}]" if self.unit else self.name

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
    minutes = int(round(seconds / 60.0))
    return f"{minutes // 60}:{minutes % 60:02d}"


#: Columns of words rather than numbers (left-aligned in text tables).
_TEXT_COLUMNS = {"status", "segment", "leg", "verdict", "reason", "setting", "note"}


def _text(rep: Report) -> str:
    # Two header lines, name over [unit], keep printed tables narrow.
    names = [c.name for c in rep.columns]
    units = [f"[{c.unit}]" if c.unit else "" for c in rep.columns]
    cells = [[c.cell(i) for c in rep.columns] for i in range(rep.n_rows)]
    widths = [max([len(n), len(u)] + [len(r[j]) for r in cells])
              for j, (n, u) in enumerate(zip(names, units))]
    left = [c.name in _TEXT_COLUMNS for c in rep.columns]

    def line(items):
        # Numbers right-aligned, words left-aligned.
        return "  ".join(s.ljust(w) if lft else s.rjust(w)
                         for s, w, lft in zip(items, widths, left)).rstrip()

    out = [rep.title, "=" * len(rep.title)]
    out += rep.meta
    out += ["", line(names), line(units), line(["-" * w for w in widths])]
    out += [line(r) for r in cells]
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
    for i in range(rep.n_rows):
        out.append("| " + " | ".join(c.cell(i) for c in rep.columns) + " |")
    if rep.notes:
        out += [""] + [f"{n}  " for n in rep.notes]
    if rep.cautions:
        out += ["", "**Cautions**", ""] + [f"- {c}" for c in rep.cautions]
    return "\n".join(out) + "\n"


def _csv(rep: Report) -> str:
    buf = io.StringIO()
    for m in [rep.title] + rep.meta + rep.notes + [f"CAUTION: {c}" for c in rep.cautions]:
        buf.write(f"# {m}\n")
    w = csv.writer(buf, lineterminator="\n")
    w.writerow([c.header for c in rep.columns])
    for i in range(rep.n_rows):
        w.writerow(["" if c.cell(i) == "-" else c.cell(i) for c in rep.columns])
    return buf.getvalue()


def _jsonable(v):
    if isinstance(v, (np.floating, float)):
        return float(v) if math.isfinite(v) else None
    if isinstance(v, np.integer):
        return int(v)
    return v


def _json(rep: Report) -> str:
    doc = {
        "title": rep.title,
        "meta": rep.meta,
        "columns": [{"name": c.name, "unit": c.unit} for c in rep.columns],
        "rows": [[_jsonable(c.values[i]) for c in rep.columns] for i in range(rep.n_rows)],
        "notes": rep.notes,
        "cautions": list(rep.cautions),
    }
    if rep.summary:
        doc["summary"] = {k: _jsonable(v) for k, v in rep.summary.items()}
    return json.dumps(doc, indent=1) + "\n"


RENDERERS = {"text": _text, "markdown": _markdown, "csv": _csv, "json": _json}


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
    write_bytes_atomic(path, text.encode("utf-8"))


def write_bytes_atomic(path, data: bytes) -> None:
    """Write bytes to ``path`` through a temporary file in the same folder.

    Parameters
    ----------
    path : str or pathlib.Path
        Destination.
    data : bytes
        Content.

    Raises
    ------
    CruiseplanError
        If the destination folder does not exist.
    """
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise CruiseplanError(f"cannot write {path}: folder {folder} does not exist")
    fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{path.name}.", suffix=".tmp")
    try:
        # mkstemp makes the file private (0600); give it the usual mode for new files.
        umask = os.umask(0)
        os.umask(umask)
        os.fchmod(fd, 0o666 & ~umask)
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
