"""What each statement means: every keyword of the vocabulary paired with its reader.

The vocabulary (:mod:`timespec.language.vocabulary`) names the keywords; this
module maps each to the reader (from :mod:`timespec.language.readers` or
:mod:`timespec.language.policies`) that turns the parsed arguments into model
values, and reads one statement.
"""

from __future__ import annotations

from timespec.errors import SpecError, SpecValueError
from timespec.language.arguments import Reader, Reading, error_at, example_hint
from timespec.language.bounds import check_bounds
from timespec.language.parser import Statement
from timespec.language.policies import read_gate, read_policy, read_timer, read_use
from timespec.language.readers import (
    read_ageing,
    read_ambient,
    read_choice,
    read_clock,
    read_count,
    read_include,
    read_level,
    read_life,
    read_limit,
    read_ppm,
    read_requirement,
    read_span,
    read_spread,
    read_supply,
    read_trigger,
)
from timespec.language.refs import read_refs
from timespec.model import MAX_SAMPLES, MAX_SEED

__all__ = ["READERS", "read_statement"]

#: The reader of every keyword (the keys are exactly those of ``KEYWORDS``).
READERS: dict[str, Reader] = {
    "supply": read_supply,
    "ambient": read_ambient,
    "life": read_life,
    "resistors": read_policy("resistors"),
    "capacitors": read_policy("capacitors"),
    "leakage": read_limit(["current"]),
    "samples": read_count(1, MAX_SAMPLES),
    "seed": read_count(0, MAX_SEED),
    "spread": read_spread,
    "timer": read_timer,
    "use": read_use,
    "refs": read_refs,
    "width": read_requirement("width", ["time"]),
    "trigger": read_trigger,
    "control": read_span(["voltage"]),
    "frequency": read_requirement("frequency", ["frequency"]),
    "period": read_requirement("period", ["time"]),
    "duty": read_requirement("duty", ["ratio"]),
    "high": read_requirement("high", ["time"]),
    "low": read_requirement("low", ["time"]),
    "circuit": read_choice(["classic", "diode", "feedback"]),
    "diode": read_span(["voltage"]),
    "delay": read_requirement("delay", ["time"]),
    "threshold": read_span(["voltage"], fraction_of="supply"),
    "start": read_level(["voltage"], positive=False),
    "gate": read_gate,
    "rising": read_span(["voltage"], fraction_of="supply"),
    "falling": read_span(["voltage"], fraction_of="supply"),
    "load": read_level(["capacitance"]),
    "stray": read_span(["capacitance"]),
    "shunt": read_level(["capacitance"]),
    "motional": read_level(["capacitance"]),
    "esr": read_limit(["resistance"]),
    "drive": read_limit(["power"]),
    "gm": read_level(["transconductance"]),
    "swing": read_level(["voltage"]),
    "tolerance": read_ppm(),
    "stability": read_ppm(),
    "aging": read_ageing,
    "accuracy": read_ppm(requirement="accuracy"),
    "clock": read_clock,
    "uncertainty": read_level(["time"], positive=False),
    "decision": read_choice(["guarded", "simple", "expected"]),
    "include": read_include,
}


#: Keywords whose meaning depends on the block kind.
_BY_KIND: dict[tuple[str, str], Reader] = {
    ("crystal", "frequency"): read_level(
        ["frequency"],
        hint="a crystal's frequency is its nominal value, e.g. 'frequency 16 MHz'; its "
        "calibration goes in 'tolerance ±20 ppm' and the required total in 'accuracy ±80 ppm'",
    ),
}


def read_statement(stmt: Statement, kind: str) -> Reading:
    """Read one statement (its keyword must be known).

    Parameters
    ----------
    stmt
        The parsed statement.
    kind
        The kind of block it stands in (or ``"defaults"``).

    Returns
    -------
    Reading
        What it contributes.

    Raises
    ------
    SpecError
        When its arguments are wrong: the reader's own checks first, then
        every number against its statement's range
        (:mod:`timespec.language.bounds`); an arithmetic error of a reader
        becomes an error at the offending number or at the statement.
    """
    reader = _BY_KIND.get((kind, stmt.keyword), READERS[stmt.keyword])
    try:
        reading = reader(stmt)
    except SpecError:
        raise
    except (ValueError, ArithmeticError) as exc:
        check_bounds(stmt, kind)  # a located error at the number, when one is out of range
        raise error_at(
            SpecValueError,
            f"'{stmt.keyword}' cannot be read: {exc}",
            stmt.pos,
            example_hint(stmt.keyword),
        ) from None
    check_bounds(stmt, kind)
    return reading
