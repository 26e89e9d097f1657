"""Plots, the printed cruise card and their CLI commands.

Figures are checked for what a crew needs from them (files made, one page, the cautions and
the same figures as the tables, legible font sizes, limit reasons written in the plot), not
pixel by pixel. Grids are small so the file runs in a few seconds.
"""

from __future__ import annotations

import io
import re
import subprocess
import sys

import numpy as np
import pytest
from matplotlib.text import Text

import cruiseplan as cp
from cruiseplan import cli, plots
from cruiseplan.errors import CruiseplanError, UnitError
from cruiseplan.io.bundled import bundled_files
from cruiseplan.io.text import parse_reserve
from cruiseplan.planning.optimise import best_cruise
from cruiseplan.report import card
from cruiseplan.units import conversion_factor

FT = 0.3048
KT = conversion_factor("kt", "m/s")


def squash(text: str) -> str:
    """Whitespace collapsed to single spaces (PDF text breaks lines where it wraps)."""
    return " ".join(text.split())


def run(argv, capsys):
    rc = cli.main(argv)
    out, err = capsys.readouterr()
    return rc, out, err


def pdf_pages(path):
    from pypdf import PdfReader

    return PdfReader(str(path)).pages


# --- plot files ----------------------------------------------------------------------------

PLOT_CALLS = {
    "map": ["--altitudes", "0:8000ft:2000ft", "--speeds", "55:125kt:5kt"],
    "power": ["--altitudes", "0,8000ft", "--speeds", "55:125kt:5kt"],
    "altitude": ["--altitudes", "0:8000ft:2000ft", "--wind", "270/25@0ft,250/40@8000ft",
                 "--course", "260"],
}
MAGIC = {"png": b"\x89PNG\r\n\x1a\n", "pdf": b"%PDF-"}


@pytest.mark.parametrize("ext", ["png", "pdf"])
@pytest.mark.parametrize("kind", sorted(PLOT_CALLS))
def test_plot_files_are_made(capsys, tmp_path, kind, ext):
    out = tmp_path / f"{kind}.{ext}"
    rc, stdout, err = run(["plot", "demo-trainer", "--kind", kind, "-o", str(out)]
                          + PLOT_CALLS[kind], capsys)
    assert (rc, err) == (0, "")
    assert stdout == f"wrote {out}\n"
    data = out.read_bytes()
    assert data.startswith(MAGIC[ext]) and len(data) > 10_000
    if ext == "pdf":
        assert len(pdf_pages(out)) == 1
    assert sorted(p.name for p in tmp_path.iterdir()) == [out.name]  # no temporary left


def test_map_in_wind_for_a_drone(capsys, tmp_path):
    out = tmp_path / "map.png"
    rc, _, err = run(["plot", "demo-survey-drone", "-o", str(out), "--altitudes",
                      "0:400m:100m", "--wind", "270/8m/s@0m,250/12m/s@400m", "--course", "90"],
                     capsys)
    assert (rc, err) == (0, "")
    assert out.read_bytes().startswith(MAGIC["png"])


# --- what the figures say ------------------------------------------------------------------

@pytest.fixture(scope="module")
def trainer_map():
    af = cp.load_airframe("demo-trainer")
    h = np.arange(0.0, 8001.0, 1000.0) * FT
    grid = cp.cruise_grid(af, h, np.arange(50.0, 131.0, 4.0) * KT)
    return af, grid, plots.specific_range_map(af, grid, best_cruise(af, h))


def figure_texts(fig):
    return [t for t in fig.findobj(Text) if t.get_visible() and t.get_text().strip()]


def test_map_writes_each_limit_reason_inside_the_plot(trainer_map):
    af, grid, fig = trainer_map
    ax = fig.axes[0]
    in_axes = [squash(t.get_text()) for t in ax.texts]
    # This grid runs from below the stall to beyond full throttle: both limits show.
    assert np.any(grid.limits & cp.Limit.STALL) and np.any(grid.limits & cp.Limit.POWER)
    assert "STALL: below the stall margin" in in_axes
    assert "POWER: power required exceeds power available" in in_axes
    reasons = [t for t in ax.texts if t.get_text().startswith(("STALL", "POWER"))]
    assert len(reasons) == 2
    for t in reasons:  # placed in axes fractions, inside the frame
        x, y = t.get_position()
        assert t.get_transform() == ax.transAxes
        assert 0.0 < x < 1.0 and 0.0 < y < 1.0
    labels = [h.get_label() for h in ax.get_legend().legend_handles]
    assert any(lab.startswith("best-range TAS") for lab in labels)
    assert any(lab.startswith("best-endurance TAS") for lab in labels)
    assert ax.get_xlabel() == "true airspeed, TAS [kt]"
    assert ax.get_ylabel() == "pressure altitude [ft]"
    assert fig.axes[1].get_ylabel() == "air specific range [nm/US gal]"


