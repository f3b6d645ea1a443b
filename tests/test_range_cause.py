"""An empty candidate list names its cause in numbers (issue 10 item 3).

The needed capacitor follows the one-shot law ``t = R·C·ln 3`` (555 monostable,
threshold at 2/3 of the supply; any timer handbook) to within the stray and the
output delay the model adds; the astable's from ``T = (RA + 2·RB)·C·ln 2``.  The
advice is checked by re-solving with the capacitor range it names.
"""

from __future__ import annotations

import math
import re

from timespec.design.solver import solve_block
from timespec.language.assemble import parse

# Our own scenario: a relay hold-off and a slow status blink on a burn-in rack.
# The capacitors are held to C0G up to 100 nF (the built-in technologies reach far beyond).
_C0G = "  capacitors E12 5% C0G, 100p to 100n\n"
_HOLD = "oneshot relay_hold:\n  width 150 ms ±8%\n  supply 12 V ±5%\n" + _C0G
_BLINK = (
    "astable rack_blink:\n  frequency 0.05 Hz ±20%\n  supply 12 V ±5%\n  circuit classic\n" + _C0G
)


def _farads(note: str) -> float:
    m = re.search(r"C ≈ ([0-9.]+) (nF|µF) at R = 1 MΩ", note)
    assert m, note
    return float(m.group(1)) * (1e-9 if m.group(2) == "nF" else 1e-6)


def test_one_shot_beyond_the_ranges_names_the_capacitor() -> None:
    (block,) = parse(_HOLD).blocks
    result = solve_block(block)
    assert result.verdict == "infeasible" and result.best is None
    note = result.notes[0]
    assert "needs about 150 ms" in note and "R 1k…1M, C 100p…100n" in note
    c = _farads(note)
    assert math.isclose(c, 0.150 / (1e6 * math.log(3.0)), rel_tol=0.03)
    # the advice works: the capacitor range widened upward past it, with film parts
    (fixed,) = parse(_HOLD.replace(_C0G, "  capacitors E12 2% PET, 1n to 470n\n")).blocks
    assert solve_block(fixed).verdict == "meets"


def test_astable_beyond_the_ranges_names_the_capacitor() -> None:
    (block,) = parse(_BLINK).blocks
    result = solve_block(block)
    assert result.best is None
    note = result.notes[0]
    c = _farads(note)
    # RA = RB = 1 MΩ: T = 3 MΩ·C·ln 2 = 20 s
    assert math.isclose(c, 20.0 / (3e6 * math.log(2.0)), rel_tol=0.03)
