"""Threshold bands of a Schmitt input and the factors that span them.

A gate class gives VT+ and VT− as bands (min … max, fractions of the supply)
and a minimum hysteresis ``h``; the bands alone would allow VT+ below VT−.  The
feasible threshold pairs form the band box less a corner, ``VT+ − VT− ≥ h``.
Input leakage ``i`` shifts both thresholds, relative to the rails, by
``e = i·R/V``, so every timing output depends only on the hysteresis
``w = VT+ − VT−`` and the centre ``c = (VT+ + VT−)/2 + e``::

    tH = R·C·ln((1 − c + w/2)/(1 − c − w/2)),  tL = R·C·ln((c + w/2)/(c − w/2))

Two factors span the feasible set exactly:

* ``gate.hysteresis`` is a position ``u ∈ [0, 1]`` mapped piecewise
  linearly onto ``w`` from ``max(h, VT+min − VT−max)`` to ``VT+max − VT−min``,
  with knots at ``VT+min − VT−min`` and ``VT+max − VT−max`` placed on grid
  nodes (see :func:`width_knots`; the duty cycle's extremes sit there);
* ``gate.centre`` is a position ``γ ∈ [−1, 1]`` of the threshold centre within
  the range the bands allow at that ``w``, ``[a(w), b(w)]`` with
  ``a(w) = max(VT−min, VT+min − w) + w/2`` and ``b(w) = min(VT−max, VT+max − w) + w/2``.
  ``γ = 0`` is the point of that range nearest ``1/2 − e`` (the centre that
  puts the thresholds symmetric between the rails once the leakage shift is
  added, where the period is shortest); ``γ = ±1`` are its ends, linear
  between.

Why this parametrisation: ``T`` is convex in ``c`` with its minimum at
``c = 1/2``; ``tH`` rises and ``tL`` falls with ``c``; all three rise with
``w`` along any path with ``|dc/dw| ≤ 1/2``, and ``c`` moves with ``w`` at
slope ±1/2 or less at fixed ``γ``.  So the extremes of period, frequency, high
and low time over the feasible set sit at ``w`` at an end and ``γ ∈ {−1, 0, 1}``,
and those of the duty cycle at the band corners (``γ = ±1`` at a knot): all nodes
of the worst-case grid (``gate.centre``, ``gate.hysteresis`` and the signed ``leak`` are searched on
the odd grid).  This holds while the circuit oscillates at every corner; where
leakage through R pushes a threshold past a rail the design already fails
(``no-oscillation``) and the duty cycle's low end is only a grid estimate.  A plain
clip of VT− to ``VT+ − h`` would hide the shortest period at a kink between
grid nodes.  Monte Carlo draws ``w`` and ``γ`` uniformly: the datasheet gives
bands, not distributions, so that spread is an assumption.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from timespec.families.protocol import FloatArray
from timespec.model import Block, Window

__all__ = [
    "KNOT_STEP",
    "Thresholds",
    "centre_position",
    "centre_range",
    "threshold_centre",
    "thresholds",
    "width_knots",
]


@dataclass(frozen=True)
class Thresholds:
    """Threshold bands of a Schmitt input, as fractions of the supply.

    Attributes
    ----------
    rise_low, rise_typ, rise_high
        VT+ band and typical value.
    fall_low, fall_typ, fall_high
        VT− band and typical value.
    hysteresis_min
        Smallest VT+ − VT−.
    """

    rise_low: float
    rise_typ: float
    rise_high: float
    fall_low: float
    fall_typ: float
    fall_high: float
    hysteresis_min: float

    @property
    def width_low(self) -> float:
        """Smallest feasible hysteresis."""
        return max(self.hysteresis_min, self.rise_low - self.fall_high)

    @property
    def width_high(self) -> float:
        """Largest feasible hysteresis (at least :attr:`width_low`)."""
        return max(self.rise_high - self.fall_low, self.width_low)

    @property
    def consistent(self) -> bool:
        """Whether some pair in the bands has at least the minimum hysteresis."""
        return self.rise_high - self.fall_low >= self.hysteresis_min


def _band(
    gate_band: tuple[float, float, float], override: Window | None, supply: Window
) -> tuple[float, float, float]:
    """(low, typ, high) as fractions of the supply, from the class or an override."""
    if override is None:
        return gate_band
    if override.kind == "ratio":
        lo, hi = override.low, override.high
        typ = override.centre
    else:  # volts: the widest share over the supply window (conservative)
        lo, hi = override.low / supply.high, override.high / supply.low
        typ = override.centre / supply.centre
    return lo, min(max(typ, lo), hi), hi


def thresholds(block: Block) -> Thresholds:
    """The threshold bands of a relaxation block (gate class, then overrides).

    Parameters
    ----------
    block
        A relaxation block (``block.gate`` set).

    Returns
    -------
    Thresholds
        Bands as fractions of the supply.

    Notes
    -----
    An override written in volts becomes the widest share it can be over the
    supply window, ``[low/Vmax, high/Vmin]``: thresholds fixed in volts do not
    track the supply, and this encloses every case.
    """
    gate = block.gate
    assert gate is not None, "the spec layer sets a gate class for relaxation blocks"
    s = block.conditions.supply
    r = _band(gate.rising, block.window("rising"), s)
    f = _band(gate.falling, block.window("falling"), s)
    return Thresholds(r[0], r[1], r[2], f[0], f[1], f[2], gate.hysteresis_min)


def centre_range(th: Thresholds, w: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Range ``[a(w), b(w)]`` of the threshold centre at hysteresis ``w``.

    Parameters
    ----------
    th
        Threshold bands.
    w
        Hysteresis ``VT+ − VT−`` (fractions of the supply).

    Returns
    -------
    tuple of FloatArray
        ``(a, b)`` with ``b ≥ a``.
    """
    a = np.maximum(th.fall_low, th.rise_low - w) + 0.5 * w
    b = np.minimum(th.fall_high, th.rise_high - w) + 0.5 * w
    return a, np.maximum(a, b)


