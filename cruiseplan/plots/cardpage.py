"""The cruise card's pages: text and tables laid out top-down on portrait kneeboard pages.

Sizes (:data:`CARD_FONTS`): body text, tables, notes, cautions and footer 9 pt, headings
10.5 pt, title 13 pt, none below :data:`CARD_MIN_FONT` (9 pt) on A5. Tables fill the text
width (spare width shared between the columns); a table longer than the page goes on over
the next page with its column heads repeated, and the rows of one altitude stay together.

The layout (:func:`card_layout`) gives pages of positioned text, rules and bands
(:class:`~cruiseplan.plots.textpdf.TextPage`), measured from the font's advance widths;
:func:`card_pdf` writes them straight to PDF (:mod:`cruiseplan.plots.textpdf`), with no
figure made, and :func:`card_pages` draws the same pages as matplotlib figures (for a
notebook, and for the layout tests, which check them with matplotlib's renderer).
"""

from __future__ import annotations

import re

import numpy as np

from cruiseplan.constants import DEFAULT_STALL_MARGIN
from cruiseplan.errors import CruiseplanError
from cruiseplan.plots.textpdf import (
    PageBand,
    PageRule,
    PageText,
    TextPage,
    font_path,
    text_width,
    write_pdf,
)
from cruiseplan.report.card import CARD_MAX_PAGES, card_content

# --- cruise-card pages ----------------------------------------------------------------------

#: Font sizes of the card [pt]: all at least CARD_MIN_FONT.
CARD_FONTS = {"title": 13.0, "meta": 9.0, "heading": 10.5, "table": 9.0, "text": 9.0,
              "caution": 9.0, "footer": 9.0}
#: Card pages, portrait [in].
CARD_PAGES = {"A5": (5.83, 8.27), "A4": (8.27, 11.69)}
_CARD_MARGIN = 0.25  # [in]
_LEADING = 1.18  # line pitch over font size, text
_ROW_LEADING = 1.3  # line pitch over font size, table rows
_PAD = 0.035  # cell padding [in]
_FOOTER_Y = 0.16  # footer baseline [in]
_BOTTOM = _FOOTER_Y + 0.2  # lowest baseline of the content [in]


#: Where a word may break without a space: after the "+" joining limit codes in a status
#: (STALL+CLMAX), so a status column stays narrow enough for A5.
_BREAK = re.compile(r"(?<=[A-Z]\+)(?=[A-Z])")


def _pieces(word: str) -> list:
    """The parts of ``word`` a line may not break inside."""
    return _BREAK.split(word)


def _wrap(text: str, size: float, width: float, bold: bool = False) -> list:
    """Lines of ``text`` no wider than ``width`` [in] (a word longer than that on its own).

    Lines break at spaces, and after the "+" between limit codes (:data:`_BREAK`).
    """
    space = text_width(" ", size, bold)
    lines, line, used = [], "", 0.0
    for word in text.split():
        for k, piece in enumerate(_pieces(word)):
            gap, sep = (space, " ") if k == 0 and line else (0.0, "")
            w = text_width(piece, size, bold)
            if line and used + gap + w > width:
                lines.append(line)
                line, used = piece, w
            else:
                line, used = line + sep + piece, used + gap + w
    return lines + ([line] if line else [])


