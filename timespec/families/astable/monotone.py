"""Which astable factors move which outputs monotonically, and the proofs.

The worst-case search fixes a factor declared ``rising``/``falling`` for an output
at the end that gives each extreme (see :class:`timespec.analysis.Factor`).  This
module holds the astable's declarations and the box checks that guard the
conditional ones.  Tests compare every declaration with the full search (exact equality).
"""

from __future__ import annotations

import dataclasses
import functools
from collections.abc import Mapping

from timespec.analysis import Factor
from timespec.families.inputs import REFERENCE_C

__all__ = [
    "ALWAYS",
    "DELAY_SAFE",
    "GUARDED",
    "RATIO_GUARDED",
    "declarations",
    "declared",
]

# Notation: effective parts Ra, Rb, R, C (each a positive product of its value and
# (1 + tol)(1 + age)(1 + drift), and C also (1 + bias), so rising in those factors; the ``.tc``
# factors multiply (T − 25), change sign and are never declared), drain i = ith + leak ≥ 0,
# thresholds lo = kV/2, hi = kV.  Both half-periods are multiplied by the same
# timer scale s = (1 + drift·(T − 25))(1 + vco·(V − V_nom)), which must be positive
# (checked on the box, else nothing is declared); temperature, supply, the timer's
# drift and vco, and the diode tempco are never declared.
#
# High time.  Every circuit charges the node from lo to hi with a current that
# falls as v rises: tH = ∫[lo, hi] C dv / I(v), I = I_c(v) − i, inf where I ≤ 0.
# Classic I_c = (V − v)/(Ra + Rb); feedback I_c = (V − drop − v)/R; diode
# I_c = max((V − vd − v)/Ra, (V − v)/(Ra + Rb)) — the two pieces of
# :func:`~timespec.physics.astable.diode_high_time` meet at v_x, where the diode
# current vanishes, and below v_x the diode branch carries more (clipping v_x into
# [lo, hi] is the same max); feedback with output resistance: I_c = (V − drop −
# v)/(R + R_oh), so R_oh enters as R does (and R_ol in tL as R: Rt = R + R_ol,
# ve = V_ol − i·Rt).  So tH rises with C, Ra, Rb, R, i, vd (v25) and drop
# (each lowers I or scales it), and with k: d/dk ∫[ak, 2ak] g = a(2g(2ak) − g(ak))
# > 0 with g = C/I rising in v.  An unreachable threshold (inf) stays unreachable
# in the rising direction.  ``timer.ron``, ``output.low`` and ``output.rol`` do
# not enter tH.
#
# Low time.  tL = Rt·C·ln(1 + c/(c − ve)) with c = kV/2; classic and diode:
# Rt = Rb + r_n, ve = v_n − i·Rt (discharge node v_n = V·ron/(Ra + ron),
# r_n = Ra·ron/(Ra + ron)); feedback: Rt = R + R_ol, ve = V_ol − i·Rt (so R_ol
# moves tL as R does; ``output.roh`` does not enter tL).  Rising in C;
# falling in i (ve falls, Rt does not move; inf turns finite, never back).  Rising
# in Rb or R where v_n (V_ol) ≤ c: with u = c − ve, z = c/u,
# d tL/d Rt ∝ ln(1 + z) − z/(1 + z)·(1 − z + v_n/u) ≥ ln(1 + z) − z/(1 + z) ≥ 0.
# Rising in ron where V > i·Ra (v_n and r_n both rise, d ve/d ron ∝ V − i·Ra), and
# in V_ol.  Not monotone in Ra (r_n rises, v_n falls) nor in k (d/dk has the sign
# of −ve, either sign).  vd and drop do not enter tL.
#
# Period = s(tH + tL) rises where both rise or one is untouched; frequency = 1/T
# falls there.  Duty = tH/(tH + tL) rises where tH rises and tL falls or is
# untouched, and falls the other way round; it is never declared for C (constant
# in exact arithmetic, rounding noise in floating point) nor where a time may be
# inf (the model reports duty inf there).  The statements that need finite times,
# v_n ≤ c and V > i·Ra are only declared when the box guarantees them (see
# :func:`_finite_everywhere`).
#
# Classic period in k (with those guards, and :func:`_ratio_raises_period`):
# dtH/dk = R·C·a·x/((x − ak)(x − 2ak)) with a = V/2, x = V − i·R > 2ak; that falls
# with x (x > √2·ak), so it is at least R·C/(2(1 − k/2)(1 − k)).  dtL/dk =
# −Rt·C·a·ve/((2ak − ve)(ak − ve)) is negative only for ve > 0, and then, rising in
# ve ≤ v_n = ρV (ρ = ron/(Ra + ron) < k/2), at least −Rt·C·ρ/(2(k − ρ)(k/2 − ρ)).
# With Rt = Rb + r_n ≤ Ra + Rb = R the period rises in k wherever
# (k − ρ)(k/2 − ρ) ≥ ρ(1 − k/2)(1 − k), worst at k_min and ρ_max.