def threshold_centre(th: Thresholds, w: FloatArray, gamma: FloatArray, e: FloatArray) -> FloatArray:
    """Threshold centre (without the leakage shift) at position ``gamma``.

    Parameters
    ----------
    th
        Threshold bands.
    w
        Hysteresis.
    gamma
        Position in ``[−1, 1]`` (0: nearest ``1/2 − e``; ±1: the ends of the range).
    e
        Leakage shift ``i·R/V``.

    Returns
    -------
    FloatArray
        The centre ``(VT+ + VT−)/2``.
    """
    a, b = centre_range(th, w)
    c0 = np.clip(0.5 - e, a, b)
    return np.where(gamma < 0.0, c0 + gamma * (c0 - a), c0 + gamma * (b - c0))


def centre_position(th: Thresholds, w: float, c: float) -> float:
    """Position of centre ``c`` at hysteresis ``w`` with no leakage.

    Parameters
    ----------
    th
        Threshold bands.
    w
        Hysteresis.
    c
        Threshold centre, clipped to its range.

    Returns
    -------
    float
        ``gamma`` in ``[−1, 1]``, the inverse of :func:`threshold_centre` at ``e = 0``.
    """
    a_arr, b_arr = centre_range(th, np.array([w]))
    a, b = float(a_arr[0]), float(b_arr[0])
    c = min(max(c, a), b)
    c0 = min(max(0.5, a), b)
    if c < c0:
        return (c - c0) / (c0 - a)
    if c > c0:
        return (c - c0) / (b - c0)
    return 0.0


#: Knots of the hysteresis position sit on multiples of this step, which are
#: nodes of the worst-case grid (9 evenly spaced values, ends included).
KNOT_STEP = 1.0 / 8.0


def width_knots(th: Thresholds) -> tuple[FloatArray, FloatArray]:
    """Knots of the map from the hysteresis position ``u ∈ [0, 1]`` to ``w``.

    Parameters
    ----------
    th
        Threshold bands.

    Returns
    -------
    tuple of FloatArray
        ``(u, w)`` knots, both increasing; ``w`` is linear in ``u`` between them.

    Notes
    -----
    The inner knots are the widths where the threshold-centre range changes
    slope, ``VT+min − VT−min`` and ``VT+max − VT−max`` (there the duty cycle
    reaches its extremes, at the band corners), each placed at the multiple of
    1/8 nearest its proportional position so that the worst-case grid visits
    it exactly.
    """
    lo, hi = th.width_low, th.width_high
    if hi <= lo:
        return np.array([0.0, 1.0]), np.array([lo, lo])
    us, ws = [0.0], [lo]
    inner = sorted({th.rise_low - th.fall_low, th.rise_high - th.fall_high})
    for w in inner:
        if not (lo < w < hi):
            continue
        u = round((w - lo) / (hi - lo) / KNOT_STEP) * KNOT_STEP
        u = min(max(u, us[-1] + KNOT_STEP), 1.0 - KNOT_STEP)
        if u <= us[-1] or w <= ws[-1]:
            continue
        us.append(u)
        ws.append(w)
    us.append(1.0)
    ws.append(hi)
    return np.array(us), np.array(ws)
