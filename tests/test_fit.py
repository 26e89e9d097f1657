"""Drag-polar fit from flight logs: PIW-VIW reduction, interval coverage, logs, CLI, plot.

Synthetic logs come from a known symmetric parabolic polar through the level-flight power
equation P = 0.5 rho V^3 S CD0 + 2 k W^2 / (rho V S) (Anderson, Aircraft Performance and
Design, sec. 5.4; the same form as Traub, J. Aircraft 48(2), 2011), written out here
independently of cruiseplan.fit.
"""

from __future__ import annotations

import json
import math
import re
import tomllib

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.errors import CruiseplanError, CruiseplanWarning, LogFileError
from cruiseplan.io.flightlog import fitted_airframe_text, read_flight_log
from cruiseplan.physics.airspeed import cas_from_tas
from cruiseplan.planning.fit import (
    fit_flight_log,
    fit_polar,
    piw_coefficients,
    piw_viw,
    sensitivity_rank,
    thrust_power,
)

G0, RHO0 = 9.80665, 1.225
FT, KT, LB = 0.3048, 1852.0 / 3600.0, 0.45359237
# The demo trainer's wing and polar (airframes/demo-trainer.toml).
S, SPAN, CD0, E = 11.2, 9.6, 0.036, 0.76
AR = SPAN**2 / S
K = 1.0 / (math.pi * E * AR)
W_REF = 760.0
# Two weights x two altitudes x speeds: the usual flight-test matrix (Kimberlin ch. 9).
MASSES = (740.0, 640.0)
ALTITUDES = (2000.0 * FT, 7000.0 * FT)
ISA_DEV = 8.0


def level_power(tas, density, mass, cd0=CD0, k=K):
    """Thrust power of level flight [W] (Anderson sec. 5.4), independent of the fit."""
    w = mass * G0
    return 0.5 * density * tas**3 * S * cd0 + 2.0 * k * w * w / (density * tas * S)


def test_matrix(speeds_per_group=5):
    """Mass, density and TAS of a 2 x 2 flight-test matrix, flattened."""
    rho = cp.air_state(np.array(ALTITUDES), ISA_DEV).density
    m, r, ve = np.meshgrid(MASSES, rho, np.linspace(31.0, 52.0, speeds_per_group),
                           indexing="ij")
    tas = ve / np.sqrt(r / RHO0)            # same equivalent airspeeds at each altitude
    group = np.meshgrid(np.arange(2), np.arange(2), np.arange(speeds_per_group),
                        indexing="ij")
    return m.ravel(), r.ravel(), tas.ravel(), (2 * group[0] + group[1]).ravel()


test_matrix.__test__ = False  # a helper, not a test


def fit(power, tas, rho, mass, **kw):
    return fit_polar(power, tas, rho, mass, wing_area=S, aspect_ratio=AR,
                     reference_mass=W_REF, **kw)


# --- PIW-VIW reduction ------------------------------------------------------------------------

def test_piw_viw_collapses_two_weights_and_two_altitudes_onto_one_curve():
    mass, rho, tas, group = test_matrix(7)
    power = level_power(tas, rho, mass)
    # The groups' raw power differs a lot at like equivalent airspeed...
    by_group = power.reshape(4, 7)
    assert np.all(np.max(by_group, axis=0) / np.min(by_group, axis=0) > 1.1)
    # ...and the reduced points of all four lie on one A V^3 + B/V curve: an identity of
    # the parabolic polar (Kimberlin, Flight Testing of Fixed-Wing Aircraft, ch. 9).
    piw, viw = piw_viw(power, tas, rho, mass, W_REF)
    a, b = piw_coefficients(CD0, K, S, W_REF)
    # An exact identity: rounding only (measured 8.9e-16).
    np.testing.assert_allclose(piw, a * viw**3 + b / viw, rtol=1e-14)
    # With 1 % noise they lie on it to within the noise, and no group sits off the curve.
    rng = np.random.default_rng(11)
    noisy = power * (1.0 + 0.01 * rng.standard_normal(power.size))
    piw, viw = piw_viw(noisy, tas, rho, mass, W_REF)
    dev = piw / (a * viw**3 + b / viw) - 1.0
    assert np.max(np.abs(dev)) < 0.04            # 4 sigma of the 1 % noise
    for g in range(4):
        assert abs(np.mean(dev[group == g])) < 3 * 0.01 / math.sqrt(7)
    # A single fit to the four groups leaves residuals of the noise's size.
    res = fit(noisy, tas, rho, mass)
    assert res.rms_relative == pytest.approx(0.01, rel=0.35)
    assert res.r_squared > 0.99