_Declared = Mapping[str, tuple[tuple[str, ...], tuple[str, ...]]]
_PARTS_UP = ("tol", "age", "drift", "bias")
# The node's stray (timer pins and board) adds to C, so it moves every output as C does.
# The timer's output delay t_pd lengthens both halves (tH = t_pd + the charge from the
# undershoot below kV/2, which itself grows with t_pd; tL likewise).  With a delay the
# C proof still holds: tH = t_pd + C·h(t_pd/C) with h rising and concave (the
# undershoot's charge, ln of a concave rising function, or the diode equation's integral
# of a current that falls with v), so dtH/dC = h(u) − u·h'(u) ≥ h(0) > 0.
_C_ONLY = {
    name: (("high", "low", "period"), ("frequency",))
    for name in (*(f"C.{p}" for p in _PARTS_UP), "stray", "timer.delay")
}
#: With a delay the turning voltages couple the halves (the overshoot past kV
#: depends on the charge resistors, the undershoot on the discharge path), which
#: breaks the resistor, threshold, drain, diode and output proofs below; only these
#: stay declared then.
DELAY_SAFE = frozenset(_C_ONLY)

#: Declarations that hold everywhere the timer scale is positive: ``factor →
#: (rising outputs, falling outputs)``, per variant.
ALWAYS: Mapping[str, _Declared] = {
    "classic": {
        **_C_ONLY,
        **{f"{r}.{p}": (("high",), ()) for r in ("RA", "RB") for p in ("tol", "age")},
        "timer.ratio": (("high",), ()),
        "timer.ith": (("high",), ("low",)),
        "leak": (("high",), ("low",)),
        "timer.ron": (("high",), ()),
    },
    "diode": {
        **_C_ONLY,
        **{f"{r}.{p}": (("high",), ()) for r in ("RA", "RB") for p in ("tol", "age")},
        "timer.ratio": (("high",), ()),
        "timer.ith": (("high",), ("low",)),
        "leak": (("high",), ("low",)),
        "timer.ron": (("high",), ()),
        "diode.v25": (("high", "low"), ()),
    },
    "feedback": {
        **_C_ONLY,
        **{f"R.{p}": (("high",), ()) for p in ("tol", "age")},
        "timer.ratio": (("high",), ()),
        "timer.ith": (("high",), ("low",)),
        "leak": (("high",), ("low",)),
        "output.drop": (("high", "low"), ()),
        "output.low": (("high", "low"), ()),
        "output.roh": (("high",), ()),
    },
}

_RB_UP = {f"RB.{p}": (("high", "low", "period"), ("frequency",)) for p in ("tol", "age")}
_DRAIN_UP = {
    "timer.ith": (("high", "duty"), ("low",)),
    "leak": (("high", "duty"), ("low",)),
}

