"""Capacitors as real parts: leakage a designer need not state, and dielectric rules."""

from __future__ import annotations

from timespec.families.protocol import Finding
from timespec.model import Block
from timespec.parts import dielectrics
from timespec.parts.part import Design, Part
from timespec.parts.rkm import format_rkm

__all__ = [
    "ELECTROLYTIC_RATING_FACTOR",
    "capacitor_leakage",
    "dielectric_findings",
    "node_leakage",
]

#: Rated voltage assumed for an electrolytic, as a multiple of the highest supply
#: (common practice: derate the working voltage to about half the rating).
ELECTROLYTIC_RATING_FACTOR = 2.0


def capacitor_leakage(block: Block, part: Part) -> float:
    """Leakage bound of a timing capacitor that the designer need not state.

    Parameters
    ----------
    block
        The block (for the supply).
    part
        A capacitor.

    Returns
    -------
    float
        A.  For aluminium electrolytics ``max(0.01·C·V_rated, 3 µA)`` with C in µF
        and V_rated in V giving µA (the usual leakage rating of the datasheet
        class), doubled for hot operation above 60 °C (leakage rises 2–3× when
        hot); the rated voltage is taken as :data:`ELECTROLYTIC_RATING_FACTOR`
        times the highest supply.  Zero for ceramic and film capacitors, whose
        leakage is negligible at timing resistances (state board leakage with
        the ``leakage`` statement).

    References
    ----------
    Aluminium electrolytic capacitor datasheets (generic device class): leakage
    current limit 0.01·C·V or 3 µA, whichever is greater, after a few minutes at
    rated voltage and 20 °C.
    """
    if part.dielectric is None:
        return 0.0
    d = dielectrics.dielectric(part.dielectric)
    if d.family != "electrolytic":
        return 0.0
    rated = ELECTROLYTIC_RATING_FACTOR * block.conditions.supply.high
    amps = max(0.01 * (part.value * 1e6) * rated, 3.0) * 1e-6
    if block.conditions.ambient_high > 60.0:
        amps *= 2.0
    return amps


def node_leakage(block: Block, design: Design, ref: str = "C") -> float:
    """The leakage bound at a timing node: the spec's ``leakage`` plus the capacitor's own.

    Parameters
    ----------
    block
        The block.
    design
        The design.
    ref
        Reference of the timing capacitor.

    Returns
    -------
    float
        A.
    """
    stated = block.number("leakage") or 0.0
    return stated + capacitor_leakage(block, design.part(ref))


def dielectric_findings(block: Block, part: Part) -> list[Finding]:
    """Findings about a capacitor's dielectric: precision, value range, rated temperature.

    Parameters
    ----------
    block
        The block.
    part
        A capacitor.

    Returns
    -------
    list of Finding
        Possibly empty.
    """
    assert part.dielectric is not None
    d = dielectrics.dielectric(part.dielectric)
    out: list[Finding] = []
    if not d.precise:
        out.append(
            Finding(
                "warning",
                "imprecise-dielectric",
                f"{part.ref} is {d.name}: {d.notes.rstrip('.')}. Prefer C0G or film for timing.",
            )
        )
    if not (d.min_farads <= part.value <= d.max_farads):
        out.append(
            Finding(
                "warning",
                "value-unusual-for-dielectric",
                f"{part.ref} = {_fmt_f(part.value)} is outside the values commonly made in "
                f"{d.name} ({_fmt_f(d.min_farads)}…{_fmt_f(d.max_farads)}); check availability.",
            )
        )
    c = block.conditions
    if c.ambient_low < d.t_min or c.ambient_high > d.t_max:
        out.append(
            Finding(
                "error",
                "dielectric-temperature-range",
                f"{part.ref} is {d.name}, rated {d.t_min:g}…{d.t_max:g} °C, but the ambient "
                f"spans {c.ambient_low:g}…{c.ambient_high:g} °C.",
            )
        )
    return out


def _fmt_f(v: float) -> str:
    return format_rkm(v, "capacitance")
