"""Property tests of reliability: the exit-2 contract under generated input, and physics
invariants over wide ranges.

The contract: generated command-line arguments and mutated airframe, mission and log files
never give a traceback nor exit 1; they give exit 0 or exit 2 with one line on standard
error, and never leave a partial, clobbered or stray file. The invariants (numbered in
the test names, 12 of them) hold over the whole physical range of their inputs.
"""

from __future__ import annotations

import math
import os
import re
from pathlib import Path

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.physics.airspeed import cas_from_tas, tas_from_cas
from cruiseplan.physics.atmosphere import density_altitude
from cruiseplan.ranges import RANGES, check_range

ROOT = Path(__file__).resolve().parents[1]
AIRFRAME = (ROOT / "airframes" / "demo-trainer.toml").read_text()
MISSION = (ROOT / "missions" / "demo-quad-mast-check.toml").read_text()
LOG = (ROOT / "logs" / "demo-trainer-flight-test.csv").read_text()
R_AIR, GAMMA = 287.05287, 1.4

FAST = settings(max_examples=25, deadline=None)

# --- the exit-2 contract under generated input --------------------------------------------

NUMBERS = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(-10**12, 10**12).map(str),
    st.sampled_from(["nan", "inf", "-inf", "1e999", "-1e999", "", " ", "0", "-0", "1e-320",
                     "+", "-", ".", "e5", "0x10", "1_000", "١٢", "NaN kt", "10 kg", "5 %"]),
)
UNITS = st.sampled_from(["", " ft", "m", " kt", "km/h", " K", "degC", " lb", " kg", " L",
                         "%", " hPa", " s", " parsec", " m/s", "ft/min"])
VALUES = st.one_of(NUMBERS, st.tuples(NUMBERS, UNITS).map("".join),
                   st.text(max_size=12))

OPTIONS = {
    "atmosphere": ["--altitudes", "--isa-dev", "--oat"],
    "table": ["--altitudes", "--speeds", "--power", "--weight", "--fuel", "--payload",
              "--isa-dev", "--stall-margin", "--headwind"],
    "best": ["--altitudes", "--floor", "--ceiling", "--climb-reserve", "--weight",
             "--isa-dev", "--stall-margin", "--headwind", "--seed"],
}
SMALL = {"atmosphere": ["--altitudes", "0,5000ft"],
         "table": ["trainer.toml", "--altitudes", "0,5000ft", "--power", "65"],
         "best": ["trainer.toml", "--altitudes", "0,3000,6000ft"]}


def _files(folder: Path) -> dict:
    return {str(p.relative_to(folder)): p.read_bytes()
            for p in sorted(folder.rglob("*")) if p.is_file()}


def _contract(capsys, folder, argv, allowed_new=()):
    before = _files(folder)
    try:
        status = main(argv)
    except SystemExit as exc:   # argparse's --help exits 0; nothing else may exit
        status = exc.code
    out, err = capsys.readouterr()
    assert status in (0, 2), (argv, status, err)
    assert "Traceback" not in err
    if status == 2:
        errors = [ln for ln in err.splitlines() if ln.startswith("cruiseplan: error: ")]
        assert len(errors) == 1 and err.splitlines()[-1] == errors[0], err
    after = _files(folder)
    for name, data in before.items():
        assert after.get(name) == data, f"{name} changed or deleted by {argv}"
    new = set(after) - set(before) - set(allowed_new)
    assert not new, f"{argv} left {sorted(new)}"
    return status


@pytest.fixture
def folder(tmp_path, monkeypatch):
    (tmp_path / "trainer.toml").write_text(AIRFRAME)
    (tmp_path / "mission.toml").write_text(MISSION)
    (tmp_path / "log.csv").write_text(LOG)
    monkeypatch.chdir(tmp_path)
    return tmp_path


@FAST
@given(command=st.sampled_from(sorted(OPTIONS)), data=st.data())
def test_generated_options_keep_the_exit_2_contract(capsys, folder, command, data):
    opts = data.draw(st.lists(st.sampled_from(OPTIONS[command]), min_size=1, max_size=3,
                              unique=True))
    argv = [command, *SMALL[command]]
    for opt in opts:
        argv = [a for i, a in enumerate(argv)
                if a != opt and (i == 0 or argv[i - 1] != opt)]
        argv += [opt + "=" + data.draw(VALUES)]
    _contract(capsys, folder, argv)


@FAST
@given(value=VALUES)
def test_generated_output_paths_never_clobber_an_input(capsys, folder, value):
    # Whatever -o names, the inputs stay as they were; a new file is the only trace.
    for target in ("trainer.toml", "./trainer.toml", value or "x"):
        if "\x00" in target or "/" in target.strip("./"):
            continue
        argv = ["table", "trainer.toml", "--altitudes", "0,5000ft", "--power", "65",
                "-o", target]
        _contract(capsys, folder, argv, allowed_new={target, target.lstrip("./")})


