"""Seeded sampling of factors, shared by the Monte Carlo and driver-share engines."""

from __future__ import annotations

import zlib

import numpy as np

from timespec.analysis.factors import Factor, FloatArray, is_varying

__all__ = ["FactorSampler"]


class FactorSampler:
    """Draws the samples of one factor, chunk by chunk, from its own generator.

    Parameters
    ----------
    factor : Factor
        The factor.
    seed : int
        Non-negative seed of the run.
    stream : tuple of int, optional
        Extra spawn-key entries: a different tuple gives an independent stream for
        the same factor and seed.

    Notes
    -----
    The generator is ``numpy.random.Generator(PCG64(SeedSequence(seed,
    spawn_key=(crc32(name), *stream))))``.
    """

    def __init__(self, factor: Factor, seed: int, stream: tuple[int, ...] = ()) -> None:
        self.factor = factor
        key = zlib.crc32(factor.name.encode("utf-8"))
        self.rng = np.random.Generator(
            np.random.PCG64(np.random.SeedSequence(seed, spawn_key=(key, *stream)))
        )
        self.varying = is_varying(factor)

    def draw(self, n: int) -> FloatArray:
        """The next ``n`` samples (the nominal value for a factor that does not vary)."""
        f = self.factor
        if not self.varying:
            return np.full(n, f.nominal, dtype=np.float64)
        if f.distribution == "uniform":
            u = self.rng.random(n)
            u *= f.high - f.low
            u += f.low
            # Rounding can land a hair past high; keep the range closed.
            np.minimum(u, f.high, out=u)
            return u
        # Truncated normal by rejection: redraw the (few) samples beyond ±sigmas.  The
        # generator is consumed in a fixed order, so this is deterministic.
        z = self.rng.standard_normal(n)
        bad = np.flatnonzero(np.abs(z) > f.sigmas)
        while bad.size:
            z[bad] = self.rng.standard_normal(bad.size)
            bad = bad[np.abs(z[bad]) > f.sigmas]
        mid = 0.5 * (f.low + f.high)
        scale = 0.5 * (f.high - f.low) / f.sigmas
        z *= scale
        z += mid
        # Rounding can push a value a hair past an end; keep the range closed.
        np.clip(z, f.low, f.high, out=z)
        return z