class _Pages:
    """Top-down text layout over as many pages as needed, in inches."""

    def __init__(self, size, title: str):
        self.size = size
        self.title = title
        self.pages = []
        self.left = _CARD_MARGIN
        self.text_width = size[0] - 2 * _CARD_MARGIN
        self.new_page()

    def new_page(self):
        if len(self.pages) == CARD_MAX_PAGES:
            raise CruiseplanError(
                f"the cruise card does not fit {CARD_MAX_PAGES} pages at a legible size: "
                "give fewer altitudes or power settings")
        self.page = TextPage(self.size)
        self.pages.append(self.page)
        self.y = self.size[1] - _CARD_MARGIN
        if len(self.pages) > 1:
            self.down(CARD_FONTS["heading"], 0.8)
            self.text(self.left, f"{self.title} (continued)", CARD_FONTS["heading"],
                      bold=True)
            self.y -= 0.06

    def room(self, height: float) -> bool:
        """Whether ``height`` [in] more fits above the footer."""
        return self.y - height >= _BOTTOM

    def need(self, height: float):
        """Start a new page unless ``height`` [in] fits on this one."""
        if not self.room(height):
            self.new_page()

    def text(self, x: float, text: str, size: float, *, bold=False, ha="left"):
        self.page.texts.append(PageText(x, self.y, text, size, bold, ha))

    def line(self, y: float):
        self.page.rules.append(PageRule(self.left, self.left + self.text_width, y))

    def down(self, size: float, lines: float = 1.0, leading: float = _LEADING):
        self.y -= lines * size * leading / 72.0

    def paragraph(self, text: str, size: float, *, indent: float = 0.0, bullet: str = "",
                  bold: bool = False):
        lines = _wrap(text, size, self.text_width - indent, bold)
        pitch = size * _LEADING / 72.0
        # A short paragraph is not split; a long one may go on over the page.
        self.need(pitch * min(len(lines), 3))
        for k, line in enumerate(lines):
            self.need(pitch)
            self.down(size)
            if bullet and k == 0:
                self.text(self.left, bullet, size)
            self.text(self.left + indent, line, size, bold=bold)

    def keep(self, paragraphs, size: float, indent: float = 0.0) -> float:
        """Height [in] of a text block to keep on one page with its heading.

        The whole block when it takes less than half a page (a reserve line or the
        cautions read apart from their heading otherwise), else its first two lines.
        """
        pitch = size * _LEADING / 72.0
        lines = sum(len(_wrap(p, size, self.text_width - indent)) for p in paragraphs)
        return lines * pitch if lines * pitch < self.size[1] / 2 else 2 * pitch

    def heading(self, text: str, following: float):
        """A block heading, kept on one page with ``following`` [in] of its block."""
        size = CARD_FONTS["heading"]
        self.need(0.06 + size * _LEADING / 72.0 + following)
        self.y -= 0.06
        self.down(size)
        self.text(self.left, text, size, bold=True)

    # --- tables ---

    def _widths(self, table) -> tuple:
        """Column widths [in] filling the text width, and each row's cells as lines."""
        size = CARD_FONTS["table"]
        names = [name.split("\n") for name, _, _ in table.columns]
        head = [max([text_width(n, size, True) for n in names[j]]
                    + [text_width(f"[{unit}]", size, False)]) + 2 * _PAD
                for j, (_, unit, _) in enumerate(table.columns)]
        body = [max([text_width(r[j], size, False) for r in table.rows], default=0.0)
                + 2 * _PAD for j in range(len(table.columns))]
        widths = [max(a, b) for a, b in zip(head, body)]
        # Left-aligned text columns (status, "held by") wrap when the table is too wide.
        wrap = [j for j, (_, _, align) in enumerate(table.columns) if align == "left"]
        spare = self.text_width - sum(widths)
        if spare < 0 and wrap:
            fixed = sum(w for j, w in enumerate(widths) if j not in wrap)
            share = (self.text_width - fixed) / len(wrap)
            for j in wrap:
                longest = max([text_width(p, size, False) for r in table.rows
                               for w in r[j].split() for p in _pieces(w)],
                              default=0.0) + 2 * _PAD
                widths[j] = max(min(widths[j], share), head[j], longest)
            spare = self.text_width - sum(widths)
        if spare < -1e-9:
            raise CruiseplanError(
                f"the card's table {table.heading!r} is {sum(widths):.2f} in wide at "
                f"{size:g} pt and the page's text {self.text_width:.2f} in: give the card a "
                "larger page (--page A4)")
        widths = [w + spare / len(widths) for w in widths]
        cells = [[_wrap(text, size, widths[j] - 2 * _PAD) if j in wrap else [text]
                  for j, text in enumerate(row)] for row in table.rows]
        return widths, names, cells

    def _head(self, table, edges, names):
        size = CARD_FONTS["table"]
        depth = max(len(n) for n in names)
        for k in range(depth):
            self.down(size)
            for j, lines in enumerate(names):
                # Names sit on the line just above the units.
                line = k - (depth - len(lines))
                if line >= 0:
                    self._put(table, edges, j, lines[line], bold=True)
        self.down(size)
        for j, (_, unit, _) in enumerate(table.columns):
            if unit:
                self._put(table, edges, j, f"[{unit}]")
        row_h = size * _ROW_LEADING / 72.0
        self.line(self.y - 0.3 * row_h)
        self.y -= 0.25 * row_h

    def _put(self, table, edges, j, text, bold=False):
        left = table.columns[j][2] == "left"
        x = edges[j] + _PAD if left else edges[j + 1] - _PAD
        self.text(x, text, CARD_FONTS["table"], bold=bold, ha="left" if left else "right")

    def table(self, table, following: float):
        """Draw ``table``; heading and ``following`` [in] are kept with its head."""
        size = CARD_FONTS["table"]
        widths, names, cells = self._widths(table)
        edges = np.concatenate([[self.left], self.left + np.cumsum(widths)])
        row_h = size * _ROW_LEADING / 72.0
        head_h = (max(len(n) for n in names) + 1) * size * _LEADING / 72.0 + 0.25 * row_h
        heights = [max(len(c) for c in row) * row_h for row in cells]
        groups = np.asarray(table.groups)
        group_h = {g: sum(h for h, k in zip(heights, groups) if k == g) for g in set(groups)}
        first = group_h[groups[0]] if len(groups) else 0.0
        self.heading(table.heading, head_h + first)
        self._head(table, edges, names)
        for r, (row, group) in enumerate(zip(cells, groups)):
            starts = r == 0 or groups[r - 1] != group
            if not self.room(heights[r] + 0.3 * row_h) or (
                    starts and not self.room(group_h[group] + 0.3 * row_h)
                    and group_h[group] + head_h < self.size[1] / 2):
                self.y -= 0.3 * row_h
                self.line(self.y)
                self.new_page()
                self.down(size)
                self.text(self.left, f"{table.heading} (continued)", size, bold=True)
                self._head(table, edges, names)
            top = self.y
            if group % 2:
                self.page.bands.append(PageBand(self.left, top - heights[r] - 0.3 * row_h,
                                                self.text_width, heights[r]))
            for k in range(max(len(c) for c in row)):
                self.down(size, leading=_ROW_LEADING)
                for j, lines in enumerate(row):
                    if k < len(lines) and lines[k]:
                        self._put(table, edges, j, lines[k])
            self.y = top - heights[r]
        self.y -= 0.3 * row_h
        self.line(self.y)


