"""Tests of the seeded, chunked Monte Carlo engine (JCGM 101:2008 method)."""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np
import pytest
import scipy.stats
from hypothesis import given, settings
from hypothesis import strategies as st

from timespec.analysis.factors import Factor, FloatArray
from timespec.analysis.montecarlo import PERCENTILES, monte_carlo
from timespec.analysis.stats import truncated_normal_std, wilson_interval
from timespec.analysis.worstcase import worst_case

_FACTORS = [
    Factor("R1.tol", "R1 ±1 %", 100e3, 99e3, 101e3, group="R1"),
    Factor("C1.tol", "C1 ±5 %", 1e-6, 0.95e-6, 1.05e-6, distribution="normal", group="C1"),
    Factor("ratio", "threshold ratio", 2 / 3, 0.64, 0.69, group="timer"),
    Factor("supply", "supply", 12.0, 11.4, 12.6, group="operating"),
]


def _model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
    # One-shot width t = R·C·ln(1/(1 − k)) with threshold ratio k (RC charging relation,
    # textbook circuit theory), plus a second output that depends on the supply.
    width = x["R1.tol"] * x["C1.tol"] * np.log(1.0 / (1.0 - x["ratio"]))
    return {"width": width, "level": x["supply"] * x["ratio"]}


class _Recorder:
    """Wraps a model and keeps every input and output it saw."""

    def __init__(self, model: object) -> None:
        self.model = model
        self.inputs: list[dict[str, FloatArray]] = []
        self.outputs: list[dict[str, FloatArray]] = []

    def __call__(self, x: Mapping[str, FloatArray]) -> Mapping[str, FloatArray]:
        out = self.model(x)  # type: ignore[operator]
        self.inputs.append({k: np.array(v) for k, v in x.items()})
        self.outputs.append({k: np.array(v) for k, v in out.items()})
        return out  # type: ignore[no-any-return]

    def all_inputs(self, key: str) -> FloatArray:
        return np.concatenate([o[key] for o in self.inputs])

    def all_outputs(self, key: str) -> FloatArray:
        return np.concatenate([o[key] for o in self.outputs])


def test_same_seed_is_bit_identical() -> None:
    kw = {"samples": 50_000, "seed": 42, "chunk": 8192, "windows": {"width": (0.1, 0.12)}}
    a = monte_carlo(_FACTORS, _model, **kw)  # type: ignore[arg-type]
    b = monte_carlo(_FACTORS, _model, **kw)  # type: ignore[arg-type]
    assert a == b
    assert repr(a) == repr(b)


def test_different_seed_is_statistically_consistent() -> None:
    a = monte_carlo(_FACTORS, _model, samples=40_000, seed=1).outputs["width"]
    b = monte_carlo(_FACTORS, _model, samples=40_000, seed=2).outputs["width"]
    assert a.mean != b.mean
    se = math.hypot(a.std, b.std) / math.sqrt(40_000)
    assert abs(a.mean - b.mean) < 5.0 * se


def test_factor_draws_do_not_depend_on_other_factors() -> None:
    # Each factor has its own stream keyed by its name (common random numbers).
    one = _Recorder(lambda x: {"y": x["R1.tol"]})
    monte_carlo(_FACTORS[:1], one, samples=1000, seed=9)
    two = _Recorder(lambda x: {"y": x["R1.tol"]})
    monte_carlo(list(reversed(_FACTORS)), two, samples=1000, seed=9)
    assert np.array_equal(one.all_inputs("R1.tol"), two.all_inputs("R1.tol"))


def test_mean_and_std_match_numpy_over_all_chunks() -> None:
    # Chan et al. chunk combination must reproduce numpy's two-pass statistics.
    rec = _Recorder(_model)
    res = monte_carlo(_FACTORS, rec, samples=100_003, seed=3, chunk=7_919)
    y = rec.all_outputs("width")
    assert len(y) == 100_003
    st_ = res.outputs["width"]
    assert st_.mean == pytest.approx(float(np.mean(y)), rel=1e-13)
    assert st_.std == pytest.approx(float(np.std(y, ddof=1)), rel=1e-10)
    assert (st_.minimum, st_.maximum) == (float(y.min()), float(y.max()))


