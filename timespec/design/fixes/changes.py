"""Changes of the part policies: tighter grades, steadier dielectrics, pairs, finer series.

Each :class:`Change` is an edit of a block (a :func:`dataclasses.replace` of its
resistor or capacitor policy, its pinned parts, or both) with its cost and a
sentence saying what it does.  :func:`design_changes` lists every change worth
trying for a block; :func:`combinations` forms the sets of changes that may be
applied together (never two touching the same fields), cheapest first.

The kinds of change made here (``values``, ``finer-series``, ``pairs``,
``resistor-tolerance``, ``capacitor-tolerance``, ``dielectric``,
``resistor-range``, ``capacitor-range``, ``timer-class``) are listed with their figures in
:mod:`timespec.design.fixes`; their costs are those of
:data:`timespec.design.fixes.fix.COSTS`.
"""

from __future__ import annotations

import dataclasses
import itertools
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

from timespec.design.fixes.fix import COSTS, percent
from timespec.model import Block, CapacitorPolicy, PinnedPart, ResistorPolicy, builtin_resistor_high
from timespec.numbers import format_part_value
from timespec.parts import dielectrics
from timespec.parts import series as eseries
from timespec.parts.devices import TIMER_CLASSES, TimerClass

__all__ = ["Change", "Edit", "apply_changes", "combinations", "design_changes"]

# Resistor grades: tolerance and the tempco bound that usually comes with it
# (thick film 1 % / 100 ppm/K, metal film 0.5 % / 50 ppm/K, thin film 0.1 % /
# 25 ppm/K; from memory, as RESISTOR_TCR_PPM).
_RESISTOR_GRADES: tuple[tuple[float, float], ...] = (
    (0.01, dielectrics.RESISTOR_TCR_PPM["thick film"]),
    (0.005, dielectrics.RESISTOR_TCR_PPM["metal film"]),
    (0.001, dielectrics.RESISTOR_TCR_PPM["thin film"]),
)
_CAPACITOR_GRADES: tuple[float, ...] = (0.10, 0.05, 0.02, 0.01)
# Tightest grade commonly made per dielectric family (common practice).
_TIGHTEST = {"class1": 0.01, "film": 0.01, "class2": 0.05, "electrolytic": 0.10}
# Finest series commonly stocked for capacitors (common practice).
_FINEST_CAPACITOR_SERIES = "E24"

#: An edit of a block: the block in, the modified block out.
Edit = Callable[[Block], Block]


@dataclass(frozen=True)
class Change:
    """One candidate change of a block's part policies or pinned parts.

    Attributes
    ----------
    kind
        The kind of change, a key of :data:`~timespec.design.fixes.fix.COSTS`.
    text
        What the change does, as a sentence part (``"1 % capacitors instead of 5 %"``).
    cost
        Ordinal cost of the change (several steps of a grade add up).
    apply
        The edit that makes the change.
    slot
        The fields the change touches; changes in the same slot never combine.
    """

    kind: str
    text: str
    cost: int
    apply: Edit
    slot: str  # changes in the same slot touch the same fields and never combine


def apply_changes(block: Block, changes: Sequence[Change]) -> Block:
    """Apply changes to a block, in order.

    Parameters
    ----------
    block
        The block to change.
    changes
        The changes, applied one after the other.

    Returns
    -------
    Block
        The modified block (``block`` itself when there are no changes).
    """
    out = block
    for ch in changes:
        out = ch.apply(out)
    return out


def _set_resistors(fields: Mapping[str, object], pinned: Mapping[str, float] | None = None) -> Edit:
    """An edit of the current resistor policy (and pinned resistors)."""

    def edit(block: Block) -> Block:
        pol: ResistorPolicy = dataclasses.replace(block.resistors, **fields)  # type: ignore[arg-type]
        pins = _pinned_update(block, "resistance", pinned) if pinned else block.pinned
        return dataclasses.replace(block, resistors=pol, pinned=pins)

    return edit


def _set_capacitors(
    fields: Mapping[str, object], pinned: Mapping[str, float | str] | None = None
) -> Edit:
    """An edit of the current capacitor policy (and pinned capacitors)."""

    def edit(block: Block) -> Block:
        pol: CapacitorPolicy = dataclasses.replace(block.capacitors, **fields)  # type: ignore[arg-type]
        pins = _pinned_update(block, "capacitance", pinned) if pinned else block.pinned
        return dataclasses.replace(block, capacitors=pol, pinned=pins)

    return edit


