"""Tests of the extreme-value worst-case engine.

Reference checks: the corner result equals (and encloses) a dense sweep of the box for
models that are monotone in each factor (extreme-value analysis, common practice), and
the interior search finds the turning point of a parabolic temperature curve.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Mapping

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from timespec.analysis.factors import Factor, FloatArray
from timespec.analysis.worstcase import corner_label, worst_case


def _grid_sweep(
    factors: list[Factor], model: object, points: int
) -> dict[str, tuple[float, float]]:
    """Envelope of the model over a dense full-factorial grid (corners included)."""
    axes = [np.linspace(f.low, f.high, points) for f in factors]
    mesh = [m.ravel() for m in np.meshgrid(*axes, indexing="ij")]
    out = model({f.name: m for f, m in zip(factors, mesh, strict=True)})  # type: ignore[operator]
    return {k: (float(np.min(v)), float(np.max(v))) for k, v in out.items()}


def _random_sweep(
    factors: list[Factor], model: object, n: int, seed: int
) -> dict[str, tuple[float, float]]:
    rng = np.random.default_rng(seed)
    pts = {f.name: rng.uniform(f.low, f.high, n) for f in factors}
    out = model(pts)  # type: ignore[operator]
    return {k: (float(np.min(v)), float(np.max(v))) for k, v in out.items()}


# --- bilinear model -------------------------------------------------------------------


@settings(max_examples=40, deadline=None)
@given(
    st.lists(st.floats(min_value=-5, max_value=5), min_size=4, max_size=4),
    st.floats(min_value=-3, max_value=3),
    st.floats(min_value=0.01, max_value=3),
)
def test_bilinear_extremes_equal_grid_envelope(
    coef: list[float], centre: float, half: float
) -> None:
    # A bilinear function takes its extremes over a box at corners (it is linear along
    # every edge), so the corner result must equal a dense grid sweep that includes the
    # corners and enclose a random sweep (extreme-value analysis, common practice).
    a, b, c, d = coef
    fs = [
        Factor("x1", "x1", centre, centre - half, centre + half),
        Factor("x2", "x2", 0.0, -1.0, 2.0),
    ]

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        return {"y": a + b * x["x1"] + c * x["x2"] + d * x["x1"] * x["x2"]}

    wc = worst_case(fs, model)["y"]
    lo, hi = _grid_sweep(fs, model, 41)["y"]
    assert wc.low == pytest.approx(lo, rel=1e-12, abs=1e-12)
    assert wc.high == pytest.approx(hi, rel=1e-12, abs=1e-12)
    rlo, rhi = _random_sweep(fs, model, 2000, 7)["y"]
    assert wc.low <= rlo + 1e-12 and rhi <= wc.high + 1e-12


# --- monotone non-linear model: RC into a threshold -----------------------------------

_RC_FACTORS = [
    Factor("R1.tol", "R1 tolerance (±1 %)", 47e3, 47e3 * 0.99, 47e3 * 1.01, group="R1"),
    Factor("C1.tol", "C1 tolerance (±5 %)", 1e-6, 0.95e-6, 1.05e-6, group="C1"),
    Factor("supply", "supply 5 V ±10 %", 5.0, 4.5, 5.5, group="operating"),
    Factor("thr", "threshold 2.8 V to 3.8 V", 3.3, 2.8, 3.8, group="timer"),
]


def _rc_model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
    # Charge from 0 V toward the supply until the threshold: t = RC·ln(V/(V − Vth))
    # (RC charging relation, textbook circuit theory).  Monotone in every factor.
    v, vth = x["supply"], x["thr"]
    return {"delay": x["R1.tol"] * x["C1.tol"] * np.log(v / (v - vth)), "const": 0.0 * v}


def test_monotone_nonlinear_equals_grid_and_encloses_random_sweep() -> None:
    wc = worst_case(_RC_FACTORS, _rc_model)["delay"]
    lo, hi = _grid_sweep(_RC_FACTORS, _rc_model, 9)["delay"]
    assert wc.low == pytest.approx(lo, rel=1e-13)
    assert wc.high == pytest.approx(hi, rel=1e-13)
    rlo, rhi = _random_sweep(_RC_FACTORS, _rc_model, 200_000, 3)["delay"]
    assert wc.low <= rlo and rhi <= wc.high
    assert wc.low <= wc.nominal <= wc.high


def test_extreme_points_reproduce_the_extremes() -> None:
    wc = worst_case(_RC_FACTORS, _rc_model)["delay"]
    for at, value in ((wc.low_at, wc.low), (wc.high_at, wc.high)):
        out = _rc_model({k: np.array([v]) for k, v in at.items()})
        assert float(out["delay"][0]) == pytest.approx(value, rel=1e-14)
    # Longest delay: big R, big C, low supply, high threshold.
    assert wc.high_at == {"R1.tol": 47470.0, "C1.tol": 1.05e-6, "supply": 4.5, "thr": 3.8}
    assert corner_label(wc.high_at, _RC_FACTORS) == "R1 tol high, C1 tol high, supply low, thr high"


def test_output_independent_of_factors_sits_at_nominal() -> None:
    wc = worst_case(_RC_FACTORS, _rc_model)["const"]
    assert (wc.low, wc.nominal, wc.high) == (0.0, 0.0, 0.0)
    assert corner_label(wc.low_at, _RC_FACTORS) == "nominal"


# --- interior search: parabolic temperature curve ------------------------------------


def _fork_model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
    # Tuning-fork crystal: Δf/f = −0.034 ppm/°C² · (T − 25 °C)² (published crystal
    # application-note relation).  Its maximum (0 ppm at 25 °C) lies inside the range.
    ppm = -0.034 * (x["temp"] - 25.0) ** 2
    return {"ppm": ppm, "period_ppm": -ppm}


def test_interior_search_finds_the_turning_point_corners_miss() -> None:
    corners = [Factor("temp", "ambient", 20.0, -20.0, 70.0)]
    searched = [Factor("temp", "ambient", 20.0, -20.0, 70.0, monotone=False)]
    # Ends: −0.034·45² = −68.85 ppm on both sides.
    by_corners = worst_case(corners, _fork_model)
    assert by_corners["ppm"].low == pytest.approx(-68.85)
    assert by_corners["ppm"].high == pytest.approx(-0.85)  # only the nominal point
    assert by_corners["period_ppm"].low == pytest.approx(0.85)
    by_search = worst_case(searched, _fork_model, interior_points=9)
    assert by_search["ppm"].high == pytest.approx(0.0, abs=1e-12)
    assert by_search["ppm"].high_at == {"temp": 25.0}
    assert by_search["period_ppm"].low == pytest.approx(0.0, abs=1e-12)  # minimum found
    assert by_search["ppm"].low == pytest.approx(-68.85)
    assert corner_label(by_search["ppm"].high_at, searched) == "temp 25"


def test_interior_grid_brackets_dense_sweep() -> None:
    # With an odd grid the search is exact here; with an even grid it is bounded from
    # inside by a dense sweep (the grid points are a subset of the box).
    fs = [Factor("temp", "ambient", 20.0, -20.0, 70.0, monotone=False)]
    dense_lo, dense_hi = _grid_sweep(fs, _fork_model, 100_001)["ppm"]
    wc = worst_case(fs, _fork_model, interior_points=8)["ppm"]
    assert dense_lo <= wc.low and wc.high <= dense_hi
    assert wc.low == pytest.approx(dense_lo)


# --- non-finite outputs, limits, labels ----------------------------------------------


def test_infinite_output_propagates_to_high() -> None:
    fs = [Factor("thr", "threshold", 0.6, 0.5, 1.0)]

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        with np.errstate(divide="ignore"):
            return {"t": np.log(1.0 / (1.0 - x["thr"]))}  # threshold at the rail: never

    wc = worst_case(fs, model)["t"]
    assert wc.high == math.inf
    assert wc.high_at == {"thr": 1.0}
    assert wc.low == pytest.approx(math.log(2.0))


def test_nan_output_makes_both_extremes_nan() -> None:
    fs = [Factor("v", "v", 1.0, -1.0, 2.0)]

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        with np.errstate(invalid="ignore"):
            return {"y": np.sqrt(x["v"])}

    wc = worst_case(fs, model)["y"]
    assert math.isnan(wc.low) and math.isnan(wc.high)
    assert wc.low_at == {"v": -1.0}


def test_too_many_points_names_the_count() -> None:
    fs = [Factor(f"f{i}", "f", 0.0, -1.0, 1.0) for i in range(21)]
    with pytest.raises(ValueError, match="2097152"):
        worst_case(fs, lambda x: {"y": x["f0"]})


def test_many_corners_are_chunked_exactly() -> None:
    # 2^17 corners → several chunks; Σ (i+1)·x_i with x_i in [-1, 1] spans exactly
    # ±(1 + 2 + ... + 17) = ±153.
    fs = [Factor(f"f{i}", "f", 0.0, -1.0, 1.0) for i in range(17)]
    weights = np.arange(1.0, 18.0)

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        stacked = np.stack([x[f.name] for f in fs])
        return {"y": weights @ stacked}

    wc = worst_case(fs, model)
    assert wc["y"].low == -153.0 and wc["y"].high == 153.0
    assert all(v == 1.0 for v in wc["y"].high_at.values())


def test_fixed_factors_stay_nominal_and_are_not_reported() -> None:
    fs = [
        Factor("a", "a", 1.0, 0.0, 2.0),
        Factor("b", "b", 5.0, 0.0, 10.0, distribution="fixed"),
    ]
    seen: list[FloatArray] = []

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        seen.append(x["b"])
        return {"y": x["a"] + x["b"]}

    wc = worst_case(fs, model)["y"]
    assert (wc.low, wc.high) == (5.0, 7.0)
    assert set(wc.low_at) == {"a"}
    assert all(np.all(b == 5.0) for b in seen)


def test_interior_points_validation() -> None:
    with pytest.raises(ValueError, match="interior_points"):
        worst_case([Factor("a", "a", 0.0, -1.0, 1.0)], lambda x: {"y": x["a"]}, interior_points=1)


def test_corner_label_forms() -> None:
    fs = [
        Factor("R1.tol", "R1", 1.0, 0.99, 1.01),
        Factor("C1.tol", "C1", 1.0, 0.95, 1.05),
        Factor("temp", "T", 25.0, -10.0, 60.0, monotone=False),
        Factor("supply", "V", 12.0, 11.4, 12.6),
    ]
    at = {"R1.tol": 1.01, "C1.tol": 0.95, "temp": 60.0, "supply": 11.4}
    assert corner_label(at, fs) == "R1 tol high, C1 tol low, temp 60, supply low"


def test_full_factorial_count_with_mixed_factors() -> None:
    # 2 monotone factors × 5 interior points = 20 grid points, every one visited.
    fs = [
        Factor("a", "a", 0.0, 0.0, 1.0),
        Factor("b", "b", 0.0, 0.0, 1.0),
        Factor("t", "t", 0.0, 0.0, 4.0, monotone=False),
    ]
    visited: set[tuple[float, float, float]] = set()

    def model(x: Mapping[str, FloatArray]) -> dict[str, FloatArray]:
        visited.update(zip(x["a"], x["b"], x["t"], strict=True))
        return {"y": x["a"]}

    worst_case(fs, model, interior_points=5)
    grid = set(itertools.product([0.0, 1.0], [0.0, 1.0], [0.0, 1.0, 2.0, 3.0, 4.0]))
    assert grid <= visited and len(visited) == 20  # nominal (0,0,0) is a grid point


def test_declared_directions_give_the_same_extremes_with_fewer_points() -> None:
    # f = a·b + c over a box where f rises in a (b > 0) and falls in c: declaring that
    # must not change the extremes found by enumerating every corner.
    import dataclasses

    from timespec.analysis import Factor, worst_case

    calls: list[int] = []

    def model(x: dict[str, np.ndarray]) -> dict[str, np.ndarray]:
        calls.append(len(x["a"]))
        return {"f": x["a"] * x["b"] - x["c"] + x["d"] * x["e"]}

    facs = [
        Factor("a", "a", 1.0, 0.5, 2.0, rising=("f",)),
        Factor("b", "b", 1.0, 0.5, 3.0),
        Factor("c", "c", 0.0, -1.0, 1.0, falling=("f",)),
        Factor("d", "d", 0.0, -1.0, 1.0),
        Factor("e", "e", 0.0, -2.0, 2.0),
    ]
    fast = worst_case(facs, model)["f"]
    reduced = sum(calls)
    calls.clear()
    full = worst_case([dataclasses.replace(f, rising=(), falling=()) for f in facs], model)["f"]
    assert (fast.low, fast.high) == (full.low, full.high)
    assert reduced < sum(calls)
