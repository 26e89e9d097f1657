"""Pages of text, rules and shaded bands written straight to PDF, with subset Type 3 fonts.

The cruise card is text and straight lines only, so it needs no figure and no drawing
backend: this module measures text from the font's advance widths and writes the PDF
itself, reading the font file with fontTools. matplotlib is not imported (its figure
machinery and PDF backend took most of the card's time); the font is the DejaVu Sans that
comes with it, which :func:`cruiseplan.plots.cardpage.page_figure` draws with too.

Each glyph used is embedded once, as a Type 3 procedure drawn from its TrueType outline
(quadratic segments raised to cubic ones, exactly); the fonts carry a ``ToUnicode`` map,
so the text can be searched and copied. Text is drawn where it was measured:
the same advance widths, no kerning, no ligatures.

References
----------
.. [1] Adobe, *PDF Reference*, 6th ed. (PDF 1.7), 2006, secs. 5.5.4 (Type 3 fonts),
   5.9 (ToUnicode CMaps), 3.4 (file structure).
"""

from __future__ import annotations

import functools
import hashlib
import importlib.util
import math
import os
import re
import zlib
from dataclasses import dataclass, field
from typing import NamedTuple

from fontTools.pens.basePen import BasePen
from fontTools.ttLib import TTFont

_PT = 72.0  # points per inch
#: Codes given to characters outside Latin-1 (Latin-1 ones keep their own code, so a
#: reader that ignores the Unicode map still reads plain text): the C0 and C1 controls,
#: which no text draws.
_SPARE_CODES = tuple(range(1, 32)) + tuple(range(127, 160))
_NAME_OK = re.compile(r"[A-Za-z0-9._]+")


class PageText(NamedTuple):
    """One line of text on a page."""

    x: float
    """Left end, or right end when ``ha`` is ``"right"`` [in from the left edge]."""
    y: float
    """Baseline [in from the bottom edge]."""
    text: str
    size: float
    """Font size [pt]."""
    bold: bool = False
    ha: str = "left"


class PageRule(NamedTuple):
    """A horizontal rule [in], ``width`` its thickness [pt]."""

    x0: float
    x1: float
    y: float
    width: float = 0.8


class PageBand(NamedTuple):
    """A shaded rectangle [in] behind the text, ``grey`` its grey level [-] (1 white)."""

    x: float
    y: float
    width: float
    height: float
    grey: float = 0.88


@dataclass
class TextPage:
    """A page: its size [in] (width, height) and what is drawn on it, in that order."""

    size: tuple
    texts: list = field(default_factory=list)
    rules: list = field(default_factory=list)
    bands: list = field(default_factory=list)


# --- fonts ---------------------------------------------------------------------------------

#: The card's typeface, DejaVu Sans (matplotlib's default sans-serif, shipped with it).
FONT_FILES = {False: "DejaVuSans.ttf", True: "DejaVuSans-Bold.ttf"}


def font_path(bold: bool = False) -> str:
    """Path of the font file of normal or bold text.

    The files that come with matplotlib, found without importing it (its import alone
    took longer than laying out and writing the whole card).
    """
    package = importlib.util.find_spec("matplotlib").submodule_search_locations[0]
    return os.path.join(package, "mpl-data", "fonts", "ttf", FONT_FILES[bold])


class _Outline(BasePen):
    """A glyph's outline as PDF path operators in glyph space of 1000 units to the em.

    The pen's base class raises TrueType's quadratic segments to cubic ones, exactly.
    """

    def __init__(self, glyphs, scale: float):
        super().__init__(glyphs)
        self.scale = scale
        self.ops = []
        self.xs, self.ys = [], []

    def _put(self, points, op):
        text = []
        for x, y in points:
            x, y = x * self.scale, y * self.scale
            self.xs.append(x)
            self.ys.append(y)
            text += [_num(x), _num(y)]
        self.ops.append(" ".join(text) + " " + op)

    def _moveTo(self, pt):
        self._put([pt], "m")

    def _lineTo(self, pt):
        self._put([pt], "l")

    def _curveToOne(self, pt1, pt2, pt3):
        self._put([pt1, pt2, pt3], "c")

    def _closePath(self):
        self.ops.append("h")


