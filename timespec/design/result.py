"""Results of solving and checking a spec.

Plain frozen dataclasses in SI floats, with properties that hand back pint
quantities for API users.  Renderers (text report, JSON, tables) read these.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from timespec.analysis import Factor, MonteCarloResult, RssResult
from timespec.families.protocol import Finding
from timespec.model import Block, Spec, Window
from timespec.parts.part import Design, Part
from timespec.units import quantity

if TYPE_CHECKING:  # pragma: no cover
    import pint

__all__ = ["BlockResult", "Candidate", "OutputResult", "Result", "Verdict"]

Verdict = str  # "meets" | "fails" | "infeasible"


@dataclass(frozen=True)
class OutputResult:
    """One computed quantity of a design, against its requirement.

    Attributes
    ----------
    name
        Output key, e.g. ``"width"``.
    kind
        Kind of quantity, e.g. ``"time"``.
    label
        Human label.
    required
        The requirement window, or ``None`` when nothing is required of it.
    nominal
        Value with every input at nominal.
    low, high
        Worst-case extremes.
    low_corner, high_corner
        Which inputs, at which ends, give the extremes.
    low_at, high_at
        The factor values at the extremes (factor name → value).
    """

    name: str
    kind: str
    label: str
    required: Window | None
    nominal: float
    low: float
    high: float
    low_corner: str = ""
    high_corner: str = ""
    low_at: Mapping[str, float] = field(default_factory=dict, compare=False, repr=False)
    high_at: Mapping[str, float] = field(default_factory=dict, compare=False, repr=False)

    @property
    def meets(self) -> bool:
        """Whether the worst-case window lies inside the requirement (True when none)."""
        if self.required is None:
            return True
        if not (math.isfinite(self.low) and math.isfinite(self.high)):
            return False
        return self.required.contains(self.low, self.high)

    @property
    def margin(self) -> tuple[float, float]:
        """Room between the worst case and the requirement at each end (negative: outside)."""
        if self.required is None:
            return (math.inf, math.inf)
        return (self.low - self.required.low, self.required.high - self.high)

    @property
    def excess(self) -> float:
        """How far the worst case pokes out of the requirement, relative to its width (0 inside).

        The farther of the two sides counts (not their sum): when no design fits, the
        closest one is the best centred, the one whose worst edge misses least.
        """
        if self.required is None:
            return 0.0
        if not (math.isfinite(self.low) and math.isfinite(self.high)):
            return math.inf
        w = self.required
        span = (
            (w.high - w.low)
            if math.isfinite(w.high - w.low) and w.high > w.low
            else abs(w.centre) or 1.0
        )
        out = max(0.0, w.low - self.low, self.high - w.high)
        return out / span

    def quantities(self) -> dict[str, pint.Quantity[Any]]:
        """Nominal and worst-case values as pint quantities.

        Returns
        -------
        dict
            ``nominal``, ``low``, ``high`` (and ``required_low``/``required_high``
            when a requirement exists).
        """
        out = {
            "nominal": quantity(self.nominal, self.kind),
            "low": quantity(self.low, self.kind),
            "high": quantity(self.high, self.kind),
        }
        if self.required is not None:
            out["required_low"] = quantity(self.required.low, self.kind)
            out["required_high"] = quantity(self.required.high, self.kind)
        return out


@dataclass(frozen=True)
class Candidate:
    """A design with its worst-case outputs, as ranked by the solver.

    Attributes
    ----------
    design
        The parts.
    outputs
        Worst-case results per output.
    findings
        Design-rule findings.
    rank_reason
        Why it ranks where it does, in a few words.
    """

    design: Design
    outputs: tuple[OutputResult, ...]
    findings: tuple[Finding, ...]
    rank_reason: str = ""

    @property
    def meets(self) -> bool:
        """Every requirement met and no design-rule error."""
        return all(o.meets for o in self.outputs) and not any(
            f.severity == "error" for f in self.findings
        )

    @property
    def excess(self) -> float:
        """Largest relative excursion outside a requirement (0 when all are met)."""
        return max((o.excess for o in self.outputs), default=0.0)

    def output(self, name: str) -> OutputResult:
        """Return one output by name.

        Parameters
        ----------
        name
            Output key.

        Returns
        -------
        OutputResult
            The output.

        Raises
        ------
        KeyError
            When there is no such output.
        """
        for o in self.outputs:
            if o.name == name:
                return o
        raise KeyError(name)


@dataclass(frozen=True)
class BlockResult:
    """The outcome for one block.

    Attributes
    ----------
    block
        The block as parsed.
    verdict
        ``"meets"``: the design meets every requirement at worst case;
        ``"fails"``: the pinned design does not; ``"infeasible"``: no design
        from the allowed parts does (``best`` is then the closest one).
    mode
        ``"solved"`` when parts were chosen, ``"checked"`` when all were pinned.
    best
        The chosen (or pinned, or closest) design with its results, or ``None``
        when no candidate could be formed at all.
    alternatives
        Runner-up designs, best first.
    factors
        The varying inputs of the best design.
    rss
        First-order statistics per output (filled by the analysis step).
    monte_carlo
        Monte Carlo statistics (filled by the analysis step).
    notes
        Plain-language notes (why infeasible, what was searched).
    """

    block: Block
    verdict: Verdict
    mode: str
    best: Candidate | None
    alternatives: tuple[Candidate, ...] = ()
    factors: tuple[Factor, ...] = ()
    rss: Mapping[str, RssResult] = field(default_factory=dict)
    monte_carlo: MonteCarloResult | None = None
    notes: tuple[str, ...] = ()
    extra: Mapping[str, Any] = field(default_factory=dict)

    @property
    def parts(self) -> tuple[Part, ...]:
        """The parts of the best design (empty when there is none)."""
        return self.best.design.parts if self.best is not None else ()

    def part_values(self) -> dict[str, pint.Quantity[Any]]:
        """Part values as pint quantities, by reference.

        Returns
        -------
        dict
            ref → quantity (Ω or F).
        """
        return {p.ref: quantity(p.value, p.kind) for p in self.parts}


@dataclass(frozen=True)
class Result:
    """The outcome for a whole spec.

    Attributes
    ----------
    spec
        The spec.
    blocks
        One result per block, in order.
    """

    spec: Spec
    blocks: tuple[BlockResult, ...]

    @property
    def ok(self) -> bool:
        """Whether every block meets its requirements."""
        return all(b.verdict == "meets" for b in self.blocks)

    def block(self, name: str) -> BlockResult:
        """Return the result of the named block.

        Parameters
        ----------
        name
            Block name.

        Returns
        -------
        BlockResult
            The result.

        Raises
        ------
        KeyError
            When no block has that name.
        """
        for b in self.blocks:
            if b.block.name == name:
                return b
        raise KeyError(name)