def _lay_out(content, size) -> list:
    """The card's pages on paper of ``size`` [in]."""
    f = CARD_FONTS
    pages = _Pages(size, content.title)
    pages.down(f["title"], 0.8)
    pages.text(pages.left, content.title, f["title"], bold=True)
    pages.y -= 0.04
    for line in content.meta:
        pages.paragraph(line, f["meta"])
    for block in content.blocks:
        if hasattr(block, "columns"):
            pages.table(block, 0.0)
            for note in block.notes:
                pages.paragraph(note, f["text"])
        else:
            pages.heading(block.heading, pages.keep(block.lines, f["text"]))
            for line in block.lines:
                pages.paragraph(line, f["text"])
    pages.heading("Cautions", pages.keep(content.cautions, f["caution"], indent=0.14))
    for caution in content.cautions:
        pages.paragraph(caution, f["caution"], indent=0.14, bullet="\u2022")
    n = len(pages.pages)
    for k, page in enumerate(pages.pages):
        footer = content.footer + (f" \u2014 page {k + 1} of {n}" if n > 1 else "")
        for j, line in enumerate(reversed(_wrap(footer, f["footer"], pages.text_width))):
            page.texts.append(PageText(pages.left, _FOOTER_Y + j * f["footer"] * _LEADING
                                       / 72.0, line, f["footer"]))
    return pages.pages


def card_layout(content, page: str = "A5") -> list:
    """Lay a cruise card out on portrait pages (A5 unless asked), over as many as it takes.

    Parameters
    ----------
    content : cruiseplan.report.card.CardContent
        Title, header lines, tables and text blocks, cautions and footer.
    page : {"A5", "A4"}, optional
        Paper size (:data:`CARD_PAGES`).

    Returns
    -------
    list of cruiseplan.plots.textpdf.TextPage
        One a page, at most :data:`CARD_MAX_PAGES`: texts, rules and bands placed in
        inches; no font is smaller than :data:`CARD_MIN_FONT` [pt]. Write them with
        :func:`card_pdf`, or draw them with :func:`page_figure`.

    Raises
    ------
    CruiseplanError
        For an unknown page size, a table wider than the page at legible size, or a card
        longer than :data:`CARD_MAX_PAGES` pages.
    """
    key = str(page).upper()
    if key not in CARD_PAGES:
        raise CruiseplanError(f"page {page!r} is not one of {', '.join(CARD_PAGES)}")
    return _lay_out(content, CARD_PAGES[key])


def card_pdf(pages) -> bytes:
    """The card's pages as one PDF, text in subset Type 3 fonts with a Unicode map.

    Parameters
    ----------
    pages : sequence of cruiseplan.plots.textpdf.TextPage
        The pages of :func:`card_layout`.

    Returns
    -------
    bytes
        The whole file (:func:`cruiseplan.plots.textpdf.write_pdf`; no figure is made).
    """
    return write_pdf(pages)


