"""What a crystal block states, read with this family's defaults, and its load-capacitor values.

The defaults (stray 3 pF to 5 pF, the 1 pF … 100 pF capacitor range, a gain
margin of 5) are described in :mod:`timespec.families.crystal`.
"""

from __future__ import annotations

import functools

import numpy as np

from timespec.analysis import Factor
from timespec.families.candidates import capacitor_part
from timespec.families.protocol import FloatArray
from timespec.model import Block, CapacitorPolicy, Window
from timespec.parts import series
from timespec.parts.part import Design

__all__ = [
    "CAP_HIGH",
    "CAP_LOW",
    "DEFAULT_STRAY",
    "MIN_GAIN_MARGIN",
    "PPM",
    "ageing",
    "ageing_span",
    "allowed_values",
    "band",
    "band_factor",
    "capacitor_policy",
    "load_pair",
    "needed",
    "neighbour_values",
    "ohms",
    "pf",
    "ppm",
    "stray_window",
    "values_around",
]

#: Smallest load capacitor considered when the policy does not say (F).
CAP_LOW = 1e-12
#: Largest load capacitor considered when the policy does not say (F).
CAP_HIGH = 100e-12
#: Stray capacitance assumed when the block gives none (F); common practice.
DEFAULT_STRAY = Window(3e-12, 5e-12, "capacitance")
#: Gain margin below which start-up is not trusted; common practice.
MIN_GAIN_MARGIN = 5.0

PPM = 1e-6


def stray_window(block: Block) -> Window:
    """The stray capacitance window of a crystal block.

    Parameters
    ----------
    block
        A crystal block.

    Returns
    -------
    Window
        The ``stray`` setting, or :data:`DEFAULT_STRAY` (3 pF to 5 pF, common
        practice) when absent.
    """
    return block.window("stray") or DEFAULT_STRAY


def capacitor_policy(block: Block) -> CapacitorPolicy:
    """The block's capacitor policy with its value range clipped to crystal loads.

    Parameters
    ----------
    block
        A crystal block.

    Returns
    -------
    CapacitorPolicy
        Same series, tolerance, dielectric and ageing.  Range 1 pF … 100 pF when
        the policy has the package-wide default range (none written); otherwise
        ``[max(low, 1 pF), min(high, 100 pF)]``, or 1 pF … 100 pF when that is empty.

    Notes
    -----
    The package-wide default range (100 pF … 100 nF) suits RC timing, not the few
    pF to tens of pF of crystal load capacitors; a range written for crystals
    (inside 1 pF … 100 pF) is kept as written, a range written for RC timing in a
    shared ``defaults:`` section is clipped.
    """
    p = block.capacitors
    default = CapacitorPolicy()
    if (p.low, p.high) == (default.low, default.high):
        low, high = CAP_LOW, CAP_HIGH
    else:
        low, high = max(p.low, CAP_LOW), min(p.high, CAP_HIGH)
        if low > high:
            low, high = CAP_LOW, CAP_HIGH
    return CapacitorPolicy(
        series=p.series,
        tolerance=p.tolerance,
        dielectric=p.dielectric,
        low=low,
        high=high,
        pairs=False,
        ageing=p.ageing,
    )


def band(block: Block, key: str) -> Window:
    """The block's ``key`` band as a ratio window (zero when the statement is absent)."""
    w = block.window(key)
    return w if w is not None else Window(0.0, 0.0, "ratio", 0.0)


def ageing(block: Block) -> Window:
    """The crystal's ageing over the block's life.

    A rate per year times the life (a ±3 ppm/year crystal over 5 years: ±15 ppm).  A
    total over a stated period (``aging ±10 ppm over 10 years``) holds as it is for
    any life up to that period (ageing only accumulates, so the total bounds every
    shorter life) and is stretched in proportion beyond it (crystal ageing slows
    with time, roughly logarithmically, so the proportional extension is a safe
    bound; common practice).
    """
    w = band(block, "aging")
    life = block.conditions.life_years
    period = block.number("aging_period") or 0.0
    scale = life
    if period > 0.0:
        scale = max(1.0, life * _YEAR_S / period)
    return Window(w.low * scale, w.high * scale, "ratio", 0.0 if w.low <= 0 <= w.high else None)


def ageing_span(block: Block) -> str:
    """How the ageing band was reached, in words (``over 5 years``, ``over 20 years,
    stretched from ±10 ppm over 10 years``)."""
    life = block.conditions.life_years
    period = block.number("aging_period") or 0.0
    if period <= 0.0:
        return f"over {life:g} years"
    stated = period / _YEAR_S
    if life <= 0.0:
        return f"over {stated:g} years, as stated (no 'life')"
    if life * _YEAR_S <= period:
        return f"over {life:g} years (the total stated for {stated:g} years)"
    return f"over {life:g} years (the total stated for {stated:g} years, in proportion)"


#: One year in seconds (the Julian year the spec's ``years`` unit uses).
_YEAR_S = 365.25 * 86400.0


def needed(block: Block, key: str) -> float:
    """The value of a statement the crystal model cannot do without."""
    value = block.number(key)
    if value is None:
        raise ValueError(f"crystal block {block.name!r} has no {key!r} statement")
    return value


def band_factor(name: str, label: str, w: Window) -> Factor:
    """A crystal ppm band as a factor, nominal at zero when the band holds zero."""
    nominal = min(max(0.0, w.low), w.high)
    return Factor(name, label, nominal, w.low, w.high, group="crystal")


def ppm(x: float) -> str:
    """A fraction in ppm, for messages."""
    return f"{x / PPM:.3g} ppm"


def ohms(r: float) -> str:
    """A resistance in Ω or kΩ, for messages."""
    return f"{r / 1e3:.3g} kΩ" if r >= 1e3 else f"{r:.3g} Ω"


def pf(c: float) -> str:
    """A capacitance in pF, for messages."""
    return f"{c * 1e12:.3g} pF"


def allowed_values(policy: CapacitorPolicy) -> FloatArray:
    """Every standard value of the policy's series inside its range (read-only)."""
    return _values(policy.series, policy.low, policy.high)


@functools.lru_cache(maxsize=64)
def _values(name: str, low: float, high: float) -> FloatArray:
    out = np.asarray(series.values_between(name, low, high), dtype=np.float64)
    out.setflags(write=False)
    return out


def neighbour_values(policy: CapacitorPolicy, x: float) -> list[float]:
    """Standard values just below and above ``x`` inside the policy range (one if x is one)."""
    allowed = allowed_values(policy)
    if allowed.size == 0:
        return []
    if x <= allowed[0]:
        return [float(allowed[0])]
    if x >= allowed[-1]:
        return [float(allowed[-1])]
    below, above = series.neighbours(policy.series, x)
    return sorted({below, above})


def values_around(policy: CapacitorPolicy, v: float) -> list[float]:
    """A standard value and its neighbours in the series, inside the policy range."""
    allowed = [float(a) for a in allowed_values(policy)]
    i = min(range(len(allowed)), key=lambda k: abs(allowed[k] - v))
    return allowed[max(0, i - 1) : i + 2]


def load_pair(policy: CapacitorPolicy, a: float, b: float) -> Design:
    """The design with ``C1 = a`` and ``C2 = b`` from the policy."""
    return Design((capacitor_part("C1", a, policy), capacitor_part("C2", b, policy)))
