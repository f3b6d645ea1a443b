"""Small statistical helpers for the analysis engine, written without scipy.

Everything here works on plain Python floats and uses only :mod:`math`, so the
engine needs nothing beyond numpy at run time.  The functions are checked against
``scipy.stats`` in the test suite.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = [
    "CAPABILITY_MIN_SAMPLES",
    "TAIL_PERCENT",
    "Capability",
    "cpk",
    "normal_cdf",
    "normal_pdf",
    "normal_quantile",
    "percentile_capability",
    "truncated_normal_std",
    "wilson_interval",
]

_SQRT2 = math.sqrt(2.0)
_SQRT2PI = math.sqrt(2.0 * math.pi)

# Rational approximation of the normal quantile (relative error below 1.2e-9), from
# P. J. Acklam's published algorithm.  Coefficients from memory; the Halley step below
# polishes the result to double precision and the tests compare with scipy.stats.
_A = (
    -3.969683028665376e01,
    2.209460984245205e02,
    -2.759285104469687e02,
    1.383577518672690e02,
    -3.066479806614716e01,
    2.506628277459239e00,
)
_B = (
    -5.447609879822406e01,
    1.615858368580409e02,
    -1.556989798598866e02,
    6.680131188771972e01,
    -1.328068155288572e01,
)
_C = (
    -7.784894002430293e-03,
    -3.223964580411365e-01,
    -2.400758277161838e00,
    -2.549732539343734e00,
    4.374664141464968e00,
    2.938163982698783e00,
)
_D = (
    7.784695709041462e-03,
    3.224671290700398e-01,
    2.445134137142996e00,
    3.754408661907416e00,
)
_P_LOW = 0.02425


def normal_pdf(x: float) -> float:
    """Probability density of the standard normal distribution.

    Parameters
    ----------
    x : float
        Argument, in standard deviations.

    Returns
    -------
    float
        ``phi(x)``.

    Notes
    -----
    ``phi(x) = exp(-x**2 / 2) / sqrt(2*pi)``.

    References
    ----------
    Definition of the Gaussian density, any probability handbook.
    """
    return math.exp(-0.5 * x * x) / _SQRT2PI


def normal_cdf(x: float) -> float:
    """Cumulative distribution function of the standard normal distribution.

    Parameters
    ----------
    x : float
        Argument, in standard deviations (``±inf`` allowed).

    Returns
    -------
    float
        ``Phi(x)``, accurate to double precision in both tails.

    Notes
    -----
    ``Phi(x) = erfc(-x / sqrt(2)) / 2``; using the complementary error function keeps
    full relative precision in the lower tail.

    References
    ----------
    Relation between the normal CDF and the error function, any probability handbook.
    """
    return 0.5 * math.erfc(-x / _SQRT2)


def _lower_quantile(p: float) -> float:
    """Normal quantile for ``0 < p <= 0.5`` (Acklam start plus one Halley step)."""
    if p < _P_LOW:
        q = math.sqrt(-2.0 * math.log(p))
        num = ((((_C[0] * q + _C[1]) * q + _C[2]) * q + _C[3]) * q + _C[4]) * q + _C[5]
        den = (((_D[0] * q + _D[1]) * q + _D[2]) * q + _D[3]) * q + 1.0
        x = num / den
    else:
        q = p - 0.5
        r = q * q
        num = (((((_A[0] * r + _A[1]) * r + _A[2]) * r + _A[3]) * r + _A[4]) * r + _A[5]) * q
        den = ((((_B[0] * r + _B[1]) * r + _B[2]) * r + _B[3]) * r + _B[4]) * r + 1.0
        x = num / den
    # Halley refinement: the residual uses erfc, accurate relative to p in this tail.
    e = normal_cdf(x) - p
    u = e * _SQRT2PI * math.exp(0.5 * x * x)
    return x - u / (1.0 + 0.5 * x * u)


def normal_quantile(p: float) -> float:
    """Quantile (inverse CDF) of the standard normal distribution, to double precision.

    Parameters
    ----------
    p : float
        Probability in ``[0, 1]``.

    Returns
    -------
    float
        ``x`` with ``Phi(x) = p``; ``-inf`` for 0 and ``+inf`` for 1.

    Raises
    ------
    ValueError
        If ``p`` is outside ``[0, 1]`` or not a number.

    Notes
    -----
    A rational approximation (relative error about 1e-9) gives a start value that one
    Halley step, ``x -= u / (1 + x*u/2)`` with ``u = (Phi(x) - p) * sqrt(2*pi) *
    exp(x**2/2)``, refines to double precision.  For ``p > 0.5`` the symmetry
    ``x(p) = -x(1 - p)`` is used; ``1 - p`` is exact there (Sterbenz lemma).

    References
    ----------
    P. J. Acklam, "An algorithm for computing the inverse normal cumulative
    distribution function" (published note, coefficients from memory); Halley's
    method, any numerical-analysis text.
    """
    if not 0.0 <= p <= 1.0:  # also rejects NaN
        raise ValueError(f"probability must be in [0, 1], got {p!r}")
    if p == 0.0:
        return -math.inf
    if p == 1.0:
        return math.inf
    if p > 0.5:
        return -_lower_quantile(1.0 - p)
    return _lower_quantile(p)


def truncated_normal_std(half_range: float, sigmas: float) -> float:
    """Standard deviation of a normal distribution truncated symmetrically about its mean.

    Parameters
    ----------
    half_range : float
        Half-width of the allowed interval (the tolerance), ``>= 0``.
    sigmas : float
        How many standard deviations of the parent normal the half-range spans, ``> 0``.

    Returns
    -------
    float
        Standard deviation of the truncated distribution (smaller than
        ``half_range / sigmas``).

    Raises
    ------
    ValueError
        If ``half_range < 0`` or ``sigmas <= 0``.

    Notes
    -----
    For a parent normal ``N(mu, s**2)`` with ``s = half_range / sigmas`` truncated to
    ``mu ± sigmas*s``::

        var = s**2 * (1 - 2*k*phi(k) / (2*Phi(k) - 1)),   k = sigmas

    References
    ----------
    Moments of the doubly truncated normal distribution, e.g. N. L. Johnson, S. Kotz and
    N. Balakrishnan, *Continuous Univariate Distributions*, vol. 1, chapter 13.
    """
    if not half_range >= 0.0:
        raise ValueError(f"half_range must be >= 0, got {half_range!r}")
    if not sigmas > 0.0:
        raise ValueError(f"sigmas must be > 0, got {sigmas!r}")
    s = half_range / sigmas
    k = sigmas
    mass = math.erf(k / _SQRT2)  # 2*Phi(k) - 1 without cancellation
    factor = 1.0 - 2.0 * k * normal_pdf(k) / mass
    return s * math.sqrt(max(factor, 0.0))


def wilson_interval(passed: int, n: int, confidence: float = 0.95) -> tuple[float, float]:
    """Wilson score confidence interval for a binomial proportion.

    Parameters
    ----------
    passed : int
        Number of successes, ``0 <= passed <= n``.
    n : int
        Number of trials, ``>= 0``.
    confidence : float, optional
        Two-sided confidence level in ``(0, 1)``; default 0.95.

    Returns
    -------
    tuple of float
        ``(lower, upper)`` within ``[0, 1]``; ``(0.0, 1.0)`` when ``n == 0``.

    Raises
    ------
    ValueError
        On counts out of range or a confidence level outside ``(0, 1)``.

    Notes
    -----
    With ``p = passed/n`` and ``z`` the ``(1 + confidence)/2`` normal quantile::

        centre = (p + z**2/(2n)) / (1 + z**2/n)
        half   = z / (1 + z**2/n) * sqrt(p(1-p)/n + z**2/(4 n**2))

    The bounds are exactly 0 when ``passed == 0`` and exactly 1 when ``passed == n``.

    References
    ----------
    E. B. Wilson, "Probable inference, the law of succession, and statistical
    inference", Journal of the American Statistical Association 22 (1927).
    """
    if n < 0 or passed < 0 or passed > n:
        raise ValueError(f"need 0 <= passed <= n, got passed={passed}, n={n}")
    if not 0.0 < confidence < 1.0:
        raise ValueError(f"confidence must be in (0, 1), got {confidence!r}")
    if n == 0:
        return (0.0, 1.0)
    z = normal_quantile(0.5 + 0.5 * confidence)
    p = passed / n
    z2n = z * z / n
    centre = (p + 0.5 * z2n) / (1.0 + z2n)
    half = z / (1.0 + z2n) * math.sqrt(p * (1.0 - p) / n + z * z / (4.0 * n * n))
    lower = 0.0 if passed == 0 else max(0.0, centre - half)
    upper = 1.0 if passed == n else min(1.0, centre + half)
    return (lower, upper)


def cpk(mean: float, std: float, low: float, high: float) -> float | None:
    """Process capability index of a distribution against a window.

    Parameters
    ----------
    mean : float
        Mean of the output.
    std : float
        Standard deviation of the output.
    low, high : float
        Window limits (lower and upper specification limit); ``-inf`` / ``+inf`` make a
        one-sided window.

    Returns
    -------
    float or None
        ``min(high - mean, mean - low) / (3 * std)``; negative when the mean lies outside
        the window; ``inf`` when both limits are infinite.  ``None`` when ``std`` is zero
        or ``mean``/``std`` is not finite (the index is then undefined).

    Raises
    ------
    ValueError
        If ``low > high``.

    Notes
    -----
    ``Cpk = min(USL - mu, mu - LSL) / (3 sigma)``.  An infinite limit drops out of the
    minimum, which gives the one-sided index.

    References
    ----------
    Process capability indices as defined in ISO 22514-2 (common practice in
    manufacturing statistics).
    """
    if low > high:
        raise ValueError(f"window low {low!r} is above high {high!r}")
    if not (math.isfinite(mean) and math.isfinite(std)) or std <= 0.0:
        return None
    return min(high - mean, mean - low) / (3.0 * std)


TAIL_PERCENT = 0.135
"""Percent of a distribution beyond each end of the capability spread.

