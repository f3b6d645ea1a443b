"""``timespec check PATH...``: check whole trees of spec files in one process.

The run has four steps, each a small function:

1. :func:`collect_specs` turns the paths of the command line into spec files:
   a file is taken as named (it must end in ``.tspec``), a folder is walked
   recursively for ``*.tspec`` files, sorted by their path inside the folder.
   Folders whose name starts with a dot (``.git``, ``.venv``) are skipped and
   symbolic links to folders are not followed, so the walk always ends.  Files
   keep the order of the arguments; a file reached twice is checked once.
2. Every file is read and parsed in this process; a spec error stops that file
   only, and is kept with its position.
3. Every block of every file that parsed is solved (worst case only: no
   statistics, no fixes, as ``check`` has always done).  When the run has at
   least :data:`POOL_MIN_BLOCKS` blocks (:data:`POOL_MIN_BLOCKS_SPAWN` where
   worker processes start a fresh interpreter) and the machine has more than
   one processor, the blocks are shared over a
   :class:`concurrent.futures.ProcessPoolExecutor`; the results are collected
   in the order of the blocks, so the output is the same, byte for byte, with
   or without the pool.
4. :func:`block_diagnostics` locates every verdict that is not *meets*: an
   output outside its window points at the requirement statement that asks
   for it, a design-rule finding at the block's header.

Renderers: :func:`render_run` (compiler-style lines and a summary),
:func:`run_to_dict`/:func:`run_to_json` (the ``timespec-check-run`` document,
schema ``timespec/schemas/timespec-check-run.schema.json``) and, in
:mod:`timespec.outputs.sarif`, SARIF 2.1.0.

Why these thresholds: on a Linux machine a worker process is forked from this
one and starts in well under 0.1 s, while one block takes 20 ms (a one-shot)
to 0.6 s (an astable searched over both resistors) to solve, so a pool pays
from about five blocks on.  Where workers are spawned (a fresh interpreter
that imports numpy and timespec again, 1 to 3 s each on a small machine), it
pays only from a few dozen blocks.
"""

from __future__ import annotations

import functools
import math
import multiprocessing
import os
import sys
import warnings
from collections.abc import Callable, Iterable, Sequence
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass
from multiprocessing.context import BaseContext
from pathlib import Path
from typing import Any

from timespec._version import __version__
from timespec.design.result import BlockResult, OutputResult, Result
from timespec.errors import (
    SpecEmptyError,
    SpecError,
    SpecIncludeError,
    SpecSyntaxError,
    SpecUnitError,
    SpecValueError,
    UsageError,
)
from timespec.language.project import project_for
from timespec.model import Block, Spec
from timespec.numbers import format_interval, format_part_value, format_quantity
from timespec.outputs.jsondoc import result_to_dict, strict_json
from timespec.outputs.report import ratio_of

__all__ = [
    "FORMAT",
    "FORMAT_MINOR",
    "FORMAT_VERSION",
    "POOL_MIN_BLOCKS",
    "POOL_MIN_BLOCKS_SPAWN",
    "SPEC_SUFFIX",
    "CheckRun",
    "Diagnostic",
    "FileCheck",
    "Solve",
    "api_solve",
    "block_diagnostics",
    "check_paths",
    "collect_specs",
    "error_diagnostic",
    "iter_diagnostics",
    "render_run",
    "run_to_dict",
    "run_to_json",
    "summary_line",
]

#: The ``format`` of the run document.
FORMAT = "timespec-check-run"
#: Bumped when a key changes meaning or disappears.
FORMAT_VERSION = 1
#: Bumped when keys are added.
FORMAT_MINOR = 0

#: The suffix of spec files, the only files a folder walk picks up.
SPEC_SUFFIX = ".tspec"

#: With worker processes forked from this one (Linux): a pool from this many blocks on.
POOL_MIN_BLOCKS = 5
#: With worker processes that start a fresh interpreter (macOS, Windows).
POOL_MIN_BLOCKS_SPAWN = 32

#: What a solve function does: one spec in, its result out.
Solve = Callable[[Spec], Result]


# --------------------------------------------------------------------------
# the files of a run


