"""555-type monostable (one-shot) timing.

Before the trigger the timer's discharge transistor holds the timing capacitor low;
modelled as an on-resistance ``r_on`` it leaves the capacitor at a small divider voltage
(discharge saturation).  After the trigger the capacitor charges through the timing
resistor ``r`` toward the supply until it reaches the upper threshold ``k*V`` (nominally
``k = 2/3``) or the voltage forced on the control pin.

Pure vectorised functions in SI units; ``inf`` marks a threshold that is never reached.
"""

from __future__ import annotations

import numpy as np

from timespec.physics._types import ArrayLike, FloatArray, as_float_array, quiet
from timespec.physics.rcdelay import charge_time

__all__ = [
    "discharge_on_resistance",
    "max_drain_resistance",
    "recovery_time",
    "start_voltage",
    "width",
    "width_control",
]


@quiet
def discharge_on_resistance(v_sat: ArrayLike, i_sat: ArrayLike) -> FloatArray:
    """On-resistance of the discharge transistor from a datasheet saturation figure.

    Parameters
    ----------
    v_sat : ArrayLike
        Discharge-pin saturation voltage, V.
    i_sat : ArrayLike
        Sink current at which ``v_sat`` is specified, A.

    Returns
    -------
    FloatArray
        ``r_on = v_sat / i_sat``, ohm.

    Notes
    -----
    A linear (resistive) model of a saturated switch; it reproduces the specified point
    and scales the voltage with the current actually sunk.

    References
    ----------
    555-type timer datasheets (generic device class) specify the discharge saturation
    voltage at a stated current; the resistive model is common practice.
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        return as_float_array(as_float_array(v_sat) / as_float_array(i_sat))


@quiet
def start_voltage(
    v_supply: ArrayLike, r: ArrayLike, r_on: ArrayLike, i_drain: ArrayLike = 0.0
) -> FloatArray:
    """Capacitor voltage held by the discharge transistor before the trigger.

    Parameters
    ----------
    v_supply : ArrayLike
        Supply voltage, V.
    r : ArrayLike
        Timing resistor from the supply to the capacitor, ohm.
    r_on : ArrayLike
        On-resistance of the discharge transistor, ohm (0 = ideal switch).
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.

    Returns
    -------
    FloatArray
        Steady capacitor voltage in the idle state, V.

    Notes
    -----
    Divider of ``r`` and ``r_on`` with the drain as a Norton source at the node:
    ``v0 = V*r_on/(r + r_on) - i_drain*(r*r_on/(r + r_on))``.  With no drain this is the
    plain divider ``V*r_on/(r + r_on)``.

    References
    ----------
    Resistive divider and Norton source, any circuit-theory handbook; discharge
    saturation from 555-type timer datasheets (generic device class).
    """
    v = as_float_array(v_supply)
    r_a = as_float_array(r)
    ron = as_float_array(r_on)
    with np.errstate(divide="ignore", invalid="ignore"):
        total = r_a + ron
        v0 = v * ron / total - as_float_array(i_drain) * (r_a * ron / total)
    return as_float_array(v0)


@quiet
def width(
    r: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    r_on: ArrayLike = 0.0,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Output pulse width of a 555-type monostable.

    Parameters
    ----------
    r : ArrayLike
        Timing resistor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply (nominally 2/3).
    r_on : ArrayLike, optional
        Discharge-transistor on-resistance, ohm; sets the start voltage.  Default 0.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node (threshold-pin input current plus
        capacitor leakage), A.  Default 0.

    Returns
    -------
    FloatArray
        Pulse width, s (``inf`` if the threshold is never reached, including a start
        voltage already above the threshold, which only an absurd ``r_on`` can cause).

    Notes
    -----
    ``t = R*C*ln((v_eff - v0)/(v_eff - k*V))`` with ``v_eff = V - i_drain*R`` and ``v0`` from
    :func:`start_voltage`.  Nominal case (``v0 = 0``, ``k = 2/3``, no drain):
    ``t = R*C*ln 3 ~= 1.0986*R*C``.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook; the ``ln 3`` law and the
    2/3 threshold from 555-type timer datasheets (generic device class).
    """
    v = as_float_array(v_supply)
    v0 = start_voltage(v, r, r_on, i_drain)
    return charge_time(r, c, v, v0, as_float_array(threshold_ratio) * v, i_drain)


