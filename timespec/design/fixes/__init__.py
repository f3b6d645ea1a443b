"""Computed fixes for a requirement the allowed parts cannot meet.

Nothing here is guessed.  Each candidate change is applied to the block (a
:func:`dataclasses.replace` of its part policies, pinned parts or conditions), the
modified block is solved again with :func:`timespec.design.solver.solve_block`, and only
changes whose re-solved design *meets* at worst case are offered, cheapest first.

Candidate changes
-----------------
* ``values``: choose new standard values (a checked block whose pinned values fail);
* ``finer-series``: the next finer IEC 60063 series (resistors up to E192,
  capacitors up to E24, the finest commonly stocked for capacitors, common practice);
* ``pairs``: allow two standard values in series or parallel as one part;
* ``resistor-tolerance``: 0.5 % or 0.1 % resistors with a matching tempco
  (50 and 25 ppm/K: metal and thin film, figures from memory, see
  :data:`timespec.parts.dielectrics.RESISTOR_TCR_PPM`);
* ``capacitor-tolerance``: 10, 5, 2 or 1 % capacitors (class 2 ceramics not below
  5 %, electrolytics not below 10 %: what is commonly made, common practice);
* ``dielectric``: C0G or polypropylene film instead of a class 2 ceramic,
  electrolytic or other imprecise dielectric, the value range clipped to what the
  new dielectric is commonly made in;
* ``resistor-range`` / ``capacitor-range``: a decade more range when no candidate
  could be formed at all;
* ``timer-class``: another 555-type timer class that takes the whole supply (for
  one-shots and astables), with its built-in resistor range when the block uses the
  built-in one (10 MΩ for ``cmos``, see :func:`timespec.model.builtin_resistor_high`);
* combinations of two or three of the above (their costs add);
* ``trimmer``: for one-resistor R-C blocks, a fixed resistor plus a trimmer
  whose range covers the worst-case spread of everything else, computed from the
  worst-case extremes at the trimming condition; the error left after trimming
  (temperature, supply, ageing) is computed too;
* ``ambient``: the widest narrower ambient range that would meet — offered last and
  labelled as a change of the requirement, not of the design.

Their costs, and how they are ranked, are described in
:mod:`~timespec.design.fixes.fix`.

The modules
-----------
* :mod:`~timespec.design.fixes.fix`: the :class:`Fix` result, the :data:`COSTS`
  table and the summaries of a re-solved design;
* :mod:`~timespec.design.fixes.changes`: the part and policy changes and their
  combinations;
* :mod:`~timespec.design.fixes.trimmer`: a fixed resistor plus a trimmer, alone or
  with one part change;
* :mod:`~timespec.design.fixes.requirement`: a narrower ambient range;
* :mod:`~timespec.design.fixes.predict`: the quick bound that skips a re-solve
  whose spread alone (the closest design re-graded, one worst case) is wider than
  the window, and what failed re-solves settle;
* :mod:`~timespec.design.fixes.search`: :func:`suggest_fixes`, which tries them all.
"""

from __future__ import annotations

from timespec.design.fixes.fix import COSTS, Fix, tightest_window
from timespec.design.fixes.search import suggest_fixes
from timespec.design.fixes.trimmer import TRIMMER_STEPS, Trim, trim_design

__all__ = [
    "COSTS",
    "TRIMMER_STEPS",
    "Fix",
    "Trim",
    "suggest_fixes",
    "tightest_window",
    "trim_design",
]
