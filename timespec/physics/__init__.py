"""Circuit physics: closed-form timing laws, one module per circuit family.

Every function is pure and vectorised: arguments are floats or float64 numpy arrays in
SI units (ohm, farad, volt, ampere, second, hertz), broadcast together, and results are
float64 ``numpy.ndarray``.  A threshold that is never reached gives ``numpy.inf``.
No units library and no I/O here; units live at the edges of the package.

The modules:

* :mod:`~timespec.physics.rcdelay`: RC charging into a threshold, with a constant drain
  current;
* :mod:`~timespec.physics.monostable`: 555-type one-shot;
* :mod:`~timespec.physics.astable`: 555-type free-running oscillator (classic,
  steering-diode and output-feedback);
* :mod:`~timespec.physics.relaxation`: Schmitt-inverter RC oscillator;
* :mod:`~timespec.physics.pierce`: Pierce crystal oscillator (load capacitors, pulling,
  gain margin, drive level, ppm budget).
"""

from __future__ import annotations

from timespec.physics import astable, monostable, pierce, rcdelay, relaxation
from timespec.physics._types import ArrayLike, FloatArray

__all__ = [
    "ArrayLike",
    "FloatArray",
    "astable",
    "monostable",
    "pierce",
    "rcdelay",
    "relaxation",
]
