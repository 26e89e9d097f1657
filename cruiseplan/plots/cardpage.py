"""The cruise card's page: text and tables laid out on one portrait page."""

from __future__ import annotations

import functools

import numpy as np
from matplotlib.figure import Figure
from matplotlib.font_manager import FontProperties
from matplotlib.lines import Line2D
from matplotlib.patches import Rectangle
from matplotlib.textpath import TextPath

from cruiseplan.constants import DEFAULT_STALL_MARGIN
from cruiseplan.errors import CruiseplanError
from cruiseplan.plots.style import (
    CARD_PAGES,
)
from cruiseplan.report.card import card_content

# --- cruise-card page ---------------------------------------------------------------------

#: Font sizes of the card [pt]: all at least MIN_FONT.
CARD_FONTS = {"title": 12.0, "meta": 7.5, "heading": 9.0, "table": 8.0, "text": 7.5,
              "caution": 7.5, "footer": 7.0}
_CARD_MARGIN = 0.3  # [in]
_LEADING = 1.18  # line pitch over font size, text
_ROW_LEADING = 1.3  # line pitch over font size, table rows


@functools.lru_cache(maxsize=4096)
def _text_width(text: str, size: float, bold: bool) -> float:
    prop = FontProperties(size=size, weight="bold" if bold else "normal")
    return TextPath((0, 0), text, size=size, prop=prop).get_extents().x1 / 72.0


class _Page:
    """Top-down text layout on a figure, in inches; remembers whether everything fitted."""

    def __init__(self, fig: Figure):
        self.fig = fig
        self.width, self.height = fig.get_size_inches()
        self.left = _CARD_MARGIN
        self.text_width = self.width - 2 * _CARD_MARGIN
        self.y = self.height - _CARD_MARGIN

    @staticmethod
    def measure(text: str, size: float, bold: bool = False) -> float:
        """Advance width of ``text`` [in], from the unhinted glyph outlines (as in PDF)."""
        return _text_width(text, size, bold)

    def wrap(self, text: str, size: float, width: float) -> list:
        space = _text_width("a a", size, False) - 2 * _text_width("a", size, False)
        lines, line, used = [], [], 0.0
        for word in text.split():
            w = _text_width(word, size, False)
            if line and used + space + w > width:
                lines.append(" ".join(line))
                line, used = [word], w
            else:
                used += (space if line else 0.0) + w
                line.append(word)
        return lines + ([" ".join(line)] if line else [])

    def text(self, x: float, text: str, size: float, *, bold=False, ha="left", **kw):
        self.fig.text(x, self.y, text, fontsize=size, ha=ha, va="baseline",
                      weight="bold" if bold else "normal",
                      transform=self.fig.dpi_scale_trans, **kw)

    def down(self, size: float, lines: float = 1.0, leading: float = _LEADING):
        self.y -= lines * size * leading / 72.0

    def paragraph(self, text: str, size: float, *, indent: float = 0.0, bullet: str = ""):
        for k, line in enumerate(self.wrap(text, size, self.text_width - indent)):
            self.down(size)
            if bullet and k == 0:
                self.fig.text(self.left, self.y, bullet, fontsize=size,
                              transform=self.fig.dpi_scale_trans)
            self.fig.text(self.left + indent, self.y, line, fontsize=size,
                          transform=self.fig.dpi_scale_trans)

    def table(self, table) -> bool:
        size = CARD_FONTS["table"]
        pad = 0.05
        cells = [[c for c in row] for row in table.rows]
        names = [name.split("\n") for name, _, _ in table.columns]
        widths = []
        for j, (_, unit, _) in enumerate(table.columns):
            w = max([self.measure(n, size, bold=True) for n in names[j]]
                    + [self.measure(f"[{unit}]", size)]
                    + [self.measure(r[j], size) for r in cells])
            widths.append(w + 2 * pad)
        total = sum(widths)
        if total > self.text_width:
            return False
        widths = [w + (self.text_width - total) / len(widths) for w in widths]
        edges = np.concatenate([[self.left], self.left + np.cumsum(widths)])
        row_h = size * _ROW_LEADING / 72.0

        def put(j, text, bold=False):
            align = table.columns[j][2]
            x = edges[j] + pad if align == "left" else edges[j + 1] - pad
            self.text(x, text, size, bold=bold, ha="left" if align == "left" else "right")

        depth = max(len(n) for n in names)
        for k in range(depth):
            self.down(size)
            for j, lines in enumerate(names):
                # Names sit on the line just above the units.
                line = k - (depth - len(lines))
                if line >= 0:
                    put(j, lines[line], bold=True)
        self.down(size)
        for j, (_, unit, _) in enumerate(table.columns):
            put(j, f"[{unit}]" if unit else "")
        rule = self.y - 0.3 * row_h
        self.fig.add_artist(Line2D([self.left, self.left + self.text_width], [rule, rule],
                                   color="black", linewidth=0.8,
                                   transform=self.fig.dpi_scale_trans))
        self.y -= 0.25 * row_h
        for row, group in zip(cells, table.groups):
            self.down(size, leading=_ROW_LEADING)
            if group % 2:
                self.fig.add_artist(Rectangle(
                    (self.left, self.y - 0.3 * row_h), self.text_width, row_h,
                    facecolor="0.88", edgecolor="none", zorder=0,
                    transform=self.fig.dpi_scale_trans))
            for j, text in enumerate(row):
                put(j, text)
        self.y -= 0.3 * row_h
        self.fig.add_artist(Line2D([self.left, self.left + self.text_width],
                                   [self.y, self.y], color="black", linewidth=0.8,
                                   transform=self.fig.dpi_scale_trans))
        return True


