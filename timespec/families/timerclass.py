"""Where a 555-type timer class's constants hold, against a block's conditions.

The class figures of :class:`~timespec.parts.devices.TimerClass` are quoted over
an ambient or supply range (:attr:`~timespec.parts.devices.TimerClass.ith_held`,
:attr:`~timespec.parts.devices.TimerClass.drift_held`,
:attr:`~timespec.parts.devices.TimerClass.supply_drift_held`).  The one-shot and
the astable share these checks: the threshold current is widened beyond its range
by the model (:func:`timespec.families.inputs.threshold_current`) and said so in a
note; a stretched drift or supply sensitivity is reported with what to do.
"""

from __future__ import annotations

from timespec.families.assumptions import Stretch, assumption_findings
from timespec.families.inputs import threshold_current
from timespec.families.protocol import Finding
from timespec.model import Block
from timespec.numbers import format_quantity

__all__ = ["timer_class_findings"]


def timer_class_findings(block: Block) -> list[Finding]:
    """Findings for the timer class's figures that the block's conditions stretch.

    Parameters
    ----------
    block
        A one-shot or astable block (``block.timer`` set).

    Returns
    -------
    list of Finding
        ``timer-class-range`` findings: a note when the ambient leaves the range
        the threshold current is quoted over (the worst case already uses the
        widened bound), a note or warning when it leaves the drift's range or
        the supply leaves the supply sensitivity's range.
    """
    t = block.timer
    assert t is not None
    c = block.conditions
    widened = threshold_current(block)
    stretches = [
        Stretch(
            t.ith_held,
            c.ambient_low,
            c.ambient_high,
            "The worst case takes the bound widened to "
            f"{format_quantity(widened, 'current')} (about doubling every "
            f"{'10 K when hot' if t.ith_grows == 'hot' else '80 K when cold'}, from memory); "
            "check it against your part's datasheet.",
            severity="note",
        ),
        Stretch(
            t.drift_held,
            c.ambient_low,
            c.ambient_high,
            "Check the drift of a part graded for this range and state it "
            f"(e.g. 'timer {t.name}, drift ±{t.drift_ppm:g} ppm/K').",
        ),
        Stretch(
            t.supply_drift_held,
            c.supply.low,
            c.supply.high,
            "Check the datasheet's supply sensitivity at this supply, or hold the "
            "supply tighter; the worst case uses the class figure.",
        ),
    ]
    return assumption_findings(stretches, "timer-class-range")