def _unpin(block: Block) -> Block:
    return dataclasses.replace(block, pinned=())


def _pinned_update(
    block: Block, kind: str, fields: Mapping[str, float | str]
) -> tuple[PinnedPart, ...]:
    out = []
    for p in block.pinned:
        if p.kind == kind:
            new = dict(fields)
            for name in ("tolerance", "tempco_ppm"):  # never loosen a pinned part's own grade
                own = getattr(p, name)
                value = new.get(name)
                if isinstance(value, float) and own is not None:
                    new[name] = min(own, value)
            p = dataclasses.replace(p, **new)  # type: ignore[arg-type]
        out.append(p)
    return tuple(out)


def _resistor_changes(block: Block) -> list[Change]:
    rp = block.resistors
    out: list[Change] = []
    steps = 0
    for tol, tc in _RESISTOR_GRADES:
        if tol >= rp.tolerance:
            continue
        steps += 1
        tempco = min(rp.tempco_ppm, tc)
        fields: dict[str, float] = {"tolerance": tol, "tempco_ppm": tempco}
        out.append(
            Change(
                "resistor-tolerance",
                f"{percent(tol)} resistors ({tempco:g} ppm/K) instead of "
                f"{percent(rp.tolerance)} ({rp.tempco_ppm:g} ppm/K)",
                COSTS["resistor-tolerance"] * steps,
                _set_resistors(fields, fields),
                "r-grade",
            )
        )
    idx = eseries.SERIES_NAMES.index(rp.series) if rp.series in eseries.SERIES_NAMES else -1
    if 0 <= idx < len(eseries.SERIES_NAMES) - 1:
        finer = eseries.SERIES_NAMES[idx + 1]
        out.append(
            Change(
                "finer-series",
                f"resistors from {finer} instead of {rp.series}",
                COSTS["finer-series"],
                _set_resistors({"series": finer}),
                "r-series",
            )
        )
    if not rp.pairs:
        out.append(
            Change(
                "pairs",
                "two standard resistors in series or parallel where one value falls between",
                COSTS["pairs"],
                _set_resistors({"pairs": True}),
                "r-pairs",
            )
        )
    return out


def _capacitor_changes(block: Block) -> list[Change]:
    cp = block.capacitors
    d = dielectrics.dielectric(cp.dielectric)
    out: list[Change] = []
    steps = 0
    for tol in _CAPACITOR_GRADES:
        if tol >= cp.tolerance:
            continue
        steps += 1
        if tol < _TIGHTEST[d.family]:
            continue
        out.append(
            Change(
                "capacitor-tolerance",
                f"{percent(tol)} capacitors instead of {percent(cp.tolerance)}",
                COSTS["capacitor-tolerance"] * steps,
                _set_capacitors({"tolerance": tol}, {"tolerance": tol}),
                "c-grade",
            )
        )
    if not d.precise or d.name in ("U2J", "PET"):
        for name, extra in (("C0G", 0), ("PP", 1)):
            new = dielectrics.dielectric(name)
            lo, hi = max(cp.low, new.min_farads), min(cp.high, new.max_farads)
            if lo > hi:
                continue
            # precise dielectrics come in 5 % or better; tighter grades cost as above
            grades = [t for t in (0.05, *_CAPACITOR_GRADES) if t <= min(cp.tolerance, 0.05)]
            for steps, tol in enumerate(sorted(set(grades), reverse=True)):
                fields: dict[str, object] = {
                    "dielectric": name,
                    "tolerance": tol,
                    "low": lo,
                    "high": hi,
                }
                out.append(
                    Change(
                        "dielectric",
                        f"{name} capacitors ({percent(tol)}) instead of {d.name} "
                        f"({percent(cp.tolerance)})",
                        COSTS["dielectric"] + extra + COSTS["capacitor-tolerance"] * steps,
                        _set_capacitors(fields, {"dielectric": name, "tolerance": tol}),
                        "c-grade",
                    )
                )
    idx = eseries.SERIES_NAMES.index(cp.series) if cp.series in eseries.SERIES_NAMES else -1
    if 0 <= idx < eseries.SERIES_NAMES.index(_FINEST_CAPACITOR_SERIES):
        finer = eseries.SERIES_NAMES[idx + 1]
        out.append(
            Change(
                "finer-series",
                f"capacitors from {finer} instead of {cp.series}",
                COSTS["finer-series"],
                _set_capacitors({"series": finer}),
                "c-series",
            )
        )
    if not cp.pairs:
        out.append(
            Change(
                "pairs",
                "two standard capacitors in parallel or series where one value falls between",
                COSTS["pairs"],
                _set_capacitors({"pairs": True}),
                "c-pairs",
            )
        )
    return out


