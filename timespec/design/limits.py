"""Fixture acceptance limits: the window a good unit's timing must fall in, in time and counts.

A test fixture measures a pulse (or a period) by capturing it with a timer
clocked at ``f_clk``: ``N = T·f_clk`` counts.  The measurement is uncertain by
the capture clock's frequency error, one count of quantisation, and whatever
else the fixture adds (trigger latency, jitter).  timespec bounds that as

    U(T) = ppm_clk·T + 1/f_clk + u_other

(a sum of bounds: conservative, and what a guaranteed limit needs) and turns
each required window into acceptance limits by the fixture's decision rule:

* ``guarded`` — guarded acceptance per ILAC-G8:2019: the acceptance limit is
  the tolerance limit moved inward by the guard band w = U, so a unit that
  passes is inside the requirement whatever the measurement error;
* ``simple`` — simple acceptance (w = 0): accept inside the requirement;
* ``expected`` — accept the design's own worst-case window widened by U: every
  unit built as designed passes, and a wrong or missing part fails (a
  production test for assembly faults).

Limits in counts are rounded inward for ``guarded``/``simple`` and outward for
``expected``.  The test uncertainty ratio (half the tolerance over U) is
reported; 4:1 is the usual aim (common practice).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from timespec.design.result import BlockResult, OutputResult, Result
from timespec.model import Fixture, Window

__all__ = [
    "Limit",
    "fixture_limits",
    "limits_to_dict",
    "measurement_uncertainty",
    "render_limits",
]

#: Test uncertainty ratio below which a note is added (common practice: 4:1).
GOOD_RATIO = 4.0


@dataclass(frozen=True)
class Limit:
    """Acceptance limits for one measured time of one block.

    Attributes
    ----------
    block
        Block name.
    quantity
        What is measured: ``"width"``, ``"delay"``, ``"period"``, ``"high"``, ``"low"``.
    required
        The required window, s (``None`` when the spec asks nothing of it).
    expected
        The design's worst-case window, s.
    uncertainty
        Measurement uncertainty bound at the acceptance limits, s (the larger of the two).
    accept
        Acceptance limits, s (``low > high`` when the fixture cannot decide).
    counts
        Acceptance limits in capture-clock counts (``None`` for an open side).
    clock
        Capture clock, Hz.
    decision
        The decision rule used.
    ratio
        Test uncertainty ratio: half the required window over the uncertainty
        (``None`` without a two-sided requirement).
    notes
        Plain-language remarks: an empty acceptance window, a low ratio, expected
        false rejects, a rule that fell back to ``expected``.
    """

    block: str
    quantity: str
    required: tuple[float, float] | None
    expected: tuple[float, float]
    uncertainty: float
    accept: tuple[float, float]
    counts: tuple[int | None, int | None]
    clock: float
    decision: str
    ratio: float | None
    notes: tuple[str, ...] = ()

    @property
    def decidable(self) -> bool:
        """Whether the acceptance window is not empty."""
        return self.accept[0] <= self.accept[1]


def measurement_uncertainty(t: float, fixture: Fixture) -> float:
    """Bound on the error of measuring a time ``t`` with the fixture.

    Parameters
    ----------
    t
        The time measured, s.
    fixture
        The fixture.

    Returns
    -------
    float
        ``ppm_clk·t + 1/f_clk + u_other``, s.

    Notes
    -----
    A capture of ``N = t·f_clk`` counts is off by at most one count from
    quantisation and by the clock's relative error times ``t``; the fixture's
    other errors are added as stated.  Summing the bounds (rather than RSS)
    gives a limit that holds with certainty, as a guarded limit needs.

    References
    ----------
    Timer capture quantisation, any measurement text; guard bands, ILAC-G8:2019
    and JCGM 106:2012.
    """
    if not math.isfinite(t):
        return math.inf
    return fixture.clock_ppm * abs(t) + 1.0 / fixture.clock + fixture.uncertainty


def _period_window(req: Window) -> tuple[float, float]:
    """A frequency window as the period window a fixture measures."""
    low = 1.0 / req.high if req.high > 0 and math.isfinite(req.high) else 0.0
    high = 1.0 / req.low if req.low > 0 else math.inf
    return (low, high)


def _required(result: BlockResult, out: OutputResult) -> tuple[float, float] | None:
    if out.required is not None:
        return (out.required.low, out.required.high)
    if out.name == "period":
        freq = result.block.requirement("frequency")
        if freq is not None:
            return _period_window(freq.window)
    return None


def _counts(low: float, high: float, clock: float, outward: bool) -> tuple[int | None, int | None]:
    lo_c: int | None
    hi_c: int | None
    if not math.isfinite(low):
        lo_c = None
    else:
        lo_c = math.floor(low * clock + 1e-9) if outward else math.ceil(low * clock - 1e-9)
        lo_c = max(lo_c, 0)
    if not math.isfinite(high):
        hi_c = None
    else:
        hi_c = math.ceil(high * clock - 1e-9) if outward else math.floor(high * clock + 1e-9)
    return (lo_c, hi_c)


def _limit(result: BlockResult, out: OutputResult, fixture: Fixture, decision: str) -> Limit:
    required = _required(result, out)
    notes: list[str] = []
    rule = decision
    if required is None and rule != "expected":
        rule = "expected"
        notes.append(
            f"nothing is required of the {out.name}, so its limits follow the design's worst "
            "case widened by the measurement uncertainty"
        )
    if rule == "expected" or required is None:
        u_lo = measurement_uncertainty(out.low, fixture)
        u_hi = measurement_uncertainty(out.high, fixture)
        accept = (max(out.low - u_lo, 0.0), out.high + u_hi)
    else:
        lo, hi = required
        u_lo = measurement_uncertainty(lo, fixture)
        u_hi = measurement_uncertainty(hi, fixture)
        if rule == "guarded":
            accept = (lo + u_lo if lo > 0 else 0.0, hi - u_hi if math.isfinite(hi) else math.inf)
        else:
            accept = (lo, hi)
    finite_u = [x for x in (u_lo, u_hi) if math.isfinite(x)]
    u = max(finite_u) if finite_u else 0.0
    counts = _counts(accept[0], accept[1], fixture.clock, outward=rule == "expected")
    ratio: float | None = None
    if required is not None and all(math.isfinite(x) for x in required) and required[0] > 0:
        ratio = (required[1] - required[0]) / 2.0 / u if u > 0 else math.inf
        if ratio < GOOD_RATIO:
            notes.append(
                f"the measurement uncertainty is large for this window: test uncertainty ratio "
                f"{ratio:.2g}:1, below the usual {GOOD_RATIO:g}:1"
            )
    if not accept[0] <= accept[1]:
        notes.append(
            "the fixture cannot decide: its uncertainty is wider than the required window; "
            "use a faster or more accurate capture clock"
        )
    elif rule == "guarded" and (out.low < accept[0] or out.high > accept[1]):
        notes.append(
            "units built as designed may be rejected: the worst case reaches past the guarded "
            "limits (the guard band costs yield; a more accurate fixture narrows it)"
        )
    return Limit(
        block=result.block.name,
        quantity=out.name,
        required=required,
        expected=(out.low, out.high),
        uncertainty=u,
        accept=accept,
        counts=counts,
        clock=fixture.clock,
        decision=rule,
        ratio=ratio,
        notes=tuple(notes),
    )


def fixture_limits(
    result: Result, fixture: Fixture | None = None, *, decision: str | None = None
) -> list[Limit]:
    """Acceptance limits for every measured time of every block.

    Parameters
    ----------
    result
        A solved spec (the best design of each block is the one built).
    fixture
        The fixture; ``None`` takes the spec's ``fixture:`` section.
    decision
        Override the decision rule (``"guarded"``, ``"simple"``, ``"expected"``).

    Returns
    -------
    list of Limit
        One per time-valued output (width, delay, period, high, low) of each
        block that has a design; crystal blocks have none.

    Raises
    ------
    ValueError
        When there is no fixture or the decision rule is unknown.
    """
    fx = fixture or result.spec.fixture
    if fx is None:
        raise ValueError("the spec has no fixture: section (add e.g. 'clock 16 MHz ±50 ppm')")
    rule = decision or fx.decision
    if rule not in ("guarded", "simple", "expected"):
        raise ValueError(f"unknown decision rule {rule!r}")
    out: list[Limit] = []
    for b in result.blocks:
        if b.best is None:
            continue
        for o in b.best.outputs:
            if o.kind == "time":
                out.append(_limit(b, o, fx, rule))
    return out


def render_limits(limits: list[Limit]) -> str:
    """The limits as a plain table for people (and fixture authors).

    Parameters
    ----------
    limits
        From :func:`fixture_limits`.

    Returns
    -------
    str
        One line per limit, then the notes.
    """
    from timespec.numbers import format_interval, format_quantity

    if not limits:
        return "no time to measure: the spec has no one-shot, astable, delay or relaxation block\n"
    clock = format_quantity(limits[0].clock, "frequency")
    head = ("block", "measures", "required", "worst case", "accept", f"counts @ {clock}", "TUR")
    rows = []
    for lim in limits:
        req = format_interval(*lim.required, "time") if lim.required else "—"
        counts = " … ".join("open" if c is None else str(c) for c in lim.counts)
        if not lim.decidable:
            acc, counts = "none (cannot decide)", "—"
        else:
            acc = format_interval(*lim.accept, "time", digits=7)
        tur = "—"
        if lim.ratio is not None and math.isfinite(lim.ratio):
            tur = f"{lim.ratio:.0f}:1" if lim.ratio >= 10 else f"{lim.ratio:.2g}:1"
        rows.append(
            (lim.block, lim.quantity, req, format_interval(*lim.expected, "time"), acc, counts, tur)
        )
    widths = [max(len(r[i]) for r in [head, *rows]) for i in range(len(head))]
    lines = [
        "  ".join(c.ljust(w) for c, w in zip(row, widths, strict=True)).rstrip()
        for row in [head, *rows]
    ]
    lines.insert(1, "  ".join("-" * w for w in widths))
    rules = sorted({lim.decision for lim in limits})
    lines.append("")
    lines.append(
        f"decision: {', '.join(rules)}; uncertainty per limit: clock error + 1 count "
        "+ the fixture's own"
    )
    for lim in limits:
        for note in lim.notes:
            lines.append(f"{lim.block} {lim.quantity}: {note}")
    return "\n".join(lines) + "\n"


def limits_to_dict(limits: list[Limit]) -> dict[str, object]:
    """The limits as a JSON-ready document for fixture firmware generators.

    Parameters
    ----------
    limits
        From :func:`fixture_limits`.

    Returns
    -------
    dict
        ``{"format": "timespec-limits", "format_version": 1, "format_minor": 1,
        "limits": [...]}``; times in seconds, counts as integers, open sides and
        infinities as ``null`` (the layout and its schema: the docs page *JSON
        documents*; ``format_minor`` was added in 1.1).
    """

    def num(x: float) -> float | None:
        return float(x) if math.isfinite(x) else None

    return {
        "format": "timespec-limits",
        "format_version": 1,
        "format_minor": 1,
        "limits": [
            {
                "block": lim.block,
                "measures": lim.quantity,
                "unit": "s",
                "decision": lim.decision,
                "required": (
                    {"low": num(lim.required[0]), "high": num(lim.required[1])}
                    if lim.required
                    else None
                ),
                "worst_case": {"low": num(lim.expected[0]), "high": num(lim.expected[1])},
                "uncertainty": num(lim.uncertainty),
                "accept": (
                    {"low": num(lim.accept[0]), "high": num(lim.accept[1])}
                    if lim.decidable
                    else None
                ),
                "clock_hz": lim.clock,
                "counts": {"low": lim.counts[0], "high": lim.counts[1]} if lim.decidable else None,
                "uncertainty_ratio": num(lim.ratio) if lim.ratio is not None else None,
                "notes": list(lim.notes),
            }
            for lim in limits
        ],
    }
