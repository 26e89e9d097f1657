"""Monte Carlo in chunks: identical results for every chunk size, progress, Ctrl-C."""

import io

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.cli.progress import monte_carlo_progress
from cruiseplan.errors import CruiseplanError
from cruiseplan.io.mission_file import load_mission
from cruiseplan.planning import uncertainty
from cruiseplan.planning.mission import plan_mission
from cruiseplan.planning.uncertainty import chunk_slices, cruise_uncertainty, plan_uncertainty

PLAN_FIELDS = ("remaining", "used", "time", "reserve_required")
# Chunk sizes that divide n, leave a short last chunk, are one sample, or exceed n.
CHUNKS = (1000, 777, 1, 2999, 5000)
N = 3001


@pytest.fixture(scope="module", params=["demo-cross-country", "demo-survey-run"])
def plan(request):
    return plan_mission(load_mission(request.param))


@pytest.fixture(scope="module")
def cruise_case():
    af = cp.load_airframe("demo-trainer")
    load = af.loading()
    return af, load.mass, load.store, cp.air_state(np.array([1500.0])), 50.0, 47.0


@pytest.mark.parametrize("chunk", CHUNKS)
def test_plan_chunked_equals_unchunked_bit_for_bit(plan, chunk):
    # Each chunk re-flies the plan once, so one-draw chunks get fewer draws (suite time).
    n = 61 if chunk == 1 else N
    whole = plan_uncertainty(plan, n, seed=2, chunk=None)
    parts = plan_uncertainty(plan, n, seed=2, chunk=chunk)
    for name in PLAN_FIELDS:
        a, b = getattr(whole, name), getattr(parts, name)
        assert a.shape == b.shape == (n,)
        assert np.array_equal(a, b), name  # exact, not approximate
    # The samples do spread, so the comparison is not between constants.
    assert np.ptp(whole.remaining) > 0


@pytest.mark.parametrize("chunk", CHUNKS)
def test_cruise_chunked_equals_unchunked_bit_for_bit(cruise_case, chunk):
    whole = cruise_uncertainty(*cruise_case, n=N, seed=4, reserve=1.0, chunk=None)
    parts = cruise_uncertainty(*cruise_case, n=N, seed=4, reserve=1.0, chunk=chunk)
    assert parts.range_ground.shape == (N,)
    assert np.array_equal(whole.range_ground, parts.range_ground)
    assert np.array_equal(whole.endurance, parts.endurance)
    assert np.ptp(whole.range_ground) > 0


def test_default_chunk_is_used(plan, monkeypatch):
    # More samples than the default chunk: split, and still the one-pass numbers.
    n = uncertainty.CHUNK + 3
    calls = []
    parts = plan_uncertainty(plan, n, seed=7, progress=lambda done, total: calls.append(done))
    assert calls == [uncertainty.CHUNK, n]
    whole = plan_uncertainty(plan, n, seed=7, chunk=None)
    assert all(np.array_equal(getattr(whole, k), getattr(parts, k)) for k in PLAN_FIELDS)


@pytest.mark.parametrize("chunk, expected", [(1000, [1000, 2000, 3000, 3001]),
                                             (3001, [3001]), (None, [3001]), (4000, [3001])])
def test_progress_counts_increase_to_the_total(plan, cruise_case, chunk, expected):
    for run in (lambda cb: plan_uncertainty(plan, N, seed=1, chunk=chunk, progress=cb),
                lambda cb: cruise_uncertainty(*cruise_case, n=N, seed=1, chunk=chunk,
                                              progress=cb)):
        calls = []
        run(lambda done, total: calls.append((done, total)))
        assert [d for d, _ in calls] == expected
        assert all(t == N for _, t in calls)


def test_chunk_slices_cover_in_order_and_reject_empty_chunks():
    assert [(s.start, s.stop) for s in chunk_slices(7, 3)] == [(0, 3), (3, 6), (6, 7)]
    with pytest.raises(CruiseplanError, match="at least one sample"):
        list(chunk_slices(7, 0))


class _Terminal(io.StringIO):
    def isatty(self):
        return True


