"""Tests for timespec.parts.series: IEC 60063 preferred number series."""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from timespec.parts import pairs
from timespec.parts import series as es

# ---------------------------------------------------------------------------------------------
# Published tables, typed out as integers (IEC 60063:2015, tables 1 to 3: "preferred number
# series for resistors and capacitors").  Each value is the mantissa times 10 (two-digit series)
# or times 100 (three-digit series).
# ---------------------------------------------------------------------------------------------
IEC_E3 = (10, 22, 47)
IEC_E6 = (10, 15, 22, 33, 47, 68)
IEC_E12 = (10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82)
IEC_E24 = (
    10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91,
)  # fmt: skip
IEC_E48 = (
    100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205, 215,
    226, 237, 249, 261, 274, 287, 301, 316, 332, 348, 365, 383, 402, 422, 442, 464, 487,
    511, 536, 562, 590, 619, 649, 681, 715, 750, 787, 825, 866, 909, 953,
)  # fmt: skip
IEC_E96 = (
    100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147,
    150, 154, 158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221,
    226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309, 316, 324, 332,
    340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499,
    511, 523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750,
    768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976,
)  # fmt: skip
IEC_E192 = (
    100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120, 121,
    123, 124, 126, 127, 129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145, 147, 149,
    150, 152, 154, 156, 158, 160, 162, 164, 165, 167, 169, 172, 174, 176, 178, 180, 182,
    184, 187, 189, 191, 193, 196, 198, 200, 203, 205, 208, 210, 213, 215, 218, 221, 223,
    226, 229, 232, 234, 237, 240, 243, 246, 249, 252, 255, 258, 261, 264, 267, 271, 274,
    277, 280, 284, 287, 291, 294, 298, 301, 305, 309, 312, 316, 320, 324, 328, 332, 336,
    340, 344, 348, 352, 357, 361, 365, 370, 374, 379, 383, 388, 392, 397, 402, 407, 412,
    417, 422, 427, 432, 437, 442, 448, 453, 459, 464, 470, 475, 481, 487, 493, 499, 505,
    511, 517, 523, 530, 536, 542, 549, 556, 562, 569, 576, 583, 590, 597, 604, 612, 619,
    626, 634, 642, 649, 657, 665, 673, 681, 690, 698, 706, 715, 723, 732, 741, 750, 759,
    768, 777, 787, 796, 806, 816, 825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931,
    942, 953, 965, 976, 988,
)  # fmt: skip

IEC_TABLES = {
    "E3": (IEC_E3, 10),
    "E6": (IEC_E6, 10),
    "E12": (IEC_E12, 10),
    "E24": (IEC_E24, 10),
    "E48": (IEC_E48, 100),
    "E96": (IEC_E96, 100),
    "E192": (IEC_E192, 100),
}


@pytest.mark.parametrize("name", es.SERIES_NAMES)
def test_tables_match_iec_60063(name: str) -> None:
    # Source: IEC 60063:2015 tables, typed out above.
    table, scale = IEC_TABLES[name]
    got = es.mantissas(name)
    assert len(got) == len(table) == int(name[1:])
    assert [round(m * scale) for m in got] == list(table)
    # Each mantissa is the float nearest its decimal spelling.
    assert got == tuple(v / scale for v in table)


@pytest.mark.parametrize("name", ["E48", "E96", "E192"])
def test_three_digit_series_follow_rounding_formula(name: str) -> None:
    # Source: IEC 60063:2015, E48/E96/E192 are 10**(i/N) rounded to three significant figures,
    # with the single listed exception E192 i = 185 (9.20 instead of the formula's 9.19).
    n = int(name[1:])
    formula = [round(round(10 ** (i / n), 2) * 100) for i in range(n)]
    got = [round(m * 100) for m in es.mantissas(name)]
    differences = [(i, f, g) for i, (f, g) in enumerate(zip(formula, got, strict=True)) if f != g]
    if name == "E192":
        assert differences == [(185, 919, 920)]
    else:
        assert differences == []


@pytest.mark.parametrize("name", ["E3", "E6", "E12", "E24"])
def test_two_digit_series_do_not_all_follow_formula(name: str) -> None:
    # Source: IEC 60063:2015; the historical two-digit values (2.7, 3.0, 3.3, 3.6, 3.9, 4.3,
    # 4.7, 8.2) differ from 10**(i/N) rounded to two figures, which is why they are fixed lists.
    n = int(name[1:])
    formula = [round(round(10 ** (i / n), 1) * 10) for i in range(n)]
    got = [round(m * 10) for m in es.mantissas(name)]
    assert formula != got  # even E3: the formula gives 4.6, the standard lists 4.7
    if name == "E24":
        deviating = {g for f, g in zip(formula, got, strict=True) if f != g}
        assert deviating == {27, 30, 33, 36, 39, 43, 47, 82}


