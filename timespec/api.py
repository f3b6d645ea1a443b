"""The documented Python API: parse or load a spec, solve it.

These three functions are what another tool (a fixture-firmware generator, a
docs build) calls.  Results are :class:`~timespec.design.result.Result` objects; their
``quantities()`` and ``part_values()`` methods hand back pint quantities.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from timespec.design.result import BlockResult, Result
from timespec.errors import UsageError
from timespec.language import assemble as _spec
from timespec.model import Spec

__all__ = ["load", "parse", "solve"]


def parse(text: str, path: str | None = None) -> Spec:
    """Parse spec text into a typed, frozen :class:`~timespec.model.Spec`.

    Parameters
    ----------
    text
        The spec text.
    path
        File name shown in error messages (``include`` needs :func:`load`).

    Returns
    -------
    Spec
        The validated blocks.

    Raises
    ------
    SpecError
        For any mistake, with file, line, column, the line, a caret and a hint.
    """
    return _spec.parse(text, path)


def load(path: str | Path) -> Spec:
    """Read and parse a spec file.

    Parameters
    ----------
    path
        The ``.tspec`` file; ``include`` files are read relative to it.

    Returns
    -------
    Spec
        The validated blocks.

    Raises
    ------
    SpecError
        When the file cannot be read or has mistakes.
    """
    return _spec.load(path)


def solve(
    spec: Spec,
    *,
    statistics: bool = True,
    samples: int | None = None,
    seed: int | None = None,
    fixes: bool = True,
    progress: Callable[[int, int], None] | None = None,
) -> Result:
    """Choose or check the parts of every block and analyse them.

    Parameters
    ----------
    spec
        A parsed spec.
    statistics
        Run RSS and Monte Carlo on each chosen design.
    samples, seed
        Monte Carlo sample count and seed; ``None`` takes the spec's
        (``samples``/``seed`` statements) or the defaults.
    fixes
        For infeasible blocks, search for the cheapest change that would make
        them feasible.
    progress
        Called as ``progress(done, total)`` during Monte Carlo.

    Returns
    -------
    Result
        One result per block: verdict, parts, worst case, statistics, findings,
        runners-up and fixes.

    Raises
    ------
    UsageError
        When ``samples`` or ``seed`` is out of range.
    """
    if not isinstance(spec, Spec):
        raise UsageError(
            f"solve() takes a Spec (from timespec.parse or load), not {type(spec).__name__}"
        )
    if samples is not None and samples < 1:
        raise UsageError("samples must be at least 1")
    if seed is not None and seed < 0:
        raise UsageError("seed must not be negative")
    from timespec.design.solver import solve as _solve

    result = _solve(spec)
    if statistics:
        from timespec.design.statistics import analyse

        result = analyse(result, samples=samples, seed=seed, progress=progress)
    if fixes:
        result = _with_fixes(result)
    return result


def _no_fix_note(b: BlockResult) -> str:
    """Why no searched change helps, from what the closest design actually breaks."""
    searched = (
        "no change searched (finer series, pairs, tighter resistors or capacitors, "
        "a steadier dielectric, a trimmer, a narrower ambient range) makes it feasible"
    )
    best = b.best
    rules = sorted({f.code for f in best.findings if f.severity == "error"}) if best else []
    if best is not None and rules and best.excess == 0:
        return (
            f"{searched}: every window is met, but the design breaks a design rule "
            f"({', '.join(rules)}) that no part change removes; see the finding"
        )
    from timespec.design.causes import diagnose

    causes = "; ".join(c.brief for c in diagnose(b.block, best, b.factors)) if best else ""
    if rules:
        return (
            f"{searched}: the closest design misses its window and breaks a design rule "
            f"({', '.join(rules)})" + (f"; {causes}" if causes else "")
        )
    if causes:
        return f"{searched}: {causes}"
    return f"{searched}; the closest design's worst case is shown against the requirement"


def _with_fixes(result: Result) -> Result:
    import dataclasses

    if all(b.verdict != "infeasible" for b in result.blocks):
        return result
    from timespec.design.fixes import suggest_fixes

    blocks = []
    for b in result.blocks:
        if b.verdict == "infeasible":
            found = suggest_fixes(b.block, solved=b)
            notes = b.notes
            if not found:
                notes = (*notes, _no_fix_note(b))
            b = dataclasses.replace(b, notes=notes, extra={**b.extra, "fixes": tuple(found)})
        blocks.append(b)
    return dataclasses.replace(result, blocks=tuple(blocks))
