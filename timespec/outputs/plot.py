"""A margin chart: every requirement of a spec against its design, in one picture.

One row per requirement.  Values are drawn as deviation from the centre of the
required window, in percent of its half-width, so a one-shot in milliseconds
and a crystal in ppm share one axis: the requirement spans −100 … +100, the
worst-case window is the bar, the Monte Carlo 99.73 % interval the thin bar
inside it, and the nominal the dot.  A bar that crosses ±100 is a design that
can fail.

matplotlib is an optional dependency (``pip install timespec[plot]``); it is
imported only here, with the non-interactive Agg backend.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from timespec.design.result import Result
from timespec.errors import UsageError

__all__ = ["MarginRow", "margin_chart", "margin_rows"]


@dataclass(frozen=True)
class MarginRow:
    """One requirement, scaled to its own window.

    Attributes
    ----------
    label
        ``block quantity``.
    nominal, low, high
        Nominal and worst case, in percent of the half-window from its centre.
    spread
        The Monte Carlo 99.73 % interval on the same scale, or ``None``.
    meets
        Whether the worst case lies inside the requirement.
    """

    label: str
    nominal: float
    low: float
    high: float
    spread: tuple[float, float] | None
    meets: bool


def margin_rows(result: Result) -> list[MarginRow]:
    """The rows of the margin chart (two-sided requirements only).

    Parameters
    ----------
    result
        A solved spec.

    Returns
    -------
    list of MarginRow
        One per two-sided requirement of every block that has a design.
    """
    rows: list[MarginRow] = []
    for b in result.blocks:
        if b.best is None:
            continue
        for out in b.best.outputs:
            w = out.required
            if w is None or not (math.isfinite(w.low) and math.isfinite(w.high)) or w.high <= w.low:
                continue
            if w.low <= 0 < w.high and w.kind not in ("ratio",) and w.nominal is None:
                continue  # an upper bound only: no centre to measure from
            centre = 0.5 * (w.low + w.high)
            half = 0.5 * (w.high - w.low)

            def scale(v: float, c: float = centre, h: float = half) -> float:
                return 100.0 * (v - c) / h

            spread = None
            mc = b.monte_carlo.outputs.get(out.name) if b.monte_carlo else None
            if mc is not None:
                lo_p, hi_p = mc.percentiles.get(0.135), mc.percentiles.get(99.865)
                if lo_p is not None and hi_p is not None:
                    spread = (scale(lo_p), scale(hi_p))
            rows.append(
                MarginRow(
                    label=f"{b.block.name} {out.name}",
                    nominal=scale(out.nominal),
                    low=scale(out.low),
                    high=scale(out.high),
                    spread=spread,
                    meets=out.meets,
                )
            )
    return rows


def margin_chart(result: Result) -> Any:
    """Draw the margin chart of a solved spec.

    Parameters
    ----------
    result
        A solved spec (with statistics, for the Monte Carlo bars).

    Returns
    -------
    matplotlib.figure.Figure
        The figure; save it with ``fig.savefig(path)``.

    Raises
    ------
    UsageError
        When matplotlib is not installed or nothing has a two-sided requirement.
    """
    try:
        import matplotlib

        matplotlib.use("Agg")
        from matplotlib.figure import Figure
    except ImportError:  # pragma: no cover - depends on the installation
        raise UsageError("plots need matplotlib: pip install 'timespec[plot]'") from None
    rows = margin_rows(result)
    if not rows:
        raise UsageError("nothing to plot: no block has a two-sided requirement and a design")
    fig = Figure(figsize=(8.0, 0.55 * len(rows) + 2.0))
    ax = fig.add_subplot()
    ys = list(range(len(rows)))[::-1]
    ax.axvspan(-100, 100, color="#e8f4e8", zorder=0, label="required window")
    for y, row in zip(ys, rows, strict=True):
        finite_high = row.high if math.isfinite(row.high) else 400.0
        colour = "#2a7a2a" if row.meets else "#b22222"
        ax.plot(
            [row.low, finite_high],
            [y, y],
            color=colour,
            linewidth=7,
            alpha=0.55,
            solid_capstyle="butt",
            label="worst case" if y == ys[0] else None,
        )
        if row.spread is not None:
            ax.plot(
                list(row.spread),
                [y, y],
                color="black",
                linewidth=2,
                label="Monte Carlo 99.73 %" if y == ys[0] else None,
            )
        ax.plot(
            [row.nominal],
            [y],
            "o",
            color="black",
            markersize=4,
            label="nominal" if y == ys[0] else None,
        )
    ax.axvline(-100, color="#2a7a2a", linewidth=1)
    ax.axvline(100, color="#2a7a2a", linewidth=1)
    ax.set_yticks(ys, [r.label for r in rows])
    low = min(-130.0, min(r.low for r in rows) - 10)
    high = max(130.0, max(min(r.high, 400.0) for r in rows) + 10)
    ax.set_xlim(low, high)
    ax.set_xlabel("deviation from the centre of the required window (% of its half-width)")
    src = result.spec.path or "spec"
    ax.set_title(f"timespec margins — {src}", fontsize=10)
    fig.tight_layout(rect=(0.0, 0.07, 1.0, 1.0))
    fig.legend(loc="lower center", ncol=4, fontsize=8, frameon=False)
    return fig