@pytest.mark.parametrize(
    ("coarse", "fine"),
    [("E3", "E6"), ("E6", "E12"), ("E12", "E24"), ("E48", "E96"), ("E96", "E192")],
)
def test_each_series_is_every_second_value_of_the_next(coarse: str, fine: str) -> None:
    # Source: IEC 60063:2015 (construction of the series); holds exactly for these pairs.
    assert es.mantissas(coarse) == es.mantissas(fine)[::2]


def test_two_digit_and_three_digit_families_do_not_nest() -> None:
    # Source: IEC 60063:2015 tables: E24 is not a subset of E48 (2.7 vs 2.74, 4.7 vs 4.64...).
    assert not set(es.mantissas("E24")) <= set(es.mantissas("E48"))
    assert not set(es.mantissas("E24")) <= set(es.mantissas("E192"))
    assert 4.7 not in es.mantissas("E96")
    assert 4.7 in es.mantissas("E192")


def test_against_independent_eseries_package() -> None:
    # Source: the general-purpose `eseries` package from PyPI, an independent transcription of
    # the IEC 60063 tables.
    eseries = pytest.importorskip("eseries")
    for name in es.SERIES_NAMES:
        theirs = eseries.series(getattr(eseries.ESeries, name))
        _, scale = IEC_TABLES[name]
        assert tuple(round(m * scale) for m in es.mantissas(name)) == tuple(theirs)


def test_usual_tolerances() -> None:
    # Source: IEC 60063:2015 (tolerance associated with each series); E3 is only "> 20 %" in
    # the standard, 0.2 is common practice.
    expected = {
        "E3": 0.2,
        "E6": 0.2,
        "E12": 0.10,
        "E24": 0.05,
        "E48": 0.02,
        "E96": 0.01,
        "E192": 0.005,
    }
    for name, tol in expected.items():
        assert es.usual_tolerance(name) == tol
        assert es.usual_tolerance(name.lower()) == tol


@pytest.mark.parametrize("name", es.SERIES_NAMES)
def test_series_are_nearly_geometric(name: str) -> None:
    # Source: IEC 60063:2015, the series approximate a geometric progression of ratio
    # 10**(1/N); the two-digit series deviate by up to 5 % (1.3 -> 1.5 in E24), the
    # three-digit ones by under 1 % (rounding to three figures only).
    n = int(name[1:])
    step = 10 ** (1 / n)
    m = [*es.mantissas(name), 10.0]
    worst = max(abs(b / a / step - 1) for a, b in itertools.pairwise(m))
    assert worst < (0.05 if n <= 24 else 0.01)


def test_case_insensitive_and_unknown_name() -> None:
    assert es.mantissas("e12") == es.mantissas("E12")
    with pytest.raises(ValueError, match=r"unknown preferred number series 'E13'.*E3, E6, E12"):
        es.mantissas("E13")
    with pytest.raises(ValueError, match="unknown preferred number series"):
        es.values_between("R10", 1.0, 10.0)


def test_values_between_exact_floats() -> None:
    got = es.values_between("E12", 1e3, 1e4)
    # Source: IEC 60063:2015 E12 list, one decade, both ends included.
    expected = [float(f"{v}e2") for v in IEC_E12] + [1e4]
    assert got.tolist() == expected
    assert str(got[8]) == "4700.0"
    caps = es.values_between("E6", 1e-9, 9.9e-9)
    assert caps.tolist() == [float(f"{v}e-10") for v in IEC_E6]
    assert caps[4] == float("4.7e-9")
    assert repr(float(caps[4])) == "4.7e-09"


@pytest.mark.parametrize("name", es.SERIES_NAMES)
def test_values_between_counts_and_membership(name: str) -> None:
    n = int(name[1:])
    got = es.values_between(name, 1.0, 999.0)
    assert got.size == 3 * n
    assert np.all(np.diff(got) > 0)
    _, scale = IEC_TABLES[name]
    for v in got:
        # every value is (IEC integer mantissa) x 10**k, to the last bit
        k = math.floor(math.log10(v) + 1e-12)
        mant = round(v / 10**k * scale)
        assert mant in IEC_TABLES[name][0]
        assert float(v) == float(f"{mant}e{k - (2 if scale == 100 else 1)}")


def test_values_between_tolerant_bounds() -> None:
    got = es.values_between("E24", 4700.000000001, 4699.9999999 * 10)
    assert got[0] == 4700.0
    assert got[-1] == 47000.0
    assert es.values_between("E3", 2.3, 4.6).size == 0
    assert es.values_between("E96", 1e-12, 1e-12).tolist() == [1e-12]


