"""Benchmark: the astable solver against a brute-force enumeration of every part triple.

Run standalone: ``python bench/bench_astable.py``.  Exits non-zero when the two
disagree on the best design.

Scenario (our own): the status-lamp blinker of a bench power supply's front panel,
classic circuit, E96 1 % resistors and E12 5 % C0G capacitors.

* **solver** — :func:`timespec.design.solver.solve_block` (analytic narrowing: for each
  capacitor the continuous resistor pair, snapped to its neighbours; full worst
  case on a shortlist).  Timed as the best of several runs.
* **brute force** — every (RA, RB, C) triple of the allowed ranges, in numpy:
  (1) all triples at nominal and at the extreme corners of one probe design —
  points of the worst-case box, so a triple with any of them outside a
  requirement can never meet (an exact pruning, no heuristic); (2) the full
  extreme-value worst case (the same corner grid the solver uses) of every
  remaining triple, its design rules, and the solver's own ranking key.

Both must name the same best design.  The resistor range is reduced to two
decades so that the brute force finishes in seconds.
"""

from __future__ import annotations

import itertools
import math
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from timespec.analysis import nominal_inputs, worst_case, worst_case_many
from timespec.design.result import Candidate, OutputResult
from timespec.design.solver import rank_key, solve_block
from timespec.families.astable import Astable
from timespec.families.candidates import capacitor_part, resistor_part
from timespec.language.assemble import parse
from timespec.model import Block
from timespec.parts.part import Design
from timespec.parts.series import values_between

SPEC = """
astable panel_blink:
  frequency 2 kHz ±12%
  duty 65% ±5%
  circuit classic
  supply 12 V ±5%
  ambient 0 degC to 50 degC
  resistors E96 1% 100 ppm/K, 1k to 100k
  capacitors E12 5% C0G, 1n to 100n
"""

RUNS = 15
CHUNK = 400_000


def _time_solver(block: Block) -> tuple[float, Design]:
    best = math.inf
    result = None
    for _ in range(RUNS):
        t0 = time.perf_counter()
        result = solve_block(block)
        best = min(best, time.perf_counter() - t0)
    assert result is not None and result.best is not None
    return best, result.best.design


def _design(block: Block, ra: float, rb: float, c: float) -> Design:
    rp, cp = block.resistors, block.capacitors
    return Design(
        (resistor_part("RA", ra, rp), resistor_part("RB", rb, rp), capacitor_part("C", c, cp)),
        "classic",
    )


def _brute_force(block: Block) -> tuple[Candidate, int, int]:
    fam = Astable()
    rp, cp = block.resistors, block.capacitors
    rs = np.array(values_between(rp.series, rp.low, rp.high))
    cs = np.array(values_between(cp.series, cp.low, cp.high))
    triples = np.array(list(itertools.product(rs, rs, cs)))
    total = triples.shape[0]
    probe = _design(block, 10e3, 20e3, 10e-9)
    facs = fam.factors(block, probe)
    model = fam.evaluate(block, "classic")
    probe_ex = worst_case(facs, model)
    points = [nominal_inputs(facs)]
    for e in probe_ex.values():
        for at in (e.low_at, e.high_at):
            p = dict(points[0])
            p.update({k: np.array([v]) for k, v in at.items()})
            points.append(p)
    reqs = block.requirements
    keep = np.ones(total, dtype=bool)
    for start in range(0, total, CHUNK):
        sl = slice(start, min(start + CHUNK, total))
        n = sl.stop - sl.start
        for p in points:
            x = {k: np.broadcast_to(v, (n,)) for k, v in p.items()}
            x["RA.value"] = triples[sl, 0]
            x["RB.value"] = triples[sl, 1]
            x["C.value"] = triples[sl, 2]
            out = model(x)
            for r in reqs:
                y = out[r.quantity]
                keep[sl] &= (y >= r.window.low) & (y <= r.window.high)
    survivors = triples[keep]
    cands: list[Candidate] = []
    windows = {r.quantity: r.window for r in reqs}
    names = ("RA.value", "RB.value", "C.value")
    step = 8
    for start in range(0, survivors.shape[0], step):
        block_rows = survivors[start : start + step]
        overrides = {nm: block_rows[:, j].copy() for j, nm in enumerate(names)}
        many = worst_case_many(facs, model, overrides)
        for row, ex in zip(block_rows, many, strict=True):
            design = _design(block, *map(float, row))
            outputs = tuple(
                OutputResult(
                    o.name,
                    o.kind,
                    o.label,
                    windows.get(o.name),
                    ex[o.name].nominal,
                    ex[o.name].low,
                    ex[o.name].high,
                )
                for o in fam.outputs(block)
            )
            extremes = {k: (v.low, v.high) for k, v in ex.items()}
            findings = tuple(fam.findings(block, design, extremes))
            cands.append(Candidate(design, outputs, findings))
    cands.sort(key=rank_key)
    return cands[0], total, survivors.shape[0]


def _values(design: Design) -> tuple[float, ...]:
    return tuple(p.value for p in design.parts)


def main() -> int:
    """Run the benchmark and report; non-zero exit when the best designs differ."""
    block = parse(SPEC).blocks[0]
    solve_block(block)  # warm-up (imports, caches)
    t_solver, solver_best = _time_solver(block)
    t0 = time.perf_counter()
    brute_best, total, survivors = _brute_force(block)
    t_brute = time.perf_counter() - t0
    print(f"triples enumerated by brute force: {total} ({survivors} after exact corner pruning)")
    print(f"solver (best of {RUNS}): {t_solver * 1e3:.1f} ms -> {_values(solver_best)}")
    print(f"brute force:            {t_brute * 1e3:.0f} ms -> {_values(brute_best.design)}")
    print(f"speed-up: {t_brute / t_solver:.0f}x; brute-force best meets: {brute_best.meets}")
    same = _values(solver_best) == _values(brute_best.design)
    print("same best design:", "yes" if same else "NO")
    return 0 if same else 1


if __name__ == "__main__":
    sys.exit(main())
