"""Hints that point at the real fix (issue 10 item 8); exact text on purpose.

Supply ranges of the classes (from timespec.parts.devices, generic class
datasheets): bipolar timer 4.5…16 V, CMOS timer 2…15 V; high-speed CMOS Schmitt
gate 2…6 V, metal-gate CMOS 3…18 V.
"""

from __future__ import annotations

import pytest

from timespec.errors import SpecError
from timespec.language.assemble import parse

# Our own scenario: timers on a bench power supply's control board.
CASES = [
    (
        "oneshot a:\n  width 10 ms ±5%\n  timer cmos\n  supply 15 V ±5%\n",
        "use 'timer bipolar', or change the supply",
    ),
    (
        "oneshot a:\n  width 10 ms ±5%\n  timer bipolar\n  supply 3.3 V ±5%\n",
        "use 'timer cmos', or change the supply",
    ),
    (
        "oneshot a:\n  width 10 ms ±5%\n  supply 24 V ±10%\n",
        "no timer class takes this supply (bipolar 4.5…16 V, cmos 2…15 V): change the supply",
    ),
    (
        "relaxation r:\n  frequency 1 kHz ±5%\n  supply 12 V\n",
        "use 'gate metalgate', or change the supply",
    ),
    (
        "crystal c:\n  frequency 16 MHz ±50 ppm\n  load 10 pF\n  shunt 2 pF\n"
        "  motional 5 fF\n  esr 40 ohm\n",
        "a crystal's frequency is its nominal value, e.g. 'frequency 16 MHz'; its "
        "calibration goes in 'tolerance ±20 ppm' and the required total in 'accuracy ±80 ppm'",
    ),
]


@pytest.mark.parametrize(("text", "hint"), CASES)
def test_hint_names_the_fix(text: str, hint: str) -> None:
    with pytest.raises(SpecError) as err:
        parse(text)
    assert err.value.hint == hint