def collect_specs(paths: Sequence[str | Path]) -> tuple[str, ...]:
    """The spec files named by command-line paths, in a fixed order.

    Parameters
    ----------
    paths
        Files and folders.  A folder stands for every ``*.tspec`` file below
        it (recursively; folders starting with a dot are skipped, symbolic
        links to folders are not followed), sorted by path inside the folder.

    Returns
    -------
    tuple of str
        The files, in the order of ``paths``, each once (the first time it is
        reached), spelled as given or as the folder plus the path below it
        (normalised: ``./rack/a.tspec`` is ``rack/a.tspec``).

    Raises
    ------
    UsageError
        When a path does not exist, a file named explicitly does not end in
        ``.tspec``, or a folder holds no spec file.
    """
    if not paths:
        raise UsageError("no spec file or folder given (e.g. 'timespec check boards')")
    found: list[str] = []
    seen: set[str] = set()
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            files = _walk_folder(os.path.normpath(raw))
            if not files:
                raise UsageError(f"no {SPEC_SUFFIX} files in the folder {str(raw)!r}")
        elif path.exists():
            if path.suffix != SPEC_SUFFIX:
                raise UsageError(
                    f"{str(raw)!r} is not a spec file: spec files end in {SPEC_SUFFIX} "
                    "(name a folder to check every spec file in it)"
                )
            files = [os.path.normpath(raw)]
        else:
            raise UsageError(f"no such spec file or folder: {str(raw)!r}")
        for name in files:
            key = os.path.realpath(name)
            if key not in seen:
                seen.add(key)
                found.append(name)
    return tuple(found)


def _walk_folder(top: str) -> list[str]:
    """Every ``*.tspec`` file below ``top``, sorted by its path parts inside it, except
    what the project's ``exclude`` patterns skip (:meth:`Project.excludes
    <timespec.language.project.Project.excludes>`)."""
    hits: list[tuple[tuple[str, ...], str]] = []
    for here, dirs, files in os.walk(top, followlinks=False):
        # a nearer project file (timespec.toml) in a subfolder takes over its excludes
        project = project_for(here)
        dirs[:] = [
            d for d in dirs if not d.startswith(".") and not project.excludes(os.path.join(here, d))
        ]
        rel = Path(os.path.relpath(here, top)).parts
        rel = () if rel == (".",) else rel
        for name in files:
            if name.endswith(SPEC_SUFFIX) and not name.startswith("."):
                full = os.path.join(here, name)
                if os.path.isfile(full) and not project.excludes(full):
                    hits.append(((*rel, name), full))
    return [full for _key, full in sorted(hits)]


# --------------------------------------------------------------------------
# located diagnostics


@dataclass(frozen=True)
class Diagnostic:
    """One located message of a run, as a compiler writes it.

    Attributes
    ----------
    path
        The file the position is in (an included file for a block from one).
    line, column
        1-based position, ``None`` when unknown.
    severity
        ``"error"``, ``"warning"`` or ``"note"``.
    rule
        Stable short name: ``"block-fails"``, ``"block-infeasible"``, a
        design-rule finding code, or the kind of spec error
        (``"spec-syntax"``, ``"spec-value"``, ``"spec-unit"``,
        ``"spec-include"``, ``"spec-error"``).
    message
        What is wrong, with numbers.
    block
        The block it is about, ``None`` for a spec error.
    hint
        What to do, for a spec error (``None`` otherwise or when none).
    source_line
        The text of the line, for a spec error (repeated under the message).
    """

    path: str
    line: int | None
    column: int | None
    severity: str
    rule: str
    message: str
    block: str | None = None
    hint: str | None = None
    source_line: str | None = None

    @property
    def location(self) -> str:
        """``path:line:col`` (parts that are unknown are left out)."""
        where = self.path
        if self.line is not None:
            where += f":{self.line}"
            if self.column is not None:
                where += f":{self.column}"
        return where

    def line_text(self) -> str:
        """The one-line form, ``path:line:col: severity: message [rule]``.

        Returns
        -------
        str
            The line, without a newline.
        """
        return f"{self.location}: {self.severity}: {self.message} [{self.rule}]"


def _error_rule(exc: SpecError) -> str:
    for cls, rule in (
        (SpecSyntaxError, "spec-syntax"),
        (SpecValueError, "spec-value"),
        (SpecUnitError, "spec-unit"),
        (SpecIncludeError, "spec-include"),
    ):
        if isinstance(exc, cls):
            return rule
    return "spec-error"


