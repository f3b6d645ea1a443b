"""IEC 60062 RKM value codes (``4k7``, ``R47``, ``4n7``) and tolerance code letters.

In an RKM code a multiplier letter stands where the decimal point would be: ``4k7`` is
4.7 kilo-ohm, ``R47`` is 0.47 ohm, ``4n7`` is 4.7 nanofarad.  The letter tells both the
multiplier and the kind of part:

============  ==========================  ============================
letter        multiplier                  kind
============  ==========================  ============================
``R``         1                           resistance
``K``, ``k``  1e3                         resistance
``M``         1e6                         resistance (mega-ohm)
``G``         1e9                         resistance
``T``         1e12                        resistance
``p``         1e-12                       capacitance
``n``         1e-9                        capacitance
``u``, ``µ``  1e-6                        capacitance
``m``         1e-3                        capacitance (millifarad)
============  ==========================  ============================

Case matters for ``M`` (mega-ohm) against ``m`` (millifarad); ``k`` and ``K`` are both
kilo-ohm.  Capacitance letters are lower case only.

Accepted shapes (``D`` is one or more digits, ``L`` one letter):

* ``DLD`` -- the standard form, ``4k7``, ``2R2``, ``1u0``;
* ``LD`` -- value below one unit of the letter, ``R47``, ``p47``;
* ``DL`` -- letter last, meaning "whole units of the letter": ``47k`` is 47 kilo-ohm, ``10n``
  is 10 nanofarad, ``100R`` is 100 ohm;
* ``D.DL`` -- a decimal number followed by the letter, ``4.7k``; an everyday relaxation, the
  letter then only scales.

Everything else is rejected with a :class:`ValueError` that names the expected shape: a
second letter (``4k7k``), no digit (``k``), a decimal point together with digits after the
letter (``4.7k7``), units or spaces inside the code.
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from decimal import Decimal
from types import MappingProxyType
from typing import Final, Literal

__all__ = [
    "CAPACITANCE",
    "RESISTANCE",
    "TOLERANCE_LETTERS",
    "format_rkm",
    "looks_like_rkm",
    "parse_rkm",
    "tolerance_from_letter",
]

Dimension = Literal["resistance", "capacitance"]

RESISTANCE: Final = "resistance"
CAPACITANCE: Final = "capacitance"

# IEC 60062: multiplier letters (power of ten, kind).
_LETTERS: Final[Mapping[str, tuple[int, Dimension]]] = MappingProxyType(
    {
        "R": (0, "resistance"),
        "K": (3, "resistance"),
        "k": (3, "resistance"),
        "M": (6, "resistance"),
        "G": (9, "resistance"),
        "T": (12, "resistance"),
        "p": (-12, "capacitance"),
        "n": (-9, "capacitance"),
        "u": (-6, "capacitance"),
        "\u00b5": (-6, "capacitance"),  # MICRO SIGN
        "\u03bc": (-6, "capacitance"),  # GREEK SMALL LETTER MU, typed by some keyboards
        "m": (-3, "capacitance"),
    }
)

_LETTER_CLASS: Final = "RKkMGTpnu\u00b5\u03bcm"
_RKM_RE: Final = re.compile(rf"(?P<int>[0-9]*)(?P<letter>[{_LETTER_CLASS}])(?P<frac>[0-9]*)")
_DECIMAL_RE: Final = re.compile(rf"(?P<int>[0-9]+)\.(?P<frac>[0-9]+)(?P<letter>[{_LETTER_CLASS}])")
_LOOSE_RE: Final = re.compile(r"[0-9.]*[A-Za-z\u00b5\u03bc][0-9A-Za-z.\u00b5\u03bc]*")

_SHAPE_HINT: Final = (
    "expected an RKM code: digits with one multiplier letter where the decimal point goes, "
    "e.g. 4k7, R47, 47k, 2R2 (resistance: R K k M G T) or 4n7, p47, 10n, 1u0 "
    "(capacitance: p n u m)"
)

# Output letters: (power of ten, letter), from the largest down.
_FORMAT_LETTERS: Final[Mapping[str, tuple[tuple[int, str], ...]]] = MappingProxyType(
    {
        "resistance": ((12, "T"), (9, "G"), (6, "M"), (3, "k"), (0, "R")),
        "capacitance": ((-3, "m"), (-6, "u"), (-9, "n"), (-12, "p")),
    }
)

#: IEC 60062 tolerance letters -> signed relative bounds (low, high).
TOLERANCE_LETTERS: Final[Mapping[str, tuple[float, float]]] = MappingProxyType(
    {
        "B": (-0.001, 0.001),
        "C": (-0.0025, 0.0025),
        "D": (-0.005, 0.005),
        "F": (-0.01, 0.01),
        "G": (-0.02, 0.02),
        "J": (-0.05, 0.05),
        "K": (-0.10, 0.10),
        "M": (-0.20, 0.20),
        "Z": (-0.20, 0.80),
    }
)

# IEC 60062: for capacitors below 10 pF the letters B, C, D give an absolute tolerance in pF.
_SMALL_CAP_LIMIT: Final = 10e-12
_ABSOLUTE_PF: Final[Mapping[str, float]] = MappingProxyType(
    {"B": 0.1e-12, "C": 0.25e-12, "D": 0.5e-12}
)


def _dimension(dimension: str) -> Dimension:
    if dimension == "resistance":
        return "resistance"
    if dimension == "capacitance":
        return "capacitance"
    raise ValueError(f"dimension must be 'resistance' or 'capacitance', got {dimension!r}")


def _diagnose(token: str) -> str:
    """Say in a few words what is wrong with a token that failed both shapes."""
    letters = [ch for ch in token if not ch.isdigit() and ch != "."]
    if any(ch in "NPU" for ch in letters):
        return "capacitance letters are lower case (p, n, u, m)"
    odd = [ch for ch in letters if not ch.isalpha()]
    if odd:
        return f"unexpected character {odd[0]!r}"
    unknown = [ch for ch in letters if ch not in _LETTERS]
    if unknown:
        return f"{unknown[0]!r} is not a multiplier letter (units do not belong in the code)"
    if len(letters) > 1:
        return "only one multiplier letter is allowed"
    if not letters:
        return "a multiplier letter is missing"
    if "." in token:
        return "a decimal point is allowed only as in 4.7k (digits on both sides, letter last)"
    return "unexpected characters"


def looks_like_rkm(text: str) -> bool:
    """Cheaply tell whether ``text`` is meant as an RKM code (well-formed or not).

    Parameters
    ----------
    text
        A single token, e.g. ``"4k7"``.

    Returns
    -------
    bool
        True when the token holds at least one digit and at least one RKM multiplier letter
        and nothing but digits, decimal points and letters.  Malformed codes such as ``4k7k``
        or ``4.7k7`` also answer True, so the caller can hand them to :func:`parse_rkm` and
        report its precise error; ``10ms`` or ``kohm``-like words with a second letter that
        is not an RKM letter answer False.

    Notes
    -----
    The test is a single regular expression plus two character scans; no value is built.

    References
    ----------
    IEC 60062:2016, letter and digit code for resistance and capacitance values.
    """
    token = text.strip()
    if not token or _LOOSE_RE.fullmatch(token) is None:
        return False
    if not any(ch.isdigit() for ch in token):
        return False
    letters = [ch for ch in token if ch.isalpha()]
    return all(ch in _LETTERS for ch in letters)


def parse_rkm(text: str) -> tuple[float, Dimension]:
    """Parse an RKM code into its value in SI base units and its dimension.

    Parameters
    ----------
    text
        The code, e.g. ``"4k7"``, ``"R47"``, ``"10n"``, ``"2µ2"``; surrounding spaces are
        ignored.

    Returns
    -------
    (value, dimension) : tuple
        Value in ohm or farad, as the float nearest the exact decimal value; dimension
        ``"resistance"`` or ``"capacitance"``.

    Raises
    ------
    ValueError
        When the code is empty or malformed; the message quotes it and names the expected
        shape.

    Notes
    -----
    ``value = float("<digits before>.<digits after>") * 10**power(letter)``, evaluated in one
    correctly rounded decimal-to-float conversion.  A letter last (``47k``, ``10n``) means
    whole units of that letter; a letter first (``R47``, ``p47``) means a fraction of one unit.

    References
    ----------
    IEC 60062:2016, clause on the RKM code (letter in the place of the decimal point).
    """
    token = text.strip()
    if not token:
        raise ValueError(f"empty value code; {_SHAPE_HINT}")
    match = _RKM_RE.fullmatch(token)
    if match is not None:
        int_part, letter, frac = match.group("int"), match.group("letter"), match.group("frac")
        if not int_part and not frac:
            raise ValueError(f"value code {text!r} has no digits; {_SHAPE_HINT}")
    else:
        match = _DECIMAL_RE.fullmatch(token)
        if match is None:
            raise ValueError(f"malformed value code {text!r}: {_diagnose(token)}; {_SHAPE_HINT}")
        int_part, letter, frac = match.group("int"), match.group("letter"), match.group("frac")
    power, dimension = _LETTERS[letter]
    value = float(f"{int_part or '0'}.{frac or '0'}e{power}")
    return value, dimension


def format_rkm(value: float, dimension: str, digits: int = 3) -> str:
    """Write a value as an RKM code, rounded to ``digits`` significant figures.

    Parameters
    ----------
    value
        Resistance in ohm or capacitance in farad, finite and not negative.
    dimension
        ``"resistance"`` or ``"capacitance"``.
    digits
        Significant figures kept (1 to 15); trailing zeros are dropped.

    Returns
    -------
    str
        E.g. ``4700 -> "4k7"``, ``150e3 -> "150k"``, ``0.47 -> "R47"``, ``4.7e-9 -> "4n7"``,
        ``1e-7 -> "100n"``, ``1.5e-6 -> "1u5"``, ``0 -> "0R"`` / ``"0p"``.

    Raises
    ------
    ValueError
        On an unknown dimension, a negative or non-finite value, or ``digits`` out of range.

    Notes
    -----
    The letter is the largest multiplier not above the rounded value (R, k, M, G, T for
    resistance; p, n, u, m for capacitance; below the smallest multiplier the code starts with
    the letter, as in ``R47``).  ``parse_rkm(format_rkm(x, d)) == (x, d)`` whenever ``x`` has at
    most ``digits`` significant figures.

    References
    ----------
    IEC 60062:2016, RKM code.
    """
    dim = _dimension(dimension)
    if isinstance(digits, bool) or not isinstance(digits, int) or not 1 <= digits <= 15:
        raise ValueError(f"digits must be an integer from 1 to 15, got {digits!r}")
    x = float(value)
    if not math.isfinite(x) or x < 0.0:
        raise ValueError(f"value must be finite and not negative, got {value!r}")
    letters = _FORMAT_LETTERS[dim]
    if x == 0.0:
        return "0" + letters[-1][1]
    rounded = Decimal(f"{x:.{digits - 1}e}")
    power, letter = letters[-1]
    for p, ltr in letters:
        if rounded >= Decimal(10) ** p:
            power, letter = p, ltr
            break
    scaled = rounded.scaleb(-power).normalize()
    text = f"{scaled:f}"
    int_part, _, frac = text.partition(".")
    if int_part == "0":
        int_part = ""
    return f"{int_part}{letter}{frac}"


def tolerance_from_letter(letter: str, value_farads: float | None = None) -> tuple[float, float]:
    """Return the signed relative bounds meant by an IEC 60062 tolerance letter.

    Parameters
    ----------
    letter
        One of :data:`TOLERANCE_LETTERS` (case-insensitive).
    value_farads
        Capacitance of the part, when it is a capacitor.  Below 10 pF the letters B, C and D
        mean an absolute +-0.1, 0.25 and 0.5 pF, converted here to a relative figure.

    Returns
    -------
    (low, high) : tuple of float
        Signed relative bounds, e.g. ``(-0.05, 0.05)`` for J, ``(-0.2, 0.8)`` for Z.

    Raises
    ------
    ValueError
        On an unknown letter (the message lists the known ones) or a capacitance that is not
        finite and positive.

    Notes
    -----
    For ``C < 10 pF`` and letter in B/C/D: ``rel = delta_pF / C``.

    References
    ----------
    IEC 60062:2016, tolerance code letters.
    """
    key = letter.strip().upper()
    if key not in TOLERANCE_LETTERS:
        raise ValueError(
            f"unknown tolerance letter {letter!r}; known letters: {', '.join(TOLERANCE_LETTERS)}"
        )
    if value_farads is not None:
        c = float(value_farads)
        if not math.isfinite(c) or c <= 0.0:
            raise ValueError(f"value_farads must be finite and positive, got {value_farads!r}")
        if c < _SMALL_CAP_LIMIT and key in _ABSOLUTE_PF:
            rel = _ABSOLUTE_PF[key] / c
            return (-rel, rel)
    return TOLERANCE_LETTERS[key]