def test_piw_viw_reduces_to_the_reference_weight_and_sea_level():
    # At the reference mass and sea-level density PIW is the power and VIW the TAS.
    piw, viw = piw_viw(30e3, 45.0, RHO0, W_REF, W_REF)
    assert piw == pytest.approx(30e3, rel=1e-15) and viw == pytest.approx(45.0, rel=1e-15)
    # Heavier: PIW = P (W_ref/W)^1.5, VIW = V (W_ref/W)^0.5 (Kimberlin ch. 9): four times
    # the weight is 1/8 of the power and half the speed, exactly.
    piw, viw = piw_viw(30e3, 45.0, RHO0, 4 * W_REF, W_REF)
    assert piw == pytest.approx(3750.0, rel=1e-15) and viw == pytest.approx(22.5, rel=1e-15)
    # Higher: PIW = P sqrt(sigma), VIW = V sqrt(sigma) (the equivalent airspeed): at a
    # quarter of sea-level density, half of each.
    piw, viw = piw_viw(30e3, 45.0, RHO0 / 4, W_REF, W_REF)
    assert piw == pytest.approx(15e3, rel=1e-15) and viw == pytest.approx(22.5, rel=1e-15)


# --- the fit ----------------------------------------------------------------------------------

def test_fit_recovers_an_exact_polar():
    mass, rho, tas, _ = test_matrix()
    res = fit(level_power(tas, rho, mass), tas, rho, mass)
    # Exact data: the least-squares iteration converges to rounding (measured 3.3e-16).
    assert res.cd0 == pytest.approx(CD0, rel=5e-15)
    assert res.oswald_e == pytest.approx(E, rel=5e-15)
    assert res.k == pytest.approx(K, rel=5e-15)
    assert res.r_squared == pytest.approx(1.0, abs=1e-12)
    assert res.dropped == () and res.n_used == 20 and res.dof == 18


def test_95_percent_intervals_cover_the_true_polar_in_200_trials():
    # 200 seeded logs of 20 points with 2 % power noise, made at once; each fitted by the
    # product's own fit_polar. Nominal coverage is 95 %; the |t| > 3 outlier rule drops
    # about 1 % of good points and costs a little of it (measured 93-94 %).
    mass, rho, tas, _ = test_matrix()
    rng = np.random.default_rng(20240)
    power = level_power(tas, rho, mass) * (1.0 + 0.02 * rng.standard_normal((200, tas.size)))
    hits = np.zeros((200, 2), dtype=bool)
    for i, p in enumerate(power):
        res = fit(p, tas, rho, mass)
        hits[i] = [res.ci95["cd0"][0] <= CD0 <= res.ci95["cd0"][1],
                   res.ci95["oswald_e"][0] <= E <= res.ci95["oswald_e"][1]]
    coverage = hits.mean(axis=0)
    assert np.all(coverage >= 0.90), coverage
    assert np.all(coverage <= 0.99), coverage   # intervals not uselessly wide either


def test_outlier_is_dropped_named_and_refitted():
    mass, rho, tas, _ = test_matrix(7)
    rng = np.random.default_rng(5)
    power = level_power(tas, rho, mass) * (1.0 + 0.01 * rng.standard_normal(tas.size))
    power[9] *= 1.15                          # a misread meter
    lines = np.arange(101, 101 + tas.size)
    res = fit(power, tas, rho, mass, lines=lines)
    assert [n for n, _ in res.dropped] == [110]
    assert res.dropped[0][1] > 3.0 and not res.used[9] and res.n_used == 27
    assert res.ci95["cd0"][0] <= CD0 <= res.ci95["cd0"][1]
    assert res.ci95["oswald_e"][0] <= E <= res.ci95["oswald_e"][1]
    assert "110 (+" in res.summary()


