"""Variance-based driver shares (Sobol indices) and percentile capability, vs outside sources."""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np
import pytest
import scipy.stats

from timespec.analysis import Factor, FloatArray, monte_carlo, variance_shares
from timespec.analysis.stats import CAPABILITY_MIN_SAMPLES, percentile_capability
from timespec.design.solver import solve_block
from timespec.design.statistics import analyse_block
from timespec.language.assemble import parse


def _ishigami(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
    y = np.sin(x["x1"]) + 7.0 * np.sin(x["x2"]) ** 2 + 0.1 * x["x3"] ** 4 * np.sin(x["x1"])
    return {"y": y}


def test_ishigami_indices_match_the_analytic_values() -> None:
    # Ishigami function, a = 7, b = 0.1, inputs uniform on [-pi, pi]: analytic
    # indices (T. Ishigami and T. Homma 1990; values as tabulated by A. Saltelli et
    # al., "Global Sensitivity Analysis: The Primer", Wiley 2008):
    # S1 = 0.3139, S2 = 0.4424, S3 = 0, ST1 = 0.5576, ST2 = 0.4424, ST3 = 0.2437.
    fs = [Factor(f"x{i}", f"x{i}", 0.0, -math.pi, math.pi) for i in (1, 2, 3)]
    got = {d.name: d for d in variance_shares(fs, _ishigami, samples=16_384, seed=3)["y"]}
    exact_s = {"x1": 0.3139, "x2": 0.4424, "x3": 0.0}
    exact_t = {"x1": 0.5576, "x2": 0.4424, "x3": 0.2437}
    for k in got:
        d = got[k]
        assert d.total == pytest.approx(exact_t[k], abs=4 * d.total_se + 1e-3)
        assert d.first_order == pytest.approx(exact_s[k], abs=4 * d.first_order_se + 1e-3)
    # Only x1-x3 interact (pairwise), so the Shapley effect is S_i + S_13/2 exactly
    # (A. B. Owen, SIAM/ASA JUQ 2014): 0.4358, 0.4424, 0.1218.
    for k, sh in {"x1": 0.4358, "x2": 0.4424, "x3": 0.1218}.items():
        assert got[k].share == pytest.approx(sh, abs=0.02)
    assert math.fsum(d.share for d in got.values()) == pytest.approx(1.0)


def test_product_of_centred_inputs_is_pure_interaction() -> None:
    # y = x1*x2 with independent zero-mean inputs: Var(y) = Var(x1)Var(x2)
    # (L. A. Goodman, "On the exact variance of products", JASA 55, 1960), all of it
    # interaction, so S1 = S2 = 0, ST1 = ST2 = 1 and each Shapley share is 1/2.
    # First-order propagation (GUM 5.1.2) gives both 0 here.
    fs = [Factor("a", "a", 0.0, -1.0, 1.0), Factor("b", "b", 0.0, -2.0, 2.0, distribution="normal")]
    res = variance_shares(fs, lambda x: {"y": x["a"] * x["b"]}, samples=8192, seed=1)["y"]
    for d in res:
        assert d.first_order == pytest.approx(0.0, abs=0.05)
        assert d.total == pytest.approx(1.0, abs=0.05)
        assert d.share == pytest.approx(0.5, abs=0.02)


def test_no_effect_gives_zero_and_seed_reproduces() -> None:
    fs = [Factor("a", "a", 0.0, -1.0, 1.0), Factor("z", "z", 0.0, -1.0, 1.0)]
    one = variance_shares(fs, lambda x: {"y": 3.0 * x["a"]}, samples=1000, seed=5)
    two = variance_shares(fs, lambda x: {"y": 3.0 * x["a"]}, samples=1000, seed=5)
    assert one == two
    by = {d.name: d for d in one["y"]}
    assert by["z"].share == 0.0 and by["a"].share == pytest.approx(1.0)
    with pytest.raises(ValueError):
        variance_shares(fs, lambda x: {"y": x["a"]}, samples=1, seed=0)


TEMPCO = """
oneshot oven_gate:
  supply 12 V ±1%
  ambient -40 degC to 90 degC
  resistors E96 0.1% 250 ppm/K, 1k to 1M
  capacitors E12 1% C0G
  width 20 ms ±10%
  timer cmos, initial ±0.5%
"""


def test_tempco_that_sets_the_corner_gets_a_share() -> None:
    # The resistor tempco multiplies (T - 25 °C): its slope is 0 at the nominal 25 °C,
    # so first-order RSS gives 0 %, yet it moves the worst-case corner.  For
    # width ∝ (1 + tc·1e-6·(T - 25)) with tc, T independent and centred, the
    # interaction variance is W0²·1e-12·Var(tc)·Var(T) (Goodman 1960), of which the
    # Shapley split gives the tempco half.
    res = analyse_block(solve_block(parse(TEMPCO).blocks[0]), samples=20_000, seed=4)
    assert res.monte_carlo is not None and res.best is not None
    rss_share = {c.name: c.share for c in res.rss["width"].contributions}
    drv = {d.name: d for d in res.monte_carlo.drivers["width"]}
    assert rss_share["R.tc"] == pytest.approx(0.0, abs=1e-9)
    tc = next(f for f in res.factors if f.name == "R.tc")
    temp = next(f for f in res.factors if f.name == "temp")
    var_tc = (tc.high - tc.low) ** 2 / 12.0  # uniform variance (GUM 4.3.7)
    var_t = (temp.high - temp.low) ** 2 / 12.0
    w0 = res.best.output("width").nominal
    var_w = res.monte_carlo.outputs["width"].std ** 2
    expected = 0.5 * w0**2 * 1e-12 * var_tc * var_t / var_w
    assert drv["R.tc"].share > 0.005
    assert drv["R.tc"].share == pytest.approx(expected, rel=0.25)
    # and the tempco is at an end of its range in the worst-case corners
    out = res.best.output("width")
    assert out.low_at["R.tc"] in (tc.low, tc.high) and out.high_at["R.tc"] in (tc.low, tc.high)


def test_percentile_capability_of_a_normal_matches_scipy() -> None:
    # For a normal output the percentile method equals the classical index:
    # X99.865 - X50 = 3 sigma (scipy.stats.norm.ppf).
    mu, sd, lo, hi = 10.0, 1.0, 5.0, 14.0
    q = scipy.stats.norm(mu, sd).ppf([0.00135, 0.5, 0.99865])
    cap = percentile_capability(*map(float, q), lo, hi, samples=10**6)
    assert cap is not None
    assert cap.cpk == pytest.approx(min(hi - mu, mu - lo) / (3 * sd), rel=2e-3)
    assert cap.cp == pytest.approx((hi - lo) / (6 * sd), rel=2e-3)
    one = percentile_capability(*map(float, q), -math.inf, hi, samples=10**6)
    assert one is not None and one.cp is None and one.lower is None
    assert one.cpk == pytest.approx((hi - mu) / (3 * sd), rel=2e-3)


def test_capability_never_contradicts_a_full_yield() -> None:
    # A bounded, skewed output (exponential folded into a window that holds every
    # sample): normal-theory Cpk is < 1, the percentile index must be >= 1.
    fs = [Factor("u", "u", 0.5, 0.0, 1.0)]
    window = {"y": (0.0, 1.0)}
    res = monte_carlo(fs, lambda x: {"y": x["u"] ** 6}, samples=20_000, seed=2, windows=window)
    st = res.outputs["y"]
    assert res.yield_fraction == 1.0
    assert st.cpk is not None and st.cpk < 1.0  # the misleading normal-theory figure
    assert st.capability is not None and st.capability.cpk >= 1.0
    # percentiles as numpy/scipy compute them (linear interpolation, scipy.stats)
    y = np.random.default_rng(0).random(200_000) ** 6
    assert float(scipy.stats.scoreatpercentile(y, 50.0)) == pytest.approx(0.5**6, rel=0.05)


def test_capability_needs_enough_samples() -> None:
    assert CAPABILITY_MIN_SAMPLES == 7408  # 10 samples beyond the 0.135 % point
    fs = [Factor("u", "u", 0.5, 0.0, 1.0)]
    res = monte_carlo(fs, lambda x: {"y": x["u"]}, samples=7000, seed=2, windows={"y": (0, 1)})
    assert res.outputs["y"].capability is None


def test_json_keeps_old_keys_and_adds_the_new() -> None:
    from timespec.design.result import Result
    from timespec.outputs.jsondoc import FORMAT_MINOR, FORMAT_VERSION, result_to_dict

    spec = parse(TEMPCO)
    blk = analyse_block(solve_block(spec.blocks[0]), samples=8000, seed=1)
    doc = result_to_dict(Result(spec=spec, blocks=(blk,)))
    # 1.2 (designators, issue 13) keeps every key of 1.1
    assert (doc["format_version"], doc["format_minor"]) == (FORMAT_VERSION, FORMAT_MINOR) == (1, 2)
    b = doc["blocks"][0]
    row = next(r for r in b["contributors"]["width"] if r["name"] == "R.tc")
    assert {"name", "label", "share", "sensitivity"} <= row.keys()
    assert row["share"] > 0.0 and row["rss_share"] == pytest.approx(0.0, abs=1e-9)
    w = b["statistics"]["monte_carlo"]["outputs"]["width"]
    assert {"cpk", "cpk_normal", "capability"} <= w.keys()
    assert w["cpk"] == w["capability"]["cpk"]
