"""A quick bound before a re-solve: can a changed block's spread fit its window at all?

Re-solving a modified block costs a full candidate search and worst case (a tenth
to a fifth of a second for an astable); most combinations the fix search forms
cannot work, because the worst-case *spread* their parts give is still wider than
the window, however well the solver centres it.  The spread of a design depends
on the grades of its parts (tolerance, tempco, dielectric), the timer class and
the conditions, and only weakly on its values.  So the closest design of the
failing block, re-graded to the modified block's policies with its values kept,
gives the spread a re-solve would find: one worst case of one design (a few
milliseconds) instead of a search.

:func:`cannot_fit` says a combination cannot fit when that predicted spread
exceeds the window's width by more than :data:`SLACK`.  The bound only ever
*skips* a re-solve; every fix offered is still re-solved in full, so a verdict
never rests on the prediction.  The slack covers the solver's freedom to pick
other values (the spread of an RC time moves with them only through second-order
terms such as the threshold current and the output delay, a few per cent of the
spread); it trades a rare missed fix for speed, never a wrong one.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Iterable

from timespec.analysis import worst_case
from timespec.design.result import Candidate
from timespec.families import family
from timespec.families.candidates import capacitor_part, resistor_part
from timespec.model import Block, Window
from timespec.parts.part import Design, Part

__all__ = ["SLACK", "SearchMemo", "cannot_fit", "regraded"]

#: How much wider than the window the predicted spread may be before a combination is
#: skipped without a re-solve (a share of the window's width).
SLACK = 0.10


def regraded(block: Block, design: Design) -> Design | None:
    """A design's values with the grades a (modified) block gives its parts.

    Parameters
    ----------
    block
        The modified block (its policies and pinned parts set the grades).
    design
        The closest design of the original block.

    Returns
    -------
    Design or None
        The same values and variant, each part made again from the block's policy or
        pinned part; ``None`` when a part is a series/parallel pair (its two values
        are the solver's choice, not a grade).
    """
    parts: list[Part] = []
    for p in design.parts:
        if p.pair is not None:
            return None
        pinned = block.pinned_part(p.ref)
        if p.kind == "resistance":
            parts.append(resistor_part(p.ref, p.value, block.resistors, pinned))
        else:
            parts.append(capacitor_part(p.ref, p.value, block.capacitors, pinned))
    return Design(tuple(parts), design.variant)


def _relative(low: float, high: float) -> float | None:
    """Width over middle, or ``None`` when the middle is not positive."""
    mid = 0.5 * (low + high)
    return (high - low) / mid if mid > 0 else None


def _too_wide(outputs: Iterable[tuple[Window | None, float, float]], slack: float = SLACK) -> bool:
    """Some output's relative spread exceeds its window's by more than the slack.

    Relative, because the closest design of a failing block may sit far from the
    window's middle (a 0.63 Hz design for a 1 Hz window): its spread scales with its
    own value, and the solver's re-centred design carries the same relative spread.

    Parameters
    ----------
    outputs
        ``(required window or None, worst-case low, worst-case high)`` per output.
    slack
        Share of the window's relative width allowed beyond it.
    """
    for w, low, high in outputs:
        if w is None or not (math.isfinite(w.low) and math.isfinite(w.high)):
            continue
        if not (math.isfinite(low) and math.isfinite(high)):
            return False  # a stalled or runaway corner: let the solver decide
        have, allowed = _relative(low, high), _relative(w.low, w.high)
        if have is not None and allowed is not None and have > allowed * (1.0 + slack):
            return True
    return False


def cannot_fit(block: Block, closest: Candidate | None) -> bool:
    """True when a modified block's spread surely exceeds its window.

    Parameters
    ----------
    block
        The modified block.
    closest
        The closest design of the failing block, or ``None`` (no prediction).

    Returns
    -------
    bool
        True when the closest design, re-graded to ``block``, has a worst-case
        spread wider than a two-sided window by more than :data:`SLACK` on some
        output (its worst case only: no design rules, no statistics); False when it
        fits, when nothing can be predicted (no design, a pair, a crystal) or when a
        corner is not finite.
    """
    if closest is None or block.kind == "crystal":
        return False
    design = regraded(block, closest.design)
    if design is None:
        return False
    return _predicted_too_wide(block, design)


def _predicted_too_wide(block: Block, design: Design) -> bool:
    """One worst case of one design (no design rules, no statistics) against the windows."""
    fam = family(block.kind)
    try:
        extremes = worst_case(fam.factors(block, design), fam.evaluate(block, design.variant))
    except (ValueError, ArithmeticError):  # pragma: no cover - a model refusing the parts
        return False
    outs = (
        (r.window, extremes[r.quantity].low, extremes[r.quantity].high)
        for r in block.requirements
        if r.quantity in extremes
    )
    return _too_wide(outs)


def _floor_too_wide(block: Block, closest: Candidate | None) -> bool:
    """The closest design with ideal parts (no tolerance, tempco, drift or ageing; C0G
    capacitors) is still too wide: the spread is the classes' and conditions' own."""
    if closest is None or block.kind == "crystal" or any(p.pair for p in closest.design.parts):
        return False
    ideal = tuple(
        dataclasses.replace(
            p,
            tolerance=0.0,
            tempco_ppm=0.0 if p.kind == "resistance" else p.tempco_ppm,
            dielectric="C0G" if p.kind == "capacitance" else p.dielectric,
            ageing=0.0,
            pinned=False,
        )
        for p in closest.design.parts
    )
    bare = dataclasses.replace(block, pinned=())
    return _predicted_too_wide(bare, Design(ideal, closest.design.variant))


def _grades(block: Block) -> tuple[object, ...]:
    """What sets a block's spread: its grades, classes and pinned parts, not its series,
    pairs or value ranges (those move only the centring)."""
    r = dataclasses.replace(block.resistors, series="E96", low=1.0, high=1.0, pairs=False)
    c = dataclasses.replace(block.capacitors, series="E12", low=1.0, high=1.0, pairs=False)
    return (r, c, block.timer, block.gate, block.pinned, block.conditions)


def _reach(block: Block) -> tuple[object, ...]:
    """What sets whether any candidate can be formed: the ranges, pairs and classes."""
    r, c = block.resistors, block.capacitors
    return (r.low, r.high, r.pairs, c.low, c.high, c.pairs, c.dielectric, block.timer, block.pinned)


@dataclasses.dataclass
class SearchMemo:
    """What the re-solves of one fix search have shown, to skip the ones they settle.

    * a modified block whose re-solved best design has a relative spread wider than
      the window settles every block of the same grades (tolerances, tempcos,
      dielectric, classes, pinned parts, conditions): finer
      series, pairs or ranges only re-centre;
    * a modified block with no candidate at all settles every block of the same
      ranges, pairs and classes (a finer series reaches no further).

    Like :func:`cannot_fit`, it only skips re-solves; what is offered is re-solved.
    """

    wide: set[tuple[object, ...]] = dataclasses.field(default_factory=set)
    unreachable: set[tuple[object, ...]] = dataclasses.field(default_factory=set)
    predicted: dict[tuple[object, ...], bool] = dataclasses.field(default_factory=dict)

    def cannot_fit(self, block: Block, closest: Candidate | None) -> bool:
        """:func:`cannot_fit`, once per set of grades (series, pairs and ranges aside).

        Parameters
        ----------
        block
            The modified block.
        closest
            The closest design of the failing block, or ``None``.

        Returns
        -------
        bool
            As :func:`cannot_fit`.
        """
        floor = (block.timer, block.gate, block.conditions)
        floor_key = ("ideal parts", *floor)
        if floor_key not in self.predicted:
            self.predicted[floor_key] = _floor_too_wide(block, closest)
        if self.predicted[floor_key]:
            return True  # even ideal parts leave too much spread: no grade can help
        key = _grades(block)
        if key not in self.predicted:
            self.predicted[key] = cannot_fit(block, closest)
        return self.predicted[key]

    def settled(self, block: Block) -> bool:
        """True when an earlier re-solve already shows this block cannot meet.

        Parameters
        ----------
        block
            A modified block about to be re-solved.

        Returns
        -------
        bool
            Whether to skip it.
        """
        return _grades(block) in self.wide or _reach(block) in self.unreachable

    def learn(self, block: Block, best: Candidate | None) -> None:
        """Record what a failed re-solve shows.

        Parameters
        ----------
        block
            The modified block re-solved.
        best
            Its best design, or ``None`` when it had no candidate.
        """
        if best is None:
            self.unreachable.add(_reach(block))
        elif _too_wide(((o.required, o.low, o.high) for o in best.outputs), slack=0.0):
            self.wide.add(_grades(block))
