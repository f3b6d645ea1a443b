"""Tests of timespec.physics.rcdelay: RC charging into a threshold.

Checked against the world by a second route: the node equation
C dv/dt = (v_target - v)/R - i_drain integrated numerically with scipy's solve_ivp
(source: numerical integration with scipy as an independent route), stopped by a
terminal event at the threshold crossing.
"""

from __future__ import annotations

import inspect
import itertools
import math
from collections.abc import Callable
from types import ModuleType

import numpy as np
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from timespec.physics import rcdelay
from timespec.physics.rcdelay import charge_time, delay, effective_target, threshold_from_time

# ---------------------------------------------------------------------------------------
# Independent route: integrate the node equation and catch the threshold crossing.


def ode_crossing_time(
    dvdt: Callable[[float, float], float], v0: float, v_th: float, t_max: float
) -> float:
    """Integrate dv/dt from v0 and return the first time v crosses v_th (inf if none)."""

    def rhs(t: float, y: np.ndarray) -> list[float]:
        return [dvdt(t, float(y[0]))]

    def hit(t: float, y: np.ndarray) -> float:
        return float(y[0]) - v_th

    hit.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(rhs, (0.0, t_max), [v0], method="DOP853", rtol=1e-11, atol=1e-12, events=hit)
    assert sol.status >= 0, sol.message
    return float(sol.t_events[0][0]) if sol.t_events[0].size else math.inf


def rc_node(r: float, c: float, v_target: float, i_drain: float) -> Callable[[float, float], float]:
    """Kirchhoff's current law at the capacitor node (any circuit-theory handbook)."""
    return lambda _t, v: ((v_target - v) / r - i_drain) / c


RESISTORS = [1e3, 47e3, 2.2e6]
CAPACITORS = [1e-9, 4.7e-6]
# (v_target, v_start, v_threshold): charge up, part-charged start, discharge down,
# threshold above the target (never), moving away from the threshold (never).
LEVELS = [
    (5.0, 0.0, 3.3),
    (12.0, 2.0, 8.0),
    (3.3, 0.3, 1.9),
    (0.0, 5.0, 1.2),
    (1.0, 9.0, 4.0),
    (5.0, 0.0, 5.5),
    (5.0, 2.0, 1.0),
]
DRAINS = [0.0, 3e-7, -2e-7]


@pytest.mark.parametrize(
    ("r", "c", "levels", "i_drain"),
    list(itertools.product(RESISTORS, CAPACITORS, LEVELS, DRAINS)),
)
def test_charge_time_matches_ode(
    r: float, c: float, levels: tuple[float, float, float], i_drain: float
) -> None:
    # Source: numerical integration with scipy as an independent route.
    v_target, v_start, v_th = levels
    closed = float(charge_time(r, c, v_target, v_start, v_th, i_drain))
    numeric = ode_crossing_time(rc_node(r, c, v_target, i_drain), v_start, v_th, 60.0 * r * c)
    if math.isinf(numeric):
        assert math.isinf(closed)
    else:
        assert closed == pytest.approx(numeric, rel=1e-7)


def test_drain_makes_threshold_unreachable() -> None:
    # 2.2 Mohm with 1 uA drain settles at 5 - 2.2 = 2.8 V < 3.3 V: never reached
    # (first-order RC charging law, any circuit-theory handbook), also per the ODE.
    assert np.isinf(charge_time(2.2e6, 1e-6, 5.0, 0.0, 3.3, 1e-6))
    numeric = ode_crossing_time(rc_node(2.2e6, 1e-6, 5.0, 1e-6), 0.0, 3.3, 100.0)
    assert math.isinf(numeric)


def test_nominal_values_by_hand() -> None:
    # First-order RC charging law, any circuit-theory handbook:
    # 0 -> 63.2 % of the supply takes one time constant; 0 -> 50 % takes RC*ln 2.
    tau = 10e3 * 1e-6
    assert float(delay(10e3, 1e-6, 5.0, 1.0 - math.exp(-1.0))) == pytest.approx(tau, rel=1e-12)
    assert float(delay(10e3, 1e-6, 5.0, 0.5)) == pytest.approx(tau * math.log(2.0), rel=1e-12)
    # Discharge from 5 V to 5/e V toward ground: one time constant.
    assert float(charge_time(10e3, 1e-6, 0.0, 5.0, 5.0 / math.e)) == pytest.approx(tau)


