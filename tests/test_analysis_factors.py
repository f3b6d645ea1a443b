"""Tests of the Factor description and the evaluate-calling helpers."""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np
import pytest

from timespec.analysis.factors import (
    Factor,
    FloatArray,
    call_evaluate,
    check_factors,
    is_varying,
    nominal_inputs,
)


def test_factor_defaults() -> None:
    f = Factor("R1.tol", "R1 tolerance (±1 %)", 10e3, 9.9e3, 10.1e3)
    assert f.distribution == "uniform"
    assert f.sigmas == 3.0
    assert f.monotone is True
    assert f.group == ""


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"nominal": math.nan}, "finite"),
        ({"high": math.inf}, "finite"),
        ({"nominal": 2.0}, "low <= nominal <= high"),
        ({"low": 1.5}, "low <= nominal <= high"),
        ({"sigmas": 0.0}, "sigmas"),
        ({"distribution": "triangular"}, "unknown distribution"),
        ({"name": ""}, "name"),
    ],
)
def test_factor_validation(kwargs: dict[str, object], match: str) -> None:
    base: dict[str, object] = {
        "name": "x",
        "label": "x",
        "nominal": 1.0,
        "low": 0.5,
        "high": 1.5,
    }
    base.update(kwargs)
    with pytest.raises(ValueError, match=match):
        Factor(**base)  # type: ignore[arg-type]


def test_is_varying() -> None:
    assert is_varying(Factor("a", "a", 1.0, 0.0, 2.0))
    assert not is_varying(Factor("a", "a", 1.0, 0.0, 2.0, distribution="fixed"))
    assert not is_varying(Factor("a", "a", 1.0, 1.0, 1.0))


def test_nominal_inputs_are_one_element_arrays() -> None:
    fs = [Factor("a", "a", 1.0, 0.0, 2.0), Factor("b", "b", -3.0, -4.0, -3.0)]
    inputs = nominal_inputs(fs)
    assert set(inputs) == {"a", "b"}
    assert inputs["a"].shape == (1,)
    assert inputs["a"].dtype == np.float64
    assert inputs["b"][0] == -3.0


def test_check_factors_rejects_duplicates() -> None:
    f = Factor("a", "a", 1.0, 0.0, 2.0)
    with pytest.raises(ValueError, match="duplicate"):
        check_factors([f, f])


def test_call_evaluate_broadcasts_constant_outputs() -> None:
    def model(x: Mapping[str, FloatArray]) -> Mapping[str, FloatArray]:
        return {"y": 2.0 * x["a"], "k": np.float64(5.0)}  # type: ignore[dict-item]

    out = call_evaluate(model, {"a": np.arange(4.0)}, 4)
    assert out["k"].shape == (4,)
    assert list(out["y"]) == [0.0, 2.0, 4.0, 6.0]


def test_call_evaluate_rejects_bad_shapes_and_empty() -> None:
    def bad(x: Mapping[str, FloatArray]) -> Mapping[str, FloatArray]:
        return {"y": np.zeros(3)}

    with pytest.raises(ValueError, match="shape"):
        call_evaluate(bad, {"a": np.zeros(4)}, 4)
    with pytest.raises(ValueError, match="no outputs"):
        call_evaluate(lambda x: {}, {"a": np.zeros(4)}, 4)
