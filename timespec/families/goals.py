"""Where a design should aim: requirement targets, scores and refinement toward a goal."""

from __future__ import annotations

import dataclasses
import functools
import math
from collections.abc import Callable, Sequence

import numpy as np

from timespec.analysis import Factor
from timespec.families.protocol import FloatArray
from timespec.model import Window
from timespec.parts.part import Part

__all__ = [
    "by_ref",
    "declare_monotone",
    "is_upper_bound",
    "scale_to_goal",
    "target",
    "window_score",
]


def is_upper_bound(window: Window) -> bool:
    """Whether a requirement is only an upper bound (``10 ms max`` reads as 0…10 ms).

    Parameters
    ----------
    window
        The requirement.

    Returns
    -------
    bool
        True for ``max`` bounds.
    """
    return window.nominal is None and window.low <= 0.0 and window.kind != "ratio"


def target(window: Window) -> float:
    """The value a design should aim its nominal at.

    Parameters
    ----------
    window
        The requirement.

    Returns
    -------
    float
        The midpoint of a two-sided window (its geometric mean for a frequency
        or time range wider than 2:1); 1.25 × a lower bound; 0.8 × an upper bound.
    """
    if math.isinf(window.high):
        return window.low * 1.25
    if is_upper_bound(window):
        return window.high * 0.8
    return 0.5 * (window.low + window.high)


def window_score(nominal: FloatArray, window: Window) -> FloatArray:
    """How far a nominal value sits from where a design should aim.

    Parameters
    ----------
    nominal
        Nominal outputs (any shape).
    window
        The requirement.

    Returns
    -------
    FloatArray
        ``|nominal − target| / scale`` where the scale is the half-width of a
        two-sided window, or the bound itself for a one-sided one.
    """
    nominal = np.asarray(nominal, dtype=np.float64)
    aim = target(window)
    if math.isinf(window.high) or is_upper_bound(window):
        scale = abs(aim) or 1.0
    else:
        scale = 0.5 * (window.high - window.low) or (abs(aim) * 1e-9 or 1e-30)
    return np.asarray(np.abs(nominal - aim) / scale, dtype=np.float64)


def by_ref(parts: Sequence[Part]) -> dict[str, Part]:
    """Index parts by reference.

    Parameters
    ----------
    parts
        Parts.

    Returns
    -------
    dict
        ref → part.
    """
    return {p.ref: p for p in parts}


def scale_to_goal(
    model: Callable[[FloatArray], FloatArray], goal: float, x0: FloatArray
) -> FloatArray:
    """Refine continuous part values so that a time comes out on target.

    Parameters
    ----------
    model
        Maps an array of part values to the resulting times.
    goal
        The time to aim at.
    x0
        First guesses (from the ideal closed form).

    Returns
    -------
    FloatArray
        The values after two multiplicative corrections ``x ← x·goal/model(x)``;
        nan where the model gives no finite positive time.

    Notes
    -----
    Times of RC circuits are nearly proportional to R and to C, so two
    corrections bring in the second-order effects (drain current, on-resistance).
    """
    x = np.asarray(x0, dtype=np.float64)
    for _ in range(2):
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            t = np.asarray(model(x), dtype=np.float64)
            ratio = np.where(np.isfinite(t) & (t > 0), goal / t, np.nan)
        x = x * ratio
    return x


@functools.lru_cache(maxsize=8192)
def declare_monotone(
    factor: Factor, output: str, rising: frozenset[str], falling: frozenset[str]
) -> Factor:
    """Mark a factor as moving one output monotonically (see :class:`~timespec.analysis.Factor`).

    Parameters
    ----------
    factor
        The factor.
    output
        The output name.
    rising, falling
        Names of the factors in which the output never falls / never rises.

    Returns
    -------
    Factor
        The factor with ``rising=(output,)`` or ``falling=(output,)``, or unchanged.
    """
    if factor.name in rising:
        return dataclasses.replace(factor, rising=(output,))
    if factor.name in falling:
        return dataclasses.replace(factor, falling=(output,))
    return factor
