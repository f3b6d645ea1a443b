"""The logic input that watches an RC node: its leakage, its capacitance, its delay.

Shared by the ``delay`` family (an RC node into a logic or Schmitt input) and
the ``relaxation`` family (the Schmitt inverter's own input):

* **leakage** — a CMOS logic input may source or sink up to its datasheet bound
  over temperature, ±1 µA for the generic classes [DS]; typical parts leak nA,
  but a verdict must hold for every part, so the bound is used unless the spec
  states its own ``leakage`` (which then replaces it, both signs);
* **capacitance** — the input pin and the board add a few pF to the timing
  capacitor [DS/Mem]; with a small timing capacitor that stray becomes part of
  the timing, and a board-dependent part at that;
* **propagation delay** — the output edge follows the threshold crossing by the
  gate's delay, longer at a low supply (modelled by widening the band, see
  :meth:`timespec.parts.devices.GateClass.slowdown`).

Where the gate class's quoted figures stop holding (threshold shares quoted at
one supply, leakage guaranteed over a temperature range) the design's operating
span is compared with the :class:`~timespec.parts.validity.Held` range and a
finding made by :func:`~timespec.families.assumptions.assumption_findings`.
"""

from __future__ import annotations

from dataclasses import dataclass

from timespec.analysis import Factor
from timespec.families.assumptions import Stretch, assumption_findings
from timespec.families.capacitors import capacitor_leakage
from timespec.families.protocol import Finding
from timespec.model import Block
from timespec.numbers import format_quantity
from timespec.parts.devices import (
    BOARD_STRAY,
    LOGIC_INPUT_CAPACITANCE,
    LOGIC_INPUT_LEAKAGE,
    GateClass,
)
from timespec.parts.part import Design, Part

__all__ = [
    "STRAY_RATIO",
    "NodeLeakage",
    "gate_delay_band",
    "gate_delay_factor",
    "gate_stretches",
    "leakage_note",
    "node_leakage_band",
    "stray_band",
    "stray_factor",
    "stray_finding",
    "stray_warning",
]

#: A timing capacitor below this multiple of the largest stray draws a warning.
STRAY_RATIO = 10.0


@dataclass(frozen=True)
class NodeLeakage:
    """Signed leakage band at a timing node (positive drains the node to ground).

    Attributes
    ----------
    low, high
        The band, A (``low <= 0 <= high``).
    input_bound
        The input leakage bound used, A (either sign).
    assumed
        Where the bound comes from when the spec did not state one (words), or
        ``None`` when the spec's ``leakage`` was used.
    """

    low: float
    high: float
    input_bound: float
    assumed: str | None

    @property
    def largest(self) -> float:
        """Largest magnitude, A."""
        return max(-self.low, self.high)


def node_leakage_band(
    block: Block, design: Design, gate: GateClass | None, *, add_stated: bool = False
) -> NodeLeakage:
    """Signed leakage band at the node of an RC timing network.

    Parameters
    ----------
    block
        The block (``leakage`` statement, supply, ambient).
    design
        The design (capacitor ``C`` for its own leakage).
    gate
        The gate class of the watching input, or ``None`` for a generic CMOS input.
    add_stated
        ``False`` (delay): a stated ``leakage`` replaces the input bound and is
        taken with either sign.  ``True`` (relaxation): the gate's own input
        bound always applies with either sign, and a stated ``leakage``
        (capacitor and board) adds to the drain.

    Returns
    -------
    NodeLeakage
        The band; the capacitor's own leakage (electrolytics) adds to the drain.

    Notes
    -----
    The generic CMOS input bound is ±1 µA over temperature (class datasheets,
    [DS]); typical inputs leak nA, so a spec that knows its part may lower it.
    """
    stated = block.number("leakage")
    cap = capacitor_leakage(block, design.part("C"))
    bound = gate.i_input_max if gate is not None else LOGIC_INPUT_LEAKAGE
    where = f"{gate.name} gate class bound" if gate is not None else "usual CMOS input bound"
    if add_stated:
        return NodeLeakage(-bound, bound + (stated or 0.0) + cap, bound, None)
    if stated is not None:
        return NodeLeakage(-stated, stated + cap, stated, None)
    return NodeLeakage(-bound, bound + cap, bound, where)


def leakage_note(leak: NodeLeakage) -> list[Finding]:
    """A note saying which input leakage was assumed, when the spec stated none.

    Parameters
    ----------
    leak
        The node's leakage band.

    Returns
    -------
    list of Finding
        One ``input-leakage-assumed`` note, or nothing.
    """
    if leak.assumed is None:
        return []
    amps = format_quantity(leak.input_bound, "current")
    return [
        Finding(
            "note",
            "input-leakage-assumed",
            f"input leakage ±{amps} assumed ({leak.assumed}, over temperature), either sign; "
            "state `leakage` with your input's datasheet bound to lower it.",
        )
    ]


def stray_band(gate: GateClass | None) -> tuple[float, float]:
    """Stray capacitance at the node: input pin plus board, F.

    Parameters
    ----------
    gate
        The gate class, or ``None`` for a generic CMOS logic input.

    Returns
    -------
    tuple of float
        ``(low, high)``.
    """
    pin = gate.c_input if gate is not None else LOGIC_INPUT_CAPACITANCE
    return pin[0] + BOARD_STRAY[0], pin[1] + BOARD_STRAY[1]


