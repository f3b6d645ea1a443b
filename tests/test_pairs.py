"""Series/parallel pairs of standard values as one part."""

from __future__ import annotations

import itertools

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from timespec.design.solver import rank_key, solve_block
from timespec.families.candidates import neighbour_parts, pair_part
from timespec.language.assemble import parse
from timespec.model import CapacitorPolicy, ResistorPolicy
from timespec.parts import series

E24 = series.values_between("E24", 1e3, 1e6)


def _brute_tolerance(a: float, b: float, how: str, t: float) -> float:
    """Largest relative deviation over the corners of both parts' bands (by hand)."""
    nominal = a + b if how == "series" else a * b / (a + b)
    worst = 0.0
    for sa, sb in itertools.product((-1, 0, 1), repeat=2):
        x, y = a * (1 + sa * t), b * (1 + sb * t)
        v = x + y if how == "series" else x * y / (x + y)
        worst = max(worst, abs(v / nominal - 1))
    return worst


def test_pair_value_and_tolerance_by_hand() -> None:
    pol = ResistorPolicy(series="E24", tolerance=0.01, pairs=True)
    # series: 1k + 1.1k = 2.1k (Kirchhoff's voltage law); parallel: 3.6k ‖ 5.1k
    s = pair_part("R", 1100.0, 1000.0, "series", pol)
    assert s.value == 2100.0 and s.pair == (1000.0, 1100.0, "series") and s.count == 2
    p = pair_part("R", 3600.0, 5100.0, "parallel", pol)
    assert p.value == pytest.approx(3600.0 * 5100.0 / 8700.0, rel=1e-15)
    for part in (s, p):
        assert part.pair is not None
        a, b, how = part.pair
        assert part.tolerance == pytest.approx(_brute_tolerance(a, b, how, 0.01), rel=1e-12)
    c = pair_part("C", 10e-9, 2.2e-9, "parallel", CapacitorPolicy(tolerance=0.05))
    assert c.kind == "capacitance" and c.dielectric == "C0G"


@settings(max_examples=40, deadline=None)
@given(
    a=st.sampled_from(list(E24)),
    b=st.sampled_from(list(E24)),
    how=st.sampled_from(["series", "parallel"]),
    tol=st.sampled_from([0.001, 0.005, 0.01, 0.05]),
)
def test_pair_tolerance_matches_brute_force(a: float, b: float, how: str, tol: float) -> None:
    # Both combinations grow with each part, so the corner search is exact
    # (extreme-value analysis of a monotone function, common practice).
    pol = ResistorPolicy(series="E24", tolerance=tol, pairs=True)
    part = pair_part("R", a, b, how, pol)
    assert part.tolerance == pytest.approx(_brute_tolerance(a, b, how, tol), rel=1e-9)


def test_in_between_value_is_reached() -> None:
    pol = ResistorPolicy(series="E24", tolerance=0.01, pairs=True, low=1e3, high=1e6)
    x = 210_500.0  # between the E24 values 200k and 220k (IEC 60063)
    parts = neighbour_parts("R", x, pol)
    singles = [p for p in parts if p.pair is None]
    pairs = [p for p in parts if p.pair is not None]
    assert [p.value for p in singles] == [200e3, 220e3]
    assert pairs and all(200e3 < p.value < 220e3 for p in pairs)
    best_single = min(abs(p.value / x - 1) for p in singles)
    best_pair = min(abs(p.value / x - 1) for p in pairs)
    assert best_pair < best_single / 10
    # no pairs unless the policy allows them
    no = ResistorPolicy(series="E24", tolerance=0.01, low=1e3, high=1e6)
    assert all(p.pair is None for p in neighbour_parts("R", x, no))
    # both parts of every pair stay inside the allowed range
    for p in pairs:
        assert p.pair is not None
        assert 1e3 <= p.pair[0] <= p.pair[1] <= 1e6


SPEC = """
defaults:
  supply 12 V ±5%
  ambient 0 degC to 50 degC
  resistors E24 1% 50 ppm/K, 1k to 1M
  capacitors E12 1% C0G

oneshot singles_only:
  width 2.31 ms ±6.5%
  timer cmos
  use C 10n 1%

oneshot with_pairs:
  width 2.31 ms ±6.5%
  timer cmos
  resistors E24 1% 50 ppm/K, 1k to 1M, pairs
  use C 10n 1%

oneshot wide:
  width 2.31 ms ±15%
  timer cmos
  resistors E24 1% 50 ppm/K, 1k to 1M, pairs
"""


def test_pair_makes_an_in_between_requirement_feasible() -> None:
    blocks = {b.name: b for b in parse(SPEC).blocks}
    # the width needs R near 210k: 200k and 220k (E24) are both too far off
    assert solve_block(blocks["singles_only"]).verdict == "infeasible"
    res = solve_block(blocks["with_pairs"])
    assert res.verdict == "meets"
    r = res.best.design.part("R")  # type: ignore[union-attr]
    assert r.pair is not None and 200e3 < r.value < 220e3


def test_pair_counts_as_two_parts() -> None:
    res = solve_block(parse(SPEC).blocks[2])
    assert res.verdict == "meets"
    # a single standard value meets, so no pair is added
    assert all(p.pair is None for p in res.best.design.parts)  # type: ignore[union-attr]
    cands = [res.best, *res.alternatives]
    keys = [rank_key(c) for c in cands if c is not None]
    assert keys == sorted(keys)
    pol = ResistorPolicy(series="E24", tolerance=0.01, pairs=True)
    assert pair_part("R", 1e3, 1.1e3, "series", pol).count == 2
