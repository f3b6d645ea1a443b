"""What the two discharge-pin circuits (classic and diode) share.

Both have parts ``RA`` (supply to discharge pin), ``RB`` (discharge pin to
capacitor) and ``C``, and discharge the capacitor through ``RB`` into the
discharge pin, a Thevenin source of ``RA`` against ``r_on``.  Here: the smallest
``RA`` the discharge pin tolerates (:func:`ra_floor`), the discharge-current
rule (:func:`discharge_findings`), and the search for standard ``RA``/``RB``
pairs (:func:`pair_options`), into which each circuit plugs its own gain and
closed-form solutions (:class:`PairSearch`, in
:mod:`~timespec.families.astable.classic` and
:mod:`~timespec.families.astable.diode`).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from timespec.families.assumptions import Stretch, assumption_findings
from timespec.families.astable.nominal import NominalRun
from timespec.families.candidates import snap
from timespec.families.protocol import Finding, FloatArray
from timespec.model import Block
from timespec.parts.part import Design
from timespec.parts.rkm import format_rkm
from timespec.physics import astable

__all__ = ["PairSearch", "discharge_findings", "pair_options", "ra_floor"]


def _ohms(r: float) -> str:
    return f"{format_rkm(r, 'resistance')}Ω"


def ra_floor(block: Block) -> float:
    """Smallest RA the discharge pin tolerates: ``V_max / i_discharge_max``.

    Parameters
    ----------
    block
        An astable block.

    Returns
    -------
    float
        Ω.
    """
    t = block.timer
    assert t is not None
    return block.conditions.supply.high / t.i_discharge_max


@dataclass(frozen=True)
class PairSearch:
    """A circuit's own steps of the RA/RB search (see :func:`pair_options`).

    Attributes
    ----------
    high_gain
        ``(run, probe) → g_H``: the nominal high-time gain ``tH/(R·C)`` from the
        full model, given ``probe`` (its outputs at ``RA = RB = 100 kΩ``,
        ``C = 1 µF``).
    solve
        ``(run, cs, tH, tL, g_H, g_L, ra_low) → (RA, RB)``: the continuous pair per
        capacitor.
    rb_options
        ``(cs, tH, tL, g_H, g_L, RA) → [RB, …]``: the free RB from each target it
        can meet, with RA pinned.
    ra_options
        ``(cs, tH, tL, g_H, g_L, RB) → [RA, …]``: the free RA from each target it
        can meet, with RB pinned.
    """

    high_gain: Callable[[NominalRun, dict[str, FloatArray]], float]
    solve: Callable[
        [NominalRun, FloatArray, float, float, float, float, float],
        tuple[FloatArray, FloatArray],
    ]
    rb_options: Callable[[FloatArray, float, float, float, float, float], list[FloatArray]]
    ra_options: Callable[[FloatArray, float, float, float, float, float], list[FloatArray]]


def pair_options(
    block: Block,
    search: PairSearch,
    run: NominalRun,
    cs: FloatArray,
    th: float,
    tl: float,
) -> dict[str, list[FloatArray]]:
    """Standard-value options for RA and RB at each capacitor.

    Parameters
    ----------
    block
        An astable block.
    search
        The circuit's own steps.
    run
        The circuit's nominal model.
    cs
        Capacitor values, F.
    th, tl
        Target high and low time, s.

    Returns
    -------
    dict
        ``{"RA": [...], "RB": [...]}``: arrays of options per capacitor.  Both
        free: the continuous pair snapped to both standard neighbours each (RA
        not below :func:`ra_floor`); one pinned: the other from each target it
        can meet, snapped.
    """
    rp = block.resistors
    ra_low = max(rp.low, ra_floor(block))
    pin_a, pin_b = block.pinned_part("RA"), block.pinned_part("RB")
    # nominal gains g = t/(R·C) from the full model at a probe (R ≫ r_on)
    probe = run({"RA": np.array([1e5]), "RB": np.array([1e5]), "C": np.array([1e-6])})
    g_l = float(probe["low"][0]) / (1e5 * 1e-6)
    g_h = search.high_gain(run, probe)
    with np.errstate(divide="ignore", invalid="ignore"):
        if pin_a is None and pin_b is None:
            ra, rb = search.solve(run, cs, th, tl, g_h, g_l, ra_low)
            return {
                "RA": list(snap(rp.series, ra, ra_low, rp.high)),
                "RB": list(snap(rp.series, rb, rp.low, rp.high)),
            }
        if pin_a is not None:
            ra_v = pin_a.value
            out_b: list[FloatArray] = []
            for rb in search.rb_options(cs, th, tl, g_h, g_l, ra_v):
                out_b.extend(snap(rp.series, rb, rp.low, rp.high))
            opts = {"RA": [np.full(cs.shape, ra_v)], "RB": out_b}
            if pin_b is not None:
                opts["RB"] = [np.full(cs.shape, pin_b.value)]
            return opts
        assert pin_b is not None
        rb_v = pin_b.value
        out_a: list[FloatArray] = []
        for ra in search.ra_options(cs, th, tl, g_h, g_l, rb_v):
            ra = np.where(ra < ra_low, ra_low, ra)
            out_a.extend(snap(rp.series, ra, ra_low, rp.high))
        return {"RA": out_a, "RB": [np.full(cs.shape, rb_v)]}


def discharge_findings(block: Block, design: Design) -> list[Finding]:
    """Error when the discharge pin sinks more than the timer class allows.

    Parameters
    ----------
    block
        An astable block.
    design
        A classic or diode design.

    Returns
    -------
    list of Finding
        ``discharge-current`` (with the smallest RA) when ``V_max/RA_min`` is
        above the class's ``i_discharge_max``; ``discharge-on-resistance-range``
        when the pin's peak current (RA's current plus the capacitor's through
        RB at the switching moment) passes the current at which the class's
        on-resistance is specified; else empty.
    """
    timer = block.timer
    assert timer is not None
    ra = design.part("RA")
    v_max = block.conditions.supply.high
    i_dis = float(astable.discharge_current(v_max, ra.value * (1 - ra.tolerance)))
    rb = design.part("RB")
    k_hi = timer.ratio_band[1]
    # At the switching moment the capacitor sits at k·V and discharges through RB.
    i_peak = i_dis + k_hi * v_max / (rb.value * (1 - rb.tolerance))
    out: list[Finding] = assumption_findings(
        [
            Stretch(
                timer.r_on_held,
                i_peak,
                i_peak,
                "Use larger RA and RB with a smaller C so the discharge pin sinks less.",
            )
        ],
        "discharge-on-resistance-range",
    )
    if i_dis > timer.i_discharge_max:
        ra_min = v_max / timer.i_discharge_max
        out.append(
            Finding(
                "error",
                "discharge-current",
                f"the discharge pin sinks {i_dis * 1e3:.3g} mA from the supply through "
                f"RA = {_ohms(ra.value)} at {v_max:g} V, above the {timer.name} class "
                f"limit of {timer.i_discharge_max * 1e3:.3g} mA. Make RA at least "
                f"{_ohms(ra_min / (1 - ra.tolerance))} (with its tolerance).",
            )
        )
    return out
