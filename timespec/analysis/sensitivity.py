"""Which inputs drive an output: variance-based (Sobol-type) shares from sampling.

First-order propagation (:func:`timespec.analysis.rss`) ranks inputs by ``(c_i u_i)**2``
with ``c_i`` the slope at the nominal point.  A tempco enters a part value as
``(1 + tc * (T - 25 °C))``: at the nominal 25 °C its slope is exactly zero, so first
order gives it a 0 % share although, together with the ambient, it moves the
worst-case corner.  Its effect is an *interaction* (a product of two inputs), which
only a variance decomposition sees.

Method
------
Two independent sample matrices ``A`` and ``B`` (``N`` rows, every varying factor drawn
from its own distribution) and, for each varying factor ``i``, ``A_B^i``: ``A`` with
column ``i`` taken from ``B``.  With ``V`` the output variance:

* first-order index ``S_i = V_i / V``, ``V_i = mean(f(B) * (f(A_B^i) - f(A)))``
  (Saltelli et al. 2010): the variance explained by ``x_i`` alone;
* total index ``S_Ti = V_Ti / V``, ``V_Ti = mean((f(A) - f(A_B^i))**2) / 2`` (Jansen
  1999): everything ``x_i`` takes part in, interactions included.  It is positive for
  every input that changes the output at all, so no driver reads 0 %.

The share shown as a *driver* splits the variance so the shares add to 100 %: each
input keeps its own part and half of each pairwise interaction it is in::

    phi_i = (S_i + S_Ti) / 2,        share_i = phi_i / sum_j phi_j

For independent inputs the Shapley effect ``Sh_i`` (the fair split of ``V``, which
sums to 1) always lies in ``[S_i, S_Ti]`` (Owen 2014), and equals ``(S_i + S_Ti) / 2``
exactly when the model has no interaction of more than two inputs; the final
normalisation spreads any higher-order remainder in proportion.  ``S_i`` is clipped to
``[0, S_Ti]`` first (its estimate is noisy for small effects), so ``share_i >= S_Ti /
2 / sum_j phi_j > 0`` for an input with any effect.

Cost and accuracy: ``N * (k + 2)`` model evaluations for ``k`` varying factors, in a
few vectorised calls.  The standard errors of the estimates, from the central limit
theorem on the per-sample terms, are kept beside them (``first_order_se``,
``total_se``); with ``N = 8192`` they are about 0.01 for a dominant input.
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
    is_varying,
)
from timespec.analysis.sampling import FactorSampler

__all__ = ["DRIVER_METHOD", "VarianceShare", "variance_shares"]

DRIVER_METHOD = "variance shares (S_i + S_Ti)/2, Sobol indices by Saltelli 2010 / Jansen 1999"
"""How driver shares are computed, as written into the JSON document."""

_STREAM_A = 1  # spawn-key suffixes: independent of the Monte Carlo yield run's streams
_STREAM_B = 2
_ROWS = 65_536  # model rows per call (bounds memory)


@dataclass(frozen=True)
class VarianceShare:
    """One input's part in the variance of one output.

    Parameters
    ----------
    name, label, group : str
        Copied from the factor.
    share : float
        The driver share ``phi_i / sum_j phi_j`` with ``phi_i = (S_i + S_Ti) / 2``; the
        shares of one output add to 1 (all 0 for a constant output, NaN when the
        variance is not finite).
    first_order : float
        First-order Sobol index ``S_i`` (clipped to ``[0, total]``).
    total : float
        Total Sobol index ``S_Ti``.
    first_order_se, total_se : float
        Standard errors of the two estimates (central limit theorem, ignoring the
        uncertainty of ``V``).
    """

    name: str
    label: str
    group: str
    share: float
    first_order: float
    total: float
    first_order_se: float
    total_se: float


def _draws(facs: Sequence[Factor], n: int, seed: int, stream: int) -> dict[str, FloatArray]:
    return {f.name: FactorSampler(f, seed, (stream,)).draw(n) for f in facs}


def _stack(parts: list[dict[str, FloatArray]]) -> dict[str, FloatArray]:
    return {key: np.concatenate([p[key] for p in parts]) for key in parts[0]}


def variance_shares(
    factors: Sequence[Factor],
    evaluate: Evaluate,
    *,
    samples: int,
    seed: int,
) -> dict[str, tuple[VarianceShare, ...]]:
    """Variance-based driver shares of every output (Sobol first-order and total).

    Parameters
    ----------
    factors : sequence of Factor
        The circuit's factors.
    evaluate : Evaluate
        Vectorised circuit model.
    samples : int
        Base sample count ``N`` (``>= 2``); the model is evaluated ``N * (k + 2)``
        times for ``k`` varying factors.
    seed : int
        Non-negative seed.  Each factor draws its two matrices' columns from its own
        streams, independent of the Monte Carlo yield run with the same seed.

    Returns
    -------
    dict of str to tuple of VarianceShare
        Output name → one entry per varying factor, largest share first (ties keep
        factor order).  Factors that do not vary are left out.

    Raises
    ------
    ValueError
        On ``samples < 2``, a negative seed, repeated factor names or malformed model
        outputs.

    Notes
    -----
    See the module docstring.  Rows where any of ``f(A)``, ``f(B)`` or ``f(A_B^i)`` is
    not finite are left out of factor ``i``'s estimates; ``V`` is the variance of the
    finite values of ``f(A)`` and ``f(B)`` together.  Outputs are centred on that mean
    before the products are formed (lower variance of the first-order estimate).

    References
    ----------
    I. M. Sobol', "Global sensitivity indices for nonlinear mathematical models and
    their Monte Carlo estimates", Math. Comput. Simul. 55 (2001); A. Saltelli et al.,
    "Variance based sensitivity analysis of model output. Design and estimator for the
    total sensitivity index", Comput. Phys. Commun. 181 (2010) 259-270; M. J. W.
    Jansen, "Analysis of variance designs for model output", Comput. Phys. Commun. 117
    (1999); A. B. Owen, "Sobol' indices and Shapley value", SIAM/ASA J. Uncertainty
    Quantification 2 (2014).
    """
    if samples < 2:
        raise ValueError(f"samples must be at least 2, got {samples}")
    if seed < 0:
        raise ValueError(f"seed must be non-negative, got {seed}")
    facs = check_factors(factors)
    n = samples
    varying = [f for f in facs if is_varying(f)]
    a = _draws(facs, n, seed, _STREAM_A)
    b = _draws(facs, n, seed, _STREAM_B)
    base = call_evaluate(evaluate, _stack([a, b]), 2 * n)
    ya = {key: y[:n] for key, y in base.items()}
    yb = {key: y[n:] for key, y in base.items()}
    yab: dict[str, list[FloatArray]] = {key: [] for key in base}
    per_call = max(1, _ROWS // n)
    for start in range(0, len(varying), per_call):
        group = varying[start : start + per_call]
        parts = []
        for f in group:
            mixed = dict(a)
            mixed[f.name] = b[f.name]
            parts.append(mixed)
        out = call_evaluate(evaluate, _stack(parts), n * len(group))
        if out.keys() != base.keys():
            raise ValueError(f"evaluate returned outputs {sorted(out)}, expected {sorted(base)}")
        for key, y in out.items():
            yab[key].extend(y[j * n : (j + 1) * n] for j in range(len(group)))
    return {key: _shares(varying, ya[key], yb[key], yab[key]) for key in base}


def _shares(
    varying: Sequence[Factor], ya: FloatArray, yb: FloatArray, yab: Sequence[FloatArray]
) -> tuple[VarianceShare, ...]:
    both = np.concatenate([ya, yb])
    finite = both[np.isfinite(both)]
    if finite.size < 2:
        var = math.nan
        mean = math.nan
    else:
        mean = float(finite.mean())
        var = float(finite.var(ddof=1))
    raw: list[tuple[Factor, float, float, float, float]] = []
    for f, y_i in zip(varying, yab, strict=True):
        ok = np.isfinite(ya) & np.isfinite(yb) & np.isfinite(y_i)
        m = int(np.count_nonzero(ok))
        if not math.isfinite(var) or m < 2:
            raw.append((f, math.nan, math.nan, math.nan, math.nan))
            continue
        if var == 0.0:
            raw.append((f, 0.0, 0.0, 0.0, 0.0))
            continue
        a_c, b_c, i_c = ya[ok] - mean, yb[ok] - mean, y_i[ok] - mean
        t_first = b_c * (i_c - a_c)  # Saltelli et al. 2010
        diff = a_c - i_c
        t_total = 0.5 * diff * diff  # Jansen 1999
        s_t = float(t_total.mean()) / var
        s_1 = min(max(float(t_first.mean()) / var, 0.0), s_t)
        se_1 = float(t_first.std(ddof=1)) / math.sqrt(m) / var
        se_t = float(t_total.std(ddof=1)) / math.sqrt(m) / var
        raw.append((f, s_1, s_t, se_1, se_t))
    phi = [0.5 * (r[1] + r[2]) for r in raw]
    total = math.fsum(phi)
    result = []
    for (f, s_1, s_t, se_1, se_t), p in zip(raw, phi, strict=True):
        if math.isnan(total):
            share = math.nan
        elif total == 0.0:
            share = 0.0
        else:
            share = p / total
        result.append(
            VarianceShare(
                name=f.name,
                label=f.label,
                group=f.group,
                share=share,
                first_order=s_1,
                total=s_t,
                first_order_se=se_1,
                total_se=se_t,
            )
        )
    result.sort(key=lambda v: -v.share if not math.isnan(v.share) else 0.0)
    return tuple(result)