def page_figure(page):
    """Draw one laid-out page as a matplotlib figure, as the PDF draws it.

    Parameters
    ----------
    page : cruiseplan.plots.textpdf.TextPage
        A page of :func:`card_layout`.

    Returns
    -------
    matplotlib.figure.Figure
        The page's size [in], its texts (in the PDF's font files,
        :func:`~cruiseplan.plots.textpdf.font_path`), rules and grey bands at the same
        places.
    """
    from matplotlib.figure import Figure
    from matplotlib.font_manager import FontProperties
    from matplotlib.lines import Line2D
    from matplotlib.patches import Rectangle

    fonts = {bold: font_path(bold) for bold in (False, True)}
    fig = Figure(figsize=page.size)
    inches = fig.dpi_scale_trans
    for b in page.bands:
        fig.add_artist(Rectangle((b.x, b.y), b.width, b.height, facecolor=str(b.grey),
                                 edgecolor="none", zorder=0, transform=inches))
    for r in page.rules:
        fig.add_artist(Line2D([r.x0, r.x1], [r.y, r.y], color="black", linewidth=r.width,
                              transform=inches))
    for t in page.texts:
        fig.text(t.x, t.y, t.text, ha=t.ha, va="baseline", transform=inches,
                 fontproperties=FontProperties(fname=fonts[t.bold], size=t.size))
    return fig


def card_pages(content, page: str = "A5") -> list:
    """Draw a cruise card on portrait pages (A5 unless asked), as matplotlib figures.

    Parameters
    ----------
    content : cruiseplan.report.card.CardContent
        Title, header lines, tables and text blocks, cautions and footer.
    page : {"A5", "A4"}, optional
        Paper size (:data:`CARD_PAGES`).

    Returns
    -------
    list of matplotlib.figure.Figure
        :func:`page_figure` of each page of :func:`card_layout`. A PDF of the card is
        written faster from the layout itself, with :func:`card_pdf`.

    Raises
    ------
    CruiseplanError
        As :func:`card_layout`.
    """
    return [page_figure(p) for p in card_layout(content, page)]


def cruise_card(airframe, *, altitudes=None, power_settings=None, mass=None, fuel=None,
                payload=None, isa_dev=0.0, reserve=None, units: str | None = None,
                stall_margin: float = DEFAULT_STALL_MARGIN, monte_carlo: int | None = None,
                seed: int = 0, progress=None, page: str = "A5"):
    """The cruise card as markdown and laid out on kneeboard pages.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    altitudes : array_like or pint.Quantity, optional
        Pressure altitudes [m], increasing; defaults by propulsion kind as in
        :func:`cruiseplan.report.card.card_content`.
    power_settings : array_like, optional
        Fractions of rated power [-]; defaults by propulsion kind.
    mass, fuel, payload : float or pint.Quantity, optional
        Loading, as in :func:`cruiseplan.cruise_grid` [kg, kg or J, kg].
    isa_dev : float or pint.Quantity, optional
        ISA deviation [K].
    reserve : Reserve or str, optional
        Reserve to keep; the default reserve of the propulsion kind when not given.
    units : {"aviation", "si"}, optional
        Display units; aviation for piston airframes, SI for electric ones by default.
    stall_margin : float, optional
        Minimum TAS over stall speed [-] (1.3, common practice).
    monte_carlo : int, optional
        Samples of the airframe's tolerances [-]: adds the spread of range and endurance.
    seed : int
        Seed of the Monte Carlo [-].
    progress : callable, optional
        Called as ``progress(done, total)`` [-, -] after each chunk of the Monte Carlo.
    page : {"A5", "A4"}, optional
        Paper size of the pages.

    Returns
    -------
    markdown : str
        The card in markdown.
    pages : list of cruiseplan.plots.textpdf.TextPage
        The same card on portrait pages (:func:`card_layout`); write them with
        :func:`card_pdf`, draw them with :func:`page_figure`.

    Raises
    ------
    CruiseplanError
        As :func:`cruiseplan.report.card.card_content` and :func:`card_layout`.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.5, 5.7, 5.11.
    """
    content = card_content(airframe, altitudes=altitudes, power_settings=power_settings,
                           mass=mass, fuel=fuel, payload=payload, isa_dev=isa_dev,
                           reserve=reserve, units=units, stall_margin=stall_margin,
                           monte_carlo=monte_carlo, seed=seed, progress=progress)
    return content.markdown(), card_layout(content, page)
