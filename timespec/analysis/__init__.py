"""Circuit-independent analysis engine: worst case, RSS, Monte Carlo and driver shares.

A circuit family describes its varying inputs as :class:`Factor` objects and gives a
vectorised ``evaluate(inputs) -> outputs`` function (factor name → sample array, to
output name → result array).  The engines here take nothing else, work in SI floats and
numpy arrays, and never import a higher layer.
"""

from timespec.analysis.factors import (
    Distribution,
    Evaluate,
    Factor,
    FloatArray,
    call_evaluate,
    check_factors,
    is_varying,
    nominal_inputs,
)
from timespec.analysis.montecarlo import PERCENTILES, MonteCarloResult, OutputStats, monte_carlo
from timespec.analysis.rss import (
    Contribution,
    RssResult,
    grouped_shares,
    rss,
    standard_uncertainty,
)
from timespec.analysis.sensitivity import DRIVER_METHOD, VarianceShare, variance_shares
from timespec.analysis.stats import (
    CAPABILITY_MIN_SAMPLES,
    Capability,
    cpk,
    normal_cdf,
    normal_pdf,
    normal_quantile,
    percentile_capability,
    truncated_normal_std,
    wilson_interval,
)
from timespec.analysis.worstcase import (
    Extremes,
    corner_label,
    grid_size,
    worst_case,
    worst_case_many,
)

__all__ = [
    "CAPABILITY_MIN_SAMPLES",
    "DRIVER_METHOD",
    "PERCENTILES",
    "Capability",
    "Contribution",
    "Distribution",
    "Evaluate",
    "Extremes",
    "Factor",
    "FloatArray",
    "MonteCarloResult",
    "OutputStats",
    "RssResult",
    "VarianceShare",
    "call_evaluate",
    "check_factors",
    "corner_label",
    "cpk",
    "grid_size",
    "grouped_shares",
    "is_varying",
    "monte_carlo",
    "nominal_inputs",
    "normal_cdf",
    "normal_pdf",
    "normal_quantile",
    "percentile_capability",
    "rss",
    "standard_uncertainty",
    "truncated_normal_std",
    "variance_shares",
    "wilson_interval",
    "worst_case",
    "worst_case_many",
]