``Phi(-3) = 0.13499 %`` (the normal ``±3 sigma`` tails, so the percentile method gives the
classical index for a normal output); ISO 22514-2 uses the 0.135 % and 99.865 % points.
"""

CAPABILITY_MIN_SAMPLES = math.ceil(10.0 / (TAIL_PERCENT / 100.0))
"""Fewest samples for a percentile capability index: 7408.

The 0.135 % and 99.865 % points are estimated from the samples beyond them; with at
least 10 samples in each tail (``N * 0.00135 >= 10``) the order statistic is a usable
estimate.  Below this count no index is given rather than one from a normal model the
output may not follow.
"""


@dataclass(frozen=True)
class Capability:
    """Process capability of an output against its window, by the percentile method.

    Parameters
    ----------
    cp : float or None
        ``(U - L) / (X99.865 - X0.135)``; ``None`` for a one-sided window.
    cpk : float
        The smaller of ``lower`` and ``upper`` (the one-sided index for a one-sided
        window); ``inf`` when both limits are infinite.
    lower, upper : float or None
        ``(X50 - L) / (X50 - X0.135)`` and ``(U - X50) / (X99.865 - X50)``; ``None`` for
        an infinite limit.
    samples : int
        Samples the percentiles came from.
    method : str
        ``"percentile"``.
    """

    cp: float | None
    cpk: float
    lower: float | None
    upper: float | None
    samples: int
    method: str = "percentile"


def _side(room: float, spread: float) -> float:
    """``room / spread`` with the limits of a zero spread (a side with no scatter)."""
    if spread > 0.0:
        return room / spread
    if room > 0.0:
        return math.inf
    return 0.0 if room == 0.0 else -math.inf


def percentile_capability(
    p_low: float,
    median: float,
    p_high: float,
    low: float,
    high: float,
    *,
    samples: int,
) -> Capability | None:
    """Capability index of any distribution from its percentiles (percentile method).

    Parameters
    ----------
    p_low, median, p_high : float
        The 0.135 %, 50 % and 99.865 % points of the output (``±inf`` allowed in the
        tails: a tail of samples that never settle).
    low, high : float
        Window (specification) limits; ``-inf``/``+inf`` for a one-sided window.
    samples : int
        Samples behind the percentiles (kept in the result).

    Returns
    -------
    Capability or None
        ``None`` when the median is not finite or the output has no spread at all
        (``p_low == p_high``), where the index is undefined.

    Raises
    ------
    ValueError
        If ``low > high``.

    Notes
    -----
    ISO 22514-2 style percentile method, for outputs that are not normal::

        Cp  = (U - L) / (X99.865 - X0.135)
        Cpl = (X50 - L) / (X50 - X0.135),   Cpu = (U - X50) / (X99.865 - X50)
        Cpk = min(Cpl, Cpu)

    For a normal output ``X99.865 - X50 = X50 - X0.135 = 3 sigma`` and these equal the
    classical ``(U - mu) / 3 sigma`` forms.  An infinite limit drops its side (the
    one-sided index).  Consistency with the yield: ``Cpu >= 1`` exactly when
    ``X99.865 <= U``, i.e. when at most 0.135 % of the samples lie above ``U``; so when
    every sample is inside the window both sides are ``>= 1`` and the index never
    claims less than the yield shows, and an index ``< 1`` means more than 0.135 % of
    the samples fall beyond that limit.

    References
    ----------
    ISO 22514-2 (process capability and performance, time-dependent process models),
    percentile (quantile) method for non-normal distributions; ``Phi(-3) = 0.135 %``
    from the normal distribution.
    """
    if low > high:
        raise ValueError(f"window low {low!r} is above high {high!r}")
    if not math.isfinite(median) or math.isnan(p_low) or math.isnan(p_high):
        return None
    if p_low == p_high:
        return None
    lower = _side(median - low, median - p_low) if math.isfinite(low) else None
    upper = _side(high - median, p_high - median) if math.isfinite(high) else None
    sides = [v for v in (lower, upper) if v is not None]
    index = min(sides) if sides else math.inf
    cp = None
    if lower is not None and upper is not None:
        cp = _side(high - low, p_high - p_low)
    return Capability(cp=cp, cpk=index, lower=lower, upper=upper, samples=samples)
