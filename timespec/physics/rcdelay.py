"""RC charging into a threshold: the building block of every timer in timespec.

A capacitor ``c`` charges (or discharges) through a resistor ``r`` from ``v_start``
toward a target voltage ``v_target`` while a constant current ``i_drain`` leaves the
capacitor node (capacitor leakage, board leakage, the input current of whatever watches
the node).  The time to reach a threshold has a closed form because the drain is only a
Thevenin shift of the target.

All functions are pure and vectorised: arguments broadcast together, SI units
(ohm, farad, volt, ampere, second), results are float64 ``numpy.ndarray``.
A threshold that is never reached gives ``numpy.inf``.
"""

from __future__ import annotations

import numpy as np

from timespec.physics._types import ArrayLike, FloatArray, as_float_array, quiet

__all__ = ["charge_time", "delay", "effective_target", "threshold_from_time"]


@quiet
def effective_target(v_target: ArrayLike, r: ArrayLike, i_drain: ArrayLike = 0.0) -> FloatArray:
    """Voltage the capacitor node settles at when a drain current is drawn from it.

    Parameters
    ----------
    v_target : ArrayLike
        Open-circuit voltage the resistor pulls toward, V.
    r : ArrayLike
        Charging resistance, ohm.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A (positive pulls toward ground).

    Returns
    -------
    FloatArray
        Effective target voltage, V.

    Notes
    -----
    Source transformation of the resistor and the drain current:
    ``v_eff = v_target - i_drain * r``.

    References
    ----------
    Thevenin/Norton source transformation, any circuit-theory handbook.
    """
    v = as_float_array(v_target)
    i = as_float_array(i_drain)
    with np.errstate(invalid="ignore", over="ignore"):
        # No drain means no shift, even through an infinite resistance.
        return as_float_array(np.where(i == 0.0, v, v - i * as_float_array(r)))


@quiet
def charge_time(
    r: ArrayLike,
    c: ArrayLike,
    v_target: ArrayLike,
    v_start: ArrayLike,
    v_threshold: ArrayLike,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Time for an RC node to move from ``v_start`` to ``v_threshold``.

    Parameters
    ----------
    r : ArrayLike
        Resistance between the source and the capacitor, ohm.
    c : ArrayLike
        Capacitance, F.
    v_target : ArrayLike
        Voltage the resistor pulls toward, V (below ``v_start`` for a discharge).
    v_start : ArrayLike
        Capacitor voltage at t = 0, V.
    v_threshold : ArrayLike
        Voltage whose crossing ends the interval, V.
    i_drain : ArrayLike, optional
        Constant current leaving the capacitor node, A.  Positive values pull the node
        toward ground (leakage, comparator input current).  Default 0.

    Returns
    -------
    FloatArray
        Crossing time, s.  ``0`` when ``v_threshold == v_start``; ``inf`` when the
        threshold does not lie strictly between ``v_start`` and the effective target
        (the node moves away from it or settles short of it); ``nan`` for ``nan`` input.

    Notes
    -----
    The node obeys ``C dv/dt = (v_target - v)/R - i_drain``, i.e. an exponential
    toward ``v_eff = v_target - i_drain*R`` with time constant ``R*C``, so

    ``t = R*C*ln((v_eff - v_start) / (v_eff - v_threshold))``.

    It covers charging up (``v_eff > v_start``) and discharging down
    (``v_eff < v_start``) alike.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook; the drain current
    enters through a Thevenin source transformation.
    """
    r_a = as_float_array(r)
    c_a = as_float_array(c)
    v0 = as_float_array(v_start)
    vth = as_float_array(v_threshold)
    v_eff = effective_target(v_target, r_a, i_drain)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        num = v_eff - v0
        den = v_eff - vth
        rc = r_a * c_a
        ratio = num / den
        if not (np.isnan(ratio).any() or np.isnan(rc).any()):
            # No NaN anywhere (the usual case): the threshold lies strictly between the
            # start and the target exactly where num/den is a finite number above 1; an
            # infinite ratio (den = 0, or an infinite num) never arrives, as below.
            ok = (ratio > 1.0) & (ratio < np.inf)
            t = np.where(ok, rc * np.log(np.where(ok, ratio, 1.0)), np.inf)
            return as_float_array(np.where(vth == v0, 0.0, t))
        # Reached only if the threshold lies strictly between the start and the target:
        # num and den of the same sign and |den| < |num|, i.e. num/den > 1.
        reachable = (np.sign(num) * np.sign(den) > 0.0) & (np.abs(num) > np.abs(den))
        ratio = np.where(reachable, num / np.where(reachable, den, 1.0), 1.0)
        t = np.where(reachable, r_a * c_a * np.log(ratio), np.inf)
        t = np.where(vth == v0, 0.0, t)
        is_nan = np.isnan(num) | np.isnan(den) | np.isnan(r_a) | np.isnan(c_a)
    return as_float_array(np.where(is_nan, np.nan, t))


@quiet
def delay(
    r: ArrayLike,
    c: ArrayLike,
    v_supply: ArrayLike,
    threshold_ratio: ArrayLike,
    v_start: ArrayLike = 0.0,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Delay of an RC network charged from the supply into a ratiometric threshold.

    Parameters
    ----------
    r : ArrayLike
        Charging resistance, ohm.
    c : ArrayLike
        Capacitance, F.
    v_supply : ArrayLike
        Supply the resistor is tied to, V.
    threshold_ratio : ArrayLike
        Switching threshold of the watching input as a fraction of the supply.
    v_start : ArrayLike, optional
        Capacitor voltage when the delay starts, V.  Default 0 (fully discharged).
    i_drain : ArrayLike, optional
        Constant current leaving the node, A (positive toward ground).  Default 0.

    Returns
    -------
    FloatArray
        Delay, s (``inf`` if the threshold is never reached).

    Notes
    -----
    ``delay = charge_time(r, c, V, v_start, k*V, i_drain)``; with ``v_start = 0``
    and no drain, ``t = R*C*ln(1/(1 - k))``.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook.
    """
    v = as_float_array(v_supply)
    return charge_time(r, c, v, v_start, as_float_array(threshold_ratio) * v, i_drain)


@quiet
def threshold_from_time(
    t: ArrayLike,
    r: ArrayLike,
    c: ArrayLike,
    v_target: ArrayLike,
    v_start: ArrayLike,
    i_drain: ArrayLike = 0.0,
) -> FloatArray:
    """Capacitor voltage after a time ``t`` (the inverse of :func:`charge_time`).

    Parameters
    ----------
    t : ArrayLike
        Elapsed time, s (``inf`` gives the settled voltage).
    r : ArrayLike
        Charging resistance, ohm.
    c : ArrayLike
        Capacitance, F.
    v_target : ArrayLike
        Voltage the resistor pulls toward, V.
    v_start : ArrayLike
        Capacitor voltage at t = 0, V.
    i_drain : ArrayLike, optional
        Constant current leaving the node, A (positive toward ground).  Default 0.

    Returns
    -------
    FloatArray
        Capacitor voltage at ``t``, V.

    Notes
    -----
    ``v(t) = v_eff + (v_start - v_eff)*exp(-t/(R*C))`` with ``v_eff = v_target - i_drain*R``.

    References
    ----------
    First-order RC charging law, any circuit-theory handbook.
    """
    v_eff = effective_target(v_target, r, i_drain)
    tau = as_float_array(r) * as_float_array(c)
    with np.errstate(divide="ignore", invalid="ignore"):
        decay = np.exp(-as_float_array(t) / tau)
    return as_float_array(v_eff + (as_float_array(v_start) - v_eff) * decay)