def test_every_figure_is_legible_and_carries_the_caution(trainer_map, trainer):
    af, _, fig_map = trainer_map
    h = np.array([0.0, 4000.0, 8000.0]) * FT
    best = best_cruise(af, h)
    figs = [fig_map, plots.power_curves(trainer, h, tas=np.linspace(25.0, 65.0, 30)),
            plots.altitude_profile(trainer, best, best_cruise(af, h, headwind=10.0),
                                   wind_text="headwind 20 kt")]
    for fig in figs:
        texts = figure_texts(fig)
        assert min(t.get_fontsize() for t in texts) >= plots.MIN_FONT
        assert card.CAUTION_LINE in [t.get_text() for t in texts]
        for ax in fig.axes:
            if ax.get_xlabel():  # every labelled axis names its unit in brackets
                assert re.search(r"\[.+\]$", ax.get_xlabel())
                assert not ax.get_ylabel() or re.search(r"\[.+\]$", ax.get_ylabel())


def test_power_curves_mark_min_power_and_best_lift_to_drag(trainer):
    h = np.array([0.0, 2000.0])
    fig = plots.power_curves(trainer, h, tas=np.linspace(25.0, 65.0, 30), units="si")
    ax = fig.axes[0]
    assert ax.get_ylabel() == "shaft power [kW]"
    # Each altitude has its own colour, line style and marker (readable in grey).
    curves = [ln for ln in ax.lines if ln.get_label().startswith("required at")]
    assert [ln.get_label() for ln in curves] == ["required at 0 m", "required at 2000 m"]
    styles = {(ln.get_color(), ln.get_linestyle(), ln.get_marker()) for ln in curves}
    assert len({s[1] for s in styles}) == len({s[2] for s in styles}) == 2
    # The (L/D)max mark sits at the minimum of drag = P eta / V on the plotted curve.
    air = cp.air_state(h)
    v_ld = cp.planning.performance.speed_for_min_drag(trainer, trainer.loading().mass, air)
    v = np.linspace(20.0, 70.0, 5001)
    drag = cp.cruise_points(trainer, trainer.loading().mass, air.column(), v[None, :],
                            1.0).drag
    # A grid of 0.01 m/s places the minimum to half a step (measured 0.0033).
    np.testing.assert_allclose(v_ld, v[np.argmin(drag, axis=1)], atol=0.005)
    hexagons = [ln for ln in ax.lines if ln.get_marker() == "h" and ln.get_label()[0] == "_"]
    np.testing.assert_allclose(sorted(ln.get_xdata()[0] for ln in hexagons),
                               v_ld * conversion_factor("m/s", "km/h"))


def test_plot_function_errors(trainer):
    grid = cp.cruise_grid(trainer, [0.0], [40.0, 50.0])
    with pytest.raises(CruiseplanError, match=r"at least 2 altitudes x 2 speeds, got shape "
                                              r"\(1, 2\)"):
        plots.specific_range_map(trainer, grid)
    with pytest.raises(CruiseplanError, match="shows 1 to 7 altitudes, got 8"):
        plots.power_curves(trainer, np.arange(8) * 300.0)
    fig = plots.power_curves(trainer, [0.0], tas=[30.0, 40.0, 50.0])
    with pytest.raises(CruiseplanError, match=r"cannot draw 'plot\.svg': the format must "
                                              "be png or pdf"):
        plots.figure_bytes(fig, "plot.svg")
    assert plots.figure_bytes(fig, "out.PDF").startswith(MAGIC["pdf"])


# --- the cruise card ------------------------------------------------------------------------

CARD_ARGS = ["--altitudes", "0,4000,8000ft", "--power", "55,75", "--isa-dev", "10",
             "--reserve", "30min"]


@pytest.fixture(scope="module")
def trainer_card(tmp_path_factory):
    folder = tmp_path_factory.mktemp("card")
    out = folder / "card.pdf"
    rc = cli.main(["card", "demo-trainer", "-o", str(out)] + CARD_ARGS)
    assert rc == 0
    pages = pdf_pages(out)
    return folder, out, pages, (folder / "card.md").read_text(encoding="utf-8")