def test_efficiency_is_confounded_with_the_polar_and_held():
    mass, rho, tas, _ = test_matrix()
    power = level_power(tas, rho, mass)
    # One factor on the thrust power scales CD0 and k alike: they cannot be told apart.
    scaled = fit(1.1 * power, tas, rho, mass)
    # Exact data again: measured 5.6e-16.
    assert scaled.cd0 == pytest.approx(1.1 * CD0, rel=5e-15)
    assert scaled.k == pytest.approx(1.1 * K, rel=5e-15)
    res = fit(power, tas, rho, mass, fit_efficiency=True)
    assert not res.efficiency_fitted and res.efficiency_scale == 1.0
    assert "confounded (sensitivity rank 2 of 3)" in res.efficiency_note
    assert res.parameters == ("cd0", "oswald_e")
    # The sensitivity matrix of (CD0, e, c) has rank 2 exactly.
    from cruiseplan.planning.fit import _model

    theta = np.array([CD0, E, 1.0])
    piw, viw = piw_viw(power, tas, rho, mass, W_REF)
    _, jac = _model(theta, viw, S, AR, W_REF)
    assert sensitivity_rank(jac / piw[:, None], theta) == 2
    assert sensitivity_rank(jac[:, :2] / piw[:, None], theta[:2]) == 2


def test_efficiency_is_fitted_when_cd0_is_known_independently():
    mass, rho, tas, _ = test_matrix(7)
    rng = np.random.default_rng(3)
    # The log's power converted at an efficiency 10 % too high: thrust power 1/0.9 too big.
    logged = level_power(tas, rho, mass) / 0.9 * (1 + 0.01 * rng.standard_normal(tas.size))
    res = fit(logged, tas, rho, mass, fit_efficiency=True, known_cd0=CD0)
    assert res.efficiency_fitted and "CD0 held" in res.efficiency_note
    lo, hi = res.ci95["efficiency_scale"]
    assert lo <= 0.9 <= hi and hi - lo < 0.05
    assert res.ci95["oswald_e"][0] <= E <= res.ci95["oswald_e"][1]
    assert res.cd0 == CD0 and math.isnan(res.se_cd0)


def test_fit_errors():
    mass, rho, tas, _ = test_matrix()
    with pytest.raises(CruiseplanError, match="4 level-flight points; the fit needs at least 5"):
        fit(level_power(tas, rho, mass)[:4], tas[:4], rho[:4], mass[:4])
    with pytest.raises(CruiseplanError, match=r"point 3: thrust power -1 must be positive"):
        p = level_power(tas, rho, mass)
        p[2] = -1.0
        fit(p, tas, rho, mass)
    # Power falling with speed everywhere: no parasite rise, no polar.
    with pytest.raises(CruiseplanError, match="does not rise at both ends of the speed range"):
        fit(1e6 / tas, tas, np.full(tas.shape, RHO0), np.full(tas.shape, W_REF))


# --- power sources ----------------------------------------------------------------------------

