"""The 555-type timer's timing node: the stray its pins add, the delay of its output.

Shared by the ``oneshot`` and ``astable`` families:

* **stray** — the timer's pins on the node (threshold with trigger or
  discharge, :attr:`~timespec.parts.devices.TimerClass.c_node`) and the board
  (:data:`~timespec.parts.devices.BOARD_STRAY`) add a few pF to the timing
  capacitor; with a small capacitor that becomes part of the timing;
* **delay** — the output edge follows the threshold crossing by the
  comparator's and flip-flop's delay
  (:meth:`~timespec.parts.devices.TimerClass.delay_band`); a one-shot's pulse
  is longer by it (the charge starts on the same flip-flop edge that raises the
  output).
"""

from __future__ import annotations

from timespec.analysis import Factor
from timespec.families.logicinput import stray_warning
from timespec.families.protocol import Finding
from timespec.numbers import format_quantity
from timespec.parts.devices import BOARD_STRAY, TimerClass
from timespec.parts.part import Part

__all__ = ["delay_factor", "node_stray_band", "node_stray_factor", "node_stray_finding"]


def node_stray_band(timer: TimerClass) -> tuple[float, float]:
    """Stray capacitance at the timing node: the timer's pins plus the board, F.

    Parameters
    ----------
    timer
        The timer class.

    Returns
    -------
    tuple of float
        ``(low, high)``.
    """
    return timer.c_node[0] + BOARD_STRAY[0], timer.c_node[1] + BOARD_STRAY[1]


def node_stray_factor(timer: TimerClass, adds_to: str = "C") -> Factor:
    """The timing node's stray capacitance as a varying input.

    Parameters
    ----------
    timer
        The timer class.
    adds_to
        The timing capacitor's reference: the model adds the stray to that part's
        value and uses it nowhere else (``through`` of :class:`~timespec.analysis.Factor`).

    Returns
    -------
    Factor
        ``stray``, F, over :func:`node_stray_band` (it adds to C).
    """
    lo, hi = node_stray_band(timer)
    return Factor(
        "stray",
        f"timer pins and board stray ({format_quantity(lo, 'capacitance')}…"
        f"{format_quantity(hi, 'capacitance')})",
        0.5 * (lo + hi),
        lo,
        hi,
        group="stray",
        through=adds_to,
    )


def delay_factor(timer: TimerClass, supply_low: float) -> Factor:
    """The timer's threshold-to-output delay as a varying input.

    Parameters
    ----------
    timer
        The timer class.
    supply_low
        The design's lowest supply, V.

    Returns
    -------
    Factor
        ``timer.delay``, s, over :meth:`~timespec.parts.devices.TimerClass.delay_band`.
    """
    lo, hi = timer.delay_band(supply_low)
    return Factor(
        "timer.delay",
        f"{timer.name} timer output delay ({format_quantity(lo, 'time')}…"
        f"{format_quantity(hi, 'time')})",
        0.5 * (lo + hi),
        lo,
        hi,
        group="timer",
    )


def node_stray_finding(c: Part, timer: TimerClass) -> list[Finding]:
    """Warn when the timing capacitor is comparable with the node's stray.

    Parameters
    ----------
    c
        The timing capacitor.
    timer
        The timer class.

    Returns
    -------
    list of Finding
        One ``stray-comparable`` warning, or nothing
        (:func:`~timespec.families.logicinput.stray_warning`).
    """
    return stray_warning(c, node_stray_band(timer), "timer pins and board")
