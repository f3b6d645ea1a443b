"""Formatting numbers for people: SI prefixes, RKM part values, ppm and percent.

Used by the text report, the tables and the Sphinx directive, so that a value
reads the same everywhere.
"""

from __future__ import annotations

import math

from timespec.rkm import format_rkm

__all__ = ["format_part_value", "format_quantity", "format_window", "si_prefixed"]

_PREFIXES = [
    (1e9, "G"),
    (1e6, "M"),
    (1e3, "k"),
    (1.0, ""),
    (1e-3, "m"),
    (1e-6, "µ"),
    (1e-9, "n"),
    (1e-12, "p"),
    (1e-15, "f"),
]

_SYMBOLS = {
    "time": "s",
    "frequency": "Hz",
    "resistance": "Ω",
    "capacitance": "F",
    "voltage": "V",
    "current": "A",
    "power": "W",
    "transconductance": "A/V",
}


def si_prefixed(value: float, unit: str, digits: int = 4) -> str:
    """Write a value with an SI prefix, e.g. ``0.1496`` s → ``149.6 ms``.

    Parameters
    ----------
    value
        Value in the base unit.
    unit
        Base unit symbol.
    digits
        Significant digits.

    Returns
    -------
    str
        The text; ``inf`` and ``nan`` are written as ``∞`` and ``n/a``.
    """
    if math.isnan(value):
        return "n/a"
    if math.isinf(value):
        return ("−∞" if value < 0 else "∞") + (f" {unit}" if unit else "")
    if value == 0:
        return f"0 {unit}".rstrip()
    mag = abs(value)
    for scale, prefix in _PREFIXES:
        if mag >= scale * 0.9999995:
            break
    text = f"{value / scale:.{digits}g}"
    return f"{text} {prefix}{unit}".rstrip()


def format_quantity(value: float, kind: str, *, digits: int = 4, ppm: bool = False) -> str:
    """Write a value of a kind of quantity for people.

    Parameters
    ----------
    value
        SI value (fractions for ``"ratio"``, °C for ``"temperature"``).
    kind
        Kind of quantity.
    digits
        Significant digits.
    ppm
        Write a ratio in ppm rather than percent.

    Returns
    -------
    str
        e.g. ``"149.6 ms"``, ``"4.012 kHz"``, ``"30.2 %"``, ``"±12.5 ppm"``.
    """
    if kind == "ratio":
        if math.isinf(value) or math.isnan(value):
            return si_prefixed(value, "")
        if ppm:
            return f"{value * 1e6:+.{digits}g} ppm"
        return f"{value * 100:.{digits}g} %"
    if kind == "temperature":
        return f"{value:.{digits}g} °C"
    if kind == "tempco":
        return f"{value * 1e6:.{digits}g} ppm/K"
    return si_prefixed(value, _SYMBOLS.get(kind, ""), digits)


def format_window(low: float, high: float, kind: str, *, ppm: bool = False) -> str:
    """Write an interval, ``138 ms … 162 ms``, or a bound, ``≥ 20 ms``.

    Parameters
    ----------
    low, high
        Ends (may be infinite).
    kind
        Kind of quantity.
    ppm
        Ratios in ppm.

    Returns
    -------
    str
        The text.
    """
    if math.isinf(high) and high > 0 and not math.isinf(low):
        return "≥ " + format_quantity(low, kind, ppm=ppm)
    if (math.isinf(low) and low < 0) or (low == 0 and kind not in ("ratio", "temperature")):
        if not math.isinf(high):
            return "≤ " + format_quantity(high, kind, ppm=ppm)
    return f"{format_quantity(low, kind, ppm=ppm)} … {format_quantity(high, kind, ppm=ppm)}"


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