def test_card_is_one_kneeboard_page(trainer_card):
    folder, out, pages, _ = trainer_card
    assert sorted(p.name for p in folder.iterdir()) == ["card.md", "card.pdf"]
    assert len(pages) == 1
    width, height = (float(x) for x in pages[0].mediabox[2:])
    assert (round(width), round(height)) == (420, 595)  # A5 portrait [pt]
    sizes = []
    pages[0].extract_text(visitor_text=lambda text, cm, tm, font, size:
                          sizes.append(size * tm[0]) if text.strip() else None)
    assert sizes and min(sizes) >= 9.0  # kneeboard body text (issue 16)


def test_card_text_holds_cautions_and_table_values(trainer_card):
    _, _, pages, markdown = trainer_card
    trainer = cp.load_airframe("demo-trainer")   # the bundled file, as the card reads it
    text = squash(pages[0].extract_text())
    for caution in cp.CAUTIONS:
        assert caution in text
        assert f"- {caution}" in markdown
    # TAS and CAS at 4000 ft, 55 % from the public API, formatted as the card prints them.
    pts = cp.power_setting_table(trainer, np.array([0.0, 4000.0, 8000.0]) * FT, [0.55, 0.75],
                                 isa_dev=10.0)
    tas, cas = pts.tas[1, 0] / KT, pts.cas()[1, 0] / KT
    flow = pts.fuel_volume_flow[1, 0] * conversion_factor("m^3/s", "gallon/h")
    row = f"4000 55 {tas:.0f} {cas:.0f} {flow:.1f}"
    assert row in text
    assert f"| {row.replace(' ', ' | ')} |" in markdown
    # At 8000 ft on this ISA +10 K day full throttle gives less than 75 %: flagged.
    assert "8000 75 - - - - - - - POWER" in text
    assert "| 8000 | 75 | - | - | - | - | - | - | - | POWER |" in markdown
    for words in (f"sha256 {trainer.checksum[:16]}", "ISA +10 K", "Absolute ceiling",
                  "Reserve kept: 30 min at 65 % power", "local rules decide"):
        assert words in text and words in markdown


def test_markdown_twin_says_what_the_page_says(trainer_card):
    _, _, pages, markdown = trainer_card
    text = squash(pages[0].extract_text())
    rows = [line for line in markdown.splitlines() if re.match(r"^\| [-\d]", line)]
    assert len(rows) == 6 + 3  # 3 altitudes x 2 settings, and 3 best-speed rows
    for line in rows:
        assert " ".join(c.strip() for c in line.strip("|").split("|")) in text
    for line in markdown.splitlines():
        if line.startswith(("- ", "## ")):
            assert squash(line[2:].lstrip("# ")) in text


def test_card_reserves(trainer, drone):
    h = np.array([0.0, 4000.0]) * FT
    # Piston default: 45 min at normal cruise power (65 % of rated), as reserve rules state
    # a time at cruise power (common practice, no source): BSFC x 0.65 x rated x 0.75 h.
    content = card.card_content(trainer, altitudes=h, power_settings=[0.65])
    prop = trainer.propulsion
    assert content.reserve == pytest.approx(2700.0 * prop.bsfc * 0.65 * prop.rated_power,
                                            rel=1e-15)
    assert "45 min at 65 % power (normal cruise power)" in content.markdown()
    assert "default for planning; local rules decide the minimum" in content.markdown()
    # Range to reserve keeps that share of the fuel unburnt.
    pts = cp.power_setting_table(trainer, h, [0.65])
    keep = 1.0 - content.reserve / pts.store
    row = content.blocks[0].rows[0]
    assert row[-1] == f"{pts.range_air[0, 0] * keep / 1852.0:.0f}"
    # Electric default: 25 % of the usable capacity; watts and Wh, not fuel.
    e = card.card_content(drone, altitudes=[0.0, 100.0], power_settings=[0.3])
    assert e.reserve == pytest.approx(0.25 * drone.propulsion.battery_energy, rel=1e-15)
    md = e.markdown()
    assert "battery power [W]" in md and "= 150 Wh" in md and "fuel" not in md


@pytest.mark.parametrize("text, kind, value", [
    ("30min", "time", 1800.0),
    ("1 h", "time", 3600.0),
    ("25%", "fraction", 0.25),
    ("10L", "amount", 10e-3 * 720.0),
    ("7 kg", "amount", 7.0),
])
def test_parse_reserve(trainer, text, kind, value):
    r = parse_reserve(text, trainer.propulsion)
    assert (r.kind, r.text) == (kind, text)
    assert r.amount == pytest.approx(value, rel=1e-12)