@pytest.mark.parametrize(
    ("low", "high"), [(0.0, 1.0), (-1.0, 1.0), (2.0, 1.0), (1.0, math.inf), (math.nan, 2.0)]
)
def test_values_between_bad_bounds(low: float, high: float) -> None:
    with pytest.raises(ValueError):
        es.values_between("E12", low, high)


def test_neighbours_examples() -> None:
    # Source: IEC 60063:2015 E12 / E96 lists.
    assert es.neighbours("E12", 4700.0) == (4700.0, 4700.0)
    assert es.neighbours("E12", 5000.0) == (4700.0, 5600.0)
    assert es.neighbours("E12", 9000.0) == (8200.0, 10000.0)
    assert es.neighbours("E12", 9.9e-12) == (8.2e-12, 1e-11)
    assert es.neighbours("E96", 999e3) == (976e3, 1e6)
    # float rounding of a computed value snaps to the member
    assert es.neighbours("E12", 4.7 * 1e-9) == (4.7e-9, 4.7e-9)
    assert es.nearest("E12", 5000.0) == 4700.0  # sqrt(4700*5600) = 5130
    assert es.nearest("E12", 5200.0) == 5600.0
    assert es.nearest("E192", 9.2e3) == 9.2e3


def test_membership() -> None:
    # Source: IEC 60063:2015: 9.20 is in E192 (documented exception), 9.19 is not.
    assert es.is_member("E192", 920.0)
    assert not es.is_member("E192", 919.0)
    assert es.is_member("E24", 3e-6)
    assert not es.is_member("E12", 3e-6)
    assert es.is_member("E12", 4.7 * 1e-9)
    assert not es.is_member("E12", 4.7e-9 * (1 + 1e-6))
    assert es.is_member("E12", 4.7e-9 * (1 + 1e-6), rel=1e-5)


@pytest.mark.parametrize("bad", [0.0, -1.0, math.inf, math.nan])
def test_neighbours_bad_input(bad: float) -> None:
    with pytest.raises(ValueError, match="finite number greater than zero"):
        es.neighbours("E12", bad)
    with pytest.raises(ValueError):
        es.nearest("E12", bad)
    with pytest.raises(ValueError):
        es.neighbours_many("E12", [1.0, bad])


def test_neighbours_bad_rel() -> None:
    with pytest.raises(ValueError, match="rel"):
        es.neighbours("E12", 1.0, rel=-1.0)


positive = st.floats(min_value=-14.0, max_value=11.0).map(lambda e: 10.0**e)
names = st.sampled_from(es.SERIES_NAMES)


@settings(max_examples=300, deadline=None)
@given(name=names, x=positive)
def test_neighbours_properties(name: str, x: float) -> None:
    below, above = es.neighbours(name, x)
    rel = 1e-9
    assert below <= x * (1 + rel)
    assert above >= x * (1 - rel)
    assert es.is_member(name, below, rel=1e-12)
    assert es.is_member(name, above, rel=1e-12)
    # no member strictly between: the members in [below, above] are just the two ends
    inside = es.values_between(name, below, above)
    assert inside.tolist() == sorted({below, above})
    near = es.nearest(name, x)
    assert near in (below, above)
    # nearest on a log scale, checked by brute force over the surrounding decades
    pool = es.values_between(name, x / 20, x * 20)
    best = pool[np.argmin(np.abs(np.log(pool / x)))]
    assert abs(math.log(near / x)) <= abs(math.log(best / x)) + 1e-12


@settings(max_examples=100, deadline=None)
@given(name=names, xs=st.lists(positive, min_size=1, max_size=20))
def test_vectorised_forms_agree_with_scalar(name: str, xs: list[float]) -> None:
    below, above = es.neighbours_many(name, xs)
    near = es.nearest_many(name, xs)
    for i, x in enumerate(xs):
        assert (below[i], above[i]) == es.neighbours(name, x)
        assert near[i] == es.nearest(name, x)


@settings(max_examples=100, deadline=None)
@given(name=names, i=st.integers(0, 191), k=st.integers(-13, 10))
def test_every_member_is_its_own_neighbour(name: str, i: int, k: int) -> None:
    table, scale = IEC_TABLES[name]
    mant = table[i % len(table)]
    x = float(f"{mant}e{k - (2 if scale == 100 else 1)}")
    assert es.neighbours(name, x) == (x, x)
    assert es.nearest(name, x) == x


# ----- pairs -------------------------------------------------------------------------------------


