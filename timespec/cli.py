"""The ``timespec`` command: a thin shell over the API.

Commands:

``timespec solve FILE``
    Choose parts for every block and print the report (``--json`` for the JSON
    document).
``timespec check PATH...``
    For CI: check spec files and folders (every ``*.tspec`` below a folder) in
    one process, in parallel above a few blocks; one compiler-style line
    ``path:line:col: error|warning: message [rule]`` per failing or infeasible
    block (at the requirement that fails), design-rule warning and spec error,
    then a summary (``--json`` for the run document, ``--sarif`` for SARIF
    2.1.0, ``--jobs N`` to set the worker processes, ``--verbose`` for notes).
``timespec table FILE``
    Part-value table in Markdown, reST or CSV for the docs (``--bom``: a bill of
    materials, one row per part).
``timespec limits FILE``
    Fixture acceptance limits (time and capture-clock counts) from the spec's
    ``fixture:`` section.
``timespec plot FILE -o chart.png``
    Margin chart of every requirement; ``--kind waveform|histogram|ambient`` for
    the other charts (needs the ``plot`` extra).
``timespec format FILE...``
    Canonical layout of spec files (``--check`` for CI, ``--write`` in place).
``timespec explain FILE [BLOCK...]``
    The derivation of each output: the formula, every number at nominal and at
    the worst-case corners, and the source of each class constant
    (``--form text|rst|md``).
``timespec diff OLD NEW`` or ``timespec diff REV1..REV2 -- PATH``
    Compare two specs (or one at two git revisions) block by block for review
    (``--form md`` for a pull-request comment); exit 1 when a block got worse.

Exit codes: 0 every block meets its requirement; 1 a block fails or is
infeasible; 2 a mistake in the spec or on the command line (message on
stderr, no traceback); 3 an unexpected error, which is a bug in timespec (one
line on stderr saying so and how to report it; the traceback only with
``--debug`` or the environment variable ``TIMESPEC_DEBUG=1``).  Over a
``check`` of several files the worst wins: 2 when any file has a spec error
(it could not be verified, whatever the others say), else 1 when any block
fails or is infeasible, else 0; a path that does not exist or an explicitly
named file that is not a ``.tspec`` file is a usage error (2) before anything
is solved.
"""

from __future__ import annotations

import argparse
import os
import sys
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import TextIO

from timespec._version import __version__
from timespec.errors import SpecError, UsageError
from timespec.model import MAX_SAMPLES, MAX_SEED
from timespec.outputs.files import write_bytes_safely, write_text_safely

__all__ = ["EXIT_BUG", "main", "write_atomic", "write_atomic_bytes"]

EXIT_OK = 0
EXIT_FAILED = 1
EXIT_USAGE = 2
#: An unexpected exception: a bug in timespec, never a verdict.
EXIT_BUG = 3

#: Where a bug report goes (printed with an unexpected error).
REPORT_BUGS = "the project's issue tracker"

#: Set to 1 (or pass ``--debug``) to see the traceback of an unexpected error.
DEBUG_VARIABLE = "TIMESPEC_DEBUG"


class _Parser(argparse.ArgumentParser):
    """argparse that reports usage mistakes as :class:`UsageError` (exit 2)."""

    def error(self, message: str) -> None:  # type: ignore[override]
        raise UsageError(f"{message} (see '{self.prog} --help')")


