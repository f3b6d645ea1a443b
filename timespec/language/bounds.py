"""Physically sensible bounds on every number a statement takes, as data in one place.

Each entry of :data:`BOUNDS` maps ``(keyword, quantity kind)`` to the closed range
a number of that kind may take in that statement, with the unit it is shown in
and why.  :data:`KIND_BOUNDS` holds the fallback for a kind that no statement
narrows, and :data:`BLOCK_BOUNDS` the few that depend on the block kind (a
crystal's frequency).  :func:`check_bounds` applies them to every number of a
parsed statement before its reader runs, so that an infinite, NaN or absurd
value is a located :class:`~timespec.errors.SpecValueError` naming the
statement, the value and the allowed range.

The ranges are generous on purpose: they reject what no circuit of these
families can be (a 1e400 MHz crystal, a 1e300 F capacitor), never a design a
practitioner would draw.  Sources are common practice unless a reason says
otherwise.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from dataclasses import dataclass

from timespec.errors import SpecValueError
from timespec.language.arguments import error_at
from timespec.language.parser import Statement
from timespec.language.values import (
    Bound,
    Fraction,
    Quantity,
    Range,
    Term,
    Tolerance,
    Toleranced,
)
from timespec.numbers import format_quantity

__all__ = [
    "BLOCK_BOUNDS",
    "BOUNDS",
    "KIND_BOUNDS",
    "Limit",
    "check_bounds",
    "format_limit",
    "limit_for",
    "quantities",
    "rst_table",
]

_YEAR = 365.25 * 86400.0
_PPM = 1e-6


@dataclass(frozen=True)
class Limit:
    """The closed range a number may take.

    Attributes
    ----------
    low, high
        The ends, in SI (degrees Celsius for temperatures, a plain fraction for
        ``%`` and ``ppm``, per second for rates... see ``scale``).
    unit
        The unit the range is shown in.
    scale
        SI value of one ``unit`` (``1e-6`` for ppm, ``1e-12`` for pF).
    reason
        Why the range is what it is.
    """

    low: float
    high: float
    unit: str
    scale: float
    reason: str


def _l(low: float, high: float, unit: str, scale: float, reason: str) -> Limit:
    return Limit(low * scale, high * scale, unit, scale, reason)


#: Fallback per quantity kind (``None``: a plain number).
KIND_BOUNDS: dict[str | None, Limit] = {
    "time": _l(0, 1e6, "s", 1.0, "from 0 to about 11 days (common practice)"),
    "frequency": _l(0, 1e9, "Hz", 1.0, "up to 1 GHz"),
    "resistance": _l(0, 1e9, "Ω", 1.0, "up to 1 GΩ"),
    "capacitance": _l(0, 1, "F", 1.0, "up to 1 F"),
    "voltage": _l(-1000, 1000, "V", 1.0, "within ±1 kV"),
    "current": _l(0, 1, "A", 1.0, "up to 1 A"),
    "power": _l(0, 1, "W", 1.0, "up to 1 W"),
    "transconductance": _l(0, 10, "A/V", 1.0, "up to 10 A/V"),
    "temperature": _l(-273.15, 300, "°C", 1.0, "from absolute zero to 300 °C"),
    "tempco": _l(-10000, 10000, "ppm/K", _PPM, "within ±10000 ppm/K"),
    "ratio": _l(-100, 100, "%", 0.01, "within ±100 %"),
    "rate": _l(-100, 100, "%/year", 0.01, "within ±100 % per year"),
    None: _l(-1e6, 1e6, "", 1.0, "within ±1e6"),
}

#: Bounds narrowed per statement: ``(keyword, kind) -> Limit``.
BOUNDS: dict[tuple[str, str | None], Limit] = {
    ("supply", "voltage"): _l(0, 100, "V", 1.0, "timer and logic supplies stay below 100 V"),
    ("supply", "ratio"): _l(0, 50, "%", 0.01, "a supply tolerance above 50 % is no supply"),
    ("ambient", "temperature"): _l(
        -273.15, 300, "°C", 1.0, "from absolute zero to 300 °C (no part of these families)"
    ),
    ("life", "time"): _l(0, 100, "years", _YEAR, "a service life of up to 100 years"),
    ("resistors", "resistance"): _l(0.01, 1e9, "Ω", 1.0, "resistors from 10 mΩ to 1 GΩ"),
    ("resistors", "ratio"): _l(0, 100, "%", 0.01, "a part tolerance or ageing share"),
    ("resistors", "tempco"): _l(-10000, 10000, "ppm/K", _PPM, "resistor tempcos (common practice)"),
    ("resistors", "rate"): _l(0, 100, "%/year", 0.01, "resistor ageing per year"),
    ("capacitors", "capacitance"): _l(1e-12, 1, "F", 1.0, "from 1 pF to 1 F"),
    ("capacitors", "ratio"): _l(0, 100, "%", 0.01, "a part tolerance or ageing share"),
    ("capacitors", "tempco"): _l(
        -10000, 10000, "ppm/K", _PPM, "capacitor tempcos (common practice)"
    ),
    ("capacitors", "rate"): _l(0, 100, "%/year", 0.01, "capacitor ageing per year"),
    ("capacitors", "voltage"): _l(
        0, 1e6, "V", 1.0, "capacitor ratings (a huge one means no bias loss)"
    ),
    ("capacitors", "time"): _l(0, 1e6, "s", 1.0, "a time reference for ageing"),
    ("leakage", "current"): _l(0, 1e-3, "A", 1.0, "timing-node leakage up to 1 mA"),
    ("spread", None): _l(0.5, 10, "sigma", 1.0, "a normal spread of 0.5 to 10 sigma"),
    ("timer", "ratio"): _l(0, 50, "%", 0.01, "a timer's initial accuracy"),
    ("timer", "tempco"): _l(0, 10000, "ppm/K", _PPM, "a timer's drift with temperature"),
    ("timer", "rate"): _l(0, 100, "%/year", 0.01, "a timer's drift per year"),
    ("timer", "voltage"): _l(0, 100, "V", 1.0, "a timer's supply-related figure"),
    ("timer", None): _l(0, 1, "", 1.0, "a share between 0 and 1"),
    ("use", "resistance"): _l(0.01, 1e9, "Ω", 1.0, "resistors from 10 mΩ to 1 GΩ"),
    ("use", "capacitance"): _l(1e-12, 1, "F", 1.0, "from 1 pF to 1 F"),
    ("use", "ratio"): _l(0, 100, "%", 0.01, "a part tolerance or ageing share"),
    ("use", "tempco"): _l(-10000, 10000, "ppm/K", _PPM, "part tempcos (common practice)"),
    ("use", "rate"): _l(0, 100, "%/year", 0.01, "part ageing per year"),
    ("use", "voltage"): _l(0, 1e6, "V", 1.0, "capacitor ratings (a huge one means no bias loss)"),
    ("width", "time"): _l(0, 1e6, "s", 1.0, "a pulse of up to about 11 days"),
    ("width", "ratio"): _l(0, 100, "%", 0.01, "a tolerance share"),
    ("trigger", "time"): _l(0, 1e6, "s", 1.0, "up to about 11 days"),
    ("control", "voltage"): _l(0, 100, "V", 1.0, "below the largest supply, 100 V"),
    ("control", "ratio"): _l(0, 50, "%", 0.01, "a tolerance share"),
    ("frequency", "frequency"): _l(1e-3, 1e9, "Hz", 1.0, "RC circuits run from 1 mHz to 1 GHz"),
    ("frequency", "ratio"): _l(0, 100, "%", 0.01, "a tolerance share"),
    ("period", "time"): _l(1e-9, 1e3, "s", 1.0, "the inverse of 1 mHz to 1 GHz"),
    ("period", "ratio"): _l(0, 100, "%", 0.01, "a tolerance share"),
    ("duty", "ratio"): _l(0, 100, "%", 0.01, "a duty cycle lies between 0 % and 100 %"),
    ("high", "time"): _l(0, 1e3, "s", 1.0, "part of a period of up to 1000 s"),
    ("high", "ratio"): _l(0, 100, "%", 0.01, "a tolerance share"),
    ("low", "time"): _l(0, 1e3, "s", 1.0, "part of a period of up to 1000 s"),
    ("low", "ratio"): _l(0, 100, "%", 0.01, "a tolerance share"),
    ("diode", "voltage"): _l(0, 5, "V", 1.0, "a steering diode drops less than 5 V"),
    ("delay", "time"): _l(0, 1e6, "s", 1.0, "a delay of up to about 11 days"),
    ("delay", "ratio"): _l(0, 100, "%", 0.01, "a tolerance share"),
    ("threshold", "voltage"): _l(0, 100, "V", 1.0, "below the largest supply, 100 V"),
    ("threshold", None): _l(0, 1, "", 1.0, "a share of the supply lies between 0 and 1"),
    ("threshold", "ratio"): _l(0, 100, "%", 0.01, "a tolerance share"),
    ("start", "voltage"): _l(-100, 100, "V", 1.0, "within the largest supply, ±100 V"),
    ("rising", "voltage"): _l(0, 100, "V", 1.0, "below the largest supply, 100 V"),
    ("rising", None): _l(0, 1, "", 1.0, "a share of the supply lies between 0 and 1"),
    ("falling", "voltage"): _l(0, 100, "V", 1.0, "below the largest supply, 100 V"),
    ("falling", None): _l(0, 1, "", 1.0, "a share of the supply lies between 0 and 1"),
    ("load", "capacitance"): _l(
        0, 1000, "pF", 1e-12, "crystal load capacitances (common practice)"
    ),
    ("stray", "capacitance"): _l(0, 1000, "pF", 1e-12, "pin and board stray capacitance"),
    ("shunt", "capacitance"): _l(0, 1000, "pF", 1e-12, "crystal shunt capacitance C0"),
    ("motional", "capacitance"): _l(
        0, 1000, "fF", 1e-15, "motional capacitance of quartz, well under 1 pF"
    ),
    ("esr", "resistance"): _l(0, 1e6, "Ω", 1.0, "crystal series resistance up to 1 MΩ"),
    ("drive", "power"): _l(0, 1, "W", 1.0, "crystal drive levels stay far below 1 W"),
    ("gm", "transconductance"): _l(0, 10, "A/V", 1.0, "logic-gate transconductance"),
    ("swing", "voltage"): _l(0, 100, "V", 1.0, "below the largest supply, 100 V"),
    ("tolerance", "ratio"): _l(-10000, 10000, "ppm", _PPM, "a crystal's calibration tolerance"),
    ("stability", "ratio"): _l(
        -10000, 10000, "ppm", _PPM, "a crystal's stability over temperature"
    ),
    ("aging", "rate"): _l(-10000, 10000, "ppm/year", _PPM, "a crystal's ageing per year"),
    ("aging", "ratio"): _l(-10000, 10000, "ppm", _PPM, "a crystal's ageing over a period"),
    ("aging", "time"): _l(0, 100, "years", _YEAR, "an ageing period of up to 100 years"),
    ("accuracy", "ratio"): _l(-100000, 100000, "ppm", _PPM, "a required frequency accuracy"),
    ("clock", "frequency"): _l(1, 1e10, "Hz", 1.0, "a capture clock from 1 Hz to 10 GHz"),
    ("clock", "ratio"): _l(0, 10000, "ppm", _PPM, "a capture clock's tolerance"),
    ("uncertainty", "time"): _l(0, 1e3, "s", 1.0, "a measurement uncertainty up to 1000 s"),
}

#: Bounds that depend on the block kind: ``(block kind, keyword, kind) -> Limit``.
BLOCK_BOUNDS: dict[tuple[str, str, str | None], Limit] = {
    ("crystal", "frequency", "frequency"): _l(
        1e3, 200e6, "Hz", 1.0, "quartz crystals in a Pierce loop run from 1 kHz to 200 MHz"
    ),
}


def limit_for(block: str, keyword: str, kind: str | None) -> Limit:
    """The range a number of ``kind`` may take in a statement.

    Parameters
    ----------
    block
        The block kind (or ``"defaults"``).
    keyword
        The statement keyword.
    kind
        The quantity kind (``None``: a plain number).

    Returns
    -------
    Limit
        The narrowest range that applies.
    """
    found = BLOCK_BOUNDS.get((block, keyword, kind)) or BOUNDS.get((keyword, kind))
    return found or KIND_BOUNDS.get(kind, KIND_BOUNDS[None])


def _number(x: float) -> str:
    return f"{x:g}"


def format_limit(limit: Limit) -> str:
    """A range as people read it, ``1 kHz``-style ends in the limit's unit.

    Parameters
    ----------
    limit
        The range.

    Returns
    -------
    str
        For example ``"1 kHz to 200 MHz"``, ``"0 to 10000 ppm/K"``.
    """
    kind = _SI_KINDS.get(limit.unit) if limit.scale == 1.0 else None
    if kind is not None:
        return f"{_si(limit.low, kind)} to {_si(limit.high, kind)}"
    low = _number(round(limit.low / limit.scale, 9))
    high = _number(round(limit.high / limit.scale, 9))
    unit = f" {limit.unit}" if limit.unit else ""
    return f"{low} to {high}{unit}"


#: Units whose ends read better with an SI prefix (``200 MHz``, ``1 mA``, ``1 GΩ``).
_SI_KINDS: dict[str, str] = {
    "Hz": "frequency",
    "A": "current",
    "V": "voltage",
    "F": "capacitance",
    "Ω": "resistance",
    "W": "power",
    "s": "time",
}


def _si(x: float, kind: str) -> str:
    """One end with an SI prefix; times of a second and more stay in seconds."""
    if x == 0.0 or (kind == "time" and abs(x) >= 1.0):
        return f"{_number(x)} {_SI_UNIT[kind]}"
    return format_quantity(x, kind)


_SI_UNIT = {
    "frequency": "Hz",
    "current": "A",
    "voltage": "V",
    "capacitance": "F",
    "resistance": "Ω",
    "power": "W",
    "time": "s",
}


def quantities(term: Term) -> Iterator[tuple[Quantity, bool]]:
    """Every number in a term, each with whether it is a tolerance side.

    Parameters
    ----------
    term
        A parsed term.

    Yields
    ------
    tuple of (Quantity, bool)
        The number and ``True`` when it is one side of a tolerance.
    """
    if isinstance(term, Quantity):
        yield term, False
    elif isinstance(term, Toleranced):
        yield term.nominal, False
        yield term.tolerance.minus, True
        yield term.tolerance.plus, True
    elif isinstance(term, Tolerance):
        yield term.minus, True
        yield term.plus, True
    elif isinstance(term, Range):
        yield term.low, False
        yield term.high, False
    elif isinstance(term, Bound):
        yield term.quantity, False
    elif isinstance(term, Fraction):
        yield from quantities(term.inner)


def check_bounds(stmt: Statement, block: str) -> None:
    """Check every number of a statement: finite and inside its statement's range.

    Parameters
    ----------
    stmt
        The parsed statement.
    block
        The kind of block it stands in (or ``"defaults"``).

    Raises
    ------
    SpecValueError
        At the first number that is not finite, is a negative tolerance, or
        lies outside its range; the hint names the allowed range.
    """
    if stmt.keyword in ("samples", "seed", "include", "refs"):
        return  # whole numbers with their own limits, a file name, or designators
    for group in stmt.args:
        for term in group:
            for q, side in quantities(term):
                _check_one(stmt.keyword, block, q, side)


def _check_one(keyword: str, block: str, q: Quantity, side: bool) -> None:
    limit = limit_for(block, keyword, q.kind)
    where = f"'{keyword}'" + (f" in a {block} block" if block in ("crystal",) else "")
    hint = f"{where} takes {format_limit(limit)} ({limit.reason})"
    if not math.isfinite(q.value):
        raise error_at(SpecValueError, f"{where}: {q.text!r} is not a finite number", q.pos, hint)
    if side:
        if q.value < 0:
            raise error_at(
                SpecValueError,
                f"{where}: a tolerance is written as a size, not a negative number ({q.text!r})",
                q.pos,
                "write it like: ±5% (or +5% -2% for unequal sides)",
            )
        high = limit.high if limit.high > 0 else abs(limit.low)
        if q.value > max(high, abs(limit.low)):
            raise error_at(
                SpecValueError, f"{where}: the tolerance {q.text!r} is out of range", q.pos, hint
            )
        return
    if not limit.low <= q.value <= limit.high:
        raise error_at(SpecValueError, f"{where}: {q.text!r} is out of range", q.pos, hint)


def rst_table() -> str:
    """The bounds as the reStructuredText list-table of the language reference.

    Returns
    -------
    str
        The table, one row per statement-narrowed range, the block-kind ones last.
    """
    rows = [(kw, kind, "any", lim) for (kw, kind), lim in BOUNDS.items()]
    rows += [(kw, kind, block, lim) for (block, kw, kind), lim in BLOCK_BOUNDS.items()]
    rows += [("any other", kind, "any", lim) for kind, lim in KIND_BOUNDS.items()]
    out = [
        ".. list-table::",
        "   :header-rows: 1",
        "",
        "   * - Statement",
        "     - Quantity",
        "     - Block",
        "     - Allowed",
        "     - Why",
    ]
    for kw, kind, block, lim in rows:
        name = kw if kw == "any other" else f"``{kw}``"
        out += [
            f"   * - {name}",
            f"     - {kind or 'number'}",
            f"     - {block}",
            f"     - {format_limit(lim)}",
            f"     - {lim.reason}",
        ]
    return "\n".join(out) + "\n"
