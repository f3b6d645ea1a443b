"""The classic astable: ``RA`` and ``RB`` in series charge ``C``, ``RB`` discharges it.

The capacitor charges through ``RA + RB`` and discharges through ``RB`` into the
discharge pin, so the duty cycle ``(RA + RB)/(RA + 2·RB)`` is always above 50 %.
The circuit has no factors beyond the shared ones (parts, conditions, timer
class, leakage).  Here: its half-period model and its steps of the RA/RB search
(:data:`PAIR_SEARCH`, run by :func:`~timespec.families.astable.discharge.pair_options`):
``RB`` from the low time and ``RA + RB`` from the high time, with ``RA`` held at
its floor where the duty target is out of reach.
"""

from __future__ import annotations

import numpy as np

from timespec.families.astable.discharge import PairSearch
from timespec.families.astable.nominal import NominalRun, safe_ratio
from timespec.families.inputs import apply_part, drain_current
from timespec.families.protocol import FloatArray, Inputs
from timespec.physics import timerdelay

#: The node stray when the samples carry none (physics probes).
_NO_STRAY = np.zeros(1)

__all__ = ["PAIR_SEARCH", "STALL_CAUSE", "half_periods"]

#: What keeps the capacitor from a threshold when the circuit stalls.
STALL_CAUSE = "the drain (threshold current and leakage) through the resistors"


def half_periods(x: Inputs) -> tuple[FloatArray, FloatArray]:
    """High and low time before the timer's drift, from factor samples.

    Parameters
    ----------
    x
        Factor samples.

    Returns
    -------
    tuple of FloatArray
        ``(tH, tL)``, s: :func:`~timespec.physics.timerdelay.classic_delayed_times`
        (the laws of :func:`~timespec.physics.astable.classic_high_time` and
        :func:`~timespec.physics.astable.classic_low_time` with the timer's output
        delay ``timer.delay``); ``inf`` where a threshold is never reached.
    """
    c = apply_part(x, "C") + x.get("stray", _NO_STRAY)
    v = x["supply"]
    k = x["timer.ratio"]
    i = drain_current(x)
    ra = apply_part(x, "RA")
    rb = apply_part(x, "RB")
    ron = x["timer.ron"]
    td = x.get("timer.delay", _NO_STRAY)
    return timerdelay.classic_delayed_times(ra, rb, c, v, k, ron, i, td)


def _high_gain(run: NominalRun, probe: dict[str, FloatArray]) -> float:
    """``tH/((RA + RB)·C)`` at the probe."""
    return float(probe["high"][0]) / (2e5 * 1e-6)


def _solve(
    run: NominalRun,
    cs: FloatArray,
    th: float,
    tl: float,
    g_h: float,
    g_l: float,
    ra_low: float,
) -> tuple[FloatArray, FloatArray]:
    """Continuous (RA, RB) per capacitor: closed form, then two model corrections."""
    period = th + tl
    rb = tl / (cs * g_l)
    ra = th / (cs * g_h) - rb
    floor = ra < ra_low
    # classic cannot go below the duty of RA at its floor: keep the period instead
    rb = np.where(floor, (period / cs - ra_low * g_h) / (g_h + g_l), rb)
    ra = np.where(floor, ra_low, ra)
    for _ in range(2):
        out = run({"RA": ra, "RB": rb, "C": cs})
        s = (ra + rb) * safe_ratio(th, out["high"])
        rb_t = rb * safe_ratio(tl, out["low"])
        rb_p = rb * safe_ratio(period, out["period"])
        rb = np.where(floor, rb_p, rb_t)
        ra = np.where(floor, ra_low, s - rb)
    return ra, rb


def _rb_options(
    cs: FloatArray, th: float, tl: float, g_h: float, g_l: float, ra: float
) -> list[FloatArray]:
    """RB from the low time, from the high time, and from the period."""
    return [
        tl / (cs * g_l),
        th / (cs * g_h) - ra,
        ((th + tl) / cs - ra * g_h) / (g_h + g_l),
    ]


def _ra_options(
    cs: FloatArray, th: float, tl: float, g_h: float, g_l: float, rb: float
) -> list[FloatArray]:
    """RA from the high time and from the period."""
    return [th / (cs * g_h) - rb, ((th + tl) / cs - rb * (g_h + g_l)) / g_h]


#: The classic circuit's steps of the RA/RB search.
PAIR_SEARCH = PairSearch(
    high_gain=_high_gain, solve=_solve, rb_options=_rb_options, ra_options=_ra_options
)
