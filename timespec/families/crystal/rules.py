"""Design rules of a Pierce oscillator: load against stray, gain margin, drive level."""

from __future__ import annotations

import math
from collections.abc import Mapping

from timespec.families.crystal.settings import (
    MIN_GAIN_MARGIN,
    allowed_values,
    ohms,
    pf,
)
from timespec.families.protocol import Finding
from timespec.model import Block, CapacitorPolicy, Window
from timespec.parts import series
from timespec.parts.part import Part
from timespec.physics import pierce

__all__ = ["drive_findings", "gain_findings", "load_findings"]


def load_findings(
    block: Block, cl_spec: float, s: Window, policy: CapacitorPolicy
) -> list[Finding]:
    """Findings on the crystal's load against the stray capacitance."""
    smallest = float(allowed_values(policy)[0]) if allowed_values(policy).size else policy.low
    where = "" if block.window("stray") is not None else " (assumed; state 'stray' to set it)"
    if cl_spec <= s.centre:
        need_load = s.high + smallest / 2.0
        need_stray = cl_spec - smallest / 2.0
        lower = (
            f"or cut the stray below {pf(need_stray)} (shorter traces, smaller pads)"
            if need_stray > 0
            else "no realistic stray is small enough for this crystal"
        )
        return [
            Finding(
                "error",
                "load-below-stray",
                f"the crystal wants a load of {pf(cl_spec)} but the stray capacitance alone is "
                f"{pf(s.low)}…{pf(s.high)}{where}: C1·C2/(C1 + C2) would have to be "
                f"{pf(cl_spec - s.centre)} or less, i.e. negative. Choose a crystal specified "
                f"for a load of at least {pf(need_load)} {lower}.",
            )
        ]
    if cl_spec < s.high:
        return [
            Finding(
                "warning",
                "load-near-stray",
                f"the crystal's load {pf(cl_spec)} is below the highest stray {pf(s.high)}"
                f"{where}: on a board at that stray no capacitor value reaches the load, and the "
                "pulling term carries it. A crystal for a larger load is more robust.",
            )
        ]
    return []


def gain_findings(block: Block, extremes: Mapping[str, tuple[float, float]]) -> list[Finding]:
    """Findings on the worst-case gain margin (or the gm it needs)."""
    gm = block.number("gm")
    if gm is None:
        need = extremes["gm_needed"][1]
        return [
            Finding(
                "note",
                "gm-needed",
                f"the amplifier needs gm ≥ {need * 1e3:.3g} mA/V for a gain margin of "
                f"{MIN_GAIN_MARGIN:g} at worst case (common practice); state 'gm' to check it.",
            )
        ]
    low = extremes["gain_margin"][0]
    if low >= MIN_GAIN_MARGIN:
        return []
    gm_crit = gm / low if low > 0 else math.inf
    return [
        Finding(
            "error",
            "low-gain-margin",
            f"the gain margin falls to {low:.3g} at worst case (gm {gm * 1e3:.3g} mA/V over "
            f"gm_crit {gm_crit * 1e3:.3g} mA/V); at least {MIN_GAIN_MARGIN:g} is common practice "
            "for reliable start-up. Use an amplifier with gm ≥ "
            f"{MIN_GAIN_MARGIN * gm_crit * 1e3:.3g} mA/V, a crystal with lower ESR, "
            "or a crystal for a smaller load (smaller C1, C2).",
        )
    ]


def drive_findings(
    block: Block,
    extremes: Mapping[str, tuple[float, float]],
    f: float,
    c1: Part,
    c2: Part,
) -> list[Finding]:
    """Findings on the worst-case drive level against the crystal's limit.

    The drive level (``extremes["drive"]``) is computed from the swing at the
    amplifier OUTPUT node (``swing``, or the supply rail to rail); the crystal sees
    about ``1 + C2/C1`` times that swing (:func:`timespec.physics.pierce.crystal_swing`).
    """
    limit = block.number("drive")
    high = extremes["drive"][1]
    if limit is None or high <= limit:
        return []
    r = float(pierce.series_resistor(f, c2.value))
    r_std = series.nearest("E12", r)
    swing = block.number("swing")
    share = 1.0 + c2.value / c1.value
    basis = (
        f"a {swing:g} Vpp swing at the amplifier output"
        if swing is not None
        else f"a rail-to-rail output swing of up to {block.conditions.supply.high:g} V "
        "(state 'swing')"
    )
    basis += f", about {share:.3g}× that across the crystal (1 + C2/C1)"
    return [
        Finding(
            "error",
            "overdrive",
            f"the crystal may dissipate {high * 1e6:.4g} µW with {basis}, above its "
            f"{limit * 1e6:.3g} µW limit. Add a series resistor of about "
            f"{ohms(r_std)} (the reactance of C2 = {pf(c2.value)} at "
            f"{f / 1e6:.6g} MHz, a starting value) between the amplifier output and C2, then "
            "confirm the drive on the bench; it also lowers the gain margin.",
        )
    ]
