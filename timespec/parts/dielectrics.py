"""Capacitor dielectrics and their temperature behaviour; resistor temperature coefficients.

Two kinds of temperature behaviour are modelled:

* **linear** (class 1 ceramics and film): the capacitance changes by ``tc * (T - 25 degC)``
  with the temperature coefficient ``tc`` somewhere in a band ``[tc_ppm_low, tc_ppm_high]``
  ppm/K;
* **envelope** (class 2 ceramics and aluminium electrolytics): the standard only promises that
  the change stays inside ``[drift_low, drift_high]`` over the rated range, with no shape.

Class 2 ceramic codes (EIA-198, e.g. X7R) are decoded letter by letter, so any valid
three-character code works, not just a fixed list.

Class 2 ceramics also lose capacitance in two ways that are not temperature, both one-sided
and both bounded here as worst-case inputs:

* **ageing**: after the last heat above the Curie point (reflow soldering resets it) the
  capacitance falls by a rate per decade of hours, ``loss = rate * log10(t / t_ref)``
  (:func:`ageing_loss_bound`, rates per class in :func:`class2_ageing_band`);
* **DC bias**: the capacitance falls with the applied DC voltage relative to the rated
  voltage, bounded by ``loss <= L_rated * sqrt(V / V_rated)`` (:func:`bias_loss_bound`).

Each band carries a :class:`~timespec.parts.validity.Held` range saying where it holds.

Where a number is not from a standard it is marked "common practice" or "from memory" beside
it.  All functions use plain floats (farad, degC, relative fractions); bad input raises
:class:`ValueError`.
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType
from typing import Final, Literal

from timespec.parts.validity import Held

__all__ = [
    "AGEING_REFERENCE_HOURS",
    "BIAS_LOSS_CEILING",
    "REFERENCE_TEMPERATURE",
    "RESISTOR_TCR_PPM",
    "STEADINESS_ORDER",
    "Class2Group",
    "Dielectric",
    "Family",
    "ageing_held",
    "ageing_loss_bound",
    "bias_held",
    "bias_loss_bound",
    "class2_ageing_band",
    "class2_bias_at_rated",
    "class2_group",
    "dielectric",
    "known_names",
    "steadiness",
    "temperature_drift_bounds",
]

Family = Literal["class1", "class2", "film", "electrolytic"]

REFERENCE_TEMPERATURE: Final = 25.0  # degC, the reference of EIA-198 / IEC 60384 figures


@dataclass(frozen=True, slots=True)
class Dielectric:
    """A capacitor dielectric and what it does with temperature.

    Parameters
    ----------
    name
        Canonical name, e.g. ``"C0G"``, ``"X7R"``, ``"PP"``.
    family
        ``"class1"``, ``"class2"``, ``"film"`` or ``"electrolytic"``.
    tc_ppm_low, tc_ppm_high
        Band of the linear temperature coefficient in ppm/K (class 1 and film); 0 and 0 for
        envelope kinds.
    drift_low, drift_high
        Signed relative change of capacitance allowed over the rated range, referred to
        25 degC (class 2 and electrolytic, e.g. -0.15 and +0.15 for X7R); 0 and 0 for linear
        kinds.
    t_min, t_max
        Rated temperature range in degC.
    min_farads, max_farads
        Range of values commonly available in this dielectric (common practice, from memory).
    precise
        True when the dielectric is fit for precise timing (class 1 and film).
    notes
        One line on why.
    """

    name: str
    family: Family
    tc_ppm_low: float
    tc_ppm_high: float
    drift_low: float
    drift_high: float
    t_min: float
    t_max: float
    min_farads: float
    max_farads: float
    precise: bool
    notes: str

    @property
    def linear(self) -> bool:
        """True for kinds described by a linear temperature coefficient band."""
        return self.family in ("class1", "film")


# --- fixed entries -------------------------------------------------------------------------
# C0G: EIA-198 class 1 code C0G = 0 +- 30 ppm/K over -55..125 degC (standard).
# U2J: EIA-198 class 1 code U2J = -750 +- 120 ppm/K (U: 7.5, 2: x -100, J: +-120 ppm/K);
#      rated -55..125 degC (common practice).
# PP, PET: film TC bands are from memory (PP about -200 ppm/K; PET +400..+600 ppm/K and not
#      linear); rated ranges -55..105 degC (PP) and -55..125 degC (PET) are common practice.
# AL: aluminium electrolytic drift envelope -20 %/+10 % over -40..85 degC is from memory.
# Available value ranges are common practice, from memory.
_FIXED: Final[Mapping[str, Dielectric]] = MappingProxyType(
    {
        "C0G": Dielectric(
            name="C0G",
            family="class1",
            tc_ppm_low=-30.0,
            tc_ppm_high=30.0,
            drift_low=0.0,
            drift_high=0.0,
            t_min=-55.0,
            t_max=125.0,
            min_farads=0.1e-12,
            max_farads=100e-9,
            precise=True,
            notes="class 1 ceramic: near-zero tempco, no DC-bias loss, negligible ageing",
        ),
        "U2J": Dielectric(
            name="U2J",
            family="class1",
            tc_ppm_low=-870.0,
            tc_ppm_high=-630.0,
            drift_low=0.0,
            drift_high=0.0,
            t_min=-55.0,
            t_max=125.0,
            min_farads=1e-12,
            max_farads=100e-9,
            precise=True,
            notes="class 1 ceramic with a large but predictable negative tempco, no DC-bias loss",
        ),
        "PP": Dielectric(
            name="PP",
            family="film",
            tc_ppm_low=-250.0,
            tc_ppm_high=-150.0,
            drift_low=0.0,
            drift_high=0.0,
            t_min=-55.0,
            t_max=105.0,
            min_farads=100e-12,
            max_farads=10e-6,
            precise=True,
            notes="polypropylene film: low loss and dielectric absorption, small negative tempco",
        ),
        "PET": Dielectric(
            name="PET",
            family="film",
            tc_ppm_low=400.0,
            tc_ppm_high=600.0,
            drift_low=0.0,
            drift_high=0.0,
            t_min=-55.0,
            t_max=125.0,
            min_farads=1e-9,
            max_farads=10e-6,
            precise=True,
            notes="polyester film: positive, non-linear tempco (band is a linear approximation)",
        ),
        "AL": Dielectric(
            name="AL",
            family="electrolytic",
            tc_ppm_low=0.0,
            tc_ppm_high=0.0,
            drift_low=-0.20,
            drift_high=0.10,
            t_min=-40.0,
            t_max=85.0,
            min_farads=100e-9,
            max_farads=100e-3,
            precise=False,
            notes="aluminium electrolytic: +-20 % initial, high leakage rising when hot, wears out",
        ),
    }
)

_ALIASES: Final[Mapping[str, str]] = MappingProxyType(
    {
        "NP0": "C0G",
        "NPO": "C0G",  # letter O, as the code is often typed
        "COG": "C0G",  # letter O in place of the zero
        "POLYPROPYLENE": "PP",
        "POLYESTER": "PET",
        "ALUMINIUM": "AL",
        "ALUMINUM": "AL",
    }
)

# --- EIA-198 class 2 code: <low temperature letter><high temperature digit><change letter> ----
# Low temperature letters X, Y, Z: standard (EIA-198).
_LOW_TEMP: Final[Mapping[str, float]] = MappingProxyType({"X": -55.0, "Y": -30.0, "Z": 10.0})
# High temperature digits: 5, 6, 7, 8 are standard (EIA-198; X5R, X6S, X7R, X8R);
# 2 (+45), 4 (+65) and 9 (+200 degC) are from memory.
_HIGH_TEMP: Final[Mapping[str, float]] = MappingProxyType(
    {"2": 45.0, "4": 65.0, "5": 85.0, "6": 105.0, "7": 125.0, "8": 150.0, "9": 200.0}
)
# Change letters -> (low, high) relative change: P, R, S, T, U, V are standard (EIA-198);
# A, B, C, D, E, F (+-1.0 .. +-7.5 %) are from memory.
_CHANGE: Final[Mapping[str, tuple[float, float]]] = MappingProxyType(
    {
        "A": (-0.010, 0.010),
        "B": (-0.015, 0.015),
        "C": (-0.022, 0.022),
        "D": (-0.033, 0.033),
        "E": (-0.047, 0.047),
        "F": (-0.075, 0.075),
        "P": (-0.10, 0.10),
        "R": (-0.15, 0.15),
        "S": (-0.22, 0.22),
        "T": (-0.33, 0.22),
        "U": (-0.56, 0.22),
        "V": (-0.82, 0.22),
    }
)
_CLASS2_RE: Final = re.compile(f"[{''.join(_LOW_TEMP)}][{''.join(_HIGH_TEMP)}][{''.join(_CHANGE)}]")
_COMMON_CLASS2: Final[tuple[str, ...]] = (
    "X5R",
    "X6S",
    "X7R",
    "X7S",
    "X7T",
    "X8R",
    "Y5V",
    "Z5U",
)
# Commonly available values of class 2 parts (common practice, from memory).
_CLASS2_RANGE: Final[Mapping[str, tuple[float, float]]] = MappingProxyType(
    {"X5R": (100e-12, 100e-6), "X6S": (100e-12, 47e-6)}
)
_CLASS2_DEFAULT_RANGE: Final = (100e-12, 22e-6)
_CLASS2_NOTES: Final = (
    "class 2 ceramic: loses capacitance with DC bias and ages about 1-4 %/decade-hour; "
    "not for precise timing"
)

#: Typical resistor temperature coefficients, ppm/K, magnitude (datasheet class, from memory):
#: thick film 100 (some grades 200), thin film 25 (some grades 50), metal film 50.
RESISTOR_TCR_PPM: Final[Mapping[str, float]] = MappingProxyType(
    {"thick film": 100.0, "thin film": 25.0, "metal film": 50.0}
)


def _decode_class2(code: str) -> Dielectric:
    low_t = _LOW_TEMP[code[0]]
    high_t = _HIGH_TEMP[code[1]]
    d_low, d_high = _CHANGE[code[2]]
    c_min, c_max = _CLASS2_RANGE.get(code, _CLASS2_DEFAULT_RANGE)
    return Dielectric(
        name=code,
        family="class2",
        tc_ppm_low=0.0,
        tc_ppm_high=0.0,
        drift_low=d_low,
        drift_high=d_high,
        t_min=low_t,
        t_max=high_t,
        min_farads=c_min,
        max_farads=c_max,
        precise=False,
        notes=_CLASS2_NOTES,
    )


def known_names() -> tuple[str, ...]:
    """Return the dielectric names offered for "did you mean" hints.

    Returns
    -------
    tuple of str
        The fixed entries (C0G, U2J, PP, PET, AL), their aliases (NP0, ...), and common
        EIA-198 class 2 codes (X5R, X7R, Y5V, ...).  Any other valid class 2 code is accepted
        by :func:`dielectric` as well.

    Notes
    -----
    The class 2 list is a selection of widely sold codes (common practice).

    References
    ----------
    EIA-198 (ceramic dielectric codes), common practice for the selection.
    """
    return (*_FIXED, *_ALIASES, *_COMMON_CLASS2)


def dielectric(name: str) -> Dielectric:
    """Look up a dielectric by name.

    Parameters
    ----------
    name
        Case-insensitive: ``"C0G"`` (aliases ``"NP0"``, ``"NPO"``, ``"COG"``), ``"U2J"``,
        ``"PP"`` (``"polypropylene"``), ``"PET"`` (``"polyester"``), ``"AL"``
        (``"aluminium"``), or any EIA-198 class 2 code such as ``"X7R"``, ``"x5r"``, ``"Y5V"``.

    Returns
    -------
    Dielectric
        The entry; class 2 codes are decoded letter by letter.

    Raises
    ------
    ValueError
        For an unknown name; the message lists the known names.

    Notes
    -----
    Class 2 code: first letter the low temperature (X -55, Y -30, Z +10 degC), digit the high
    temperature (5 +85, 6 +105, 7 +125, 8 +150 degC; 2, 4, 9 from memory), last letter the
    allowed change (P +-10, R +-15, S +-22, T +22/-33, U +22/-56, V +22/-82 %; A to F from
    memory).

    References
    ----------
    EIA-198 ceramic dielectric codes; IEC 60384-8/-9 (class 1 / class 2 ceramic capacitors).
    """
    key = name.strip().upper()
    key = _ALIASES.get(key, key)
    if key in _FIXED:
        return _FIXED[key]
    if _CLASS2_RE.fullmatch(key):
        return _decode_class2(key)
    raise ValueError(
        f"unknown dielectric {name!r}; known names: {', '.join(known_names())} "
        "(or any EIA-198 class 2 code such as X7R)"
    )


#: Order of the dielectric families from steadiest to least steady: class 1 ceramics
#: (a small, linear tempco, no bias or ageing loss), film, class 2 ceramics (bias,
#: ageing and a wide envelope), aluminium electrolytics (wide tolerance, leakage, wear
#: out).  Common practice.
STEADINESS_ORDER: Final[tuple[Family, ...]] = ("class1", "film", "class2", "electrolytic")


def steadiness(name: str) -> tuple[int, float]:
    """Sort key of a dielectric by steadiness: smaller is steadier.

    Parameters
    ----------
    name
        A dielectric name, e.g. ``"C0G"`` or ``"PP"``.

    Returns
    -------
    tuple
        The family's place in :data:`STEADINESS_ORDER`, then the size of its
        temperature behaviour (the larger tempco bound in ppm/K for linear kinds,
        the larger envelope change for the others), so C0G ranks before U2J and
        PP before PET.
    """
    d = dielectric(name)
    size = (
        max(abs(d.tc_ppm_low), abs(d.tc_ppm_high))
        if d.linear
        else max(abs(d.drift_low), abs(d.drift_high))
    )
    return STEADINESS_ORDER.index(d.family), size


def _check_temp(what: str, t: float) -> float:
    value = float(t)
    if not math.isfinite(value):
        raise ValueError(f"{what} must be a finite temperature in degC, got {t!r}")
    return value


def temperature_drift_bounds(d: Dielectric, t_low: float, t_high: float) -> tuple[float, float]:
    """Return the bounds of the relative capacitance change over an ambient span.

    Parameters
    ----------
    d
        The dielectric.
    t_low, t_high
        The ambient span in degC, ``t_low <= t_high``, inside the rated range of ``d``.

    Returns
    -------
    (low, high) : tuple of float
        Smallest and largest relative change ``dC/C`` referred to 25 degC over the span.

    Raises
    ------
    ValueError
        If a temperature is not finite, ``t_low > t_high``, or the span leaves the rated
        range (the message names the range).

    Notes
    -----
    Linear kinds: ``dC/C = tc * 1e-6 * (T - 25)`` is bilinear in ``(tc, T)``, so its extremes
    over the box ``[tc_low, tc_high] x [t_low, t_high]`` are at the four corners; the result is
    exactly their minimum and maximum (a span containing 25 degC therefore contains 0).

    Envelope kinds (class 2, electrolytic): the standard gives only the envelope over the rated
    range, not the curve, so the whole envelope ``(drift_low, drift_high)`` is returned for any
    span other than exactly 25 degC, where the change is 0.  This is conservative.

    References
    ----------
    EIA-198 and IEC 60384-8/-9: temperature characteristics referred to 25 degC.
    """
    lo = _check_temp("t_low", t_low)
    hi = _check_temp("t_high", t_high)
    if lo > hi:
        raise ValueError(f"t_low ({t_low!r} degC) must not exceed t_high ({t_high!r} degC)")
    if lo < d.t_min or hi > d.t_max:
        raise ValueError(
            f"ambient span {lo:g}..{hi:g} degC exceeds the rated range "
            f"{d.t_min:g}..{d.t_max:g} degC of {d.name}"
        )
    if d.linear:
        corners = [
            tc * 1e-6 * (t - REFERENCE_TEMPERATURE)
            for tc in (d.tc_ppm_low, d.tc_ppm_high)
            for t in (lo, hi)
        ]
        return (min(corners) + 0.0, max(corners) + 0.0)
    if lo == hi == REFERENCE_TEMPERATURE:
        return (0.0, 0.0)
    return (d.drift_low, d.drift_high)


# --- class 2 ageing and DC-bias loss ---------------------------------------------------------
Class2Group = Literal["stable", "mid", "high-k"]

#: Hours after the last heat (reflow) at which the tolerance is taken to be measured and
#: from which ageing is counted.  Makers de-age class 2 parts (a heat above the Curie
#: point) and measure them about a day later; 24 h is that practice (common practice, from
#: memory; some standards refer the tolerance to 1000 h instead, which makes this choice the
#: more pessimistic one on the low side).
AGEING_REFERENCE_HOURS: Final = 24.0

#: Ceiling of the DC-bias loss bound when the stress passes the rated voltage (from memory:
#: even high-K parts keep roughly a tenth of their capacitance at a few times the rating).
BIAS_LOSS_CEILING: Final = 0.90

# Ageing rate bands per decade-hour, (low, high) as positive fractions of loss.
# stable (X7R, X8R, X7S ...): 1-2.5 %/decade [AN/Mem: X7R about 1-2 %, class 2 1-2.5 %];
# mid (X5R, X6S, X7T ...): 2-5 %/decade [AN/Mem]; high-k (Y5V, Z5U ...): 3-7 % [AN/Mem: up to 7].
_AGEING_BAND: Final[Mapping[str, tuple[float, float]]] = MappingProxyType(
    {"stable": (0.010, 0.025), "mid": (0.020, 0.050), "high-k": (0.030, 0.070)}
)
# Loss bound at the rated DC voltage, any case size [AN/Mem: -10..-50 % at rated voltage is
# common, 40-80 % in small cases; Y5V/Z5U high-K bodies lose most]: the bound covers small
# cases because the spec does not state the case size.
_BIAS_AT_RATED: Final[Mapping[str, float]] = MappingProxyType(
    {"stable": 0.60, "mid": 0.80, "high-k": 0.85}
)
# Where the log ageing law holds: 1 h to about 1e5 h (11 years) after the last heat, the span
# of published ageing curves (from memory).
_AGEING_HELD_HOURS: Final = (1.0, 1e5)
_HOUR: Final = 3600.0


def class2_group(d: Dielectric) -> Class2Group | None:
    """The ageing and DC-bias group of a class 2 ceramic, ``None`` for other kinds.

    Parameters
    ----------
    d
        The dielectric.

    Returns
    -------
    {"stable", "mid", "high-k"} or None
        ``"high-k"`` for change letters U and V (Y5V, Z5U: the highest permittivity
        bodies), ``"mid"`` for change letter T or a high-temperature digit of 6 or below
        (X5R, X6S, X7T), ``"stable"`` for the rest (X7R, X8R, X7S, X7P).

    Notes
    -----
    The grouping follows the permittivity of the body, which sets both the ageing rate
    and the DC-bias loss (common practice, from memory).
    """
    if d.family != "class2":
        return None
    change, digit = d.name[2], d.name[1]
    if change in "UV":
        return "high-k"
    if change == "T" or digit in "2456":
        return "mid"
    return "stable"


def class2_ageing_band(d: Dielectric) -> tuple[float, float]:
    """Ageing rate band of a dielectric, loss per decade-hour as positive fractions.

    Parameters
    ----------
    d
        The dielectric.

    Returns
    -------
    (low, high) : tuple of float
        e.g. ``(0.01, 0.025)`` for X7R; ``(0.0, 0.0)`` for kinds that do not age this way
        (class 1, film, electrolytic: their ageing is the policy's stated rate).

    References
    ----------
    Published class 2 ceramic application notes (X7R about 1-2 %/decade-hour, X5R 2-5 %,
    Y5V up to 7 %), from memory.
    """
    group = class2_group(d)
    return (0.0, 0.0) if group is None else _AGEING_BAND[group]


def class2_bias_at_rated(d: Dielectric) -> float:
    """Bound on the DC-bias loss at the rated voltage, a positive fraction (0 if none).

    Parameters
    ----------
    d
        The dielectric.

    Returns
    -------
    float
        0.60 for the stable group (X7R), 0.80 for the mid group (X5R), 0.85 for high-K
        (Y5V); 0 for class 1, film and electrolytic kinds.

    References
    ----------
    Published class 2 ceramic application notes: -10…-50 % at rated voltage is common,
    40-80 % in small cases (from memory; the bound covers small cases).
    """
    group = class2_group(d)
    return 0.0 if group is None else _BIAS_AT_RATED[group]


def _check_nonneg(what: str, v: float) -> float:
    value = float(v)
    if not (math.isfinite(value) and value >= 0.0):
        raise ValueError(f"{what} must be a finite, non-negative number, got {v!r}")
    return value


def ageing_loss_bound(
    d: Dielectric, hours: float, ref_hours: float = AGEING_REFERENCE_HOURS
) -> float:
    """Largest ageing loss of a class 2 ceramic after some hours from its last heat.

    Parameters
    ----------
    d
        The dielectric.
    hours
        Time since the last heat above the Curie point (reflow), h.
    ref_hours
        Time at which the tolerance holds, h (default :data:`AGEING_REFERENCE_HOURS`).

    Returns
    -------
    float
        ``rate_high * log10(hours / ref_hours)`` as a positive fraction of loss, 0 before
        the reference time and for kinds without a logarithmic ageing law.

    Raises
    ------
    ValueError
        If ``hours`` is negative or not finite, or ``ref_hours`` is not positive.

    Notes
    -----
    Class 2 ceramics lose capacitance linearly in the logarithm of the time since the
    last heat; reflow soldering de-ages them, so the clock starts at assembly.

    References
    ----------
    Published class 2 ceramic application notes (ageing per decade-hour), from memory.
    """
    t = _check_nonneg("hours", hours)
    ref = _check_nonneg("ref_hours", ref_hours)
    if ref <= 0.0:
        raise ValueError("ref_hours must be positive")
    rate = class2_ageing_band(d)[1]
    if rate == 0.0 or t <= ref:
        return 0.0
    return rate * math.log10(t / ref)


def bias_loss_bound(d: Dielectric, stress: float) -> float:
    """Largest DC-bias loss of a class 2 ceramic at a DC stress ``V / V_rated``.

    Parameters
    ----------
    d
        The dielectric.
    stress
        Applied DC voltage over the rated voltage, ``>= 0``.

    Returns
    -------
    float
        ``min(BIAS_LOSS_CEILING, L_rated * sqrt(stress))`` as a positive fraction of loss,
        ``L_rated`` from :func:`class2_bias_at_rated`; 0 for kinds without DC-bias loss.
        The actual loss lies anywhere from 0 to this bound.

    Raises
    ------
    ValueError
        If ``stress`` is negative or not finite.

    Notes
    -----
    Bias curves of small cases fall steeply at low stress and flatten towards the rating,
    so a square-root envelope through the loss at rated voltage bounds them from above
    better than a straight line does (from memory).  Beyond the rating the envelope is an
    extrapolation, capped at :data:`BIAS_LOSS_CEILING`; :func:`bias_held` says so.

    References
    ----------
    Published class 2 ceramic application notes (capacitance against DC bias), from memory.
    """
    s = _check_nonneg("stress", stress)
    at_rated = class2_bias_at_rated(d)
    if at_rated == 0.0 or s == 0.0:
        return 0.0
    return min(BIAS_LOSS_CEILING, at_rated * math.sqrt(s))


def ageing_held(d: Dielectric) -> Held:
    """Where the logarithmic ageing law of a class 2 ceramic holds.

    Parameters
    ----------
    d
        A class 2 dielectric.

    Returns
    -------
    Held
        The time after the last heat (s) over which the law and its rate band hold.
    """
    lo, hi = class2_ageing_band(d)
    return Held(
        what=f"{d.name} ageing of {lo * 100:g}…{hi * 100:g} %/decade-hour",
        quantity="time after the last reflow",
        low=_AGEING_HELD_HOURS[0] * _HOUR,
        high=_AGEING_HELD_HOURS[1] * _HOUR,
        kind="time",
        source="[AN/Mem] class 2 ceramic ageing curves",
    )


def bias_held(d: Dielectric) -> Held:
    """Where the DC-bias loss bound of a class 2 ceramic holds.

    Parameters
    ----------
    d
        A class 2 dielectric.

    Returns
    -------
    Held
        The DC stress ``V / V_rated`` (ratio) over which the envelope is drawn from
        published curves: up to the rated voltage.
    """
    return Held(
        what=f"{d.name} DC-bias loss bound ({class2_bias_at_rated(d) * 100:g} % at rated)",
        quantity="DC stress (applied / rated voltage)",
        low=0.0,
        high=1.0,
        kind="ratio",
        source="[AN/Mem] class 2 ceramic bias curves",
    )
