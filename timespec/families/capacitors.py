"""Capacitors as real parts: leakage a designer need not state, class 2 losses, rules.

Class 2 ceramics (X7R, X5R, Y5V ...) lose capacitance in two one-sided ways that enter the
worst case as factors of their own (see :func:`class2_losses`, used by
:func:`timespec.families.inputs.part_factors`):

* ageing over the block's ``life``, counted from
  :data:`~timespec.parts.dielectrics.AGEING_REFERENCE_HOURS` after reflow;
* DC-bias loss at the highest supply (a safe bound on the timing node's voltage) over the
  capacitor's rated voltage: stated in the policy or on the pinned part (``rated 25 V``),
  else :data:`CLASS2_RATING_FACTOR` times the highest supply.
"""

from __future__ import annotations

from dataclasses import dataclass

from timespec.families.assumptions import Stretch, assumption_findings
from timespec.families.protocol import Finding
from timespec.model import Block
from timespec.numbers import format_quantity
from timespec.parts import dielectrics
from timespec.parts.part import Design, Part
from timespec.parts.rkm import format_rkm

__all__ = [
    "CLASS2_RATING_FACTOR",
    "ELECTROLYTIC_LEAKAGE",
    "ELECTROLYTIC_RATING_FACTOR",
    "HOURS_PER_YEAR",
    "Class2Losses",
    "capacitor_leakage",
    "class2_losses",
    "dielectric_findings",
    "leakage_rating",
    "node_leakage",
    "rated_voltage",
]

#: Rated voltage assumed for an electrolytic, as a multiple of the highest supply
#: (common practice: derate the working voltage to about half the rating).
ELECTROLYTIC_RATING_FACTOR = 2.0

#: Rated voltage assumed for a ceramic whose rating the spec does not state, as a multiple
#: of the highest supply (common practice: a ceramic is chosen at about twice its working
#: voltage).  State the real rating with ``rated`` for a tighter bias bound.
CLASS2_RATING_FACTOR = 2.0

#: Hours in a year of 365.25 days (the life is stated in years).
HOURS_PER_YEAR = 8766.0


@dataclass(frozen=True)
class Class2Losses:
    """The one-sided losses of a class 2 ceramic that the worst case counts.

    Attributes
    ----------
    ageing
        Largest ageing loss over the life (positive fraction), 0 without a life.
    rate
        Ageing rate used, loss per decade-hour (the band's high end).
    bias
        Largest DC-bias loss (positive fraction).
    volts
        DC voltage the bias bound is taken at (the highest supply), V.
    rated
        Rated voltage, V.
    rated_stated
        Whether the spec states the rating (else the default class).
    """

    ageing: float
    rate: float
    bias: float
    volts: float
    rated: float
    rated_stated: bool

    @property
    def stress(self) -> float:
        """DC stress ``volts / rated``."""
        return self.volts / self.rated


def rated_voltage(block: Block, part: Part) -> tuple[float, bool]:
    """The rated DC voltage of a capacitor, and whether the spec states it.

    Parameters
    ----------
    block
        The block (policy, pinned parts, supply).
    part
        A capacitor.

    Returns
    -------
    (volts, stated) : tuple
        The pinned part's ``rated`` if given, else the capacitor policy's, else
        :data:`CLASS2_RATING_FACTOR` times the highest supply (``stated`` False).
    """
    pinned = block.pinned_part(part.ref) if part.pinned else None
    if pinned is not None and pinned.rated_voltage is not None:
        return pinned.rated_voltage, True
    if block.capacitors.rated_voltage is not None:
        return block.capacitors.rated_voltage, True
    return CLASS2_RATING_FACTOR * block.conditions.supply.high, False