def test_parse_reserve_errors(trainer, drone):
    assert parse_reserve("120Wh", drone.propulsion).amount == pytest.approx(432_000.0,
                                                                           rel=1e-12)
    with pytest.raises(UnitError, match=r"'30' needs a unit: a time \('30min'\)"):
        parse_reserve("30", trainer.propulsion)
    with pytest.raises(UnitError, match=r"'150%' must be a share between 0 and 100 %"):
        parse_reserve("150%", trainer.propulsion)
    with pytest.raises(UnitError, match=r"'5 kt' is neither a time .* an amount "
                                        r"\('80 L', '20 gal' or '55 kg'\)"):
        parse_reserve("5 kt", trainer.propulsion)
    with pytest.raises(UnitError, match=r"'10L' is neither .* amount \('450 Wh'\)"):
        parse_reserve("10L", drone.propulsion)
    with pytest.raises(CruiseplanError, match=r"reserve 52\.8 US gal \(317\.5 lb\) is not "
                                              r"less than the fuel on board, 26\.4 US gal"):
        card.card_content(trainer, reserve="200L")


def card_pdf_text(path):
    """Text and font sizes [pt] of every page of a card's PDF."""
    texts, sizes = [], []
    for page in pdf_pages(path):
        texts.append(page.extract_text(visitor_text=lambda text, cm, tm, font, size:
                                       sizes.append(size * tm[0]) if text.strip() else None))
    return texts, sizes


def test_long_card_goes_onto_more_pages(capsys, tmp_path):
    """21 altitudes x 3 settings: three A5 pages, every row on one, heads repeated."""
    out = tmp_path / "card.pdf"
    rc, _, err = run(["card", "demo-trainer", "-o", str(out), "--altitudes",
                      "0:10000ft:500ft", "--power", "50,60,70"], capsys)
    assert (rc, err) == (0, "")
    pages = pdf_pages(out)
    assert 2 <= len(pages) <= 4
    assert all((round(float(p.mediabox[2])), round(float(p.mediabox[3]))) == (420, 595)
               for p in pages)
    texts, sizes = card_pdf_text(out)
    assert min(sizes) >= 9.0
    text = squash(" ".join(texts))
    markdown = (tmp_path / "card.md").read_text(encoding="utf-8")
    rows = [line for line in markdown.splitlines() if re.match(r"^\| [-\d]", line)]
    assert len(rows) == 21 * 3 + 21
    for line in rows:  # every table row, whole, on some page
        assert " ".join(c.strip() for c in line.strip("|").split("|")) in text
    for caution in cp.CAUTIONS:
        assert caution in text
    assert "(continued)" in texts[1] and f"page 1 of {len(pages)}" in squash(texts[0])
    # Each page that carries the cruise table repeats its column heads.
    assert sum("[US gal/h]" in t for t in texts) >= 2


def test_card_on_a4_only_when_asked(capsys, tmp_path):
    out = tmp_path / "card.pdf"
    rc, _, _ = run(["card", "demo-trainer", "-o", str(out), "--page", "a4"], capsys)
    assert rc == 0
    page = pdf_pages(out)[0]
    assert (round(float(page.mediabox[2])), round(float(page.mediabox[3]))) == (595, 842)


def test_card_too_long_for_its_pages(trainer):
    # 61 altitudes x 3 settings: within what A4 pages could hold (checked before any row
    # is computed), beyond 4 A5 pages (checked by the layout).
    content = card.card_content(trainer, altitudes=np.arange(0.0, 3001.0, 50.0),
                                power_settings=[0.5, 0.6, 0.7])
    with pytest.raises(CruiseplanError, match="does not fit 4 pages at a legible size"):
        plots.card_pages(content)
    with pytest.raises(CruiseplanError, match="page 'B5' is not one of A5, A4"):
        plots.card_pages(content, "B5")


def drawn_texts(pdf_page) -> list:
    """(text, x [pt], y [pt], size [pt], font) of each text a PDF page shows, in order."""
    drawn = []
    pdf_page.extract_text(visitor_text=lambda text, cm, tm, font, size: drawn.append(
        (text, tm[4], tm[5], size * tm[0], font)) if text.strip() else None)
    return drawn


