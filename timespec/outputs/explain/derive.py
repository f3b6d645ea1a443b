"""From a solved result to a derivation: formula, inputs and symbols at each corner.

:func:`derive` is pure: it reads a :class:`~timespec.design.result.Result`, builds
the three points of each output (nominal, and the low and high corners the
worst-case search found, from :attr:`~timespec.design.result.OutputResult.low_at`
and ``high_at``), evaluates the family's own ``evaluate`` there (the printed
result is the model's number, and it is checked against the solver's) and the
symbols of the family's formula (:mod:`timespec.outputs.explain.formulas`), and
collects the class constants with their sources
(:mod:`timespec.outputs.explain.constants`).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from timespec.analysis import Factor, nominal_inputs
from timespec.design.result import BlockResult, OutputResult, Result
from timespec.families import family
from timespec.families.protocol import Finding, FloatArray
from timespec.model import Block, Window
from timespec.numbers import format_part
from timespec.outputs.explain.constants import Constant, block_constants
from timespec.outputs.explain.formulas import Formula, formula, part_line

__all__ = [
    "CORNERS",
    "BlockDerivation",
    "Derivation",
    "Input",
    "OutputDerivation",
    "Symbol",
    "derive",
    "derive_block",
    "factor_kind",
]

#: The three points of every output, in the order of every ``values`` tuple.
CORNERS = ("nominal", "low", "high")

Triple = tuple[float, float, float]


@dataclass(frozen=True)
class Input:
    """One factor of the design at the three points.

    Attributes
    ----------
    name
        Factor name (``"R.tol"``, ``"supply"``).
    label
        What it is and its range, as the factor describes itself.
    kind
        Kind of quantity for formatting (see ``factor_kind``).
    values
        Value at nominal, at the low corner and at the high corner.
    """

    name: str
    label: str
    kind: str | None
    values: Triple


@dataclass(frozen=True)
class Symbol:
    """One symbol of the formula at the three points.

    Attributes
    ----------
    symbol
        As written in the formula.
    meaning
        What it is.
    kind
        Kind of quantity for formatting.
    values
        Value at nominal, at the low corner and at the high corner.
    """

    symbol: str
    meaning: str
    kind: str | None
    values: Triple


@dataclass(frozen=True)
class OutputDerivation:
    """How one output is computed, with every number at nominal and at both corners.

    Attributes
    ----------
    name, label, kind
        The output (``"width"``, ``"pulse width"``, ``"time"``).
    required
        The requirement window, or ``None``.
    head
        The line that gives the output from the symbols (empty when the family
        has no formula here: then only the inputs are listed).
    lines
        The equations the head rests on.
    notes
        Words on the parts of the law not written as equations.
    parts
        The lines that turn each part's value into its value at a corner.
    inputs
        Every factor at the three points.
    symbols
        Every symbol of the formula at the three points.
    results
        The output from the family's own model at the three points.
    solver
        The solver's nominal, low and high (equal to ``results``; kept to show it).
    low_corner, high_corner
        The solver's description of the two corners.
    meets
        Whether the worst case lies inside the requirement.
    """

    name: str
    label: str
    kind: str
    required: Window | None
    head: str
    lines: tuple[str, ...]
    notes: tuple[str, ...]
    parts: tuple[str, ...]
    inputs: tuple[Input, ...]
    symbols: tuple[Symbol, ...]
    results: Triple
    solver: Triple
    low_corner: str
    high_corner: str
    meets: bool

    def symbol(self, name: str) -> Symbol:
        """Return one symbol by name.

        Parameters
        ----------
        name
            The symbol as written in the formula.

        Returns
        -------
        Symbol
            The symbol.

        Raises
        ------
        KeyError
            When the formula has no such symbol.
        """
        for s in self.symbols:
            if s.symbol == name:
                return s
        raise KeyError(name)

    @property
    def agrees(self) -> bool:
        """Whether the model at the corners gives the solver's numbers (1e-12 relative)."""
        return all(_close(a, b) for a, b in zip(self.results, self.solver, strict=True))


@dataclass(frozen=True)
class BlockDerivation:
    """The derivation of one block.

    Attributes
    ----------
    name, kind
        The block.
    verdict
        ``"meets"``, ``"fails"`` or ``"infeasible"``.
    variant
        The circuit variant (astable), or ``""``.
    parts
        The chosen (or pinned, or closest) parts, formatted.
    outputs
        One derivation per output.
    constants
        The class constants the model uses, with sources.
    findings
        The design-rule findings of the design.
    notes
        The solver's notes (why infeasible, conditions left out).
    """

    name: str
    kind: str
    verdict: str
    variant: str
    parts: tuple[str, ...]
    outputs: tuple[OutputDerivation, ...]
    constants: tuple[Constant, ...]
    findings: tuple[Finding, ...]
    notes: tuple[str, ...]

    def output(self, name: str) -> OutputDerivation:
        """Return one output's derivation by name.

        Parameters
        ----------
        name
            Output key.

        Returns
        -------
        OutputDerivation
            The derivation.

        Raises
        ------
        KeyError
            When the block has no such output.
        """
        for o in self.outputs:
            if o.name == name:
                return o
        raise KeyError(name)


@dataclass(frozen=True)
class Derivation:
    """The derivation of a spec (or of the blocks asked for).

    Attributes
    ----------
    source
        The spec's file name, or ``""``.
    blocks
        One derivation per block, in order.
    """

    source: str
    blocks: tuple[BlockDerivation, ...]

    @property
    def ok(self) -> bool:
        """Whether every block shown meets its requirements."""
        return all(b.verdict == "meets" for b in self.blocks)


def _close(a: float, b: float) -> bool:
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    if math.isinf(a) or math.isinf(b):
        return a == b
    return abs(a - b) <= 1e-12 * max(abs(a), abs(b)) + 1e-300


