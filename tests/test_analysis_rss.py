"""Tests of first-order (RSS) propagation.

Reference: JCGM 100:2008 (GUM) law of propagation of uncertainty for uncorrelated
inputs, checked against the `uncertainties` package (general-purpose first-order
propagation library) and, for small tolerances, against Monte Carlo (JCGM 101:2008).
"""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from uncertainties import ufloat, umath

from timespec.analysis.factors import Factor, FloatArray
from timespec.analysis.montecarlo import monte_carlo
from timespec.analysis.rss import grouped_shares, rss, standard_uncertainty
from timespec.analysis.stats import truncated_normal_std

_R, _C = 100e3, 1e-6
_ONESHOT = [
    Factor("R1.tol", "R1 ±1 %", _R, 0.99 * _R, 1.01 * _R, group="R1"),
    Factor("C1.tol", "C1 ±1 %", _C, 0.99 * _C, 1.01 * _C, group="C1"),
]


def _oneshot(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
    # Monostable width t = R·C·ln 3 (555-type timer, thresholds at 1/3 and 2/3 of supply;
    # textbook RC charging relation).
    return {"width": x["R1.tol"] * x["C1.tol"] * math.log(3.0)}


def test_standard_uncertainties() -> None:
    # GUM 4.3.7: rectangular distribution of half-width a has u = a/√3.
    assert standard_uncertainty(_ONESHOT[0]) == pytest.approx(1000.0 / math.sqrt(3.0))
    normal = Factor("x", "x", 0.0, -3.0, 3.0, distribution="normal", sigmas=3.0)
    assert standard_uncertainty(normal) == pytest.approx(truncated_normal_std(3.0, 3.0))
    assert standard_uncertainty(normal) < 1.0  # truncation trims the parent σ = 1
    fixed = Factor("x", "x", 0.0, -3.0, 3.0, distribution="fixed")
    assert standard_uncertainty(fixed) == 0.0


def test_oneshot_matches_uncertainties_package() -> None:
    # Source: `uncertainties` package, first-order propagation with std_dev = u_i.
    res = rss(_ONESHOT, _oneshot)["width"]
    u = [standard_uncertainty(f) for f in _ONESHOT]
    ref = ufloat(_R, u[0]) * ufloat(_C, u[1]) * math.log(3.0)
    assert res.nominal == pytest.approx(ref.nominal_value, rel=1e-14)
    assert res.sigma == pytest.approx(ref.std_dev, rel=1e-9)
    # Closed form for a product: (σ/t)² = (u_R/R)² + (u_C/C)² (GUM 5.1.6).
    assert res.sigma / res.nominal == pytest.approx(math.sqrt(2.0) * 0.01 / math.sqrt(3.0))


def test_nonlinear_threshold_model_matches_uncertainties_package() -> None:
    # t = R·C·ln((V − V0)/(V − Vth)), charging toward V from V0 (textbook RC relation);
    # checked against `uncertainties` with umath.log, including a normal factor.
    fs = [
        Factor("R", "R", 47e3, 47e3 * 0.98, 47e3 * 1.02),
        Factor("C", "C", 2.2e-6, 2.2e-6 * 0.9, 2.2e-6 * 1.1, distribution="normal"),
        Factor("V", "V", 12.0, 11.4, 12.6),
        Factor("V0", "V0", 0.5, 0.3, 0.7, distribution="normal", sigmas=2.0),
        Factor("Vth", "Vth", 8.0, 7.0, 9.0),
    ]

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        v = x["V"]
        return {"t": x["R"] * x["C"] * np.log((v - x["V0"]) / (v - x["Vth"]))}

    res = rss(fs, model)["t"]
    uf = {f.name: ufloat(f.nominal, standard_uncertainty(f)) for f in fs}
    ref = uf["R"] * uf["C"] * umath.log((uf["V"] - uf["V0"]) / (uf["V"] - uf["Vth"]))
    assert res.sigma == pytest.approx(ref.std_dev, rel=1e-7)
    for c in res.contributions:
        # Each sensitivity equals the package's partial derivative.
        assert c.sensitivity == pytest.approx(ref.derivatives[uf[c.name]], rel=1e-6)
    assert sum(c.share for c in res.contributions) == pytest.approx(1.0)
    shares = [c.share for c in res.contributions]
    assert shares == sorted(shares, reverse=True)


def test_rss_agrees_with_monte_carlo_for_small_tolerances() -> None:
    # First-order propagation (GUM, JCGM 100:2008) is accurate for small tolerances;
    # the Monte Carlo standard deviation (JCGM 101:2008) must agree.  Standard error of
    # a std estimate from N samples is about σ/√(2N) = 0.2 % here.
    res = rss(_ONESHOT, _oneshot)["width"]
    mc = monte_carlo(_ONESHOT, _oneshot, samples=200_000, seed=11)
    assert mc.outputs["width"].std == pytest.approx(res.sigma, rel=0.01)
    assert mc.outputs["width"].mean == pytest.approx(res.nominal, rel=1e-4)


def test_rss_agrees_with_monte_carlo_for_truncated_normal() -> None:
    # Both use the truncated-normal σ, so they agree for a linear model.
    fs = [Factor("x", "x", 1.0, 0.9, 1.1, distribution="normal", sigmas=1.5)]
    res = rss(fs, lambda x: {"y": 3.0 * x["x"]})["y"]
    mc = monte_carlo(fs, lambda x: {"y": 3.0 * x["x"]}, samples=200_000, seed=5)
    assert mc.outputs["y"].std == pytest.approx(res.sigma, rel=0.01)
    assert res.sigma == pytest.approx(3.0 * truncated_normal_std(0.1, 1.5))


@settings(max_examples=30, deadline=None)
@given(st.lists(st.floats(min_value=-10, max_value=10), min_size=1, max_size=6))
def test_linear_model_is_exact(coef: list[float]) -> None:
    # For y = Σ a_i x_i the law of propagation is exact: σ² = Σ (a_i u_i)² (GUM 5.1.2).
    fs = [Factor(f"x{i}", "x", 1.0, 0.5, 1.5 + i) for i in range(len(coef))]

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        return {"y": sum((a * x[f"x{i}"] for i, a in enumerate(coef)), np.zeros(1))}

    res = rss(fs, model)["y"]
    expected = math.sqrt(
        sum((a * standard_uncertainty(f)) ** 2 for a, f in zip(coef, fs, strict=True))
    )
    assert res.sigma == pytest.approx(expected, rel=1e-6, abs=1e-12)


def test_nominal_at_range_end_stays_inside_range() -> None:
    # y = x² at x = low = 1: a one-sided second-order difference is exact (dy/dx = 2) and
    # the model is never evaluated below the range.
    fs = [Factor("x", "x", 1.0, 1.0, 2.0)]
    seen: list[float] = []

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        seen.extend(x["x"].tolist())
        return {"y": x["x"] ** 2}

    res = rss(fs, model)["y"]
    assert res.contributions[0].sensitivity == pytest.approx(2.0, rel=1e-9)
    assert min(seen) >= 1.0


def test_zero_and_fixed_contributions() -> None:
    fs = [
        Factor("a", "a", 2.0, 1.0, 3.0, group="g"),
        Factor("b", "b", 2.0, 1.0, 3.0, group="g"),
        Factor("k", "k", 4.0, 4.0, 4.0),
        Factor("f", "f", 5.0, 0.0, 10.0, distribution="fixed"),
    ]
    res = rss(fs, lambda x: {"y": x["a"] + 3.0 * x["b"] + x["k"] * x["f"]})["y"]
    by_name = {c.name: c for c in res.contributions}
    assert by_name["k"].u_output == 0.0 and by_name["k"].share == 0.0
    assert by_name["k"].sensitivity == pytest.approx(5.0)  # still informative
    assert by_name["f"].share == 0.0
    assert by_name["b"].share == pytest.approx(0.9)
    assert grouped_shares(res) == [("g", pytest.approx(1.0)), ("k", 0.0), ("f", 0.0)]
    assert res.contributions[0].name == "b"


def test_constant_output_has_zero_shares() -> None:
    res = rss(_ONESHOT, lambda x: {"z": np.zeros_like(x["R1.tol"])})["z"]
    assert res.sigma == 0.0
    assert all(c.share == 0.0 for c in res.contributions)