@quiet
def width_control(
    r: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    v_control: ArrayLike,
    r_on: ArrayLike = 0.0,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Pulse width with the control pin forced to ``v_control``.

    Parameters
    ----------
    r : ArrayLike
        Timing resistor, ohm.
    c : ArrayLike
        Timing capacitor, F.
    v_supply : ArrayLike
        Supply voltage, V.
    v_control : ArrayLike
        Voltage forced on the control pin (becomes the upper threshold), V.
    r_on : ArrayLike, optional
        Discharge-transistor on-resistance, ohm.  Default 0.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Default 0.

    Returns
    -------
    FloatArray
        Pulse width, s (``inf`` when ``v_control`` is at or above the effective target).

    Notes
    -----
    ``t = R*C*ln((v_eff - v0)/(v_eff - Vc))``; nominal ``R*C*ln(V/(V - Vc))``.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook; control-pin behaviour
    from 555-type timer datasheets (generic device class).
    """
    v = as_float_array(v_supply)
    v0 = start_voltage(v, r, r_on, i_drain)
    return charge_time(r, c, v, v0, v_control, i_drain)


@quiet
def recovery_time(
    c: ArrayLike,
    r_on: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    settle_fraction: ArrayLike = 0.01,
) -> FloatArray:
    """Time the discharge transistor needs to reset the capacitor after a pulse.

    Parameters
    ----------
    c : ArrayLike
        Timing capacitor, F.
    r_on : ArrayLike
        Discharge-transistor on-resistance, ohm.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply (capacitor voltage at the end of
        the pulse).
    settle_fraction : ArrayLike, optional
        The capacitor counts as reset once below ``settle_fraction * V``.  Default 0.01.

    Returns
    -------
    FloatArray
        Recovery time, s; 0 when ``settle_fraction >= threshold_ratio``.

    Notes
    -----
    Definition chosen here: the capacitor discharges through ``r_on`` toward ground from
    ``k*V`` until it falls below ``s*V``, so ``t = r_on*C*ln(k/s)``.  The current fed
    through the timing resistor meanwhile is neglected (``R >> r_on``); it only moves the
    final value to the small divider voltage of :func:`start_voltage`.  A retrigger
    earlier than this shortens the next pulse.

    References
    ----------
    First-order RC discharge law, any circuit-theory handbook; the settle criterion is
    this library's own definition.
    """
    v = as_float_array(v_supply)
    k = as_float_array(threshold_ratio)
    s = as_float_array(settle_fraction)
    t = charge_time(r_on, c, 0.0, k * v, s * v)
    return as_float_array(np.where(s >= k, 0.0, t))


@quiet
def max_drain_resistance(
    v_supply: ArrayLike, threshold_ratio: ArrayLike, i_drain: ArrayLike
) -> FloatArray:
    """Largest timing resistor that still lets the capacitor reach the threshold.

    Parameters
    ----------
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply.
    i_drain : ArrayLike
        Constant current leaving the capacitor node, A.

    Returns
    -------
    FloatArray
        ``R_max``, ohm; ``inf`` when ``i_drain <= 0`` (no limit).

    Notes
    -----
    The node settles at ``V - i_drain*R``; it crosses ``k*V`` only while
    ``R < V*(1 - k)/i_drain``.  Practical designs stay well below this bound because
    the width grows without limit as ``R`` approaches it.

    References
    ----------
    Follows from the first-order RC charging law (any circuit-theory handbook); the
    threshold-current limit on the timing resistor is stated in 555-type timer
    datasheets (generic device class).
    """
    i = as_float_array(i_drain)
    head = as_float_array(v_supply) * (1.0 - as_float_array(threshold_ratio))
    with np.errstate(divide="ignore", invalid="ignore"):
        r_max = head / np.where(i > 0.0, i, 1.0)
    return as_float_array(np.where(i > 0.0, r_max, np.inf))