def _mutate(text, data, comment="#"):
    """One value line of a TOML or CSV text given a generated value."""
    lines = text.splitlines()
    idx = [i for i, ln in enumerate(lines) if "=" in ln and not ln.startswith(comment)]
    i = data.draw(st.sampled_from(idx))
    key = lines[i].split("=", 1)[0]
    value = data.draw(st.one_of(
        VALUES.map(lambda v: '"' + v.replace("\\", "").replace('"', "") + '"'),
        st.sampled_from(["nan", "inf", "-inf", "1e999", "[]", "{}", "[1, 2]", "{a = 1}",
                         "true", "-1", "0", "1e308", '"1e999 kg"', '["-5 %", "+5 %"]'])))
    lines[i] = f"{key}= {value}"
    return "\n".join(lines) + "\n"


@FAST
@given(data=st.data())
def test_mutated_airframe_files_keep_the_exit_2_contract(capsys, folder, data):
    (folder / "bad.toml").write_text(_mutate(AIRFRAME, data))
    _contract(capsys, folder, ["table", "bad.toml", "--altitudes", "0,5000ft",
                               "--power", "65"])


@settings(max_examples=15, deadline=None)
@given(data=st.data())
def test_mutated_mission_files_keep_the_exit_2_contract(capsys, folder, data):
    (folder / "bad.toml").write_text(_mutate(MISSION, data))
    _contract(capsys, folder, ["plan", "bad.toml"])


@FAST
@given(data=st.data())
def test_mutated_flight_logs_keep_the_exit_2_contract(capsys, folder, data):
    lines = LOG.splitlines()
    rows = [i for i, ln in enumerate(lines) if ln and ln[0].isdigit()]
    for _ in range(data.draw(st.integers(1, 3))):
        i = data.draw(st.sampled_from(rows))
        cells = lines[i].split(",")
        j = data.draw(st.integers(0, len(cells) - 1))
        cells[j] = data.draw(VALUES).replace(",", "").replace("\n", "")
        lines[i] = ",".join(cells)
    if data.draw(st.booleans()):   # and maybe every row the same
        lines = [ln if not (ln and ln[0].isdigit()) else lines[rows[0]] for ln in lines]
    (folder / "bad.csv").write_text("\n".join(lines) + "\n")
    _contract(capsys, folder, ["fit", "bad.csv", "--airframe", "trainer.toml"])


# --- physics invariants over wide ranges ---------------------------------------------------

ALT = st.floats(-5000.0, 20000.0)
DEV = st.floats(-60.0, 60.0)


@FAST
@given(h1=ALT, h2=ALT, dev=DEV)
def test_invariant_01_pressure_falls_with_altitude(h1, h2, dev):
    assume(abs(h1 - h2) > 1e-3)
    lo, hi = sorted((h1, h2))
    assert cp.air_state(hi, dev).pressure < cp.air_state(lo, dev).pressure


@FAST
@given(h=ALT, dev=DEV)
def test_invariant_02_gas_law_and_speed_of_sound(h, dev):
    air = cp.air_state(h, dev)
    assert math.isclose(air.density, air.pressure / (R_AIR * air.temperature), rel_tol=1e-6)
    assert math.isclose(air.speed_of_sound, math.sqrt(GAMMA * R_AIR * air.temperature),
                        rel_tol=1e-4)


@FAST
@given(h=ALT)
def test_invariant_03_density_altitude_of_a_standard_day_is_the_pressure_altitude(h):
    assert math.isclose(float(density_altitude(cp.air_state(h).density)), h, abs_tol=0.05)


@FAST
@given(h=st.floats(-4000.0, 15000.0), d1=DEV, d2=DEV)
def test_invariant_04_a_warmer_day_has_a_higher_density_altitude(h, d1, d2):
    assume(abs(d1 - d2) > 0.01)
    cold, warm = sorted((d1, d2))
    da = cp.air_state(h, np.array([cold, warm])).density_altitude
    assert np.all(np.isnan(da)) or da[1] > da[0] or np.isnan(da[1])


@FAST
@given(h=ALT, dev=DEV, tas=st.floats(1.0, 150.0))
def test_invariant_05_cas_and_tas_round_trip(h, dev, tas):
    air = cp.air_state(h, dev)
    cas = cas_from_tas(tas, air.pressure, air.speed_of_sound)
    assert math.isclose(float(tas_from_cas(cas, air.pressure, air.speed_of_sound)), tas,
                        rel_tol=1e-9)


@FAST
@given(h=st.floats(100.0, 20000.0), dev=st.floats(0.0, 60.0), tas=st.floats(1.0, 150.0))
def test_invariant_06_tas_exceeds_cas_in_thinner_air(h, dev, tas):
    air = cp.air_state(h, dev)
    assert float(cas_from_tas(tas, air.pressure, air.speed_of_sound)) < tas


@pytest.fixture(scope="module")
def af():
    return cp.load_airframe("demo-trainer")


