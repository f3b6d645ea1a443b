"""Candidate (R, C) designs for two-part circuits whose timing scales with R·C.

Shared by the ``delay`` and ``relaxation`` families: a probe design's worst
case gives the spread of the timing output relative to its nominal,
:func:`aim_nominal` turns the requirement into the nominal that centres that
spread, and :func:`rc_candidates` finds, for every allowed value of one part,
both standard neighbours of the other part that give that nominal.
"""

from __future__ import annotations

import math

import numpy as np

from timespec.analysis import nominal_inputs, worst_case
from timespec.families.candidates import candidate_values, capacitor_part, resistor_part, snap
from timespec.families.goals import scale_to_goal
from timespec.families.protocol import Family, FloatArray
from timespec.model import Block, Window
from timespec.parts.part import Design

__all__ = ["aim_nominal", "rc_candidates"]


def aim_nominal(window: Window, low_ratio: float, high_ratio: float) -> float:
    """The nominal value that centres a worst-case window on a requirement.

    Parameters
    ----------
    window
        The requirement on an output.
    low_ratio, high_ratio
        Worst-case low and high of the output divided by its nominal value
        (from a probe design; the spread is close to proportional).

    Returns
    -------
    float
        The nominal to aim at.

    Notes
    -----
    Two-sided window ``[L, H]``: ``(L + H)/(low_ratio + high_ratio)``, which puts
    the middle of the worst-case window on the middle of the requirement and so
    minimises the larger excursion when the window cannot be met.  Upper bound
    only: the worst-case high at 90 % of the bound; lower bound only: the
    worst-case low at 110 % of the bound.

    References
    ----------
    Centring a toleranced quantity in its window, common practice.
    """
    if math.isinf(window.high):
        return 1.1 * window.low / low_ratio
    if window.low <= 0.0:
        return 0.9 * window.high / high_ratio
    return (window.low + window.high) / (low_ratio + high_ratio)


def _time_window(block: Block, quantity: str) -> tuple[Window, bool]:
    """The requirement on ``quantity`` (or period/frequency), and whether it is a frequency."""
    for name in (quantity, "period", "frequency"):
        req = block.requirement(name)
        if req is not None:
            return req.window, name == "frequency"
    raise ValueError(f"block {block.name!r} has no timing requirement")


def rc_candidates(
    fam: Family, block: Block, quantity: str, r_limits: tuple[float, float] | None = None
) -> list[Design]:
    """Candidate (R, C) designs for a circuit whose timing scales with R·C.

    Parameters
    ----------
    fam
        The family (its ``factors`` and ``evaluate`` are used).
    block
        The block.
    quantity
        The timing output that the requirement is on (``"delay"``, ``"period"``);
        a ``frequency`` requirement is used through ``1/period``.
    r_limits
        Extra bounds on R (e.g. a gate class's usable range), intersected with
        the resistor policy's range when they overlap.

    Returns
    -------
    list of Design
        Both standard neighbours of the continuous part for every allowed value
        of the other; pinned parts as given.

    Notes
    -----
    The output is nearly proportional to R·C, so a probe design's worst case
    gives the spread ratios, :func:`aim_nominal` the nominal that centres them,
    and two multiplicative corrections with the nominal model (drain included)
    the continuous value.
    """
    rp, cp = block.resistors, block.capacitors
    pin_r, pin_c = block.pinned_part("R"), block.pinned_part("C")
    if pin_r is not None and pin_c is not None:
        return [Design((resistor_part("R", 0, rp, pin_r), capacitor_part("C", 0, cp, pin_c)))]
    r_lo, r_hi = rp.low, rp.high
    if r_limits is not None and max(r_lo, r_limits[0]) <= min(r_hi, r_limits[1]):
        r_lo, r_hi = max(r_lo, r_limits[0]), min(r_hi, r_limits[1])
    window, is_freq = _time_window(block, quantity)
    model = fam.evaluate(block, "")
    key = quantity if quantity == "delay" else "period"
    r_probe = math.sqrt(r_lo * r_hi) if pin_r is None else pin_r.value
    c_probe = math.sqrt(cp.low * cp.high) if pin_c is None else pin_c.value
    probe = Design((resistor_part("R", r_probe, rp), capacitor_part("C", c_probe, cp)))
    probe_factors = fam.factors(block, probe)
    ex = worst_case(probe_factors, model)
    e = ex["frequency"] if is_freq else ex[key]
    if not (e.nominal > 0 and math.isfinite(e.nominal) and math.isfinite(e.high) and e.low > 0):
        low_ratio = high_ratio = 1.0
    else:
        low_ratio, high_ratio = e.low / e.nominal, e.high / e.nominal
    aim = aim_nominal(window, low_ratio, high_ratio)
    goal = 1.0 / aim if is_freq else aim  # a time
    base = nominal_inputs(probe_factors)
    k0 = float(model(base)[key][0]) / (r_probe * c_probe)  # time per R·C at nominal
    if not (math.isfinite(k0) and k0 > 0):
        return []

    def time_for(r: FloatArray, c: FloatArray) -> FloatArray:
        n = max(r.size, c.size)
        x = {k: np.broadcast_to(v, (n,)) for k, v in base.items()}
        x["R.value"] = np.broadcast_to(np.asarray(r, dtype=np.float64), (n,))
        x["C.value"] = np.broadcast_to(np.asarray(c, dtype=np.float64), (n,))
        return model(x)[key]

    designs: list[Design] = []
    if pin_c is not None:
        c = np.array([pin_c.value])
        r = scale_to_goal(lambda rr: time_for(rr, c), goal, goal / (c * k0))
        below, above = snap(rp.series, r, r_lo, r_hi)
        for val in _values(below, above):
            designs.append(Design((resistor_part("R", val, rp), capacitor_part("C", 0, cp, pin_c))))
        return designs
    if pin_r is not None:
        rv = np.array([pin_r.value])
        c = scale_to_goal(lambda cc: time_for(rv, cc), goal, goal / (rv * k0))
        below, above = snap(cp.series, c, cp.low, cp.high)
        for val in _values(below, above):
            designs.append(Design((resistor_part("R", 0, rp, pin_r), capacitor_part("C", val, cp))))
        return designs
    cs = candidate_values(cp.series, cp.low, cp.high)
    if cs.size == 0:
        return []
    r = scale_to_goal(lambda rr: time_for(rr, cs), goal, goal / (cs * k0))
    below, above = snap(rp.series, r, r_lo, r_hi)
    for cval, rb, ra in zip(cs, below, above, strict=True):
        for val in _values(np.array([rb]), np.array([ra])):
            designs.append(
                Design((resistor_part("R", val, rp), capacitor_part("C", float(cval), cp)))
            )
    return designs


def _values(below: FloatArray, above: FloatArray) -> list[float]:
    vals = {float(v) for arr in (below, above) for v in np.atleast_1d(arr) if np.isfinite(v)}
    return sorted(vals)
