"""The first-order critical transconductance against the exact loop condition.

The Pierce stage (ideal transconductor gm from the input node to the output node,
C1 and C2 to ground, the crystal between them) oscillates where the nodal
determinant vanishes: ``Zx = (gm + jω(C1 + C2))/(ω²·C1·C2)`` (Kirchhoff's current
law at both nodes, any circuit-theory handbook).  With the Butterworth-Van Dyke
crystal (R, L, Cm in series, C0 across) that fixes the crystal's reactance at
``1/(ω·CL)`` and, exactly, the critical ``gm = ω²·C1·C2·Re(Zx)``.  Here ``Re(Zx)``
is found with scipy's ``brentq`` from ``R = G/(G² + B²)`` (the admittance of the
motional arm is ``Yx − jωC0``), and the closed form of
:func:`timespec.physics.pierce.critical_gm_caps` (first order in ESR) must agree
within ``u²`` (``u = ESR·ω·(C0 + CL)``), never reading more than 1 % low for
crystals with ``u ≤ 0.15``.
"""

from __future__ import annotations

import math

import pytest
from scipy.optimize import brentq

from timespec.physics.pierce import critical_gm_caps


def _exact_gm(esr: float, f: float, c0: float, c1: float, c2: float) -> float:
    w = 2.0 * math.pi * f
    cl = c1 * c2 / (c1 + c2)
    x = 1.0 / (w * cl)

    def residual(a: float) -> float:
        d = a * a + x * x
        g = a / d
        b = x / d + w * c0
        return g / (g * g + b * b) - esr

    first = esr * ((c0 + cl) / cl) ** 2
    return w * w * c1 * c2 * brentq(residual, 0.0, 10.0 * first, xtol=1e-18, rtol=1e-14)


# Invented but typical crystals (from memory: tuning forks 30–90 kΩ with C0 about
# 1–2 pF; AT-cut 4–30 MHz 20–150 Ω with C0 3–7 pF), unequal capacitors included.
CASES = [
    (50e3, 32768.0, 1.5e-12, 25e-12, 25e-12),
    (80e3, 32768.0, 1.2e-12, 12e-12, 15e-12),
    (150.0, 4e6, 4e-12, 33e-12, 33e-12),
    (100.0, 8e6, 5e-12, 30e-12, 22e-12),
    (40.0, 25e6, 7e-12, 20e-12, 20e-12),
]


@pytest.mark.parametrize(("esr", "f", "c0", "c1", "c2"), CASES)
def test_first_order_gm_crit_within_u_squared(
    esr: float, f: float, c0: float, c1: float, c2: float
) -> None:
    exact = _exact_gm(esr, f, c0, c1, c2)
    first = float(critical_gm_caps(esr, f, c0, c1, c2))
    cl = c1 * c2 / (c1 + c2)
    u = esr * 2.0 * math.pi * f * (c0 + cl)
    assert u <= 0.15
    assert abs(exact / first - 1.0) <= u * u
    assert first >= 0.99 * exact