class _Face:
    """A font file: glyph names and advance widths [font units] of the characters used."""

    def __init__(self, bold: bool):
        self.font = TTFont(font_path(bold), lazy=True)
        head = self.font["head"]
        self.units = head.unitsPerEm
        self.bbox = (head.xMin, head.yMin, head.xMax, head.yMax)  # [font units]
        # The PostScript name, as the file is named (reading the name table would import
        # fontTools' OpenType layout tables, a tenth of the card's time).
        self.name = os.path.splitext(FONT_FILES[bold])[0]
        self._cmap = self.font.getBestCmap()
        self._metrics = self.font["hmtx"]
        self._missing = self.font.getGlyphOrder()[0]  # .notdef
        self._glyphs = {}
        self._outlines = None  # the glyph set, read when the first outline is drawn

    def glyph(self, char: str) -> tuple:
        """(glyph name, advance width [font units]) of ``char``."""
        g = self._glyphs.get(char)
        if g is None:
            name = self._cmap.get(ord(char), self._missing)
            g = self._glyphs[char] = (name, self._metrics[name][0])
        return g

    def procedure(self, name: str) -> tuple:
        """PDF name and Type 3 procedure (``d1`` and the filled outline) of a glyph.

        In glyph space of 1000 units to the em, the usual one, which text extractors
        assume when they look for the gaps between words.
        """
        k = 1000.0 / self.units
        if self._outlines is None:
            self._outlines = self.font.getGlyphSet()
        pen = _Outline(self._outlines, k)
        self._outlines[name].draw(pen)
        box = ((math.floor(min(pen.xs)), math.floor(min(pen.ys)), math.ceil(max(pen.xs)),
                math.ceil(max(pen.ys))) if pen.xs else (0, 0, 0, 0))
        ops = [f"{_num(self._metrics[name][0] * k)} 0 {' '.join(map(str, box))} d1"]
        ops += pen.ops + (["f"] if pen.ops else [])
        pdf_name = name if _NAME_OK.fullmatch(name) else f"g{self.font.getGlyphID(name)}"
        return pdf_name, "\n".join(ops).encode("ascii")


@functools.cache
def face(bold: bool = False) -> _Face:
    """The font of normal or bold text (:data:`FONT_FILES`)."""
    return _Face(bold)


def text_width(text: str, size: float, bold: bool = False) -> float:
    """Advance width of one line of ``text`` at ``size`` [pt], in inches, as drawn.

    Parameters
    ----------
    text : str
        One line.
    size : float
        Font size [pt].
    bold : bool, optional
        Bold face.

    Returns
    -------
    float
        Sum of the glyphs' advance widths [in] (no kerning, as :func:`write_pdf` draws).
    """
    f = face(bold)
    return sum(f.glyph(c)[1] for c in text) * size / f.units / _PT


class _Subset:
    """A Type 3 font: up to 256 characters of one face, each with a one-byte code."""

    def __init__(self, face_: _Face, resource: str):
        self.face = face_
        self.resource = resource
        self.codes = {}  # char -> code

    def code(self, char: str):
        """The code of ``char``, given one if it has none; None when the font is full."""
        code = self.codes.get(char)
        if code is None:
            used = set(self.codes.values())
            free = ([ord(char)] if ord(char) < 256 and ord(char) not in _SPARE_CODES
                    else list(_SPARE_CODES))
            code = next((k for k in free if k not in used), None)
            if code is None:
                return None
            self.codes[char] = code
        return code


class _Fonts:
    """The subset fonts of a document, filled as text is drawn."""

    def __init__(self):
        self.subsets = {False: [], True: []}

    def runs(self, text: str, bold: bool) -> list:
        """``text`` as (subset, codes) runs, each in one font."""
        out = []
        for char in text:
            for sub in self.subsets[bold]:
                code = sub.code(char)
                if code is not None:
                    break
            else:
                n = sum(len(s) for s in self.subsets.values()) + 1
                sub = _Subset(face(bold), f"F{n}")
                self.subsets[bold].append(sub)
                code = sub.code(char)
            if out and out[-1][0] is sub:
                out[-1][1].append(code)
            else:
                out.append((sub, [code]))
        return out


