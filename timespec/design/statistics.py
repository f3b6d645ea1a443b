"""Statistics beside the worst case: RSS spread, contributors and Monte Carlo yield.

The solver proves a design at worst case (every corner of the factor box).  This
step adds how the output is *distributed* for the chosen design:

* **RSS** (first-order propagation from sensitivities, JCGM 100 5.1.2) per
  output, with each input's first-order share of the variance (blind to
  inputs whose slope is zero at the nominal point, such as a tempco at 25 °C);
* **Monte Carlo** (JCGM 101): all varying inputs drawn at once, vectorised with
  numpy and chunked, seeded (the same spec and seed give byte-identical
  numbers): mean, standard deviation, percentiles, yield against the
  requirement windows with a 95 % Wilson interval, and the capability index
  by the percentile method (valid for skewed and bounded outputs);
* **drivers**: variance-based shares from a pick-and-freeze sample design
  (Sobol first-order and total indices), so an input that acts through an
  interaction (a tempco with the ambient) gets its share; the first-order RSS
  shares stay in ``rss`` for comparison.

How part values spread inside their tolerance
---------------------------------------------
The default is **uniform within the tolerance**.  A tolerance band is a limit,
not a measured distribution: parts may be sorted (the tight grades taken out of
a batch leave a bimodal remainder), and a batch can sit anywhere in the band.
When only the limits are known, the rectangular distribution is the assumption
JCGM 100 (GUM) 4.3.7 recommends; it is also the cautious one, as it puts more
weight near the limits than a bell curve does.  ``spread normal 3 sigma`` in a
spec switches to a normal distribution whose standard deviation is the
tolerance divided by the stated number of sigmas, truncated at the tolerance
(out-of-tolerance parts do not ship); 3 sigma is the usual reading of a
tolerance as a process limit (common practice).  The choice reaches the factors
through ``block.statistics`` (see :func:`timespec.families.inputs.part_factors`);
operating conditions (ambient, supply) are always uniform over their range, so
the yield is over units *and* operating points.
"""

from __future__ import annotations

import dataclasses
import sys
from collections.abc import Callable
from typing import TextIO

import numpy as np

from timespec.analysis import monte_carlo, rss, variance_shares
from timespec.design.result import BlockResult, Result
from timespec.families import family
from timespec.model import MAX_SAMPLES

__all__ = [
    "CHUNK",
    "DRIVER_SAMPLES",
    "EXACT_UP_TO",
    "Progress",
    "analyse",
    "analyse_block",
    "chunk_size",
    "terminal_progress",
    "windows_of",
]

Progress = Callable[[int, int], None]
"""Called as ``progress(done, total)`` after every Monte Carlo chunk."""

#: Runs up to this many samples are drawn in one chunk (exact percentiles).
EXACT_UP_TO = 65_536
#: Chunk size of longer runs: small enough that a chunk's arrays stay in the
#: processor cache (measured about twice as fast as 256 k-sample chunks for a
#: one-shot), large enough that Python overhead is negligible; memory stays
#: bounded whatever the sample count.
CHUNK = 16_384
#: Base sample count of the variance-based driver shares (``N * (k + 2)`` model
#: evaluations for ``k`` varying inputs); fixed, so a seed always reproduces the same
#: shares, and large enough that a dominant share has a standard error near 1 %.
DRIVER_SAMPLES = 8192


def chunk_size(samples: int) -> int:
    """Monte Carlo chunk size used for a run of ``samples``.

    Parameters
    ----------
    samples
        Sample count.

    Returns
    -------
    int
        ``samples`` up to :data:`EXACT_UP_TO` (one chunk, exact percentiles), else
        :data:`CHUNK` (streaming statistics, histogram percentiles).  A fixed
        function of the count, so a seed always reproduces the same numbers.
    """
    return samples if samples <= EXACT_UP_TO else CHUNK


def windows_of(result: BlockResult) -> dict[str, tuple[float, float]]:
    """The requirement windows of a block, for the outputs its family computes.

    Parameters
    ----------
    result
        A solved block.

    Returns
    -------
    dict
        Output name → ``(low, high)`` in SI (``±inf`` for an open side).
    """
    names = {o.name for o in family(result.block.kind).outputs(result.block)}
    return {
        r.quantity: (r.window.low, r.window.high)
        for r in result.block.requirements
        if r.quantity in names
    }


