"""The human-readable report of a solved spec.

One section per block: the verdict, the parts, each computed quantity against
its requirement (nominal, worst-case window and the inputs that set each end),
statistics and the largest contributors when analysed, design-rule findings,
fixes for an infeasible requirement, and the runners-up.
"""

from __future__ import annotations

import math
import textwrap
from collections.abc import Mapping, Sequence
from typing import Literal

from timespec._version import __version__
from timespec.analysis import CAPABILITY_MIN_SAMPLES, Capability
from timespec.design.result import BlockResult, Candidate, OutputResult, Result
from timespec.numbers import (
    format_interval,
    format_part,
    format_part_value,
    format_quantity,
    format_window,
    ratio_unit,
)

__all__ = ["ratio_of", "render_block", "render_check", "render_report"]

_WIDTH = 92
_VERDICT = {"meets": "MEETS", "fails": "FAILS", "infeasible": "INFEASIBLE"}


def ratio_of(out: OutputResult) -> Literal["%", "ppm"]:
    """How a ratio output is shown: ppm (crystal accuracy, pulling) or percent.

    Parameters
    ----------
    out
        An output.

    Returns
    -------
    str
        ``"ppm"`` or ``"%"``.
    """
    values = [out.nominal, out.low, out.high]
    if out.required is not None:
        values += [out.required.low, out.required.high]
    return ratio_unit(out.name, values)


def _q(value: float, out: OutputResult) -> str:
    return format_quantity(value, out.kind, ratio=ratio_of(out))


def _wrap(label: str, text: str, indent: int = 13) -> list[str]:
    first = f"  {label:<{indent - 2}}"
    lines = textwrap.wrap(
        text, width=_WIDTH, initial_indent=first, subsequent_indent=" " * (indent + 2)
    )
    return lines or [first.rstrip()]


def _headed(label: str, rest: str) -> list[str]:
    """An output's first line: its name in the 11-wide column, or on a line of its own
    when it does not fit (``gain_margin``), so the name never runs into the text."""
    if len(label) < 11:
        return [f"  {label:<11}{rest}"]
    return [f"  {label}", f"{' ' * 13}{rest}"]


def _output_lines(out: OutputResult, result: BlockResult) -> list[str]:
    lines: list[str] = []
    label = out.name
    pad = " " * 13
    ratio = ratio_of(out)
    if out.required is not None:
        req = format_window(out.required, ratio=ratio)
        span = format_interval(out.required.low, out.required.high, out.kind, ratio=ratio)
        if span.replace(" … ", " to ") != req and not span.startswith(("≤", "≥")):
            req += f"  ({span})"
        lines.extend(_headed(label, f"required   {req}"))
        lines.append(f"{pad}nominal    {_q(out.nominal, out)}")
    else:
        lines.extend(_headed(label, f"nominal    {_q(out.nominal, out)}"))
    wc = format_interval(out.low, out.high, out.kind, ratio=ratio)
    status = ""
    if out.required is not None:
        lo_m, hi_m = out.margin
        status = "   inside" if out.meets else "   OUTSIDE"
        if math.isfinite(lo_m) and math.isfinite(hi_m):
            status += (
                f" (margin {format_quantity(lo_m, out.kind, ratio=ratio)} low, "
                f"{format_quantity(hi_m, out.kind, ratio=ratio)} high)"
            )
    lines.append(f"{pad}worst case {wc}{status}")
    rss = result.rss.get(out.name)
    if out.required is not None and out.low_corner and out.high_corner:
        for word, corner, at in (
            ("lowest", out.low_corner, out.low_at),
            ("highest", out.high_corner, out.high_at),
        ):
            lines += textwrap.wrap(
                f"{word} at: {_corner_text(corner, at, result, _shares(result, out.name))}",
                width=_WIDTH,
                initial_indent=pad + "  ",
                subsequent_indent=pad + "    ",
            )
    mc = result.monte_carlo.outputs.get(out.name) if result.monte_carlo else None
    if rss is not None or mc is not None:
        parts = []
        if rss is not None:
            parts.append(f"RSS σ {format_quantity(rss.sigma, out.kind, ratio=ratio)}")
        if mc is not None:
            p_lo = mc.percentiles.get(0.135, math.nan)
            p_hi = mc.percentiles.get(99.865, math.nan)
            text = (
                f"Monte Carlo mean {_q(mc.mean, out)}, σ "
                f"{format_quantity(mc.std, out.kind, ratio=ratio)}, 99.73 % within "
                f"{_q(p_lo, out)} … {_q(p_hi, out)}"
            )
            if out.required is not None:
                text += _capability_text(mc.capability, result)
            parts.append(text)
        lines += textwrap.wrap(
            "; ".join(parts), width=_WIDTH, initial_indent=pad, subsequent_indent=pad + "  "
        )
    return lines


