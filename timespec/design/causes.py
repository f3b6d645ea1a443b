"""Why the closest design misses: the binding cause of an INFEASIBLE or FAILS, in numbers.

When no candidate meets (or a pinned design fails), the notes must say what
actually stands in the way, not a stock sentence.  :func:`infeasible_causes`
looks at the closest design, its worst-case window against the requirement and
the factors behind it, and names each cause that binds, one sentence each:

* **timer or gate class speed**: the window lies above the frequency the class
  is used at (or, for a one-shot, the class's own output delay band is wider
  than the window); the class that would be fast enough is named;
* **leakage stalling the charge**: the drain at the timing node (capacitor and
  stated leakage plus the timer's threshold current, or the watching input's
  own current for an RC delay or a relaxation oscillator) against the charging
  current left at the highest threshold, ``(V_supply,min − V_th,max) / R``;
  when the charge is not stalled but the drain moves the timing by more than
  half the window, the shift is named instead;
* **gate threshold spread**: the relaxation oscillator's window from the gate
  class's thresholds alone, every other input at nominal
  (:func:`timespec.analysis.worst_case` on that subset) is wider than the
  requirement;
* **part spread**: the worst-case spread, even perfectly centred, is wider than
  the window; the largest contributors are named with their parts of it and
  what would have to shrink;
* **centring / value granularity**: the spread fits but the standard values
  do not place it; the nominal values it needs and the nearest the series
  offers are named.

A design that keeps every window and breaks only a design rule gets no cause
here (the solver names the rule).

Contributors to the spread
--------------------------
The worst-case search (:func:`timespec.analysis.worst_case`) gives the input
values at the low and the high extreme (``low_at``/``high_at``).  Each varying
input's part of the span is measured at those two corners: the change of
``ln(output)`` when that input alone is moved from its low-corner value to its
high-corner value, averaged over doing so at the low corner and (backwards) at
the high corner.  For a model that is a product of its inputs' effects (an RC
time: ``R·C·k``) these parts add up exactly to ``ln(high / low)``; they are then
scaled to share the stated ``±`` spread.  Interactions are seen where they
matter, at the extremes: a tempco counts through the ambient it meets at the
corner.  An input at the same end in both corners (the ambient when both
extremes fall at the hot end) gets no part: its effect is carried by the inputs
it acts with.  Variance shares (:mod:`timespec.analysis.sensitivity`) answer a
different question (what spreads the population), so they are not used here.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from timespec.analysis import (
    Factor,
    FloatArray,
    call_evaluate,
    is_varying,
    nominal_inputs,
    worst_case,
)
from timespec.design.result import Candidate, OutputResult
from timespec.families import family
from timespec.families.capacitors import capacitor_leakage
from timespec.families.logicinput import node_leakage_band
from timespec.model import Block, Window
from timespec.numbers import format_quantity
from timespec.parts import series as eseries
from timespec.parts.devices import GATE_CLASSES, TIMER_CLASSES
from timespec.parts.part import Design, Part
from timespec.parts.rkm import format_rkm

__all__ = ["Cause", "Contributor", "diagnose", "infeasible_causes", "spread_contributors"]

#: Outputs that scale with R·C (frequency as its inverse): spread is compared as a ratio.
_SCALING = ("width", "delay", "period", "high", "low", "frequency")
#: The relaxation family's group of threshold factors.
_GATE_GROUP = "gate thresholds"
#: Factors that drain the timing node.
_DRAIN = ("timer.ith", "leak")
#: Resistors the capacitor charges through, per kind and circuit variant.
_CHARGE_PATH: dict[tuple[str, str], tuple[str, ...]] = {
    ("oneshot", ""): ("R",),
    ("astable", "classic"): ("RA", "RB"),
    ("astable", "diode"): ("RA",),
    ("astable", "feedback"): ("R",),
    ("relaxation", ""): ("R",),
    ("delay", ""): ("R",),
}
#: How many contributors a spread sentence names.
_NAMED = 3


@dataclass(frozen=True)
class Cause:
    """One binding cause of a missed requirement.

    Parameters
    ----------
    kind : str
        ``"timer-speed"``, ``"gate-speed"``, ``"timer-delay"``, ``"drain-stalls"``,
        ``"leakage"``, ``"gate-thresholds"``, ``"part-spread"`` or ``"centring"``.
    text : str
        The full sentence, with numbers and units (a note).
    brief : str
        A short clause naming the cause with its key numbers, for a sentence
        that refers to it (e.g. why no searched change helps).
    """

    kind: str
    text: str
    brief: str


@dataclass(frozen=True)
class Contributor:
    """One input's part of a worst-case spread.

    Parameters
    ----------
    name, label : str
        The factor's name and label.
    share : float
        Fraction of the worst-case span (``ln(high/low)`` or ``high − low``), ≥ 0;
        the shares of one output add to 1.
    """

    name: str
    label: str
    share: float


def spread_contributors(
    block: Block, design: Design, factors: Sequence[Factor], out: OutputResult
) -> tuple[Contributor, ...]:
    """Split an output's worst-case span among its inputs (see the module docstring).

    Parameters
    ----------
    block
        The block.
    design
        The design analysed.
    factors
        Its factors.
    out
        The output, with the input values at its extremes (``low_at``, ``high_at``).

    Returns
    -------
    tuple of Contributor
        Largest share first; inputs with no part left out.  Empty when the span
        is zero or not finite, or the extremes carry no input values.
    """
    if not (out.low_at and out.high_at and math.isfinite(out.low) and math.isfinite(out.high)):
        return ()
    if not out.high > out.low:
        return ()
    varying = [
        f for f in factors if is_varying(f) and out.low_at.get(f.name) != out.high_at.get(f.name)
    ]
    if not varying:
        return ()
    use_log = out.low > 0
    base = nominal_inputs(factors)
    lo = {k: float(v[0]) for k, v in base.items()} | dict(out.low_at)
    hi = {k: float(v[0]) for k, v in base.items()} | dict(out.high_at)
    rows: list[Mapping[str, float]] = [lo, hi]
    for f in varying:
        rows.append(lo | {f.name: hi[f.name]})
        rows.append(hi | {f.name: lo[f.name]})
    inputs: dict[str, FloatArray] = {
        k: np.array([r[k] for r in rows], dtype=np.float64) for k in base
    }
    fam = family(block.kind)
    with np.errstate(all="ignore"):
        y = call_evaluate(fam.evaluate(block, design.variant), inputs, len(rows))[out.name]
    if not np.all(np.isfinite(y)) or (use_log and not np.all(y > 0)):
        return ()
    v = np.log(y) if use_log else y
    parts = []
    for i, f in enumerate(varying):
        up = float(v[2 + 2 * i] - v[0])
        down = float(v[1] - v[3 + 2 * i])
        parts.append((f, max(0.0, 0.5 * (up + down))))
    total = math.fsum(p for _, p in parts)
    if not total > 0:
        return ()
    found = [Contributor(f.name, f.label, p / total) for f, p in parts if p > 0]
    return tuple(sorted(found, key=lambda c: -c.share))


def infeasible_causes(block: Block, best: Candidate, factors: Sequence[Factor]) -> tuple[str, ...]:
    """The binding causes of an infeasible block (or a failing pinned one), in words.

    Parameters
    ----------
    block
        The single-technology block solved.
    best
        The closest design, as analysed (worst-case outputs with their extremes).
    factors
        The factors of that design.

    Returns
    -------
    tuple of str
        One sentence per cause (:attr:`Cause.text` of :func:`diagnose`); empty
        when every window is met (only a design rule breaks) or no cause is
        identified, in which case the caller keeps its own note.
    """
    return tuple(c.text for c in diagnose(block, best, factors))


def diagnose(block: Block, best: Candidate, factors: Sequence[Factor]) -> tuple[Cause, ...]:
    """The binding causes of the closest design's miss (see the module docstring).

    Parameters
    ----------
    block
        The single-technology block solved.
    best
        The closest design, as analysed (worst-case outputs with their extremes).
    factors
        The factors of that design.

    Returns
    -------
    tuple of Cause
        The blocking causes (class speed, a drain that stalls the charge, gate
        thresholds alone) when any binds; else a leakage shift if large, with
        the part spread or, when the spread fits, the centring.  Empty when
        every window is met or no cause is identified.
    """
    out = _binding_output(best)
    if out is None or out.required is None:
        return ()
    w = out.required
    drain = _drain_causes(block, best.design, factors, out)
    blocking = [
        *_speed_causes(block, out, w),
        *(c for c in drain if c.kind == "drain-stalls"),
        *_gate_causes(block, best.design, factors, out, w),
    ]
    if blocking or not (math.isfinite(out.low) and math.isfinite(out.high)):
        return tuple(blocking)
    causes = [c for c in drain if c.kind != "drain-stalls"]
    spread = _spread_cause(block, best.design, factors, out, w)
    if spread is not None:
        causes.append(spread)
    else:
        centring = _centring_cause(block, best.design, out, w)
        if centring is not None:
            causes.append(centring)
    return tuple(causes)


def _binding_output(best: Candidate) -> OutputResult | None:
    """The required output that misses its window farthest."""
    missing = [o for o in best.outputs if o.required is not None and not o.meets]
    if not missing:
        return None
    return max(missing, key=lambda o: o.excess)


def _pct(x: float) -> str:
    return f"{x * 100:.3g} %"


def _window_text(w: Window, kind: str) -> str:
    return f"{format_quantity(w.low, kind)} … {format_quantity(w.high, kind)}"


def _half_spread(low: float, high: float) -> float:
    """The ``±`` relative spread of ``low … high`` about its middle."""
    return (high - low) / (high + low)


def _speed_causes(block: Block, out: OutputResult, w: Window) -> list[Cause]:
    supply = block.conditions.supply
    if block.kind == "astable" and block.timer is not None and out.name in ("frequency", "period"):
        t = block.timer
        # the frequency band the window asks for (a period window read as its inverse)
        f_low, f_high = (w.low, w.high) if out.name == "frequency" else (1 / w.high, 1 / w.low)
        if f_low > t.f_max:
            faster = [
                c
                for c in TIMER_CLASSES.values()
                if c.f_max >= f_high
                and c.name != t.name
                and c.supply_min <= supply.low
                and supply.high <= c.supply_max
            ]
            fix = (
                f"; the {faster[0].name} class (used up to about "
                f"{format_quantity(faster[0].f_max, 'frequency')}) is fast enough: "
                f"'timer {faster[0].name}'"
                if faster
                else "; no timer class offered is that fast at this supply: use a crystal or a "
                "logic oscillator"
            )
            return [
                Cause(
                    "timer-speed",
                    f"the frequency must be at least {format_quantity(f_low, 'frequency')}, "
                    f"above the {format_quantity(t.f_max, 'frequency')} the {t.name} timer "
                    f"class is used at{fix}",
                    f"the {t.name} timer class (up to {format_quantity(t.f_max, 'frequency')}) "
                    f"is too slow for {format_quantity(f_low, 'frequency')}",
                )
            ]
    if block.kind == "relaxation" and block.gate is not None and out.name == "frequency":
        g = block.gate
        slow = g.slowdown(block.conditions.supply.low)
        f_max = g.f_max / slow
        if w.low > f_max:
            quicker = [
                c
                for c in GATE_CLASSES.values()
                if c.f_max / c.slowdown(block.conditions.supply.low) >= w.high
                and c.name != g.name
                and c.supply_min <= block.conditions.supply.low
                and block.conditions.supply.high <= c.supply_max
            ]
            fix = (
                f"; the {quicker[0].name} class is fast enough: 'gate {quicker[0].name}'"
                if quicker
                else "; no gate class offered is that fast at this supply"
            )
            return [
                Cause(
                    "gate-speed",
                    f"the frequency must be at least {format_quantity(w.low, 'frequency')}, "
                    f"above the {format_quantity(f_max, 'frequency')} the {g.name} gate class "
                    f"is used at as an RC oscillator at {block.conditions.supply.low:g} V{fix}",
                    f"the {g.name} gate class (up to {format_quantity(f_max, 'frequency')}) is "
                    f"too slow for {format_quantity(w.low, 'frequency')}",
                )
            ]
    if block.kind == "oneshot" and block.timer is not None and out.name == "width":
        t = block.timer
        lo, hi = t.delay_band(block.conditions.supply.low)
        if hi - lo > w.high - w.low:
            return [
                Cause(
                    "timer-delay",
                    f"the {t.name} timer's own output delay varies by "
                    f"{format_quantity(hi - lo, 'time')} ({format_quantity(lo, 'time')} … "
                    f"{format_quantity(hi, 'time')}), more than the whole "
                    f"{format_quantity(w.high - w.low, 'time')} window of the width: no part "
                    "values take that out; widen the window or use a faster pulse source",
                    f"the {t.name} timer's output delay band "
                    f"({format_quantity(hi - lo, 'time')}) is wider than the window",
                )
            ]
    return []


def _charge_resistance(block: Block, design: Design) -> tuple[float, tuple[Part, ...]] | None:
    refs = _CHARGE_PATH.get((block.kind, design.variant))
    if refs is None:
        return None
    parts = tuple(p for p in design.parts if p.ref in refs)
    if len(parts) != len(refs):
        return None
    return math.fsum(p.value * (1 + p.tolerance) for p in parts), parts


def _threshold_volts(block: Block) -> float | None:
    """The highest threshold the timing node must reach at the lowest supply, V."""
    v = block.conditions.supply.low
    if block.timer is not None:
        return block.timer.ratio_band[1] * v
    if block.kind == "relaxation" and block.gate is not None:
        return block.gate.rising[2] * v
    if block.kind == "delay":
        win = block.window("threshold")
        if win is None:
            return None
        return win.high * v if win.kind == "ratio" else win.high
    return None


def _input_current(block: Block, design: Design) -> tuple[float, bool]:
    """The watching logic input's own current in the node's drain, A, and whether assumed.

    An RC delay counts its input's bound only when the spec states no ``leakage``
    (a stated one replaces it), and that bound is then assumed (the gate class's
    or the usual CMOS one); a relaxation oscillator's gate input always counts
    (:func:`~timespec.families.logicinput.node_leakage_band`).  Zero for a timer.
    """
    if block.kind not in ("delay", "relaxation") or not any(p.ref == "C" for p in design.parts):
        return 0.0, False
    if block.kind == "delay" and block.number("leakage") is not None:
        return 0.0, False
    band = node_leakage_band(block, design, block.gate, add_stated=block.kind == "relaxation")
    return band.input_bound, band.assumed is not None


def _assumed_hint(block: Block, design: Design) -> str:
    """What lowers an assumed input current, as a clause to end a drain sentence."""
    amps, assumed = _input_current(block, design)
    if not (assumed and amps > 0):
        return ""
    return (
        f"; the {format_quantity(amps, 'current')} input current is an assumed bound: state "
        "`leakage` with your input's datasheet bound to lower it"
    )


def _drain_pieces(block: Block, design: Design, by_name: Mapping[str, Factor]) -> list[str]:
    """The drain at the timing node, piece by piece, in words."""
    cap = next((p for p in design.parts if p.kind == "capacitance"), None)
    stated = block.number("leakage") or 0.0
    own = capacitor_leakage(block, cap) if cap is not None else 0.0
    i_input, assumed = _input_current(block, design)
    pieces = []
    if "timer.ith" in by_name:
        pieces.append(f"threshold current {format_quantity(by_name['timer.ith'].high, 'current')}")
    if i_input > 0:
        amps = format_quantity(i_input, "current")
        pieces.append(f"assumed input current {amps}" if assumed else f"input current {amps}")
    if own > 0:
        pieces.append(f"capacitor leakage {format_quantity(own, 'current')}")
    if stated > 0:
        pieces.append(f"stated leakage {format_quantity(stated, 'current')}")
    if (
        not (own > 0 or stated > 0 or i_input > 0)
        and "leak" in by_name
        and by_name["leak"].high > 0
    ):
        pieces.append(f"node leakage {format_quantity(by_name['leak'].high, 'current')}")
    return pieces


def _drain_causes(
    block: Block, design: Design, factors: Sequence[Factor], out: OutputResult
) -> list[Cause]:
    """Leakage and threshold current against the charge current left at the threshold."""
    by_name = {f.name: f for f in factors}
    drains = [by_name[n] for n in _DRAIN if n in by_name and by_name[n].high > 0]
    if not drains:
        return []
    path = _charge_resistance(block, design)
    v_th = _threshold_volts(block)
    if path is None or v_th is None:
        return []
    r, parts = path
    v = block.conditions.supply.low
    i_charge = (v - v_th) / r
    i_drain = math.fsum(f.high for f in drains)
    pieces = _drain_pieces(block, design, by_name)
    hint = _assumed_hint(block, design)
    drained = (
        f"{format_quantity(i_drain, 'current')} ({', '.join(pieces)})"
        if pieces
        else (format_quantity(i_drain, "current"))
    )
    res = " + ".join(format_quantity(p.value, "resistance") for p in parts)
    charge = (
        f"the charge current left at the threshold, ({v:g} V − {v_th:.3g} V) / "
        f"{format_quantity(r, 'resistance')} ({res} at the top of its tolerance) = "
        f"{format_quantity(i_charge, 'current')}"
    )
    if i_drain >= i_charge or not math.isfinite(out.high):
        return [
            Cause(
                "drain-stalls",
                f"the timing node cannot reach its threshold: the drain of {drained} exceeds "
                f"{charge}; use a smaller R with a larger C, or a capacitor that leaks less "
                f"(film instead of electrolytic){hint}",
                f"the {format_quantity(i_drain, 'current')} drain at the timing node exceeds the "
                f"{format_quantity(i_charge, 'current')} charge current left at the threshold",
            )
        ]
    contributors = spread_contributors(block, design, factors, out)
    share = math.fsum(c.share for c in contributors if c.name in _DRAIN)
    w = out.required
    if w is None or not share > 0 or not (out.low > 0 and w.low > 0):
        return []
    moved = _half_spread(out.low, out.high) * share
    room = _half_spread(w.low, w.high)
    if moved <= room / 2 and share < 0.5:
        return []
    return [
        Cause(
            "leakage",
            f"leakage moves the {out.label or out.name} by about ±{_pct(moved)} against a "
            f"±{_pct(room)} window: the drain of {drained} is "
            f"{i_drain / i_charge * 100:.3g} % of {charge}; use a smaller R with a larger C, "
            f"or a capacitor that leaks less{hint}",
            f"the {format_quantity(i_drain, 'current')} drain moves the timing by about "
            f"±{_pct(moved)}",
        )
    ]


def _fixed(factors: Sequence[Factor], keep: str) -> list[Factor]:
    return [
        f
        if f.group == keep
        else Factor(f.name, f.label, f.nominal, f.nominal, f.nominal, "fixed", group=f.group)
        for f in factors
    ]


def _gate_causes(
    block: Block, design: Design, factors: Sequence[Factor], out: OutputResult, w: Window
) -> list[Cause]:
    """A relaxation oscillator whose gate thresholds alone spread more than the window."""
    if block.kind != "relaxation" or block.gate is None:
        return []
    if not any(f.group == _GATE_GROUP and is_varying(f) for f in factors):
        return []
    model = family(block.kind).evaluate(block, design.variant)
    with np.errstate(all="ignore"):
        alone = worst_case(_fixed(factors, _GATE_GROUP), model).get(out.name)
    if alone is None or not (alone.low > 0 and math.isfinite(alone.high)) or not w.low > 0:
        return []
    if alone.high / alone.low <= w.high / w.low:
        return []
    g = block.gate
    alone_spread = _pct(_half_spread(alone.low, alone.high))
    text = (
        f"the {g.name} gate class's thresholds alone (VT+ {g.rising[0]:g}…{g.rising[2]:g}, "
        f"VT− {g.falling[0]:g}…{g.falling[2]:g} of the supply), every other input at nominal, "
        f"spread the {out.label or out.name} over {_window_text_alone(alone.low, alone.high, out)}"
        f", ±{alone_spread} against a ±"
        f"{_pct(_half_spread(w.low, w.high))} window: no R or C fixes that; trim R on each "
        "board, or use a 555-type timer (thresholds from a resistor divider)"
    )
    brief = f"the {g.name} gate thresholds alone spread the {out.name} ±{alone_spread}"
    return [Cause("gate-thresholds", text, brief)]


def _window_text_alone(low: float, high: float, out: OutputResult) -> str:
    return f"{format_quantity(low, out.kind)} … {format_quantity(high, out.kind)}"


def _factor_text(c: Contributor) -> str:
    if c.name == "temp":
        return f"the {c.label} through the tempcos and drifts"
    return c.label


def _spread_cause(
    block: Block, design: Design, factors: Sequence[Factor], out: OutputResult, w: Window
) -> Cause | None:
    """The worst-case spread alone is wider than the window."""
    ratio_mode = w.low > 0 and out.low > 0 and out.name in _SCALING
    if ratio_mode:
        fits = out.high / out.low <= w.high / w.low
        spread, room = _half_spread(out.low, out.high), _half_spread(w.low, w.high)
        unit = "%"
    else:
        fits = out.high - out.low <= w.high - w.low
        spread, room = (out.high - out.low) / 2, (w.high - w.low) / 2
        unit = ""
    if fits:
        return None
    contributors = spread_contributors(block, design, factors, out)

    def amount(x: float) -> str:
        return f"±{_pct(x)}" if unit else f"±{format_quantity(x, out.kind)}"

    label = out.label or out.name
    head = (
        f"the {label} window is {amount(room)} but the closest design's worst-case spread "
        f"alone is {amount(spread)}, even if perfectly centred"
    )
    brief = f"the worst-case spread is {amount(spread)} against a {amount(room)} window"
    if not contributors:
        return Cause("part-spread", f"{head}; the parts' spread must shrink", brief)
    named = contributors[:_NAMED]
    items = [f"{_factor_text(c)} gives {amount(spread * c.share)}" for c in named]
    rest = 1.0 - math.fsum(c.share for c in named)
    if rest > 0.005:
        items.append(f"the rest {amount(spread * rest)}")
    must = spread - room
    top = named[0]
    top_part = spread * top.share
    if top_part >= must:
        shrink = (
            f"{_factor_text(top)} alone would have to fall from {amount(top_part)} to "
            f"{amount(top_part - must)} or less"
        )
    else:
        shrink = (
            f"the spread would have to shrink from {amount(spread)} to {amount(room)}, more "
            "than taking out its largest contributor gives"
        )
    return Cause("part-spread", f"{head}: {', '.join(items)}; {shrink}", brief)


def _centring_cause(block: Block, design: Design, out: OutputResult, w: Window) -> Cause | None:
    """The spread fits but the standard values do not place it inside the window."""
    if not (w.low > 0 and out.low > 0 and out.name in _SCALING):
        return None
    # scale k of the output that would put low…high inside the window
    k_lo, k_hi = w.low / out.low, w.high / out.high
    if k_lo > k_hi:
        return None
    # a time scales with R·C; a frequency with 1/(R·C)
    inverse = out.name == "frequency"
    rc_lo, rc_hi = (1 / k_hi, 1 / k_lo) if inverse else (k_lo, k_hi)
    label = out.label or out.name
    pinned = all(p.pinned for p in design.parts)
    what = "the pinned parts put" if pinned else "the closest design's standard values put"
    text = (
        f"the worst-case spread (±{_pct(_half_spread(out.low, out.high))}) fits the "
        f"±{_pct(_half_spread(w.low, w.high))} window, but {what} the {label} at "
        f"{_window_text_alone(out.low, out.high, out)} against the required "
        f"{_window_text(w, out.kind)}: centring it needs R·C {_factor(rc_lo)} to "
        f"{_factor(rc_hi)}"
    )
    options = [
        s
        for p in design.parts
        if (s := _part_needs(p, rc_lo, rc_hi, len(design.parts))) is not None
    ]
    if options:
        text += "; " + "; ".join(options)
    if not pinned:
        text += (
            "; a finer series or a series/parallel pair ('pairs' in the policy) offers values "
            "in between"
        )
    brief = (
        f"the {what.split(' put')[0].removeprefix('the ')} cannot centre the "
        f"±{_pct(_half_spread(out.low, out.high))} spread in the window"
    )
    return Cause("centring", text, brief)


def _neighbour(value: float, now: float, kind: str) -> str:
    if math.isclose(value, now, rel_tol=1e-9):
        return f"{format_rkm(value, kind)} (the value used)"
    return f"{format_rkm(value, kind)} ({(value / now - 1) * 100:+.3g} %)"


def _factor(k: float) -> str:
    return f"{(k - 1) * 100:+.3g} %"


def _part_needs(part: Part, rc_lo: float, rc_hi: float, n_parts: int) -> str | None:
    """What one part alone would need, and its nearest series neighbours."""
    kind = part.kind
    # the time is proportional to C, and to R only in a one-resistor circuit
    if kind == "resistance" and n_parts > 2:
        return None
    lo, hi = part.value * rc_lo, part.value * rc_hi
    text = (
        f"{part.ref} would need {format_rkm(lo, kind)}…{format_rkm(hi, kind)} "
        f"(now {format_rkm(part.value, kind)})"
    )
    if part.series and not part.pinned:
        try:
            below, _ = eseries.neighbours(part.series, lo)
            _, above = eseries.neighbours(part.series, hi)
        except (KeyError, ValueError):
            return text
        text += (
            f", between the {part.series} values {_neighbour(below, part.value, kind)} and "
            f"{_neighbour(above, part.value, kind)}"
        )
    return text