def error_diagnostic(exc: SpecError, path: str) -> Diagnostic:
    """A spec error as a diagnostic.

    Parameters
    ----------
    exc
        The error.
    path
        The spec file being checked (used when the error names no file).

    Returns
    -------
    Diagnostic
        Severity ``error``, the error's position, message and hint.
    """
    return Diagnostic(
        path=exc.path if exc.path is not None else path,
        line=exc.line,
        column=exc.column,
        severity="error",
        rule=_error_rule(exc),
        message=exc.message,
        hint=exc.hint,
        source_line=exc.source_line,
    )


def spec_error_diagnostics(exc: SpecError, path: str) -> tuple[Diagnostic, ...]:
    """Every mistake an error stands for, as diagnostics, and a note when the parser
    stopped collecting them (:data:`timespec.errors.MAX_ERRORS`).

    Parameters
    ----------
    exc
        The error (one mistake, or :class:`timespec.errors.SpecErrors`).
    path
        The spec file being checked.

    Returns
    -------
    tuple of Diagnostic
        In the order the parser found them.
    """
    out = [error_diagnostic(e, path) for e in _spec_errors(exc)]
    if getattr(exc, "truncated", False):
        out.append(
            Diagnostic(
                path=path,
                line=None,
                column=None,
                severity="note",
                rule="spec-errors-truncated",
                message=f"stopped after {len(out)} mistakes; fix these and run it again",
            )
        )
    return tuple(out)


def _spec_errors(exc: SpecError) -> tuple[SpecError, ...]:
    """The independent mistakes an error stands for (a parser may gather several)."""
    many = getattr(exc, "errors", None)
    if isinstance(many, list | tuple) and many and all(isinstance(e, SpecError) for e in many):
        return tuple(many)
    return (exc,)


def _at(block: Block, pos: object) -> tuple[str, int | None, int | None]:
    """Path, line and column of a position, falling back to the block's header."""
    for where in (pos, block.pos):
        path = getattr(where, "path", None)
        if where is not None and path is not None:
            return str(path), getattr(where, "line", None), getattr(where, "column", None)
    return "", None, None


def _shortfall(o: OutputResult) -> str:
    """How far a worst-case window leaves its requirement, e.g. ``2.1 ms low``."""
    if not (math.isfinite(o.low) and math.isfinite(o.high)):
        return "the worst case is unbounded"
    low_margin, high_margin = o.margin
    ratio = ratio_of(o)
    bits = []
    if low_margin < 0:
        bits.append(f"{format_quantity(-low_margin, o.kind, ratio=ratio)} low")
    if high_margin < 0:
        bits.append(f"{format_quantity(-high_margin, o.kind, ratio=ratio)} high")
    return ", ".join(bits)


def _parts_text(b: BlockResult) -> str:
    return ", ".join(f"{p.ref} {format_part_value(p.value, p.kind)}" for p in b.parts)


def _output_message(b: BlockResult, o: OutputResult) -> str:
    assert o.required is not None
    ratio = ratio_of(o)
    got = format_interval(o.low, o.high, o.kind, ratio=ratio)
    want = format_interval(o.required.low, o.required.high, o.kind, ratio=ratio)
    name = b.block.name
    short = _shortfall(o)
    if b.verdict == "infeasible":
        return (
            f"block {name!r} is infeasible: no design from the allowed parts keeps "
            f"{o.name} inside {want} at worst case; the closest ({_parts_text(b)}) "
            f"gives {got} ({short})"
        )
    pinned = "pinned parts" if b.mode == "checked" else "parts"
    return (
        f"block {name!r} fails: {o.name} is {got} at worst case, outside the required "
        f"{want} ({short}) with its {pinned} {_parts_text(b)}"
    )


