"""``timespec explain``: the derivation of each output, so a reviewer can follow it.

For every output of every (or the named) block: the formula the family's model
applies (strays, delays, drains, diode drops, class-2 losses, the timer's drift
written out), every factor and every symbol at nominal and at the low and high
corners the worst-case search found, the substituted lines, the result (the
model's own number, checked against the solver's), and each device-class
constant with its source mark and the range where it holds.

:func:`derive` builds the structured :class:`Derivation` from a solved
:class:`~timespec.design.result.Result`; :func:`render_derivation` writes it as
plain text, reStructuredText or Markdown.
"""

from __future__ import annotations

from timespec.outputs.explain.constants import Constant, block_constants
from timespec.outputs.explain.derive import (
    CORNERS,
    BlockDerivation,
    Derivation,
    Input,
    OutputDerivation,
    Symbol,
    derive,
    derive_block,
)
from timespec.outputs.explain.formulas import Formula, Term, formula
from timespec.outputs.explain.render import FORMS, format_value, render_derivation, substitute
from timespec.outputs.explain.select import check_blocks, explain_spec

__all__ = [
    "CORNERS",
    "FORMS",
    "BlockDerivation",
    "Constant",
    "Derivation",
    "Formula",
    "Input",
    "OutputDerivation",
    "Symbol",
    "Term",
    "block_constants",
    "check_blocks",
    "derive",
    "derive_block",
    "explain_spec",
    "format_value",
    "formula",
    "render_derivation",
    "substitute",
]