def test_power_source_chains(trainer, drone):
    # Each logged power source, taken back through the airframe's chain, gives the thrust
    # power the cruise engine computed forwards from the polar (a second code path):
    # rounding only (measured 2.2e-16). The drone keeps its Peukert exponent: the log's
    # electric power is the battery power, not the energy drawn.
    p = drone.propulsion
    pts = cp.cruise_grid(drone, [0.0, 300.0], [16.0, 22.0, 28.0])
    v = np.broadcast_to(pts.tas, pts.shape)
    np.testing.assert_allclose(thrust_power(p, "electric_power", pts.source_power, v),
                               pts.thrust_power, rtol=1e-14)
    np.testing.assert_allclose(thrust_power(p, "shaft_power", pts.shaft_power, v),
                               pts.thrust_power, rtol=1e-14)
    q = trainer.propulsion
    pts = cp.cruise_grid(trainer, [0.0, 1500.0], [45.0, 55.0, 65.0])
    v = np.broadcast_to(pts.tas, pts.shape)
    # 65 m/s needs more than full throttle: no fuel flow there (NaN with the POWER bit).
    ok = pts.limits & cp.Limit.POWER == 0
    assert ok.sum() == 4
    np.testing.assert_allclose(thrust_power(q, "fuel_mass_flow", pts.store_rate, v)[ok],
                               pts.thrust_power[ok], rtol=1e-14)
    np.testing.assert_allclose(
        thrust_power(q, "fuel_volume_flow", pts.fuel_volume_flow, v)[ok],
        pts.thrust_power[ok], rtol=1e-14)
    # By hand, the drone file's chain: 400 W of battery power x motor 0.85 x controller
    # 0.95 x propeller 0.70 = 226.1 W of thrust power.
    assert float(thrust_power(p, "electric_power", 400.0, 20.0)) == pytest.approx(226.1,
                                                                              rel=1e-14)
    tas = np.array([20.0, 25.0])
    fuel = np.array([20.0, 25.0]) / 3.6e6                        # L/h -> m^3/s
    with pytest.raises(CruiseplanError, match="gives fuel flow but the airframe is "
                                              "electric-propeller: log electric_power or "
                                              "shaft_power"):
        thrust_power(p, "fuel_volume_flow", fuel, tas)


def test_multirotor_is_refused():
    quad = cp.load_airframe("demo-mapping-quad")
    mass, rho, tas, _ = test_matrix()
    from cruiseplan.io.flightlog import FlightLog

    log = FlightLog("x.csv", "0" * 64, np.arange(20), np.zeros(20), np.full(20, 288.0), rho,
                    tas, mass, "electric_power", np.full(20, 300.0), None, None, (), "tas")
    with pytest.raises(CruiseplanError, match="demo-mapping-quad is a multirotor: the PIW-VIW "
                                              "drag-polar fit is for fixed-wing airframes"):
        fit_flight_log(quad, log)


# --- flight logs ------------------------------------------------------------------------------

HEADER = ("pressure_altitude [ft],isa_dev [K],tas [m/s],mass [kg],shaft_power [W],"
          "vertical_speed [ft/min]")


def log_rows(n=8, vs=None):
    mass, rho, tas, _ = test_matrix()
    h = np.repeat(np.array(ALTITUDES) / FT, 5)
    h = np.concatenate([h, h])
    vs = np.zeros(20) if vs is None else vs
    power = level_power(tas, rho, mass) / 0.72
    return [f"{h[i]:.1f},{ISA_DEV},{float(tas[i])!r},{mass[i]},{float(power[i])!r},{vs[i]}"
            for i in range(n)]


@pytest.fixture
def write_log(tmp_path):
    def write(lines, name="log.csv"):
        path = tmp_path / name
        path.write_text("\n".join(lines) + "\n", encoding="utf-8")
        return path

    return write


def test_log_is_read_in_si(write_log):
    path = write_log(["# a comment line", HEADER] + log_rows(20))
    log = read_flight_log(path)
    mass, rho, tas, _ = test_matrix()
    assert log.n_points == 20 and log.power_source == "shaft_power"
    np.testing.assert_array_equal(log.lines, np.arange(3, 23))
    np.testing.assert_allclose(log.tas, tas, rtol=1e-12)
    np.testing.assert_allclose(log.density, rho, rtol=1e-9)
    np.testing.assert_allclose(log.mass, mass)


