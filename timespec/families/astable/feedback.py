"""The output-feedback astable: one resistor ``R`` from the timer output to ``C``.

The capacitor charges and discharges through ``R`` from the timer's own output,
so the circuit needs an output that swings to the rails (the CMOS class,
:data:`RAIL_OUTPUT_SHARE`) and runs close to 50 %, set by the output levels and
the threshold ratio (:func:`feedback_duty_range`).  The output is modelled as a
source: a light-load high level ``output.drop`` below the supply behind
``output.roh`` and a light-load low level ``output.low`` (up to
:data:`FEEDBACK_LOW_MAX`) behind ``output.rol``, each resistance in series with
``R``; the discharge pin is unused.
Here: those constants and factors, the half-period model, the resistor options
of the candidate search, and the error for a timer without rail-to-rail output.
"""

from __future__ import annotations

import itertools
import math

import numpy as np

from timespec.analysis import Factor
from timespec.families.astable.nominal import NominalRun, safe_ratio
from timespec.families.candidates import snap
from timespec.families.inputs import apply_part, drain_current
from timespec.families.protocol import Finding, FloatArray, Inputs
from timespec.model import Block
from timespec.parts.part import Design
from timespec.parts.rkm import format_rkm
from timespec.physics import astable, timerdelay

#: The node stray when the samples carry none (physics probes).
_NO_STRAY = np.zeros(1)

__all__ = [
    "FEEDBACK_LOW_MAX",
    "RAIL_OUTPUT_SHARE",
    "STALL_CAUSE",
    "UNUSED_TIMER_FACTORS",
    "current_findings",
    "feedback_duty_range",
    "half_periods",
    "output_factors",
    "rail_findings",
    "rail_output",
    "resistor_options",
]

#: Output low level of a CMOS timer sinking the feedback resistor's current
#: (well under 1 mA), V (from memory; generic CMOS output stages).
FEEDBACK_LOW_MAX: float = 0.05

#: The feedback circuit needs ``output_drop`` at most this share of the lowest
#: supply: a rail-to-rail (CMOS) output (common practice).
RAIL_OUTPUT_SHARE: float = 0.05

#: Timer factors the circuit does not use: the discharge on-resistance (the
#: discharge pin is left unconnected).
UNUSED_TIMER_FACTORS: tuple[str, ...] = ("timer.ron",)

#: What keeps the capacitor from a threshold when the circuit stalls.
STALL_CAUSE = "the output level, or the drain through R,"


def rail_output(block: Block) -> bool:
    """Whether the timer's output high level sits close enough to the rail.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    bool
        ``output_drop`` at most :data:`RAIL_OUTPUT_SHARE` of the lowest supply.
    """
    t = block.timer
    assert t is not None
    return t.output_drop <= RAIL_OUTPUT_SHARE * block.conditions.supply.low


def feedback_duty_range(block: Block) -> tuple[float, float]:
    """Duty cycles the output-feedback circuit can run at with this timer class.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    tuple of float
        ``(low, high)`` over the threshold-ratio band, output drop ``0…output_drop``,
        output low ``0…FEEDBACK_LOW_MAX``, the supply window and the output
        resistances (``R + R_oh`` charges, ``R + R_ol`` discharges: unequal sides
        skew the duty most at the policy's smallest R); ``(nan, nan)`` when the
        output never reaches the upper threshold anywhere.

    Notes
    -----
    ``tH ∝ ln((V_oh − kV/2)/(V_oh − kV))``, ``tL ∝ ln((kV − V_ol)/(kV/2 − V_ol))``,
    ``D = tH/(tH + tL)``: 50 % with rail-to-rail levels and ``k = 2/3``.
    """
    t = block.timer
    assert t is not None
    r = max(block.resistors.low, 1e-3)
    (oh_lo, oh_hi), (ol_lo, ol_hi) = t.r_out_high, t.r_out_low
    # (R + R_oh, R + R_ol) at the smallest allowed R, both ways round, and R ≫ R_out
    series = ((r + oh_lo, r + ol_hi), (r + oh_hi, r + ol_lo), (1.0, 1.0))
    grid = itertools.product(
        t.ratio_band,
        (0.0, t.output_drop),
        (0.0, FEEDBACK_LOW_MAX),
        (block.conditions.supply.low, block.conditions.supply.high),
        series,
    )
    points = [(kk, dd, ll, vv, rh, rl) for kk, dd, ll, vv, (rh, rl) in grid]
    k, drop, vl, v, r_h, r_l = (
        np.array(col, dtype=np.float64) for col in zip(*points, strict=True)
    )
    th = astable.feedback_high_time(r_h, 1.0, v - drop, v, k)
    tl = astable.feedback_low_time(r_l, 1.0, vl, v, k)
    d = astable.duty(th, tl)
    ok = np.isfinite(th) & np.isfinite(tl)
    if not ok.any():
        return (math.nan, math.nan)
    return (float(d[ok].min()), float(d[ok].max()))


