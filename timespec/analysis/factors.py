"""Factors: the varying inputs of a circuit, as the analysis engine sees them.

A circuit family describes everything that varies (part tolerances, temperature,
supply, the timer's threshold ratio ...) as a list of :class:`Factor` and gives a
vectorised function ``evaluate(inputs) -> outputs`` mapping factor name to an array of
samples onto output name to an array of results.  The engines in
:mod:`timespec.analysis.worstcase`, :mod:`timespec.analysis.rss` and
:mod:`timespec.analysis.montecarlo` only ever talk to a circuit through these two things.
All values are SI floats.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import Literal, TypeAlias, get_args

import numpy as np
import numpy.typing as npt

__all__ = [
    "Distribution",
    "Evaluate",
    "Factor",
    "FloatArray",
    "call_evaluate",
    "check_factors",
    "is_varying",
    "nominal_inputs",
]

Distribution: TypeAlias = Literal["uniform", "normal", "fixed"]
"""How a factor is spread over its range."""

FloatArray: TypeAlias = npt.NDArray[np.float64]
"""A one-dimensional float64 array of samples."""

Evaluate: TypeAlias = Callable[[Mapping[str, FloatArray]], Mapping[str, FloatArray]]
"""A circuit model: factor name → samples, to output name → results (same length)."""

_DISTRIBUTIONS: frozenset[str] = frozenset(get_args(Distribution))


@dataclass(frozen=True)
class Factor:
    """One varying input of a circuit.

    Parameters
    ----------
    name : str
        Unique key, e.g. ``"R1.tol"``, ``"temp"``, ``"supply"``, ``"timer.ratio"``.
    label : str
        Human text, e.g. ``"R1 tolerance (±1 %)"``.
    nominal : float
        Value at the nominal design point.
    low, high : float
        The range the factor can take, ``low <= nominal <= high``.
    distribution : {"uniform", "normal", "fixed"}, optional
        ``"uniform"`` (default) spreads evenly over ``[low, high]``; ``"normal"`` is a
        normal distribution centred on the midpoint of the range with the half-range
        equal to ``sigmas`` standard deviations, truncated at ``[low, high]`` (parts out
        of tolerance are rejected at the factory, common practice); ``"fixed"`` never
        varies and always takes ``nominal``.
    sigmas : float, optional
        For ``"normal"``: how many standard deviations the half-range spans (default 3).
    monotone : bool, optional
        ``True`` (default) when every output is monotone in this factor, so the
        worst case lies at an end of its range; ``False`` makes the worst-case search
        look inside the range too.
    group : str, optional
        Grouping key for contributors, e.g. ``"R1"``, ``"C1"``, ``"timer"``,
        ``"operating"``.
    rising, falling : tuple of str, optional
        Outputs known to be non-decreasing (``rising``) or non-increasing
        (``falling``) in this factor everywhere in the box, whatever the other
        factors are.  The worst-case search then fixes the factor at the right
        end for each extreme instead of enumerating both, which halves its grid
        per declared factor.  A declaration is a proof obligation of the family
        that makes it; tests compare the reduced search with the full one.
    through : str, optional
        Name of one effective value this factor acts through (e.g. ``"C"`` for
        the tolerance, tempco, ageing and DC-bias factors of capacitor ``C`` and
        the node stray that adds to it): the model sees the factors that share
        it only through that value, which rises with each of them (see
        ``pivot``).  The worst-case search then visits only the lowest and the
        highest effective value instead of every combination of their ends,
        which is exact whenever the outputs are monotone in each factor (the
        premise of the corner search): an output monotone along every edge of
        the box cannot peak at an effective value strictly inside the range.
        Empty (default): the factor is enumerated on its own.
    pivot : tuple of (str, float), optional
        For a factor that multiplies an offset of another factor (a tempco,
        ``(T − 25)``): ``(name, value)``; the effective value rises with this
        factor where ``name`` is above ``value`` and falls where it is below.
        ``None`` (default): it always rises.

    Raises
    ------
    ValueError
        If a value is not finite, the range does not hold the nominal value,
        ``sigmas <= 0``, the name is empty or the distribution is unknown.
    """

    name: str
    label: str
    nominal: float
    low: float
    high: float
    distribution: Distribution = "uniform"
    sigmas: float = 3.0
    monotone: bool = True
    group: str = ""
    rising: tuple[str, ...] = ()
    falling: tuple[str, ...] = ()
    through: str = ""
    pivot: tuple[str, float] | None = None

    def __post_init__(self) -> None:
        if not self.name:
            raise ValueError("a factor needs a non-empty name")
        if self.pivot is not None and not self.through:
            raise ValueError(f"factor {self.name!r}: a pivot needs a 'through' value")
        for field in ("nominal", "low", "high", "sigmas"):
            value = getattr(self, field)
            if not math.isfinite(value):
                raise ValueError(f"factor {self.name!r}: {field} must be finite, got {value!r}")
        if not self.low <= self.nominal <= self.high:
            raise ValueError(
                f"factor {self.name!r}: need low <= nominal <= high, got "
                f"{self.low!r} <= {self.nominal!r} <= {self.high!r}"
            )
        if not self.sigmas > 0.0:
            raise ValueError(f"factor {self.name!r}: sigmas must be > 0, got {self.sigmas!r}")
        if self.distribution not in _DISTRIBUTIONS:
            raise ValueError(
                f"factor {self.name!r}: unknown distribution {self.distribution!r}; "
                f"use one of {sorted(_DISTRIBUTIONS)}"
            )


def is_varying(factor: Factor) -> bool:
    """Tell whether a factor takes more than one value.

    Parameters
    ----------
    factor : Factor
        The factor.

    Returns
    -------
    bool
        ``False`` for ``"fixed"`` factors and for an empty range (``low == high``).
    """
    return factor.distribution != "fixed" and factor.high > factor.low


def check_factors(factors: Sequence[Factor]) -> tuple[Factor, ...]:
    """Validate a list of factors for use by an engine.

    Parameters
    ----------
    factors : sequence of Factor
        The factors of one circuit.

    Returns
    -------
    tuple of Factor
        The same factors, as a tuple.

    Raises
    ------
    ValueError
        If two factors share a name.
    """
    out = tuple(factors)
    seen: set[str] = set()
    for f in out:
        if f.name in seen:
            raise ValueError(f"duplicate factor name {f.name!r}")
        seen.add(f.name)
    return out


def nominal_inputs(factors: Sequence[Factor]) -> dict[str, FloatArray]:
    """Inputs for evaluating a circuit at its nominal point.

    Parameters
    ----------
    factors : sequence of Factor
        The factors of one circuit.

    Returns
    -------
    dict of str to FloatArray
        Factor name → one-element array holding the nominal value.
    """
    return {f.name: np.array([f.nominal], dtype=np.float64) for f in factors}


def call_evaluate(
    evaluate: Evaluate, inputs: Mapping[str, FloatArray], n: int
) -> dict[str, FloatArray]:
    """Call a circuit model and normalise its outputs.

    Parameters
    ----------
    evaluate : Evaluate
        The circuit model.
    inputs : mapping of str to FloatArray
        Factor name → ``n`` samples.
    n : int
        Number of samples in every input array.

    Returns
    -------
    dict of str to FloatArray
        Output name → float64 array of shape ``(n,)``.  An output that does not depend
        on the inputs may be returned as a scalar; it is broadcast to ``(n,)``.

    Raises
    ------
    ValueError
        If the model returns no outputs or an output of an incompatible shape.
    """
    result = evaluate(inputs)
    if not result:
        raise ValueError("evaluate returned no outputs")
    out: dict[str, FloatArray] = {}
    for key, value in result.items():
        arr = np.asarray(value, dtype=np.float64)
        if arr.shape != (n,):
            try:
                arr = np.broadcast_to(arr, (n,))
            except ValueError:
                raise ValueError(
                    f"evaluate returned output {key!r} with shape {arr.shape}, expected ({n},)"
                ) from None
        out[str(key)] = arr
    return out
