"""The ``astable`` family: a 555-type free-running oscillator.

Three circuit variants (``Design.variant``), chosen automatically or pinned with
``circuit classic|diode|feedback``:

* ``classic`` — parts ``RA`` (supply to discharge pin), ``RB`` (discharge pin to
  capacitor) and ``C``.  The capacitor charges through ``RA + RB`` and discharges
  through ``RB``, so the duty cycle ``(RA + RB)/(RA + 2·RB)`` is always above 50 %.
* ``diode`` — the same three parts with a steering diode across ``RB``: the
  capacitor charges through ``RA`` alone (toward the supply less the diode drop)
  and discharges through ``RB``, so any duty cycle is possible.  The diode drop
  is a band at 25 °C (``diode 0.55 V to 0.75 V``) plus a tempco, so the high
  time depends on supply and temperature; both are modelled.
* ``feedback`` — parts ``R`` (output to capacitor) and ``C``; needs a timer whose
  output swings to the rails (the CMOS class).  Duty cycle close to 50 %, set by
  the output levels and the threshold ratio.

Outputs, every time: ``frequency``, ``period``, ``duty``, ``high``, ``low``.

What lives where:

* :mod:`~timespec.families.astable.family` — :class:`Astable`, the Family
  protocol: factors, model and design rules assembled from the modules below.
* :mod:`~timespec.families.astable.variants` — the requirement side shared by
  all variants: duty band, high/low targets, which variants can reach the duty
  cycle, and the duty-cycle errors.
* :mod:`~timespec.families.astable.classic`,
  :mod:`~timespec.families.astable.diode`,
  :mod:`~timespec.families.astable.feedback` — each variant's own physics
  wiring: its constants and factors, its half-period model, its steps of the
  resistor search, its own design rules.
* :mod:`~timespec.families.astable.discharge` — what classic and diode share on
  the discharge pin: RA floor, discharge-current rule, RA/RB pair search.
* :mod:`~timespec.families.astable.search` — candidate narrowing over the
  variants (closed form per capacitor, worst-case re-aiming, keeping the best).
* :mod:`~timespec.families.astable.nominal` — the nominal model the resistor
  searches steer by.
* :mod:`~timespec.families.astable.monotone` — which factors move which outputs
  monotonically, with the proofs.
"""

from __future__ import annotations

from timespec.families.astable.family import Astable
from timespec.families.astable.monotone import declarations
from timespec.families.astable.variants import duty_band, reachable_variants

__all__ = ["Astable", "declarations", "duty_band", "reachable_variants"]
