"""Statistics of a solved block: Monte Carlo, RSS, yield, reproducibility, progress."""

from __future__ import annotations

import dataclasses
import io
import math
import pickle

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats
from uncertainties import ufloat, umath

from timespec.analysis import Factor, standard_uncertainty
from timespec.design.result import BlockResult
from timespec.design.solver import solve, solve_block
from timespec.design.statistics import (
    EXACT_UP_TO,
    analyse,
    analyse_block,
    chunk_size,
    terminal_progress,
)
from timespec.language.assemble import parse
from timespec.model import Requirement, Window

SPEC = """
defaults:
  supply 12 V ±5%
  ambient -10 degC to 60 degC
  life 5 years
  resistors E96 1% 100 ppm/K, 1k to 1M, 0.05 %/year
  capacitors E12 5% C0G

oneshot relay_hold:
  width 15 ms ±12%
  timer cmos
"""

# Small tolerances everywhere, so the model is close to linear over the box.
SMALL = """
defaults:
  supply 12 V ±1%
  ambient 20 degC to 30 degC
  resistors E96 0.1% 25 ppm/K, 1k to 1M
  capacitors E12 1% C0G

oneshot bench_gate:
  width 15 ms ±5%
  timer cmos, initial ±0.5%
"""


@pytest.fixture(scope="module")
def solved() -> BlockResult:
    res = solve_block(parse(SPEC).blocks[0])
    assert res.verdict == "meets"
    return res


@pytest.fixture(scope="module")
def small() -> BlockResult:
    res = solve_block(parse(SMALL).blocks[0])
    assert res.best is not None
    return res


def test_analyse_fills_rss_and_monte_carlo(solved: BlockResult) -> None:
    out = analyse_block(solved, samples=5000, seed=3)
    assert out is not solved and solved.monte_carlo is None
    mc = out.monte_carlo
    assert mc is not None and mc.samples == 5000 and mc.seed == 3
    assert set(out.rss) == {"width"}
    shares = [c.share for c in out.rss["width"].contributions]
    # contributors largest first; variance shares add up to 1 (GUM 5.1.2)
    assert shares == sorted(shares, reverse=True)
    assert math.isclose(sum(shares), 1.0, rel_tol=1e-9)
    # the 5 % capacitor is the largest single contributor (its band is the widest)
    assert out.rss["width"].contributions[0].name == "C.tol"
    st_w = mc.outputs["width"]
    assert st_w.cpk is not None and st_w.within is not None
    # spec defaults are used when nothing is passed
    assert analyse_block(solved).monte_carlo.samples == solved.block.statistics.samples  # type: ignore[union-attr]


def test_monte_carlo_envelope_inside_worst_case(solved: BlockResult) -> None:
    # Worst case searches every corner of the factor box; for a model monotone in
    # each factor no sample can lie outside (extreme-value analysis, common practice).
    mc = analyse_block(solved, samples=50_000, seed=11).monte_carlo
    assert mc is not None and solved.best is not None
    o = solved.best.output("width")
    s = mc.outputs["width"]
    assert o.low * (1 - 1e-12) <= s.minimum and s.maximum <= o.high * (1 + 1e-12)


@settings(max_examples=8, deadline=None)
@given(seed=st.integers(min_value=0, max_value=2**31))
def test_envelope_property(seed: int) -> None:
    res = solve_block(parse(SPEC).blocks[0])
    mc = analyse_block(res, samples=2000, seed=seed).monte_carlo
    assert mc is not None and res.best is not None
    o = res.best.output("width")
    assert o.low * (1 - 1e-12) <= mc.outputs["width"].minimum
    assert mc.outputs["width"].maximum <= o.high * (1 + 1e-12)


def test_rss_agrees_with_monte_carlo_for_small_tolerances(small: BlockResult) -> None:
    # JCGM 100 (GUM) 5.1.2: for a model close to linear over the input spreads the
    # first-order combined standard uncertainty equals the output standard deviation;
    # JCGM 101 Monte Carlo converges to it as the sample count grows.
    out = analyse_block(small, samples=400_000, seed=5)
    mc = out.monte_carlo
    assert mc is not None
    sd = mc.outputs["width"].std
    sigma = out.rss["width"].sigma
    # sampling error of a standard deviation is about 1/sqrt(2n) = 0.11 %
    assert sd == pytest.approx(sigma, rel=0.01)