_FIXED_KINDS: Mapping[str, str | None] = {
    "temp": "temperature",
    "supply": "voltage",
    "supply.nominal": "voltage",
    "control": "voltage",
    "timer.ratio": None,
    "timer.drift": "ppm/K",
    "timer.vco": None,
    "timer.ron": "resistance",
    "timer.ith": "current",
    "timer.delay": "time",
    "gate.delay": "time",
    "gate.hysteresis": None,
    "gate.centre": None,
    "leak": "current",
    "stray": "capacitance",
    "diode.is": "current",
    "diode.n": None,
    "diode.v25": "voltage",
    "diode.tc": None,
    "output.drop": "voltage",
    "output.low": "voltage",
    "output.roh": "resistance",
    "output.rol": "resistance",
}


def factor_kind(block: Block, factor: Factor, part_kinds: Mapping[str, str]) -> str | None:
    """How a factor's value is shown: its kind of quantity.

    Parameters
    ----------
    block
        The block (a threshold in volts or as a share of the supply).
    factor
        The factor.
    part_kinds
        Part reference → ``"resistance"`` or ``"capacitance"``.

    Returns
    -------
    str or None
        A kind of :data:`timespec.units.KINDS`, ``"ppm/K"``, ``"ppm"`` (a crystal's
        frequency terms) or ``None`` for a plain number.
    """
    name = factor.name
    if name in _FIXED_KINDS:
        return _FIXED_KINDS[name]
    if name == "threshold":
        win = block.window("threshold")
        return "voltage" if win is not None and win.kind == "voltage" else None
    if name.startswith("xtal."):
        return "ppm"
    ref, _, what = name.rpartition(".")
    if what == "value":
        return part_kinds.get(ref)
    if what == "tc":
        return "ppm/K"
    if what in ("tol", "drift", "age", "bias"):
        return "ratio"
    return None


def _points(factors: Sequence[Factor], out: OutputResult) -> dict[str, FloatArray]:
    """Factor samples at nominal, the low corner and the high corner (one row each)."""
    nominal = {k: float(v.reshape(-1)[0]) for k, v in nominal_inputs(list(factors)).items()}
    x: dict[str, FloatArray] = {}
    for name, nom in nominal.items():
        x[name] = np.array(
            [nom, out.low_at.get(name, nom), out.high_at.get(name, nom)], dtype=np.float64
        )
    return x


def _triple(a: object) -> Triple:
    v = np.broadcast_to(np.asarray(a, dtype=np.float64).reshape(-1), (3,))
    return (float(v[0]), float(v[1]), float(v[2]))


def _output(
    b: BlockResult, out: OutputResult, factors: Sequence[Factor], law: Formula | None
) -> OutputDerivation:
    assert b.best is not None
    block, design = b.block, b.best.design
    x = _points(factors, out)
    with np.errstate(all="ignore"):
        model = family(block.kind).evaluate(block, design.variant)(x)
        values = law.values(x) if law is not None else {}
    part_kinds = {p.ref: p.kind for p in design.parts}
    inputs = tuple(
        Input(f.name, f.label, factor_kind(block, f, part_kinds), _triple(x[f.name]))
        for f in factors
    )
    symbols: tuple[Symbol, ...] = ()
    head = ""
    lines: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()
    if law is not None and out.name in law.heads:
        head, lines, notes = law.heads[out.name], law.lines, law.notes
        symbols = tuple(
            Symbol(t.symbol, t.meaning, t.kind, _triple(values[t.symbol]))
            for t in law.terms
            if t.symbol in values
        )
    names = frozenset(f.name for f in factors)
    return OutputDerivation(
        name=out.name,
        label=out.label,
        kind=out.kind,
        required=out.required,
        head=head,
        lines=lines,
        notes=notes,
        parts=tuple(part_line(p, names) for p in design.parts),
        inputs=inputs,
        symbols=symbols,
        results=_triple(model[out.name]),
        solver=(out.nominal, out.low, out.high),
        low_corner=out.low_corner,
        high_corner=out.high_corner,
        meets=out.meets,
    )


def derive_block(b: BlockResult) -> BlockDerivation:
    """The derivation of one solved block.

    Parameters
    ----------
    b
        The block's result.

    Returns
    -------
    BlockDerivation
        Formula, inputs, symbols and results of each output, the constants and
        their sources, findings and notes; no outputs when no design was formed.
    """
    block = b.block
    if b.best is None:
        return BlockDerivation(block.name, block.kind, b.verdict, "", (), (), (), (), b.notes)
    design = b.best.design
    factors = list(b.factors) or family(block.kind).factors(block, design)
    law = formula(block, design)
    outputs = tuple(_output(b, o, factors, law) for o in b.best.outputs)
    return BlockDerivation(
        name=block.name,
        kind=block.kind,
        verdict=b.verdict,
        variant=design.variant,
        parts=tuple(format_part(p) for p in design.parts),
        outputs=outputs,
        constants=block_constants(block, design),
        findings=b.best.findings,
        notes=b.notes,
    )


def derive(result: Result, blocks: Sequence[str] | None = None) -> Derivation:
    """The derivation of every (or the named) block of a solved spec.

    Parameters
    ----------
    result
        A solved spec (:func:`timespec.solve`; statistics are not needed).
    blocks
        Block names to explain, in order; ``None`` for all.

    Returns
    -------
    Derivation
        One block derivation per block.

    Raises
    ------
    KeyError
        When a named block is not in the result.
    """
    chosen = [result.block(n) for n in blocks] if blocks is not None else list(result.blocks)
    return Derivation(result.spec.path or "", tuple(derive_block(b) for b in chosen))
