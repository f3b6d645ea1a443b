"""The statement vocabulary: which keywords each block takes and what they mean.

The grammar reads every statement as a keyword followed by comma-separated
arguments.  This module is the table that gives them meaning: for each keyword
the block kinds it belongs to, an example (used in hints and in the language
reference), and the reader (from :mod:`timespec.readers`) that turns the
parsed arguments into model values.
"""

from __future__ import annotations

from dataclasses import dataclass

from timespec.devices import GATE_CLASSES
from timespec.parser import Statement
from timespec.readers import (
    Reader,
    Reading,
    did_you_mean,
    error_at,
    read_ambient,
    read_choice,
    read_clock,
    read_count,
    read_gate,
    read_include,
    read_level,
    read_life,
    read_limit,
    read_policy,
    read_ppm,
    read_requirement,
    read_span,
    read_spread,
    read_supply,
    read_timer,
    read_trigger,
    read_use,
)

__all__ = ["KEYWORDS", "Keyword", "Reading", "did_you_mean", "error_at", "read_statement"]


@dataclass(frozen=True)
class Keyword:
    """One statement keyword.

    Attributes
    ----------
    name
        The keyword.
    kinds
        Block kinds (and ``"defaults"``) it may stand in.
    example
        A statement that shows its form.
    meaning
        One line saying what it does.
    read
        Turns the statement into a :class:`Reading`.
    """

    name: str
    kinds: frozenset[str]
    example: str
    meaning: str
    read: Reader


# --------------------------------------------------------------------------
# the table

_ALL = frozenset({"defaults", "oneshot", "astable", "delay", "relaxation", "crystal"})
_RC = frozenset({"defaults", "oneshot", "astable", "delay", "relaxation"})
_TIMERS = frozenset({"defaults", "oneshot", "astable"})


def _kw(
    name: str, kinds: frozenset[str] | set[str], example: str, meaning: str, read: Reader
) -> Keyword:
    return Keyword(name, frozenset(kinds), example, meaning, read)


