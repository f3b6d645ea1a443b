"""The chart kinds ``timespec plot`` draws, by name.

* ``margin`` — every requirement against its design, one row each
  (:mod:`timespec.outputs.plot`);
* ``waveform`` — the timing capacitor and the output over one cycle or pulse
  at the nominal design (:mod:`timespec.outputs.waveform`);
* ``histogram`` — the Monte Carlo samples of each required output
  (:mod:`timespec.outputs.histogram`);
* ``ambient`` — each required output over the ambient range with the nominal
  and the worst-case corner parts (:mod:`timespec.outputs.ambient`).
"""

from __future__ import annotations

import hashlib
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from timespec.design.result import Result
from timespec.errors import UsageError

__all__ = ["KINDS", "chart", "write_chart"]

#: Chart kinds, the first the default.
KINDS: tuple[str, ...] = ("margin", "waveform", "histogram", "ambient")


def chart(result: Result, kind: str = "margin", blocks: Sequence[str] = ()) -> Any:
    """Draw one kind of chart of a solved spec.

    Parameters
    ----------
    result
        A solved spec; the histogram and margin charts use its Monte Carlo run
        (solve with statistics).
    kind
        One of :data:`KINDS`.
    blocks
        Block names to draw, in order (default: every block); the margin chart
        draws every block.

    Returns
    -------
    matplotlib.figure.Figure
        The figure; write it with :func:`timespec.outputs.figures.figure_bytes`.

    Raises
    ------
    UsageError
        On an unknown kind or block name, or when there is nothing to draw.
    """
    names = [b.block.name for b in result.blocks]
    unknown = [n for n in blocks if n not in names]
    if unknown:
        raise UsageError(
            f"no block named {', '.join(map(repr, unknown))}; the blocks are {', '.join(names)}"
        )
    chosen = list(blocks) or None
    if kind == "margin":
        from timespec.outputs.plot import margin_chart

        if chosen:
            import dataclasses

            result = dataclasses.replace(result, blocks=tuple(result.block(n) for n in chosen))
        return margin_chart(result)
    if kind == "waveform":
        from timespec.outputs.waveform import waveform_chart

        return waveform_chart(result, chosen)
    if kind == "histogram":
        from timespec.outputs.histogram import histogram_chart

        return histogram_chart(result, chosen)
    if kind == "ambient":
        from timespec.outputs.ambient import ambient_chart

        return ambient_chart(result, chosen)
    raise UsageError(f"unknown chart kind {kind!r}: use {', '.join(KINDS)}")


def write_chart(
    result: Result,
    kind: str,
    folder: Path,
    formats: Sequence[str] = ("svg", "png"),
    blocks: Sequence[str] = (),
) -> Path:
    """Draw a chart and write it into a folder, named after its content, in each format.

    Parameters
    ----------
    result
        A solved spec.
    kind
        One of :data:`KINDS`.
    folder
        Where to write (created when missing).
    formats
        Image formats to write (``"svg"``, ``"png"``, ``"pdf"``), one file each.
    blocks
        Block names, as for :func:`chart`.

    Returns
    -------
    Path
        The files' common stem, ``folder/timespec-<kind>-<hash>``, without a suffix:
        the same chart always gets the same name (the hash is of the first
        format's bytes), so parallel or repeated builds write identical files,
        and ``<stem>.*`` lets a document builder pick the format it supports.

    Raises
    ------
    UsageError
        As :func:`chart`, or when a file cannot be written.
    """
    from timespec.outputs.figures import figure_bytes
    from timespec.outputs.files import write_bytes_safely

    fig = chart(result, kind, blocks)
    images = [(fmt, figure_bytes(fig, fmt)) for fmt in formats]
    folder.mkdir(parents=True, exist_ok=True)
    stem = folder / f"timespec-{kind}-{hashlib.sha256(images[0][1]).hexdigest()[:16]}"
    for fmt, data in images:
        dest = stem.with_name(f"{stem.name}.{fmt}")
        if not dest.exists() or dest.read_bytes() != data:
            write_bytes_safely(dest, data)
    return stem