def test_log_units_any_pint_unit(write_log):
    # Other units of the same dimension: degF, N (a weight), m, gal/h, kt via CAS.
    rows = ["pressure_altitude [m],oat [degF],cas [km/h],weight [N],fuel_flow [gal/h]"]
    rows += [f"{1000 + 10 * i},59,{150 + 10 * i},{700 * G0},{5 + i}" for i in range(5)]
    log = read_flight_log(write_log(rows))
    np.testing.assert_allclose(log.pressure_altitude, 1000 + 10 * np.arange(5))
    np.testing.assert_allclose(log.temperature, 288.15, atol=1e-9)       # 59 degF = 15 degC
    np.testing.assert_allclose(log.mass, 700.0, rtol=1e-12)
    assert log.power_source == "fuel_volume_flow"
    np.testing.assert_allclose(log.power, (5 + np.arange(5)) * 3.785411784e-3 / 3600.0)
    air = cp.air_state(log.pressure_altitude, oat=288.15)
    np.testing.assert_allclose(cas_from_tas(log.tas, air.pressure, air.speed_of_sound),
                               (150 + 10 * np.arange(5)) / 3.6, rtol=1e-9)


def test_log_cas_to_tas_reference_value(write_log):
    # CAS 100 kt at 5000 ft ISA -> TAS 107.67 kt ([calc] from the compressible pitot
    # relations, Anderson, Introduction to Flight, sec. 4.12; see test_airspeed.py).
    # Printed to 0.01 kt: half a unit.
    rows = ["pressure_altitude [ft],isa_dev [degC],cas [kt],mass [kg],electric_power [W]"]
    rows += ["5000,0,100,700,30000"] * 5
    log = read_flight_log(write_log(rows))
    np.testing.assert_allclose(log.tas / KT, 107.67, atol=0.005)
    assert log.airspeed_column == "cas" and log.power_source == "electric_power"


def test_log_voltage_and_current_multiply(write_log):
    rows = ["pressure_altitude [m],isa_dev [K],tas [m/s],mass [kg],voltage [V],current [A]"]
    rows += [f"100,0,{18 + i},13,44.4,{10 + i}" for i in range(5)]
    log = read_flight_log(write_log(rows))
    np.testing.assert_allclose(log.power, 44.4 * (10 + np.arange(5)))


@pytest.mark.parametrize("header, match", [
    ("pressure_altitude [ft],isa_dev [K],mass [kg],shaft_power [W],vertical_speed [ft/min]",
     r"no airspeed column \(give cas \[kt\] or tas \[m/s\]\); expected columns: "
     r"pressure_altitude \[ft\]"),
    ("pressure_altitude [ft],isa_dev [K],tas [m/s],mass [kg],vertical_speed [ft/min]",
     r"no power source column \(give electric_power \[W\] or voltage \[V\] with current "
     r"\[A\] or shaft_power \[hp\] or fuel_flow \[L/h\]\)"),
    (HEADER + ",rpm [1/min]", r"unknown column 'rpm \[1/min\]'; expected columns:"),
    (HEADER.replace("tas [m/s]", "tas"), r"column 'tas' has no unit; write it as 'tas \[m/s\]'"),
    (HEADER.replace("tas [m/s]", "tas [kg]"),
     r"column 'tas \[kg\]': kg is not a speed \(dimension \[length\] / \[time\]\); use "
     r"units such as m/s"),
    (HEADER.replace("tas [m/s]", "tas [knts]"),
     r"column 'tas \[knts\]': unit 'knts' is not known; give a speed in units such as m/s"),
    (HEADER.replace("shaft_power [W]", "shaft_power [L/h]"),
     r"'shaft_power \[L/h\]': L/h is not a power"),
    (HEADER + ",cas [kt]", "columns cas and tas both give the airspeed; keep one"),
    (HEADER.replace("shaft_power [W]", "voltage [V]"),
     r"column 'voltage' needs 'current \[A\]' too"),
    (HEADER + ",tas [kt]", "column 'tas' appears twice"),
])
def test_bad_log_headers(write_log, header, match):
    with pytest.raises(LogFileError, match=match):
        read_flight_log(write_log([header] + log_rows(8)))


