"""Why no candidate came near: what the allowed value ranges can reach, in numbers.

When a family finds no candidate at all, the cause is nearly always the value
ranges of the part policies: the requirement asks for a time constant the
allowed resistors and capacitors cannot make.  This module evaluates the
family's own nominal model at the two ends of the ranges (every resistor at its
smallest value with the smallest capacitor, and at its largest with the largest
capacitor) and says what the requirement needs instead: the time scales with
``R·C``, so the capacitor it would take at the largest resistor (or the
resistor at the largest capacitor) follows in proportion.
"""

from __future__ import annotations

import math

import numpy as np

from timespec.analysis import nominal_inputs
from timespec.families import family
from timespec.families.candidates import capacitor_part, resistor_part
from timespec.families.goals import target
from timespec.model import Block, CapacitorPolicy
from timespec.numbers import format_quantity
from timespec.parts.part import Design
from timespec.parts.rkm import format_rkm

__all__ = ["range_cause"]

#: Resistor references of a whole circuit, per kind (the astable: its classic circuit).
_RESISTORS: dict[str, tuple[str, ...]] = {
    "oneshot": ("R",),
    "astable": ("RA", "RB"),
    "delay": ("R",),
    "relaxation": ("R",),
}
_VARIANT = {"astable": "classic"}
#: Requirements that scale with R·C (frequency as its inverse).
_SCALING = ("width", "delay", "period", "high", "low", "frequency")


def _nominal(
    block: Block, r: float, c: float, quantity: str, policy: CapacitorPolicy | None = None
) -> float:
    """The family's nominal ``quantity`` with every resistor at ``r`` and C at ``c``."""
    fam = family(block.kind)
    parts = [resistor_part(ref, r, block.resistors) for ref in _RESISTORS[block.kind]]
    parts.append(capacitor_part("C", c, policy or block.capacitors))
    design = Design(tuple(parts), _VARIANT.get(block.kind, ""))
    x = nominal_inputs(fam.factors(block, design))
    with np.errstate(all="ignore"):
        out = fam.evaluate(block, design.variant)(x)
    return float(np.asarray(out[quantity]).ravel()[0])


def range_cause(block: Block) -> str | None:
    """The binding cause of an empty candidate list, with numbers, or ``None``.

    Parameters
    ----------
    block
        An RC block (one-shot, astable, delay, relaxation) whose family found no
        candidate.  With several capacitor technologies
        (:meth:`~timespec.model.Block.capacitor_policies`) the parts reach from the
        smallest capacitor of any of them to the largest of any.

    Returns
    -------
    str or None
        E.g. ``"the width needs about 600 s, but the allowed parts reach 110 ns …
        110 ms (R 1k…1M, C 100p…100n): it takes C ≈ 550 µF at R = 1 MΩ, or R ≈ 5.5
        GΩ at C = 100 nF; widen the capacitor range (an electrolytic or film part)"``;
        ``None`` when the ranges do reach the requirement (the cause lies elsewhere)
        or the block is not an RC block.
    """
    if block.kind not in _RESISTORS:
        return None
    req = next((r for r in block.requirements if r.quantity in _SCALING), None)
    if req is None:
        return None
    goal = target(req.window)
    rp = block.resistors
    policies = block.capacitor_policies()
    c_low = min(policies, key=lambda p: p.low)
    c_high = max(policies, key=lambda p: p.high)
    lo = _nominal(block, rp.low, c_low.low, req.quantity, c_low)
    hi = _nominal(block, rp.high, c_high.high, req.quantity, c_high)
    if not (math.isfinite(goal) and goal > 0 and all(math.isfinite(v) and v > 0 for v in (lo, hi))):
        return None
    # frequency falls as R·C grows: compare in time scale (1/f)
    inverse = req.quantity == "frequency"
    scale_lo, scale_hi = (1 / lo, 1 / hi) if inverse else (lo, hi)
    need = 1 / goal if inverse else goal
    if scale_lo <= need <= scale_hi:
        return None
    kind = "frequency" if inverse else "time"
    reach = f"{format_quantity(min(lo, hi), kind)} … {format_quantity(max(lo, hi), kind)}"
    c_ranges = ", ".join(
        f"{format_rkm(p.low, 'capacitance')}…{format_rkm(p.high, 'capacitance')}"
        + (f" {p.dielectric}" if len(policies) > 1 else "")
        for p in policies
    )
    ranges = (
        f"R {format_rkm(rp.low, 'resistance')}…{format_rkm(rp.high, 'resistance')}, C {c_ranges}"
    )
    if need > scale_hi:
        ratio = need / scale_hi
        c_need, r_need = c_high.high * ratio, rp.high * ratio
        at = (
            f"C ≈ {format_quantity(c_need, 'capacitance')} at R = "
            f"{format_quantity(rp.high, 'resistance')}, or R ≈ "
            f"{format_quantity(r_need, 'resistance')} at C = "
            f"{format_quantity(c_high.high, 'capacitance')}"
        )
        fix = "widen the capacitor range upward (a film or electrolytic part) or the resistor range"
    else:
        ratio = need / scale_lo
        c_need, r_need = c_low.low * ratio, rp.low * ratio
        at = (
            f"C ≈ {format_quantity(c_need, 'capacitance')} at R = "
            f"{format_quantity(rp.low, 'resistance')}, or R ≈ "
            f"{format_quantity(r_need, 'resistance')} at C = "
            f"{format_quantity(c_low.low, 'capacitance')}"
        )
        fix = "widen the capacitor or resistor range downward"
    label = req.quantity
    return (
        f"the {label} needs about {format_quantity(goal, kind)}, but the allowed parts reach "
        f"only {reach} ({ranges}): it takes {at}; {fix}"
    )
