"""The nominal model the astable's candidate search steers by.

:func:`nominal_run` turns a variant's vectorised model into a function of part
values alone (every other factor at its nominal, optionally overridden per
sample).  The variants' resistor searches
(:mod:`~timespec.families.astable.discharge`,
:mod:`~timespec.families.astable.feedback`) call it to measure nominal gains and
to correct their closed-form solutions, each step scaled by :func:`safe_ratio`.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

import numpy as np

from timespec.families.protocol import Evaluate, FloatArray

__all__ = ["NominalRun", "nominal_run", "safe_ratio"]

#: Part values by reference (and optional factor overrides, nan = keep the
#: nominal) → outputs.
NominalRun = Callable[..., dict[str, FloatArray]]


def nominal_run(nominal: Mapping[str, float], model: Evaluate) -> NominalRun:
    """The model with every factor at its nominal except the part values.

    Parameters
    ----------
    nominal
        Nominal value of every factor, by name.
    model
        The variant's vectorised model.

    Returns
    -------
    NominalRun
        ``run(values, extra=None)``: ``values`` maps part references to arrays of
        values (broadcast to one length); ``extra`` maps factor names to columns
        of that length whose non-nan entries replace the nominal.
    """

    def run(
        values: Mapping[str, FloatArray], extra: Mapping[str, FloatArray] | None = None
    ) -> dict[str, FloatArray]:
        n = max(np.size(v) for v in values.values())
        x = {k: np.full(n, v) for k, v in nominal.items()}
        for ref, val in values.items():
            x[f"{ref}.value"] = np.broadcast_to(np.asarray(val, dtype=np.float64), (n,)).copy()
        for name, col in (extra or {}).items():
            if name in x:
                x[name] = np.where(np.isnan(col), x[name], col)
        return model(x)

    return run


def safe_ratio(goal: float, t: FloatArray) -> FloatArray:
    """``goal/t`` where ``t`` is a usable time, else nan (the candidate is dropped).

    Parameters
    ----------
    goal
        Target time, s.
    t
        Times the model gives, s.

    Returns
    -------
    FloatArray
        The correction factor per entry.
    """
    t = np.asarray(t, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.asarray(np.where(np.isfinite(t) & (t > 0), goal / t, np.nan), dtype=np.float64)