def analyse_block(
    result: BlockResult,
    *,
    samples: int | None = None,
    seed: int | None = None,
    progress: Progress | None = None,
) -> BlockResult:
    """Add RSS and Monte Carlo statistics to one solved block.

    Parameters
    ----------
    result
        The block as solved or checked by :func:`timespec.design.solver.solve_block`.
    samples
        Monte Carlo sample count; ``None`` takes the spec's (``samples`` statement,
        default 20 000).
    seed
        Monte Carlo seed; ``None`` takes the spec's (``seed`` statement).
    progress
        Called as ``progress(done, total)`` after each chunk (see
        :func:`terminal_progress`).

    Returns
    -------
    BlockResult
        A copy with ``rss`` (output → :class:`~timespec.analysis.RssResult`) and
        ``monte_carlo`` filled, the latter with the variance-based driver shares
        (``monte_carlo.drivers``) and the percentile capability of each windowed
        output; the input unchanged when there is no design.

    Raises
    ------
    ValueError
        When ``samples < 1`` or ``seed < 0``.

    Notes
    -----
    Both methods use the best design's factors (``result.factors``) and its
    family's vectorised model.  RSS: ``u_c(y)² = Σ (∂y/∂x_i · u(x_i))²`` with
    ``u = h/√3`` for a uniform input of half-range ``h`` (the truncated-normal
    standard deviation for a normal one).  Monte Carlo: yield = share of samples
    with every required output inside its window; the interval is the 95 %
    Wilson score interval.  Capability by the percentile method,
    ``Cpk = min((U − X50)/(X99.865 − X50), (X50 − L)/(X50 − X0.135))``, from at
    least 7408 samples (:func:`timespec.analysis.stats.percentile_capability`);
    the normal-theory ``min(USL − μ, μ − LSL) / 3σ`` stays in ``cpk``.  Drivers:
    :func:`timespec.analysis.sensitivity.variance_shares` on
    :data:`DRIVER_SAMPLES` base samples, which credits a tempco with its
    interaction with the ambient (first-order RSS gives it 0 % at 25 °C).

    References
    ----------
    JCGM 100:2008 (GUM) 4.3.7 and 5.1.2; JCGM 101:2008 (propagation of
    distributions by a Monte Carlo method); E. B. Wilson (1927) for the interval;
    ISO 22514-2 for the capability indices; Saltelli et al. (2010), Jansen (1999)
    and Owen (2014) for the driver shares.
    """
    best = result.best
    if best is None:
        return result
    block = result.block
    n = block.statistics.samples if samples is None else samples
    s = block.statistics.seed if seed is None else seed
    if not 1 <= n <= MAX_SAMPLES:
        raise ValueError(f"samples must lie from 1 to {MAX_SAMPLES:,}, got {n}")
    if s < 0:
        raise ValueError(f"the seed must not be negative, got {s}")
    fam = family(block.kind)
    factors = list(result.factors) or fam.factors(block, best.design)
    model = fam.evaluate(block, best.design.variant)
    # A threshold never reached gives inf by contract; stray floating-point
    # warnings from such samples must not abort an analysis (they are counted
    # as non-finite samples, which fail every window).
    with np.errstate(all="ignore"):
        spread = rss(factors, model)
        mc = monte_carlo(
            factors,
            model,
            samples=n,
            seed=s,
            windows=windows_of(result),
            chunk=chunk_size(n),
            progress=progress,
        )
        drivers = variance_shares(factors, model, samples=DRIVER_SAMPLES, seed=s)
    mc = dataclasses.replace(mc, drivers=drivers, driver_samples=DRIVER_SAMPLES)
    return dataclasses.replace(result, rss=spread, monte_carlo=mc)


def analyse(
    result: Result,
    *,
    samples: int | None = None,
    seed: int | None = None,
    progress: Progress | None = None,
) -> Result:
    """Add RSS and Monte Carlo statistics to every block of a solved spec.

    Parameters
    ----------
    result
        From :func:`timespec.design.solver.solve`.
    samples, seed
        Override every block's Monte Carlo settings (``None``: each block's own).
    progress
        Progress callback, see :func:`analyse_block`.

    Returns
    -------
    Result
        A copy with every block analysed.

    Raises
    ------
    ValueError
        When ``samples < 1`` or ``seed < 0``.

    Notes
    -----
    Blocks are independent; each uses its own seed, so adding a block to a spec
    does not change the numbers of the others.

    References
    ----------
    JCGM 100:2008 and JCGM 101:2008.
    """
    blocks = tuple(
        analyse_block(b, samples=samples, seed=seed, progress=progress) for b in result.blocks
    )
    return dataclasses.replace(result, blocks=blocks)


def terminal_progress(stream: TextIO | None = None, label: str = "Monte Carlo") -> Progress | None:
    """A one-line progress indicator, only when the stream is a terminal.

    Parameters
    ----------
    stream
        Where to draw; default ``sys.stderr``.
    label
        Text before the percentage.

    Returns
    -------
    callable or None
        ``progress(done, total)`` that redraws ``label  42 % (420000 of 1000000)``
        in place (carriage return) when the whole percentage changes and erases the
        line when ``done == total``; ``None`` when the stream is not a TTY (pipes,
        files, CI logs stay clean).
    """
    out = sys.stderr if stream is None else stream
    isatty = getattr(out, "isatty", None)
    if isatty is None or not isatty():
        return None
    last = [-1]

    def progress(done: int, total: int) -> None:
        if done >= total:
            if last[0] >= 0:
                out.write("\r\x1b[K")
                out.flush()
            last[0] = -1
            return
        pct = 100 * done // max(total, 1)
        if pct == last[0]:
            return
        last[0] = pct
        out.write(f"\r{label} {pct:3d} % ({done} of {total})")
        out.flush()

    return progress