def test_bad_log_values(write_log, tmp_path):
    rows = log_rows(8)
    with pytest.raises(LogFileError, match=r"line 4, column 'tas \[m/s\]': 'fast' is not a "
                                           "finite number"):
        read_flight_log(write_log([HEADER] + rows[:2] + [rows[2].replace(
            rows[2].split(",")[2], "fast")] + rows[3:]))
    with pytest.raises(LogFileError, match="line 2 has 5 values; the header has 6 columns"):
        read_flight_log(write_log([HEADER, rows[0].rsplit(",", 1)[0]] + rows))
    with pytest.raises(LogFileError, match=r"line 2, column 'mass \[kg\]': -5 must be positive"):
        parts = rows[0].split(",")
        parts[3] = "-5"
        read_flight_log(write_log([HEADER, ",".join(parts)] + rows[1:]))
    with pytest.raises(LogFileError, match="4 level-flight points; the fit needs at least 5"):
        read_flight_log(write_log([HEADER] + rows[:4]))
    with pytest.raises(LogFileError, match="no header line"):
        read_flight_log(write_log(["# only a comment"]))
    with pytest.raises(LogFileError, match="cannot read the flight log"):
        read_flight_log(tmp_path / "missing.csv")


def test_non_level_points_are_dropped_with_a_warning(write_log):
    # 100 ft/min as the level-flight limit: common practice, no source.
    vs = np.zeros(20)
    vs[[2, 6]] = [150.0, -250.0]
    vs[3] = 90.0                                           # within the limit: kept
    with pytest.warns(CruiseplanWarning, match=r"lines 4, 8 dropped: \|vertical speed\| "
                                               "above 100 ft/min, not level flight"):
        log = read_flight_log(write_log([HEADER] + log_rows(20, vs)))
    assert log.not_level == (4, 8) and log.n_points == 18
    assert 5 in log.lines and 4 not in log.lines
    vs = np.full(20, 300.0)
    vs[:4] = 0.0
    with pytest.warns(CruiseplanWarning, match="dropped"):
        with pytest.raises(LogFileError, match="4 level-flight points; the fit needs at least 5"):
            read_flight_log(write_log([HEADER] + log_rows(20, vs)))


# --- the fitted airframe file -----------------------------------------------------------------

def test_fitted_text_keeps_everything_else_byte_for_byte(trainer):
    text = ("# head comment\r\n[wing]\r\narea = \"11.2 m^2\"\r\n\r\n[polar]  # the polar\r\n"
            "kind = \"parabolic\"\r\ncd0 = 0.036   # from a guess\r\nk = 0.05\r\n\r\n"
            "[propulsion]\r\nkind = \"x\"\r\n")
    mass, rho, tas, _ = test_matrix()
    res = fit(level_power(tas, rho, mass, cd0=0.031, k=0.047), tas, rho, mass)
    new = fitted_airframe_text(text, res, log_name="flight.csv",
                               when=__import__("datetime").date(2026, 5, 4))
    assert "cd0 = 0.03100   # from a guess\r\n" in new and "k = 0.04700\r\n" in new
    old_lines, new_lines = text.splitlines(keepends=True), new.splitlines(keepends=True)
    assert new_lines[5].startswith("# cd0 and k fitted from flight.csv on 2026-05-04")
    assert new_lines[5].endswith(")\r\n")
    # The fit's tolerances are added at the end (tests/test_correlated_tolerances.py).
    body, _, added = new.partition("\r\n# cd0 and oswald_e: the fit's")
    assert added.count("[uncertainty]\r\n") == 1
    new_lines = body.splitlines(keepends=True)
    kept = [ln for ln in new_lines if not ln.startswith(("# cd0 and", "cd0 =", "k ="))]
    assert kept == [ln for ln in old_lines if not ln.startswith(("cd0 =", "k ="))]
    with pytest.raises(CruiseplanError, match="has no 'cd0 = ...' and 'oswald_e = ...'"):
        fitted_airframe_text("[polar]\nkind = \"tabulated\"\n", res, log_name="f.csv")


# --- command line -----------------------------------------------------------------------------

def run(capsys, *argv):
    status = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return status, out, err


