"""Monte Carlo histograms: each required output against its requirement and worst case.

A result keeps the Monte Carlo *statistics*, not the samples (a million samples
per output would not belong in a report).  :func:`output_samples` draws them
again: the same factors, seed, sample count and chunk size as
:func:`timespec.design.statistics.analyse_block`, through the same seeded
``FactorSampler`` (``timespec.analysis.sampling``) streams and the family's
model, so they are the very samples the statistics were computed from (the
tests check the percentiles against the stored ones).

Each panel shows the samples' histogram (:data:`BINS` equal bins from the
smallest to the largest of the finite samples, the worst case and the nominal),
the required window (green; a one-sided requirement shades
from its bound to the panel's edge), the worst-case window (purple lines) and
the nominal (black line).  Samples that never settle (``inf``) cannot be
binned; their count is written in the panel's title.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np
import numpy.typing as npt

from timespec.analysis.factors import call_evaluate
from timespec.analysis.sampling import FactorSampler
from timespec.design.result import BlockResult, Result
from timespec.design.statistics import chunk_size
from timespec.errors import UsageError
from timespec.families import family
from timespec.numbers import format_quantity
from timespec.outputs.figures import MEETS, REQUIRED, WORST, panel_chart, required_edges

__all__ = ["BINS", "Histogram", "histogram_chart", "histograms", "output_samples"]

FloatArray = npt.NDArray[np.float64]

#: Bins of each histogram.
BINS = 40


def output_samples(
    result: BlockResult, *, samples: int | None = None, seed: int | None = None
) -> dict[str, FloatArray]:
    """Draw again the Monte Carlo samples of a block's outputs.

    Parameters
    ----------
    result
        A solved block with a design (analysed or not).
    samples, seed
        Sample count and seed; ``None`` takes the run stored in
        ``result.monte_carlo``, else the block's ``samples``/``seed`` settings.

    Returns
    -------
    dict
        Output name → all samples, in draw order.

    Raises
    ------
    UsageError
        When the block has no design.

    Notes
    -----
    Chunked exactly as :func:`timespec.design.statistics.analyse_block` does
    (``chunk_size`` of :mod:`timespec.design.statistics`), each factor from its own
    ``FactorSampler`` (``timespec.analysis.sampling``), so the samples equal the
    analysed run's.
    """
    best = result.best
    if best is None:
        raise UsageError(f"block {result.block.name!r} has no design to plot")
    mc = result.monte_carlo
    stats = result.block.statistics
    n = samples if samples is not None else (mc.samples if mc else stats.samples)
    s = seed if seed is not None else (mc.seed if mc else stats.seed)
    fam = family(result.block.kind)
    factors = list(result.factors) or fam.factors(result.block, best.design)
    model = fam.evaluate(result.block, best.design.variant)
    samplers = [FactorSampler(f, s) for f in factors]
    chunk = chunk_size(n)
    parts: dict[str, list[FloatArray]] = {}
    done = 0
    with np.errstate(all="ignore"):
        while done < n:
            k = min(chunk, n - done)
            outputs = call_evaluate(model, {sm.factor.name: sm.draw(k) for sm in samplers}, k)
            for key, values in outputs.items():
                parts.setdefault(key, []).append(np.asarray(values, dtype=np.float64))
            done += k
    return {key: np.concatenate(v) for key, v in parts.items()}


@dataclass(frozen=True)
class Histogram:
    """The histogram of one output.

    Attributes
    ----------
    block, output, kind
        Block name, output name and kind of quantity.
    counts
        Samples per bin.
    edges
        Bin edges (``len(counts) + 1``), SI.
    non_finite
        Samples left out because they are not finite.
    required
        Required ``(low, high)`` (``±inf`` for an open side, see
        :func:`~timespec.outputs.figures.required_edges`).
    worst
        Worst-case ``(low, high)``.
    nominal
        Nominal value.
    """

    block: str
    output: str
    kind: str
    counts: npt.NDArray[np.int64]
    edges: FloatArray
    non_finite: int
    required: tuple[float, float]
    worst: tuple[float, float]
    nominal: float


def histograms(
    result: Result,
    blocks: list[str] | None = None,
    *,
    samples: int | None = None,
    seed: int | None = None,
) -> list[Histogram]:
    """Histograms of every required output of the chosen blocks.

    Parameters
    ----------
    result
        A solved spec.
    blocks
        Block names (default: all with a design).
    samples, seed
        As :func:`output_samples`.

    Returns
    -------
    list of Histogram
        One per output that has a requirement, in block and output order.

    Raises
    ------
    KeyError
        When a named block does not exist.
    """
    chosen = [result.block(n) for n in blocks] if blocks else list(result.blocks)
    out: list[Histogram] = []
    for b in chosen:
        if b.best is None:
            continue
        drawn = output_samples(b, samples=samples, seed=seed)
        for o in b.best.outputs:
            if o.required is None:
                continue
            x = drawn[o.name]
            finite = x[np.isfinite(x)]
            values = [v for v in (o.low, o.high, o.nominal) if math.isfinite(v)]
            lo = min([*values, float(finite.min())] if finite.size else values)
            hi = max([*values, float(finite.max())] if finite.size else values)
            if hi <= lo:
                hi = lo + (abs(lo) * 1e-6 or 1e-12)
            counts, edges = np.histogram(finite, bins=BINS, range=(lo, hi))
            out.append(
                Histogram(
                    b.block.name,
                    o.name,
                    o.kind,
                    counts.astype(np.int64),
                    edges.astype(np.float64),
                    int(x.size - finite.size),
                    required_edges(o.required),
                    (o.low, o.high),
                    o.nominal,
                )
            )
    return out


def _draw(ax: Any, h: Histogram) -> None:
    left, right = float(h.edges[0]), float(h.edges[-1])
    # the panel also shows the finite edges of the requirement, however far they lie
    for edge in h.required:
        if math.isfinite(edge):
            left, right = min(left, edge), max(right, edge)
    pad = 0.08 * (right - left)
    xlo, xhi = left - pad, right + pad
    rlo, rhi = h.required
    if math.isfinite(rlo) or math.isfinite(rhi):
        a = max(rlo, xlo) if math.isfinite(rlo) else xlo
        b = min(rhi, xhi) if math.isfinite(rhi) else xhi
        if b > a:
            ax.axvspan(a, b, color=REQUIRED, zorder=0)
        for edge in (rlo, rhi):
            if math.isfinite(edge) and xlo <= edge <= xhi:
                ax.axvline(edge, color=MEETS, linewidth=1)
    ax.stairs(h.counts, h.edges, fill=True, color="#4a6fa5", alpha=0.85)
    for edge in h.worst:
        if math.isfinite(edge):
            ax.axvline(edge, color=WORST, linestyle="--", linewidth=1.2)
    ax.axvline(h.nominal, color="black", linewidth=1)
    ax.set_xlim(xlo, xhi)
    ticks = ax.get_xticks()
    ax.set_xticks(ticks, [format_quantity(float(t), h.kind, digits=4) for t in ticks])
    ax.set_xlim(xlo, xhi)
    ax.tick_params(axis="x", labelsize=7)
    ax.set_ylabel("samples")
    total = int(h.counts.sum()) + h.non_finite
    extra = f", {h.non_finite} never settle (not drawn)" if h.non_finite else ""
    ax.set_title(f"{h.block} {h.output}: {total} samples{extra}", fontsize=9)


def histogram_chart(
    result: Result,
    blocks: list[str] | None = None,
    *,
    samples: int | None = None,
    seed: int | None = None,
) -> Any:
    """Draw the Monte Carlo histograms, one panel per required output.

    Parameters
    ----------
    result
        A solved spec.
    blocks
        Block names (default: all with a design).
    samples, seed
        As :func:`output_samples`.

    Returns
    -------
    matplotlib.figure.Figure
        The figure.

    Raises
    ------
    UsageError
        When nothing has a requirement and a design.
    """
    hs = histograms(result, blocks, samples=samples, seed=seed)
    if not hs:
        raise UsageError("nothing to plot: no block has a requirement and a design")
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    legend = (
        [
            Patch(facecolor="#4a6fa5"),
            Patch(facecolor=REQUIRED, edgecolor=MEETS),
            Line2D([], [], color=WORST, linestyle="--"),
            Line2D([], [], color="black"),
        ],
        ["Monte Carlo samples", "required window", "worst case", "nominal"],
    )
    return panel_chart(hs, _draw, legend)
