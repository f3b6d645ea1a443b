"""A 555-type astable whose output follows each threshold crossing by a delay.

The comparators and the flip-flop take a while (``t_pd``) to switch the output and
the discharge transistor after the capacitor crosses a threshold; meanwhile the
capacitor keeps moving the way it was going, so it overshoots the upper threshold
and undershoots the lower one.  In the steady cycle each half-period is therefore
``t_pd`` plus the time to move from the previous phase's overshoot to the next
threshold::

    v_top = v_charge(t_pd) from kV          v_bot = v_discharge(t_pd) from kV/2
    tH = t_pd + t_charge(v_bot → kV)        tL = t_pd + t_discharge(v_top → kV/2)

Each turning voltage depends only on the threshold and the phase that passes it,
so the cycle closes in one step (no iteration over cycles).  With ``t_pd = 0``
these are the functions of :mod:`timespec.physics.astable`.  For a delay that is a
small share of a time constant each half grows by about
``t_pd·(1 + slope before the turn / slope after it)``.

Pure vectorised functions in SI units; ``inf`` marks a threshold never reached.
"""

from __future__ import annotations

import numpy as np

from timespec.physics._types import ArrayLike, FloatArray, as_float_array, quiet
from timespec.physics.astable import (
    _drop_charge,
    _levels,
    _node_drop,
    diode_equation_charge,
    discharge_node,
)
from timespec.physics.rcdelay import charge_time, threshold_from_time

__all__ = [
    "classic_delayed_times",
    "diode_delayed_times",
    "diode_equation_delayed_times",
    "feedback_delayed_times",
]