def test_bar_only_on_a_terminal_and_for_more_than_one_chunk(monkeypatch):
    monkeypatch.setattr("sys.stderr", io.StringIO())
    with monte_carlo_progress(10**6) as progress:
        assert progress is None  # piped: nothing
    term = _Terminal()
    monkeypatch.setattr("sys.stderr", term)
    with monte_carlo_progress(1000) as progress:
        assert progress is None  # one chunk: nothing
    with monte_carlo_progress(None) as progress:
        assert progress is None
    with monte_carlo_progress(200_000, chunk=50_000) as progress:
        assert callable(progress)
        for done in (50_000, 100_000, 150_000, 200_000):
            progress(done, 200_000)
    assert "Monte Carlo" in term.getvalue()


def test_no_progress_text_when_stderr_is_piped(capsys, monkeypatch):
    # Several chunks (the progress callback is asked for), stderr captured, so not a
    # terminal: nothing on stderr, and the report on stdout carries no bar.
    monkeypatch.setattr(uncertainty, "CHUNK", 400)
    seen = []
    real = uncertainty.chunk_slices

    def slices(n, chunk=None, progress=None):
        seen.append(progress)
        return real(n, 400, progress)

    monkeypatch.setattr(uncertainty, "chunk_slices", slices)
    assert main(["plan", "demo-survey-run", "--monte-carlo", "2000"]) == 0
    out, err = capsys.readouterr()
    assert seen == [None]
    assert err == ""
    assert "\r" not in out and "samples/s" not in out


def _interrupt_after_first_chunk(calls):
    """chunk_slices in chunks of 1000 that raises KeyboardInterrupt as the second starts."""
    real = uncertainty.chunk_slices

    def slices(n, chunk=None, progress=None):
        for k, sl in enumerate(real(n, 1000, progress)):
            calls.append(sl)
            if k == 1:
                raise KeyboardInterrupt  # Ctrl-C half-way through the Monte Carlo
            yield sl
    return slices


@pytest.mark.parametrize("argv, outputs", [
    (["plan", "demo-survey-run", "--monte-carlo", "3000", "--format", "json", "-o",
      "plan.json"], ["plan.json"]),
    (["plan", "demo-survey-run", "--monte-carlo", "3000", "-o", "plan.txt", "--plot",
      "plan.png"], ["plan.txt", "plan.png"]),
    (["best", "demo-trainer", "--monte-carlo", "3000", "-o", "best.txt"], ["best.txt"]),
    (["card", "demo-trainer", "--monte-carlo", "3000", "-o", "card.pdf"],
     ["card.pdf", "card.md"]),
])
def test_ctrl_c_mid_run_exits_130_and_writes_nothing(tmp_path, capsys, monkeypatch, argv,
                                                     outputs):
    calls = []
    monkeypatch.chdir(tmp_path)
    monkeypatch.setattr(uncertainty, "chunk_slices", _interrupt_after_first_chunk(calls))
    assert main(argv) == 130
    out, err = capsys.readouterr()
    assert err == "cruiseplan: interrupted; nothing written\n"
    assert out == ""
    assert len(calls) == 2, "the Monte Carlo was not interrupted mid-run"
    assert not any((tmp_path / name).exists() for name in outputs)
    assert list(tmp_path.iterdir()) == []  # no temporary file either


def test_without_interrupt_the_same_commands_write_their_files(tmp_path, monkeypatch):
    # The control of the test above: the outputs it checks for do get written.
    monkeypatch.chdir(tmp_path)
    assert main(["best", "demo-trainer", "--monte-carlo", "3000", "-o", "best.txt"]) == 0
    assert (tmp_path / "best.txt").exists()


def test_unit_samples_are_scipys_latin_hypercube_bit_for_bit():
    """The samples are drawn a column at a time (less memory), the points those of
    scipy.stats.qmc.LatinHypercube seeded alike, so seeded results stay as they were."""
    from scipy.stats import qmc

    from cruiseplan.planning.uncertainty import unit_samples

    for n, dims, seed in [(1, 1, 0), (7, 3, 5), (1000, 8, 2), (12345, 10, 2**40)]:
        expected = qmc.LatinHypercube(d=dims, seed=np.random.default_rng(seed)).random(n)
        np.testing.assert_array_equal(unit_samples(n, dims, seed), expected)
