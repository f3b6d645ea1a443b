"""The ``timespec`` command: a thin shell over the API.

Commands:

``timespec solve FILE``
    Choose parts for every block and print the report (``--json`` for the JSON
    document).
``timespec check FILE``
    For CI: one line per block; exit 1 when any block does not meet its
    requirement (a pinned part was changed, a tolerance or range widened).
``timespec table FILE``
    Part-value table in Markdown, reST or CSV for the docs.
``timespec limits FILE``
    Fixture acceptance limits (time and capture-clock counts) from the spec's
    ``fixture:`` section.
``timespec plot FILE -o chart.png``
    Margin chart of every requirement (needs the ``plot`` extra).
``timespec format FILE...``
    Canonical layout of spec files (``--check`` for CI, ``--write`` in place).

Exit codes: 0 every block meets its requirement; 1 a block fails or is
infeasible; 2 a mistake in the spec or on the command line (message on
stderr, no traceback); 3 an unexpected error, which is a bug in timespec (one
line on stderr saying so and how to report it; the traceback only with
``--debug`` or the environment variable ``TIMESPEC_DEBUG=1``).
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
        help="Monte Carlo samples (default: the spec's, else 20000)",
    )
    p_solve.add_argument("--seed", type=_whole(0, MAX_SEED), metavar="N", help="Monte Carlo seed")
    p_solve.add_argument(
        "--no-statistics", action="store_true", help="worst case only: skip RSS and Monte Carlo"
    )

    p_check = sub.add_parser("check", help="verify every block; exit 1 if any does not meet")
    common(p_check)
    p_check.add_argument("--json", action="store_true", help="print the JSON document")

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

    p_plot = sub.add_parser("plot", help="margin chart of every requirement (PNG, SVG or PDF)")
    p_plot.add_argument("spec", metavar="FILE", help="the .tspec file")
    p_plot.add_argument(
        "--output",
        "-o",
        metavar="PATH",
        required=True,
        help="image to write (.png, .svg or .pdf), atomically",
    )
    p_plot.add_argument(
        "--samples", type=_whole(1, MAX_SAMPLES), metavar="N", help="Monte Carlo samples"
    )

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
    return parser


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


#: Image metadata that would make two runs differ (dates), left out of every chart.
_NO_DATES: dict[str, dict[str, None]] = {
    "png": {},
    "svg": {"Date": None},
    "pdf": {"CreationDate": None, "ModDate": None},
}


def _figure_bytes(fig: object, fmt: str) -> bytes:
    """The chart as image bytes, identical from run to run (no dates, fixed SVG ids)."""
    import io

    import matplotlib

    buf = io.BytesIO()
    with matplotlib.rc_context({"svg.hashsalt": "timespec"}):
        fig.savefig(  # type: ignore[attr-defined]
            buf, format=fmt, dpi=120, metadata=_NO_DATES.get(fmt, {})
        )
    return buf.getvalue()


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


def _run(args: argparse.Namespace, stdout: TextIO, stderr: TextIO) -> int:
    from timespec import api

    if args.command == "format":
        return _format(args, stdout)
    spec = api.load(args.spec)
    from timespec.outputs.jsondoc import result_to_json
    from timespec.outputs.report import render_check, render_report

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
    if args.command == "check":
        result = api.solve(spec, statistics=False, fixes=False)
        _emit(result_to_json(result) if args.json else render_check(result), args.output, stdout)
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
        from timespec.outputs.plot import margin_chart

        suffix = Path(args.output).suffix.lower()
        if suffix not in (".png", ".svg", ".pdf"):
            raise UsageError(
                f"cannot tell the image format of {args.output!r}: use .png, .svg or .pdf"
            )
        result = api.solve(spec, samples=args.samples, fixes=False)
        fig = margin_chart(result)
        write_atomic_bytes(args.output, _figure_bytes(fig, suffix[1:]))
        stdout.write(f"wrote {args.output}\n")
        return EXIT_OK if result.ok else EXIT_FAILED
    if args.command == "table":
        from timespec.outputs.tables import render_table

        result = api.solve(spec, statistics=False, fixes=False)
        _emit(render_table(result, args.format), args.output, stdout)
        return EXIT_OK if result.ok else EXIT_FAILED
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
