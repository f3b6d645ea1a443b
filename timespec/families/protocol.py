"""What a circuit family is: the protocol, its outputs and its design-rule findings.

A *family* (one module per circuit kind) turns a :class:`~timespec.model.Block`
into three things the generic solver and analysis need:

* candidate designs (parts chosen from the policies, narrowed analytically);
* the varying inputs, as :class:`~timespec.analysis.Factor` objects;
* a vectorised ``evaluate`` that maps factor samples to the measured outputs.

Part values enter ``evaluate`` as *fixed* factors named ``"<ref>.value"``, so one
``evaluate`` serves a whole batch of candidate designs at once (the solver passes
arrays of values).  The shared kit lives beside this module:
:mod:`~timespec.families.candidates` (parts from the policies),
:mod:`~timespec.families.inputs` (factors for parts, conditions and timer classes),
:mod:`~timespec.families.capacitors` (leakage and dielectric rules) and
:mod:`~timespec.families.goals` (where a design should aim).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import Protocol

import numpy as np
import numpy.typing as npt

from timespec.analysis import Factor
from timespec.model import Block
from timespec.parts.part import Design

__all__ = ["Evaluate", "Family", "Finding", "FloatArray", "Inputs", "Output"]

FloatArray = npt.NDArray[np.float64]
Inputs = Mapping[str, FloatArray]
Evaluate = Callable[[Inputs], dict[str, FloatArray]]


@dataclass(frozen=True)
class Finding:
    """A design-rule finding.

    Attributes
    ----------
    severity
        ``"error"`` (the design cannot work as required), ``"warning"`` (it works
        but something is fragile) or ``"note"``.
    code
        Stable short name, e.g. ``"trigger-outlasts-pulse"``.
    message
        What was found and what to do.
    """

    severity: str
    code: str
    message: str


@dataclass(frozen=True)
class Output:
    """A quantity a family computes.

    Attributes
    ----------
    name
        Output key, e.g. ``"width"``.
    kind
        Kind of quantity, e.g. ``"time"``.
    label
        Human label.
    """

    name: str
    kind: str
    label: str


class Family(Protocol):
    """What a circuit family provides to the solver and analysis."""

    kind: str

    def outputs(self, block: Block) -> tuple[Output, ...]:
        """Outputs computed for the block (requirements refer to these names)."""

    def candidates(self, block: Block) -> list[Design]:
        """Candidate designs, narrowed analytically, pinned parts honoured."""

    def factors(self, block: Block, design: Design) -> list[Factor]:
        """Varying inputs for a design (part values as fixed ``<ref>.value`` factors)."""

    def evaluate(self, block: Block, variant: str) -> Evaluate:
        """Vectorised model of the circuit variant."""

    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design-rule findings, given the worst-case extremes of each output."""