def _build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="timespec",
        description=(
            "Turn timing requirements written in a .tspec file into standard-value parts "
            "that meet them at worst case, with statistics and design-rule findings."
        ),
    )
    parser.add_argument("--version", action="version", version=f"timespec {__version__}")
    parser.add_argument(
        "--debug",
        action="store_true",
        help=f"show the traceback of an unexpected error (also {DEBUG_VARIABLE}=1)",
    )
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    def common(p: argparse.ArgumentParser) -> None:
        p.add_argument("spec", metavar="FILE", help="the .tspec file")
        p.add_argument(
            "--output",
            "-o",
            metavar="PATH",
            help="write to PATH (atomically) instead of standard output",
        )

    p_solve = sub.add_parser("solve", help="choose parts and print the report")
    common(p_solve)
    p_solve.add_argument("--json", action="store_true", help="print the JSON document")
    p_solve.add_argument(
        "--samples",
        type=_whole(1, MAX_SAMPLES),
        metavar="N",
        help="Monte Carlo samples (default: the spec's, else the project file's, else 20000)",
    )
    p_solve.add_argument(
        "--seed",
        type=_whole(0, MAX_SEED),
        metavar="N",
        help="Monte Carlo seed (default: the spec's, else the project file's, else 2026)",
    )
    p_solve.add_argument(
        "--no-statistics", action="store_true", help="worst case only: skip RSS and Monte Carlo"
    )

    p_check = sub.add_parser(
        "check", help="verify every block of spec files and folders; exit 1 if any does not meet"
    )
    p_check.add_argument(
        "paths", metavar="PATH", nargs="+", help="spec files and folders (every *.tspec below)"
    )
    p_check.add_argument(
        "--output", "-o", metavar="PATH", help="write to PATH (atomically) instead of stdout"
    )
    check_form = p_check.add_mutually_exclusive_group()
    check_form.add_argument(
        "--json", action="store_true", help="print the run document (timespec-check-run)"
    )
    check_form.add_argument("--sarif", action="store_true", help="print a SARIF 2.1.0 log")
    p_check.add_argument(
        "--jobs",
        "-j",
        type=_whole(1, 1024),
        metavar="N",
        help="worker processes (default: one per processor from 5 blocks on; 1: none)",
    )
    p_check.add_argument(
        "--verbose", "-v", action="store_true", help="also print notes and every met block"
    )

    p_limits = sub.add_parser(
        "limits", help="fixture acceptance limits in time and capture-clock counts"
    )
    common(p_limits)
    p_limits.add_argument("--json", action="store_true", help="print the JSON document")
    p_limits.add_argument(
        "--decision",
        choices=("guarded", "simple", "expected"),
        help="override the fixture section's decision rule",
    )

    p_plot = sub.add_parser(
        "plot", help="margin chart, waveforms, Monte Carlo histograms or ambient sweeps"
    )
    p_plot.add_argument("spec", metavar="FILE", help="the .tspec file")
    p_plot.add_argument(
        "--output",
        "-o",
        metavar="PATH",
        required=True,
        help="image to write (.png, .svg or .pdf), atomically",
    )
    p_plot.add_argument(
        "--kind",
        choices=("margin", "waveform", "histogram", "ambient"),
        default="margin",
        help="what to draw (default: margin)",
    )
    p_plot.add_argument(
        "--block",
        action="append",
        metavar="NAME",
        default=[],
        help="draw only this block (repeat for more; default: every block)",
    )
    p_plot.add_argument(
        "--samples", type=_whole(1, MAX_SAMPLES), metavar="N", help="Monte Carlo samples"
    )
    p_plot.add_argument("--seed", type=_whole(0, MAX_SEED), metavar="N", help="Monte Carlo seed")

    p_format = sub.add_parser("format", help="lay spec files out canonically")
    p_format.add_argument("specs", metavar="FILE", nargs="+", help="the .tspec files")
    mode = p_format.add_mutually_exclusive_group()
    mode.add_argument(
        "--check",
        action="store_true",
        help="change nothing; exit 1 if any file is not in canonical layout",
    )
    mode.add_argument(
        "--write", action="store_true", help="rewrite the files in place (atomically)"
    )

    p_table = sub.add_parser("table", help="part-value table for documentation")
    common(p_table)
    p_table.add_argument(
        "--format",
        "-f",
        choices=("markdown", "rest", "csv"),
        default="markdown",
        help="table format (default markdown)",
    )
    p_table.add_argument(
        "--bom",
        action="store_true",
        help="bill of materials: one row per part, with board designators from 'refs'",
    )

    p_explain = sub.add_parser(
        "explain", help="the derivation of each output: formula, numbers at each corner, sources"
    )
    common(p_explain)
    p_explain.add_argument("blocks", metavar="BLOCK", nargs="*", help="blocks to explain (all)")
    p_explain.add_argument(
        "--form",
        choices=("text", "rst", "md"),
        default="text",
        help="plain text (default), reStructuredText or Markdown",
    )

    p_diff = sub.add_parser(
        "diff",
        help="compare two specs, or one spec at two git revisions, block by block",
        usage="timespec diff [options] OLD NEW\n       timespec diff [options] REV1..REV2 -- PATH",
    )
    p_diff.add_argument(
        "sides",
        metavar="SIDE",
        nargs="+",
        help="two spec files, or a git range and the spec's path (an empty side of the "
        "range is the working tree)",
    )
    p_diff.add_argument(
        "--form", choices=("text", "md"), default="text", help="plain text or Markdown"
    )
    p_diff.add_argument("--json", action="store_true", help="print the JSON document")
    p_diff.add_argument(
        "--margin-drop",
        type=_percent,
        metavar="PCT",
        help="a block whose margin falls by more than PCT %% of the required half-width "
        "counts as worse (default: only verdicts decide)",
    )
    p_diff.add_argument(
        "--output", "-o", metavar="PATH", help="write to PATH (atomically) instead of stdout"
    )
    return parser