def _range_changes(block: Block) -> list[Change]:
    rp, cp = block.resistors, block.capacitors
    return [
        Change(
            "resistor-range",
            f"resistors from {format_part_value(rp.low / 10, 'resistance')} to "
            f"{format_part_value(rp.high * 10, 'resistance')} instead of "
            f"{format_part_value(rp.low, 'resistance')} to "
            f"{format_part_value(rp.high, 'resistance')}",
            COSTS["resistor-range"],
            _set_resistors({"low": rp.low / 10, "high": rp.high * 10}),
            "r-range",
        ),
        Change(
            "capacitor-range",
            f"capacitors from {format_part_value(cp.low / 10, 'capacitance')} to "
            f"{format_part_value(cp.high * 10, 'capacitance')} instead of "
            f"{format_part_value(cp.low, 'capacitance')} to "
            f"{format_part_value(cp.high, 'capacitance')}",
            COSTS["capacitor-range"],
            _set_capacitors({"low": cp.low / 10, "high": cp.high * 10}),
            "c-range",
        ),
    ]


# Block kinds built around a 555-type timer, whose class a fix may change.
_TIMER_KINDS = frozenset({"oneshot", "astable"})


def _set_timer(new: TimerClass) -> Edit:
    """An edit to another timer class (its built-in resistor top with it).

    The resistor top follows the class only while the block's top is the built-in
    one of its current class (checked when the edit is applied, so a widened range
    from another change is kept).
    """

    def edit(block: Block) -> Block:
        supply_low = block.conditions.supply.low
        rp = block.resistors
        if rp.high == builtin_resistor_high(block.timer, supply_low):
            rp = dataclasses.replace(rp, high=builtin_resistor_high(new, supply_low))
        return dataclasses.replace(block, timer=new, resistors=rp)

    return edit


def _timer_changes(block: Block) -> list[Change]:
    """The other timer classes that take the block's whole supply range."""
    old = block.timer
    if block.kind not in _TIMER_KINDS or old is None:
        return []
    supply = block.conditions.supply
    out: list[Change] = []
    for new in TIMER_CLASSES.values():
        # the same fit test as the speed causes (timespec.design.causes)
        if new.name == old.name or not (
            new.supply_min <= supply.low and supply.high <= new.supply_max
        ):
            continue
        out.append(
            Change(
                "timer-class",
                f"the {new.name} timer class instead of {old.name} ('timer {new.name}')",
                COSTS["timer-class"],
                _set_timer(new),
                "timer",
            )
        )
    return out


def design_changes(block: Block, no_design: bool) -> list[Change]:
    """Every single change of the design worth trying for a block.

    Parameters
    ----------
    block
        The block that fails.
    no_design
        True when no candidate could be formed at all; the value ranges are then
        widened too.

    Returns
    -------
    list of Change
        New values (when parts are pinned), tighter resistors, finer series and
        pairs, tighter or steadier capacitors, another timer class that takes the
        whole supply range (one-shot and astable), and, when ``no_design``, a decade
        more range of each part.
    """
    out: list[Change] = []
    if block.pinned:
        out.append(
            Change(
                "values",
                "new standard values chosen from the policies instead of the pinned ones",
                COSTS["values"],
                _unpin,
                "values",
            )
        )
    out += _resistor_changes(block) + _capacitor_changes(block) + _timer_changes(block)
    if no_design:
        out += _range_changes(block)
    return out


def combinations(changes: Sequence[Change], most: int) -> list[tuple[Change, ...]]:
    """Every set of up to ``most`` changes of different kinds, cheapest first.

    Parameters
    ----------
    changes
        The single changes to combine.
    most
        The largest number of changes in one set.

    Returns
    -------
    list of tuple of Change
        Every set whose changes all lie in different slots, sorted by total cost,
        then by size.
    """
    combos: list[tuple[Change, ...]] = []
    for k in range(1, most + 1):
        for combo in itertools.combinations(changes, k):
            slots = [c.slot for c in combo]
            if len(set(slots)) == len(slots):
                combos.append(combo)
    combos.sort(key=lambda c: (sum(x.cost for x in c), len(c)))
    return combos
