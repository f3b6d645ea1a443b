"""The statement vocabulary: which keywords each block takes, with an example and a meaning.

The grammar reads every statement as a keyword followed by comma-separated
arguments.  This table names the keywords: for each, the block kinds it belongs
to, an example (used in hints and in the language reference) and one line
saying what it does.  What each keyword's arguments mean is read by
:mod:`timespec.language.statements`, which pairs every keyword here with its
reader; the parser and the readers look up examples here for their hints.
"""

from __future__ import annotations

from dataclasses import dataclass

from timespec.parts.devices import GATE_CLASSES

__all__ = ["KEYWORDS", "Keyword"]


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
    """

    name: str
    kinds: frozenset[str]
    example: str
    meaning: str


# --------------------------------------------------------------------------
# the table

_ALL = frozenset({"defaults", "oneshot", "astable", "delay", "relaxation", "crystal"})
_RC = frozenset({"defaults", "oneshot", "astable", "delay", "relaxation"})
_TIMERS = frozenset({"defaults", "oneshot", "astable"})


def _kw(name: str, kinds: frozenset[str] | set[str], example: str, meaning: str) -> Keyword:
    return Keyword(name, frozenset(kinds), example, meaning)


_TABLE: list[Keyword] = [
    _kw("supply", _ALL, "supply 12 V ±5%", "supply voltage and its tolerance"),
    _kw("ambient", _ALL, "ambient -10 degC to 60 degC", "ambient temperature range"),
    _kw("life", _ALL, "life 5 years", "service life, for ageing"),
    _kw(
        "resistors",
        _RC,
        "resistors E96 1% 100 ppm/K, 1k to 1M",
        "resistor policy: series, tolerance, tempco, value range, pairs, ageing",
    ),
    _kw(
        "capacitors",
        _ALL,
        "capacitors E12 5% C0G, 1n to 100n",
        "capacitor policy: series, tolerance, dielectric, value range, pairs, ageing, rated V",
    ),
    _kw(
        "leakage",
        _RC,
        "leakage 5 nA max",
        "capacitor and board leakage at the timing node (a bound)",
    ),
    _kw("samples", _ALL, "samples 50000", "Monte Carlo sample count"),
    _kw("seed", _ALL, "seed 7", "Monte Carlo seed"),
    _kw(
        "spread",
        _ALL,
        "spread normal 3 sigma",
        "how part values spread inside their tolerance: uniform, or normal N sigma",
    ),
    _kw(
        "timer",
        _TIMERS,
        "timer cmos, initial ±2%, drift ±100 ppm/K",
        "555-type timer class and optional accuracy overrides",
    ),
    _kw(
        "use",
        {"oneshot", "astable", "delay", "relaxation", "crystal"},
        "use R 150k 1%, C 1u X7R 10%",
        "pin parts: check them instead of choosing",
    ),
    _kw(
        "refs",
        {"oneshot", "astable", "delay", "relaxation", "crystal"},
        "refs R R12, C C7",
        "board reference designators of the parts, for the bill of materials",
    ),
    _kw("width", {"oneshot"}, "width 150 ms ±8%", "required output pulse width"),
    _kw(
        "trigger",
        {"oneshot"},
        "trigger 2 ms, spacing 1 s",
        "trigger pulse length, and the shortest time between triggers",
    ),
    _kw(
        "control",
        {"oneshot"},
        "control 8 V ±2%",
        "control-pin voltage forced from outside (sets the threshold)",
    ),
    _kw(
        "frequency",
        {"astable", "relaxation", "crystal"},
        "frequency 4 Hz ±10%",
        "required frequency (for a crystal: its nominal frequency, e.g. frequency 12 MHz)",
    ),
    _kw("period", {"astable", "relaxation"}, "period 250 ms ±10%", "required period"),
    _kw(
        "duty",
        {"astable"},
        "duty 30% ±5%",
        "required duty cycle (share of the period the output is high; ± in percentage points)",
    ),
    _kw("high", {"astable"}, "high 100 ms ±10%", "required high time"),
    _kw("low", {"astable"}, "low 150 ms ±10%", "required low time"),
    _kw(
        "circuit",
        {"astable"},
        "circuit diode",
        "astable circuit: classic (two resistors), diode (steering diode), feedback (CMOS output)",
    ),
    _kw("diode", {"astable"}, "diode 0.55 V to 0.75 V", "steering-diode forward drop at 25 °C"),
    _kw("delay", {"delay"}, "delay 20 ms to 40 ms", "required delay"),
    _kw(
        "threshold",
        {"delay"},
        "threshold 0.55 to 0.75 of supply",
        "input threshold, in volts or as a share of the supply",
    ),
    _kw("start", {"delay"}, "start 0.2 V", "capacitor voltage when the delay starts"),
    _kw(
        "gate",
        {"defaults", "relaxation", "delay"},
        "gate highspeed",
        "Schmitt-inverter class: "
        + ", ".join(GATE_CLASSES)
        + " (in a delay block: the input that watches the node; only stated there)",
    ),
    _kw(
        "rising",
        {"relaxation"},
        "rising 0.4 to 0.7 of supply",
        "positive-going threshold band (overrides the gate class)",
    ),
    _kw(
        "falling",
        {"relaxation"},
        "falling 0.2 to 0.45 of supply",
        "negative-going threshold band (overrides the gate class)",
    ),
    _kw("load", {"crystal"}, "load 8 pF", "load capacitance the crystal is calibrated at"),
    _kw("stray", {"crystal"}, "stray 2 pF to 5 pF", "stray capacitance of pins and board"),
    _kw("shunt", {"crystal"}, "shunt 1.5 pF", "crystal shunt capacitance C0"),
    _kw("motional", {"crystal"}, "motional 4 fF", "crystal motional capacitance Cm"),
    _kw("esr", {"crystal"}, "esr 60 ohm max", "crystal series resistance (a bound)"),
    _kw("drive", {"crystal"}, "drive 100 uW max", "largest drive level the crystal takes"),
    _kw("gm", {"crystal"}, "gm 5 mA/V", "oscillator amplifier transconductance"),
    _kw("swing", {"crystal"}, "swing 3 V", "peak-to-peak at the inverter output (default: supply)"),
    _kw("tolerance", {"crystal"}, "tolerance ±10 ppm", "crystal calibration tolerance at 25 °C"),
    _kw(
        "stability",
        {"crystal"},
        "stability ±20 ppm",
        "crystal frequency change over the ambient range",
    ),
    _kw(
        "aging",
        {"crystal"},
        "aging ±3 ppm/year",
        "crystal ageing per year, or a total over a period: ±10 ppm over 10 years",
    ),
    _kw("accuracy", {"crystal"}, "accuracy ±50 ppm", "required total frequency error over life"),
    _kw(
        "clock",
        {"fixture"},
        "clock 16 MHz ±50 ppm",
        "capture clock of the fixture and its frequency tolerance",
    ),
    _kw(
        "uncertainty",
        {"fixture"},
        "uncertainty 2 us",
        "bound on the other measurement errors of the fixture (latency, jitter)",
    ),
    _kw(
        "decision",
        {"fixture"},
        "decision guarded",
        "how limits are set: guarded (requirement narrowed by the uncertainty), simple "
        "(the requirement), expected (worst case widened by the uncertainty)",
    ),
    _kw("include", set(), 'include "common.tspec"', "read another spec file here"),
]

#: Every keyword by name.
KEYWORDS: dict[str, Keyword] = {kw.name: kw for kw in _TABLE}