def _percent(text: str) -> float:
    """An argparse type: a size in percent, ``5%`` or ``5`` (returned as 0.05)."""
    try:
        value = float(text.strip().removesuffix("%"))
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a percentage such as 5%") from None
    if not (0.0 <= value < float("inf")):
        raise argparse.ArgumentTypeError("must be a finite size of at least 0%")
    return value / 100.0


def _whole(minimum: int, maximum: int) -> Callable[[str], int]:
    """An argparse type: a whole number from ``minimum`` to ``maximum``."""

    def parse(text: str) -> int:
        try:
            value = int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
        if value < minimum:
            raise argparse.ArgumentTypeError(f"must be at least {minimum}")
        if value > maximum:
            raise argparse.ArgumentTypeError(f"must be at most {maximum:,}")
        return value

    return parse


def write_atomic(path: str | Path, text: str) -> None:
    """Write text to a file so that readers see the old file or the whole new one.

    Parameters
    ----------
    path
        Destination.
    text
        Content (UTF-8).

    Raises
    ------
    UsageError
        When the destination cannot be written
        (see :func:`timespec.outputs.files.write_bytes_safely`).
    """
    write_text_safely(path, text)


def write_atomic_bytes(path: str | Path, data: bytes) -> None:
    """Write bytes to a file safely (see :func:`timespec.outputs.files.write_bytes_safely`).

    Parameters
    ----------
    path
        Destination.
    data
        Content.

    Raises
    ------
    UsageError
        When the destination cannot be written.
    """
    write_bytes_safely(path, data)


def _emit(text: str, output: str | None, stdout: TextIO) -> None:
    if output:
        write_atomic(output, text)
    else:
        stdout.write(text)


def _progress(stream: TextIO) -> object | None:
    from timespec.design.statistics import terminal_progress

    return terminal_progress(stream)


def _format(args: argparse.Namespace, stdout: TextIO) -> int:
    from timespec.language.canonical import layout_file

    done = [(path, *layout_file(path)) for path in args.specs]  # read all before writing any
    changed = [path for path, before, after in done if before != after]
    if args.check:
        for path in changed:
            stdout.write(f"would lay out {path}\n")
        return EXIT_FAILED if changed else EXIT_OK
    if args.write:
        for path, before, after in done:
            if before != after:
                write_atomic(path, after)
                stdout.write(f"laid out {path}\n")
        return EXIT_OK
    for _path, _before, after in done:
        stdout.write(after)
    return EXIT_OK


def _diff(args: argparse.Namespace, stdout: TextIO) -> int:
    import json

    from timespec import api
    from timespec.outputs.diff import diff_results, diff_to_dict, render_diff
    from timespec.outputs.revisions import load_at_revision, split_range

    sides: list[str] = args.sides
    if len(sides) != 2:
        late = [s for s in sides[2:] if s.startswith("-")]
        hint = f"; options go before '--' ({late[0]!r} came after it)" if late else ""
        raise UsageError(f"diff takes OLD NEW (two spec files) or REV1..REV2 -- PATH{hint}")
    revs = None if Path(sides[0]).is_file() else split_range(sides[0])
    if revs is None:
        specs = [api.load(sides[0]), api.load(sides[1])]
        labels = list(sides)
    else:
        specs = [api.load(sides[1]) if r is None else load_at_revision(r, sides[1]) for r in revs]
        labels = [
            s.path or sides[1] if r else f"{sides[1]} (working tree)"
            for r, s in zip(revs, specs, strict=True)
        ]
    old, new = (api.solve(s, statistics=False, fixes=False) for s in specs)
    diff = diff_results(
        old, new, old_label=labels[0], new_label=labels[1], margin_drop=args.margin_drop
    )
    if args.json:
        text = json.dumps(diff_to_dict(diff), indent=2, allow_nan=False) + "\n"
    else:
        text = render_diff(diff, args.form)
    _emit(text, args.output, stdout)
    return EXIT_FAILED if diff.worse else EXIT_OK


