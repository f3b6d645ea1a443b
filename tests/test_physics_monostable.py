"""Tests of timespec.physics.monostable: the 555-type one-shot.

Independent route: the circuit is simulated with scipy's solve_ivp (source: numerical
integration with scipy as an independent route).  Idle phase: the discharge transistor
(a resistor r_on) and the timing resistor R both act on the capacitor, integrated from
0 V until settled; pulse phase: the transistor releases and the capacitor charges through
R until a terminal event at the threshold.
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

from timespec.physics import monostable
from timespec.physics.monostable import (
    discharge_on_resistance,
    max_drain_resistance,
    recovery_time,
    start_voltage,
    width,
    width_control,
)


def integrate(
    dvdt: Callable[[float, float], float], v0: float, t_max: float, v_th: float | None = None
) -> tuple[float, float]:
    """Integrate dv/dt from v0; return (crossing time or inf, final voltage)."""

    def rhs(t: float, y: np.ndarray) -> list[float]:
        return [dvdt(t, float(y[0]))]

    events = None
    if v_th is not None:
        level = v_th

        def hit(t: float, y: np.ndarray) -> float:
            return float(y[0]) - level

        hit.terminal = True  # type: ignore[attr-defined]
        events = hit
    sol = solve_ivp(rhs, (0.0, t_max), [v0], method="DOP853", rtol=1e-11, atol=1e-12, events=events)
    assert sol.status >= 0, sol.message
    crossed = v_th is not None and sol.t_events[0].size > 0
    t_cross = float(sol.t_events[0][0]) if crossed else math.inf
    return t_cross, float(sol.y[0, -1])


def simulate_one_shot(
    r: float, c: float, v: float, v_th: float, r_on: float, i_drain: float
) -> tuple[float, float]:
    """Return (idle capacitor voltage, pulse width) of the simulated circuit."""
    # Kirchhoff's current law at the capacitor node (any circuit-theory handbook).
    if r_on > 0.0:
        g_on = 1.0 / r_on
        tau_idle = c / (1.0 / r + g_on)
        _, v_idle = integrate(
            lambda _t, x: ((v - x) / r - x * g_on - i_drain) / c, 0.0, 60 * tau_idle
        )
    else:
        v_idle = 0.0  # an ideal switch shorts the capacitor
    width_sim, _ = integrate(lambda _t, x: ((v - x) / r - i_drain) / c, v_idle, 60 * r * c, v_th)
    return v_idle, width_sim


CASES = list(
    itertools.product(
        [10e3, 1e6],  # R
        [10e-9, 10e-6],  # C
        [5.0, 15.0],  # V
        [0.62, 2.0 / 3.0],  # k
        [0.0, 18.0, 110.0],  # r_on
        [0.0, 2.5e-7],  # i_drain
    )
)


@pytest.mark.parametrize(("r", "c", "v", "k", "r_on", "i_drain"), CASES)
def test_width_matches_circuit_simulation(
    r: float, c: float, v: float, k: float, r_on: float, i_drain: float
) -> None:
    # Source: numerical integration with scipy as an independent route.
    v_idle, width_sim = simulate_one_shot(r, c, v, k * v, r_on, i_drain)
    assert float(start_voltage(v, r, r_on, i_drain)) == pytest.approx(v_idle, rel=1e-8, abs=1e-11)
    assert float(width(r, c, v, k, r_on, i_drain)) == pytest.approx(width_sim, rel=1e-7)


@pytest.mark.parametrize(("v_control", "r_on"), [(2.0, 0.0), (3.9, 25.0), (11.0, 60.0)])
def test_width_control_matches_simulation(v_control: float, r_on: float) -> None:
    # Source: numerical integration with scipy as an independent route.
    r, c, v, i_drain = 100e3, 220e-9, 12.0, 1e-7
    _, width_sim = simulate_one_shot(r, c, v, v_control, r_on, i_drain)
    assert float(width_control(r, c, v, v_control, r_on, i_drain)) == pytest.approx(
        width_sim, rel=1e-7
    )


def test_ln3_law() -> None:
    # 555-type timer datasheets (generic device class) / common practice:
    # t = 1.1*R*C, precisely R*C*ln 3 = 1.0986*R*C at the 2/3 threshold from 0 V.
    r, c = 47e3, 3.3e-6
    assert float(width(r, c, 9.0, 2.0 / 3.0)) == pytest.approx(1.0986 * r * c, rel=1e-4)
    assert float(width(r, c, 9.0, 2.0 / 3.0)) == pytest.approx(1.1 * r * c, rel=2e-3)


def test_control_pin_law() -> None:
    # Control pin at Vc: t = R*C*ln(V/(V - Vc)) (first-order RC charging law, any
    # circuit-theory handbook; control-pin use per 555-type timer datasheets).
    r, c, v, vc = 22e3, 1e-6, 12.0, 9.0
    assert float(width_control(r, c, v, vc)) == pytest.approx(r * c * math.log(v / (v - vc)))
    # Forcing Vc = 2/3 V reproduces the free-running width.
    assert width_control(r, c, v, 8.0) == pytest.approx(width(r, c, v, 2.0 / 3.0))


def test_saturation_figure_to_on_resistance() -> None:
    # 555-type timer datasheets (generic device class): bipolar discharge saturation
    # about 0.2 V max at 4.5 mA (5 V supply) -> r_on = 0.2/4.5e-3 = 44.4 ohm (by hand).
    assert float(discharge_on_resistance(0.2, 4.5e-3)) == pytest.approx(44.444, rel=1e-4)
    # Divider by hand: 5 V * 44.44/(10k + 44.44) = 22.12 mV.
    assert float(start_voltage(5.0, 10e3, 44.444)) == pytest.approx(0.022124, rel=1e-4)


def test_recovery_time() -> None:
    # Discharge from 2/3 V to 1 % of V through r_on: r_on*C*ln(66.7) (first-order RC
    # discharge law; the 1 % settle criterion is this library's definition).
    c, r_on, v = 1e-6, 20.0, 5.0
    expected = r_on * c * math.log((2.0 / 3.0) / 0.01)
    assert float(recovery_time(c, r_on, v, 2.0 / 3.0)) == pytest.approx(expected)
    t_sim, _ = integrate(lambda _t, x: -x / (r_on * c), 2.0 / 3.0 * v, 40 * r_on * c, 0.01 * v)
    # Source: numerical integration with scipy as an independent route.
    assert float(recovery_time(c, r_on, v, 2.0 / 3.0)) == pytest.approx(t_sim, rel=1e-7)
    assert float(recovery_time(c, r_on, v, 0.5, 0.6)) == 0.0
    assert float(recovery_time(c, 0.0, v, 2.0 / 3.0)) == 0.0


def test_max_drain_resistance() -> None:
    # 555-type timer datasheets (generic device class): bipolar threshold current
    # 0.25 uA max limits R to about 20 Mohm at 15 V: 15*(1/3)/0.25e-6 = 20 Mohm (by hand),
    # and about 6.7 Mohm at 5 V.
    assert float(max_drain_resistance(15.0, 2.0 / 3.0, 0.25e-6)) == pytest.approx(20e6)
    assert float(max_drain_resistance(5.0, 2.0 / 3.0, 0.25e-6)) == pytest.approx(6.667e6, rel=1e-3)
    assert np.isinf(max_drain_resistance(5.0, 2.0 / 3.0, 0.0))
    assert np.isinf(max_drain_resistance(5.0, 2.0 / 3.0, -1e-9))
    r_max = float(max_drain_resistance(5.0, 2.0 / 3.0, 0.25e-6))
    assert np.isfinite(width(0.99 * r_max, 1e-6, 5.0, 2.0 / 3.0, 0.0, 0.25e-6))
    assert np.isinf(width(1.01 * r_max, 1e-6, 5.0, 2.0 / 3.0, 0.0, 0.25e-6))
    # The simulated circuit agrees: just above R_max the threshold is never crossed.
    # Source: numerical integration with scipy as an independent route.
    _, w_sim = simulate_one_shot(1.01 * r_max, 1e-6, 5.0, 5.0 * 2.0 / 3.0, 0.0, 0.25e-6)
    assert math.isinf(w_sim)


# ---------------------------------------------------------------------------------------
# Properties (hypothesis).

resistance = st.floats(min_value=1e3, max_value=1e7)
capacitance = st.floats(min_value=1e-10, max_value=1e-3)
scale = st.floats(min_value=1e-2, max_value=1e2)
ratio = st.floats(min_value=0.4, max_value=0.85)
supply = st.floats(min_value=2.0, max_value=16.0)
r_on_values = st.floats(min_value=0.0, max_value=200.0)
drain = st.floats(min_value=0.0, max_value=2e-7)


@given(resistance, capacitance, supply, ratio, r_on_values, drain, scale)
def test_width_scales_with_c_and_r(
    r: float, c: float, v: float, k: float, r_on: float, i_drain: float, s: float
) -> None:
    # Scaling C by s scales the width by s; so does scaling R, r_on by s and the drain
    # by 1/s (every voltage in the circuit is unchanged).
    base = width(r, c, v, k, r_on, i_drain)
    assume(np.isfinite(base))
    np.testing.assert_allclose(width(r, s * c, v, k, r_on, i_drain), s * base, rtol=1e-12)
    np.testing.assert_allclose(width(s * r, c, v, k, s * r_on, i_drain / s), s * base, rtol=1e-8)


@given(resistance, capacitance, supply, ratio, r_on_values, drain)
def test_width_monotonic(
    r: float, c: float, v: float, k: float, r_on: float, i_drain: float
) -> None:
    # A higher threshold and a larger drain lengthen the pulse (the drain pulls the
    # node toward ground, slowing the charge); a larger r_on raises the start voltage
    # and shortens it.
    base = width(r, c, v, k, r_on, i_drain)
    assume(np.isfinite(base))
    assert width(r, c, v, k + 0.01, r_on, i_drain) > base
    assert width(r, c, v, k, r_on, i_drain + 1e-8) > base
    assert width(r, c, v, k, r_on + 5.0, i_drain) < base


def test_vectorised() -> None:
    out = width(np.array([1e3, 1e4, 1e5]), 1e-6, 5.0, np.array([[0.6], [2.0 / 3.0]]))
    assert out.shape == (2, 3)
    assert out.dtype == np.float64
    assert isinstance(start_voltage(5.0, 1e3, 0.0), np.ndarray)


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
    check_docstrings(monostable)
