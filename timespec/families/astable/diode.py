"""The steering-diode astable: the classic parts with a diode across ``RB``.

The capacitor charges through ``RA`` alone (toward the supply less the diode
drop) and discharges through ``RB``, so any duty cycle is possible.  The diode
follows the diode equation of a generic small-signal silicon class
(:data:`~timespec.parts.diodes.SMALL_SIGNAL`: saturation current and emission
coefficient as bands, the usual temperature law of the saturation current), so
its drop follows the current the chosen ``RA`` actually passes over the charge
(about 0.4 V at 10–20 µA, 0.6–0.7 V at a few mA).  A block that states the drop
(``diode 0.55 V to 0.75 V``) gets the constant-drop model with that band and a
tempco (:data:`DIODE_TC_BAND`) instead; the band is then the user's promise.
Here: those constants and factors, the half-period model, and the circuit's
steps of the RA/RB search (:data:`PAIR_SEARCH`, run by
:func:`~timespec.families.astable.discharge.pair_options`): ``RA`` from the high
time and ``RB`` from the low time, independently.
"""

from __future__ import annotations

import math

import numpy as np

from timespec.analysis import Factor
from timespec.families.assumptions import Stretch, assumption_findings
from timespec.families.astable.discharge import PairSearch
from timespec.families.astable.nominal import NominalRun, safe_ratio
from timespec.families.inputs import apply_part, drain_current
from timespec.families.protocol import Finding, FloatArray, Inputs
from timespec.model import Block
from timespec.parts.diodes import SMALL_SIGNAL, DiodeClass
from timespec.parts.part import Design
from timespec.physics import astable, timerdelay

#: The node stray when the samples carry none (physics probes).
_NO_STRAY = np.zeros(1)

__all__ = [
    "DIODE_DROP_BAND",
    "DIODE_TC_BAND",
    "PAIR_SEARCH",
    "STALL_CAUSE",
    "current_findings",
    "drop_band",
    "drop_factors",
    "half_periods",
    "stated_drop",
]

#: Forward-drop band of a small-signal silicon diode between about 0.1 mA and a
#: few mA at 25 °C, V (common practice).  Used only by :func:`drop_band` for
#: messages and estimates; the model itself uses the diode equation unless the
#: block states its own drop.
DIODE_DROP_BAND: tuple[float, float] = (0.55, 0.75)

#: The diode class of the steering diode.
DIODE: DiodeClass = SMALL_SIGNAL

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


def stated_drop(block: Block) -> bool:
    """Whether the block states the diode's drop (constant-drop model).

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    bool
        True when the block has a ``diode`` statement.
    """
    return block.window("diode") is not None


def drop_factors(block: Block) -> list[Factor]:
    """The diode as varying inputs.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    list of Factor
        With a stated drop: ``diode.v25`` (drop at 25 °C, V, over
        :func:`drop_band`) and ``diode.tc`` (mV/K, over :data:`DIODE_TC_BAND`).
        Otherwise the diode-equation parameters of :data:`DIODE`: ``diode.is``
        (saturation current at 25 °C, A) and ``diode.n`` (emission coefficient).
    """
    if not stated_drop(block):
        is_lo, is_hi = DIODE.is_band
        n_lo, n_hi = DIODE.n_band
        return [
            Factor(
                "diode.is",
                f"diode saturation current at 25 °C ({is_lo * 1e9:g}…{is_hi * 1e9:g} nA)",
                math.sqrt(is_lo * is_hi),
                is_lo,
                is_hi,
                group="diode",
            ),
            Factor(
                "diode.n",
                f"diode emission coefficient ({n_lo:g}…{n_hi:g})",
                0.5 * (n_lo + n_hi),
                n_lo,
                n_hi,
                group="diode",
            ),
        ]
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
        ``(tH, tL)``, s.  High time: with the diode-equation factors,
        :func:`~timespec.physics.astable.diode_equation_high_time` (exact, RB in
        parallel and the drain included); with a stated drop, ``V25 + tc·(T − 25)``
        into :func:`~timespec.physics.astable.diode_high_time`.  Low time:
        :func:`~timespec.physics.astable.classic_low_time`.  ``inf`` where a
        threshold is never reached.  Both with the timer's output delay
        ``timer.delay`` (:mod:`timespec.physics.timerdelay`).
    """
    c = apply_part(x, "C") + x.get("stray", _NO_STRAY)
    v = x["supply"]
    k = x["timer.ratio"]
    i = drain_current(x)
    ra = apply_part(x, "RA")
    rb = apply_part(x, "RB")
    ron = x["timer.ron"]
    td = x.get("timer.delay", _NO_STRAY)
    if "diode.is" in x:
        is_t, n_vt = _diode_at(x["diode.is"], x["diode.n"], x["temp"])
        return timerdelay.diode_equation_delayed_times(ra, rb, c, v, k, is_t, n_vt, ron, i, td)
    vd = astable.diode_forward_voltage(x["diode.v25"], x["diode.tc"], x["temp"])
    return timerdelay.diode_delayed_times(ra, rb, c, v, k, vd, ron, i, td)


def _diode_at(
    is25: FloatArray | float, n: FloatArray | float, temp: FloatArray | float
) -> tuple[FloatArray, FloatArray]:
    """Saturation current and ``n·Vt`` of :data:`DIODE` at a temperature."""
    is_t = astable.diode_saturation_current(is25, n, temp, DIODE.eg, DIODE.xti)
    n_vt = np.asarray(n, dtype=np.float64) * astable.thermal_voltage(temp)
    return is_t, n_vt


def current_findings(block: Block, design: Design) -> list[Finding]:
    """Where the diode equation is stretched by the current the design passes.

    Parameters
    ----------
    block
        An astable block (diode circuit).
    design
        Parts ``RA``, ``RB``, ``C``.

    Returns
    -------
    list of Finding
        ``diode-current-range`` when the diode current over the charge, at the
        corners of supply, temperature, threshold ratio and the class's bands,
        leaves :attr:`DiodeClass.held` (the range where the equation with these
        bands holds); empty with a stated drop or inside the range.
    """
    if stated_drop(block):
        return []
    assert block.timer is not None
    ra = design.part("RA").value
    rb = design.part("RB").value
    c = block.conditions
    grid = np.array(
        [
            (v, t, k, i_s, n)
            for v in (c.supply.low, c.supply.high)
            for t in (c.ambient_low, c.ambient_high)
            for k in block.timer.ratio_band
            for i_s in DIODE.is_band
            for n in DIODE.n_band
        ],
        dtype=np.float64,
    )
    v, t, k, i_s, n = grid.T
    is_t, n_vt = _diode_at(i_s, n, t)
    i_lo, i_hi = astable.diode_charge_currents(ra, v, k, is_t, n_vt, rb)
    low = float(np.min(np.minimum(i_lo, i_hi)))
    high = float(np.max(np.maximum(i_lo, i_hi)))
    fix = (
        "Choose RA so the charge current stays in that range, or measure your diode "
        "and state its drop ('diode 0.35 V to 0.45 V')."
    )
    return assumption_findings([Stretch(DIODE.held, low, high, fix)], "diode-current-range")


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