def _draw_card(fig: Figure, content) -> bool:
    """Draw the card on ``fig``; False when it does not fit the page."""
    page = _Page(fig)
    f = CARD_FONTS
    page.down(f["title"], 0.8)
    page.text(page.left, content.title, f["title"], bold=True)
    page.y -= 0.04
    for line in content.meta:
        page.paragraph(line, f["meta"])
    for block in content.blocks:
        page.y -= 0.06
        page.down(f["heading"])
        page.text(page.left, block.heading, f["heading"], bold=True)
        if hasattr(block, "columns"):
            if not page.table(block):
                return False
            for note in block.notes:
                page.paragraph(note, f["text"])
        else:
            for line in block.lines:
                page.paragraph(line, f["text"])
    page.y -= 0.06
    page.down(f["heading"])
    page.text(page.left, "Cautions", f["heading"], bold=True)
    for caution in content.cautions:
        page.paragraph(caution, f["caution"], indent=0.12, bullet="\u2022")
    footer_y = 0.14
    fig.text(page.left, footer_y, content.footer, fontsize=f["footer"], style="italic",
             transform=fig.dpi_scale_trans)
    return page.y > footer_y + 0.16


def card_figure(content) -> Figure:
    """Draw a cruise card on one portrait page (A5, or A4 when A5 is too small).

    Parameters
    ----------
    content : cruiseplan.report.card.CardContent
        Title, header lines, tables and text blocks, cautions and footer.

    Returns
    -------
    matplotlib.figure.Figure
        One page; no font is smaller than :data:`MIN_FONT`.

    Raises
    ------
    CruiseplanError
        When the content does not fit one A4 page at legible size.
    """
    for size in CARD_PAGES.values():
        fig = Figure(figsize=size)
        if _draw_card(fig, content):
            return fig
    rows = sum(len(getattr(b, "rows", ())) for b in content.blocks)
    raise CruiseplanError(f"the cruise card's {rows} table rows do not fit one A4 page at a "
                          f"legible size: give fewer altitudes or power settings")


def cruise_card(airframe, *, altitudes=None, power_settings=None, mass=None, fuel=None,
                payload=None, isa_dev=0.0, reserve=None, units: str | None = None,
                stall_margin: float = DEFAULT_STALL_MARGIN, monte_carlo: int | None = None,
                seed: int = 0, progress=None):
    """The cruise card as markdown and as a one-page figure.

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

    Returns
    -------
    markdown : str
        The card in markdown.
    figure : matplotlib.figure.Figure
        The same card on one portrait page (A5, or A4 when A5 is too small); save it with
        :func:`cruiseplan.plots.figure_bytes`.

    Raises
    ------
    CruiseplanError
        As :func:`cruiseplan.report.card.card_content`, or when the card's tables do not
        fit one A4 page at a legible size.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.5, 5.7, 5.11.
    """
    content = card_content(airframe, altitudes=altitudes, power_settings=power_settings,
                           mass=mass, fuel=fuel, payload=payload, isa_dev=isa_dev,
                           reserve=reserve, units=units, stall_margin=stall_margin,
                           monte_carlo=monte_carlo, seed=seed, progress=progress)
    return content.markdown(), card_figure(content)
