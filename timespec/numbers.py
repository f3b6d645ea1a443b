"""Formatting numbers for people: SI prefixes, RKM part values, ppm and percent.

One home for the formatting used by the text report, the tables and the Sphinx
directive, so that a value reads the same everywhere.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from typing import TYPE_CHECKING, Literal

from timespec.parts.rkm import format_rkm

if TYPE_CHECKING:  # pragma: no cover
    from timespec.model import Window
    from timespec.parts.part import Part

__all__ = [
    "PPM_OUTPUTS",
    "format_interval",
    "format_part",
    "format_part_value",
    "format_quantity",
    "format_window",
    "ratio_unit",
]

#: Outputs of kind ``"ratio"`` that are shown in ppm rather than percent.
PPM_OUTPUTS = frozenset({"accuracy", "error", "offset", "pulling", "stability", "drift"})

# SI units shown per kind, and whether the kind takes an SI prefix.
_UNITS: dict[str, tuple[str, bool]] = {
    "time": ("s", True),
    "frequency": ("Hz", True),
    "resistance": ("Ω", True),
    "capacitance": ("F", True),
    "voltage": ("V", True),
    "current": ("A", True),
    "power": ("W", True),
    "transconductance": ("A/V", True),
    "temperature": ("°C", False),
}

# Engineering prefixes, exponent -> symbol (micro is the MICRO SIGN U+00B5).
_PREFIXES: dict[int, str] = {
    -15: "f",
    -12: "p",
    -9: "n",
    -6: "\u00b5",
    -3: "m",
    0: "",
    3: "k",
    6: "M",
    9: "G",
    12: "T",
}

_MINUS = "\u2212"  # MINUS SIGN, for the asymmetric tolerance form only


def _trim(x: float, digits: int) -> str:
    """``x`` to ``digits`` significant figures, trailing zeros dropped."""
    text = f"{x:.{digits}g}"
    return "0" if text in ("-0", "0") else text


def _prefix_exponent(magnitude: float) -> int:
    """Engineering exponent (a multiple of 3) for a positive magnitude."""
    exp = 3 * math.floor(math.log10(magnitude) / 3)
    return max(min(exp, max(_PREFIXES)), min(_PREFIXES))


def _scale_for(values: Iterable[float], digits: int) -> int:
    """One engineering exponent that suits every finite non-zero value given."""
    finite = [abs(v) for v in values if math.isfinite(v) and v != 0.0]
    if not finite:
        return 0
    top = max(finite)
    if not 1e-15 <= top < 1e15:  # beyond the prefixes: plain scientific notation
        return 0
    exp = _prefix_exponent(top)
    # rounding can carry 999.96 up to 1000: move to the next prefix then
    if abs(float(_trim(top / 10.0**exp, digits))) >= 1000.0 and exp < max(_PREFIXES):
        exp += 3
    return exp


def ratio_unit(name: str, values: Iterable[float]) -> Literal["%", "ppm"]:
    """How to show a ratio output: ppm for frequency errors and tiny ratios, else percent.

    Parameters
    ----------
    name
        Output name (``"accuracy"`` and the like are always in ppm).
    values
        The values to be shown.

    Returns
    -------
    str
        ``"ppm"`` or ``"%"``.
    """
    if name in PPM_OUTPUTS:
        return "ppm"
    finite = [abs(v) for v in values if math.isfinite(v)]
    if finite and max(finite) < 1e-3:
        return "ppm"
    return "%"


def _number(value: float, kind: str | None, exp: int, ratio: str, digits: int) -> str:
    """A value in an already chosen scale, without its unit."""
    if math.isnan(value):
        return "nan"
    if math.isinf(value):
        return "∞" if value > 0 else f"{_MINUS}∞"
    if kind == "ratio":
        if abs(value) < 5e-13:  # rounding noise of a zero-centred budget, below 1e-6 ppm
            value = 0.0
        return _trim(value * (1e6 if ratio == "ppm" else 100.0), digits)
    if kind == "tempco":
        return _trim(value * 1e6, digits)
    if kind in _UNITS and _UNITS[kind][1]:
        return _trim(value / 10.0**exp, digits)
    return _trim(value, digits)


def _unit(kind: str | None, exp: int, ratio: str) -> str:
    """Unit text (with its leading space) for a kind at an engineering exponent."""
    if kind == "factor":
        return "×"
    if kind == "ratio":
        return " " + ratio
    if kind == "tempco":
        return " ppm/K"
    if kind in _UNITS:
        symbol, prefixed = _UNITS[kind]
        return " " + (_PREFIXES[exp] if prefixed else "") + symbol
    return ""


def format_quantity(
    value: float,
    kind: str | None,
    *,
    ratio: Literal["%", "ppm"] = "%",
    digits: int = 4,
) -> str:
    """Write an SI value with a sensible SI prefix and its unit.

    Parameters
    ----------
    value
        The value in SI units (°C for temperatures, a plain fraction for ratios,
        1/K for temperature coefficients).
    kind
        Kind of quantity, as in :data:`timespec.units.KINDS` (``"time"``,
        ``"frequency"``, ``"resistance"`` ...); ``None`` or an unknown kind gives
        a plain number.
    ratio
        How a ``"ratio"`` is shown: ``"%"`` (duty cycle) or ``"ppm"`` (frequency
        accuracy).
    digits
        Significant figures.

    Returns
    -------
    str
        E.g. ``0.1494 -> "149.4 ms"``, ``3997.2 -> "3.997 kHz"``, ``4.7e-9 -> "4.7 nF"``,
        ``0.3 -> "30 %"``, ``-3.2e-5`` with ``ratio="ppm"`` -> ``"-32 ppm"``.

    Notes
    -----
    The prefix is the engineering one (a power of 10³) that puts the
    mantissa in [1, 1000) after rounding to ``digits`` figures.  Temperatures
    take no prefix; tempcos are shown in ppm/K.  Infinite values show as ``∞``.

    References
    ----------
    SI prefixes as defined in the SI Brochure (BIPM, 9th edition, 2019), section 3.
    """
    exp = _scale_for([value], digits)
    return _number(value, kind, exp, ratio, digits) + _unit(kind, exp, ratio)


def format_window(
    window: Window,
    *,
    ratio: Literal["%", "ppm"] = "%",
    digits: int = 4,
) -> str:
    """Write a requirement window the way a spec would state it.

    Parameters
    ----------
    window
        The window (SI units).
    ratio
        How ratios are shown: ``"%"`` or ``"ppm"``.
    digits
        Significant figures of the values.

    Returns
    -------
    str
        ``"150 ms ±8 %"`` for a symmetric relative tolerance around a nominal,
        ``"150 ms +5 % −2 %"`` for an asymmetric one, ``"30 % ±5 %"`` and
        ``"±50 ppm"`` for ratios (absolute), ``"20 ms to 40 ms"`` for a range,
        ``"40 ms max"`` and ``"1 MHz min"`` for bounds.

    Notes
    -----
    Relative tolerances are ``(high − nominal)/nominal`` and
    ``(nominal − low)/nominal``; for ratios (duty, ppm errors) the tolerance is
    in the ratio's own unit, as the spec language writes it.
    """
    kind = window.kind
    low, high, nominal = window.low, window.high, window.nominal
    open_low = math.isinf(low) or (kind != "ratio" and low <= 0.0)
    if open_low and math.isinf(high):
        return "any"
    exp = _scale_for([low, high, nominal or 0.0], digits)
    unit = _unit(kind, exp, ratio)

    def num(x: float) -> str:
        return _number(x, kind, exp, ratio, digits)

    if open_low:
        return f"{num(high)}{unit} max"
    if math.isinf(high):
        return f"{num(low)}{unit} min"
    if nominal is not None and low < nominal < high:
        minus, plus = nominal - low, high - nominal
        if kind == "ratio":
            if math.isclose(minus, plus, rel_tol=1e-9):
                band = f"±{num(plus)}{unit}"
                return band if nominal == 0.0 else f"{num(nominal)}{unit} {band}"
        elif nominal > 0.0:
            rel_minus = _trim(100.0 * minus / nominal, 3)
            rel_plus = _trim(100.0 * plus / nominal, 3)
            if rel_minus == rel_plus:
                return f"{num(nominal)}{unit} ±{rel_plus} %"
            return f"{num(nominal)}{unit} +{rel_plus} % {_MINUS}{rel_minus} %"
    if low == high:
        return f"{num(low)}{unit}"
    return f"{num(low)}{unit} to {num(high)}{unit}"


def format_part(part: Part) -> str:
    """Describe one part: reference, RKM value, series, tolerance, tempco or dielectric.

    Parameters
    ----------
    part
        The part.

    Returns
    -------
    str
        E.g. ``"R 412k E96 ±1 % 100 ppm/K"`` or ``"C 330n E6 ±10 % X7R, pinned"``.

    Notes
    -----
    Values are written as IEC 60062 RKM codes (the multiplier letter stands
    for the decimal point); an off-series pinned value shows "no series".

    References
    ----------
    IEC 60062:2016, marking codes for resistors and capacitors (RKM code).
    """
    items = [part.ref, format_rkm(part.value, part.kind), part.series or "no series"]
    items.append(f"±{_trim(part.tolerance * 100.0, 3)} %")
    if part.kind == "resistance" and part.tempco_ppm is not None:
        items.append(f"{_trim(part.tempco_ppm, 3)} ppm/K")
    if part.kind == "capacitance" and part.dielectric:
        items.append(part.dielectric)
    text = " ".join(items)
    return text + ", pinned" if part.pinned else text


def format_interval(
    low: float,
    high: float,
    kind: str,
    *,
    ratio: Literal["%", "ppm"] = "%",
    sep: str = " … ",
    digits: int = 4,
) -> str:
    """Write a computed interval, ``138.3 ms … 161.6 ms``, or a bound, ``≥ 20 ms``.

    Parameters
    ----------
    low, high
        Ends (may be infinite).
    kind
        Kind of quantity.
    ratio
        How ratios are shown.
    sep
        What stands between the ends.
    digits
        Significant digits.

    Returns
    -------
    str
        The text; both ends share one SI prefix.
    """
    open_low = math.isinf(low) or (low == 0 and kind not in ("ratio", "temperature"))
    if math.isinf(high) and high > 0 and not open_low:
        return "≥ " + format_quantity(low, kind, ratio=ratio, digits=digits)
    if open_low and not math.isinf(high):
        return "≤ " + format_quantity(high, kind, ratio=ratio, digits=digits)
    exp = _scale_for([low, high], digits)
    unit = _unit(kind, exp, ratio)
    lo, hi = (_number(v, kind, exp, ratio, digits) for v in (low, high))
    return f"{lo}{unit}{sep}{hi}{unit}"


def format_part_value(value: float, kind: str) -> str:
    """A part value as an RKM code (IEC 60062), e.g. ``4k7`` or ``100n``.

    Parameters
    ----------
    value
        Ω or F.
    kind
        ``"resistance"`` or ``"capacitance"``.

    Returns
    -------
    str
        The RKM code: the multiplier letter stands for the decimal point and
        the unit is implied by the part (Ω for R, F for C).
    """
    return format_rkm(value, kind)