def test_card_pdf_draws_the_layout_in_subset_fonts(trainer):
    """Every laid-out text is in the PDF, whole, where the layout put it (right-aligned
    ones ending at their column's edge), at its size, in embedded subset fonts that hold
    only the glyphs drawn."""
    from pypdf import PdfReader

    from cruiseplan.plots.textpdf import text_width

    content = card.card_content(trainer, altitudes=np.array([0.0, 8000.0]) * FT,
                                power_settings=[0.55, 0.75], isa_dev=10.0)
    pages = plots.card_layout(content)
    reader = PdfReader(io.BytesIO(plots.card_pdf(pages)))
    assert len(reader.pages) == len(pages)
    used = {False: set(), True: set()}
    for page, pdf_page in zip(pages, reader.pages):
        drawn = drawn_texts(pdf_page)
        assert [d[0] for d in drawn] == [t.text for t in page.texts]
        for t, (_, x, y, size, font) in zip(page.texts, drawn):
            left = t.x - (text_width(t.text, t.size, t.bold) if t.ha == "right" else 0.0)
            assert (x, y, size) == pytest.approx((left * 72, t.y * 72, t.size), abs=1e-3)
            assert font["/Subtype"] == "/Type3" and "/ToUnicode" in font
            assert font["/BaseFont"].endswith("DejaVuSans-Bold" if t.bold else "DejaVuSans")
            used[t.bold] |= set(t.text)
    fonts = {f.get_object()["/BaseFont"]: f.get_object()
             for f in reader.pages[0]["/Resources"]["/Font"].values()}
    assert len(fonts) == 2
    for name, font in fonts.items():
        assert re.fullmatch(r"/[A-Z]{6}\+DejaVuSans(-Bold)?", name)  # a subset's tag
        assert len(font["/CharProcs"]) == len(used[name.endswith("Bold")])


@pytest.mark.parametrize("airframe", sorted(bundled_files("airframe")))
def test_card_text_blocks_stay_with_their_heading(airframe):
    """A short text block (ceilings and reserve, the cautions) is on one page with its
    heading: a reserve line or a caution is not read apart from what it belongs to."""
    content = card.card_content(cp.load_airframe(airframe))
    pages = [" ".join(t.text for t in page.texts) for page in plots.card_layout(content)]
    blocks = [(b.heading, b.lines) for b in content.blocks if not hasattr(b, "columns")]
    for heading, lines in blocks + [("Cautions", content.cautions)]:
        page = next(p for p in pages if heading in p)
        assert all(line in page for line in lines), (airframe, heading)


def test_status_of_several_limits_breaks_after_its_plus(trainer):
    """A status joining limit codes (POWER+NOSOL) may go over two lines after its "+", so
    a hot-day card up to 20000 ft fits A5 (it was refused as too wide)."""
    content = card.card_content(trainer, altitudes=np.arange(0.0, 20001.0, 4000.0) * FT,
                                power_settings=[0.45, 0.65, 0.85], isa_dev=20.0)
    status = [row[-1] for row in content.blocks[0].rows]
    assert "POWER+NOSOL" in status
    texts = [t.text for page in plots.card_layout(content) for t in page.texts]
    assert "POWER+NOSOL" not in texts
    k = texts.index("POWER+")
    assert texts[k + 1] == "NOSOL"
    assert "ISA +20 K" in " ".join(texts)  # a "+" elsewhere stays with what follows it


def test_pdf_text_outside_latin_1_over_several_fonts():
    """More characters outside Latin-1 than one font's spare codes: the text goes on in a
    second font of the same face and reads back whole."""
    from pypdf import PdfReader

    from cruiseplan.plots.textpdf import PageText, TextPage, write_pdf

    greek = "".join(chr(c) for c in range(0x3B1, 0x3CA))
    cyrillic = "".join(chr(c) for c in range(0x410, 0x450))
    line = f"a {greek} {cyrillic} \u2014 z"
    page = TextPage((4.0, 2.0), [PageText(0.2, 1.0, line, 9.0)])
    pdf_page = PdfReader(io.BytesIO(write_pdf([page]))).pages[0]
    assert len(pdf_page["/Resources"]["/Font"]) == 2
    assert pdf_page.extract_text() == line


def test_card_status_only_where_not_ok(trainer):
    content = card.card_content(trainer, altitudes=np.array([0.0, 8000.0]) * FT,
                                power_settings=[0.55, 0.75], isa_dev=10.0)
    table = content.blocks[0]
    assert table.columns[-1][0] == "status"
    status = [row[-1] for row in table.rows]
    assert status == ["", "", "", "POWER"]  # 8000 ft, 75 %: beyond full throttle
    assert "| ok |" not in content.markdown()


