"""What every chart shares: matplotlib on demand, colours, and reproducible image bytes.

matplotlib is an optional dependency (``pip install timespec[plot]``); it is
imported only through :func:`new_figure`, with the non-interactive Agg backend,
so importing the chart modules never needs it.

Image bytes are reproducible: the same result gives the same file, byte for
byte, whatever the date or the machine's clock (:func:`figure_bytes` leaves
out every date and the writing program's name, and fixes the SVG id salt).
"""

from __future__ import annotations

import io
import math
from collections.abc import Callable, Sequence
from typing import Any

from timespec.errors import UsageError
from timespec.model import Window

__all__ = [
    "FAILS",
    "FORMATS",
    "MEETS",
    "REQUIRED",
    "WORST",
    "figure_bytes",
    "new_figure",
    "panel_chart",
    "required_edges",
]

#: Image formats a chart can be written in (file suffix without the dot).
FORMATS: tuple[str, ...] = ("png", "svg", "pdf")

#: Colour of a worst-case bar that meets its requirement.
MEETS = "#2a7a2a"
#: Colour of a worst-case bar that does not.
FAILS = "#b22222"
#: Fill of the required window.
REQUIRED = "#e8f4e8"
#: Colour of the worst-case window lines on the waveform, histogram and ambient charts.
WORST = "#6a3d9a"

#: Metadata that would make two runs differ (dates, the program's version), left out.
_NO_STAMPS: dict[str, dict[str, None]] = {
    "png": {"Software": None},
    "svg": {"Date": None, "Creator": None},
    "pdf": {"CreationDate": None, "ModDate": None, "Creator": None, "Producer": None},
}


def required_edges(w: Window) -> tuple[float, float]:
    """The edges of a requirement that bound it, ``±inf`` for an open side.

    Parameters
    ----------
    w
        The required window.

    Returns
    -------
    tuple of float
        ``(low, high)``; an upper bound on a quantity that cannot be negative
        (``2 ms max`` is read as ``0 … 2 ms``) has its zero end opened to
        ``-inf``: zero is where the scale stops, not a limit anyone asked for.
    """
    if w.low <= 0 < w.high and w.kind != "ratio" and w.nominal is None and math.isfinite(w.high):
        return (-math.inf, w.high)
    return (w.low, w.high)


def new_figure(width: float, height: float) -> Any:
    """A new matplotlib figure, detached from any GUI.

    Parameters
    ----------
    width, height
        Size in inches.

    Returns
    -------
    matplotlib.figure.Figure
        The figure.

    Raises
    ------
    UsageError
        When matplotlib is not installed.
    """
    try:
        import matplotlib

        matplotlib.use("Agg")
        from matplotlib.figure import Figure
    except ImportError:  # pragma: no cover - depends on the installation
        raise UsageError("plots need matplotlib: pip install 'timespec[plot]'") from None
    return Figure(figsize=(width, height))


def panel_chart(
    items: Sequence[Any],
    draw: Callable[[Any, Any], None],
    legend: tuple[Sequence[Any], Sequence[str]],
    *,
    width: float = 7.0,
    panel: float = 2.4,
) -> Any:
    """A figure of one panel per item, stacked, with one legend along the bottom.

    Parameters
    ----------
    items
        What each panel shows (at least one).
    draw
        Draws one item into its axes.
    legend
        The legend's handles and labels.
    width, panel
        Figure width and the height of each panel, inches.

    Returns
    -------
    matplotlib.figure.Figure
        The figure.
    """
    height = panel * len(items) + 0.6
    fig = new_figure(width, height)
    axes = fig.subplots(len(items), 1, squeeze=False)[:, 0]
    for ax, item in zip(axes, items, strict=True):
        draw(ax, item)
    fig.tight_layout(rect=(0.0, 0.6 / height, 1.0, 1.0))
    handles, labels = legend
    fig.legend(
        list(handles), list(labels), loc="lower center", ncol=len(labels), fontsize=8, frameon=False
    )
    return fig


def figure_bytes(fig: Any, fmt: str, *, dpi: int = 120) -> bytes:
    """A figure as image bytes, identical from run to run.

    Parameters
    ----------
    fig
        A matplotlib figure.
    fmt
        ``"png"``, ``"svg"`` or ``"pdf"``.
    dpi
        Resolution of a PNG.

    Returns
    -------
    bytes
        The image, with no date, no program version and fixed SVG element ids.

    Raises
    ------
    UsageError
        On an unknown format.
    """
    if fmt not in FORMATS:
        raise UsageError(f"cannot write a {fmt!r} image: use {', '.join(FORMATS)}")
    import matplotlib

    buf = io.BytesIO()
    with matplotlib.rc_context({"svg.hashsalt": "timespec", "svg.fonttype": "path"}):
        fig.savefig(buf, format=fmt, dpi=dpi, metadata=_NO_STAMPS[fmt])
    return buf.getvalue()
