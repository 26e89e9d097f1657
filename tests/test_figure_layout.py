"""Layout of every figure and the cruise card, over all bundled airframes and missions.

Each figure is made the way the command line makes it (``plot``, ``plan --plot``, ``card``),
caught before it is written, and drawn at a low resolution; matplotlib's renderer gives
the extent of every text artist. A figure passes when every text lies inside the canvas,
no two texts overlap, and no axis prints offset text ("+2.261e2", "1e-3"), which a reader
takes for a tick. Days: ISA, ISA +20 K and ISA -20 K, in calm air and in wind.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.text import Text

from cruiseplan import cli, plots
from cruiseplan.io.bundled import bundled_files

AIRFRAMES = sorted(bundled_files("airframe"))
MISSIONS = sorted(bundled_files("mission"))
DPI = 40  # extents scale with the resolution; a low one keeps the suite fast
SLACK = 1.0  # [px] at DPI: anti-aliased edges of neighbouring texts may touch


def wind_args(airframe: str) -> list:
    """A wind that turns and strengthens with height, for the airframe's altitudes."""
    if airframe.startswith("demo-") and ("drone" in airframe or "quad" in airframe
                                        or "sensor" in airframe):
        return ["--wind", "270/8m/s@0m,250/12m/s@400m", "--course", "90"]
    return ["--wind", "270/15@2000ft,260/40@9000ft", "--course", "270"]


def texts_of(fig) -> list:
    """Visible, non-empty text artists a figure draws (legends, ticks, labels included).

    Tick labels of ticks outside an axis's view interval are left out: matplotlib keeps
    them as artists but does not draw them.
    """
    hidden = set()
    for ax in fig.axes:
        for axis in (ax.xaxis, ax.yaxis):
            lo, hi = sorted(axis.get_view_interval())
            pad = 1e-9 * max(abs(lo), abs(hi), 1.0)
            for tick in axis.get_major_ticks() + axis.get_minor_ticks():
                if not lo - pad <= tick.get_loc() <= hi + pad:
                    hidden |= {id(tick.label1), id(tick.label2)}
    return [t for t in fig.findobj(Text)
            if t.get_visible() and t.get_text().strip() and id(t) not in hidden]


def layout_faults(fig, dpi=DPI) -> list:
    """What is wrong with a figure's text layout, as readable lines (empty: nothing)."""
    fig.set_dpi(dpi)
    canvas = FigureCanvasAgg(fig)
    canvas.draw()
    renderer = canvas.get_renderer()
    width, height = canvas.get_width_height()
    faults = []
    for ax in fig.axes:
        for axis in (ax.xaxis, ax.yaxis):
            off = axis.get_offset_text()
            if off.get_visible() and off.get_text().strip():
                faults.append(f"offset text {off.get_text()!r} on {ax.get_label() or ax}")
    boxes = []
    for t in texts_of(fig):
        box = t.get_window_extent(renderer)
        if box.width <= 0 or box.height <= 0:
            continue
        name = " ".join(t.get_text().split())[:40]
        if (box.x0 < -SLACK or box.y0 < -SLACK or box.x1 > width + SLACK
                or box.y1 > height + SLACK):
            faults.append(f"{name!r} runs off the canvas: {box.bounds}")
        boxes.append((name, box))
    for (a, p), (b, q) in itertools.combinations(boxes, 2):
        if (min(p.x1, q.x1) - max(p.x0, q.x0) > SLACK
                and min(p.y1, q.y1) - max(p.y0, q.y0) > SLACK):
            faults.append(f"{a!r} overlaps {b!r}")
    return faults


@pytest.fixture
def caught(monkeypatch):
    """The figures the command line would write, caught; the files get no content."""
    figures = []

    def catch_one(fig, fmt, **_):
        figures.append(fig)
        return b""

    def catch_pages(pages):
        # The card is written without a figure; its pages are drawn as figures at the
        # places the PDF puts them, for matplotlib's renderer to measure.
        figures.extend(plots.page_figure(page) for page in pages)
        return b""

    monkeypatch.setattr(plots, "figure_bytes", catch_one)
    monkeypatch.setattr(plots, "card_pdf", catch_pages)
    return figures


DAYS = [("0", False), ("20", True), ("-20", True), ("20", False)]


@pytest.mark.parametrize("airframe", AIRFRAMES)
@pytest.mark.parametrize("kind", ["map", "altitude"])
def test_map_and_altitude_plots_are_laid_out_cleanly(tmp_path, caught, airframe, kind):
    for dev, windy in DAYS:
        argv = ["plot", airframe, "--kind", kind, "-o", str(tmp_path / "f.png"),
                "--isa-dev", dev] + (wind_args(airframe) if windy else [])
        assert cli.main(argv) == 0
        assert layout_faults(caught.pop()) == [], argv