def test_pairs_against_brute_force() -> None:
    # Series: R = a + b; parallel: R = a*b/(a+b) (textbook circuit theory); the reference is a
    # plain double loop over the same pool.
    low, high, ratio = 1000.0, 1200.0, 10.0
    pool = es.values_between("E12", 1.0, 1e6)
    expected = set()
    for a, b in itertools.combinations_with_replacement(pool.tolist(), 2):
        if b > a * ratio:
            continue
        for how, v in (("series", a + b), ("parallel", a * b / (a + b))):
            if low * (1 - 1e-9) <= v <= high * (1 + 1e-9):
                expected.add((a, b, how))
    got = pairs.pair_values("E12", low, high, max_ratio=ratio)
    assert {(p.a, p.b, p.how) for p in got} == expected
    assert [p.value for p in got] == sorted(p.value for p in got)
    for p in got:
        assert p.a <= p.b
        want = p.a + p.b if p.how == "series" else p.a * p.b / (p.a + p.b)
        assert p.value == pytest.approx(want, rel=1e-15)
    assert pairs.Pair(1000.0, 1000.0, "parallel", 500.0) not in got  # out of range


def test_pair_selection_flags() -> None:
    only_series = pairs.pair_values("E24", 1e3, 1.1e3, parallel=False)
    only_parallel = pairs.pair_values("E24", 1e3, 1.1e3, series=False)
    both = pairs.pair_values("E24", 1e3, 1.1e3)
    assert {p.how for p in only_series} == {"series"}
    assert {p.how for p in only_parallel} == {"parallel"}
    assert len(both) == len(only_series) + len(only_parallel)
    assert pairs.pair_values("E24", 1e3, 1.1e3, series=False, parallel=False) == []
    table = pairs.pair_table("E24", 1e3, 1.1e3)
    assert table.dtype == pairs.PAIR_DTYPE
    assert len(table) == len(both)
    # 2.2k || 2.2k = 1.1k exactly, and 1k + 100 = 1.1k: both standard E24 pairs
    assert pairs.Pair(2200.0, 2200.0, "parallel", 1100.0) in both
    assert pairs.Pair(100.0, 1000.0, "series", 1100.0) in both
    with pytest.raises(ValueError, match="max_ratio"):
        pairs.pair_values("E24", 1e3, 1.1e3, max_ratio=0.5)


@pytest.mark.parametrize("how", ["series", "parallel"])
def test_pair_tolerance_equal_parts_keep_tolerance(how: str) -> None:
    # Worst case of a sum or a parallel combination of parts with the same relative
    # tolerance t is t (both scale by 1 +- t); textbook worst-case analysis.
    for a, b, t in [(1e3, 4.7e3, 0.01), (10.0, 10.0, 0.05), (2.2e3, 1e6, 0.2)]:
        assert pairs.pair_tolerance(a, b, how, t, t) == pytest.approx(t, rel=1e-12)


@settings(max_examples=100, deadline=None)
@given(
    a=st.floats(1.0, 1e6),
    b=st.floats(1.0, 1e6),
    ta=st.floats(0.0, 0.3),
    tb=st.floats(0.0, 0.3),
    how=st.sampled_from(["series", "parallel"]),
)
def test_pair_tolerance_against_dense_sweep(
    a: float, b: float, ta: float, tb: float, how: str
) -> None:
    # Independent route: evaluate the combination over a dense grid of the tolerance box
    # (grid includes the box edges) and take the extremes numerically.
    grid_a = a * (1 + np.linspace(-ta, ta, 41))
    grid_b = b * (1 + np.linspace(-tb, tb, 41))
    aa, bb = np.meshgrid(grid_a, grid_b)
    values = aa + bb if how == "series" else aa * bb / (aa + bb)
    nominal = a + b if how == "series" else a * b / (a + b)
    rel = values / nominal - 1
    low, high = pairs.pair_tolerance_bounds(a, b, how, ta, tb)
    assert low == pytest.approx(rel.min(), abs=1e-12)
    assert high == pytest.approx(rel.max(), abs=1e-12)
    assert pairs.pair_tolerance(a, b, how, ta, tb) == pytest.approx(max(-low, high), abs=0)


def test_pair_tolerance_bad_input() -> None:
    with pytest.raises(ValueError, match="'series' or 'parallel'"):
        pairs.pair_tolerance(1.0, 1.0, "bridge", 0.01, 0.01)
    with pytest.raises(ValueError, match="tol_a"):
        pairs.pair_tolerance(1.0, 1.0, "series", 1.5, 0.01)
    with pytest.raises(ValueError, match="greater than zero"):
        pairs.pair_tolerance(0.0, 1.0, "series", 0.01, 0.01)