def class2_losses(block: Block, part: Part) -> Class2Losses | None:
    """Ageing and DC-bias loss bounds of a class 2 ceramic capacitor.

    Parameters
    ----------
    block
        The block (life, supply, ratings).
    part
        A capacitor.

    Returns
    -------
    Class2Losses or None
        ``None`` for any other dielectric (class 1, film, electrolytic: unchanged).

    Notes
    -----
    Ageing: ``rate_high · log10(t_life / 24 h)`` with ``t_life`` the block's life in hours
    (:func:`timespec.parts.dielectrics.ageing_loss_bound`).  DC bias: the node of a timing
    capacitor never rises above the supply, so the loss is bounded at the highest supply
    over the rated voltage (:func:`timespec.parts.dielectrics.bias_loss_bound`).
    """
    if part.dielectric is None:
        return None
    d = dielectrics.dielectric(part.dielectric)
    if d.family != "class2":
        return None
    hours = block.conditions.life_years * HOURS_PER_YEAR
    rated, stated = rated_voltage(block, part)
    volts = block.conditions.supply.high
    return Class2Losses(
        ageing=dielectrics.ageing_loss_bound(d, hours),
        rate=dielectrics.class2_ageing_band(d)[1],
        bias=dielectrics.bias_loss_bound(d, volts / rated),
        volts=volts,
        rated=rated,
        rated_stated=stated,
    )


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
        A.  The stated rating (``leakage 0.01 of CV or 3 uA`` or ``leakage 5 uA`` on
        the pinned part or the capacitor policy, :func:`leakage_rating`), else for
        aluminium electrolytics :data:`ELECTROLYTIC_LEAKAGE`:
        ``max(k·C·V_rated, floor)`` with C in µF and V_rated in V giving µA,
        doubled for hot operation above 60 °C (leakage rises 2–3× when hot).
        The rated voltage is the stated one (``rated 25 V``), else
        :data:`ELECTROLYTIC_RATING_FACTOR` times the highest supply.  Zero for
        ceramic and film capacitors with no stated rating, whose leakage is
        negligible at timing resistances (state board leakage with the
        ``leakage`` statement).

    References
    ----------
    Aluminium electrolytic capacitor datasheets (generic device class): leakage
    current limit 0.01·C·V or 3 µA, whichever is greater, after a few minutes at
    rated voltage and 20 °C.
    """
    if part.dielectric is None:
        return 0.0
    d = dielectrics.dielectric(part.dielectric)
    rating = leakage_rating(block, part)
    if rating is None:
        if d.family != "electrolytic":
            return 0.0
        rating = ELECTROLYTIC_LEAKAGE
    k, floor = rating
    rated, stated = rated_voltage(block, part)
    if not stated:
        rated = ELECTROLYTIC_RATING_FACTOR * block.conditions.supply.high
    amps = max(k * (part.value * 1e6) * rated * 1e-6, floor)
    if block.conditions.ambient_high > 60.0:
        amps *= 2.0
    return amps


#: The datasheet class's leakage rating of aluminium electrolytics: 0.01·C·V µA (C in
#: µF, V in V) or 3 µA, whichever is greater.
ELECTROLYTIC_LEAKAGE = (0.01, 3e-6)


def leakage_rating(block: Block, part: Part) -> tuple[float, float] | None:
    """The leakage rating ``(k, floor)`` the spec states for a capacitor, or ``None``.

    Parameters
    ----------
    block
        The block (policy and pinned parts).
    part
        A capacitor.

    Returns
    -------
    tuple of float or None
        The pinned part's ``leakage`` if given, else the capacitor policy's.
    """
    pinned = block.pinned_part(part.ref) if part.pinned else None
    if pinned is not None and pinned.leakage is not None:
        return pinned.leakage
    return block.capacitors.leakage


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
    losses = class2_losses(block, part)
    if losses is not None:
        out.append(Finding("warning", "imprecise-dielectric", _class2_message(block, part, losses)))
        out.extend(_class2_stretches(block, part, losses))
    elif not d.precise:
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


def _volts(v: float) -> str:
    return format_quantity(v, "voltage")


def _class2_message(block: Block, part: Part, losses: Class2Losses) -> str:
    """The class 2 warning, with the losses the worst case counts."""
    assert part.dielectric is not None
    name = dielectrics.dielectric(part.dielectric).name
    life = block.conditions.life_years
    if life > 0:
        age = (
            f"ageing up to −{losses.ageing * 100:.3g} % over {life:g} years "
            f"({losses.rate * 100:g} %/decade-hour from "
            f"{dielectrics.AGEING_REFERENCE_HOURS:g} h after reflow)"
        )
    else:
        age = f"no ageing (no 'life' stated; it loses up to {losses.rate * 100:g} %/decade-hour)"
    how = "" if losses.rated_stated else f" (default: {CLASS2_RATING_FACTOR:g}× the highest supply)"
    rated = f"{_volts(losses.rated)} rating{how}"
    return (
        f"{part.ref} is {name}, a class 2 ceramic; the worst case counts {age} and a DC-bias "
        f"loss of up to −{losses.bias * 100:.3g} % at {_volts(losses.volts)} on a {rated}. "
        "Prefer C0G or film for timing"
        + ("." if losses.rated_stated else ", or state the real rating, e.g. 'rated 25 V'.")
    )


def _class2_stretches(block: Block, part: Part, losses: Class2Losses) -> list[Finding]:
    """Findings where the class 2 ageing or bias model is run outside its range."""
    assert part.dielectric is not None
    d = dielectrics.dielectric(part.dielectric)
    seconds = block.conditions.life_years * HOURS_PER_YEAR * 3600.0
    out: list[Finding] = []
    if seconds > 0:
        out.extend(
            assumption_findings(
                [
                    Stretch(
                        dielectrics.ageing_held(d),
                        seconds,
                        seconds,
                        "The logarithmic law is extrapolated; leave margin or use C0G or film.",
                    )
                ],
                "class2-ageing-range",
            )
        )
    need = max(losses.volts, losses.rated)
    out.extend(
        assumption_findings(
            [
                Stretch(
                    dielectrics.bias_held(d),
                    losses.stress,
                    losses.stress,
                    f"The supply passes the rating: choose a capacitor rated {_volts(need)} "
                    "or more (the loss bound is extrapolated and capped at "
                    f"{dielectrics.BIAS_LOSS_CEILING * 100:g} %).",
                )
            ],
            "class2-bias-range",
        )
    )
    return out


def _fmt_f(v: float) -> str:
    return format_rkm(v, "capacitance")