_TABLE: list[Keyword] = [
    _kw("supply", _ALL, "supply 12 V ±5%", "supply voltage and its tolerance", read_supply),
    _kw("ambient", _ALL, "ambient -10 degC to 60 degC", "ambient temperature range", read_ambient),
    _kw("life", _ALL, "life 5 years", "service life, for ageing", read_life),
    _kw(
        "resistors",
        _RC,
        "resistors E96 1% 100 ppm/K, 1k to 1M",
        "resistor policy: series, tolerance, tempco, value range, pairs, ageing",
        read_policy("resistors"),
    ),
    _kw(
        "capacitors",
        _ALL,
        "capacitors E12 5% C0G, 1n to 100n",
        "capacitor policy: series, tolerance, dielectric, value range, pairs, ageing",
        read_policy("capacitors"),
    ),
    _kw(
        "leakage",
        _RC,
        "leakage 5 nA max",
        "capacitor and board leakage at the timing node (a bound)",
        read_limit(["current"]),
    ),
    _kw("samples", _ALL, "samples 50000", "Monte Carlo sample count", read_count(1)),
    _kw("seed", _ALL, "seed 7", "Monte Carlo seed", read_count(0)),
    _kw(
        "spread",
        _ALL,
        "spread normal 3 sigma",
        "how part values spread inside their tolerance: uniform, or normal N sigma",
        read_spread,
    ),
    _kw(
        "timer",
        _TIMERS,
        "timer cmos, initial ±2%, drift ±100 ppm/K",
        "555-type timer class and optional accuracy overrides",
        read_timer,
    ),
    _kw(
        "use",
        {"oneshot", "astable", "delay", "relaxation", "crystal"},
        "use R 150k 1%, C 1u X7R 10%",
        "pin parts: check them instead of choosing",
        read_use,
    ),
    # one-shot
    _kw(
        "width",
        {"oneshot"},
        "width 150 ms ±8%",
        "required output pulse width",
        read_requirement("width", ["time"]),
    ),
    _kw(
        "trigger",
        {"oneshot"},
        "trigger 2 ms, spacing 1 s",
        "trigger pulse length, and the shortest time between triggers",
        read_trigger,
    ),
    _kw(
        "control",
        {"oneshot"},
        "control 8 V ±2%",
        "control-pin voltage forced from outside (sets the threshold)",
        read_span(["voltage"]),
    ),
    # astable and relaxation
    _kw(
        "frequency",
        {"astable", "relaxation", "crystal"},
        "frequency 4 Hz ±10%",
        "required frequency (for a crystal: its nominal frequency, e.g. frequency 12 MHz)",
        read_requirement("frequency", ["frequency"]),
    ),
    _kw(
        "period",
        {"astable", "relaxation"},
        "period 250 ms ±10%",
        "required period",
        read_requirement("period", ["time"]),
    ),
    _kw(
        "duty",
        {"astable"},
        "duty 30% ±5%",
        "required duty cycle (share of the period the output is high; ± in percentage points)",
        read_requirement("duty", ["ratio"]),
    ),
    _kw(
        "high",
        {"astable"},
        "high 100 ms ±10%",
        "required high time",
        read_requirement("high", ["time"]),
    ),
    _kw(
        "low",
        {"astable"},
        "low 150 ms ±10%",
        "required low time",
        read_requirement("low", ["time"]),
    ),
    _kw(
        "circuit",
        {"astable"},
        "circuit diode",
        "astable circuit: classic (two resistors), diode (steering diode), feedback (CMOS output)",
        read_choice(["classic", "diode", "feedback"]),
    ),
    _kw(
        "diode",
        {"astable"},
        "diode 0.55 V to 0.75 V",
        "steering-diode forward drop at 25 °C",
        read_span(["voltage"]),
    ),
    # delay
    _kw(
        "delay",
        {"delay"},
        "delay 20 ms to 40 ms",
        "required delay",
        read_requirement("delay", ["time"]),
    ),
    _kw(
        "threshold",
        {"delay"},
        "threshold 0.55 to 0.75 of supply",
        "input threshold, in volts or as a share of the supply",
        read_span(["voltage"], fraction_of="supply"),
    ),
    _kw(
        "start",
        {"delay"},
        "start 0.2 V",
        "capacitor voltage when the delay starts",
        read_level(["voltage"], positive=False),
    ),
    # relaxation
    _kw(
        "gate",
        {"defaults", "relaxation"},
        "gate highspeed",
        "Schmitt-inverter class: " + ", ".join(GATE_CLASSES),
        read_gate,
    ),
    _kw(
        "rising",
        {"relaxation"},
        "rising 0.4 to 0.7 of supply",
        "positive-going threshold band (overrides the gate class)",
        read_span(["voltage"], fraction_of="supply"),
    ),
    _kw(
        "falling",
        {"relaxation"},
        "falling 0.2 to 0.45 of supply",
        "negative-going threshold band (overrides the gate class)",
        read_span(["voltage"], fraction_of="supply"),
    ),
    # crystal
    _kw(
        "load",
        {"crystal"},
        "load 8 pF",
        "load capacitance the crystal is calibrated at",
        read_level(["capacitance"]),
    ),
    _kw(
        "stray",
        {"crystal"},
        "stray 2 pF to 5 pF",
        "stray capacitance of pins and board",
        read_span(["capacitance"]),
    ),
    _kw(
        "shunt",
        {"crystal"},
        "shunt 1.5 pF",
        "crystal shunt capacitance C0",
        read_level(["capacitance"]),
    ),
    _kw(
        "motional",
        {"crystal"},
        "motional 4 fF",
        "crystal motional capacitance Cm",
        read_level(["capacitance"]),
    ),
    _kw(
        "esr",
        {"crystal"},
        "esr 60 ohm max",
        "crystal series resistance (a bound)",
        read_limit(["resistance"]),
    ),
    _kw(
        "drive",
        {"crystal"},
        "drive 100 uW max",
        "largest drive level the crystal takes",
        read_limit(["power"]),
    ),
    _kw(
        "gm",
        {"crystal"},
        "gm 5 mA/V",
        "oscillator amplifier transconductance",
        read_level(["transconductance"]),
    ),
    _kw(
        "swing",
        {"crystal"},
        "swing 3 V",
        "peak-to-peak voltage across the crystal",
        read_level(["voltage"]),
    ),
    _kw(
        "tolerance",
        {"crystal"},
        "tolerance ±10 ppm",
        "crystal calibration tolerance at 25 °C",
        read_ppm(),
    ),
    _kw(
        "stability",
        {"crystal"},
        "stability ±20 ppm",
        "crystal frequency change over the ambient range",
        read_ppm(),
    ),
    _kw("aging", {"crystal"}, "aging ±3 ppm/year", "crystal ageing per year", read_ppm(rate=True)),
    _kw(
        "accuracy",
        {"crystal"},
        "accuracy ±50 ppm",
        "required total frequency error over life",
        read_ppm(requirement="accuracy"),
    ),
    # fixture
    _kw(
        "clock",
        {"fixture"},
        "clock 16 MHz ±50 ppm",
        "capture clock of the fixture and its frequency tolerance",
        read_clock,
    ),
    _kw(
        "uncertainty",
        {"fixture"},
        "uncertainty 2 us",
        "bound on the other measurement errors of the fixture (latency, jitter)",
        read_level(["time"], positive=False),
    ),
    _kw(
        "decision",
        {"fixture"},
        "decision guarded",
        "how limits are set: guarded (requirement narrowed by the uncertainty), simple "
        "(the requirement), expected (worst case widened by the uncertainty)",
        read_choice(["guarded", "simple", "expected"]),
    ),
    _kw("include", set(), 'include "common.tspec"', "read another spec file here", read_include),
]

#: Every keyword by name.
KEYWORDS: dict[str, Keyword] = {kw.name: kw for kw in _TABLE}


#: Keywords whose meaning depends on the block kind.
_BY_KIND: dict[tuple[str, str], Reader] = {
    ("crystal", "frequency"): read_level(["frequency"]),
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
        When its arguments are wrong.
    """
    reader = _BY_KIND.get((kind, stmt.keyword), KEYWORDS[stmt.keyword].read)
    return reader(stmt)