def block_diagnostics(b: BlockResult, *, notes: bool = False) -> list[Diagnostic]:
    """The located messages of one block's result.

    Parameters
    ----------
    b
        The block's result.
    notes
        Also write note-severity findings and one note for a block that meets.

    Returns
    -------
    list of Diagnostic
        Outputs outside their windows (at the requirement statement), then the
        design-rule findings (at the block header) with their own severity;
        a block without any design gets one error at its header.
    """
    block = b.block
    failing = "block-infeasible" if b.verdict == "infeasible" else "block-fails"
    out: list[Diagnostic] = []
    if b.best is None:
        path, line, col = _at(block, None)
        why = "; ".join(b.notes) or "no design could be formed"
        out.append(
            Diagnostic(
                path,
                line,
                col,
                "error",
                failing,
                f"block {block.name!r} is {b.verdict}: {why}",
                block.name,
            )
        )
        return out
    for o in b.best.outputs:
        if o.required is None or o.meets:
            continue
        req = block.requirement(o.name)
        path, line, col = _at(block, req.pos if req is not None else None)
        out.append(Diagnostic(path, line, col, "error", failing, _output_message(b, o), block.name))
    if b.verdict != "meets" and not out and not any(f.severity == "error" for f in b.best.findings):
        path, line, col = _at(block, None)
        why = "; ".join(b.notes) or "no design meets every requirement"
        out.append(
            Diagnostic(
                path,
                line,
                col,
                "error",
                failing,
                f"block {block.name!r} {b.verdict}: {why}",
                block.name,
            )
        )
    for f in b.best.findings:
        if f.severity == "note" and not notes:
            continue
        path, line, col = _at(block, None)
        out.append(
            Diagnostic(
                path,
                line,
                col,
                f.severity,
                f.code,
                f"block {block.name!r}: {f.message}",
                block.name,
            )
        )
    if notes and b.verdict == "meets":
        path, line, col = _at(block, None)
        met = "; ".join(
            f"{o.name} {format_interval(o.low, o.high, o.kind, ratio=ratio_of(o))} within "
            f"{format_interval(o.required.low, o.required.high, o.kind, ratio=ratio_of(o))}"
            for o in b.best.outputs
            if o.required is not None
        )
        out.append(
            Diagnostic(
                path,
                line,
                col,
                "note",
                "block-meets",
                f"block {block.name!r} meets: {met} with {_parts_text(b)}",
                block.name,
            )
        )
    return out


# --------------------------------------------------------------------------
# the run


@dataclass(frozen=True)
class FileCheck:
    """One spec file of a run.

    Attributes
    ----------
    path
        The file as named or walked.
    result
        The solved blocks (``None`` when the file did not parse).
    errors
        Its spec errors, as diagnostics.
    """

    path: str
    result: Result | None
    errors: tuple[Diagnostic, ...] = ()

    @property
    def blocks(self) -> tuple[BlockResult, ...]:
        """The block results (empty when the file did not parse)."""
        return self.result.blocks if self.result is not None else ()

    def diagnostics(self, *, notes: bool = False) -> list[Diagnostic]:
        """Spec errors first, then every block's located messages.

        Parameters
        ----------
        notes
            Include notes (see :func:`block_diagnostics`).

        Returns
        -------
        list of Diagnostic
            In file order.
        """
        out = list(self.errors)
        for b in self.blocks:
            out.extend(block_diagnostics(b, notes=notes))
        return out


@dataclass(frozen=True)
class CheckRun:
    """The outcome of checking several spec files.

    Attributes
    ----------
    files
        One entry per spec file, in the run's order.
    notes
        Whether notes were asked for (``--verbose``).
    """

    files: tuple[FileCheck, ...]
    notes: bool = False

    def counts(self) -> dict[str, int]:
        """Files, blocks, verdicts and spec errors of the run.

        Returns
        -------
        dict
            ``files``, ``blocks``, ``meets``, ``fails``, ``infeasible``,
            ``spec_errors`` and ``files_with_errors``.
        """
        verdicts = [b.verdict for f in self.files for b in f.blocks]
        return {
            "files": len(self.files),
            "blocks": len(verdicts),
            "meets": verdicts.count("meets"),
            "fails": verdicts.count("fails"),
            "infeasible": verdicts.count("infeasible"),
            "spec_errors": sum(1 for f in self.files for e in f.errors if e.severity == "error"),
            "files_with_errors": sum(1 for f in self.files if f.errors),
        }

    @property
    def exit_code(self) -> int:
        """2 on any spec error (a file could not be verified), else 1 if any block
        does not meet, else 0."""
        c = self.counts()
        if c["spec_errors"]:
            return 2
        return 1 if c["meets"] != c["blocks"] else 0

    @property
    def ok(self) -> bool:
        """Every block of every file meets and no file has a spec error."""
        return self.exit_code == 0


def _solve_one(task: tuple[Solve, Block, str | None]) -> BlockResult | SpecError:
    """Solve one block (in a worker process or here); a spec error is returned."""
    solve, block, path = task
    try:
        return solve(Spec((block,), path)).blocks[0]
    except SpecError as exc:
        return exc


def _default_solve(spec: Spec) -> Result:
    from timespec.design.solver import solve

    return solve(spec)


