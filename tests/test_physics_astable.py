"""Tests of timespec.physics.astable: 555-type free-running oscillators.

Independent route: the actual resistor/diode/transistor network around the capacitor is
simulated with scipy's solve_ivp (source: numerical integration with scipy as an
independent route).  The discharge-pin voltage is found at every step from Kirchhoff's
current law at that pin (ra from the supply, rb to the capacitor, the transistor as a
conductance 1/r_on, an ideal constant-drop diode where fitted) rather than from the
Thevenin formula used by the closed forms.
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

from timespec.physics import astable
from timespec.physics.astable import (
    TYPICAL_DIODE_TC_MV_PER_K,
    TYPICAL_DIODE_V25,
    classic_high_time,
    classic_low_time,
    diode_forward_voltage,
    diode_high_time,
    diode_low_time,
    discharge_current,
    duty,
    feedback_high_time,
    feedback_low_time,
    frequency,
)

# ---------------------------------------------------------------------------------------
# The network, by Kirchhoff's current law (any circuit-theory handbook).


class Network:
    """ra: supply -> pin; rb: pin -> capacitor; optional diode pin -> capacitor."""

    def __init__(
        self,
        ra: float,
        rb: float,
        c: float,
        v: float,
        r_on: float,
        i_drain: float,
        v_diode: float | None = None,
    ) -> None:
        self.ra, self.rb, self.c, self.v = ra, rb, c, v
        self.r_on, self.i_drain, self.v_diode = r_on, i_drain, v_diode

    def capacitor_current(self, x: float, discharging: bool) -> float:
        g_a, g_b = 1.0 / self.ra, 1.0 / self.rb
        if discharging and self.r_on == 0.0:
            pin = 0.0  # ideal switch to ground
        else:
            g_on = 1.0 / self.r_on if discharging else 0.0
            pin = (self.v * g_a + x * g_b) / (g_a + g_b + g_on)  # KCL at the pin
        if self.v_diode is not None and pin - x > self.v_diode:
            # Diode conducts: it clamps the pin one drop above the capacitor, and all the
            # current through ra ends up in the capacitor node.
            return (self.v - (x + self.v_diode)) * g_a - self.i_drain
        return (pin - x) * g_b - self.i_drain

    def run_phase(self, x0: float, discharging: bool, v_stop: float, t_max: float) -> float:
        """Time from x0 until the capacitor reaches v_stop (inf if not within t_max)."""

        def rhs(t: float, y: np.ndarray) -> list[float]:
            return [self.capacitor_current(float(y[0]), discharging) / self.c]

        def hit(t: float, y: np.ndarray) -> float:
            return float(y[0]) - v_stop

        hit.terminal = True  # type: ignore[attr-defined]
        sol = solve_ivp(
            rhs, (0.0, t_max), [x0], method="DOP853", rtol=1e-11, atol=1e-12, events=hit
        )
        assert sol.status >= 0, sol.message
        return float(sol.t_events[0][0]) if sol.t_events[0].size else math.inf

    def run_cycles(self, k: float, cycles: int) -> list[tuple[float, float]]:
        """Free-running simulation from 0 V: returns (high, low) time of each cycle."""
        t_max = 200.0 * (self.ra + self.rb) * self.c
        lo, hi = k * self.v / 2.0, k * self.v
        # First charge from 0 V (power-up) up to the upper threshold.
        self.run_phase(0.0, False, hi, t_max)
        times = []
        for _ in range(cycles):
            t_low = self.run_phase(hi, True, lo, t_max)
            t_high = self.run_phase(lo, False, hi, t_max)
            times.append((t_high, t_low))
        return times


CLASSIC_CASES = list(
    itertools.product(
        [1e3, 33e3],  # ra
        [4.7e3, 150e3],  # rb
        [10e-9, 1e-6],  # c
        [(5.0, 2.0 / 3.0), (15.0, 0.6)],  # (V, k)
        [0.0, 15.0, 120.0],  # r_on
        [0.0, 1e-7],  # i_drain
    )
)


@pytest.mark.parametrize(("ra", "rb", "c", "vk", "r_on", "i_drain"), CLASSIC_CASES)
def test_classic_phases_match_network(
    ra: float, rb: float, c: float, vk: tuple[float, float], r_on: float, i_drain: float
) -> None:
    # Source: numerical integration with scipy as an independent route.
    v, k = vk
    net = Network(ra, rb, c, v, r_on, i_drain)
    t_max = 100.0 * (ra + rb) * c
    high_sim = net.run_phase(k * v / 2.0, False, k * v, t_max)
    low_sim = net.run_phase(k * v, True, k * v / 2.0, t_max)
    assert float(classic_high_time(ra, rb, c, v, k, i_drain)) == pytest.approx(high_sim, rel=1e-7)
    assert float(classic_low_time(ra, rb, c, v, k, r_on, i_drain)) == pytest.approx(
        low_sim, rel=1e-7
    )


@pytest.mark.parametrize(
    ("ra", "rb", "c", "v", "k", "r_on", "i_drain"),
    [
        (10e3, 68e3, 100e-9, 9.0, 2.0 / 3.0, 0.0, 0.0),
        (2.2e3, 10e3, 47e-9, 5.0, 0.64, 60.0, 2e-7),
        (1e3, 1e3, 1e-6, 12.0, 0.7, 25.0, 0.0),
    ],
)
def test_free_running_period(
    ra: float, rb: float, c: float, v: float, k: float, r_on: float, i_drain: float
) -> None:
    # Multi-cycle simulation from power-up; cycles after the first match the closed form.
    # Source: numerical integration with scipy as an independent route.
    net = Network(ra, rb, c, v, r_on, i_drain)
    cycles = net.run_cycles(k, 3)
    t_h = float(classic_high_time(ra, rb, c, v, k, i_drain))
    t_l = float(classic_low_time(ra, rb, c, v, k, r_on, i_drain))
    for high_sim, low_sim in cycles[1:]:
        assert high_sim + low_sim == pytest.approx(t_h + t_l, rel=1e-7)
        assert high_sim / (high_sim + low_sim) == pytest.approx(float(duty(t_h, t_l)), rel=1e-7)


DIODE_CASES = list(
    itertools.product(
        [4.7e3, 100e3],  # ra
        [2.2e3, 47e3, 1e6],  # rb: diode off throughout / drops out late / on throughout
        [(5.0, 2.0 / 3.0), (12.0, 0.6)],  # (V, k)
        [0.45, 0.7],  # v_diode
        [0.0, 1e-7],  # i_drain
    )
)


@pytest.mark.parametrize(("ra", "rb", "vk", "v_diode", "i_drain"), DIODE_CASES)
def test_diode_variant_matches_network(
    ra: float, rb: float, vk: tuple[float, float], v_diode: float, i_drain: float
) -> None:
    # Ideal diode with constant forward drop across rb (common-practice steering-diode
    # circuit).  Source: numerical integration with scipy as an independent route.
    v, k = vk
    c, r_on = 220e-9, 30.0
    net = Network(ra, rb, c, v, r_on, i_drain, v_diode=v_diode)
    t_max = 100.0 * (ra + rb) * c
    high_sim = net.run_phase(k * v / 2.0, False, k * v, t_max)
    low_sim = net.run_phase(k * v, True, k * v / 2.0, t_max)
    high = float(diode_high_time(ra, c, v, k, v_diode, i_drain, rb=rb))
    assert high == pytest.approx(high_sim, rel=1e-7)
    assert float(diode_low_time(ra, rb, c, v, k, r_on, i_drain)) == pytest.approx(low_sim, rel=1e-7)


def test_diode_high_time_plain_form() -> None:
    # Diode conducting throughout: RA*C*ln((V - Vd - kV/2)/(V - Vd - kV)) (first-order RC
    # charging law, any circuit-theory handbook); by hand for 10k, 1u, 5 V, 0.65 V:
    # 10e-3*ln((4.35 - 1.6667)/(4.35 - 3.3333)) = 10e-3*ln(2.6393) = 9.7052 ms.
    assert float(diode_high_time(10e3, 1e-6, 5.0, 2.0 / 3.0, 0.65)) == pytest.approx(
        9.7052e-3, rel=1e-4
    )
    # rb = inf (default) and a huge rb agree.
    assert diode_high_time(10e3, 1e-6, 5.0, 2.0 / 3.0, 0.65) == pytest.approx(
        diode_high_time(10e3, 1e-6, 5.0, 2.0 / 3.0, 0.65, rb=1e15)
    )


def rc_phase(r: float, c: float, v_out: float, i_drain: float, x0: float, v_stop: float) -> float:
    """Capacitor fed from an output at v_out through r (KCL at the capacitor node)."""

    def rhs(t: float, y: np.ndarray) -> list[float]:
        return [((v_out - float(y[0])) / r - i_drain) / c]

    def hit(t: float, y: np.ndarray) -> float:
        return float(y[0]) - v_stop

    hit.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(
        rhs, (0.0, 50 * r * c), [x0], method="DOP853", rtol=1e-11, atol=1e-12, events=hit
    )
    return float(sol.t_events[0][0]) if sol.t_events[0].size else math.inf


@pytest.mark.parametrize(("v_high", "v_low"), [(5.0, 0.0), (4.8, 0.1), (11.5, 0.3)])
def test_feedback_variant_matches_simulation(v_high: float, v_low: float) -> None:
    # One resistor from the output to the capacitor (CMOS timer).
    # Source: numerical integration with scipy as an independent route.
    r, c, k, i_drain = 82e3, 33e-9, 2.0 / 3.0, 5e-8
    v = 12.0 if v_high > 6.0 else 5.0
    lo, hi = k * v / 2.0, k * v
    high_sim = rc_phase(r, c, v_high, i_drain, lo, hi)
    low_sim = rc_phase(r, c, v_low, i_drain, hi, lo)
    assert float(feedback_high_time(r, c, v_high, v, k, i_drain)) == pytest.approx(
        high_sim, rel=1e-7
    )
    assert float(feedback_low_time(r, c, v_low, v, k, i_drain)) == pytest.approx(low_sim, rel=1e-7)


def test_feedback_nominal_is_square_wave() -> None:
    # Rail-to-rail output, thresholds 1/3 and 2/3: both halves R*C*ln 2 (common practice).
    r, c = 10e3, 1e-6
    assert float(feedback_high_time(r, c, 5.0, 5.0, 2.0 / 3.0)) == pytest.approx(
        r * c * math.log(2)
    )
    assert float(feedback_low_time(r, c, 0.0, 5.0, 2.0 / 3.0)) == pytest.approx(r * c * math.log(2))


def test_classic_rules_of_thumb() -> None:
    # Common practice: f = 1.44/((RA + 2RB)*C) (precisely 1/ln 2 = 1.4427) and
    # duty = (RA + RB)/(RA + 2RB) at k = 2/3 with an ideal discharge switch.
    ra, rb, c, v = 4.7e3, 22e3, 100e-9, 9.0
    t_h = classic_high_time(ra, rb, c, v, 2.0 / 3.0)
    t_l = classic_low_time(ra, rb, c, v, 2.0 / 3.0)
    assert float(frequency(t_h, t_l)) == pytest.approx(1.443 / ((ra + 2 * rb) * c), rel=5e-4)
    assert float(frequency(t_h, t_l)) == pytest.approx(1.44 / ((ra + 2 * rb) * c), rel=3e-3)
    assert float(duty(t_h, t_l)) == pytest.approx((ra + rb) / (ra + 2 * rb), rel=1e-12)
    # High time (RA + RB)*C*ln 2, low time RB*C*ln 2 (common practice).
    assert float(t_h) == pytest.approx((ra + rb) * c * math.log(2.0))
    assert float(t_l) == pytest.approx(rb * c * math.log(2.0))


def test_low_time_with_saturation_voltage_form() -> None:
    # With RA >> r_on the discharge pin sits near a fixed Vsat and the low time tends to
    # RB*C*ln((2/3 V - Vsat)/(1/3 V - Vsat)) (textbook 555 form with saturation).
    ra, rb, c, v, r_on = 1e6, 10e3, 1e-6, 5.0, 100.0
    v_sat = v * r_on / (ra + r_on)
    expected = rb * c * math.log((2 * v / 3 - v_sat) / (v / 3 - v_sat))
    assert float(classic_low_time(ra, rb, c, v, 2.0 / 3.0, r_on)) == pytest.approx(
        expected, rel=2e-2
    )


def test_diode_forward_voltage_and_discharge_current() -> None:
    # Silicon diode about 0.65 V at 25 degC, about -2 mV/K (common practice):
    # at 85 degC 0.65 - 0.002*60 = 0.53 V, at -40 degC 0.65 + 0.13 = 0.78 V (by hand).
    assert float(
        diode_forward_voltage(TYPICAL_DIODE_V25, TYPICAL_DIODE_TC_MV_PER_K, 85.0)
    ) == pytest.approx(0.53)
    assert float(diode_forward_voltage(0.65, -2.0, -40.0)) == pytest.approx(0.78)
    assert 0.6 <= TYPICAL_DIODE_V25 <= 0.7
    # Ohm's law: 12 V across 1k -> 12 mA.
    assert float(discharge_current(12.0, 1e3)) == pytest.approx(12e-3)


# ---------------------------------------------------------------------------------------
# Properties (hypothesis).

resistance = st.floats(min_value=1e3, max_value=1e6)
capacitance = st.floats(min_value=1e-10, max_value=1e-4)
scale = st.floats(min_value=1e-2, max_value=1e2)
ratio = st.floats(min_value=0.5, max_value=0.8)
supply = st.floats(min_value=3.0, max_value=15.0)
r_on_values = st.floats(min_value=0.0, max_value=100.0)
drain = st.floats(min_value=0.0, max_value=1e-7)


@given(resistance, resistance, capacitance, supply, ratio, r_on_values, drain, scale)
def test_times_scale(
    ra: float, rb: float, c: float, v: float, k: float, r_on: float, i_drain: float, s: float
) -> None:
    # Scaling C by s scales both halves by s; scaling every resistance by s (drain by 1/s)
    # likewise, since every node voltage is unchanged.
    t_h = classic_high_time(ra, rb, c, v, k, i_drain)
    t_l = classic_low_time(ra, rb, c, v, k, r_on, i_drain)
    assume(np.isfinite(t_h) and np.isfinite(t_l))
    np.testing.assert_allclose(classic_high_time(ra, rb, s * c, v, k, i_drain), s * t_h, rtol=1e-12)
    np.testing.assert_allclose(
        classic_low_time(ra, rb, s * c, v, k, r_on, i_drain), s * t_l, rtol=1e-12
    )
    np.testing.assert_allclose(
        classic_high_time(s * ra, s * rb, c, v, k, i_drain / s), s * t_h, rtol=1e-8
    )
    np.testing.assert_allclose(
        classic_low_time(s * ra, s * rb, c, v, k, s * r_on, i_drain / s), s * t_l, rtol=1e-8
    )


@given(st.floats(1e-9, 1e3), st.floats(1e-9, 1e3))
def test_frequency_times_period_is_one(t_h: float, t_l: float) -> None:
    assert float(frequency(t_h, t_l)) * (t_h + t_l) == pytest.approx(1.0, rel=1e-14)
    assert 0.0 < float(duty(t_h, t_l)) < 1.0


@given(resistance, resistance, capacitance, supply)
def test_classic_duty_above_half(ra: float, rb: float, c: float, v: float) -> None:
    # The classic circuit cannot go below 50 % duty with an ideal switch (common practice).
    t_h = classic_high_time(ra, rb, c, v, 2.0 / 3.0)
    t_l = classic_low_time(ra, rb, c, v, 2.0 / 3.0)
    assert float(duty(t_h, t_l)) > 0.5


def test_infinite_half_period_gives_zero_frequency() -> None:
    # 1 uA through 2 Mohm: the node settles at 5 - 2 = 3 V, below 2/3*5 V -> no oscillation.
    t_h = classic_high_time(1e6, 1e6, 1e-6, 5.0, 2.0 / 3.0, 1e-6)
    assert np.isinf(t_h)
    assert float(frequency(t_h, 1e-3)) == 0.0


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
    check_docstrings(astable)
