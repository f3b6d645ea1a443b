"""The ``crystal`` family: the two load capacitors of a Pierce crystal oscillator.

Parts: ``C1`` (amplifier input to ground) and ``C2`` (amplifier output to ground).
Outputs:

* ``accuracy`` — total frequency error over life, a fraction: the crystal's
  calibration tolerance, its stability over the ambient range, its ageing over
  the block's life, and the pulling caused by a load that differs from the one
  the crystal is calibrated at.  All four add linearly (a plain sum), so the
  worst case from the corner engine is the exact sum of their extremes;
* ``pulling`` — the load-mismatch part alone, a fraction;
* ``load`` — the load capacitance the crystal sees, ``C1·C2/(C1 + C2) + Cs``, F;
* ``gain_margin`` — ``gm / gm_crit`` (when the amplifier's ``gm`` is stated),
  or ``gm_needed`` — the transconductance giving a margin of 5 (when it is not);
* ``drive`` — power dissipated in the crystal, W.

Choices where the statements are silent (documented here and in messages):

* **stray**: 3 pF to 5 pF when absent (common practice for pins plus a short
  trace; published application notes quote 2 pF to 5 pF);
* **swing** (peak-to-peak voltage at the inverter's OUTPUT node, for the drive
  level): the supply window when absent, i.e. a rail-to-rail CMOS inverter swing
  (common practice); the block's supply defaults to 3.3 V when not stated.  The
  crystal itself sees about ``swing·(1 + C2/C1)`` (twice the swing for equal
  capacitors, four times the power), which the drive level accounts for;
* **capacitor range**: the policy's range clipped to 1 pF … 100 pF (load
  capacitors of crystals are a few pF to a few tens of pF; the package-wide
  default range 100 pF … 100 nF is meant for RC timing); when the clipped range
  is empty, 1 pF … 100 pF is used;
* **ESR** is held at its stated maximum (the bound is what a datasheet
  guarantees, and it is the worst value for both gain margin and drive level);
  ``C0``, ``Cm`` and the frequency are fixed crystal constants;
* the crystal's **temperature stability** band is an independent factor (its
  shape over temperature is not stated, so it cannot be tied to the ambient),
  while the capacitors' tempco follows the shared ambient factor.

What lives where:

* :mod:`~timespec.families.crystal.family` — :class:`Crystal`, the Family
  protocol (factors, model, candidates, rules), and :func:`accuracy_budget`.
* :mod:`~timespec.families.crystal.settings` — the block's statements read with
  the defaults above, and the load-capacitor values a policy allows.
* :mod:`~timespec.families.crystal.budget` — the frequency-error budget
  (worst-case sum and RSS).
* :mod:`~timespec.families.crystal.rules` — load against stray, gain margin,
  drive level.
* :mod:`~timespec.families.crystal.monotone` — which factors move which outputs
  monotonically, with the proofs.
"""

from __future__ import annotations

from timespec.families.crystal.budget import Budget
from timespec.families.crystal.family import Crystal, accuracy_budget
from timespec.families.crystal.monotone import declarations, declare
from timespec.families.crystal.settings import (
    CAP_HIGH,
    CAP_LOW,
    DEFAULT_STRAY,
    MIN_GAIN_MARGIN,
    capacitor_policy,
    stray_window,
)

__all__ = [
    "CAP_HIGH",
    "CAP_LOW",
    "DEFAULT_STRAY",
    "MIN_GAIN_MARGIN",
    "Budget",
    "Crystal",
    "accuracy_budget",
    "capacitor_policy",
    "declarations",
    "declare",
    "stray_window",
]
