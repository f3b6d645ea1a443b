"""The astable's requirement side, shared by every circuit variant.

What the requirements ask of an astable whatever its circuit: the duty cycles
they allow (:func:`duty_band`), the high and low times a variant should aim at
(:func:`time_targets`, with :data:`DEFAULT_DUTY` when the duty cycle is free),
which variants can make that duty cycle (:func:`reachable_variants`: classic
only above 50 %, feedback only near 50 % on a rail-to-rail output, diode always)
and the errors when the chosen one cannot (:func:`duty_findings`).  Also the
variant names and each variant's part references (:data:`PART_REFS`).  The
feedback circuit's own reach, which depends on its output levels, comes from
:mod:`~timespec.families.astable.feedback`.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

from timespec.errors import SpecValueError
from timespec.families.astable.feedback import feedback_duty_range, rail_output
from timespec.families.goals import target
from timespec.families.protocol import Finding
from timespec.model import Block, PinnedPart, Window

__all__ = [
    "DEFAULT_DUTY",
    "PART_REFS",
    "VARIANTS",
    "duty_band",
    "duty_findings",
    "reachable_variants",
    "time_targets",
]

#: Circuit variants, in the order the solver prefers them on a tie.
VARIANTS: tuple[str, ...] = ("classic", "diode", "feedback")

#: Duty cycle aimed at when the requirements leave it free: classic with
#: ``RA = RB`` (2/3, equal resistors, common practice); diode and feedback: a
#: square wave.
DEFAULT_DUTY: Mapping[str, float] = {"classic": 2.0 / 3.0, "diode": 0.5, "feedback": 0.5}

#: Part references of each variant, capacitor last (the column order of the
#: candidate search).
PART_REFS: Mapping[str, tuple[str, ...]] = {
    "classic": ("RA", "RB", "C"),
    "diode": ("RA", "RB", "C"),
    "feedback": ("R", "C"),
}


def _pct(d: float) -> str:
    return f"{d * 100:.3g} %"


# --------------------------------------------------------------------------
# requirements → targets


def _period_window(block: Block) -> Window | None:
    """The period window from a ``period`` or ``frequency`` requirement."""
    req = block.requirement("period")
    if req is not None:
        return req.window
    req = block.requirement("frequency")
    if req is None:
        return None
    w = req.window
    low = 1.0 / w.high if w.high > 0 and math.isfinite(w.high) else 0.0
    high = 1.0 / w.low if w.low > 0 else math.inf
    return Window(low, high, "time")


def duty_band(block: Block) -> tuple[float, float]:
    """The duty cycles the requirements allow (duty, high/low, high or low with a period).

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    tuple of float
        ``(low, high)`` within ``[0, 1]``; ``low > high`` when the requirements
        contradict each other; ``(0, 1)`` when nothing limits the duty cycle.

    Notes
    -----
    ``D = tH/(tH + tL) = tH/T``.  Each pair of requirements that fixes the duty
    cycle narrows the band: a duty window directly; high and low windows give
    ``tH_min/(tH_min + tL_max)`` … ``tH_max/(tH_max + tL_min)``; a high (low)
    window with a period window gives ``tH/T`` (``1 − tL/T``) at the ends.
    """
    lo, hi = 0.0, 1.0
    req = block.requirement("duty")
    if req is not None:
        lo, hi = max(lo, req.window.low), min(hi, req.window.high)
    h = block.requirement("high")
    lw = block.requirement("low")
    p = _period_window(block)
    if h is not None and lw is not None:
        lo = max(lo, _ratio(h.window.low, h.window.low + lw.window.high))
        hi = min(hi, _ratio(h.window.high, h.window.high + lw.window.low))
    if h is not None and p is not None:
        lo = max(lo, _ratio(h.window.low, p.high))
        hi = min(hi, _ratio(h.window.high, p.low))
    if lw is not None and p is not None:
        lo = max(lo, 1.0 - _ratio(lw.window.high, p.low))
        hi = min(hi, 1.0 - _ratio(lw.window.low, p.high))
    return (max(0.0, lo), min(1.0, hi))


def _ratio(a: float, b: float) -> float:
    """``a/b`` clipped into [0, 1], with infinities read as limits."""
    if math.isinf(a):
        return 1.0
    if b <= 0 or math.isinf(b):
        return 0.0 if b > 0 or a <= 0 else 1.0
    return min(1.0, max(0.0, a / b))


def time_targets(
    block: Block, variant: str, scale: Mapping[str, float] | None = None
) -> tuple[float, float]:
    """High and low times a design of this variant should aim at.

    Parameters
    ----------
    block
        An astable block.
    variant
        ``"classic"``, ``"diode"`` or ``"feedback"``.
    scale
        Optional factor per requirement name applied to its target (the solver
        aims the nominal off-centre so that the worst-case window is centred).

    Returns
    -------
    tuple of float
        ``(tH, tL)``, s.

    Notes
    -----
    Both ``high`` and ``low`` given: their targets.  One of them with a period
    (``period``, or ``1/frequency``): the other is ``T − t``.  Otherwise the
    duty target ``D`` (the ``duty`` requirement, else :data:`DEFAULT_DUTY` of
    the variant) splits the given time: ``tL = tH·(1 − D)/D``, or
    ``tH = D·T`` and ``tL = (1 − D)·T``.
    """
    sc = scale or {}

    def aim(name: str) -> float | None:
        req = block.requirement(name)
        return None if req is None else target(req.window) * sc.get(name, 1.0)

    period = aim("period")
    f = aim("frequency")
    if period is None and f is not None:
        period = 1.0 / f
    d = aim("duty")
    d = DEFAULT_DUTY[variant] if d is None else d
    d = min(max(d, 1e-3), 1.0 - 1e-3)
    th = aim("high")
    tl = aim("low")
    if th is not None and tl is not None:
        return th, tl
    if th is not None:
        if period is not None and period > th:
            return th, period - th
        return th, th * (1.0 - d) / d
    if tl is not None:
        if period is not None and period > tl:
            return period - tl, tl
        return tl * d / (1.0 - d), tl
    assert period is not None, "an astable needs frequency, period, high or low"
    return d * period, (1.0 - d) * period


# --------------------------------------------------------------------------
# which variants can make the duty cycle


def _reaches(block: Block, variant: str, band: tuple[float, float]) -> bool:
    lo, hi = band
    if lo > hi:
        return variant == "diode"
    if variant == "classic":
        return hi > 0.5
    if variant == "feedback":
        f_lo, f_hi = feedback_duty_range(block)
        return rail_output(block) and f_lo <= hi and lo <= f_hi
    return True


def reachable_variants(block: Block) -> tuple[str, ...]:
    """The circuit variants the solver considers for a block.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    tuple of str
        The pinned ``circuit`` when given; otherwise every variant that can
        reach the required duty cycle (classic only above 50 %, feedback only
        with a rail-to-rail timer output and a duty band near 50 %, diode
        always), restricted to those whose part references fit the pinned parts.

    Raises
    ------
    SpecValueError
        When pinned part references do not fit the pinned circuit (``R`` with
        ``circuit classic``, ``RA`` with ``circuit feedback``).
    """
    pinned_circuit = block.word("circuit")
    refs = {p.ref for p in block.pinned}
    if pinned_circuit is not None:
        wrong = sorted(refs - set(PART_REFS[pinned_circuit]))
        if wrong:
            part = block.pinned_part(wrong[0])
            hint = (
                "the feedback circuit has parts R and C: write 'use R …, C …'"
                if pinned_circuit == "feedback"
                else "the classic and diode circuits have parts RA, RB and C"
            )
            raise _error(
                f"part {wrong[0]} does not exist in the {pinned_circuit} astable circuit",
                part,
                hint,
            )
        return (pinned_circuit,)
    if "R" in refs and refs & {"RA", "RB"}:
        part = block.pinned_part("R")
        raise _error(
            "an astable has either R (feedback circuit) or RA and RB (classic, diode), not both",
            part,
            "pin the parts of one circuit",
        )
    band = duty_band(block)
    options = [v for v in VARIANTS if refs <= set(PART_REFS[v])]
    found = tuple(v for v in options if _reaches(block, v, band))
    if found:
        return found
    if "R" in refs:
        return ("feedback",)
    return ("diode",)


def _error(message: str, part: PinnedPart | None, hint: str) -> SpecValueError:
    pos = part.pos if part is not None else None
    if pos is None:
        return SpecValueError(message, hint=hint)
    return SpecValueError(
        message,
        path=pos.path,
        line=pos.line,
        column=pos.column,
        source_line=pos.source_line,
        hint=hint,
    )


def duty_findings(block: Block, variant: str) -> list[Finding]:
    """Error when the requirements ask for a duty cycle the circuit cannot make.

    Parameters
    ----------
    block
        An astable block.
    variant
        The design's circuit variant.

    Returns
    -------
    list of Finding
        ``duty-contradiction`` when the requirements contradict each other;
        ``duty-out-of-reach`` when the classic circuit is asked for 50 % or less,
        or the feedback circuit for a duty cycle outside its range; else empty.
    """
    lo, hi = duty_band(block)
    if lo > hi:
        return [
            Finding(
                "error",
                "duty-contradiction",
                f"the requirements contradict each other: together they ask for a duty cycle "
                f"of at least {_pct(lo)} and at most {_pct(hi)}. Relax one of them.",
            )
        ]
    if variant == "classic" and hi <= 0.5:
        return [
            Finding(
                "error",
                "duty-out-of-reach",
                f"the requirements ask for a duty cycle of {_pct(lo)}…{_pct(hi)}, but the "
                "classic two-resistor circuit always runs above 50 % (its duty cycle is "
                "(RA + RB)/(RA + 2·RB)). Write 'circuit diode' (a steering diode across RB "
                "reaches any duty cycle), or leave out 'circuit' and let the solver choose.",
            )
        ]
    if variant == "feedback":
        f_lo, f_hi = feedback_duty_range(block)
        if not (f_lo <= hi and lo <= f_hi):
            return [
                Finding(
                    "error",
                    "duty-out-of-reach",
                    f"the requirements ask for a duty cycle of {_pct(lo)}…{_pct(hi)}, but the "
                    f"output-feedback circuit runs near 50 % ({_pct(f_lo)}…{_pct(f_hi)} with "
                    "this timer class). Write 'circuit diode' for any duty cycle, or "
                    "'circuit classic' above 50 %.",
                )
            ]
    return []