def _discharge_path(
    ra: ArrayLike,
    rb: ArrayLike,
    c: ArrayLike,
    v: FloatArray,
    r_on: ArrayLike,
    lo: FloatArray,
    i: ArrayLike,
    td: FloatArray,
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """The discharge phase through ``RB`` into the discharge pin: ``(v_n, R, v_bot)``.

    ``v_n`` and ``R = RB + r_n`` are the Thevenin source seen by the capacitor
    (:func:`~timespec.physics.astable.discharge_node`), ``v_bot`` the undershoot
    ``t_pd`` past ``kV/2``.
    """
    v_n, r_n = discharge_node(v, ra, r_on)
    r_dis = as_float_array(as_float_array(rb) + r_n)
    return v_n, r_dis, threshold_from_time(td, r_dis, c, v_n, lo, i)


@quiet
def classic_delayed_times(
    ra: ArrayLike,
    rb: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    r_on: ArrayLike,
    i_drain: ArrayLike,
    t_pd: ArrayLike,
) -> tuple[FloatArray, FloatArray]:
    """High and low time of the classic astable with the timer's output delay.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    rb : ArrayLike
        Resistor from the discharge pin to the capacitor, ohm.
    c : ArrayLike
        Timing capacitor (stray included), F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    r_on : ArrayLike
        Discharge-transistor on-resistance, ohm.
    i_drain : ArrayLike
        Constant current leaving the capacitor node, A.
    t_pd : ArrayLike
        Delay from a threshold crossing to the output and discharge switching, s.

    Returns
    -------
    tuple of FloatArray
        ``(tH, tL)``, s.

    Notes
    -----
    Charge through ``RA + RB`` toward ``V``; discharge through ``RB + r_n`` toward
    the discharge node's ``v_n`` (:func:`~timespec.physics.astable.discharge_node`);
    the turning voltages follow each law for ``t_pd`` past its threshold.

    References
    ----------
    First-order RC charge and discharge laws and Thevenin's theorem, any
    circuit-theory handbook, applied piecewise to the delayed switching (our own
    composition, checked against scipy ``solve_ivp`` with a delayed comparator).
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    v = as_float_array(v_supply)
    r_ch = as_float_array(ra) + as_float_array(rb)
    td = as_float_array(t_pd)
    v_n, r_dis, v_bot = _discharge_path(ra, rb, c, v, r_on, lo, i_drain, td)
    v_top = threshold_from_time(td, r_ch, c, v, hi, i_drain)
    t_h = td + charge_time(r_ch, c, v, v_bot, hi, i_drain)
    t_l = td + charge_time(r_dis, c, v_n, v_top, lo, i_drain)
    return as_float_array(t_h), as_float_array(t_l)


@quiet
def feedback_delayed_times(
    r_high: ArrayLike,
    r_low: ArrayLike,
    c: ArrayLike,
    v_high: ArrayLike,
    v_low: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    i_drain: ArrayLike,
    t_pd: ArrayLike,
) -> tuple[FloatArray, FloatArray]:
    """High and low time of the output-feedback astable with the timer's output delay.

    Parameters
    ----------
    r_high : ArrayLike
        Charging resistance (timing resistor plus the output's high side), ohm.
    r_low : ArrayLike
        Discharging resistance (timing resistor plus the output's low side), ohm.
    c : ArrayLike
        Timing capacitor (stray included), F.
    v_high : ArrayLike
        Output high level behind ``r_high``, V.
    v_low : ArrayLike
        Output low level behind ``r_low``, V.
    v_supply : ArrayLike
        Supply voltage (sets the thresholds), V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    i_drain : ArrayLike
        Constant current leaving the capacitor node, A.
    t_pd : ArrayLike
        Delay from a threshold crossing to the output edge, s.

    Returns
    -------
    tuple of FloatArray
        ``(tH, tL)``, s.

    References
    ----------
    First-order RC charge and discharge laws, any circuit-theory handbook, applied
    piecewise to the delayed switching (checked against scipy ``solve_ivp``).
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    td = as_float_array(t_pd)
    v_top = threshold_from_time(td, r_high, c, v_high, hi, i_drain)
    v_bot = threshold_from_time(td, r_low, c, v_low, lo, i_drain)
    t_h = td + charge_time(r_high, c, v_high, v_bot, hi, i_drain)
    t_l = td + charge_time(r_low, c, v_low, v_top, lo, i_drain)
    return as_float_array(t_h), as_float_array(t_l)


@quiet
def diode_delayed_times(
    ra: ArrayLike,
    rb: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    v_diode: ArrayLike,
    r_on: ArrayLike,
    i_drain: ArrayLike,
    t_pd: ArrayLike,
) -> tuple[FloatArray, FloatArray]:
    """High and low time of the steering-diode astable (constant drop) with the delay.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    rb : ArrayLike
        Discharge resistor in parallel with the diode, ohm.
    c : ArrayLike
        Timing capacitor (stray included), F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    v_diode : ArrayLike
        Forward drop of the steering diode, V.
    r_on : ArrayLike
        Discharge-transistor on-resistance, ohm.
    i_drain : ArrayLike
        Constant current leaving the capacitor node, A.
    t_pd : ArrayLike
        Delay from a threshold crossing to the output and discharge switching, s.

    Returns
    -------
    tuple of FloatArray
        ``(tH, tL)``, s.

    Notes
    -----
    The charge follows the two pieces of
    :func:`~timespec.physics.astable.diode_high_time` (through ``RA`` toward
    ``V − vd`` below ``v_x``, through ``RA + RB`` toward ``V`` above it), also
    while it overshoots; the discharge is the classic one.

    References
    ----------
    First-order RC laws and a constant-drop diode model, any circuit-theory
    handbook, applied piecewise to the delayed switching.
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    v = as_float_array(v_supply)
    vd = as_float_array(v_diode)
    r_a = as_float_array(ra)
    r_b = as_float_array(rb)
    i = as_float_array(i_drain)
    td = as_float_array(t_pd)
    c_a = as_float_array(c)
    v_n, r_dis, v_bot = _discharge_path(r_a, r_b, c_a, v, r_on, lo, i, td)
    t_h = td + _drop_charge(r_a, r_b, c_a, v, vd, np.minimum(v_bot, hi), hi, i)
    # overshoot past kV: through RA while below v_x, then through RA + RB
    with np.errstate(divide="ignore", invalid="ignore"):
        v_x = v - vd - vd * (r_a / r_b)
    below = hi < v_x
    t_to_x = np.where(below, charge_time(r_a, c_a, v - vd, hi, np.maximum(v_x, hi), i), 0.0)
    first = threshold_from_time(td, r_a, c_a, v - vd, hi, i)
    rest = threshold_from_time(
        np.maximum(td - t_to_x, 0.0), r_a + r_b, c_a, v, np.where(below, v_x, hi), i
    )
    v_top = np.where(below & (td <= t_to_x), first, rest)
    t_l = td + charge_time(r_dis, c_a, v_n, v_top, lo, i)
    return as_float_array(t_h), as_float_array(t_l)


@quiet
def diode_equation_delayed_times(
    ra: ArrayLike,
    rb: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    is_t: ArrayLike,
    n_vt: ArrayLike,
    r_on: ArrayLike,
    i_drain: ArrayLike,
    t_pd: ArrayLike,
) -> tuple[FloatArray, FloatArray]:
    """High and low time of the steering-diode astable (diode equation) with the delay.

    Parameters
    ----------
    ra : ArrayLike
        Resistor from the supply to the discharge pin, ohm.
    rb : ArrayLike
        Discharge resistor in parallel with the diode, ohm.
    c : ArrayLike
        Timing capacitor (stray included), F.
    v_supply : ArrayLike
        Supply voltage, V.
    threshold_ratio : ArrayLike
        Upper threshold as a fraction of the supply, ``k``.
    is_t : ArrayLike
        Diode saturation current at the junction temperature, A.
    n_vt : ArrayLike
        Emission coefficient times the thermal voltage, V.
    r_on : ArrayLike
        Discharge-transistor on-resistance, ohm.
    i_drain : ArrayLike
        Constant current leaving the capacitor node, A.
    t_pd : ArrayLike
        Delay from a threshold crossing to the output and discharge switching, s.

    Returns
    -------
    tuple of FloatArray
        ``(tH, tL)``, s.

    Notes
    -----
    The charge time from the undershoot is
    :func:`~timespec.physics.astable.diode_equation_charge`.  The overshoot past
    ``kV`` solves ``T(kV → v_top) = t_pd`` by Newton's method on the exact charge
    time ``T``, started from the straight line at the threshold's slope: ``T`` is
    convex in ``v`` (the charge current falls as ``v`` rises), so the iteration
    falls monotonically onto the root.

    References
    ----------
    Diode equation (Shockley), first-order capacitor charge and Kirchhoff's laws,
    any circuit-theory handbook, applied piecewise to the delayed switching.
    """
    lo, hi = _levels(v_supply, threshold_ratio)
    v = as_float_array(v_supply)
    r_a = as_float_array(ra)
    r_b = as_float_array(rb)
    i = as_float_array(i_drain)
    td = as_float_array(t_pd)
    c_a = as_float_array(c)
    i_s = as_float_array(is_t)
    nvt = as_float_array(n_vt)
    g_b = 1.0 / r_b
    v_n, r_dis, v_bot = _discharge_path(r_a, r_b, c_a, v, r_on, lo, i, td)
    t_h = td + diode_equation_charge(r_a, c_a, v, np.minimum(v_bot, hi), hi, i_s, nvt, i, r_b)

    def current(vc: FloatArray) -> FloatArray:
        vd = _node_drop(as_float_array(v - vc), r_a, g_b, i_s, nvt)
        return as_float_array((v - vc - vd) / r_a - i)

    v_top = hi + td * np.maximum(current(hi), 0.0) / c_a
    for _ in range(3):
        spent = diode_equation_charge(r_a, c_a, v, hi, v_top, i_s, nvt, i, r_b)
        bad = ~np.isfinite(spent)  # past the voltage the charge stalls at: back off
        step = np.where(bad, 0.0, td - np.where(bad, 0.0, spent)) * current(v_top) / c_a
        v_top = np.where(bad, hi + 0.5 * (v_top - hi), v_top + np.minimum(step, 0.0))
    t_l = td + charge_time(r_dis, c_a, v_n, v_top, lo, i)
    return as_float_array(t_h), as_float_array(t_l)