#: Declarations that also need finite times, ``v_n ≤ kV/2`` and ``V > i·Ra`` over
#: the whole box (they replace the :data:`ALWAYS` entry of the same factor).
GUARDED: Mapping[str, _Declared] = {
    "classic": {
        **_RB_UP,
        **_DRAIN_UP,
        "timer.ron": (("high", "low", "period"), ("frequency", "duty")),
    },
    "diode": {
        **_RB_UP,
        **_DRAIN_UP,
        "timer.ron": (("high", "low", "period"), ("frequency", "duty")),
        "diode.v25": (("high", "low", "period", "duty"), ("frequency",)),
    },
    "feedback": {
        **{f"R.{p}": (("high", "low", "period"), ("frequency",)) for p in ("tol", "age")},
        **_DRAIN_UP,
        "output.drop": (("high", "low", "period", "duty"), ("frequency",)),
        "output.low": (("high", "low", "period"), ("frequency", "duty")),
        "output.roh": (("high", "period", "duty"), ("frequency",)),
        "output.rol": (("low", "period"), ("frequency", "duty")),
    },
}


def _bounds(facs: Mapping[str, Factor], ref: str, t_dev: float) -> tuple[float, float]:
    """Smallest and largest effective value of a part over the box."""
    value = facs[f"{ref}.value"].nominal
    lo = hi = value
    for p in _PARTS_UP:
        f = facs.get(f"{ref}.{p}")
        if f is not None:
            lo, hi = lo * (1.0 + f.low), hi * (1.0 + f.high)
    tc = facs.get(f"{ref}.tc")
    if tc is not None:
        dev = max(abs(tc.low), abs(tc.high)) * 1e-6 * t_dev
        lo, hi = lo * (1.0 - dev), hi * (1.0 + dev)
    return lo, hi


def _span(facs: Mapping[str, Factor], name: str) -> tuple[float, float]:
    f = facs.get(name)
    return (0.0, 0.0) if f is None else (f.low, f.high)


def _scale_positive(facs: Mapping[str, Factor]) -> bool:
    """Whether the timer's drift scale ``s`` stays positive over the whole box."""
    t_lo, t_hi = _span(facs, "temp")
    t_dev = max(abs(t_lo - REFERENCE_C), abs(t_hi - REFERENCE_C))
    v_lo, v_hi = _span(facs, "supply")
    v_nom = facs["supply.nominal"].nominal
    v_dev = max(abs(v_lo - v_nom), abs(v_hi - v_nom))
    d = max(map(abs, _span(facs, "timer.drift"))) * 1e-6 * t_dev
    g = max(map(abs, _span(facs, "timer.vco"))) * v_dev
    return d < 1.0 and g < 1.0


def _finite_everywhere(facs: Mapping[str, Factor], variant: str) -> bool:
    """Whether both times are finite, ``v_n < kV/2`` and ``V > i·Ra`` over the whole box.

    Notes
    -----
    Sufficient bounds from the box ends: the high time is finite when the
    charging current at ``hi`` beats the largest drain,
    ``V_min·(1 − k_max) − v_max > i_max·R_max`` (classic ``v = 0``,
    ``R = Ra + Rb``; diode also with ``v = vd_max``, ``R = Ra``; feedback
    ``v = drop_max``, ``R = R + R_oh``), which also gives ``V > i·Ra``; the low
    time is finite, and rising in Rb, when ``ron_max/(Ra_min + ron_max) < k_min/2``
    (feedback: ``V_ol,max < k_min·V_min/2``).
    """
    t_lo, t_hi = _span(facs, "temp")
    t_dev = max(abs(t_lo - REFERENCE_C), abs(t_hi - REFERENCE_C))
    v_min = _span(facs, "supply")[0]
    k_lo, k_hi = _span(facs, "timer.ratio")
    i_max = _span(facs, "timer.ith")[1] + _span(facs, "leak")[1]
    room = v_min * (1.0 - k_hi)
    if variant == "feedback":
        r_max = _bounds(facs, "R", t_dev)[1] + _span(facs, "output.roh")[1]
        high_ok = room - _span(facs, "output.drop")[1] > i_max * r_max
        return high_ok and _span(facs, "output.low")[1] < 0.5 * k_lo * v_min
    ra_lo, ra_hi = _bounds(facs, "RA", t_dev)
    rb_hi = _bounds(facs, "RB", t_dev)[1]
    high_ok = room > i_max * (ra_hi + rb_hi)
    # With the diode equation the diode only adds to the charging current of the
    # RA + RB path, so the classic bound above is already sufficient.
    if variant == "diode" and not high_ok and "diode.v25" in facs:
        tc_lo, tc_hi = _span(facs, "diode.tc")
        vd_max = _span(facs, "diode.v25")[1] + 1e-3 * max(
            tc * (t - REFERENCE_C) for tc in (tc_lo, tc_hi) for t in (t_lo, t_hi)
        )
        high_ok = room - max(vd_max, 0.0) > i_max * ra_hi
    ron = _span(facs, "timer.ron")[1]
    return high_ok and ron < 0.5 * k_lo * (ra_lo + ron)


