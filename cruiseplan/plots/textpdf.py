"""Pages of text, rules and shaded bands written straight to PDF, with subset Type 3 fonts.

The cruise card is text and straight lines only, so it needs no figure and no drawing
backend: this module measures text from the font's advance widths and writes the PDF
itself. Only :mod:`matplotlib.font_manager` and :mod:`matplotlib.ft2font` are imported
(the same font files and FreeType outlines a figure would use); the figure machinery and
its PDF backend took most of the card's time.

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
import math
import re
import zlib
from dataclasses import dataclass, field
from typing import NamedTuple

from matplotlib.font_manager import FontProperties, findfont, get_font
from matplotlib.ft2font import LoadFlags

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

class _Face:
    """A font file: glyph indices and advance widths [font units] of the characters used."""

    def __init__(self, bold: bool):
        self.font = get_font(findfont(FontProperties(weight="bold" if bold else "normal")))
        self.units = self.font.units_per_EM
        self.name = self.font.postscript_name
        self._glyphs = {}

    def glyph(self, char: str) -> tuple:
        """(glyph index, advance width [font units]) of ``char``."""
        g = self._glyphs.get(char)
        if g is None:
            index = self.font.get_char_index(ord(char))
            g = self._glyphs[char] = (
                index, self.font.load_glyph(index, LoadFlags.NO_SCALE).horiAdvance)
        return g

    def procedure(self, index: int) -> tuple:
        """Glyph name and Type 3 procedure (``d1`` and the filled outline) of a glyph.

        In glyph space of 1000 units to the em, the usual one, which text extractors
        assume when they look for the gaps between words.
        """
        g = self.font.load_glyph(index, LoadFlags.NO_SCALE)
        name = self.font.get_glyph_name(index)
        if not _NAME_OK.fullmatch(name):
            name = f"g{index}"
        k = 1000.0 / self.units
        vertices, codes = self.font.get_path()
        vertices = vertices * 64.0 * k  # font units (FreeType's 1/64) to glyph space
        x0, y0, x1, y1 = g.bbox
        ops = [f"{_num(g.horiAdvance * k)} 0 {math.floor(x0 * k)} {math.floor(y0 * k)} "
               f"{math.ceil(x1 * k)} {math.ceil(y1 * k)} d1"]
        i, here = 0, (0.0, 0.0)
        while i < len(codes):
            code = codes[i]
            if code == 1 or code == 2:  # move to, line to
                here = tuple(vertices[i])
                ops.append(f"{_num(here[0])} {_num(here[1])} {'m' if code == 1 else 'l'}")
                i += 1
            elif code == 3:  # quadratic: the same curve as a cubic, control points 2/3 in
                (qx, qy), (x, y) = vertices[i], vertices[i + 1]
                c = (here[0] + 2 * (qx - here[0]) / 3, here[1] + 2 * (qy - here[1]) / 3,
                     x + 2 * (qx - x) / 3, y + 2 * (qy - y) / 3, x, y)
                ops.append(" ".join(_num(v) for v in c) + " c")
                here = (x, y)
                i += 2
            elif code == 4:  # cubic
                ops.append(" ".join(_num(v) for v in vertices[i:i + 3].ravel()) + " c")
                here = tuple(vertices[i + 2])
                i += 3
            else:  # close
                ops.append("h")
                i += 1
        if len(ops) > 1:
            ops.append("f")
        return name, "\n".join(ops).encode("ascii")


@functools.cache
def face(bold: bool = False) -> _Face:
    """The font of normal or bold text (matplotlib's default sans-serif family)."""
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

    def stream(self, data: bytes, extra: str = "", ref: int | None = None) -> int:
        packed = zlib.compress(data, 6)
        return self.put(ref or self.ref(),
                        f"<< {extra}/Length {len(packed)} /Filter /FlateDecode >>\n"
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
    f = sub.face
    by_code = {code: char for char, code in sub.codes.items()}
    first, last = min(by_code), max(by_code)
    procs, names = {}, {}
    for code, char in by_code.items():
        index, _ = f.glyph(char)
        if index not in names:
            name, proc = f.procedure(index)
            while name in procs:  # two glyphs of one name: keep both
                name += "_"
            names[index] = name
            procs[name] = objects.stream(proc)
    diffs = " ".join(f"{code} /{names[f.glyph(by_code[code])[0]]}" for code in sorted(by_code))
    k = 1000.0 / f.units
    widths = " ".join(_num(f.glyph(by_code[c])[1] * k) if c in by_code else "0"
                      for c in range(first, last + 1))
    # A subset's name carries a tag of six capitals made from the glyphs it holds.
    tag = "".join(chr(65 + b % 26) for b in hashlib.sha256(
        "".join(sorted(sub.codes)).encode("utf-8")).digest()[:6])
    bbox = " ".join(str(math.floor(v * k) if j < 2 else math.ceil(v * k))
                    for j, v in enumerate(f.font.bbox))
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
