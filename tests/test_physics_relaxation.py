"""Tests of timespec.physics.relaxation: the Schmitt-inverter RC oscillator.

Independent route: scipy's solve_ivp integrates the capacitor node equation
C dv/dt = (v_out - v)/R - i_drain, and a free-running simulation keeps the Schmitt
input's hysteresis state (output high until the input rises through VT+, low until it
falls through VT-), starting from a discharged capacitor (source: numerical integration
with scipy as an independent route).
"""

from __future__ import annotations

import inspect
import itertools
import math
from types import ModuleType

import numpy as np
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from timespec.physics import relaxation
from timespec.physics.relaxation import duty, frequency, high_time, low_time, period


def rc_phase(
    r: float, c: float, v_out: float, i_drain: float, x0: float, v_stop: float
) -> tuple[float, float]:
    """Integrate from x0 until v_stop; return (elapsed time or inf, final voltage)."""

    def rhs(t: float, y: np.ndarray) -> list[float]:
        # Kirchhoff's current law at the input node (any circuit-theory handbook).
        return [((v_out - float(y[0])) / r - i_drain) / c]

    def hit(t: float, y: np.ndarray) -> float:
        return float(y[0]) - v_stop

    hit.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(
        rhs, (0.0, 60 * r * c), [x0], method="DOP853", rtol=1e-11, atol=1e-12, events=hit
    )
    assert sol.status >= 0, sol.message
    if sol.t_events[0].size:
        return float(sol.t_events[0][0]), float(sol.y_events[0][0][0])
    return math.inf, float(sol.y[0, -1])


def free_run(
    r: float,
    c: float,
    v_high: float,
    v_low: float,
    vt_plus: float,
    vt_minus: float,
    i_drain: float,
    edges: int,
) -> list[float]:
    """Times of the output's rising edges, from power-up with the capacitor at 0 V."""
    t, x = 0.0, 0.0
    output_high = True  # input below VT- at power-up: the inverter output is high
    rising: list[float] = []
    while len(rising) < edges:
        if output_high:
            dt, x = rc_phase(r, c, v_high, i_drain, x, vt_plus)
        else:
            dt, x = rc_phase(r, c, v_low, i_drain, x, vt_minus)
        assert math.isfinite(dt)
        t += dt
        output_high = not output_high  # hysteresis: the state flips only at a threshold
        if output_high:
            rising.append(t)
    return rising


PHASE_CASES = list(
    itertools.product(
        [4.7e3, 1e6],  # R
        [100e-12, 2.2e-6],  # C
        [(5.0, 2.6, 1.7), (3.3, 2.3, 0.66), (4.5, 1.71, 0.9)],  # (V, VT+, VT-)
        [0.0, 0.12],  # v_low
        [0.0, 4e-7, -4e-7],  # i_drain (input leakage either way)
    )
)


@pytest.mark.parametrize(("r", "c", "levels", "v_low", "i_drain"), PHASE_CASES)
def test_phases_match_ode(
    r: float, c: float, levels: tuple[float, float, float], v_low: float, i_drain: float
) -> None:
    # Source: numerical integration with scipy as an independent route.
    v, vt_p, vt_m = levels
    high_sim, _ = rc_phase(r, c, v, i_drain, vt_m, vt_p)
    low_sim, _ = rc_phase(r, c, v_low, i_drain, vt_p, vt_m)
    for closed, numeric in (
        (float(high_time(r, c, v, vt_p, vt_m, i_drain)), high_sim),
        (float(low_time(r, c, v_low, vt_p, vt_m, i_drain)), low_sim),
    ):
        if math.isinf(numeric):
            assert math.isinf(closed)
        else:
            assert closed == pytest.approx(numeric, rel=1e-7)