def _ratio_raises_period(facs: Mapping[str, Factor]) -> bool:
    """Whether the classic period provably rises with the threshold ratio (comment above)."""
    t_lo, t_hi = _span(facs, "temp")
    t_dev = max(abs(t_lo - REFERENCE_C), abs(t_hi - REFERENCE_C))
    k = _span(facs, "timer.ratio")[0]
    ron = _span(facs, "timer.ron")[1]
    rho = ron / (_bounds(facs, "RA", t_dev)[0] + ron)
    return k > 2.0 * rho and (k - rho) * (0.5 * k - rho) >= rho * (1.0 - 0.5 * k) * (1.0 - k)


#: With :data:`GUARDED` and :func:`_ratio_raises_period`: the classic period.
RATIO_GUARDED: Mapping[str, _Declared] = {
    "classic": {"timer.ratio": (("high", "period"), ("frequency",))},
}


def _entry(
    name: str, variant: str, level: int, delayed: bool = False
) -> tuple[tuple[str, ...], tuple[str, ...]] | None:
    """``(rising, falling)`` outputs of a factor at a proof level (0, 1 or 2)."""
    if delayed and name not in DELAY_SAFE:
        return None
    entry = None
    if level >= 2:
        entry = RATIO_GUARDED.get(variant, {}).get(name)
    if entry is None and level >= 1:
        entry = GUARDED[variant].get(name)
    if entry is None:
        entry = ALWAYS[variant].get(name)
    return entry


@functools.lru_cache(maxsize=4096)
def _declare(factor: Factor, variant: str, level: int, delayed: bool) -> Factor:
    entry = _entry(factor.name, variant, level, delayed)
    if entry is None:
        return factor
    return dataclasses.replace(factor, rising=entry[0], falling=entry[1])


def _level(factors: list[Factor], variant: str) -> int | None:
    """Proof level the box allows: None (nothing), 0 (:data:`ALWAYS`), 1
    (:data:`GUARDED`) or 2 (:data:`RATIO_GUARDED`)."""
    by_name = {f.name: f for f in factors}
    if not _scale_positive(by_name):
        return None
    if not _finite_everywhere(by_name, variant):
        return 0
    return 2 if variant == "classic" and _ratio_raises_period(by_name) else 1


def declarations(factors: list[Factor], variant: str) -> list[Factor]:
    """The factors with every proven monotone output declared (see the comment above)."""
    level = _level(factors, variant)
    if level is None:
        return factors
    delayed = _delayed(factors)
    return [_declare(f, variant, level, delayed) for f in factors]


def _delayed(factors: list[Factor]) -> bool:
    """Whether the timer's output delay is in the model (a positive ``timer.delay``)."""
    return any(f.name == "timer.delay" and f.high > 0.0 for f in factors)


def declared(factors: list[Factor], variant: str) -> list[Factor]:
    """The factors as the worst-case search should get them: every proven declaration.

    Declarations only change how many points the search visits, never its
    result; the search itself falls back to the one undeclared grid where the
    per-output grids would together save too little
    (``DECLARED_PAYS`` in :mod:`timespec.analysis.worstcase`).
    """
    return declarations(factors, variant)