def test_edge_cases() -> None:
    assert float(charge_time(1e3, 1e-6, 5.0, 2.0, 2.0)) == 0.0  # threshold at the start
    assert np.isinf(charge_time(1e3, 1e-6, 5.0, 0.0, 5.0))  # only approached asymptotically
    assert np.isnan(charge_time(np.nan, 1e-6, 5.0, 0.0, 3.0))
    assert np.isnan(charge_time(1e3, 1e-6, 5.0, 0.0, np.nan))
    assert float(effective_target(5.0, 1e6, 1e-6)) == pytest.approx(4.0)


def test_returns_float64_arrays_and_broadcasts() -> None:
    scalar = charge_time(1e3, 1e-6, 5.0, 0.0, 3.0)
    assert isinstance(scalar, np.ndarray)
    assert scalar.dtype == np.float64
    assert scalar.shape == ()
    grid = delay(np.array([1e3, 2e3, 4e3])[:, None], np.array([1e-9, 1e-6]), 5.0, 0.6)
    assert grid.shape == (3, 2)
    assert grid.dtype == np.float64
    np.testing.assert_allclose(grid[1] / grid[0], 2.0)
    mixed = charge_time(1e3, 1e-6, 5.0, 0.0, np.array([2.0, 6.0, 0.0]))
    assert mixed[0] > 0.0
    assert np.isinf(mixed[1])
    assert mixed[2] == 0.0
    assert threshold_from_time(np.inf, 1e3, 1e-6, 5.0, 0.0, 1e-3) == pytest.approx(4.0)


# ---------------------------------------------------------------------------------------
# Properties (hypothesis).

resistance = st.floats(min_value=10.0, max_value=1e7)
capacitance = st.floats(min_value=1e-12, max_value=1e-2)
scale = st.floats(min_value=1e-3, max_value=1e3)
ratio = st.floats(min_value=0.05, max_value=0.95)
supply = st.floats(min_value=1.0, max_value=30.0)


@given(resistance, capacitance, supply, ratio, scale)
def test_time_scales_with_capacitance(r: float, c: float, v: float, k: float, s: float) -> None:
    # t is proportional to C (first-order RC charging law).
    t1 = delay(r, c, v, k)
    t2 = delay(r, s * c, v, k)
    np.testing.assert_allclose(t2, s * t1, rtol=1e-12)


@given(resistance, capacitance, supply, ratio, scale, st.floats(-1e-6, 1e-6))
def test_time_scales_with_resistance(
    r: float, c: float, v: float, k: float, s: float, i_drain: float
) -> None:
    # R -> sR with i_drain -> i_drain/s keeps the Thevenin target and scales t by s.
    t1 = delay(r, c, v, k, 0.0, i_drain)
    t2 = delay(s * r, c, v, k, 0.0, i_drain / s)
    np.testing.assert_allclose(t2, s * t1, rtol=1e-9)


@given(resistance, capacitance, supply, ratio, st.floats(0.0, 0.04))
def test_inverse_round_trip(r: float, c: float, v: float, k: float, k0: float) -> None:
    # threshold_from_time(charge_time(...)) returns the threshold.
    t = charge_time(r, c, v, k0 * v, k * v)
    back = threshold_from_time(t, r, c, v, k0 * v)
    np.testing.assert_allclose(back, k * v, rtol=1e-9, atol=1e-12 * v)


@given(resistance, capacitance, supply, ratio, st.floats(0.0, 1e-6))
def test_delay_grows_with_threshold_and_drain(
    r: float, c: float, v: float, k: float, i_drain: float
) -> None:
    # Monotonicity: a higher threshold or a larger drain can only lengthen the delay.
    assume(np.isfinite(delay(r, c, v, k, 0.0, i_drain)))
    assert delay(r, c, v, k + 0.01, 0.0, i_drain) > delay(r, c, v, k, 0.0, i_drain)
    assert delay(r, c, v, k, 0.0, i_drain + 1e-7) > delay(r, c, v, k, 0.0, i_drain)


# ---------------------------------------------------------------------------------------
# Documentation: every public parameter is documented with formula and source.


def check_docstrings(module: ModuleType) -> None:
    for name in module.__all__:
        obj = getattr(module, name)
        if not callable(obj):
            continue
        doc = inspect.getdoc(obj) or ""
        for section in ("Parameters", "Returns", "Notes", "References"):
            assert f"\n{section}\n" in doc, f"{name}: no {section} section"
        for param in inspect.signature(obj).parameters.values():
            prefix = "*" if param.kind is param.VAR_POSITIONAL else ""
            assert f"\n{prefix}{param.name} : " in doc, f"{name}: {param.name} undocumented"


def test_docstrings_complete() -> None:
    check_docstrings(rcdelay)