def output_factors(block: Block) -> list[Factor]:
    """The timer output's levels as the circuit sees them.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    list of Factor
        ``output.drop`` (light-load high level below the supply, ``0…output_drop``
        V of the timer class), ``output.low`` (light-load low level,
        ``0…FEEDBACK_LOW_MAX`` V), and the output resistances ``output.roh``
        (high side) and ``output.rol`` (low side), Ω, over the class's bands.
    """
    t = block.timer
    assert t is not None
    drop = t.output_drop
    (oh_lo, oh_hi), (ol_lo, ol_hi) = t.r_out_high, t.r_out_low
    return [
        Factor(
            "output.drop",
            f"{t.name} output high below supply (0…{drop:g} V)",
            0.5 * drop,
            0.0,
            drop,
            group="timer",
        ),
        Factor(
            "output.low",
            f"{t.name} output low level (0…{FEEDBACK_LOW_MAX:g} V)",
            0.5 * FEEDBACK_LOW_MAX,
            0.0,
            FEEDBACK_LOW_MAX,
            group="timer",
        ),
        Factor(
            "output.roh",
            f"{t.name} output high-side resistance ({oh_lo:g}…{oh_hi:g} Ω)",
            0.5 * (oh_lo + oh_hi),
            oh_lo,
            oh_hi,
            group="timer",
        ),
        Factor(
            "output.rol",
            f"{t.name} output low-side resistance ({ol_lo:g}…{ol_hi:g} Ω)",
            0.5 * (ol_lo + ol_hi),
            ol_lo,
            ol_hi,
            group="timer",
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
        ``(tH, tL)``, s: :func:`~timespec.physics.astable.feedback_high_time` and
        :func:`~timespec.physics.astable.feedback_low_time` with light-load
        output levels ``V − drop`` and ``V_ol`` behind the series resistances
        ``R + R_oh`` (charge) and ``R + R_ol`` (discharge); ``inf`` where a
        threshold is never reached.  Without the ``output.roh``/``output.rol``
        samples the output resistance is taken as zero.
    """
    c = apply_part(x, "C") + x.get("stray", _NO_STRAY)
    v = x["supply"]
    k = x["timer.ratio"]
    i = drain_current(x)
    r = apply_part(x, "R")
    zero = np.zeros(1)
    r_h = r + x.get("output.roh", zero)
    r_l = r + x.get("output.rol", zero)
    td = x.get("timer.delay", zero)
    return timerdelay.feedback_delayed_times(
        r_h, r_l, c, v - x["output.drop"], x["output.low"], v, k, i, td
    )


def resistor_options(
    block: Block,
    run: NominalRun,
    cs: FloatArray,
    period: float,
) -> list[FloatArray]:
    """Standard-value options for R at each capacitor.

    Parameters
    ----------
    block
        An astable block.
    run
        The nominal model of the feedback circuit.
    cs
        Capacitor values, F.
    period
        Target period, s.

    Returns
    -------
    list of FloatArray
        The pinned R; else ``R = T/(C·g) − R_out`` with the nominal gain
        ``g = T/(R·C)`` of the full model without output resistance and
        ``R_out`` the mean of the nominal high- and low-side output resistances,
        corrected twice against the full model and snapped to both standard
        neighbours.
    """
    rp = block.resistors
    pin = block.pinned_part("R")
    if pin is not None:
        return [np.full(cs.shape, pin.value)]
    timer = block.timer
    assert timer is not None
    no_out = {"output.roh": np.zeros(1), "output.rol": np.zeros(1)}
    g = run({"R": np.ones(1), "C": np.ones(1)}, no_out)["period"][0]
    r_out = 0.25 * (sum(timer.r_out_high) + sum(timer.r_out_low))
    r = np.maximum(period / (cs * g) - r_out, 0.5 * rp.low)
    for _ in range(2):
        t = run({"R": r, "C": cs})["period"]
        r = r * safe_ratio(period, t)
    return list(snap(rp.series, r, rp.low, rp.high))


def rail_findings(block: Block) -> list[Finding]:
    """Error when the timer class's output does not swing to the rails.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    list of Finding
        ``feedback-needs-rail-output`` unless :func:`rail_output`; else empty.
    """
    timer = block.timer
    assert timer is not None
    if rail_output(block):
        return []
    return [
        Finding(
            "error",
            "feedback-needs-rail-output",
            f"the feedback circuit charges the capacitor from the timer output, but the "
            f"{timer.name} timer class's output sits up to {timer.output_drop:g} V below "
            f"the supply ({block.conditions.supply.low:g} V at the lowest), so the high "
            "time depends on load and supply. Use 'timer cmos', or 'circuit classic' / "
            "'circuit diode'.",
        )
    ]


def current_findings(block: Block, design: Design) -> list[Finding]:
    """Warning when the output current can pass the timer class's limit.

    Parameters
    ----------
    block
        An astable block (feedback circuit).
    design
        Parts ``R``, ``C``.

    Returns
    -------
    list of Finding
        ``output-current-limit`` when the largest output current over the box,
        at the switching moments (capacitor at one threshold, output at the other
        rail: :func:`~timespec.physics.astable.feedback_output_currents` with
        ``V_max``, the threshold-ratio band, ``R_min`` and the smallest output
        resistances), is above :attr:`TimerClass.i_out_max`; else empty.
    """
    timer = block.timer
    assert timer is not None
    part = design.part("R")
    r_min = part.value * (1.0 - part.tolerance)
    v_max = block.conditions.supply.high
    k = np.array(timer.ratio_band, dtype=np.float64)
    i_src, i_snk = astable.feedback_output_currents(
        r_min, timer.r_out_high[0], timer.r_out_low[0], v_max, k
    )
    i_max = float(max(i_src.max(), i_snk.max()))
    if i_max <= timer.i_out_max:
        return []
    r_out = min(timer.r_out_high[0], timer.r_out_low[0])
    r_need = v_max / timer.i_out_max - r_out
    return [
        Finding(
            "warning",
            "output-current-limit",
            f"the timer output carries up to {i_max * 1e3:.3g} mA through "
            f"R = {format_rkm(part.value, 'resistance')}Ω at {v_max:g} V just after each "
            f"switch, above the {timer.name} class limit of {timer.i_out_max * 1e3:.3g} mA; "
            "the output levels then sag beyond the modelled bands. Use a larger R (at least "
            f"{format_rkm(r_need / (1.0 - part.tolerance), 'resistance')}Ω with its "
            "tolerance) with a smaller C.",
        )
    ]
