"""Astable half-periods with the timer's output delay, against a delayed comparator.

Reference: scipy ``solve_ivp`` of the timing node phase by phase, the comparator
switching the output (and the discharge transistor) ``t_pd`` after each threshold
crossing; the discharge pin is solved as a node (Kirchhoff's current law), the
diode with the diode equation (Shockley) through ``brentq``.  Several cycles are
run from an arbitrary start, and the last ones compared (the steady cycle).
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from timespec.physics import timerdelay
from timespec.physics.astable import (
    classic_high_time,
    classic_low_time,
    diode_equation_high_time,
    diode_high_time,
)

Rhs = Callable[[float], float]  # capacitor current / C as a function of v


def _steady(charge: Rhs, discharge: Rhs, lo: float, hi: float, td: float) -> tuple[float, float]:
    v, high, low = 0.5 * (lo + hi), math.nan, math.nan
    for n in range(10):
        up = n % 2 == 0
        rhs = charge if up else discharge
        target = hi if up else lo

        def hit(_t: float, y: np.ndarray, target: float = target) -> float:
            return float(y[0] - target)

        hit.terminal = True  # type: ignore[attr-defined]
        sol = solve_ivp(
            lambda _t, y, rhs=rhs: [rhs(float(y[0]))],
            (0.0, 1.0),
            [v],
            events=hit,
            rtol=1e-12,
            atol=1e-14,
            method="DOP853",
        )
        t_cross = float(sol.t_events[0][0]) if sol.t_events[0].size else 0.0
        v = float(sol.y_events[0][0][0]) if sol.t_events[0].size else v
        if td > 0:
            run = solve_ivp(
                lambda _t, y, rhs=rhs: [rhs(float(y[0]))],
                (0.0, td),
                [v],
                rtol=1e-12,
                atol=1e-14,
                method="DOP853",
            )
            v = float(run.y[0, -1])
        if up:
            high = t_cross + td
        else:
            low = t_cross + td
    return high, low


V, K, I_DRAIN = 9.0, 0.66, 0.2e-6
LO, HI = K * V / 2, K * V


def _discharge_pin(ra: float, rb: float, ron: float) -> Callable[[float], float]:
    """Current into the capacitor while discharging: nodal solution at the discharge pin."""

    def into_cap(v: float) -> float:
        # (V − vp)/RA + (v − vp)/RB = vp/ron, solved with numpy
        g = np.array([[1 / ra + 1 / rb + 1 / ron]])
        vp = float(np.linalg.solve(g, np.array([V / ra + v / rb]))[0])
        return (vp - v) / rb

    return into_cap


@pytest.mark.parametrize("td", [0.0, 0.3e-6, 2e-6])
def test_classic_with_delay_matches_delayed_comparator(td: float) -> None:
    ra, rb, c, ron = 10e3, 4.7e3, 1e-9, 60.0
    dis = _discharge_pin(ra, rb, ron)
    high, low = _steady(
        lambda v: ((V - v) / (ra + rb) - I_DRAIN) / c, lambda v: (dis(v) - I_DRAIN) / c, LO, HI, td
    )
    th, tl = timerdelay.classic_delayed_times(ra, rb, c, V, K, ron, I_DRAIN, td)
    assert float(th) == pytest.approx(high, rel=1e-7)
    assert float(tl) == pytest.approx(low, rel=1e-7)
    if td == 0.0:  # no delay: the plain laws
        assert float(th) == pytest.approx(
            float(classic_high_time(ra, rb, c, V, K, I_DRAIN)), rel=1e-12
        )
        assert float(tl) == pytest.approx(
            float(classic_low_time(ra, rb, c, V, K, ron, I_DRAIN)), rel=1e-12
        )
    else:  # each half is longer by at least the delay
        assert float(th) > float(classic_high_time(ra, rb, c, V, K, I_DRAIN)) + td


@pytest.mark.parametrize("td", [0.3e-6, 2e-6])
def test_feedback_with_delay_matches_delayed_comparator(td: float) -> None:
    r_h, r_l, c, vh, vl = 10e3 + 200.0, 10e3 + 80.0, 1e-9, V - 0.05, 0.03
    high, low = _steady(
        lambda v: ((vh - v) / r_h - I_DRAIN) / c,
        lambda v: ((vl - v) / r_l - I_DRAIN) / c,
        LO,
        HI,
        td,
    )
    th, tl = timerdelay.feedback_delayed_times(r_h, r_l, c, vh, vl, V, K, I_DRAIN, td)
    assert float(th) == pytest.approx(high, rel=1e-7)
    assert float(tl) == pytest.approx(low, rel=1e-7)


@pytest.mark.parametrize(("rb", "td"), [(4.7e3, 2e-6), (1e6, 2e-6), (330.0, 1e-6), (4.7e3, 0.0)])
def test_constant_drop_diode_with_delay_matches_delayed_comparator(rb: float, td: float) -> None:
    ra, c, ron, vd = 10e3, 1e-9, 60.0, 0.6
    dis = _discharge_pin(ra, rb, ron)

    def charge(v: float) -> float:  # diode on below v_x, RA + RB above (constant drop)
        return (max((V - vd - v) / ra, (V - v) / (ra + rb)) - I_DRAIN) / c

    high, low = _steady(charge, lambda v: (dis(v) - I_DRAIN) / c, LO, HI, td)
    th, tl = timerdelay.diode_delayed_times(ra, rb, c, V, K, vd, ron, I_DRAIN, td)
    assert float(th) == pytest.approx(high, rel=1e-7)
    assert float(tl) == pytest.approx(low, rel=1e-7)
    if td == 0.0:
        assert float(th) == pytest.approx(
            float(diode_high_time(ra, c, V, K, vd, I_DRAIN, rb)), rel=1e-12
        )


@pytest.mark.parametrize(("ra", "td"), [(10e3, 2e-6), (200e3, 20e-6), (10e3, 0.0)])
def test_diode_equation_with_delay_matches_delayed_comparator(ra: float, td: float) -> None:
    rb, c, ron = 47e3, 1e-9, 60.0
    i_s, nvt = 3e-9, 1.9 * 0.025852
    dis = _discharge_pin(ra, rb, ron)

    def charge(v: float) -> float:
        # V − v = vd + RA·(Is·(exp(vd/nVt) − 1) + vd/RB), solved for vd
        def f(vd: float) -> float:
            return vd + ra * (i_s * math.expm1(vd / nvt) + vd / rb) - (V - v)

        vd = brentq(f, 0.0, V - v, xtol=1e-15, rtol=1e-14) if V - v > 0 else 0.0
        return ((V - v - vd) / ra - I_DRAIN) / c

    high, low = _steady(charge, lambda v: (dis(v) - I_DRAIN) / c, LO, HI, td)
    th, tl = timerdelay.diode_equation_delayed_times(ra, rb, c, V, K, i_s, nvt, ron, I_DRAIN, td)
    assert float(th) == pytest.approx(high, rel=2e-7)
    assert float(tl) == pytest.approx(low, rel=2e-7)
    if td == 0.0:
        ref = diode_equation_high_time(ra, c, V, K, i_s, nvt, I_DRAIN, rb)
        assert float(th) == pytest.approx(float(ref), rel=1e-12)


def test_a_fast_astable_notes_the_timer_delay_share() -> None:
    # common practice: at 100 kHz a few hundred ns per edge is several per cent of the
    # period; at 10 Hz it is nothing
    import timespec
    from timespec.design.solver import solve_block

    def codes(freq: str) -> set[str]:
        spec = timespec.parse(
            "defaults:\n  supply 5 V ±5%\n  timer cmos\n"
            "  resistors E96 1%, 1k to 1M\n  capacitors E12 5% C0G, 100p to 100n\n"
            f"astable a:\n  frequency {freq} ±15%\n",
            "t.tspec",
        )
        res = solve_block(spec.blocks[0])
        assert res.best is not None
        return {f.code for f in res.best.findings}

    assert "timer-delay-share" in codes("100 kHz")
    assert "timer-delay-share" not in codes("100 Hz")
