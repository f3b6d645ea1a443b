"""The human-readable report of a solved spec.

One section per block: the verdict, the parts, each computed quantity against
its requirement (nominal, worst-case window and the inputs that set each end),
statistics and the largest contributors when analysed, design-rule findings,
fixes for an infeasible requirement, and the runners-up.
"""

from __future__ import annotations

import math
import textwrap
from collections.abc import Sequence

from timespec import __version__
from timespec.families.base import Part
from timespec.fmt import format_part_value, format_quantity, format_window
from timespec.result import BlockResult, Candidate, OutputResult, Result

__all__ = ["describe_part", "render_block", "render_check", "render_report", "uses_ppm"]

_WIDTH = 92
_VERDICT = {"meets": "MEETS", "fails": "FAILS", "infeasible": "INFEASIBLE"}


def uses_ppm(out: OutputResult) -> bool:
    """Whether a ratio output reads better in ppm (crystal accuracy, pulling) than in %.

    Parameters
    ----------
    out
        An output.

    Returns
    -------
    bool
        True for small ratios.
    """
    if out.kind != "ratio":
        return False
    values = [out.nominal, out.low, out.high]
    if out.required is not None:
        values += [out.required.low, out.required.high]
    finite = [abs(v) for v in values if math.isfinite(v)]
    return bool(finite) and max(finite) < 2e-3


def describe_part(part: Part) -> str:
    """One line for a part: value, series, tolerance, tempco or dielectric.

    Parameters
    ----------
    part
        The part.

    Returns
    -------
    str
        e.g. ``"619k  E96 ±1 %, ±50 ppm/K"``.
    """
    bits = [format_part_value(part.value, part.kind)]
    origin = part.series or "off-series"
    pair = getattr(part, "pair", None)
    if pair:
        a, b, how = pair
        origin = (
            f"{format_part_value(a, part.kind)} {'+' if how == 'series' else '∥'} "
            f"{format_part_value(b, part.kind)} ({part.series or 'pair'} pair)"
        )
    detail = f"{origin} ±{part.tolerance * 100:g} %"
    if part.kind == "resistance":
        detail += f", ±{(part.tempco_ppm or 0):g} ppm/K"
    elif part.dielectric:
        detail += f", {part.dielectric}"
    if part.ageing:
        detail += f", ±{part.ageing * 100:g} %/year"
    if part.pinned:
        detail += "  (pinned)"
    return f"{bits[0]:<7} {detail}"


def _q(value: float, out: OutputResult) -> str:
    return format_quantity(value, out.kind, ppm=uses_ppm(out))


def _wrap(label: str, text: str, indent: int = 13) -> list[str]:
    first = f"  {label:<{indent - 2}}"
    lines = textwrap.wrap(
        text, width=_WIDTH, initial_indent=first, subsequent_indent=" " * (indent + 2)
    )
    return lines or [first.rstrip()]


def _output_lines(out: OutputResult, result: BlockResult) -> list[str]:
    lines: list[str] = []
    label = out.name
    pad = " " * 13
    ppm = uses_ppm(out)
    if out.required is not None:
        req = format_window(out.required.low, out.required.high, out.kind, ppm=ppm)
        lines.append(f"  {label:<11}required   {req}")
        lines.append(f"{pad}nominal    {_q(out.nominal, out)}")
    else:
        lines.append(f"  {label:<11}nominal    {_q(out.nominal, out)}")
    wc = format_window(out.low, out.high, out.kind, ppm=ppm)
    status = ""
    if out.required is not None:
        lo_m, hi_m = out.margin
        if out.meets:
            status = "   inside"
        else:
            status = "   OUTSIDE"
        if math.isfinite(lo_m) and math.isfinite(hi_m):
            status += (
                f" (margin {format_quantity(lo_m, out.kind, ppm=ppm)} low, "
                f"{format_quantity(hi_m, out.kind, ppm=ppm)} high)"
            )
    lines.append(f"{pad}worst case {wc}{status}")
    if out.required is not None and out.low_corner and out.high_corner:
        lines += textwrap.wrap(
            f"lowest at: {out.low_corner}", width=_WIDTH, initial_indent=pad + "  ",
            subsequent_indent=pad + "    ",
        )
        lines += textwrap.wrap(
            f"highest at: {out.high_corner}", width=_WIDTH, initial_indent=pad + "  ",
            subsequent_indent=pad + "    ",
        )
    rss = result.rss.get(out.name)
    mc = result.monte_carlo.outputs.get(out.name) if result.monte_carlo else None
    if rss is not None or mc is not None:
        parts = []
        if rss is not None:
            parts.append(f"RSS σ {format_quantity(rss.sigma, out.kind, ppm=ppm)}")
        if mc is not None:
            p_lo = mc.percentiles.get(0.135, math.nan)
            p_hi = mc.percentiles.get(99.865, math.nan)
            text = (
                f"Monte Carlo mean {_q(mc.mean, out)}, σ "
                f"{format_quantity(mc.std, out.kind, ppm=ppm)}, 99.73 % within "
                f"{_q(p_lo, out)} … {_q(p_hi, out)}"
            )
            if mc.cpk is not None and out.required is not None:
                text += f", Cpk {mc.cpk:.3g}"
            parts.append(text)
        lines += textwrap.wrap(
            "; ".join(parts), width=_WIDTH, initial_indent=pad, subsequent_indent=pad + "  "
        )
    return lines