def _shares(result: BlockResult, name: str) -> dict[str, float] | None:
    """Driver share of each input in one output's variance, by factor name.

    The variance-based shares of the Monte Carlo step when present (they credit
    interactions such as a tempco with the ambient), else the first-order RSS shares.
    """
    mc = result.monte_carlo
    drivers = mc.drivers.get(name) if mc is not None else None
    if drivers:
        return {d.name: d.share for d in drivers}
    rss = result.rss.get(name)
    if rss is None:
        return None
    return {c.name: c.share for c in rss.contributions}


def _drivers(result: BlockResult, name: str) -> list[tuple[str, float]]:
    """``(label, share)`` of one output's drivers, largest first (see :func:`_shares`)."""
    mc = result.monte_carlo
    drivers = mc.drivers.get(name) if mc is not None else None
    if drivers:
        return [(d.label, d.share) for d in drivers]
    rss = result.rss.get(name)
    return [(c.label, c.share) for c in rss.contributions] if rss is not None else []


def _capability_text(cap: Capability | None, result: BlockResult) -> str:
    """The capability index (percentile method) for the statistics line."""
    mc = result.monte_carlo
    if cap is None:
        if mc is not None and mc.samples < CAPABILITY_MIN_SAMPLES:
            return f", no Cpk below {CAPABILITY_MIN_SAMPLES} samples"
        return ""
    if cap.lower is None and cap.upper is None:
        return ""
    side = ""
    if cap.lower is None:
        side = " upper"
    elif cap.upper is None:
        side = " lower"
    return f", Cpk{side} {cap.cpk:.3g} (percentiles)"


def _corner_text(
    label: str, at: Mapping[str, float], result: BlockResult, share: Mapping[str, float] | None
) -> str:
    """The corner in words, keeping only inputs that carry at least 1 % of the variance."""
    if share is None or not at or not result.factors:
        return label
    keep = [f for f in result.factors if f.name in at and share.get(f.name, 0.0) >= 0.01]
    if not keep:
        return label
    keep.sort(key=lambda f: -share[f.name])
    words = []
    for f in keep:
        value = at[f.name]
        if f.name == "temp":
            words.append(f"ambient {value:g} °C")
        elif f.name == "supply":
            words.append(f"supply {value:g} V")
        else:
            end = "low" if value == f.low else "high" if value == f.high else f"at {value:.4g}"
            words.append(f"{f.label.split(' (')[0]} {end}")
    rest = len(at) - len(keep)
    return ", ".join(words) + (f" (and {rest} minor inputs)" if rest else "")


def _pct(share: float) -> str:
    """A driver share in percent, two significant digits, never rounded to 0 %."""
    if share < 1e-4:
        return "<0.01 %"
    return f"{share * 100:.2g} %"


def _contributors(result: BlockResult) -> list[str]:
    lines: list[str] = []
    for req in result.block.requirements:
        shares = [(label, v) for label, v in _drivers(result, req.quantity) if v > 0.0]
        top = [(label, v) for label, v in shares if v >= 0.005][:6]
        if not top:
            continue
        text = f"{req.quantity}: " + " · ".join(f"{label} {_pct(v)}" for label, v in top)
        rest = shares[len(top) :]
        named = [(label.split(" (")[0], v) for label, v in rest if v >= 1e-4]
        if named:
            text += " · also " + ", ".join(f"{label} {_pct(v)}" for label, v in named)
        if len(rest) > len(named):
            text += f" (and {len(rest) - len(named)} below 0.01 %)"
        lines += _wrap("drivers" if not lines else "", text, indent=13)
    return lines


def _candidate_line(c: Candidate) -> str:
    parts = ", ".join(f"{p.ref} {format_part_value(p.value, p.kind)}" for p in c.design.parts)
    if c.design.variant:
        parts = f"[{c.design.variant}] " + parts
    req = [o for o in c.outputs if o.required is not None]
    wc = "; ".join(
        f"{o.name} {format_interval(o.low, o.high, o.kind, ratio=ratio_of(o))}" for o in req
    )
    return f"{parts}: {wc} — {c.rank_reason}"


def _fix_lines(result: BlockResult) -> list[str]:
    lines: list[str] = []
    fixes: Sequence[object] = result.extra.get("fixes", ())
    for i, fix in enumerate(fixes):
        what = getattr(fix, "what", str(fix))
        lines += _wrap("to fix" if i == 0 else "", f"{i + 1}. {what}")
    return lines