# --- the file ------------------------------------------------------------------------------

def _num(v: float) -> str:
    """A number for the PDF: at most three decimals, no trailing zeros, no "-0"."""
    text = f"{v:.3f}".rstrip("0").rstrip(".")
    return "0" if text in ("", "-0") else text


class _Objects:
    """Numbered PDF objects, written out with their cross-reference table."""

    def __init__(self):
        self.bodies = {}
        self.count = 0

    def ref(self) -> int:
        self.count += 1
        return self.count

    def put(self, ref: int, body) -> int:
        self.bodies[ref] = body.encode("latin-1") if isinstance(body, str) else body
        return ref

    def stream(self, data: bytes) -> int:
        """A new compressed stream object holding ``data``; its number."""
        packed = zlib.compress(data, 6)
        return self.put(self.ref(), f"<< /Length {len(packed)} /Filter /FlateDecode >>\n"
                                    "stream\n".encode("ascii") + packed + b"\nendstream")

    def file(self, root: int, info: int) -> bytes:
        out = bytearray(b"%PDF-1.4\n%\xe2\xe3\xcf\xd3\n")
        offsets = []
        for ref in range(1, self.count + 1):
            offsets.append(len(out))
            out += f"{ref} 0 obj\n".encode("ascii") + self.bodies[ref] + b"\nendobj\n"
        xref = len(out)
        out += f"xref\n0 {self.count + 1}\n0000000000 65535 f \n".encode("ascii")
        out += b"".join(f"{o:010d} 00000 n \n".encode("ascii") for o in offsets)
        out += (f"trailer\n<< /Size {self.count + 1} /Root {root} 0 R /Info {info} 0 R >>\n"
                f"startxref\n{xref}\n%%EOF\n").encode("ascii")
        return bytes(out)


def _content(page: TextPage, fonts: _Fonts) -> bytes:
    """The drawing operators of one page: bands, then rules, then text (black)."""
    ops = []
    for b in page.bands:
        ops.append(f"{_num(b.grey)} g {_num(b.x * _PT)} {_num(b.y * _PT)} "
                   f"{_num(b.width * _PT)} {_num(b.height * _PT)} re f")
    ops.append("0 G 0 g 0 J")
    for r in page.rules:
        ops.append(f"{_num(r.width)} w {_num(r.x0 * _PT)} {_num(r.y * _PT)} m "
                   f"{_num(r.x1 * _PT)} {_num(r.y * _PT)} l S")
    for t in page.texts:
        x = t.x * _PT
        if t.ha == "right":
            x -= text_width(t.text, t.size, t.bold) * _PT
        ops.append(f"BT 1 0 0 1 {_num(x)} {_num(t.y * _PT)} Tm")
        for sub, codes in fonts.runs(t.text, t.bold):
            ops.append(f"/{sub.resource} {_num(t.size)} Tf <{bytes(codes).hex()}> Tj")
        ops.append("ET")
    return "\n".join(ops).encode("ascii")


def _to_unicode(codes: dict) -> bytes:
    """A ToUnicode CMap from one-byte codes to the characters they draw."""
    pairs = sorted((code, char) for char, code in codes.items())
    lines = ["/CIDInit /ProcSet findresource begin", "12 dict begin", "begincmap",
             "/CIDSystemInfo << /Registry (Adobe) /Ordering (UCS) /Supplement 0 >> def",
             "/CMapName /Adobe-Identity-UCS def", "/CMapType 2 def",
             "1 begincodespacerange", "<00> <FF>", "endcodespacerange"]
    for k in range(0, len(pairs), 100):  # at most 100 entries a block
        block = pairs[k:k + 100]
        lines.append(f"{len(block)} beginbfchar")
        lines += [f"<{code:02X}> <{char.encode('utf-16-be').hex().upper()}>"
                  for code, char in block]
        lines.append("endbfchar")
    lines += ["endcmap", "CMapName currentdict /CMapResource defineresource pop", "end",
              "end"]
    return "\n".join(lines).encode("ascii")