def test_samples_stay_in_their_ranges_and_normal_is_truncated() -> None:
    rec = _Recorder(_model)
    monte_carlo(_FACTORS, rec, samples=200_000, seed=4)
    for f in _FACTORS:
        x = rec.all_inputs(f.name)
        assert f.low <= x.min() and x.max() <= f.high
    c = rec.all_inputs("C1.tol")
    # Truncated-normal σ (Johnson, Kotz & Balakrishnan moments; scipy.stats.truncnorm).
    expected = truncated_normal_std(0.05e-6, 3.0)
    assert float(np.std(c)) == pytest.approx(expected, rel=0.01)
    # Kolmogorov–Smirnov against scipy.stats.truncnorm: consistent at the 0.1 % level.
    z = (c - 1e-6) / (0.05e-6 / 3.0)
    assert scipy.stats.kstest(z, scipy.stats.truncnorm(-3.0, 3.0).cdf).pvalue > 1e-3


def test_monte_carlo_envelope_inside_worst_case() -> None:
    # The worst-case box encloses every sample of a model monotone in each factor.
    wc = worst_case(_FACTORS, _model)
    mc = monte_carlo(_FACTORS, _model, samples=300_000, seed=8)
    for key, ext in wc.items():
        assert ext.low <= mc.outputs[key].minimum <= mc.outputs[key].maximum <= ext.high


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_yield_of_linear_normal_output_matches_scipy_norm(seed: int) -> None:
    # y = 2 + 0.5·x with x normal, σ = 1, truncated at ±6σ (truncation removes 2e-9 of
    # the mass, negligible).  Expected yield from scipy.stats.norm.cdf.
    fs = [Factor("x", "x", 0.0, -6.0, 6.0, distribution="normal", sigmas=6.0)]
    window = (1.5, 2.75)  # x in [-1, 1.5]
    res = monte_carlo(
        fs, lambda x: {"y": 2.0 + 0.5 * x["x"]}, samples=100_000, seed=seed, windows={"y": window}
    )
    expected = scipy.stats.norm.cdf(1.5) - scipy.stats.norm.cdf(-1.0)
    lo, hi = res.yield_interval
    assert lo <= expected <= hi
    assert res.outputs["y"].within == res.yield_fraction


def test_yield_of_truncated_normal_matches_scipy_truncnorm() -> None:
    # Parent σ = 0.5, truncated at ±2σ = ±1; expected yield from scipy.stats.truncnorm.
    fs = [Factor("x", "x", 0.0, -1.0, 1.0, distribution="normal", sigmas=2.0)]
    res = monte_carlo(
        fs, lambda x: {"y": -x["x"]}, samples=100_000, seed=21, windows={"y": (-0.7, 0.2)}
    )  # x in [-0.2, 0.7]
    dist = scipy.stats.truncnorm(-2.0, 2.0, loc=0.0, scale=0.5)
    expected = dist.cdf(0.7) - dist.cdf(-0.2)
    lo, hi = res.yield_interval
    assert lo <= expected <= hi


def test_yield_interval_is_wilson() -> None:
    # Source: scipy.stats.binomtest(...).proportion_ci(method="wilson").
    res = monte_carlo(
        _FACTORS,
        _model,
        samples=20_000,
        seed=6,
        windows={"width": (0.105, 0.115), "level": (7.7, 8.3)},
    )
    ci = scipy.stats.binomtest(res.passed, res.samples).proportion_ci(method="wilson")
    assert res.yield_interval[0] == pytest.approx(ci.low, rel=1e-12)
    assert res.yield_interval[1] == pytest.approx(ci.high, rel=1e-12)
    assert res.yield_interval == wilson_interval(res.passed, res.samples)
    # Every-window pass count can not exceed any single window's count.
    for out in res.outputs.values():
        assert out.within is not None and res.passed <= round(out.within * res.samples)


def test_exact_percentiles_when_one_chunk() -> None:
    # Source: numpy.percentile (linear interpolation) of the very same samples.
    rec = _Recorder(_model)
    res = monte_carlo(_FACTORS, rec, samples=30_001, seed=12)
    y = rec.all_outputs("width")
    st_ = res.outputs["width"]
    assert st_.percentile_resolution == 0.0
    for p in PERCENTILES:
        assert st_.percentiles[p] == pytest.approx(float(np.percentile(y, p)), rel=1e-15)


def test_histogram_percentiles_within_documented_accuracy() -> None:
    rec = _Recorder(_model)
    res = monte_carlo(_FACTORS, rec, samples=200_000, seed=13, chunk=16_384)
    y = rec.all_outputs("width")
    st_ = res.outputs["width"]
    res_w = st_.percentile_resolution
    assert 0.0 < res_w <= 4.0 * (y.max() - y.min()) / 4096
    for p in PERCENTILES:
        assert abs(st_.percentiles[p] - float(np.percentile(y, p))) <= res_w