def _width_closed_form(x: dict[str, object]) -> object:
    """555-type one-shot width with every second-order term, written on ufloats.

    RC charging law t = R·C·ln((V_eff − v0)/(V_eff − k·V)), V_eff = V − i·R, v0 from
    the R / r_on divider with the drain as a Norton source (circuit-theory
    handbook); part value × (1 + tol)(1 + tc·ΔT)(1 + age); timer drift and supply
    sensitivity as relative scalings (555-type timer datasheets, generic class); the
    node's stray (timer pins and board) adds to C, the output delay to the width.
    """

    def g(k: str) -> object:
        return x.get(k, 0.0)

    def part(ref: str) -> object:
        return (
            x[f"{ref}.value"]  # type: ignore[operator]
            * (1 + g(f"{ref}.tol"))  # type: ignore[operator]
            * (1 + g(f"{ref}.tc") * 1e-6 * (x["temp"] - 25.0))  # type: ignore[operator]
            * (1 + g(f"{ref}.age"))  # type: ignore[operator]
        )

    r, c, v = part("R"), part("C") + g("stray"), x["supply"]  # type: ignore[operator]
    ron, i = x["timer.ron"], g("timer.ith")
    v0 = v * ron / (r + ron) - i * (r * ron / (r + ron))  # type: ignore[operator]
    veff = v - i * r  # type: ignore[operator]
    t = r * c * umath.log((veff - v0) / (veff - x["timer.ratio"] * v))  # type: ignore[operator]
    t = t * (1 + x["timer.drift"] * 1e-6 * (x["temp"] - 25.0))  # type: ignore[operator]
    t = t * (1 + x["timer.vco"] * (x["supply"] - x["supply.nominal"]))  # type: ignore[operator]
    return t + g("timer.delay")  # type: ignore[operator]


def test_rss_and_monte_carlo_agree_with_uncertainties_package(small: BlockResult) -> None:
    # Independent check: the general-purpose `uncertainties` package propagates the
    # same standard uncertainties (GUM 4.3.7: uniform half-range h gives h/sqrt(3))
    # through the closed form by automatic differentiation.
    x: dict[str, object] = {
        f.name: ufloat(f.nominal, standard_uncertainty(f), f.name)
        if standard_uncertainty(f) > 0
        else f.nominal  # plain numbers for what does not vary
        for f in small.factors
    }
    u = _width_closed_form(x)
    out = analyse_block(small, samples=400_000, seed=9)
    assert out.monte_carlo is not None
    assert u.std_dev == pytest.approx(out.rss["width"].sigma, rel=2e-3)  # type: ignore[attr-defined]
    assert u.std_dev == pytest.approx(out.monte_carlo.outputs["width"].std, rel=0.01)  # type: ignore[attr-defined]
    assert u.nominal_value == pytest.approx(out.rss["width"].nominal, rel=1e-9)  # type: ignore[attr-defined]


def _only(factors: tuple[Factor, ...], keep: str) -> tuple[Factor, ...]:
    return tuple(
        f
        if f.name == keep
        else dataclasses.replace(f, low=f.nominal, high=f.nominal, distribution="fixed")
        for f in factors
    )


