"""Parsed values: what the grammar's terms mean before any statement reads them.

The parser turns each term of a statement into one of the frozen classes here.
They keep the position of their text so that a statement handler that finds
the value wrong (a width in hertz, an inverted range) can point at it.
"""

from __future__ import annotations

from dataclasses import dataclass

from timespec.errors import Pos

__all__ = [
    "Bound",
    "Fraction",
    "Quantity",
    "Range",
    "Term",
    "Text",
    "Tolerance",
    "Toleranced",
    "Word",
]


@dataclass(frozen=True)
class Quantity:
    """A number with its unit, converted to SI.

    Attributes
    ----------
    value
        Magnitude in SI base units (degrees Celsius for temperatures, a plain
        fraction for ``%`` and ``ppm``).
    kind
        Kind of quantity (see :data:`timespec.units.KINDS`), ``None`` for a
        bare number, or ``"rate"`` for something per year (value per year).
    text
        The text as written, for messages.
    pos
        Where it was written.
    """

    value: float
    kind: str | None
    text: str
    pos: Pos


@dataclass(frozen=True)
class Tolerance:
    """A tolerance, ``±5%``, ``±2 ms`` or ``+5% -2%``.

    Attributes
    ----------
    minus, plus
        Magnitudes of the downward and upward deviation (both ≥ 0 when valid),
        with their own kind: ``"ratio"`` for relative, otherwise absolute.
    pos
        Where it was written.
    """

    minus: Quantity
    plus: Quantity
    pos: Pos


@dataclass(frozen=True)
class Toleranced:
    """A nominal quantity with a tolerance (``150 ms ±8%``)."""

    nominal: Quantity
    tolerance: Tolerance
    pos: Pos


@dataclass(frozen=True)
class Range:
    """An explicit range, ``20 ms to 40 ms``."""

    low: Quantity
    high: Quantity
    pos: Pos


@dataclass(frozen=True)
class Bound:
    """A one-sided bound, ``60 ohm max`` or ``30 ms min``."""

    quantity: Quantity
    side: str  # "min" or "max"
    pos: Pos


@dataclass(frozen=True)
class Fraction:
    """A share of something named: ``0.55 to 0.75 of supply`` or ``0.6 ±0.05 of supply``.

    ``inner`` is the value that was written before ``of``.
    """

    inner: Quantity | Range | Toleranced
    of: str
    pos: Pos


@dataclass(frozen=True)
class Word:
    """A bare word: a series name, a dielectric, a part reference, an option."""

    text: str
    pos: Pos


@dataclass(frozen=True)
class Text:
    """A quoted string (used by ``include``)."""

    text: str
    pos: Pos


Term = Quantity | Toleranced | Range | Bound | Fraction | Tolerance | Word | Text
