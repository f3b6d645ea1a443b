"""Tests for timespec.parts.dielectrics: capacitor dielectric classes and temperature drift."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from timespec.parts.dielectrics import (
    REFERENCE_TEMPERATURE,
    RESISTOR_TCR_PPM,
    Dielectric,
    dielectric,
    known_names,
    temperature_drift_bounds,
)

# Source: EIA-198 class 2 ceramic codes (low temperature, high temperature, max change), the
# four worked examples of the brief; also widely printed in capacitor makers' guides.
EIA_CLASS2 = [
    ("X7R", -55.0, 125.0, -0.15, 0.15),
    ("Y5V", -30.0, 85.0, -0.82, 0.22),
    ("Z5U", 10.0, 85.0, -0.56, 0.22),
    ("X5R", -55.0, 85.0, -0.15, 0.15),
    ("X6S", -55.0, 105.0, -0.22, 0.22),
    ("X8R", -55.0, 150.0, -0.15, 0.15),
    ("X7T", -55.0, 125.0, -0.33, 0.22),
    ("X7P", -55.0, 125.0, -0.10, 0.10),
]


@pytest.mark.parametrize(("code", "t_min", "t_max", "low", "high"), EIA_CLASS2)
def test_eia198_class2_decoding(
    code: str, t_min: float, t_max: float, low: float, high: float
) -> None:
    d = dielectric(code)
    assert d.name == code
    assert d.family == "class2"
    assert (d.t_min, d.t_max) == (t_min, t_max)
    assert (d.drift_low, d.drift_high) == (low, high)
    assert (d.tc_ppm_low, d.tc_ppm_high) == (0.0, 0.0)
    assert not d.precise
    assert "DC bias" in d.notes
    assert dielectric(code.lower()) == d


def test_c0g_band() -> None:
    # Source: EIA-198 class 1, C0G = 0 +- 30 ppm/K, rated -55..125 degC.
    d = dielectric("C0G")
    assert d.family == "class1"
    assert (d.tc_ppm_low, d.tc_ppm_high) == (-30.0, 30.0)
    assert (d.t_min, d.t_max) == (-55.0, 125.0)
    assert (d.drift_low, d.drift_high) == (0.0, 0.0)
    assert d.precise


def test_u2j_band() -> None:
    # Source: EIA-198 class 1 code U2J: U = 7.5, 2 = multiplier -100, J = +-120 ppm/K,
    # i.e. -750 +- 120 ppm/K.
    d = dielectric("U2J")
    assert (d.tc_ppm_low, d.tc_ppm_high) == (-870.0, -630.0)
    assert d.precise


@pytest.mark.parametrize("alias", ["NP0", "NPO", "np0", "npo", "COG", " c0g "])
def test_c0g_aliases(alias: str) -> None:
    # Common practice: NP0 (often typed NPO) is the older name of C0G.
    assert dielectric(alias) is dielectric("C0G")


def test_film_and_electrolytic_entries() -> None:
    pp = dielectric("polypropylene")
    assert pp is dielectric("PP")
    assert pp.family == "film" and pp.precise
    assert pp.tc_ppm_low < pp.tc_ppm_high < 0.0  # from memory: about -200 ppm/K
    pet = dielectric("polyester")
    assert pet is dielectric("PET")
    assert 0.0 < pet.tc_ppm_low < pet.tc_ppm_high  # from memory: +400..+600 ppm/K
    al = dielectric("aluminium")
    assert al is dielectric("AL") is dielectric("aluminum")
    assert al.family == "electrolytic" and not al.precise
    assert al.drift_low < 0.0 < al.drift_high


def test_precise_flag_follows_family() -> None:
    for name in known_names():
        d = dielectric(name)
        assert d.precise == (d.family in ("class1", "film"))
        assert d.linear == (d.family in ("class1", "film"))
        assert 0.0 < d.min_farads < d.max_farads
        assert d.t_min < REFERENCE_TEMPERATURE < d.t_max
        assert d.notes


def test_known_names_are_all_resolvable() -> None:
    names = known_names()
    for must in ("C0G", "NP0", "X7R", "X5R", "Y5V", "Z5U", "PP", "PET", "AL"):
        assert must in names
    assert len(set(names)) == len(names)


@pytest.mark.parametrize("bad", ["X7", "X7RR", "W7R", "X0R", "X7Q", "Q7R", "", "teflon"])
def test_unknown_names(bad: str) -> None:
    with pytest.raises(ValueError, match=r"unknown dielectric .*known names: C0G, U2J"):
        dielectric(bad)


def test_dielectric_is_frozen() -> None:
    d = dielectric("X7R")
    with pytest.raises(dataclasses.FrozenInstanceError):
        d.name = "X5R"  # type: ignore[misc]


# ----- temperature drift -------------------------------------------------------------------


def test_drift_c0g_examples() -> None:
    # C0G, 0 +- 30 ppm/K (EIA-198): from -10 to 60 degC the worst change is 30e-6 * 35 = 1.05e-3
    # (at 60 degC) and 30e-6 * 35 at -10 degC as well.
    low, high = temperature_drift_bounds(dielectric("C0G"), -10.0, 60.0)
    assert low == pytest.approx(-1.05e-3, rel=1e-12)
    assert high == pytest.approx(1.05e-3, rel=1e-12)
    assert temperature_drift_bounds(dielectric("C0G"), 25.0, 25.0) == (0.0, 0.0)


def test_drift_pet_span_above_reference_excludes_zero() -> None:
    # PET band +400..+600 ppm/K (from memory); from 35 to 45 degC every capacitor has grown,
    # so the bounds are 400e-6 * 10 .. 600e-6 * 20.
    low, high = temperature_drift_bounds(dielectric("PET"), 35.0, 45.0)
    assert low == pytest.approx(4e-3, rel=1e-12)
    assert high == pytest.approx(12e-3, rel=1e-12)


def test_drift_envelope_kinds() -> None:
    # EIA-198: X7R stays within +-15 % over -55..125 degC; only the envelope is promised, so
    # any span other than exactly 25 degC gets the whole envelope.
    x7r = dielectric("X7R")
    assert temperature_drift_bounds(x7r, 0.0, 50.0) == (-0.15, 0.15)
    assert temperature_drift_bounds(x7r, 30.0, 30.0) == (-0.15, 0.15)
    assert temperature_drift_bounds(x7r, 25.0, 25.0) == (0.0, 0.0)
    assert temperature_drift_bounds(dielectric("Y5V"), -30.0, 85.0) == (-0.82, 0.22)


def test_drift_outside_rated_range() -> None:
    with pytest.raises(ValueError, match=r"rated range -55\.\.85 degC of X5R"):
        temperature_drift_bounds(dielectric("X5R"), -10.0, 100.0)
    with pytest.raises(ValueError, match=r"rated range 10\.\.85 degC of Z5U"):
        temperature_drift_bounds(dielectric("Z5U"), 0.0, 50.0)
    with pytest.raises(ValueError, match="must not exceed"):
        temperature_drift_bounds(dielectric("C0G"), 50.0, 0.0)
    with pytest.raises(ValueError, match="finite"):
        temperature_drift_bounds(dielectric("C0G"), float("nan"), 0.0)


linear_names = st.sampled_from(["C0G", "U2J", "PP", "PET"])


@settings(max_examples=200, deadline=None)
@given(name=linear_names, a=st.floats(0.0, 1.0), b=st.floats(0.0, 1.0))
def test_drift_bounds_match_dense_sweep(name: str, a: float, b: float) -> None:
    # Independent route: evaluate tc * (T - 25) on a dense grid over the (tc, T) box, grid
    # including the box edges, and take the extremes numerically.
    d = dielectric(name)
    span = d.t_max - d.t_min
    t1, t2 = sorted((d.t_min + a * span, d.t_min + b * span))
    tc = np.linspace(d.tc_ppm_low, d.tc_ppm_high, 61) * 1e-6
    temps = np.linspace(t1, t2, 201)
    sweep = np.outer(tc, temps - 25.0)
    low, high = temperature_drift_bounds(d, t1, t2)
    assert low == pytest.approx(sweep.min(), rel=1e-12, abs=1e-18)
    assert high == pytest.approx(sweep.max(), rel=1e-12, abs=1e-18)
    # and a finer random cloud never escapes the bounds
    rng = np.random.default_rng(0)
    tc_r = rng.uniform(d.tc_ppm_low, d.tc_ppm_high, 2000) * 1e-6
    t_r = rng.uniform(t1, t2, 2000)
    cloud = tc_r * (t_r - 25.0)
    assert np.all(cloud >= low - 1e-15)
    assert np.all(cloud <= high + 1e-15)
    if t1 <= 25.0 <= t2:
        assert low <= 0.0 <= high


def test_resistor_tcr_table() -> None:
    # Datasheet class values, from memory: thick film 100 ppm/K, thin film 25, metal film 50.
    assert RESISTOR_TCR_PPM["thick film"] == 100.0
    assert RESISTOR_TCR_PPM["thin film"] == 25.0
    assert RESISTOR_TCR_PPM["metal film"] == 50.0
    assert RESISTOR_TCR_PPM["thin film"] < RESISTOR_TCR_PPM["thick film"]


def test_dielectric_type() -> None:
    assert isinstance(dielectric("X7R"), Dielectric)