def test_yield_linear_in_one_normal_input_matches_scipy() -> None:
    # Width is exactly proportional to C (t = R·C·ln(...)), so with only the capacitor
    # tolerance varying, width = W0·(1 + e) with e a normal of sd tol/3 truncated at
    # ±tol.  The yield is then a truncated-normal probability (scipy.stats.truncnorm).
    # ("spread normal 3 sigma" is the documented form; the parser reads "sigma" as a
    # unit at present, reported to the lead, so the bare count is used here.)
    spec = parse(SPEC.replace("  timer cmos\n", "  timer cmos\n  spread normal 3\n"))
    res = solve_block(spec.blocks[0])
    facs = _only(res.factors, "C.tol")
    tol = res.block.capacitors.tolerance
    c_tol = next(f for f in facs if f.name == "C.tol")
    assert c_tol.distribution == "normal" and c_tol.sigmas == 3.0
    assert res.best is not None
    w0 = res.best.output("width").nominal
    lo_e, hi_e = -0.02, 0.03
    window = Window(w0 * (1 + lo_e), w0 * (1 + hi_e), "time")
    block = dataclasses.replace(res.block, requirements=(Requirement("width", window),))
    res = dataclasses.replace(res, block=block, factors=facs)
    mc = analyse_block(res, samples=200_000, seed=21).monte_carlo
    assert mc is not None
    dist = stats.truncnorm(-3.0, 3.0, loc=0.0, scale=tol / 3.0)
    expected = float(dist.cdf(hi_e) - dist.cdf(lo_e))
    lo, hi = mc.yield_interval
    assert lo <= expected <= hi
    # and the spread is the truncated normal's (scipy.stats.truncnorm.std)
    assert mc.outputs["width"].std == pytest.approx(w0 * float(dist.std()), rel=0.01)


def test_same_seed_same_bytes_different_seed_within_intervals(solved: BlockResult) -> None:
    a = analyse_block(solved, samples=100_000, seed=1)
    b = analyse_block(solved, samples=100_000, seed=1)
    assert pickle.dumps((a.monte_carlo, a.rss)) == pickle.dumps((b.monte_carlo, b.rss))
    c = analyse_block(solved, samples=100_000, seed=2)
    ma, mc = a.monte_carlo, c.monte_carlo
    assert ma is not None and mc is not None
    assert pickle.dumps(ma) != pickle.dumps(mc)
    sa, sc = ma.outputs["width"], mc.outputs["width"]
    # two independent estimates of one mean differ by a few standard errors
    se = math.hypot(sa.std, sc.std) / math.sqrt(100_000)
    assert abs(sa.mean - sc.mean) < 4.0 * se
    # and of one standard deviation by a few times sd/sqrt(2n) each (normal theory)
    assert abs(sa.std - sc.std) < 4.0 * math.hypot(sa.std, sc.std) / math.sqrt(2 * 100_000)
    # yield intervals (Wilson, 95 %) of the two runs overlap
    assert ma.yield_interval[0] <= mc.yield_interval[1]
    assert mc.yield_interval[0] <= ma.yield_interval[1]


def test_chunked_run_for_large_counts(solved: BlockResult) -> None:
    assert chunk_size(EXACT_UP_TO) == EXACT_UP_TO
    assert chunk_size(EXACT_UP_TO + 1) < EXACT_UP_TO
    mc = analyse_block(solved, samples=EXACT_UP_TO + 10_000, seed=4).monte_carlo
    assert mc is not None and mc.outputs["width"].percentile_resolution > 0


def test_analyse_whole_result() -> None:
    res = solve(parse(SPEC))
    out = analyse(res, samples=1000, seed=8)
    assert all(b.monte_carlo is not None and b.monte_carlo.samples == 1000 for b in out.blocks)


def test_bad_arguments(solved: BlockResult) -> None:
    with pytest.raises(ValueError):
        analyse_block(solved, samples=0)
    with pytest.raises(ValueError):
        analyse_block(solved, seed=-1)


class _FakeTty(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_progress_only_on_a_terminal(solved: BlockResult) -> None:
    assert terminal_progress(io.StringIO()) is None
    tty = _FakeTty()
    prog = terminal_progress(tty)
    assert prog is not None
    analyse_block(solved, samples=EXACT_UP_TO * 2, seed=1, progress=prog)
    text = tty.getvalue()
    assert "Monte Carlo" in text and "%" in text
    assert text.endswith("\r\x1b[K")  # the line is erased when done
    assert np.all([line.startswith("Monte Carlo") for line in text.split("\r")[1:-1]])