def _write_font(objects: _Objects, sub: _Subset, ref: int):
    """The Type 3 font of a subset: its glyphs' procedures, codes, widths, Unicode map."""
    f = sub.face
    by_code = {code: char for char, code in sub.codes.items()}
    first, last = min(by_code), max(by_code)
    procs, names = {}, {}  # PDF name: procedure; glyph name: PDF name
    for char in by_code.values():
        glyph = f.glyph(char)[0]
        if glyph not in names:
            name, proc = f.procedure(glyph)
            names[glyph] = name
            procs[name] = objects.stream(proc)
    diffs = " ".join(f"{code} /{names[f.glyph(by_code[code])[0]]}" for code in sorted(by_code))
    k = 1000.0 / f.units
    widths = " ".join(_num(f.glyph(by_code[c])[1] * k) if c in by_code else "0"
                      for c in range(first, last + 1))
    # A subset's name carries a tag of six capitals made from the glyphs it holds.
    tag = "".join(chr(65 + b % 26) for b in hashlib.sha256(
        "".join(sorted(sub.codes)).encode("utf-8")).digest()[:6])
    bbox = " ".join(str(math.floor(v * k) if j < 2 else math.ceil(v * k))
                    for j, v in enumerate(f.bbox))
    objects.put(ref, (
        f"<< /Type /Font /Subtype /Type3 /Name /{sub.resource} "
        f"/BaseFont /{tag}+{f.name} /FontBBox [{bbox}] "
        "/FontMatrix [0.001 0 0 0.001 0 0] "
        "/CharProcs << " + " ".join(f"/{n} {r} 0 R" for n, r in procs.items()) + " >> "
        f"/Encoding << /Type /Encoding /Differences [{diffs}] >> "
        f"/FirstChar {first} /LastChar {last} /Widths [{widths}] "
        f"/ToUnicode {objects.stream(_to_unicode(sub.codes))} 0 R /Resources << >> >>"))


def write_pdf(pages, creator: str = "cruiseplan") -> bytes:
    """Write pages of text, rules and bands as one PDF.

    Parameters
    ----------
    pages : sequence of TextPage
        The pages, in order (at least one); sizes [in].
    creator : str, optional
        The document's ``Creator`` entry.

    Returns
    -------
    bytes
        The whole file: text in subset Type 3 fonts with a Unicode map, black on white,
        bands in grey.
    """
    objects, fonts = _Objects(), _Fonts()
    root, tree, resources = objects.ref(), objects.ref(), objects.ref()
    kids = []
    for page in pages:
        ref = objects.ref()
        content = objects.stream(_content(page, fonts))
        w, h = (_num(v * _PT) for v in page.size)
        objects.put(ref, f"<< /Type /Page /Parent {tree} 0 R /MediaBox [0 0 {w} {h}] "
                         f"/Resources {resources} 0 R /Contents {content} 0 R >>")
        kids.append(ref)
    font_refs = {}
    for subsets in fonts.subsets.values():
        for sub in subsets:
            font_refs[sub.resource] = ref = objects.ref()
            _write_font(objects, sub, ref)
    objects.put(resources, "<< /ProcSet [/PDF /Text] /Font << " + " ".join(
        f"/{name} {ref} 0 R" for name, ref in font_refs.items()) + " >> >>")
    objects.put(tree, f"<< /Type /Pages /Kids [{' '.join(f'{k} 0 R' for k in kids)}] "
                      f"/Count {len(kids)} >>")
    objects.put(root, f"<< /Type /Catalog /Pages {tree} 0 R >>")
    info = objects.put(objects.ref(), f"<< /Creator ({_pdf_string(creator)}) >>")
    return objects.file(root, info)


def _pdf_string(text: str) -> str:
    """``text`` (printable ASCII) escaped for a PDF literal string."""
    return text.replace("\\", "\\\\").replace("(", "\\(").replace(")", "\\)")