def _processors() -> int:
    try:
        return len(os.sched_getaffinity(0))
    except (AttributeError, OSError):  # pragma: no cover - not Linux
        return os.cpu_count() or 1


def _context() -> tuple[BaseContext, int]:
    """The worker start method and the pool threshold that goes with it."""
    if sys.platform.startswith("linux") and "fork" in multiprocessing.get_all_start_methods():
        return multiprocessing.get_context("fork"), POOL_MIN_BLOCKS
    return multiprocessing.get_context("spawn"), POOL_MIN_BLOCKS_SPAWN


def _solve_all(
    tasks: list[tuple[Solve, Block, str | None]], jobs: int | None
) -> list[BlockResult | SpecError]:
    ctx, threshold = _context()
    auto = _processors() if len(tasks) >= threshold else 1
    workers = min(auto if jobs is None else jobs, len(tasks))
    if workers <= 1:
        return [_solve_one(t) for t in tasks]
    with warnings.catch_warnings():
        # Python 3.12+ warns on fork() while numpy's BLAS threads exist; the workers
        # start before any thread of the pool's own and only solve.
        warnings.filterwarnings("ignore", r".*fork\(\) may lead to deadlocks", DeprecationWarning)
        pool = ProcessPoolExecutor(max_workers=workers, mp_context=ctx)
        try:
            done = list(pool.map(_solve_one, tasks, chunksize=1))
        except BaseException:
            # an interrupt or a bug in a worker: do not solve the blocks still queued
            pool.shutdown(wait=False, cancel_futures=True)
            raise
        pool.shutdown(wait=True)
        return done


def check_paths(
    paths: Sequence[str | Path],
    *,
    jobs: int | None = None,
    solve: Solve | None = None,
    load: Callable[[str], Spec] | None = None,
    notes: bool = False,
) -> CheckRun:
    """Check every spec file named by ``paths`` in one run.

    Parameters
    ----------
    paths
        Files and folders (see :func:`collect_specs`).
    jobs
        Worker processes: ``None`` picks the processor count when the run has
        at least :data:`POOL_MIN_BLOCKS` blocks (else none); ``1`` solves
        here; more forces a pool of that size whenever there are two blocks.
    solve
        Solves a spec (``None``: the worst-case solver).  In a pool it is sent
        to the workers, so it must be picklable (a module-level function or a
        ``functools.partial`` of one).
    load
        Reads a spec file (``None``: :func:`timespec.language.assemble.load`).
    notes
        Keep note-severity findings and a note per met block in the diagnostics.

    Returns
    -------
    CheckRun
        The files in order, each with its result or its spec errors.

    Raises
    ------
    UsageError
        For a path that does not exist, is not a spec file, or a folder
        without spec files (nothing is solved then).
    """
    files = collect_specs(paths)
    if load is None:
        from timespec.language.assemble import load as load_file

        load = load_file
    solve = solve or _default_solve
    named = {os.path.realpath(p) for p in paths if Path(p).is_file()}
    specs: list[Spec | None] = []
    errors: list[tuple[Diagnostic, ...]] = []
    kept: list[str] = []
    for name in files:
        kept.append(name)
        try:
            specs.append(load(name))
            errors.append(())
        except UsageError:
            raise
        except SpecEmptyError as exc:
            if os.path.realpath(name) not in named:
                kept.pop()  # reached by a walk: shared defaults for others to include
                continue
            specs.append(None)
            errors.append(spec_error_diagnostics(exc, name))
        except SpecError as exc:
            specs.append(None)
            errors.append(spec_error_diagnostics(exc, name))
    tasks = [(solve, b, s.path) for s in specs if s is not None for b in s.blocks]
    solved = iter(_solve_all(tasks, jobs))
    checks: list[FileCheck] = []
    for name, spec, errs in zip(kept, specs, errors, strict=True):
        if spec is None:
            checks.append(FileCheck(name, None, errs))
            continue
        blocks: list[BlockResult] = []
        more: list[Diagnostic] = []
        for _block in spec.blocks:
            got = next(solved)
            if isinstance(got, SpecError):
                more.extend(error_diagnostic(e, name) for e in _spec_errors(got))
            else:
                blocks.append(got)
        checks.append(FileCheck(name, Result(spec, tuple(blocks)), (*errs, *more)))
    return CheckRun(tuple(checks), notes=notes)


