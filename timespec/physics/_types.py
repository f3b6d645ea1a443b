"""Type aliases shared by the physics modules.

Every physics function accepts plain floats or numpy arrays of float64 (broadcast
together) and returns a float64 ``numpy.ndarray`` (zero-dimensional for scalar input).
"""

from __future__ import annotations

import functools
from collections.abc import Callable
from typing import ParamSpec, TypeAlias, TypeVar

import numpy as np
import numpy.typing as npt

__all__ = ["ArrayLike", "FloatArray", "as_float_array", "quiet"]

FloatArray: TypeAlias = npt.NDArray[np.float64]
"""A numpy array of float64 values (any shape, including zero-dimensional)."""

ArrayLike: TypeAlias = float | FloatArray
"""What the physics functions accept: a float or a float64 array."""


def as_float_array(x: ArrayLike) -> FloatArray:
    """Return ``x`` as a float64 ndarray (zero-dimensional for a scalar).

    Parameters
    ----------
    x : ArrayLike
        A float or an array of floats.

    Returns
    -------
    FloatArray
        ``numpy.asarray(x, dtype=numpy.float64)``; never a numpy scalar.
    """
    return np.asarray(x, dtype=np.float64)


_P = ParamSpec("_P")
_R = TypeVar("_R")


def quiet(func: Callable[_P, _R]) -> Callable[_P, _R]:
    """Run ``func`` with numpy floating-point warnings silenced.

    The physics functions signal "never reached" with ``inf`` and nonsense input with
    ``nan``; neither should raise a ``RuntimeWarning`` (the test suite turns warnings into
    errors, and so may callers).

    Parameters
    ----------
    func : Callable
        The function to wrap.

    Returns
    -------
    Callable
        ``func`` evaluated inside ``numpy.errstate(all="ignore")``.
    """

    @functools.wraps(func)
    def wrapper(*args: _P.args, **kwargs: _P.kwargs) -> _R:
        with np.errstate(all="ignore"):
            return func(*args, **kwargs)

    return wrapper