def _check(args: argparse.Namespace, stdout: TextIO) -> int:
    """``timespec check PATH...``: every spec file, one run, one output."""
    from timespec import api
    from timespec.outputs.checkrun import api_solve, check_paths, render_run, run_to_json

    run = check_paths(
        args.paths, jobs=args.jobs, solve=api_solve(api.solve), load=api.load, notes=args.verbose
    )
    if args.sarif:
        from timespec.outputs.sarif import sarif_json

        text = sarif_json(run)
    else:
        text = run_to_json(run) if args.json else render_run(run)
    _emit(text, args.output, stdout)
    return run.exit_code


def _run(args: argparse.Namespace, stdout: TextIO, stderr: TextIO) -> int:
    from timespec import api

    if args.command == "format":
        return _format(args, stdout)
    if args.command == "diff":
        return _diff(args, stdout)
    if args.command == "check":
        return _check(args, stdout)
    spec = api.load(args.spec)
    from timespec.outputs.jsondoc import result_to_json
    from timespec.outputs.report import render_report

    if args.command == "solve":
        progress = None if args.no_statistics else _progress(stderr)
        result = api.solve(
            spec,
            statistics=not args.no_statistics,
            samples=args.samples,
            seed=args.seed,
            progress=progress,  # type: ignore[arg-type]
        )
        _emit(result_to_json(result) if args.json else render_report(result), args.output, stdout)
        return EXIT_OK if result.ok else EXIT_FAILED
    if args.command == "limits":
        import json

        from timespec.design.limits import fixture_limits, limits_to_dict, render_limits

        if spec.fixture is None:
            raise UsageError(
                f"{args.spec} has no fixture: section; add one, e.g.\n"
                "    fixture:\n      clock 16 MHz ±50 ppm\n      uncertainty 2 us"
            )
        result = api.solve(spec, statistics=False, fixes=False)
        lims = fixture_limits(result, decision=args.decision)
        text = (
            json.dumps(limits_to_dict(lims), indent=2, allow_nan=False) + "\n"
            if args.json
            else render_limits(lims)
        )
        _emit(text, args.output, stdout)
        return EXIT_OK if result.ok else EXIT_FAILED
    if args.command == "plot":
        from timespec.outputs.charts import chart
        from timespec.outputs.figures import figure_bytes

        suffix = Path(args.output).suffix.lower()
        if suffix not in (".png", ".svg", ".pdf"):
            raise UsageError(
                f"cannot tell the image format of {args.output!r}: use .png, .svg or .pdf"
            )
        result = api.solve(spec, samples=args.samples, seed=args.seed, fixes=False)
        fig = chart(result, args.kind, args.block)
        write_atomic_bytes(args.output, figure_bytes(fig, suffix[1:]))
        stdout.write(f"wrote {args.output}\n")
        return EXIT_OK if result.ok else EXIT_FAILED
    if args.command == "table":
        from timespec.outputs.tables import render_bom, render_table

        result = api.solve(spec, statistics=False, fixes=False)
        render = render_bom if args.bom else render_table
        _emit(render(result, args.format), args.output, stdout)
        return EXIT_OK if result.ok else EXIT_FAILED
    if args.command == "explain":
        from timespec.outputs.explain import explain_spec, render_derivation

        derivation = explain_spec(spec, args.blocks)
        _emit(render_derivation(derivation, args.form), args.output, stdout)
        return EXIT_OK if derivation.ok else EXIT_FAILED
    raise UsageError("no command given (try 'timespec solve FILE' or 'timespec --help')")