def api_solve(solve: Callable[..., Result]) -> Solve:
    """A picklable check-solve from an API-style ``solve(spec, statistics=, fixes=)``.

    Parameters
    ----------
    solve
        A module-level function such as :func:`timespec.api.solve`.

    Returns
    -------
    callable
        ``solve(spec)`` without statistics or fixes.
    """
    return functools.partial(solve, statistics=False, fixes=False)


# --------------------------------------------------------------------------
# renderers


def _plural(n: int, word: str) -> str:
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def summary_line(run: CheckRun) -> str:
    """The last line of the text output.

    Parameters
    ----------
    run
        The run.

    Returns
    -------
    str
        E.g. ``checked 3 files, 7 blocks: 5 meet, 1 fails, 1 infeasible; 1 spec error``.
    """
    c = run.counts()
    return (
        f"checked {_plural(c['files'], 'file')}, {_plural(c['blocks'], 'block')}: "
        f"{c['meets']} meet, {c['fails']} fail, {c['infeasible']} infeasible; "
        f"{_plural(c['spec_errors'], 'spec error')}"
    )


def _diagnostic_text(d: Diagnostic) -> str:
    text = d.line_text()
    if d.source_line is not None:
        text += "\n    " + d.source_line.rstrip("\n").expandtabs(1)
        if d.column is not None:
            text += "\n    " + " " * (d.column - 1) + "^"
    if d.hint:
        text += f"\n  hint: {d.hint}"
    return text


def render_run(run: CheckRun) -> str:
    """Compiler-style lines for every located message, then the summary.

    Parameters
    ----------
    run
        The run.

    Returns
    -------
    str
        ``path:line:col: error|warning|note: message [rule]`` lines in the
        run's order (a spec error followed by its line, a caret and its hint,
        indented), then :func:`summary_line`.
    """
    lines = [_diagnostic_text(d) for f in run.files for d in f.diagnostics(notes=run.notes)]
    lines.append(summary_line(run))
    return "\n".join(lines) + "\n"


def _diagnostic_dict(d: Diagnostic) -> dict[str, Any]:
    return {
        "path": d.path,
        "line": d.line,
        "column": d.column,
        "severity": d.severity,
        "rule": d.rule,
        "block": d.block,
        "message": d.message,
    }


def _error_dict(d: Diagnostic) -> dict[str, Any]:
    return {
        "path": d.path,
        "line": d.line,
        "column": d.column,
        "kind": d.rule,
        "message": d.message,
        "hint": d.hint,
    }


def run_to_dict(run: CheckRun) -> dict[str, Any]:
    """The ``timespec-check-run`` document as a mapping.

    Parameters
    ----------
    run
        The run.

    Returns
    -------
    dict
        ``format``, ``format_version``, ``format_minor``,
        ``timespec_version``, ``ok``, ``exit_code``, ``summary`` and
        ``files``: per file its ``path``, ``ok``, ``result`` (the
        ``timespec-result`` document of the file, or ``null`` when it did not
        parse), ``errors`` and ``diagnostics``.
    """
    c = run.counts()
    return {
        "format": FORMAT,
        "format_version": FORMAT_VERSION,
        "format_minor": FORMAT_MINOR,
        "timespec_version": __version__,
        "ok": run.ok,
        "exit_code": run.exit_code,
        "summary": {k: c[k] for k in ("files", "blocks", "meets", "fails", "infeasible")}
        | {"spec_errors": c["spec_errors"]},
        "files": [
            {
                "path": f.path,
                "ok": not f.errors and all(b.verdict == "meets" for b in f.blocks),
                "result": result_to_dict(f.result) if f.result is not None else None,
                "errors": [_error_dict(d) for d in f.errors],
                "diagnostics": [
                    _diagnostic_dict(d) for d in f.diagnostics(notes=run.notes) if d.block
                ],
            }
            for f in run.files
        ],
    }


def run_to_json(run: CheckRun, *, indent: int | None = 2) -> str:
    """The run document as strict JSON text (no NaN or Infinity).

    Parameters
    ----------
    run
        The run.
    indent
        Indentation, or ``None`` for one line.

    Returns
    -------
    str
        The document, ending with a newline.
    """
    return strict_json(run_to_dict(run), indent=indent)


def iter_diagnostics(run: CheckRun) -> Iterable[Diagnostic]:
    """Every diagnostic of a run, in order (spec errors included).

    Parameters
    ----------
    run
        The run.

    Yields
    ------
    Diagnostic
        In the run's order.
    """
    for f in run.files:
        yield from f.diagnostics(notes=run.notes)
