"""Root-sum-square (first-order) propagation of factor spreads to the outputs.

Each factor contributes ``(c_i * u_i)**2`` to the output variance, where ``c_i`` is the
sensitivity of the output to the factor at the nominal point and ``u_i`` the standard
uncertainty of the factor.  This is the law of propagation of uncertainty for
uncorrelated inputs; it is accurate when the model is close to linear over the ranges.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from timespec.analysis.factors import (
    Evaluate,
    Factor,
    FloatArray,
    call_evaluate,
    check_factors,
)
from timespec.analysis.stats import truncated_normal_std

__all__ = [
    "Contribution",
    "RssResult",
    "grouped_shares",
    "rss",
    "standard_uncertainty",
]

_REL_STEP = 1e-4  # difference step as a fraction of the half-range


@dataclass(frozen=True)
class Contribution:
    """What one factor adds to the spread of one output.

    Parameters
    ----------
    name, label, group : str
        Copied from the factor.
    sensitivity : float
        ``d output / d factor`` at the nominal point.
    u_input : float
        Standard uncertainty (standard deviation) of the factor.
    u_output : float
        ``|sensitivity| * u_input``.
    share : float
        Fraction of the output variance, ``u_output**2 / sigma**2``; the shares sum to 1
        (all 0 when the total is 0, NaN when it is not finite).
    """

    name: str
    label: str
    group: str
    sensitivity: float
    u_input: float
    u_output: float
    share: float


@dataclass(frozen=True)
class RssResult:
    """First-order spread of one output.

    Parameters
    ----------
    nominal : float
        Output at the nominal point.
    sigma : float
        Combined standard uncertainty, ``sqrt(sum(u_output**2))``.
    contributions : tuple of Contribution
        One per factor, largest share first (ties keep factor order).
    """

    nominal: float
    sigma: float
    contributions: tuple[Contribution, ...]


def standard_uncertainty(factor: Factor) -> float:
    """Standard deviation of a factor's distribution.

    Parameters
    ----------
    factor : Factor
        The factor.

    Returns
    -------
    float
        ``"uniform"``: ``h / sqrt(3)``; ``"normal"``: the standard deviation of a normal
        with ``h = sigmas * s`` truncated at ``± h`` (slightly below ``h / sigmas``);
        ``"fixed"``: 0.  ``h = (high - low) / 2`` is the half-range.

    Notes
    -----
    The truncated-normal value matches what :func:`timespec.analysis.monte_carlo`
    samples, so the two methods agree; see
    :func:`timespec.analysis.stats.truncated_normal_std` for the formula.

    References
    ----------
    JCGM 100:2008 (GUM) 4.3.7 for the rectangular distribution; truncated-normal
    moments as cited in :func:`~timespec.analysis.stats.truncated_normal_std`.
    """
    half = 0.5 * (factor.high - factor.low)
    if factor.distribution == "fixed" or half == 0.0:
        return 0.0
    if factor.distribution == "uniform":
        return half / math.sqrt(3.0)
    return truncated_normal_std(half, factor.sigmas)


def _steps(factor: Factor) -> tuple[float, float, float]:
    """Difference offsets ``(d1, d2, h)`` for one factor.

    Central difference: ``d1 = -h, d2 = +h``.  When a central step would leave the
    range (nominal at an end), a one-sided second-order formula inside the range is
    used instead: ``d1 = ±h, d2 = ±2h``.
    """
    half = 0.5 * (factor.high - factor.low)
    if half > 0.0:
        h = _REL_STEP * half
    else:  # empty range: the contribution is zero, the sensitivity is still informative
        h = 1e-6 * abs(factor.nominal) if factor.nominal != 0.0 else 1e-6
    if half > 0.0 and factor.nominal - h < factor.low:
        return (h, 2.0 * h, h)
    if half > 0.0 and factor.nominal + h > factor.high:
        return (-h, -2.0 * h, h)
    return (-h, h, h)


def _derivative(f0: float, f1: float, f2: float, d1: float, d2: float, h: float) -> float:
    """Derivative from the nominal value and two offsets chosen by :func:`_steps`."""
    if d1 == -d2:  # central: (f(x+h) - f(x-h)) / 2h
        return (f2 - f1) / (2.0 * h)
    # one-sided, second order: (-3 f(x) + 4 f(x+d) - f(x+2d)) / (2d)
    return (-3.0 * f0 + 4.0 * f1 - f2) / (2.0 * d1)


def rss(factors: Sequence[Factor], evaluate: Evaluate) -> dict[str, RssResult]:
    """First-order (RSS) spread of every output, with per-factor contributions.

    Parameters
    ----------
    factors : sequence of Factor
        The circuit's factors.
    evaluate : Evaluate
        Vectorised circuit model.

    Returns
    -------
    dict of str to RssResult
        Output name → nominal value, combined standard deviation and contributions.

    Raises
    ------
    ValueError
        If factor names repeat or the model returns malformed outputs.

    Notes
    -----
    Law of propagation of uncertainty for uncorrelated inputs::

        u_c(y)**2 = sum_i (c_i * u(x_i))**2,   c_i = dy/dx_i at the nominal point

    ``c_i`` comes from a central difference with step ``1e-4`` of the factor's
    half-range (one-sided, second order, when the nominal value sits at an end of the
    range; ``1e-6`` relative to the nominal value when the range is empty).  All
    ``1 + 2n`` points are evaluated in a single call.  Being first order, RSS misses
    curvature: a factor at the vertex of a parabola gets zero sensitivity; use the
    worst-case or Monte Carlo engine for such models.  Non-finite outputs give
    non-finite sensitivities and ``sigma``.

    References
    ----------
    JCGM 100:2008, Evaluation of measurement data — Guide to the expression of
    uncertainty in measurement (GUM), 5.1.2 (law of propagation) and 4.3.7.
    """
    facs = check_factors(factors)
    n = len(facs)
    steps = [_steps(f) for f in facs]
    npts = 1 + 2 * n
    inputs: dict[str, FloatArray] = {}
    for j, f in enumerate(facs):
        col = np.full(npts, f.nominal, dtype=np.float64)
        col[1 + 2 * j] = f.nominal + steps[j][0]
        col[2 + 2 * j] = f.nominal + steps[j][1]
        inputs[f.name] = col
    outputs = call_evaluate(evaluate, inputs, npts)

    results: dict[str, RssResult] = {}
    for key, y in outputs.items():
        y0 = float(y[0])
        raw: list[tuple[Factor, float, float, float]] = []
        for j, f in enumerate(facs):
            d1, d2, h = steps[j]
            c = _derivative(y0, float(y[1 + 2 * j]), float(y[2 + 2 * j]), d1, d2, h)
            u = standard_uncertainty(f)
            u_out = abs(c) * u if u > 0.0 else 0.0
            raw.append((f, c, u, u_out))
        variance = math.fsum(r[3] ** 2 for r in raw)
        contributions = [
            Contribution(
                name=f.name,
                label=f.label,
                group=f.group,
                sensitivity=c,
                u_input=u,
                u_output=u_out,
                share=_share(u_out, variance),
            )
            for f, c, u, u_out in raw
        ]
        contributions.sort(key=lambda k: -k.share if not math.isnan(k.share) else 0.0)
        results[key] = RssResult(
            nominal=y0, sigma=math.sqrt(variance), contributions=tuple(contributions)
        )
    return results


def _share(u_out: float, variance: float) -> float:
    if not math.isfinite(variance):
        return math.nan
    if variance == 0.0:
        return 0.0
    return u_out**2 / variance


def grouped_shares(result: RssResult) -> list[tuple[str, float]]:
    """Variance shares summed by factor group.

    Parameters
    ----------
    result : RssResult
        The spread of one output.

    Returns
    -------
    list of (str, float)
        ``(group, share)`` pairs, largest share first.  A factor with an empty group
        counts under its own name.

    Notes
    -----
    For uncorrelated factors variances add, so a group's share of the output variance
    is the sum of its members' shares: ``share_g = sum(u_i**2 for i in g) / sigma**2``.

    References
    ----------
    JCGM 100:2008 (GUM) 5.1.2, additivity of the variance terms.
    """
    totals: dict[str, float] = {}
    for c in result.contributions:
        key = c.group or c.name
        totals[key] = totals.get(key, 0.0) + c.share
    return sorted(totals.items(), key=lambda kv: -kv[1] if not math.isnan(kv[1]) else 0.0)