#: ASCII stand-ins for the characters timespec prints, for consoles that cannot encode them.
_ASCII = str.maketrans(
    {
        "\u00b5": "u",
        "\u03bc": "u",
        "\u03a9": "Ohm",
        "\u2126": "Ohm",
        "\u00b1": "+/-",
        "\u2212": "-",
        "\u2013": "-",
        "\u2014": "-",
        "\u2026": "...",
        "\u00b0": "deg",
        "\u00d7": "x",
        "\u00b7": "*",
        "\u2265": ">=",
        "\u2264": "<=",
        "\u2192": "->",
        "\u2248": "~",
        "\u221e": "inf",
        "\u2032": "'",
        "\u2018": "'",
        "\u2019": "'",
        "\u201c": '"',
        "\u201d": '"',
        "\u00b2": "^2",
        "\u221a": "sqrt",
        "\u2500": "-",
        "\u2502": "|",
        "\u25b2": "^",
    }
)


def ascii_fallback(text: str) -> str:
    """Text with the characters timespec prints replaced by ASCII stand-ins.

    Parameters
    ----------
    text
        Any text.

    Returns
    -------
    str
        Pure ASCII: known symbols spelled out (``µ`` → ``u``, ``Ω`` → ``Ohm``,
        ``±`` → ``+/-`` ...), anything else as ``?``.
    """
    return text.translate(_ASCII).encode("ascii", "replace").decode("ascii")


class _Console:
    """A text stream that falls back to ASCII when the console cannot encode a character."""

    def __init__(self, stream: TextIO) -> None:
        self._stream = stream

    def write(self, text: str) -> int:
        try:
            return self._stream.write(text)
        except UnicodeEncodeError:
            return self._stream.write(ascii_fallback(text))

    def flush(self) -> None:
        self._stream.flush()

    def isatty(self) -> bool:
        return self._stream.isatty()

    def __getattr__(self, name: str) -> object:
        return getattr(self._stream, name)


def _bug(exc: BaseException, err: TextIO, debug: bool) -> int:
    """Report an unexpected exception as a bug: one line, traceback on request."""
    import traceback

    if debug:
        traceback.print_exception(exc, file=err)
    where = ""
    tb = exc.__traceback__
    while tb is not None and tb.tb_next is not None:
        tb = tb.tb_next
    if tb is not None:
        where = f" at {Path(tb.tb_frame.f_code.co_filename).name}:{tb.tb_lineno}"
    hint = "" if debug else f"; run with --debug or {DEBUG_VARIABLE}=1 for the traceback"
    err.write(
        f"timespec: internal error{where}: {type(exc).__name__}: {exc}. This is a bug in "
        f"timespec {__version__}, not in your spec; please report it to {REPORT_BUGS} with "
        f"the spec and the command{hint}.\n"
    )
    return EXIT_BUG


def main(
    argv: Sequence[str] | None = None,
    *,
    stdout: TextIO | None = None,
    stderr: TextIO | None = None,
) -> int:
    """Run the command line.

    Parameters
    ----------
    argv
        Arguments without the program name (``sys.argv[1:]`` when ``None``).
    stdout, stderr
        Streams (the process's own when ``None``).

    Returns
    -------
    int
        Exit code: 0 all blocks meet, 1 some block does not, 2 a spec or usage
        error, 3 an unexpected error (a bug in timespec, see :data:`EXIT_BUG`).
    """
    out: TextIO = stdout or _Console(sys.stdout)  # type: ignore[assignment]
    err: TextIO = stderr or _Console(sys.stderr)  # type: ignore[assignment]
    parser = _build_parser()
    args_list = list(argv) if argv is not None else sys.argv[1:]
    debug = "--debug" in args_list or os.environ.get(DEBUG_VARIABLE, "") not in ("", "0")
    try:
        args = parser.parse_args(args_list)
        if args.command is None:
            parser.print_help(out)
            return EXIT_USAGE
        return _run(args, out, err)
    except SpecError as exc:
        if isinstance(exc, UsageError):
            err.write(f"timespec: error: {exc.message}\n")
        else:
            err.write(f"{exc}\n")
        return EXIT_USAGE
    except KeyboardInterrupt:
        err.write("timespec: interrupted\n")
        return 130
    except BrokenPipeError:
        return EXIT_OK
    except Exception as exc:  # the one place every other error is caught
        return _bug(exc, err, debug)
