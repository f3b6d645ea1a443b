"""Units: one pint registry for the whole package, created lazily.

The physics and solver work on plain SI floats.  Units matter at two edges:
when the parser reads a quantity such as ``150 ms`` or ``4.7 kΩ`` and when the
API hands results back as :class:`pint.Quantity`.  Both go through this module.

pint is imported on first use, not at ``import timespec``: importing pint and
building a registry costs far more than the rest of the package.  Unit strings
are resolved once and cached, so parsing a large spec converts numbers with a
multiply and an add.
"""

from __future__ import annotations

import difflib
import functools
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # pragma: no cover
    import pint

__all__ = [
    "KINDS",
    "UnitInfo",
    "kind_symbol",
    "quantity",
    "registry",
    "unit_info",
]

#: What each kind of quantity is called, its SI symbol and its pint dimensionality.
KINDS: dict[str, tuple[str, str]] = {
    # kind: (SI symbol used in reports and JSON, pint reference unit)
    "time": ("s", "second"),
    "frequency": ("Hz", "hertz"),
    "resistance": ("ohm", "ohm"),
    "capacitance": ("F", "farad"),
    "voltage": ("V", "volt"),
    "current": ("A", "ampere"),
    "power": ("W", "watt"),
    "transconductance": ("A/V", "ampere/volt"),
    "temperature": ("degC", "degC"),
    "tempco": ("1/K", "1/kelvin"),
    "ratio": ("1", "dimensionless"),
    # A plain multiple such as a gain margin (never matched when reading units: "ratio" wins).
    "factor": ("1", "dimensionless"),
}

_NORMALISE = (
    ("Ω", "ohm"),
    ("Ω", "ohm"),  # the ohm sign U+2126
    ("μ", "u"),  # Greek mu
    ("µ", "u"),  # micro sign
    ("°C", "degC"),
    ("℃", "degC"),
    ("°F", "degF"),
    ("°", "deg"),
)

#: Words users reach for that pint spells differently.
_ALIASES = {
    "yr": "year",
    "yrs": "year",
    "y": "year",
    "a": "year",
    "h": "hour",
    "hr": "hour",
    "hrs": "hour",
    "degc": "degC",
    "C": "degC",
    "ohms": "ohm",
    "R": "ohm",
    "mho": "siemens",
}


def _normalise(text: str) -> str:
    for old, new in _NORMALISE:
        text = text.replace(old, new)
    return _ALIASES.get(text, text)


@functools.cache
def registry() -> pint.UnitRegistry[Any]:
    """Return the package's single pint unit registry (built on first call).

    Returns
    -------
    pint.UnitRegistry
        The registry every quantity timespec returns belongs to.
    """
    import pint

    reg: pint.UnitRegistry[Any]
    try:
        reg = pint.UnitRegistry(cache_folder=":auto:")
    except Exception:  # pragma: no cover - a read-only cache folder
        reg = pint.UnitRegistry()
    reg.formatter.default_format = "~P"
    return reg


@dataclass(frozen=True)
class UnitInfo:
    """How a unit string maps onto SI.

    Attributes
    ----------
    kind
        One of :data:`KINDS`, or ``None`` when the unit fits none of them.
    scale, offset
        ``si = value * scale + offset``.
    dimensionality
        pint's text for the dimension, used in error messages.
    """

    kind: str | None
    scale: float
    offset: float
    dimensionality: str


@functools.lru_cache(maxsize=512)
def unit_info(text: str) -> UnitInfo:
    """Resolve a unit string written in a spec.

    Parameters
    ----------
    text
        The unit as written, e.g. ``"ms"``, ``"kΩ"``, ``"ppm/K"``, ``"%"``, ``"degC"``.

    Returns
    -------
    UnitInfo
        Kind, scale and offset to SI.

    Raises
    ------
    ValueError
        When pint does not know the unit; the message suggests near spellings.
    """
    import pint

    reg = registry()
    name = _normalise(text)
    try:
        unit = reg.Unit(name)
    except (pint.errors.UndefinedUnitError, AttributeError, ValueError, TypeError) as exc:
        raise ValueError(_unknown_unit_message(text)) from exc
    except Exception as exc:  # pint raises assorted errors for odd strings
        raise ValueError(_unknown_unit_message(text)) from exc
    try:
        return _classify(reg, name, unit)
    except Exception as exc:  # pint refuses odd products such as %·degC
        raise ValueError(f"unit {text!r} mixes units in a way timespec cannot read") from exc


def _classify(reg: pint.UnitRegistry[Any], name: str, unit: Any) -> UnitInfo:
    """Match a parsed pint unit to one of :data:`KINDS` and find its scale and offset."""
    dim = unit.dimensionality
    for kind, (_symbol, ref) in KINDS.items():
        ref_unit = reg.Unit(ref)
        if ref_unit.dimensionality != dim:
            continue
        if kind == "temperature":
            if name in ("kelvin", "K"):
                return UnitInfo(kind, 1.0, -273.15, str(dim))
            q0 = reg.Quantity(0.0, unit).to("degC").magnitude
            q1 = reg.Quantity(1.0, unit).to("degC").magnitude
            return UnitInfo(kind, float(q1 - q0), float(q0), str(dim))
        scale = reg.Quantity(1.0, unit).to(ref_unit).magnitude
        return UnitInfo(kind, float(scale), 0.0, str(dim))
    # per-year rates (ageing) land here; the caller decides what they mean
    return UnitInfo(None, float(reg.Quantity(1.0, unit).to_base_units().magnitude), 0.0, str(dim))


_COMMON_UNITS = tuple(
    "s ms us ns ps min hour year Hz kHz MHz GHz ohm kohm Mohm F mF uF nF pF fF V mV kV "
    "A mA uA nA pA W mW uW nW degC K ppm % ppm/K %/K ppm/year %/year mA/V S mS uS".split()
)


def _unknown_unit_message(text: str) -> str:
    close = difflib.get_close_matches(text, _COMMON_UNITS, n=3, cutoff=0.5)
    msg = f"unknown unit {text!r}"
    if close:
        msg += "; did you mean " + " or ".join(repr(c) for c in close) + "?"
    return msg


def kind_symbol(kind: str) -> str:
    """Return the SI symbol reported for a kind of quantity (``"time"`` → ``"s"``).

    Parameters
    ----------
    kind
        A key of :data:`KINDS`.

    Returns
    -------
    str
        The SI symbol.
    """
    return KINDS[kind][0]


def quantity(value: Any, kind: str) -> pint.Quantity[Any]:
    """Wrap an SI value (float or array) as a pint quantity of the given kind.

    Parameters
    ----------
    value
        Magnitude in SI units.
    kind
        A key of :data:`KINDS`.

    Returns
    -------
    pint.Quantity
        The value with its unit, from the package registry.
    """
    reg = registry()
    ref = KINDS[kind][1]
    if kind == "temperature":
        return reg.Quantity(value, reg.degC)
    return reg.Quantity(value, ref)
