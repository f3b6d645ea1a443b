"""Benchmarks of the foundation: one-shot solve, import time, parse throughput.

Run: ``python bench/bench_oneshot.py``.  Every figure is reported beside a
baseline measured in the same run, as a ratio, so that the numbers mean
something on any machine:

* one-shot solve (E96 resistors × E12 capacitors, full worst case) against a
  brute-force enumeration of every (R, C) pair through the same worst-case
  engine and ranking; both must pick the same design (exit 1 if not);
* ``import timespec`` in a fresh interpreter against the bare interpreter;
* spec parsing (statements per second on a generated 10 000-statement file)
  against lark's own parse of the same text with the same grammar.

Targets (from the project's issue): ≤ 5 ms per one-shot solve, import ≤ 300 ms,
parse ≥ 20 000 statements/s.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time
from collections.abc import Callable
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

import timespec  # noqa: E402
from timespec.analysis import worst_case_many  # noqa: E402
from timespec.design.solver import _candidate, rank_key, solve_block  # noqa: E402
from timespec.families import family  # noqa: E402
from timespec.families.candidates import capacitor_part, resistor_part  # noqa: E402
from timespec.parts.part import Design  # noqa: E402

SPEC = """
defaults:
  supply 12 V ±5%
  ambient -10 degC to 60 degC
  resistors E96 1% 50 ppm/K, 1k to 2M
  capacitors E12 2% PP, 10n to 1u
  timer cmos
oneshot relay_hold:
  width 150 ms ±8%
  trigger 2 ms, spacing 1 s
"""


def best_of(fn: Callable[[], object], repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def brute_force(block: timespec.model.Block) -> Design:
    """Every (R, C) pair of the policies, worst case through the same engine, same ranking."""
    fam = family("oneshot")
    rs = timespec.parts.series.values_between("E96", block.resistors.low, block.resistors.high)
    cs = timespec.parts.series.values_between("E12", block.capacitors.low, block.capacitors.high)
    rr, cc = np.meshgrid(rs, cs, indexing="ij")
    rr, cc = rr.ravel(), cc.ravel()
    template = Design(
        (resistor_part("R", 1.0, block.resistors), capacitor_part("C", 1.0, block.capacitors))
    )
    facs = fam.factors(block, template)
    many = worst_case_many(facs, fam.evaluate(block, ""), {"R.value": rr, "C.value": cc})
    best_key = None
    best: Design | None = None
    for r, c, ex in zip(rr, cc, many, strict=True):
        d = Design(
            (
                resistor_part("R", float(r), block.resistors),
                capacitor_part("C", float(c), block.capacitors),
            )
        )
        key = rank_key(_candidate(block, d, fam, fam.factors(block, d), ex))
        if best_key is None or key < best_key:
            best_key, best = key, d
    assert best is not None
    return best


def bench_solve() -> bool:
    block = timespec.parse(SPEC).blocks[0]
    solve_block(block)  # warm up
    t_solve = best_of(lambda: solve_block(block), 20)
    t0 = time.perf_counter()
    brute = brute_force(block)
    t_brute = time.perf_counter() - t0
    ours = solve_block(block).best
    assert ours is not None
    same = [p.value for p in ours.design.parts] == [p.value for p in brute.parts]
    print(f"one-shot solve (E96 x E12, worst case): {t_solve * 1e3:.2f} ms   target <= 5 ms")
    print(f"  brute force over all pairs:          {t_brute * 1e3:.0f} ms")
    print(f"  ratio brute/solve:                   {t_brute / t_solve:.0f}x")
    print(
        f"  same best design:                    {same} "
        f"({', '.join(f'{p.ref}={p.value:g}' for p in ours.design.parts)})"
    )
    return same


def bench_import() -> None:
    def run(code: str) -> float:
        out = []
        for _ in range(7):
            t0 = time.perf_counter()
            subprocess.run([sys.executable, "-c", code], check=True, cwd=ROOT)
            out.append(time.perf_counter() - t0)
        return statistics.median(out)

    bare = run("pass")
    lazy = run("import timespec")
    full = run("import timespec; timespec.parse('oneshot a: width 1 ms ±5% at supply 5 V')")
    print(f"interpreter start (baseline):          {bare * 1e3:.0f} ms")
    print(
        f"import timespec:                       {(lazy - bare) * 1e3:.0f} ms over baseline "
        f"(ratio {lazy / bare:.2f})   target <= 300 ms"
    )
    print(
        f"import + first parse (lark, pint):     {(full - bare) * 1e3:.0f} ms over baseline "
        f"(ratio {full / bare:.2f})"
    )


def bench_parse() -> None:
    from timespec.language.parser import _lark

    lines = ["defaults:", "  supply 12 V ±5%", "  ambient -10 degC to 60 degC"]
    n_blocks = 2500
    for i in range(n_blocks):
        lines += [
            f"oneshot pulse_{i}:",
            f"  width {100 + i % 50} ms ±8%",
            "  resistors E96 1% 50 ppm/K, 1k to 2M",
            "  trigger 2 ms, spacing 1 s",
        ]
    text = "\n".join(lines) + "\n"
    statements = 2 + 3 * n_blocks + n_blocks  # headers counted as statements too
    timespec.parse(text)  # warm caches
    t_ours = best_of(lambda: timespec.parse(text), 3)
    t_lark = best_of(lambda: _lark().parse(text), 3)
    rate = statements / t_ours
    print(
        f"parse {statements} statements:           {t_ours * 1e3:.0f} ms = {rate:,.0f} statements/s"
        "   target >= 20,000/s"
    )
    print(
        f"  lark parse alone (baseline):         {t_lark * 1e3:.0f} ms; ratio ours/lark "
        f"{t_ours / t_lark:.2f}"
    )


def main() -> int:
    same = bench_solve()
    bench_import()
    bench_parse()
    return 0 if same else 1


if __name__ == "__main__":
    raise SystemExit(main())
