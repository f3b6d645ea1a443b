"""A margin chart: every requirement of a spec against its design, in one picture.

One row per requirement, each scaled to its own requirement so a one-shot in
milliseconds and a crystal in ppm share one axis:

* a **two-sided** requirement (``300 ms ±10%``, ``2.4 kHz to 3 kHz``) is drawn
  as deviation from the centre of its window in percent of the half-width: the
  requirement spans −100 … +100;
* a **one-sided** requirement has one finite edge only, so it is measured from
  that edge in percent of the edge's own size: ``5 ms min`` puts 5 ms at −100
  and 10 ms (twice the bound) at 0, inside to the right; ``2 ms max`` puts 2 ms
  at +100 and 0 ms at 0, inside to the left.  The row label says ``(min)`` or
  ``(max)``.

The worst-case window is the bar, the Monte Carlo 99.73 % interval the thin
bar inside it, the nominal the dot and the required window the green band
behind each row.  A bar that leaves the green is a design that can fail.

**Nothing is hidden.**  The axis grows to show every row up to ±:data:`CLIP`
(four times the window); a value beyond that is drawn at the edge with an
arrow head pointing out and its true value written above it, so a pinned
design ten times too slow still shows its bar.  The legend is built from fixed
entries, not from whichever row comes first.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from timespec.design.result import Result
from timespec.errors import UsageError
from timespec.model import Window
from timespec.outputs.figures import FAILS, MEETS, REQUIRED, new_figure, required_edges

__all__ = ["CLIP", "MarginRow", "legend_entries", "margin_chart", "margin_rows", "scale_of"]

#: Largest distance from the centre drawn to scale, in the chart's percent; beyond
#: it a value is drawn at the edge with an arrow and its number.
CLIP = 400.0


@dataclass(frozen=True)
class MarginRow:
    """One requirement, scaled to its own window.

    Attributes
    ----------
    label
        ``block quantity``, with ``(min)`` or ``(max)`` for a one-sided requirement.
    nominal, low, high
        Nominal and worst case on the chart's scale (see the module notes);
        ``±inf`` when the output never settles (a threshold never reached).
    spread
        The Monte Carlo 99.73 % interval on the same scale, or ``None``.
    meets
        Whether the worst case lies inside the requirement.
    side
        ``"both"``, ``"min"`` (lower bound only) or ``"max"`` (upper bound only).
    """

    label: str
    nominal: float
    low: float
    high: float
    spread: tuple[float, float] | None
    meets: bool
    side: str = "both"


def _side(w: Window) -> str | None:
    """Which ends of a window bound it: ``both``, ``min``, ``max`` or ``None`` (neither)."""
    low, high = required_edges(w)
    lo_open, hi_open = math.isinf(low), math.isinf(high)
    if lo_open and hi_open:
        return None
    if hi_open:
        return "min"
    if lo_open:
        return "max"
    return "both" if w.high > w.low else None


def scale_of(w: Window) -> tuple[str, float, float, float] | None:
    """The chart scale of a requirement: ``x = offset + 100·(v − ref)/unit``.

    Parameters
    ----------
    w
        The required window.

    Returns
    -------
    tuple or None
        ``(side, offset, ref, unit)``: two-sided ``("both", 0, centre, half-width)``;
        a lower bound ``b`` ``("min", −100, b, |b|)``; an upper bound ``b``
        ``("max", +100, b, |b|)``; ``None`` for a window with no finite edge or a
        one-sided bound at zero (no size to measure from).
    """
    side = _side(w)
    if side is None:
        return None
    if side == "both":
        return ("both", 0.0, 0.5 * (w.low + w.high), 0.5 * (w.high - w.low))
    bound = w.low if side == "min" else w.high
    if bound == 0.0 or not math.isfinite(bound):
        return None
    return (side, -100.0 if side == "min" else 100.0, bound, abs(bound))


def margin_rows(result: Result) -> list[MarginRow]:
    """The rows of the margin chart: every requirement of every block with a design.

    Parameters
    ----------
    result
        A solved spec.

    Returns
    -------
    list of MarginRow
        One per requirement (two-sided and one-sided), in block and output order.
    """
    rows: list[MarginRow] = []
    for b in result.blocks:
        if b.best is None:
            continue
        for out in b.best.outputs:
            if out.required is None:
                continue
            sc = scale_of(out.required)
            if sc is None:
                continue
            side, offset, ref, unit = sc

            def scale(v: float, o: float = offset, r: float = ref, u: float = unit) -> float:
                return o + 100.0 * (v - r) / u

            spread = None
            mc = b.monte_carlo.outputs.get(out.name) if b.monte_carlo else None
            if mc is not None:
                lo_p, hi_p = mc.percentiles.get(0.135), mc.percentiles.get(99.865)
                if lo_p is not None and hi_p is not None:
                    spread = (scale(lo_p), scale(hi_p))
            suffix = "" if side == "both" else f" ({side})"
            rows.append(
                MarginRow(
                    label=f"{b.block.name} {out.name}{suffix}",
                    nominal=scale(out.nominal),
                    low=scale(out.low),
                    high=scale(out.high),
                    spread=spread,
                    meets=out.meets,
                    side=side,
                )
            )
    return rows


def _clip(v: float) -> float:
    return min(max(v, -CLIP), CLIP)


def _number(v: float) -> str:
    if math.isinf(v):
        return "+∞" if v > 0 else "−∞"
    return f"{v:+.0f} %".replace("-", "−")


def legend_entries() -> list[tuple[Any, str]]:
    """The margin chart's legend: fixed handles and labels, whatever the rows.

    Returns
    -------
    list of (artist, str)
        Proxy artists and their labels, always the same six.
    """
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    return [
        (Patch(facecolor=REQUIRED, edgecolor=MEETS), "required window"),
        (Line2D([], [], color=MEETS, linewidth=7, alpha=0.55), "worst case, meets"),
        (Line2D([], [], color=FAILS, linewidth=7, alpha=0.55), "worst case, can fail"),
        (Line2D([], [], color="black", linewidth=2), "Monte Carlo 99.73 %"),
        (Line2D([], [], color="black", marker="o", linestyle="none", markersize=4), "nominal"),
        (
            Line2D([], [], color="black", marker=">", linestyle="none", markersize=6),
            "beyond the axis (value written)",
        ),
    ]


def _axis_limits(rows: list[MarginRow]) -> tuple[float, float]:
    values = [v for r in rows for v in (r.low, r.high, r.nominal, *(r.spread or ()))]
    finite = [_clip(v) for v in values if not math.isnan(v)]
    low = min(-130.0, min(finite, default=0.0) - 10.0)
    high = max(130.0, max(finite, default=0.0) + 10.0)
    if any(v < -CLIP for v in values):
        low = -CLIP - 30.0
    if any(v > CLIP for v in values):
        high = CLIP + 30.0
    return low, high


def _draw_row(ax: Any, y: float, row: MarginRow, xlim: tuple[float, float]) -> None:
    """One row: the required band, the worst-case bar, the spread, the nominal, clip marks."""
    left, right = xlim
    band_lo = -100.0 if row.side in ("both", "min") else left
    band_hi = 100.0 if row.side in ("both", "max") else right
    ax.barh(y, band_hi - band_lo, left=band_lo, height=0.8, color=REQUIRED, zorder=0)
    for edge, used in ((-100.0, row.side != "max"), (100.0, row.side != "min")):
        if used:
            ax.plot([edge, edge], [y - 0.4, y + 0.4], color=MEETS, linewidth=1, zorder=1)
    lo, hi = _clip(row.low), _clip(row.high)
    if lo == hi and abs(lo) == CLIP:  # the whole bar lies beyond one edge: a stub at it
        lo, hi = (CLIP - 15.0, CLIP) if lo > 0 else (-CLIP, -CLIP + 15.0)
    colour = MEETS if row.meets else FAILS
    ax.plot([lo, hi], [y, y], color=colour, linewidth=7, alpha=0.55, solid_capstyle="butt")
    if row.spread is not None:
        ax.plot([_clip(v) for v in row.spread], [y, y], color="black", linewidth=2)
    ax.plot([_clip(row.nominal)], [y], "o", color="black", markersize=4)
    beyond_hi = [v for v in (row.low, row.nominal, row.high) if v > CLIP]
    beyond_lo = [v for v in (row.low, row.nominal, row.high) if v < -CLIP]
    if beyond_hi:
        ax.plot([CLIP], [y], ">", color="black", markersize=6)
        text = "…".join(dict.fromkeys(_number(v) for v in (min(beyond_hi), max(beyond_hi))))
        ax.text(CLIP, y + 0.18, text, va="bottom", ha="right", fontsize=7)
    if beyond_lo:
        ax.plot([-CLIP], [y], "<", color="black", markersize=6)
        text = "…".join(dict.fromkeys(_number(v) for v in (min(beyond_lo), max(beyond_lo))))
        ax.text(-CLIP, y + 0.18, text, va="bottom", ha="left", fontsize=7)


def margin_chart(result: Result) -> Any:
    """Draw the margin chart of a solved spec.

    Parameters
    ----------
    result
        A solved spec (with statistics, for the Monte Carlo bars).

    Returns
    -------
    matplotlib.figure.Figure
        The figure; write it with :func:`timespec.outputs.figures.figure_bytes`.

    Raises
    ------
    UsageError
        When matplotlib is not installed or no block has a requirement and a design.
    """
    rows = margin_rows(result)
    if not rows:
        raise UsageError("nothing to plot: no block has a requirement and a design")
    fig = new_figure(8.0, 0.55 * len(rows) + 2.0)
    ax = fig.add_subplot()
    ys = list(range(len(rows)))[::-1]
    xlim = _axis_limits(rows)
    for y, row in zip(ys, rows, strict=True):
        _draw_row(ax, y, row, xlim)
    ax.set_yticks(ys, [r.label for r in rows])
    ax.set_ylim(-0.7, len(rows) - 0.3)
    ax.set_xlim(*xlim)
    ax.set_xlabel(
        "deviation from the centre of the required window (% of its half-width);\n"
        "(min)/(max) rows: from the bound, in % of the bound"
    )
    src = result.spec.path or "spec"
    ax.set_title(f"timespec margins — {src}", fontsize=10)
    fig.tight_layout(rect=(0.0, 0.09, 1.0, 1.0))
    handles, labels = zip(*legend_entries(), strict=True)
    fig.legend(list(handles), list(labels), loc="lower center", ncol=3, fontsize=8, frameon=False)
    return fig
