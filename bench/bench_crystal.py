"""Time one crystal solve (the ``crystal`` family through the generic solver).

Run standalone: ``python bench/bench_crystal.py``.  Prints the median time of one
``solve_block`` of a Pierce crystal block (target ≤ 2 ms), and, as a same-run
baseline, the median time of one extreme-value ``worst_case`` of the chosen
design, with the ratio between the two.  The scenario is our own (a bench
frequency counter's 12 MHz reference).
"""

from __future__ import annotations

import statistics
import sys
import time
from collections.abc import Callable
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from timespec.analysis import worst_case
from timespec.design.solver import solve_block
from timespec.families import family
from timespec.language.assemble import parse

SPEC = """
crystal counter_ref:
  frequency 12 MHz
  load 8 pF
  stray 3 pF to 4 pF
  shunt 1.5 pF
  motional 4 fF
  esr 60 ohm max
  tolerance ±10 ppm
  stability ±20 ppm
  aging ±3 ppm/year
  accuracy ±100 ppm
  gm 5 mA/V
  swing 3 V
  drive 200 uW max
  life 5 years
  ambient -20 degC to 70 degC
"""

TARGET_MS = 2.0


def median_ms(fn: Callable[[], object], repeats: int = 7, number: int = 40) -> float:
    """Median over ``repeats`` runs of the mean time of ``number`` calls, in ms."""
    fn()  # warm caches
    runs = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        for _ in range(number):
            fn()
        runs.append((time.perf_counter() - t0) / number * 1e3)
    return statistics.median(runs)


def main() -> None:
    """Run the benchmark and print the figures."""
    block = parse(SPEC).blocks[0]
    result = solve_block(block)
    assert result.best is not None
    fam = family("crystal")
    design = result.best.design
    factors = fam.factors(block, design)
    model = fam.evaluate(block, design.variant)

    solve = median_ms(lambda: solve_block(block))
    base = median_ms(lambda: worst_case(factors, model))
    print(
        f"crystal solve: {solve:.3f} ms per block (target ≤ {TARGET_MS:g} ms), "
        f"{result.extra.get('candidates')} candidates, verdict {result.verdict}"
    )
    print(
        f"baseline worst_case of one design: {base:.3f} ms; solve / baseline = {solve / base:.2f}"
    )


if __name__ == "__main__":
    main()
