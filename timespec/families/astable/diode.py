"""The steering-diode astable: the classic parts with a diode across ``RB``.

The capacitor charges through ``RA`` alone (toward the supply less the diode
drop) and discharges through ``RB``, so any duty cycle is possible.  The diode
drop is a band at 25 °C (:data:`DIODE_DROP_BAND`, or ``diode 0.55 V to 0.75 V``
in the block) plus a tempco (:data:`DIODE_TC_BAND`), so the high time depends on
supply and temperature; both are modelled.  Here: those constants and factors,
the half-period model, and the circuit's steps of the RA/RB search
(:data:`PAIR_SEARCH`, run by :func:`~timespec.families.astable.discharge.pair_options`):
``RA`` from the high time and ``RB`` from the low time, independently.
"""

from __future__ import annotations

import numpy as np

from timespec.analysis import Factor
from timespec.families.astable.discharge import PairSearch
from timespec.families.astable.nominal import NominalRun, safe_ratio
from timespec.families.inputs import apply_part, drain_current
from timespec.families.protocol import FloatArray, Inputs
from timespec.model import Block
from timespec.physics import astable

__all__ = [
    "DIODE_DROP_BAND",
    "DIODE_TC_BAND",
    "PAIR_SEARCH",
    "STALL_CAUSE",
    "drop_band",
    "drop_factors",
    "half_periods",
]

#: Default forward-drop band of the steering diode at 25 °C, V: a small-signal
#: silicon diode between about 0.1 mA and a few mA (common practice).
DIODE_DROP_BAND: tuple[float, float] = (0.55, 0.75)

#: Band of the diode drop's temperature coefficient, mV/K: about −2 mV/K for a
#: silicon junction (common practice), spread ±20 % with current (from memory).
DIODE_TC_BAND: tuple[float, float] = (-2.4, -1.6)

#: What keeps the capacitor from a threshold when the circuit stalls.
STALL_CAUSE = "the supply less the diode drop, or the drain through the resistors,"


def drop_band(block: Block) -> tuple[float, float]:
    """The diode's forward-drop band at 25 °C.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    tuple of float
        ``(low, high)``, V: the block's ``diode`` window, else
        :data:`DIODE_DROP_BAND`.
    """
    w = block.window("diode")
    if w is None:
        return DIODE_DROP_BAND
    return (w.low, w.high)


def drop_factors(block: Block) -> list[Factor]:
    """The diode drop as varying inputs.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    list of Factor
        ``diode.v25`` (drop at 25 °C, V, over :func:`drop_band`) and ``diode.tc``
        (mV/K, over :data:`DIODE_TC_BAND`).
    """
    lo, hi = drop_band(block)
    tc_lo, tc_hi = DIODE_TC_BAND
    return [
        Factor(
            "diode.v25",
            f"diode drop at 25 °C ({lo:g}…{hi:g} V)",
            0.5 * (lo + hi),
            lo,
            hi,
            group="diode",
        ),
        Factor(
            "diode.tc",
            f"diode drop tempco ({tc_lo:g}…{tc_hi:g} mV/K)",
            0.5 * (tc_lo + tc_hi),
            tc_lo,
            tc_hi,
            group="diode",
        ),
    ]


def half_periods(x: Inputs) -> tuple[FloatArray, FloatArray]:
    """High and low time before the timer's drift, from factor samples.

    Parameters
    ----------
    x
        Factor samples.

    Returns
    -------
    tuple of FloatArray
        ``(tH, tL)``, s: the drop ``V25 + tc·(T − 25)`` into
        :func:`~timespec.physics.astable.diode_high_time` (with the tail where the
        diode stops conducting) and
        :func:`~timespec.physics.astable.classic_low_time`; ``inf`` where a
        threshold is never reached.
    """
    c = apply_part(x, "C")
    v = x["supply"]
    k = x["timer.ratio"]
    i = drain_current(x)
    ra = apply_part(x, "RA")
    rb = apply_part(x, "RB")
    ron = x["timer.ron"]
    vd = astable.diode_forward_voltage(x["diode.v25"], x["diode.tc"], x["temp"])
    th = astable.diode_high_time(ra, c, v, k, vd, i, rb)
    tl = astable.classic_low_time(ra, rb, c, v, k, ron, i)
    return th, tl


def _high_gain(run: NominalRun, probe: dict[str, FloatArray]) -> float:
    """``tH/(RA·C)`` at a probe of its own, with RB too large to carry any charge."""
    probe_a = run({"RA": np.array([1e5]), "RB": np.array([1e12]), "C": np.array([1e-6])})
    return float(probe_a["high"][0]) / (1e5 * 1e-6)


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
    rb = tl / (cs * g_l)
    ra = th / (cs * g_h)
    for _ in range(2):
        out = run({"RA": ra, "RB": rb, "C": cs})
        ra = ra * safe_ratio(th, out["high"])
        rb = rb * safe_ratio(tl, out["low"])
    return ra, rb


def _rb_options(
    cs: FloatArray, th: float, tl: float, g_h: float, g_l: float, ra: float
) -> list[FloatArray]:
    """RB from the low time (the diode takes RB out of the high time)."""
    return [tl / (cs * g_l)]


def _ra_options(
    cs: FloatArray, th: float, tl: float, g_h: float, g_l: float, rb: float
) -> list[FloatArray]:
    """RA from the high time."""
    return [th / (cs * g_h)]


#: The diode circuit's steps of the RA/RB search.
PAIR_SEARCH = PairSearch(
    high_gain=_high_gain, solve=_solve, rb_options=_rb_options, ra_options=_ra_options
)