def _as_built(result: BlockResult) -> bool:
    """A block with every part pinned and no requirement that passes its design rules:
    a board characterised as built."""
    return result.verdict == "meets" and not result.block.requirements


def render_block(result: BlockResult) -> str:
    """Render one block's section of the report.

    Parameters
    ----------
    result
        The block's result.

    Returns
    -------
    str
        Several lines, no trailing newline.
    """
    blk = result.block
    head = f"── {blk.kind} {blk.name} "
    verdict = _VERDICT.get(result.verdict, result.verdict.upper())
    if result.mode == "checked":
        verdict = f"checked: {verdict}"
    if _as_built(result):
        verdict = "AS BUILT (no requirement)"
    lines = [head + "─" * max(3, _WIDTH - len(head) - len(verdict) - 1) + " " + verdict]
    best = result.best
    if best is None:
        for note in result.notes:
            lines += _wrap("note", note)
        lines += _fix_lines(result)
        return "\n".join(lines)
    if best.design.variant:
        lines.append(f"  {'circuit':<11}{best.design.variant}")
    for i, part in enumerate(best.design.parts):
        label = "parts" if i == 0 else ""
        lines.append(f"  {label:<11}{format_part(part)}")
    for out in best.outputs:
        lines += _output_lines(out, result)
    if result.monte_carlo is not None and any(o.required for o in best.outputs):
        mc = result.monte_carlo
        lo, hi = mc.yield_interval
        lines.append(
            f"  {'yield':<11}{mc.yield_fraction * 100:.4g} % of {mc.samples} Monte Carlo samples "
            f"(95 % interval {lo * 100:.4g} … {hi * 100:.4g} %, seed {mc.seed})"
        )
    lines += _contributors(result)
    for f in best.findings:
        lines += _wrap(
            "findings" if f is best.findings[0] else "", f"{f.severity}: {f.message} [{f.code}]"
        )
    for note in result.notes:
        lines += _wrap("note", note)
    lines += _fix_lines(result)
    for i, alt in enumerate(result.alternatives):
        lines += _wrap("runners-up" if i == 0 else "", _candidate_line(alt))
    return "\n".join(lines)


def render_report(result: Result) -> str:
    """Render the whole report.

    Parameters
    ----------
    result
        The solved spec.

    Returns
    -------
    str
        The report text, ending with a newline.
    """
    source = result.spec.path or "<spec>"
    out = [f"timespec {__version__} — {source}", ""]
    for block in result.blocks:
        out.append(render_block(block))
        out.append("")
    counts = {v: sum(1 for b in result.blocks if b.verdict == v) for v in _VERDICT}
    plural = {"meets": "meet", "fails": "fail", "infeasible": "infeasible"}
    summary = ", ".join(f"{n} {v if n == 1 else plural[v]}" for v, n in counts.items() if n)
    out.append(f"{len(result.blocks)} block{'s' if len(result.blocks) != 1 else ''}: {summary}")
    return "\n".join(out) + "\n"


def render_check(result: Result) -> str:
    """One line per block for CI logs: status, name, and each requirement against its worst case.

    Parameters
    ----------
    result
        The solved (or checked) spec.

    Returns
    -------
    str
        Lines ending with a summary line.
    """
    lines = []
    width = max((len(b.block.name) for b in result.blocks), default=4)
    for b in result.blocks:
        status = "ok" if b.verdict == "meets" else b.verdict.upper()
        bits = []
        if _as_built(b) and b.best is not None:
            status = "as built"
            o = b.best.outputs[0]
            bits.append(
                f"{o.name} {format_interval(o.low, o.high, o.kind, ratio=ratio_of(o))} "
                "(no requirement)"
            )
        elif b.best is not None:
            for o in b.best.outputs:
                if o.required is None:
                    continue
                ratio = ratio_of(o)
                where = "within" if o.meets else "OUTSIDE"
                bits.append(
                    f"{o.name} {format_interval(o.low, o.high, o.kind, ratio=ratio)} {where} "
                    f"{format_interval(o.required.low, o.required.high, o.kind, ratio=ratio)}"
                )
            errors = [f.code for f in b.best.findings if f.severity == "error"]
            if errors:
                bits.append("rule errors: " + ", ".join(errors))
        else:
            bits.extend(b.notes)
        lines.append(f"{status:<11} {b.block.name:<{width}}  {'; '.join(bits)}")
    bad = sum(1 for b in result.blocks if b.verdict != "meets")
    lines.append(
        f"{len(result.blocks) - bad} of {len(result.blocks)} blocks meet their requirements"
    )
    return "\n".join(lines) + "\n"
