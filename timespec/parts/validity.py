"""Where a device-class or dielectric constant holds, and how far a design strays from it.

Every constant of a device class (a diode's forward-drop band, a timer's output
levels, a dielectric's ageing rate ...) is only true over some range of the
quantity that sets it: a current, a voltage, a frequency, a temperature, a value.
A :class:`Held` records that range beside the constant, with its source; a family
computes the operating point its chosen parts create and asks :func:`stretch`
how far outside the range it lies.  The family then either widens its model to
cover the point or reports the stretched assumption as a finding
(:func:`timespec.families.assumptions.assumption_findings`).

Sources are marked as elsewhere in :mod:`timespec.parts`: ``[DS]`` generic
device-class datasheets, ``[CP]`` common practice, ``[Mem]`` from memory.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = ["Held", "stretch"]


@dataclass(frozen=True, slots=True)
class Held:
    """The range over which a constant of the model holds.

    Attributes
    ----------
    what
        The constant, in words (``"steering-diode drop 0.55…0.75 V"``).
    quantity
        The operating quantity that bounds it (``"diode current"``).
    low, high
        The range of that quantity, SI units; ``-inf``/``inf`` for one side open.
    kind
        The kind of the quantity, as in :data:`timespec.units.KINDS` (``"current"``,
        ``"voltage"``, ``"frequency"``, ``"temperature"``, ``"capacitance"`` ...).
    source
        Where the range comes from (``"[CP] small-signal silicon diode"``).
    """

    what: str
    quantity: str
    low: float
    high: float
    kind: str
    source: str

    def __post_init__(self) -> None:
        if math.isnan(self.low) or math.isnan(self.high) or self.low > self.high:
            raise ValueError(f"range of {self.what!r} must be ordered, not {self.low}…{self.high}")

    def contains(self, low: float, high: float | None = None) -> bool:
        """Whether an operating point (or span) lies inside the range.

        Parameters
        ----------
        low
            The operating point, or the low end of the operating span.
        high
            The high end of the operating span; ``None`` for a single point.

        Returns
        -------
        bool
            True when the whole span lies in ``[self.low, self.high]``.
        """
        hi = low if high is None else high
        return self.low <= low and hi <= self.high


def stretch(held: Held, low: float, high: float | None = None) -> float:
    """How far an operating span leaves the range where a constant holds.

    Parameters
    ----------
    held
        The range.
    low
        The operating point, or the low end of the operating span.
    high
        The high end of the span; ``None`` for a single point.

    Returns
    -------
    float
        ``1.0`` inside the range; otherwise the ratio by which the span passes
        the nearer violated end (``held.low / low`` below it, ``high / held.high``
        above it, the larger of the two if both), always ``> 1``.  For ranges that
        include zero or negative values (temperatures) the ratio is replaced by
        ``1 + distance / width`` of the range, so it still grows with the excess.
    """
    hi = low if high is None else high
    worst = 1.0
    if low < held.low:
        worst = max(worst, _ratio(held.low, low, held))
    if hi > held.high:
        worst = max(worst, _ratio(hi, held.high, held))
    return worst


def _ratio(big: float, small: float, held: Held) -> float:
    if small > 0.0 and big > 0.0:
        return big / small
    width = held.high - held.low
    if not math.isfinite(width) or width <= 0.0:
        width = max(abs(held.low), abs(held.high), 1.0)
        if not math.isfinite(width):
            width = 1.0
    return 1.0 + abs(big - small) / width