def test_cli_fit_demo_log_writes_airframe_and_plot(capsys, tmp_path):
    new, png = tmp_path / "fitted.toml", tmp_path / "residuals.png"
    status, out, err = run(capsys, "fit", "logs/demo-trainer-flight-test.csv", "--airframe",
                           "demo-trainer", "-o", new, "--plot", png)
    assert status == 0, err
    assert "line 14 dropped: |vertical speed| above 100 ft/min" in err
    assert re.search(r"outliers dropped \(\|studentised residual\| > 3\.\d\d, Bonferroni "
                     r"for 27 points\): line 22", out), out
    assert "Propeller efficiency: held at the airframe's value" in out
    assert "CAUTION:" in out and all(c in out for c in cp.CAUTIONS)
    # The demo log was made from cd0 0.036, oswald_e 0.76 (logs/make_demo_log.py).
    m = {k: re.search(rf"^{k} = ([\d.]+) ± ([\d.]+).*95 % interval ([\d.]+) to ([\d.]+)",
                      out, re.M) for k in ("CD0", "oswald_e")}
    for key, true in (("CD0", CD0), ("oswald_e", E)):
        lo, hi = float(m[key].group(3)), float(m[key].group(4))
        assert lo <= true <= hi
    # The new airframe file loads, and all but the fitted values are the original's.
    original = cp.load_airframe("demo-trainer")
    fitted = cp.read_airframe(new)
    assert fitted.polar.cd0 == pytest.approx(float(m["CD0"].group(1)), abs=1e-5)
    assert 1.0 / (math.pi * fitted.aspect_ratio * fitted.polar.k) == pytest.approx(
        float(m["oswald_e"].group(1)), abs=1e-4)
    old_doc = tomllib.loads((cp.bundled_airframes()["demo-trainer"]).read_text())
    new_doc = tomllib.loads(new.read_text())
    assert {k: v for k, v in new_doc.items() if k not in ("polar", "uncertainty")} == \
           {k: v for k, v in old_doc.items() if k not in ("polar", "uncertainty")}
    # The polar's tolerances are the fit's (tests/test_correlated_tolerances.py), the
    # others the file's.
    for key in ("propeller_efficiency", "bsfc"):
        assert new_doc["uncertainty"][key] == old_doc["uncertainty"][key]
    assert new_doc["polar"]["kind"] == "parabolic"
    assert fitted.propulsion == original.propulsion and fitted.wing_area == original.wing_area
    assert png.read_bytes().startswith(b"\x89PNG\r\n\x1a\n") and png.stat().st_size > 20000


def test_cli_fit_json(capsys, write_log, tmp_path):
    path = write_log([HEADER] + log_rows(20))
    # The log is made with a constant propeller efficiency of 0.72: fit it with the
    # trainer's file so written (the bundled one gives a diameter: momentum theory).
    text = cp.load_airframe("demo-trainer").source
    text = open(text, encoding="utf-8").read()
    text = "\n".join(line for line in text.splitlines()
                     if not line.startswith(("propeller_efficiency", "propeller_diameter")))
    text = text.replace('kind = "piston-propeller"',
                        'kind = "piston-propeller"\npropeller_efficiency = 0.72')
    airframe = tmp_path / "trainer-constant-propeller.toml"
    airframe.write_text(text)
    status, out, err = run(capsys, "fit", path, "--airframe", str(airframe), "--format",
                           "json", "--reference-mass", "1600 lb")
    assert status == 0 and err == ""
    doc = json.loads(out)
    # The log holds exact powers (repr floats): the fit converges to rounding (measured
    # 3.3e-16).
    assert doc["summary"]["cd0"] == pytest.approx(CD0, rel=5e-15)
    assert doc["summary"]["oswald_e"] == pytest.approx(E, rel=5e-15)
    assert doc["summary"]["reference_mass_kg"] == pytest.approx(1600 * LB, rel=1e-15)
    assert doc["summary"]["points_used"] == 20
    names = [c["name"] for c in doc["columns"]]
    assert {"VIW", "PIW", "PIW fit", "residual", "status"} <= set(names)
    assert len(doc["rows"]) == 20


