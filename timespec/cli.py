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
stderr, no traceback).
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import TextIO

from timespec._version import __version__
from timespec.errors import SpecError, UsageError

__all__ = ["main", "write_atomic", "write_atomic_bytes"]

EXIT_OK = 0
EXIT_FAILED = 1
EXIT_USAGE = 2


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
        type=_whole(1),
        metavar="N",
        help="Monte Carlo samples (default: the spec's, else 20000)",
    )
    p_solve.add_argument("--seed", type=_whole(0), metavar="N", help="Monte Carlo seed")
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
    p_plot.add_argument("--samples", type=_whole(1), metavar="N", help="Monte Carlo samples")

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


def _whole(minimum: int) -> Callable[[str], int]:
    """An argparse type: a whole number of at least ``minimum``."""

    def parse(text: str) -> int:
        try:
            value = int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
        if value < minimum:
            raise argparse.ArgumentTypeError(f"must be at least {minimum}")
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
        When the folder does not exist or cannot be written.
    """
    write_atomic_bytes(path, text.encode("utf-8"))


def _figure_bytes(fig: object, fmt: str) -> bytes:
    import io

    buf = io.BytesIO()
    fig.savefig(buf, format=fmt, dpi=120)  # type: ignore[attr-defined]
    return buf.getvalue()


def write_atomic_bytes(path: str | Path, data: bytes) -> None:
    """Write bytes to a file atomically (see :func:`write_atomic`).

    Parameters
    ----------
    path
        Destination.
    data
        Content.

    Raises
    ------
    UsageError
        When the folder does not exist or cannot be written.
    """
    dest = Path(path)
    folder = dest.parent if str(dest.parent) else Path(".")
    if not folder.is_dir():
        raise UsageError(f"cannot write {str(dest)!r}: folder {str(folder)!r} does not exist")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise UsageError(f"cannot write {str(dest)!r}: {exc.strerror}") from None
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        os.replace(tmp, dest)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


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
        return EXIT_OK
    raise UsageError("no command given (try 'timespec solve FILE' or 'timespec --help')")


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
        Exit code: 0 all blocks meet, 1 some block does not, 2 a spec or usage error.
    """
    out = stdout or sys.stdout
    err = stderr or sys.stderr
    parser = _build_parser()
    try:
        args = parser.parse_args(list(argv) if argv is not None else None)
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
