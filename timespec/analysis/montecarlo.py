"""Seeded, chunked Monte Carlo analysis with streaming statistics and yield.

Samples are drawn for all factors a chunk at a time and the model is called once per
chunk, so memory stays bounded by the chunk size whatever the sample count.
Statistics are accumulated per chunk:

* mean and variance: per-chunk two-pass mean and sum of squared deviations, combined
  across chunks with the pairwise update of Chan, Golub and LeVeque;
* minimum, maximum, count of non-finite samples, window pass counts: exact;
* percentiles: exact (sorted samples, linear interpolation as ``numpy.percentile``)
  when every sample fits in one chunk; otherwise from a streaming histogram of 4096
  equal bins.  The histogram range starts as the first chunk's span widened by 25 %
  on each side and doubles (merging bin pairs, counts stay exact) whenever a later
  sample falls outside it.  The absolute error of a histogram percentile is below one
  bin width, reported as :attr:`OutputStats.percentile_resolution`.

Reproducibility: every factor draws from its own ``numpy.random.Generator(PCG64)``
seeded by ``SeedSequence(seed, spawn_key=(crc32(name),))``.  The same factors, model,
seed, sample count and chunk size give bit-identical results; a factor's draws do not
depend on which other factors exist, so two designs sharing factor names see the same
random draws (common random numbers, which sharpens comparisons between designs).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt

from timespec.analysis.factors import (
    Evaluate,
    Factor,
    FloatArray,
    call_evaluate,
    check_factors,
)
from timespec.analysis.sampling import FactorSampler
from timespec.analysis.sensitivity import VarianceShare
from timespec.analysis.stats import (
    CAPABILITY_MIN_SAMPLES,
    Capability,
    percentile_capability,
    wilson_interval,
)
from timespec.analysis.stats import cpk as _cpk

__all__ = ["PERCENTILES", "MonteCarloResult", "OutputStats", "monte_carlo"]

PERCENTILES: tuple[float, ...] = (0.135, 2.5, 50.0, 97.5, 99.865)
"""Percentiles reported for every output: ±3σ-equivalent tails, 95 % interval, median."""

_BoolArray = npt.NDArray[np.bool_]

_BINS = 4096
_MARGIN = 0.25  # first-chunk span is widened by this fraction on each side


@dataclass(frozen=True)
class OutputStats:
    """Monte Carlo statistics of one output.

    Parameters
    ----------
    mean, std : float
        Mean and sample standard deviation (``ddof=1``) of the finite samples (NaN when
        there are none; ``std`` is 0 for a single finite sample).
    minimum, maximum : float
        Smallest and largest sample, infinities included (NaN samples ignored).
    percentiles : mapping of float to float
        Keys :data:`PERCENTILES`; computed over all non-NaN samples, so a tail of
        infinite samples shows as ``inf``.
    within : float or None
        Fraction of all samples inside this output's window (non-finite samples count
        as outside); ``None`` without a window.
    cpk : float or None
        Normal-theory index ``min(high - mean, mean - low) / (3 std)`` against the
        window, from the finite samples; an infinite window limit gives the one-sided
        index.  ``None`` without a window or when ``std`` is 0 or not finite.  It
        assumes a normal output and can contradict the yield for a skewed or bounded
        one; prefer :attr:`capability`.
    non_finite : int
        Number of samples that are ``inf``, ``-inf`` or NaN.
    percentile_resolution : float
        Upper bound of the absolute error of the percentiles: 0 when exact, else the
        histogram bin width.
    capability : Capability or None
        Capability by the percentile method (ISO 22514-2 style, see
        :func:`timespec.analysis.stats.percentile_capability`) against the window;
        ``None`` without a window, with fewer than
        :data:`~timespec.analysis.stats.CAPABILITY_MIN_SAMPLES` samples, or for a
        constant output.
    """

    mean: float
    std: float
    minimum: float
    maximum: float
    percentiles: Mapping[float, float]
    within: float | None
    cpk: float | None
    non_finite: int = 0
    percentile_resolution: float = 0.0
    capability: Capability | None = None


@dataclass(frozen=True)
class MonteCarloResult:
    """Result of a Monte Carlo run.

    Parameters
    ----------
    samples : int
        Number of samples drawn.
    seed : int
        Seed of the run.
    outputs : mapping of str to OutputStats
        Statistics per output.
    passed : int
        Samples where every windowed output is inside its window (all samples when no
        window is given).
    yield_fraction : float
        ``passed / samples``.
    yield_interval : tuple of float
        95 % Wilson score interval of the yield.
    drivers : mapping of str to tuple of VarianceShare
        Output name → variance-based driver shares, largest first, when the run was
        asked for them (:func:`timespec.analysis.sensitivity.variance_shares`, kept
        here by :func:`timespec.design.statistics.analyse_block`); empty otherwise.
    driver_samples : int
        Base sample count of the driver estimate (0 when there is none).
    """

    samples: int
    seed: int
    outputs: Mapping[str, OutputStats]
    passed: int
    yield_fraction: float
    yield_interval: tuple[float, float]
    drivers: Mapping[str, tuple[VarianceShare, ...]] = field(default_factory=dict)
    driver_samples: int = 0


class _Histogram:
    """Equal-width histogram whose range doubles to cover every sample."""

    def __init__(self, first: FloatArray) -> None:
        lo, hi = float(first.min()), float(first.max())
        span = hi - lo
        if span <= 0.0:
            span = abs(lo) * 2.0**-20 if lo != 0.0 else 2.0**-20
        self.lo = lo - _MARGIN * span
        self.width = (1.0 + 2.0 * _MARGIN) * span / _BINS
        self.counts = np.zeros(_BINS, dtype=np.int64)
        self.add(first, lo, hi)

    def _grow(self, down: bool) -> None:
        merged = self.counts.reshape(_BINS // 2, 2).sum(axis=1)
        zeros = np.zeros(_BINS // 2, dtype=np.int64)
        if down:
            self.counts = np.concatenate((zeros, merged))
            self.lo -= _BINS * self.width
        else:
            self.counts = np.concatenate((merged, zeros))
        self.width *= 2.0

    def add(self, x: FloatArray, xmin: float, xmax: float) -> None:
        while xmin < self.lo:
            self._grow(down=True)
        while xmax >= self.lo + _BINS * self.width:
            self._grow(down=False)
        pos = x - self.lo
        pos *= 1.0 / self.width
        idx = pos.astype(np.intp)
        np.minimum(idx, _BINS - 1, out=idx)
        self.counts += np.bincount(idx, minlength=_BINS)

    def value_at_rank(self, k: int) -> float:
        """Estimate of the ``k``-th smallest finite sample (0-based)."""
        cum = np.cumsum(self.counts)
        b = int(np.searchsorted(cum, k, side="right"))
        before = int(cum[b - 1]) if b > 0 else 0
        inside = (k - before + 0.5) / int(self.counts[b])
        return self.lo + self.width * (b + inside)


class _Accumulator:
    """Streaming statistics of one output."""

    def __init__(self, window: tuple[float, float] | None, exact: bool) -> None:
        self.window = window
        self.exact = exact
        self.kept: FloatArray | None = None  # all non-NaN samples when exact
        self.n = 0  # finite samples
        self.mean = 0.0
        self.m2 = 0.0
        self.fmin = math.inf  # finite min/max
        self.fmax = -math.inf
        self.n_nan = 0
        self.n_neg_inf = 0
        self.n_pos_inf = 0
        self.n_within = 0
        self.hist: _Histogram | None = None

    def add(self, x: FloatArray) -> _BoolArray | None:
        """Add one chunk; return the inside-window mask (or ``None`` without window)."""
        finite = np.isfinite(x)
        all_finite = bool(finite.all())
        xf = x if all_finite else x[finite]
        if not all_finite:
            self.n_nan += int(np.isnan(x).sum())
            self.n_pos_inf += int(np.isposinf(x).sum())
            self.n_neg_inf += int(np.isneginf(x).sum())
            if self.exact:
                self.kept = x[~np.isnan(x)]
        elif self.exact:
            self.kept = np.array(x, dtype=np.float64, copy=True)
        if xf.size:
            self._add_finite(xf)
        if self.window is None:
            return None
        lo, hi = self.window
        inside: _BoolArray = (x >= lo) & (x <= hi)
        if not all_finite:
            inside &= finite
        self.n_within += int(np.count_nonzero(inside))
        return inside

    def _add_finite(self, xf: FloatArray) -> None:
        nb = xf.size
        mb = float(xf.mean())
        dev = xf - mb
        m2b = float(np.einsum("i,i->", dev, dev))
        na = self.n
        total = na + nb
        delta = mb - self.mean
        # Chan, Golub & LeVeque pairwise combination of (n, mean, M2).
        self.mean += delta * nb / total
        self.m2 += m2b + delta * delta * na * nb / total
        self.n = total
        cmin, cmax = float(xf.min()), float(xf.max())
        self.fmin = min(self.fmin, cmin)
        self.fmax = max(self.fmax, cmax)
        if not self.exact:
            if self.hist is None:
                self.hist = _Histogram(xf)
            else:
                self.hist.add(xf, cmin, cmax)

    def _value_at_rank(self, k: int, ordered: FloatArray | None) -> float:
        if ordered is not None:
            return float(ordered[k])
        if k < self.n_neg_inf:
            return -math.inf
        k -= self.n_neg_inf
        if k >= self.n:
            return math.inf
        if k == 0:
            return self.fmin
        if k == self.n - 1:
            return self.fmax
        assert self.hist is not None
        return min(max(self.hist.value_at_rank(k), self.fmin), self.fmax)

    def _percentile(self, p: float, total: int, ordered: FloatArray | None) -> float:
        rank = p / 100.0 * (total - 1)
        k0 = math.floor(rank)
        frac = rank - k0
        v0 = self._value_at_rank(k0, ordered)
        if frac == 0.0:
            return v0
        v1 = self._value_at_rank(k0 + 1, ordered)
        if v0 == v1 or math.isinf(v0):
            return v0
        if math.isinf(v1):
            return v1
        return v0 + frac * (v1 - v0)

    def finish(self, samples: int) -> OutputStats:
        total = self.n + self.n_neg_inf + self.n_pos_inf
        ordered = np.sort(self.kept) if self.kept is not None else None
        if total:
            percentiles = {p: self._percentile(p, total, ordered) for p in PERCENTILES}
        else:
            percentiles = dict.fromkeys(PERCENTILES, math.nan)
        mean = self.mean if self.n else math.nan
        std = _sample_std(self.m2, self.n)
        minimum = -math.inf if self.n_neg_inf else self.fmin
        maximum = math.inf if self.n_pos_inf else self.fmax
        if total == 0:
            minimum = maximum = math.nan
        within = None if self.window is None else self.n_within / samples
        cpk = None if self.window is None else _cpk(mean, std, *self.window)
        capability = None
        if self.window is not None and total >= CAPABILITY_MIN_SAMPLES and not self.n_nan:
            capability = percentile_capability(
                percentiles[0.135],
                percentiles[50.0],
                percentiles[99.865],
                *self.window,
                samples=total,
            )
        resolution = self.hist.width if (self.hist is not None and ordered is None) else 0.0
        return OutputStats(
            mean=mean,
            std=std,
            minimum=minimum,
            maximum=maximum,
            percentiles=percentiles,
            within=within,
            cpk=cpk,
            non_finite=self.n_nan + self.n_neg_inf + self.n_pos_inf,
            percentile_resolution=resolution,
            capability=capability,
        )


def _sample_std(m2: float, n: int) -> float:
    """Sample standard deviation (``ddof=1``) from the sum of squared deviations."""
    if n > 1:
        return math.sqrt(m2 / (n - 1))
    return 0.0 if n == 1 else math.nan


def _check_windows(
    windows: Mapping[str, tuple[float, float]] | None,
) -> dict[str, tuple[float, float]]:
    out: dict[str, tuple[float, float]] = {}
    for key, (lo, hi) in (windows or {}).items():
        lo_f, hi_f = float(lo), float(hi)
        if math.isnan(lo_f) or math.isnan(hi_f) or lo_f > hi_f:
            raise ValueError(f"window for {key!r} must have low <= high, got ({lo!r}, {hi!r})")
        out[key] = (lo_f, hi_f)
    return out


def monte_carlo(
    factors: Sequence[Factor],
    evaluate: Evaluate,
    *,
    samples: int,
    seed: int,
    windows: Mapping[str, tuple[float, float]] | None = None,
    chunk: int = 262_144,
    progress: Callable[[int, int], None] | None = None,
) -> MonteCarloResult:
    """Monte Carlo statistics and yield of every output.

    Parameters
    ----------
    factors : sequence of Factor
        The circuit's factors.
    evaluate : Evaluate
        Vectorised circuit model.
    samples : int
        Number of samples, ``>= 1``.
    seed : int
        Non-negative seed; see the module notes on reproducibility.
    windows : mapping of str to (float, float), optional
        Output name → closed acceptance window ``(low, high)``; ``±inf`` gives a
        one-sided window.  Yield counts samples where every windowed output is inside.
    chunk : int, optional
        Samples drawn and evaluated per call of the model (bounds memory).
    progress : callable, optional
        Called as ``progress(done, samples)`` after every chunk.

    Returns
    -------
    MonteCarloResult
        Per-output statistics, pass count, yield and its 95 % Wilson interval.

    Raises
    ------
    ValueError
        On ``samples < 1``, ``chunk < 1``, a negative seed, repeated factor names, a
        window for an unknown output or with ``low > high``, or malformed model outputs.

    Notes
    -----
    Uniform factors are drawn evenly over ``[low, high]``; normal factors from
    ``N(mid, (half/sigmas)**2)`` truncated at ``[low, high]`` (rejection, exact
    distribution); fixed factors stay at nominal.  Factors are independent.
    Non-finite outputs (a threshold never reached gives ``inf``) fail every window they
    appear in and are left out of ``mean``/``std``/``cpk``; they are counted in
    :attr:`OutputStats.non_finite`.  See the module docstring for the accuracy of the
    percentiles and the reproducibility guarantees.

    References
    ----------
    JCGM 101:2008, propagation of distributions using a Monte Carlo method; T. F. Chan,
    G. H. Golub and R. J. LeVeque, "Algorithms for computing the sample variance"
    (1983), for combining chunk statistics; Wilson (1927) for the yield interval.
    """
    if samples < 1:
        raise ValueError(f"samples must be at least 1, got {samples}")
    if chunk < 1:
        raise ValueError(f"chunk must be at least 1, got {chunk}")
    if seed < 0:
        raise ValueError(f"seed must be non-negative, got {seed}")
    facs = check_factors(factors)
    wins = _check_windows(windows)
    samplers = [FactorSampler(f, seed) for f in facs]
    exact = samples <= chunk
    accs: dict[str, _Accumulator] = {}
    passed = 0
    done = 0
    while done < samples:
        n = min(chunk, samples - done)
        inputs = {s.factor.name: s.draw(n) for s in samplers}
        outputs = call_evaluate(evaluate, inputs, n)
        if not accs:
            unknown = sorted(set(wins) - set(outputs))
            if unknown:
                raise ValueError(
                    f"windows given for unknown outputs {unknown}; outputs are {sorted(outputs)}"
                )
            accs = {key: _Accumulator(wins.get(key), exact) for key in outputs}
        elif outputs.keys() != accs.keys():
            raise ValueError(
                f"evaluate returned outputs {sorted(outputs)}, expected {sorted(accs)}"
            )
        ok: _BoolArray | None = None
        for key, acc in accs.items():
            inside = acc.add(outputs[key])
            if inside is not None:
                ok = inside if ok is None else ok & inside
        passed += n if ok is None else int(np.count_nonzero(ok))
        done += n
        if progress is not None:
            progress(done, samples)
    return MonteCarloResult(
        samples=samples,
        seed=seed,
        outputs={key: acc.finish(samples) for key, acc in accs.items()},
        passed=passed,
        yield_fraction=passed / samples,
        yield_interval=wilson_interval(passed, samples),
    )