@FAST
@given(h=st.floats(0.0, 4000.0), dev=DEV, hw=st.floats(-40.0, 40.0),
       margin=st.floats(1.0, 3.0))
def test_invariant_07_to_10_every_flyable_point_is_physical(af, h, dev, hw, margin):
    pts = cp.cruise_grid(af, [h], np.linspace(25.0, 80.0, 12), isa_dev=dev, headwind=hw,
                         stall_margin=margin)
    ok = pts.feasible
    tas = np.broadcast_to(pts.tas, ok.shape)
    # 07: ground speed is TAS less the headwind, and a flyable point moves forward.
    assert np.allclose(pts.ground_speed[ok], tas[ok] - hw)
    # 08: no flyable point needs more power than is available, nor flies below the margin.
    assert np.all(pts.shaft_power[ok] <= pts.power_available[ok] * (1 + 1e-9))
    assert np.all(pts.stall_speed_ratio[ok] >= margin * (1 - 1e-9))
    # 09: range in the air is endurance times TAS; fuel flow positive and finite.
    assert np.allclose(pts.range_air[ok], pts.endurance[ok] * tas[ok], rtol=1e-9)
    assert np.all(np.isfinite(pts.store_rate[ok]) & (pts.store_rate[ok] > 0))
    # 10: every point not flyable says why, and a flyable one has no limit bit.
    assert np.all((pts.limits != 0) == ~ok)


@FAST
@given(h=st.floats(0.0, 3000.0), m1=st.floats(690.0, 760.0), m2=st.floats(690.0, 760.0),
       tas=st.floats(40.0, 60.0))
def test_invariant_11_a_heavier_aircraft_needs_more_power(af, h, m1, m2, tas):
    assume(abs(m1 - m2) > 0.5)
    light, heavy = sorted((m1, m2))
    p = [float(cp.cruise_grid(af, [h], [tas], mass=m).shaft_power.ravel()[0])
         for m in (light, heavy)]
    assert p[1] > p[0]


@FAST
@given(quantity=st.sampled_from(sorted(RANGES)),
       value=st.one_of(st.just(math.nan), st.just(math.inf), st.just(-math.inf),
                       st.floats(allow_nan=False, allow_infinity=False)))
def test_invariant_12_no_non_finite_or_out_of_range_value_passes(quantity, value):
    lo, hi, *_, closed = RANGES[quantity]
    inside = math.isfinite(value) and (lo <= value <= hi if closed else lo < value <= hi)
    if inside:
        assert check_range(value, quantity, "x") == value
    else:
        with pytest.raises(cp.CruiseplanError, match=r"^x: "):
            check_range(value, quantity, "x")


def test_api_refuses_non_finite_and_out_of_range_arguments(af):
    for kw, word in [(dict(isa_dev=math.nan), "isa_dev"), (dict(isa_dev=500.0), "isa_dev"),
                     (dict(stall_margin=0.5), "stall_margin"),
                     (dict(headwind=math.inf), "headwind")]:
        with pytest.raises(cp.CruiseplanError, match=re.escape(word)):
            cp.cruise_grid(af, [0.0], [50.0], **kw)
    with pytest.raises(cp.CruiseplanError, match="course"):
        cp.best_cruise(af, [0.0, 1000.0], wind=cp.WindProfile((0.0,), (270.0,), (10.0,)),
                       course=math.nan)


def test_special_file_output_is_streamed_not_replaced(capsys, folder):
    # A device given as -o keeps being a device (no atomic swap for a regular file).
    assert os.path.exists("/dev/null")
    status = main(["table", "trainer.toml", "--altitudes", "0,5000ft", "--power", "65",
                   "--format", "csv", "-o", "/dev/null"])
    assert status == 0
    assert not Path("/dev/null").is_file()
    assert not Path("/dev/null.meta.txt").exists()


@FAST
@given(pool=st.lists(st.one_of(st.floats(-1e7, 1e7), st.just(math.nan), st.just(math.inf),
                               st.sampled_from([-0.04, -0.0, 0.0, 0.05, -0.05, 1.25])),
                     min_size=1, max_size=30),
       picks=st.lists(st.integers(0, 10**6), min_size=0, max_size=400),
       fmt=st.sampled_from(["{:.0f}", "{:.1f}", "{:.2f}", "{:.4e}", "{:+.1f}", "{}"]))
def test_column_wise_formatting_equals_cell_by_cell(pool, picks, fmt):
    # The column-wise text and CSV cells (formatting each distinct value once) are the
    # cell-by-cell ones, NaN, infinities, repeats and values rounding to zero included.
    from cruiseplan.report.output import Column, _csv_cell

    vals = [pool[i % len(pool)] for i in picks]
    col = Column("x", "", vals, fmt)
    assert col.cells() == [col.cell(i) for i in range(len(vals))]
    assert col.machine_cells() == [_csv_cell(col.machine(i)) for i in range(len(vals))]
