"""The frequency-error budget of a crystal design: calibration, temperature, ageing, pulling."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from timespec.analysis import Factor, is_varying, rss
from timespec.families.crystal.settings import ageing, band
from timespec.families.protocol import Evaluate, FloatArray, Inputs
from timespec.model import Block, Window
from timespec.physics import pierce

__all__ = ["Budget", "budget_of"]


@dataclass(frozen=True)
class Budget:
    """The frequency-error budget of one design over life, as fractions.

    Attributes
    ----------
    calibration, temperature, ageing, pulling
        Half-width (largest magnitude) of each term; ``pulling`` from the
        worst-case engine.
    worst_case
        Largest magnitude of the total from the worst-case engine (the exact
        extreme of the linear sum).
    rss
        The nominal offset (a systematic error, added linearly) plus the root sum
        of squares of every factor's contribution ``|∂y/∂x|·h`` (sensitivity from
        :func:`timespec.analysis.rss` times the factor's half-range).
    """

    calibration: float
    temperature: float
    ageing: float
    pulling: float
    worst_case: float
    rss: float


def budget_of(
    block: Block,
    factors: list[Factor],
    model: Evaluate,
    accuracy: tuple[float, float],
    pulling: tuple[float, float],
) -> Budget:
    """The budget of a design from its factors, model and worst-case extremes.

    Parameters
    ----------
    block
        A crystal block.
    factors
        The design's factors.
    model
        The family's model for the design.
    accuracy, pulling
        Worst-case ``(low, high)`` of ``accuracy`` and ``pulling``.

    Returns
    -------
    Budget
        Each term's half-width, the worst case and the RSS figure.
    """
    spread = rss([f for f in factors if is_varying(f)], _accuracy_only(factors, model))["accuracy"]
    half = {f.name: 0.5 * (f.high - f.low) for f in factors}
    terms = [c.sensitivity * half[c.name] for c in spread.contributions if half[c.name] > 0]
    nominal = spread.nominal

    def mag(w: Window) -> float:
        return max(abs(w.low), abs(w.high))

    return Budget(
        calibration=mag(band(block, "tolerance")),
        temperature=mag(band(block, "stability")),
        ageing=mag(ageing(block)),
        pulling=max(abs(pulling[0]), abs(pulling[1])),
        worst_case=max(abs(accuracy[0]), abs(accuracy[1])),
        rss=abs(nominal) + (float(pierce.budget_rss(*terms)) if terms else 0.0),
    )


def _accuracy_only(factors: list[Factor], model: Evaluate) -> Evaluate:
    """Wrap a model: fixed factors left out of the inputs take their nominal values,
    and only ``accuracy`` is returned (what the RSS budget needs)."""
    fixed = {f.name: f.nominal for f in factors if not is_varying(f)}

    def evaluate(x: Inputs) -> dict[str, FloatArray]:
        full = dict(x)
        for name, value in fixed.items():
            full.setdefault(name, np.full(1, value))
        return {"accuracy": model(full)["accuracy"]}

    return evaluate