def test_electric_card_speaks_its_units(drone):
    """Minutes throughout, m/s for the service ceiling rate, no ceiling far above."""
    content = card.card_content(drone)
    md = content.markdown()
    table = content.blocks[0]
    assert [u for n, u, _ in table.columns if n.startswith("endur.")] == ["min", "min"]
    assert "h:mm" not in md and "ft/min" not in md and "ft" not in md.split()
    assert "Absolute ceiling" not in md and "not searched higher" not in md
    assert "0.5 m/s of climb left at every altitude of this card" in md


# --- bad calls leave no file ----------------------------------------------------------------

@pytest.mark.parametrize("argv, message", [
    (["plot", "demo-trainer", "-o", "{d}/out.svg"],
     "--output {d}/out.svg: the file must end in .png or .pdf"),
    (["plot", "demo-trainer", "-o", "{d}/out.png", "--altitudes", "high"],
     "--altitudes: cannot read 'high'"),
    (["plot", "demo-trainer", "--kind", "power", "-o", "{d}/out.png", "--headwind", "10"],
     "wind does not change power curves"),
    (["plot", "demo-trainer", "-o", "{d}/out.png", "--wind", "270/20@0ft"],
     "--wind needs --course"),
    (["plot", "demo-trainer", "-o", "{d}/out.png", "--speeds", "90,80kt"],
     "must be at least two increasing speeds, positive"),
    (["card", "demo-trainer", "-o", "{d}/out.png"],
     "--output {d}/out.png: the file must end in .pdf"),
    (["card", "demo-trainer", "-o", "{d}/out.pdf", "--reserve", "200L"],
     "is not less than the fuel on board"),
    (["card", "demo-trainer", "-o", "{d}/out.pdf", "--power", "55,120"],
     "--power: '55,120' must be percentages of rated power"),
    (["card", "demo-trainer", "-o", "{d}/out.pdf", "--altitudes", "0:9000ft:50ft"],
     "does not fit 4 pages at a legible size"),
])
def test_bad_calls_exit_2_and_leave_no_file(capsys, tmp_path, argv, message):
    argv = [a.format(d=tmp_path) for a in argv]
    rc, out, err = run(argv, capsys)
    assert rc == cli.EXIT_BAD_INPUT and out == ""
    assert err.startswith("cruiseplan: error: ") and err.count("\n") == 1
    assert message.format(d=tmp_path) in err
    assert list(tmp_path.iterdir()) == []


# --- matplotlib stays out of everything else ------------------------------------------------

def test_matplotlib_is_imported_only_by_the_figure_commands():
    code = ("import sys, io, contextlib; import cruiseplan\n"
            "before = 'matplotlib' in sys.modules\n"
            "import cruiseplan.cli\n"
            "with contextlib.redirect_stdout(io.StringIO()):\n"
            "    cruiseplan.cli.main(['table', 'demo-trainer'])\n"
            "print(before, 'matplotlib' in sys.modules, 'cruiseplan.plots' in sys.modules)")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=True)
    assert done.stdout.split() == ["False", "False", "False"]


def test_card_is_written_without_matplotlib(tmp_path):
    """The card needs fonts, not figures: writing one imports neither matplotlib nor the
    plot modules (their import was most of the card's time, issue 16)."""
    out = str(tmp_path / "c.pdf")
    code = ("import sys, io, contextlib; import cruiseplan.cli\n"
            "with contextlib.redirect_stdout(io.StringIO()):\n"
            f"    cruiseplan.cli.main(['card', 'demo-trainer', '-o', {out!r}])\n"
            "print(sorted(m for m in sys.modules if m.startswith(('matplotlib', "
            "'cruiseplan.plots'))))")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=True)
    assert done.stdout.strip() == str(["cruiseplan.plots", "cruiseplan.plots.cardpage",
                                       "cruiseplan.plots.textpdf"])
    assert (tmp_path / "c.pdf").read_bytes().startswith(MAGIC["pdf"])


def test_every_public_name_of_plots_resolves():
    """cruiseplan.plots imports its modules on first use: each name it lists is there."""
    assert plots.__all__ and set(plots.__all__) <= set(dir(plots))
    for name in plots.__all__:
        assert getattr(plots, name) is not None, name
    with pytest.raises(AttributeError, match="has no attribute 'nothing_here'"):
        plots.nothing_here  # noqa: B018