@pytest.mark.parametrize("args, match", [
    (["fit", "{log}", "--airframe", "demo-trainer", "-o", "{d}/new.txt"],
     "--output {d}/new.txt: the airframe file must end in .toml"),
    (["fit", "{log}", "--airframe", "demo-trainer", "--plot", "{d}/r.svg"],
     "--plot {d}/r.svg: the file must end in .png or .pdf"),
    (["fit", "{d}/missing.csv", "--airframe", "demo-trainer", "-o", "{d}/new.toml"],
     "cannot read the flight log"),
    (["fit", "{bad}", "--airframe", "demo-trainer", "-o", "{d}/new.toml", "--plot",
      "{d}/r.png"], "no airspeed column"),
    (["fit", "{log}", "--airframe", "demo-sensor-wing", "-o", "{d}/new.toml"],
     "--output: demo-sensor-wing has a build-up polar; the fit writes cd0 and oswald_e of a "
     "parabolic one"),
    (["fit", "{log}", "--airframe", "demo-mapping-quad", "-o", "{d}/new.toml"],
     "demo-mapping-quad is a multirotor: the PIW-VIW drag-polar fit is for fixed-wing"),
    (["fit", "{log}"], "the following arguments are required: --airframe"),
    # A fitted e above 1 would not load: nothing is written, not even the plot.
    (["fit", "{wild}", "--airframe", "demo-trainer", "-o", "{d}/new.toml", "--plot",
      "{d}/r.png"], r"the fitted polar does not make a valid airframe file: \[polar\] "
                    r"oswald_e: '?1\.\d+'? is out of range"),
])
def test_cli_fit_bad_input_one_line_no_files(capsys, tmp_path, write_log, args, match):
    good = write_log([HEADER] + log_rows(20), "good.csv")
    bad = write_log([HEADER.replace("tas [m/s],", "")] + [
        ",".join(r.split(",")[:2] + r.split(",")[3:]) for r in log_rows(20)], "bad.csv")
    mass, rho, tas, _ = test_matrix()
    wild = write_log([HEADER] + [
        f"{h / FT},{ISA_DEV},{float(v)!r},{m},{float(p)!r},0" for h, v, m, p in zip(
            np.concatenate([np.repeat(ALTITUDES, 5)] * 2), tas, mass,
            level_power(tas, rho, mass, k=1.0 / (math.pi * 1.3 * AR)) / 0.72)], "wild.csv")
    fill = dict(d=tmp_path, log=good, bad=bad, wild=wild)
    before = set(tmp_path.iterdir())
    status, out, err = run(capsys, *[a.format(**fill) for a in args])
    assert status == 2 and out == ""
    assert err.startswith("cruiseplan: error: ") and err.count("\n") == 1
    assert re.search(match.format(**fill) if "{d}" in match else match, err), err
    assert set(tmp_path.iterdir()) == before


# --- residual plot ----------------------------------------------------------------------------

def test_residual_plot_is_made(trainer):
    from cruiseplan.plots import figure_bytes, fit_residuals

    mass, rho, tas, _ = test_matrix(7)
    rng = np.random.default_rng(2)
    power = level_power(tas, rho, mass) * (1 + 0.01 * rng.standard_normal(tas.size))
    power[4] *= 1.2
    res = fit(power, tas, rho, mass)
    fig = fit_residuals(res, trainer, log_name="synthetic.csv")
    texts = [t.get_text() for t in fig.texts]
    assert any("Planning aid only" in t for t in texts)
    ax_p, ax_r = fig.axes[:2]
    assert ax_p.get_ylabel().endswith("PIW [hp]")
    assert ax_r.get_xlabel().endswith("[kt]") and "%" in ax_r.get_ylabel()
    labels = [t.get_text() for ax in (ax_p, ax_r) for t in ax.texts]
    assert "line 5" in labels                              # the outlier, named
    legend = [t.get_text() for t in ax_p.get_legend().get_texts()]
    assert sum(t.startswith("\u03c3 ") for t in legend) == 4   # four blocks shown apart
    assert figure_bytes(fig, "png").startswith(b"\x89PNG")