def stray_factor(gate: GateClass | None, adds_to: str = "C") -> Factor:
    """The node's stray capacitance (input pin plus board) as a varying input.

    Parameters
    ----------
    gate
        The gate class, or ``None`` for a generic CMOS logic input.
    adds_to
        The timing capacitor's reference: the model adds the stray to that part's
        value and uses it nowhere else (``through`` of :class:`~timespec.analysis.Factor`).

    Returns
    -------
    Factor
        ``stray``, F, over :func:`stray_band`.
    """
    cs_lo, cs_hi = stray_band(gate)
    return Factor(
        "stray",
        f"input and board stray ({format_quantity(cs_lo, 'capacitance')}…"
        f"{format_quantity(cs_hi, 'capacitance')})",
        0.5 * (cs_lo + cs_hi),
        cs_lo,
        cs_hi,
        group="stray",
        through=adds_to,
    )


def gate_delay_factor(gate: GateClass, supply_low: float, group: str) -> Factor:
    """The gate's propagation delay as a varying input.

    Parameters
    ----------
    gate
        The gate class.
    supply_low
        The design's lowest supply, V.
    group
        The factor group it is reported in.

    Returns
    -------
    Factor
        ``gate.delay``, s, over :func:`gate_delay_band`.
    """
    d_lo, d_hi = gate_delay_band(gate, supply_low)
    return Factor(
        "gate.delay",
        f"{gate.name} gate propagation delay ({format_quantity(d_lo, 'time')}…"
        f"{format_quantity(d_hi, 'time')})",
        0.5 * (d_lo + d_hi),
        d_lo,
        d_hi,
        group=group,
    )


def gate_delay_band(gate: GateClass, supply_low: float) -> tuple[float, float]:
    """Propagation delay band of a gate at the design's lowest supply, s.

    Parameters
    ----------
    gate
        The gate class.
    supply_low
        Lowest supply, V.

    Returns
    -------
    tuple of float
        ``(low, high)``: the quoted band, its top widened by
        :meth:`~timespec.parts.devices.GateClass.slowdown` below the quoted supply.
    """
    return gate.t_pd[0], gate.t_pd[1] * gate.slowdown(supply_low)


def stray_finding(block: Block, c: Part, gate: GateClass | None) -> list[Finding]:
    """Warn when the timing capacitor is within :data:`STRAY_RATIO` times the stray.

    Parameters
    ----------
    block
        The block.
    c
        The timing capacitor.
    gate
        The gate class, or ``None``.

    Returns
    -------
    list of Finding
        One ``stray-comparable`` warning, or nothing.
    """
    return stray_warning(c, stray_band(gate), "input pin and board")


def stray_warning(c: Part, band: tuple[float, float], where: str) -> list[Finding]:
    """Warn when a timing capacitor is within :data:`STRAY_RATIO` times a node's stray.

    Parameters
    ----------
    c
        The timing capacitor.
    band
        The node's stray capacitance ``(low, high)``, F.
    where
        What the stray is made of, in words (``"input pin and board"``).

    Returns
    -------
    list of Finding
        One ``stray-comparable`` warning, or nothing.
    """
    lo, hi = band
    if c.value >= STRAY_RATIO * hi:
        return []
    share = hi / (c.value + hi) * 100
    return [
        Finding(
            "warning",
            "stray-comparable",
            f"C = {format_quantity(c.value, 'capacitance')} is within {STRAY_RATIO:g}× of the "
            f"stray at the node ({format_quantity(lo, 'capacitance')}…"
            f"{format_quantity(hi, 'capacitance')}: {where}), which is up to "
            f"{share:.0f} % of the timing capacitance and depends on the layout. The worst "
            "case includes the band; use C ≥ "
            f"{format_quantity(STRAY_RATIO * hi, 'capacitance')} with a smaller R.",
        )
    ]


def gate_stretches(block: Block, gate: GateClass, *, thresholds: bool) -> list[Finding]:
    """Findings where the design runs a gate class outside the ranges its figures hold in.

    Parameters
    ----------
    block
        The block (supply, ambient).
    gate
        The gate class.
    thresholds
        Whether the class's threshold shares are used (``False`` when the spec
        overrides both bands, or for a delay whose threshold the spec states).

    Returns
    -------
    list of Finding
        ``gate-class-range`` findings from
        :func:`~timespec.families.assumptions.assumption_findings`.
    """
    s = block.conditions.supply
    c = block.conditions
    out: list[Stretch] = []
    if thresholds:
        out.append(
            Stretch(
                gate.thresholds_held,
                s.low,
                s.high,
                "State the 'rising' and 'falling' bands from your part's datasheet at this supply.",
            )
        )
    out.append(
        Stretch(
            gate.leakage_held,
            c.ambient_low,
            c.ambient_high,
            "State `leakage` from a datasheet that covers this ambient.",
        )
    )
    return assumption_findings(out, "gate-class-range")
