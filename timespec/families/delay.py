"""The ``delay`` family: an RC network charged from the supply into an input threshold.

Parts: ``R`` (from the supply to the node) and ``C`` (from the node to ground).
Output: ``delay``, the time from the supply step until the node crosses the
threshold of the input that watches it (a logic or Schmitt input releasing a
reset, enabling a regulator ...).

Modelled (see :mod:`timespec.physics.rcdelay`): part tolerance, tempco or
dielectric drift and ageing; the supply window; the input threshold, given as a
share of the supply (it then tracks the supply) or in volts (it does not); the
capacitor voltage at the start (``start``, default 0 V); a signed leakage current
at the node, which moves the node's final value by ``−i·R``: the ``leakage``
statement bounds capacitor, board and input leakage together (either sign), and
without it the watching input's datasheet bound is assumed, ±1 µA for a generic
CMOS input or the ``gate`` class's bound (see :mod:`timespec.families.logicinput`;
an electrolytic's own leakage adds to the drain); the stray capacitance of the
input pin and the board (``stray``, added to C); and, with a ``gate`` class, the
gate's propagation delay (``gate.delay``, added to the delay).

Not modelled, and said so in the findings: the supply's own rise time (the
supply is taken to step up at once) and the discharge of the capacitor between
power cycles.

Every output is monotone in every factor (the delay grows with R, C, the
stray, the gate delay, the threshold and the drain; with a ratiometric threshold
the sign of its change with the supply is fixed by ``(1 − k)·V0 − k·i·R``, with a
threshold in volts it falls as the supply rises), so the corners of the factor box
give the exact worst case.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np

from timespec.analysis import Factor
from timespec.families.capacitors import dielectric_findings
from timespec.families.goals import declare_monotone
from timespec.families.inputs import apply_part, condition_factors, part_factors
from timespec.families.logicinput import (
    gate_delay_factor,
    gate_stretches,
    leakage_note,
    node_leakage_band,
    stray_band,
    stray_factor,
    stray_finding,
)
from timespec.families.protocol import Evaluate, Finding, FloatArray, Inputs, Output
from timespec.families.rcscale import rc_candidates
from timespec.model import Block, Window
from timespec.numbers import format_quantity
from timespec.parts.part import Design
from timespec.parts.rkm import format_rkm
from timespec.physics import rcdelay

__all__ = [
    "DELAY_RISING_ALWAYS",
    "DELAY_RISING_BELOW",
    "Delay",
    "declarations",
]


def _threshold_window(block: Block) -> Window:
    win = block.window("threshold")
    assert win is not None, "the spec layer requires a threshold in a delay block"
    return win


def _threshold_volts(block: Block) -> tuple[float, float]:
    """Lowest and highest threshold voltage over the supply window."""
    win = _threshold_window(block)
    s = block.conditions.supply
    if win.kind == "ratio":
        return win.low * s.low, win.high * s.high
    return win.low, win.high


#: Factors in which the delay never falls, whatever the block: more C (tolerance, DC bias,
#: ageing, class-2 or electrolytic drift; not the tempco, which multiplies ``T − 25``
#: and so changes sign across the ambient range; the stray, which adds to C) and
#: more gate delay.  ``t = t_pd + R·(C + Cs)·ln(q)`` with ``q ≥ 1`` (or ``inf``)
#: independent of C, Cs and t_pd, so ``t`` rises with each of them.
DELAY_RISING_ALWAYS = frozenset({"C.tol", "C.age", "C.drift", "C.bias", "stray", "gate.delay"})
#: Factors in which the delay never falls once the start voltage lies below every
#: threshold of the box (``v0 < Vth``).  Write ``V' = V − i·R`` (``i ≥ 0``); then
#: ``q = (V' − v0)/(V' − Vth) = 1 + (Vth − v0)/(V' − Vth)`` for ``V' > Vth`` and
#: ``t = inf`` for ``V' ≤ Vth`` (and for ``V' ≤ v0``): ``t`` never rises with ``V'``
#: and never falls with ``Vth``, for either sign of ``i``.  More drain lowers
#: ``V'``; a higher threshold (a share of a positive supply or volts) raises ``Vth``.
#: More R (tolerance, ageing) with ``i ≥ 0`` multiplies the non-negative ``ln(q)`` by
#: a larger ``R·C`` and lowers ``V'``.  With ``i = −j < 0`` (current into the node),
#: write ``a = Vth − v0 > 0``, ``b = V − Vth``: ``t/C = f(R) = R·ln(1 + x)``,
#: ``x = a/(b + j·R)``, and ``f'(R) = ln(1 + x) − x/(1 + x)·j·R/(b + j·R)``, which is
#: ``> 0`` when ``b > 0`` because ``ln(1 + x) > x/(1 + x)`` and ``j·R/(b + j·R) < 1``;
#: so R is declared only when the threshold lies below the supply at every corner or
#: no current flows into the node (see :data:`DELAY_RISING_R`).
#: With ``v0 ≥ Vth`` the node may discharge down to the threshold instead, where
#: none of this holds, so nothing of this set is declared then.
DELAY_RISING_BELOW = frozenset({"leak", "threshold"})
#: The resistor's factors, rising under the condition above.
DELAY_RISING_R = frozenset({"R.tol", "R.age"})


def _threshold_volt_range(block: Block) -> tuple[float, float]:
    """Lowest and highest threshold voltage over the whole factor box (any signs)."""
    win = _threshold_window(block)
    if win.kind != "ratio":
        return win.low, win.high
    s = block.conditions.supply
    corners = [k * v for k in (win.low, win.high) for v in (s.low, s.high)]
    return min(corners), max(corners)


def declarations(
    block: Block, leak_low: float, leak_high: float
) -> tuple[frozenset[str], frozenset[str]]:
    """Names of the factors in which the delay provably rises, and falls, over the box.

    Parameters
    ----------
    block
        The block.
    leak_low, leak_high
        The node's signed leakage band, A (positive drains the node).

    Returns
    -------
    tuple of frozenset of str
        ``(rising, falling)``.

    Notes
    -----
    See :data:`DELAY_RISING_ALWAYS` and :data:`DELAY_RISING_BELOW`.  The supply
    (never the ambient, which acts through the tempcos' ``T − 25``) is declared
    only where its sign is fixed, with ``v0`` below every threshold:

    * threshold in volts: ``V'`` rises with ``V``, so the delay falls;
    * threshold a share ``k`` of the supply (``0 < k < 1``, ``V > 0``):
      ``q = (V − i·R − v0)/((1 − k)·V − i·R)`` has
      ``dq/dV ∝ (1 − k)·v0 − k·i·R``, negative everywhere when ``v0 < 0`` (the
      delay falls) unless current flows into the node (``i < 0``), positive
      everywhere when ``v0 > 0`` and there is no drain (it rises).  With
      ``v0 = 0`` the delay does not depend on the supply without a drain, so
      its value at either end differs only by rounding: not declared, nor where
      the sign of ``dq/dV`` changes inside the box.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook (the derivatives are
    our own, checked against an exhaustive corner search in the tests).
    """
    rising = set(DELAY_RISING_ALWAYS)
    falling: set[str] = set()
    start = block.number("start") or 0.0
    vth_lo, _ = _threshold_volt_range(block)
    win = _threshold_window(block)
    s = block.conditions.supply
    if start < vth_lo and (win.kind != "ratio" or s.low > 0.0):
        rising |= DELAY_RISING_BELOW
        _, vth_hi = _threshold_volt_range(block)
        below_supply = vth_hi < s.low if win.kind != "ratio" else win.high < 1.0
        if leak_low >= 0.0 or below_supply:
            rising |= DELAY_RISING_R
        if win.kind != "ratio":
            falling.add("supply")
        elif win.low > 0.0 and win.high < 1.0 and s.low > 0.0:
            if start < 0.0 and leak_low >= 0.0:
                falling.add("supply")
            elif start > 0.0 and leak_high <= 0.0:
                rising.add("supply")
    return frozenset(rising), frozenset(falling)


class Delay:
    """RC delay into an input threshold."""

    kind = "delay"

    def outputs(self, block: Block) -> tuple[Output, ...]:
        """Outputs: the delay.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        tuple of Output
            ``delay``.
        """
        return (Output("delay", "time", "delay to the input threshold"),)

    # -- model --------------------------------------------------------------
    def factors(self, block: Block, design: Design) -> list[Factor]:
        """Varying inputs of a design.

        Parameters
        ----------
        block
            The block.
        design
            Parts ``R`` and ``C``.

        Returns
        -------
        list of Factor
            Parts, ambient and supply, ``threshold`` (a share of the supply or
            volts, uniform over its window, nominal at its centre), ``leak``
            (signed, A: the stated ``leakage`` or the assumed input bound, both
            signs, see :func:`~timespec.families.logicinput.node_leakage_band`),
            ``stray`` (F, input pin and board) and, with a gate class,
            ``gate.delay`` (s); the factors in which the delay is provably
            monotone say so (see :func:`declarations`), which shrinks the
            worst-case search.
        """
        out: list[Factor] = []
        for part in design.parts:
            out.extend(part_factors(block, part))
        out.extend(condition_factors(block))
        win = _threshold_window(block)
        if win.kind == "ratio":
            label = f"input threshold ({win.low:g}…{win.high:g} of supply)"
        else:
            label = f"input threshold ({win.low:g}…{win.high:g} V)"
        out.append(Factor("threshold", label, win.centre, win.low, win.high, group="input"))
        leak = node_leakage_band(block, design, block.gate)
        if leak.high > leak.low:
            out.append(
                Factor(
                    "leak",
                    f"node leakage ({format_quantity(leak.low, 'current')}…"
                    f"{format_quantity(leak.high, 'current')}"
                    f"{', assumed' if leak.assumed else ''})",
                    0.0,
                    leak.low,
                    leak.high,
                    group="leakage",
                )
            )
        out.append(stray_factor(block.gate))
        if block.gate is not None:
            out.append(gate_delay_factor(block.gate, block.conditions.supply.low, "gate"))
        rising, falling = declarations(block, leak.low, leak.high)
        return [declare_monotone(f, "delay", rising, falling) for f in out]

    def evaluate(self, block: Block, variant: str) -> Evaluate:
        """The vectorised model.

        Parameters
        ----------
        block
            The block.
        variant
            Unused (one circuit).

        Returns
        -------
        Evaluate
            Samples → ``{"delay": ...}`` in seconds (``inf`` where the node never
            reaches the threshold).

        Notes
        -----
        ``t = t_pd + R·(C + Cs)·ln((V − i·R − V0)/(V − i·R − Vth))`` with
        ``Vth = k·V`` for a ratiometric threshold, ``Cs`` the stray and ``t_pd``
        the gate's propagation delay (0 without a gate class).

        References
        ----------
        First-order RC charging law, any circuit-theory handbook.
        """
        ratio = _threshold_window(block).kind == "ratio"
        start = block.number("start") or 0.0

        def evaluate(x: Inputs) -> dict[str, FloatArray]:
            r = apply_part(x, "R")
            c = apply_part(x, "C") + x["stray"]
            v = x["supply"]
            vth = x["threshold"] * v if ratio else x["threshold"]
            i = x.get("leak", np.zeros(1))
            t = rcdelay.charge_time(r, c, v, start, vth, i)
            if "gate.delay" in x:
                t = t + x["gate.delay"]
            return {"delay": np.asarray(t, dtype=np.float64)}

        return evaluate

    # -- solver -------------------------------------------------------------
    def candidates(self, block: Block) -> list[Design]:
        """Candidate (R, C) pairs: for each capacitor, the continuous R, snapped.

        Parameters
        ----------
        block
            The block.

        Returns
        -------
        list of Design
            Candidates; pinned parts are kept as given.

        Notes
        -----
        A probe design gives the worst-case spread of the delay relative to its
        nominal (it is close to proportional);
        :func:`~timespec.families.rcscale.aim_nominal` turns the requirement
        into the nominal delay that centres that spread.  For each
        allowed capacitor the resistor that gives this nominal follows from
        ``t = R·C·ln((V − V0)/(V − Vth))``, refined twice with the full nominal
        model (drain included), and both standard neighbours are kept.  With R
        pinned the same is done for C.
        """
        return rc_candidates(self, block, "delay")

    # -- rules --------------------------------------------------------------
    def findings(
        self, block: Block, design: Design, extremes: Mapping[str, tuple[float, float]]
    ) -> list[Finding]:
        """Design rules of an RC delay.

        Parameters
        ----------
        block
            The block.
        design
            The design.
        extremes
            Worst-case ``(low, high)`` of each output.

        Returns
        -------
        list of Finding
            Threshold never reached or already passed at the start (errors);
            threshold in volts on a varying supply, leakage shifting the delay,
            timing capacitor comparable with the stray (warnings); input leakage
            assumed, supply taken as a step, discharge between power cycles,
            slow edge at the input (notes); gate class used outside its ranges;
            dielectric.
        """
        out: list[Finding] = []
        lo, hi = extremes["delay"]
        r, c = design.part("R"), design.part("C")
        s = block.conditions.supply
        win = _threshold_window(block)
        vth_lo, vth_hi = _threshold_volts(block)
        start = block.number("start") or 0.0
        band = node_leakage_band(block, design, block.gate)
        leak = band.high
        r_max = r.value * (1 + r.tolerance)
        c_max = c.value * (1 + c.tolerance) + stray_band(block.gate)[1]
        settle = s.low - leak * r_max
        if not math.isfinite(hi):
            out.append(
                Finding(
                    "error",
                    "threshold-never-reached",
                    f"at {s.low:g} V with {format_quantity(leak, 'current')} "
                    "drawn from the node the capacitor settles "
                    f"near {settle:.3g} V, not above the highest threshold {vth_hi:.3g} V: the "
                    "input may never switch. Lower the threshold, raise the supply or use a "
                    "smaller R with a larger C.",
                )
            )
        elif band.largest > 0 and band.largest * r_max > 0.01 * (s.low - vth_hi):
            leak_text = format_quantity(band.largest, "current")
            out.append(
                Finding(
                    "warning",
                    "leakage-shifts-delay",
                    f"leakage (up to ±{leak_text}{', assumed' if band.assumed else ''}) "
                    f"through R = {format_rkm(r.value, 'resistance')}Ω "
                    f"moves the node by up to {band.largest * r_max:.3g} V, more than 1 % of "
                    f"the {s.low - vth_hi:.3g} V "
                    "left above the threshold; a smaller R with a larger C is more robust.",
                )
            )
        if start >= vth_lo:
            out.append(
                Finding(
                    "error",
                    "start-above-threshold",
                    f"the capacitor starts at {start:g} V, at or above the lowest threshold "
                    f"{vth_lo:.3g} V: the delay can be zero. Discharge the capacitor fully "
                    "before the delay starts.",
                )
            )
        if win.kind == "voltage" and s.high > s.low:
            out.append(
                Finding(
                    "warning",
                    "threshold-in-volts",
                    f"the threshold is fixed in volts ({win.low:g}…{win.high:g} V) while the "
                    f"supply moves over {s.low:g}…{s.high:g} V, so it spans "
                    f"{vth_lo / s.high:.3g}…{vth_hi / s.low:.3g} of the supply and the delay "
                    "follows the supply. A ratiometric input (threshold a share of the "
                    "supply, as in CMOS logic) or a regulated supply for R removes this term.",
                )
            )
        out.append(
            Finding(
                "note",
                "supply-taken-as-step",
                "the delay is counted from a supply that steps up at once; a supply that "
                "ramps up adds to the delay (up to about its rise time), so check the "
                "slowest power-up of the source.",
            )
        )
        t_empty = float(
            rcdelay.charge_time(r_max, c_max, 0.0, s.high, max(0.1 * vth_lo, 1e-3 * s.high))
        )
        out.append(
            Finding(
                "note",
                "discharge-between-cycles",
                "the capacitor must empty between power cycles or a short supply dip gives a "
                f"short delay: through R alone (supply pulled to 0 V) it takes up to "
                f"{format_quantity(t_empty, 'time')} "
                "to fall to 10 % of the lowest threshold. A diode across "
                "R (anode at the node, cathode at the supply) empties it as fast as the "
                "supply falls.",
            )
        )
        if math.isfinite(lo) and lo > 0:
            slope = (s.low - leak * r_max - vth_hi) / (r_max * c_max)
            if slope > 0 and slope < 1e6:  # slower than 1 V/µs at the crossing
                out.append(
                    Finding(
                        "note",
                        "slow-input-edge",
                        f"the node crosses the threshold at about {slope:.3g} V/s; feed a "
                        "Schmitt-trigger input (a plain logic input can oscillate and draw "
                        "cross-conduction current while it sits near its threshold).",
                    )
                )
        out.extend(leakage_note(band))
        out.extend(stray_finding(block, c, block.gate))
        if block.gate is not None:
            out.extend(gate_stretches(block, block.gate, thresholds=False))
        out.extend(dielectric_findings(block, c))
        return out
