"""The steering-diode astable with the diode equation, end to end.

The drop of a small-signal silicon diode follows its current: about 0.4 V at
10–20 µA and 0.6–0.7 V at 1–10 mA (diode equation I = Is·(exp(V/(n·Vt)) − 1)
with Is 2–5 nA, n 1.8–2: handbook relation, class values from memory).  The
constant 0.55–0.75 V band is only right in the upper range.
"""

from __future__ import annotations

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

import timespec
from timespec.design.solver import solve_block

HEAD = (
    "astable tick:\n  frequency 10 Hz ±10%\n  duty 25% ±5%\n  supply 5 V ±5%\n"
    "  ambient 0 degC to 50 degC\n  timer cmos\n  circuit diode\n"
    "  resistors E96 1% 100 ppm/K, 1k to 1M\n  capacitors E12 2% PP, 10n to 1u\n"
)
# The parts the constant-drop model chose for this block before.
OLD_PARTS = "  use RA 93k1 1% 100 ppm/K, RB 402k 1% 100 ppm/K, C 270n PP 2%\n"

K_Q = 1.380649e-23 / 1.602176634e-19  # Boltzmann constant over the elementary charge, CODATA


def _high_time_ode(ra: float, rb: float, c: float, v: float, i_s: float, n: float) -> float:
    """Charge from V/3 to 2V/3 through RA and the diode (RB in parallel), by solve_ivp."""
    vt = K_Q * 298.15 * n

    def current(vc: float) -> float:
        # node between RA and the diode: (V − vd − vc)/RA = Is(e^(vd/nVt) − 1) + vd/RB
        def f(vd: float) -> float:
            return (v - vd - vc) / ra - i_s * np.expm1(vd / vt) - vd / rb

        vd = brentq(f, 0.0, v - vc)
        return (v - vd - vc) / ra

    def rhs(t: float, y: np.ndarray) -> list[float]:
        return [current(float(y[0])) / c]

    def hit(t: float, y: np.ndarray) -> float:
        return float(y[0]) - 2.0 * v / 3.0

    hit.terminal = True  # type: ignore[attr-defined]
    sol = solve_ivp(rhs, (0.0, 10.0), [v / 3.0], events=hit, rtol=1e-10, atol=1e-12)
    return float(sol.t_events[0][0])


def test_old_constant_drop_parts_now_fail_their_upper_frequency() -> None:
    # With the real drop (~0.4 V at the ~10–30 µA these parts pass) the high time
    # is shorter than the constant 0.55–0.75 V model said, so the frequency rises.
    res = solve_block(timespec.parse(HEAD + OLD_PARTS).blocks[0])
    assert res.best is not None
    (f,) = [o for o in res.best.outputs if o.name == "frequency"]
    assert f.high > 11.0
    assert res.verdict == "fails"


def test_worst_case_high_time_contains_the_ode_at_nominal_parts() -> None:
    res = solve_block(timespec.parse(HEAD + OLD_PARTS).blocks[0])
    assert res.best is not None
    (h,) = [o for o in res.best.outputs if o.name == "high"]
    # Nominal parts at 25 °C and 5 V, the diode class's corners; k = 2/3 ideal,
    # no drain.  The exact ODE must lie inside the reported worst-case window.
    for i_s in (2e-9, 5e-9):
        for n in (1.8, 2.0):
            t = _high_time_ode(93.1e3, 402e3, 270e-9, 5.0, i_s, n)
            assert h.low <= t <= h.high


def test_solver_picks_parts_that_meet_with_the_true_drop() -> None:
    res = solve_block(timespec.parse(HEAD).blocks[0])
    assert res.verdict == "meets"
    assert res.best is not None
    assert "diode-current-range" not in {f.code for f in res.best.findings}


def test_stated_drop_keeps_the_constant_drop_model() -> None:
    res = solve_block(timespec.parse(HEAD + OLD_PARTS + "  diode 0.55 V to 0.75 V\n").blocks[0])
    assert res.best is not None
    names = {f.name for f in res.factors}
    assert "diode.v25" in names and "diode.is" not in names


def test_current_far_below_the_equation_range_is_reported() -> None:
    # 1 MΩ from 5 V: the charge current falls to about 1 µA and below.
    text = HEAD.replace("frequency 10 Hz ±10%", "frequency 1 Hz ±50%").replace(
        "duty 25% ±5%", "duty 20% to 60%"
    ) + "  use RA 1M 1%, RB 1M 1%, C 1u PP 2%\n"
    res = solve_block(timespec.parse(text).blocks[0])
    assert res.best is not None
    codes = [f.code for f in res.best.findings]
    assert "diode-current-range" in codes
