"""Each output over the ambient range: the nominal parts and the worst-case corner parts.

For every required output of a block the family's model is evaluated while the
ambient temperature sweeps the block's range (:data:`POINTS` evenly spaced
points, both ends included) and every other input is held at one of three
settings:

* **nominal** — every factor at its nominal value;
* **low corner** — the factors where the worst-case search found the output's
  minimum (``OutputResult.low_at``);
* **high corner** — the factors of its maximum
  (``OutputResult.high_at``).

The corner curves pass through the worst-case extremes at the temperature the
search chose for them, and show how much of the worst case the ambient alone
spends.  The chart shades the required window (green) and marks the worst-case
window (purple lines).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np
import numpy.typing as npt

from timespec.analysis.factors import call_evaluate
from timespec.design.result import BlockResult, OutputResult, Result
from timespec.errors import UsageError
from timespec.families import family
from timespec.numbers import format_quantity
from timespec.outputs.figures import FAILS, MEETS, REQUIRED, WORST, panel_chart, required_edges
from timespec.outputs.waveform import nominal_inputs

__all__ = ["POINTS", "AmbientSweep", "ambient_chart", "ambient_sweep", "ambient_sweeps"]

FloatArray = npt.NDArray[np.float64]

#: Ambient points of a sweep.
POINTS = 61


@dataclass(frozen=True)
class AmbientSweep:
    """One output over the ambient range.

    Attributes
    ----------
    block, output, kind
        Block name, output name and kind of quantity.
    temps
        Ambient temperatures, °C.
    nominal, low, high
        The output with the nominal, low-corner and high-corner parts.
    required
        Required ``(low, high)`` (``±inf`` for an open side, see
        :func:`~timespec.outputs.figures.required_edges`).
    worst
        Worst-case ``(low, high)``.
    """

    block: str
    output: str
    kind: str
    temps: FloatArray
    nominal: FloatArray
    low: FloatArray
    high: FloatArray
    required: tuple[float, float]
    worst: tuple[float, float]


def ambient_sweep(result: BlockResult, output: OutputResult, points: int = POINTS) -> AmbientSweep:
    """Sweep the ambient for one output of a solved block.

    Parameters
    ----------
    result
        A solved block with a design.
    output
        One of its best design's outputs.
    points
        Number of temperatures.

    Returns
    -------
    AmbientSweep
        The three curves.

    Raises
    ------
    UsageError
        When the block has no design.
    """
    best = result.best
    if best is None:
        raise UsageError(f"block {result.block.name!r} has no design to plot")
    cond = result.block.conditions
    temps = np.linspace(cond.ambient_low, cond.ambient_high, points)
    nominal = nominal_inputs(result)
    model = family(result.block.kind).evaluate(result.block, best.design.variant)

    def run(at: dict[str, float]) -> FloatArray:
        x = {k: np.full(points, at.get(k, float(v[0]))) for k, v in nominal.items()}
        x["temp"] = temps
        with np.errstate(all="ignore"):
            return np.asarray(call_evaluate(model, x, points)[output.name], dtype=np.float64)

    req = output.required
    return AmbientSweep(
        result.block.name,
        output.name,
        output.kind,
        temps,
        run({}),
        run(dict(output.low_at)),
        run(dict(output.high_at)),
        required_edges(req) if req is not None else (-math.inf, math.inf),
        (output.low, output.high),
    )


def ambient_sweeps(result: Result, blocks: list[str] | None = None) -> list[AmbientSweep]:
    """Sweeps of every required output of the chosen blocks.

    Parameters
    ----------
    result
        A solved spec.
    blocks
        Block names (default: every block with a design).

    Returns
    -------
    list of AmbientSweep
        One per output with a requirement, in block and output order.

    Raises
    ------
    KeyError
        When a named block does not exist.
    """
    chosen = [result.block(n) for n in blocks] if blocks else list(result.blocks)
    return [
        ambient_sweep(b, o)
        for b in chosen
        if b.best is not None
        for o in b.best.outputs
        if o.required is not None
    ]


def _draw(ax: Any, s: AmbientSweep) -> None:
    ys = np.concatenate([s.nominal, s.low, s.high])
    ys = ys[np.isfinite(ys)]
    span = [*ys.tolist(), *(v for v in (*s.worst, *s.required) if math.isfinite(v))]
    lo, hi = (min(span), max(span)) if span else (0.0, 1.0)
    pad = 0.15 * (hi - lo) or abs(hi) * 0.01 or 1.0
    ylo, yhi = lo - pad, hi + pad
    rlo, rhi = s.required
    a = max(rlo, ylo) if math.isfinite(rlo) else ylo
    b = min(rhi, yhi) if math.isfinite(rhi) else yhi
    if b > a:
        ax.axhspan(a, b, color=REQUIRED, zorder=0)
    for edge in (rlo, rhi):
        if math.isfinite(edge) and ylo <= edge <= yhi:
            ax.axhline(edge, color=MEETS, linewidth=1)
    for edge in s.worst:
        if math.isfinite(edge):
            ax.axhline(edge, color=WORST, linestyle="--", linewidth=1)
    ax.plot(s.temps, s.low, color="#1f4e9a", linewidth=1.4)
    ax.plot(s.temps, s.high, color=FAILS, linewidth=1.4)
    ax.plot(s.temps, s.nominal, color="black", linewidth=1.4)
    ax.set_ylim(ylo, yhi)
    ticks = ax.get_yticks()
    ax.set_yticks(ticks, [format_quantity(float(t), s.kind, digits=4) for t in ticks])
    ax.set_ylim(ylo, yhi)
    ax.tick_params(axis="y", labelsize=7)
    ax.set_xlim(float(s.temps[0]), float(s.temps[-1]))
    ax.set_xlabel("ambient (°C)")
    ax.set_title(f"{s.block} {s.output} over the ambient range", fontsize=9)


def ambient_chart(result: Result, blocks: list[str] | None = None) -> Any:
    """Draw every required output over the ambient range, one panel per output.

    Parameters
    ----------
    result
        A solved spec.
    blocks
        Block names (default: every block with a design).

    Returns
    -------
    matplotlib.figure.Figure
        The figure.

    Raises
    ------
    UsageError
        When nothing has a requirement and a design.
    """
    sweeps = ambient_sweeps(result, blocks)
    if not sweeps:
        raise UsageError("nothing to plot: no block has a requirement and a design")
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    legend = (
        [
            Line2D([], [], color="black"),
            Line2D([], [], color="#1f4e9a"),
            Line2D([], [], color=FAILS),
            Patch(facecolor=REQUIRED, edgecolor=MEETS),
            Line2D([], [], color=WORST, linestyle="--"),
        ],
        ["nominal parts", "low-corner parts", "high-corner parts", "required", "worst case"],
    )
    return panel_chart(sweeps, _draw, legend)
