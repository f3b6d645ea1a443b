"""Findings for model assumptions that a design stretches.

A family computes the operating span its chosen parts create for each
range-bound constant (a :class:`~timespec.parts.validity.Held`) and, where the
span leaves the range and the model does not already widen its band to cover
it, reports it here: which assumption, where it holds, where the design runs
it, by how much, and what to do.
"""

from __future__ import annotations

from dataclasses import dataclass

from timespec.families.protocol import Finding
from timespec.numbers import format_interval
from timespec.parts.validity import Held, stretch

__all__ = ["Stretch", "assumption_findings", "stretch_message"]

#: Stretches up to this ratio are reported as notes, beyond it as warnings.
NOTE_LIMIT = 1.5


@dataclass(frozen=True)
class Stretch:
    """One range-bound constant and the span a design runs it over.

    Attributes
    ----------
    held
        Where the constant holds.
    low, high
        The operating span the design creates, SI units.
    fix
        What to do about it, one sentence.
    severity
        ``None`` to grade by the size of the stretch (note up to
        :data:`NOTE_LIMIT`, else warning); ``"error"`` when the model cannot
        vouch for the verdict at all.
    """

    held: Held
    low: float
    high: float
    fix: str
    severity: str | None = None


def stretch_message(s: Stretch) -> str:
    """The words of a stretched-assumption finding.

    Parameters
    ----------
    s
        The stretch.

    Returns
    -------
    str
        ``"<what> holds for <quantity> <low>…<high> (<source>); this design runs it
        at <span> (<n>× outside). <fix>"``.
    """
    h = s.held
    factor = stretch(h, s.low, s.high)
    span = _span(s.low, s.high, h.kind)
    return (
        f"{h.what} holds for {h.quantity} {_span(h.low, h.high, h.kind)} ({h.source}); "
        f"this design runs it at {span} ({factor:.3g}× outside). {s.fix}"
    )


def assumption_findings(stretches: list[Stretch], code: str) -> list[Finding]:
    """Findings for every stretch that leaves its range.

    Parameters
    ----------
    stretches
        Constants and the spans the design runs them over.
    code
        The finding code (stable, e.g. ``"diode-current-range"``).

    Returns
    -------
    list of Finding
        One per stretch outside its range, in order; empty when all hold.
    """
    out: list[Finding] = []
    for s in stretches:
        factor = stretch(s.held, s.low, s.high)
        if factor <= 1.0:
            continue
        severity = s.severity or ("note" if factor <= NOTE_LIMIT else "warning")
        out.append(Finding(severity, code, stretch_message(s)))
    return out


def _span(low: float, high: float, kind: str) -> str:
    if low == high:
        return format_interval(low, low, kind, digits=3).split(" … ")[0]
    return format_interval(low, high, kind, digits=3, sep="…")