@pytest.mark.parametrize("airframe", ["demo-trainer", "demo-survey-drone"])
def test_altitude_plots_fit_at_print_resolution(tmp_path, caught, airframe):
    """Text extents grow a little faster than the canvas at print resolution (hinting at
    40 dpi narrows them): the widest boxes, the altitude plot's, are checked at 150 dpi."""
    argv = ["plot", airframe, "--kind", "altitude", "-o", str(tmp_path / "f.png")]
    assert cli.main(argv + wind_args(airframe)) == 0
    assert layout_faults(caught.pop(), dpi=150) == [], argv


@pytest.mark.parametrize("airframe", AIRFRAMES)
def test_power_plots_are_laid_out_cleanly(tmp_path, caught, airframe):
    for dev in ("0", "20", "-20"):
        argv = ["plot", airframe, "--kind", "power", "-o", str(tmp_path / "f.png"),
                "--isa-dev", dev]
        assert cli.main(argv) == 0
        assert layout_faults(caught.pop()) == [], argv


@pytest.mark.parametrize("mission", MISSIONS)
def test_mission_plots_are_laid_out_cleanly(tmp_path, caught, capsys, mission):
    assert cli.main(["plan", mission, "--plot", str(tmp_path / "f.png")]) in (0, 1)
    capsys.readouterr()
    assert len(caught) == 1
    assert layout_faults(caught.pop()) == []


@pytest.mark.parametrize("airframe", AIRFRAMES)
def test_card_pages_are_laid_out_cleanly(tmp_path, caught, airframe):
    for dev in ("0", "20", "-20"):
        argv = ["card", airframe, "-o", str(tmp_path / "card.pdf"), "--isa-dev", dev]
        assert cli.main(argv) == 0
        assert caught
        for k, page in enumerate(caught):
            assert layout_faults(page) == [], (argv, k)
            sizes = [t.get_fontsize() for t in texts_of(page)]
            assert min(sizes) >= plots.CARD_MIN_FONT == 9.0
            width, height = page.get_size_inches()
            assert (round(width * 25.4), round(height * 25.4)) == (148, 210)  # A5 [mm]
        caught.clear()


def test_the_checker_finds_faults():
    """The checks above can fail: an overlap, a text off the canvas, an offset text."""
    from matplotlib.figure import Figure

    fig = Figure(figsize=(4, 3))
    fig.text(0.5, 0.5, "one label")
    fig.text(0.52, 0.5, "another label")
    fig.text(0.95, 0.5, "off the edge")
    ax = fig.add_axes((0.2, 0.2, 0.6, 0.2))
    ax.plot([0, 1], np.array([1.0, 1.0001]) + 1e4)
    faults = layout_faults(fig)
    assert any("overlaps" in f for f in faults)
    assert any("runs off the canvas" in f for f in faults)
    assert any(f.startswith("offset text") for f in faults)


def test_speed_axis_spans_the_flyable_region():
    """On a hot day the speed axis ends just past the fastest level speed the power
    allows, not at a multiple of the stall speed (issue 16: 185 kt for a 110-kt aircraft)."""
    import cruiseplan as cp
    from cruiseplan.physics.atmosphere import air_state
    from cruiseplan.planning.optimise import speed_schedule
    from cruiseplan.planning.performance import resolve_loading

    af = cp.load_airframe("demo-trainer")
    h = np.arange(0.0, 12001.0, 500.0) * 0.3048
    for dev in (-20.0, 0.0, 20.0):
        v = plots.speed_span(af, h, isa_dev=dev)
        load = resolve_loading(af, None, None, None)
        sched = speed_schedule(af, load.mass, air_state(h, dev), load.store,
                               stall_margin=1.0)
        fastest = np.nanmax(sched.window_hi)
        assert v[-1] == pytest.approx(1.1 * fastest, rel=1e-12)
        assert v[0] < np.min(af.stall_speed(load.mass, air_state(h, dev).density))


def test_profile_ground_band_lies_under_the_path(tmp_path, caught, capsys):
    """The highest-ground band of each leg is drawn only where the path is above it, and
    the altitude axis does not run down to sea level for a flight high above it."""
    from matplotlib.collections import PolyCollection

    assert cli.main(["plan", "demo-quad-inspection", "--plot", str(tmp_path / "f.png")]) == 0
    capsys.readouterr()
    ax = caught.pop().axes[0]
    path = ax.get_lines()[0]
    x, h = path.get_xdata(), path.get_ydata()
    bands = [c for c in ax.collections if isinstance(c, PolyCollection)]
    assert bands
    for band in bands:
        for poly in band.get_paths():
            vx, vy = poly.vertices.T
            assert np.all(np.interp(vx, x, h) >= vy.max() - 1e-6)
    assert ax.get_ylim()[0] > 0.5 * np.min(h)