@pytest.mark.parametrize(
    ("r", "c", "v", "vt_p", "vt_m", "v_low", "i_drain"),
    [
        (10e3, 10e-9, 5.0, 2.6, 1.7, 0.0, 0.0),
        (220e3, 1e-6, 3.3, 2.0, 1.1, 0.05, 1e-7),
        (47e3, 470e-12, 12.0, 7.2, 3.4, 0.2, -2e-7),
    ],
)
def test_free_running_oscillator(
    r: float, c: float, v: float, vt_p: float, vt_m: float, v_low: float, i_drain: float
) -> None:
    # Multi-cycle simulation with hysteresis state; the period is measured after the
    # first cycle (which starts from 0 V).
    # Source: numerical integration with scipy as an independent route.
    edges = free_run(r, c, v, v_low, vt_p, vt_m, i_drain, 4)
    periods = np.diff(edges)
    expected = float(period(r, c, v, vt_p, vt_m, v_low, i_drain))
    np.testing.assert_allclose(periods, expected, rtol=1e-7)
    assert float(frequency(r, c, v, vt_p, vt_m, v_low, i_drain)) == pytest.approx(1.0 / periods[-1])
    # The first rising edge comes later: the first charge starts at 0 V, not at VT-.
    assert edges[0] > expected


def test_period_formula_by_hand() -> None:
    # T = R*C*[ln(VT+/VT-) + ln((V - VT-)/(V - VT+))] (first-order RC charging law, any
    # circuit-theory handbook).  By hand at V = 5, VT+ = 2.6, VT- = 1.7:
    # ln(1.52941) + ln(1.375) = 0.424883 + 0.318454 = 0.743337.
    r, c = 33e3, 4.7e-9
    assert float(period(r, c, 5.0, 2.6, 1.7)) == pytest.approx(0.743337 * r * c, rel=1e-6)
    assert float(low_time(r, c, 0.0, 2.6, 1.7)) == pytest.approx(r * c * math.log(2.6 / 1.7))
    assert float(high_time(r, c, 5.0, 2.6, 1.7)) == pytest.approx(r * c * math.log(3.3 / 2.4))


def test_symmetric_thresholds_give_half_duty() -> None:
    # Thresholds symmetric about V/2 with rail-to-rail output: both halves equal.
    assert float(duty(10e3, 1e-9, 5.0, 3.0, 2.0)) == pytest.approx(0.5, rel=1e-12)


def test_no_oscillation() -> None:
    # 10 uA of leakage through 1 Mohm shifts the target by 10 V: with the output high the
    # input settles at 5 - 10 = -5 V, VT+ is never reached and the period is infinite.
    assert np.isinf(period(1e6, 1e-9, 5.0, 2.6, 1.7, 0.0, 10e-6))
    assert float(frequency(1e6, 1e-9, 5.0, 2.6, 1.7, 0.0, 10e-6)) == 0.0


# ---------------------------------------------------------------------------------------
# Properties (hypothesis).

resistance = st.floats(min_value=1e3, max_value=1e7)
capacitance = st.floats(min_value=1e-11, max_value=1e-4)
supply = st.floats(min_value=2.0, max_value=15.0)
scale = st.floats(min_value=1e-2, max_value=1e2)
upper = st.floats(min_value=0.5, max_value=0.85)
lower = st.floats(min_value=0.1, max_value=0.45)


@given(resistance, capacitance, supply, upper, lower, scale)
def test_period_scales(r: float, c: float, v: float, up: float, lo: float, s: float) -> None:
    # T is proportional to C and to R (first-order RC charging law).
    base = period(r, c, v, up * v, lo * v)
    np.testing.assert_allclose(period(r, s * c, v, up * v, lo * v), s * base, rtol=1e-12)
    np.testing.assert_allclose(period(s * r, c, v, up * v, lo * v), s * base, rtol=1e-12)


@given(resistance, capacitance, supply, upper, lower)
def test_period_monotonic_in_thresholds(r: float, c: float, v: float, up: float, lo: float) -> None:
    # Wider hysteresis, longer period: T grows with VT+ and shrinks as VT- rises.
    base = period(r, c, v, up * v, lo * v)
    assume(np.isfinite(base))
    assert period(r, c, v, (up + 0.01) * v, lo * v) > base
    assert period(r, c, v, up * v, (lo + 0.01) * v) < base


@given(resistance, capacitance, supply, upper, lower)
def test_frequency_times_period(r: float, c: float, v: float, up: float, lo: float) -> None:
    f = frequency(r, c, v, up * v, lo * v)
    t = period(r, c, v, up * v, lo * v)
    assert float(f * t) == pytest.approx(1.0, rel=1e-14)
    assert 0.0 < float(duty(r, c, v, up * v, lo * v)) < 1.0


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
    check_docstrings(relaxation)
