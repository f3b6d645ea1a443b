"""The steering-diode astable with the diode equation, against the outside world.

Checks: the high time against ``scipy.integrate.solve_ivp`` of the full nonlinear
circuit ODE (RA, the diode equation, RB in parallel, a constant drain, C), with
the diode voltage found at every step by ``scipy.optimize.brentq``; the
saturation-current temperature law against the usual -2 mV/K of a silicon
junction (common practice); the class's drops against the reference sheet's
figures (≈ 0.4 V at 10–20 µA, 0.6–0.7 V at 1–10 mA; from memory, see
timespec/parts/diodes.py).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from timespec.parts.diodes import SMALL_SIGNAL, diode_class
from timespec.physics import astable


def _ode_high_time(
    ra: float, rb: float, c: float, v: float, k: float, is_t: float, nvt: float, i: float
) -> float:
    """High time by direct integration of the circuit ODE (scipy solve_ivp, brentq)."""
    lo, hi = k * v / 2.0, k * v

    def drop(vc: float) -> float:
        u = v - vc

        def f(vd: float) -> float:
            return vd + ra * (is_t * math.expm1(vd / nvt) + vd / rb) - u

        return brentq(f, 0.0, u, xtol=1e-15, rtol=1e-15)

    def rhs(_t: float, y: np.ndarray) -> list[float]:
        vc = float(y[0])
        return [((v - vc - drop(vc)) / ra - i) / c]

    def reach(_t: float, y: np.ndarray) -> float:
        return float(y[0]) - hi

    reach.terminal = True  # type: ignore[attr-defined]
    t_end = 50.0 * ra * c
    sol = solve_ivp(rhs, (0.0, t_end), [lo], events=reach, rtol=1e-11, atol=1e-13 * v)
    return float(sol.t_events[0][0])


CASES = [
    # ra, rb, c, v, k, is25, n, temp, drain: the demo's ~10–30 µA point, a low
    # supply, a strong RB share, a cold and a hot junction, a mA-level charge
    (93.1e3, 402e3, 270e-9, 5.0, 2 / 3, 3.5e-9, 1.9, 25.0, 1e-9),
    (93.1e3, np.inf, 270e-9, 4.75, 0.68, 5e-9, 1.8, 50.0, 0.0),
    (50e3, 20e3, 10e-9, 5.0, 2 / 3, 2e-9, 2.0, 0.0, 0.0),
    (1e6, 1e6, 1e-9, 3.0, 0.65, 2e-9, 2.0, -40.0, 50e-9),
    (2e3, 10e3, 1e-6, 15.0, 2 / 3, 5e-9, 1.8, 85.0, 1e-6),
    (200e3, np.inf, 1e-7, 2.0, 0.68, 2e-9, 2.0, -20.0, 1e-9),
]


@pytest.mark.parametrize(("ra", "rb", "c", "v", "k", "is25", "n", "temp", "i"), CASES)
def test_high_time_matches_ode(
    ra: float, rb: float, c: float, v: float, k: float, is25: float, n: float, temp: float, i: float
) -> None:
    # source: scipy.integrate.solve_ivp of C·dv/dt = (V − v − vd)/RA − i with the
    # diode equation and RB at the node, diode voltage by scipy.optimize.brentq
    is_t = float(astable.diode_saturation_current(is25, n, temp))
    nvt = n * float(astable.thermal_voltage(temp))
    got = float(astable.diode_equation_high_time(ra, c, v, k, is_t, nvt, i, rb))
    want = _ode_high_time(ra, rb, c, v, k, is_t, nvt, i)
    assert got == pytest.approx(want, rel=2e-7)


def test_high_time_stalls_to_inf() -> None:
    # the node at kV needs more current than RA can give: never reaches the threshold
    is_t, nvt = 3e-9, 1.9 * 0.0257
    t = astable.diode_equation_high_time(1e6, 1e-9, 5.0, 2 / 3, is_t, nvt, 2e-6, np.inf)
    assert np.isinf(t)


def test_vectorised_batch_matches_scalars() -> None:
    ra = np.array([1e4, 1e5, 1e6])
    rb = np.array([np.inf, 1e5, 3e5])
    t = astable.diode_equation_high_time(ra, 1e-8, 5.0, 2 / 3, 3e-9, 0.049, 1e-9, rb)
    for j in range(3):
        one = astable.diode_equation_high_time(ra[j], 1e-8, 5.0, 2 / 3, 3e-9, 0.049, 1e-9, rb[j])
        assert t[j] == pytest.approx(float(one), rel=1e-12)


def _drop(i: float, is25: float, n: float, temp: float) -> float:
    is_t = float(astable.diode_saturation_current(is25, n, temp))
    return n * float(astable.thermal_voltage(temp)) * math.log1p(i / is_t)


def test_class_drops_match_reference_figures() -> None:
    # from memory (reference sheet): ≈ 0.4 V at 10–20 µA, 0.6–0.7 V at 1–10 mA, 25 °C
    lo_is, hi_is = SMALL_SIGNAL.is_band
    lo_n, hi_n = SMALL_SIGNAL.n_band
    at_15u = [_drop(15e-6, s, n, 25.0) for s in (lo_is, hi_is) for n in (lo_n, hi_n)]
    assert min(at_15u) > 0.35 and max(at_15u) < 0.46
    # at 1 mA the class band covers the typical 0.6–0.65 V and stays inside the
    # common-practice 0.55–0.75 V band of the constant-drop model
    at_1m = [_drop(1e-3, s, n, 25.0) for s in (lo_is, hi_is) for n in (lo_n, hi_n)]
    assert 0.55 < min(at_1m) < 0.6 and 0.65 < max(at_1m) < 0.75


def test_temperature_coefficient_is_about_minus_2_mv_per_k() -> None:
    # common practice: a silicon junction's drop falls about 2 mV/K at fixed current
    # (more at small currents); the Is(T) law with Eg 1.11 eV, XTI 3 gives it
    for i in (20e-6, 1e-3):
        tc = (_drop(i, 3.5e-9, 1.9, 35.0) - _drop(i, 3.5e-9, 1.9, 15.0)) / 20.0
        assert -2.8e-3 < tc < -1.6e-3


def test_thermal_voltage_at_25_c() -> None:
    # CODATA 2018: k/q = 8.617333e-5 V/K, so Vt(298.15 K) = 25.693 mV
    assert float(astable.thermal_voltage(25.0)) == pytest.approx(0.025693, rel=1e-4)


def test_class_lookup_and_held_range() -> None:
    d = diode_class("Small-Signal")
    assert d is SMALL_SIGNAL
    assert d.held.contains(20e-6)
    assert not d.held.contains(0.5e-6)
