"""Checks of timespec.analysis.stats against scipy.stats and hand-computed values."""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.stats
from hypothesis import given
from hypothesis import strategies as st

from timespec.analysis.stats import (
    cpk,
    normal_cdf,
    normal_pdf,
    normal_quantile,
    truncated_normal_std,
    wilson_interval,
)

_PROBS = np.concatenate(
    [
        np.logspace(-300, -1, 300),
        np.linspace(0.001, 0.999, 999),
        1.0 - np.logspace(-15, -1, 100),
    ]
)


def test_normal_quantile_matches_scipy_to_1e12() -> None:
    # Source: scipy.stats.norm.ppf (reference implementation of the normal quantile).
    for p in _PROBS:
        expected = scipy.stats.norm.ppf(p)
        got = normal_quantile(float(p))
        assert got == pytest.approx(expected, rel=1e-12, abs=1e-300), p


def test_normal_quantile_median_and_ends() -> None:
    # Source: definition of the normal quantile (median 0, limits ±inf).
    assert normal_quantile(0.5) == 0.0
    assert normal_quantile(0.0) == -math.inf
    assert normal_quantile(1.0) == math.inf
    # Source: scipy.stats.norm.ppf(0.975) = 1.959963984540054 (the familiar 1.96).
    assert normal_quantile(0.975) == pytest.approx(1.959963984540054, rel=1e-15)


@pytest.mark.parametrize("p", [-0.1, 1.5, math.nan])
def test_normal_quantile_rejects_non_probabilities(p: float) -> None:
    with pytest.raises(ValueError, match="probability"):
        normal_quantile(p)


def test_normal_cdf_and_pdf_match_scipy() -> None:
    # Source: scipy.stats.norm.cdf / norm.pdf.
    for x in np.linspace(-37.0, 8.0, 451):
        assert normal_cdf(float(x)) == pytest.approx(scipy.stats.norm.cdf(x), rel=1e-13)
        assert normal_pdf(float(x)) == pytest.approx(scipy.stats.norm.pdf(x), rel=1e-13)


@given(st.floats(min_value=1e-12, max_value=1.0 - 1e-12))
def test_cdf_inverts_quantile(p: float) -> None:
    # Invariant: Phi(Phi^-1(p)) = p.
    assert normal_cdf(normal_quantile(p)) == pytest.approx(p, rel=1e-12)


@pytest.mark.parametrize("sigmas", [0.5, 1.0, 2.0, 3.0, 4.5, 6.0])
def test_truncated_normal_std_matches_scipy_truncnorm(sigmas: float) -> None:
    # Source: scipy.stats.truncnorm(-k, k).std() for a unit normal truncated at ±k.
    half = 2.5
    expected = scipy.stats.truncnorm(-sigmas, sigmas).std() * half / sigmas
    assert truncated_normal_std(half, sigmas) == pytest.approx(expected, rel=1e-12)


def test_truncated_normal_std_rejects_bad_arguments() -> None:
    with pytest.raises(ValueError):
        truncated_normal_std(-1.0, 3.0)
    with pytest.raises(ValueError):
        truncated_normal_std(1.0, 0.0)


def test_wilson_hand_computed() -> None:
    # Hand computation of the Wilson (1927) score interval, z = 1.959963984540054:
    # p = 0.8, n = 10: centre = (0.8 + z²/20)/(1 + z²/10) = 0.6984...,
    # half = z/(1 + z²/10)·sqrt(0.016 + z²/400) = 0.2081... → (0.4902, 0.9433).
    z = 1.959963984540054
    centre = (0.8 + z * z / 20) / (1 + z * z / 10)
    half = z / (1 + z * z / 10) * math.sqrt(0.8 * 0.2 / 10 + z * z / 400)
    lo, hi = wilson_interval(8, 10)
    assert lo == pytest.approx(centre - half, rel=1e-14)
    assert hi == pytest.approx(centre + half, rel=1e-14)
    assert (round(lo, 4), round(hi, 4)) == (0.4902, 0.9433)


@pytest.mark.parametrize(
    ("k", "n", "conf"),
    [(0, 10, 0.95), (10, 10, 0.95), (37, 50, 0.95), (1, 1000, 0.9), (999_000, 10**6, 0.99)],
)
def test_wilson_matches_scipy_binomtest(k: int, n: int, conf: float) -> None:
    # Source: scipy.stats.binomtest(k, n).proportion_ci(method="wilson").
    ci = scipy.stats.binomtest(k, n).proportion_ci(confidence_level=conf, method="wilson")
    lo, hi = wilson_interval(k, n, conf)
    assert lo == pytest.approx(ci.low, rel=1e-12, abs=1e-15)
    assert hi == pytest.approx(ci.high, rel=1e-12, abs=1e-15)


@given(st.integers(min_value=1, max_value=10**9), st.data())
def test_wilson_contains_estimate(n: int, data: st.DataObject) -> None:
    # Invariant: the score interval lies in [0, 1] and contains passed/n.
    k = data.draw(st.integers(min_value=0, max_value=n))
    lo, hi = wilson_interval(k, n)
    assert 0.0 <= lo <= k / n <= hi <= 1.0


def test_wilson_edge_cases() -> None:
    assert wilson_interval(0, 0) == (0.0, 1.0)
    with pytest.raises(ValueError):
        wilson_interval(3, 2)
    with pytest.raises(ValueError):
        wilson_interval(1, 2, confidence=1.0)


def test_cpk_hand_computed() -> None:
    # Hand computation of Cpk = min(USL - mu, mu - LSL) / (3 sigma) (ISO 22514-2 form):
    # mu 10, sigma 1, window 4..19 → min(9, 6)/3 = 2.
    assert cpk(10.0, 1.0, 4.0, 19.0) == pytest.approx(2.0)
    assert cpk(10.0, 1.0, 11.0, 19.0) == pytest.approx(-1.0 / 3.0)  # mean outside
    assert cpk(10.0, 1.0, -math.inf, 13.0) == pytest.approx(1.0)  # one-sided
    assert cpk(10.0, 1.0, -math.inf, math.inf) == math.inf
    assert cpk(10.0, 0.0, 4.0, 19.0) is None
    assert cpk(math.nan, 1.0, 4.0, 19.0) is None
    with pytest.raises(ValueError):
        cpk(10.0, 1.0, 5.0, 4.0)