def _contributors(result: BlockResult) -> list[str]:
    lines: list[str] = []
    for req in result.block.requirements:
        rss = result.rss.get(req.quantity)
        if rss is None or not rss.contributions:
            continue
        top = [c for c in rss.contributions if c.share >= 0.005][:6]
        if not top:
            continue
        text = " · ".join(f"{c.label} {c.share * 100:.0f} %" for c in top)
        lines += _wrap(f"drivers ({req.quantity})", text, indent=13)
    return lines


def _candidate_line(c: Candidate) -> str:
    parts = ", ".join(f"{p.ref} {format_part_value(p.value, p.kind)}" for p in c.design.parts)
    if c.design.variant:
        parts = f"[{c.design.variant}] " + parts
    req = [o for o in c.outputs if o.required is not None]
    wc = "; ".join(
        f"{o.name} {format_window(o.low, o.high, o.kind, ppm=uses_ppm(o))}" for o in req
    )
    return f"{parts}: {wc} — {c.rank_reason}"


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
    lines = [head + "─" * max(3, _WIDTH - len(head) - len(verdict) - 1) + " " + verdict]
    best = result.best
    if best is None:
        lines += [f"  {n}" for n in result.notes]
        return "\n".join(lines)
    if best.design.variant:
        lines.append(f"  {'circuit':<11}{best.design.variant}")
    for i, part in enumerate(best.design.parts):
        label = "parts" if i == 0 else ""
        lines.append(f"  {label:<11}{part.ref:<4}{describe_part(part)}")
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
        lines += _wrap("findings" if f is best.findings[0] else "", f"{f.severity}: {f.message} [{f.code}]")
    for note in result.notes:
        lines += _wrap("note", note)
    fixes: Sequence[object] = result.extra.get("fixes", ())  # type: ignore[assignment]
    for i, fix in enumerate(fixes):
        what = getattr(fix, "what", str(fix))
        lines += _wrap("to fix" if i == 0 else "", f"{i + 1}. {what}")
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
    summary = ", ".join(f"{n} {v}" for v, n in counts.items() if n)
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
        if b.best is not None:
            for o in b.best.outputs:
                if o.required is None:
                    continue
                ppm = uses_ppm(o)
                where = "within" if o.meets else "OUTSIDE"
                bits.append(
                    f"{o.name} {format_window(o.low, o.high, o.kind, ppm=ppm)} {where} "
                    f"{format_window(o.required.low, o.required.high, o.kind, ppm=ppm)}"
                )
            errors = [f.code for f in b.best.findings if f.severity == "error"]
            if errors:
                bits.append("rule errors: " + ", ".join(errors))
        else:
            bits.extend(b.notes)
        lines.append(f"{status:<11} {b.block.name:<{width}}  {'; '.join(bits)}")
    bad = sum(1 for b in result.blocks if b.verdict != "meets")
    lines.append(f"{len(result.blocks) - bad} of {len(result.blocks)} blocks meet their requirements")
    return "\n".join(lines) + "\n"