@settings(max_examples=15, deadline=None)
@given(st.integers(min_value=0, max_value=2**32), st.floats(min_value=-3.0, max_value=3.0))
def test_histogram_grows_in_both_directions(seed: int, skew: float) -> None:
    # Later chunks spread far wider than the first one, on both sides: the histogram
    # must widen and still give percentiles within its resolution of numpy.percentile.
    calls = [0]

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        calls[0] += 1
        return {"y": (x["u"] + skew) * 10.0 ** calls[0]}

    fs = [Factor("u", "u", 0.0, -1.0, 1.0)]
    rec = _Recorder(model)
    res = monte_carlo(fs, rec, samples=20_000, seed=seed, chunk=3_000)
    y = rec.all_outputs("y")
    st_ = res.outputs["y"]
    for p in PERCENTILES:
        assert abs(st_.percentiles[p] - float(np.percentile(y, p))) <= st_.percentile_resolution
    assert (st_.minimum, st_.maximum) == (float(y.min()), float(y.max()))


def test_non_finite_samples_fail_windows_and_are_counted() -> None:
    fs = [Factor("thr", "threshold ratio", 0.5, 0.0, 1.25)]

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        # Threshold at or above the rail is never reached: inf (RC charging relation).
        k = x["thr"]
        with np.errstate(divide="ignore", invalid="ignore"):
            t = np.where(k < 1.0, np.log(1.0 / (1.0 - np.minimum(k, 0.999))), np.inf)
        return {"t": t}

    rec = _Recorder(model)
    res = monte_carlo(
        fs, rec, samples=100_000, seed=14, chunk=30_000, windows={"t": (0.0, math.inf)}
    )
    y = rec.all_outputs("t")
    n_inf = int(np.isinf(y).sum())
    st_ = res.outputs["t"]
    assert st_.non_finite == n_inf > 0
    assert res.passed == len(y) - n_inf  # inf fails even an open-ended window
    assert st_.maximum == math.inf
    assert st_.percentiles[99.865] == math.inf  # 20 % of samples are infinite
    assert st_.mean == pytest.approx(float(np.mean(y[np.isfinite(y)])), rel=1e-12)
    assert st_.cpk is not None and st_.cpk > 0  # one-sided against the finite samples


def test_cpk_and_within_against_window() -> None:
    rec = _Recorder(_model)
    res = monte_carlo(_FACTORS, rec, samples=50_000, seed=15, windows={"width": (0.1, 0.12)})
    y = rec.all_outputs("width")
    st_ = res.outputs["width"]
    assert st_.within == pytest.approx(float(np.mean((y >= 0.1) & (y <= 0.12))), abs=0)
    # Cpk = min(USL − μ, μ − LSL)/(3σ) (ISO 22514-2 form).
    m, s = float(np.mean(y)), float(np.std(y, ddof=1))
    assert st_.cpk == pytest.approx(min(0.12 - m, m - 0.1) / (3 * s), rel=1e-9)
    assert res.outputs["level"].within is None and res.outputs["level"].cpk is None


def test_no_window_means_everything_passes() -> None:
    res = monte_carlo(_FACTORS, _model, samples=1000, seed=0)
    assert res.passed == 1000 and res.yield_fraction == 1.0


def test_progress_reports_every_chunk() -> None:
    seen: list[tuple[int, int]] = []
    monte_carlo(
        _FACTORS,
        _model,
        samples=10_000,
        seed=0,
        chunk=3_000,
        progress=lambda done, total: seen.append((done, total)),
    )
    assert seen == [(3000, 10_000), (6000, 10_000), (9000, 10_000), (10_000, 10_000)]


def test_constant_output_and_fixed_factor() -> None:
    fs = [*_FACTORS, Factor("k", "k", 3.0, 1.0, 5.0, distribution="fixed")]
    res = monte_carlo(
        fs, lambda x: {"k": x["k"]}, samples=5000, seed=0, chunk=1000, windows={"k": (3.0, 3.0)}
    )
    st_ = res.outputs["k"]
    assert (st_.mean, st_.std, st_.minimum, st_.maximum) == (3.0, 0.0, 3.0, 3.0)
    assert all(v == 3.0 for v in st_.percentiles.values())
    assert st_.cpk is None and res.yield_fraction == 1.0


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"samples": 0}, "samples"),
        ({"chunk": 0}, "chunk"),
        ({"seed": -1}, "seed"),
        ({"windows": {"nope": (0.0, 1.0)}}, "unknown outputs"),
        ({"windows": {"width": (1.0, 0.0)}}, "low <= high"),
    ],
)
def test_argument_errors(kwargs: dict[str, object], match: str) -> None:
    base: dict[str, object] = {"samples": 100, "seed": 0}
    base.update(kwargs)
    with pytest.raises(ValueError, match=match):
        monte_carlo(_FACTORS, _model, **base)  # type: ignore[arg-type]
