"""The device-class and dielectric constants a block's model uses, with their sources.

Each constant is listed with the source mark written beside it in
:mod:`timespec.parts.devices`, :mod:`timespec.parts.dielectrics` and
:mod:`timespec.parts.diodes` (``[DS]`` generic device-class datasheets, ``[CP]``
common practice, ``[Mem]`` from memory, ``[AN]`` application notes, ``[Txt]``
the usual textbook model value), read from those modules' source text so the
two never disagree; a value the spec overrides says so.  Where a constant holds
only over a range (:class:`~timespec.parts.validity.Held`), the range is given
with its own source.
"""

from __future__ import annotations

import inspect
import math
import re
from dataclasses import dataclass
from functools import cache
from types import ModuleType

from timespec.families.astable.diode import DIODE_TC_BAND
from timespec.families.crystal.settings import DEFAULT_STRAY, MIN_GAIN_MARGIN
from timespec.model import Block
from timespec.numbers import format_quantity
from timespec.parts import devices, dielectrics, diodes
from timespec.parts.part import Design
from timespec.parts.validity import Held

__all__ = ["Constant", "block_constants", "source_marks"]


@dataclass(frozen=True)
class Constant:
    """One constant of the model, its value and where it comes from.

    Attributes
    ----------
    name
        What it is (``"cmos timer r_on_max"``).
    value
        The value, formatted with its unit.
    source
        The source, with its mark (``"[DS] 0.5 V max saturation ..."``), or
        ``"stated in the spec"``.
    holds
        Where it holds (a :class:`~timespec.parts.validity.Held` range), or ``""``.
    """

    name: str
    value: str
    source: str
    holds: str = ""


_ENTRY = re.compile(r'^\s*"(?P<name>[\w-]+)":\s*(?P<cls>\w+)\(')
_FIELD = re.compile(r"^\s*(?P<field>\w+)=(?P<rest>.*)$")
_COMMENT = re.compile(r"^\s*#\s?(?P<text>.*)$")
_MARK = re.compile(r"\[[A-Za-z/]+\]")


@cache
def source_marks(module: ModuleType) -> dict[tuple[str, str], str]:
    """(entry name, field) → the source comment written beside the value.

    Parameters
    ----------
    module
        A module of :mod:`timespec.parts` whose class entries are written as
        ``"name": Class(field=value,  # [MARK] note``; a comment on the lines right
        above a field without its own belongs to that field and to the fields
        right after it that have none.

    Returns
    -------
    dict
        The comment text (marks included) by entry and field; entries that are
        module-level objects (``SMALL_SIGNAL = DiodeClass(``) use their ``name=`` value.
    """
    out: dict[tuple[str, str], str] = {}
    entry = ""
    pending: list[str] = []
    carry = ""  # a comment block above several fields holds for each of them
    for line in inspect.getsource(module).splitlines():
        head = _ENTRY.match(line)
        if head:
            entry, pending = head.group("name"), []
            continue
        named = re.match(r'^\s*name="(?P<name>[^"]+)",', line)
        if named and not entry:
            entry = named.group("name")
        comment = _COMMENT.match(line)
        if comment:
            pending.append(comment.group("text").strip())
            continue
        m = _FIELD.match(line)
        if m and entry:
            rest = m.group("rest")
            own = rest.split("#", 1)[1].strip() if "#" in rest else ""
            if pending:
                carry = " ".join(pending)
            note = own or carry
            if own:
                carry = ""
            if note and _MARK.search(note):
                out[(entry, m.group("field"))] = note
            pending = []
            continue
        if not line.strip() or line.strip().startswith(("}", ")")):
            pending, carry = [], ""
            if line.startswith(("}", ")")):
                entry = ""
    return out


def _held(h: Held) -> str:
    def end(v: float) -> str:
        if math.isinf(v):
            return "∞" if v > 0 else "−∞"
        if h.kind == "time" and v >= 3600.0:
            return f"{v / 3600.0:g} h"
        if h.kind == "ratio":
            return f"{v:g}"
        return format_quantity(v, h.kind)

    return f"{h.quantity} {end(h.low)}…{end(h.high)} ({h.source})"


def _band(lo: float, hi: float, kind: str) -> str:
    return f"{format_quantity(lo, kind)}…{format_quantity(hi, kind)}"


def _mark(module: ModuleType, entry: str, field: str, default: str) -> str:
    return source_marks(module).get((entry, field), default)


def _timer(block: Block) -> list[Constant]:
    t = block.timer
    if t is None:
        return []
    base = devices.TIMER_CLASSES.get(t.name)
    name = t.name
    rows: list[tuple[str, str]] = [
        (
            "initial",
            f"±{t.initial * 100:g} % monostable timing error → k "
            f"{t.ratio_band[0]:.6g}…{t.ratio_band[1]:.6g}",
        ),
        ("drift_ppm", f"±{t.drift_ppm:g} ppm/K"),
        ("supply_drift", f"±{t.supply_drift * 100:g} %/V"),
        ("r_on_max", format_quantity(t.r_on_max, "resistance")),
        ("i_threshold_max", format_quantity(t.i_threshold_max, "current")),
        ("t_pd", _band(*t.delay_band(block.conditions.supply.low), "time")),
        ("c_node", _band(*t.c_node, "capacitance")),
    ]
    if block.kind == "astable":
        rows.append(("output_drop", format_quantity(t.output_drop, "voltage")))
    out: list[Constant] = []
    for field, value in rows:
        overridden = base is not None and getattr(base, field) != getattr(t, field)
        source = (
            "stated in the spec (overrides the class value)"
            if overridden
            else _mark(devices, name, field, "timer class")
        )
        holds = _held(t.r_on_held) if field == "r_on_max" else ""
        if field == "t_pd" and t.delay_band(block.conditions.supply.low) != t.t_pd:
            source += "; top scaled as (5 V / lowest supply)² [Mem]"
        out.append(Constant(f"{name} timer {field}", value, source, holds))
    return out


def _board_stray() -> Constant:
    return Constant(
        "board stray at a timing node",
        _band(*devices.BOARD_STRAY, "capacitance"),
        "[DS/Mem] pad, trace and a via: a few pF",
    )


def _gate(block: Block) -> list[Constant]:
    g = block.gate
    if g is None:
        return []
    name = g.name

    def triple(v: tuple[float, float, float]) -> str:
        return " / ".join(f"{x:.3g}" for x in v) + " of supply (min / typ / max)"

    rows: list[tuple[str, str, str]] = [
        ("rising", triple(g.rising), _held(g.thresholds_held)),
        ("falling", triple(g.falling), _held(g.thresholds_held)),
        ("hysteresis_min", f"{g.hysteresis_min:.4g} of supply", ""),
        ("i_input_max", f"±{format_quantity(g.i_input_max, 'current')}", _held(g.leakage_held)),
        ("t_pd", _band(*g.t_pd, "time"), _held(g.speed_held)),
        ("c_input", _band(*g.c_input, "capacitance"), ""),
    ]
    return [
        Constant(f"{name} gate {field}", value, _mark(devices, name, field, "gate class"), holds)
        for field, value, holds in rows
    ]


@cache
def _dielectric_notes() -> dict[str, str]:
    """Dielectric name → the source comment above the fixed entries."""
    out: dict[str, str] = {}
    current: list[str] = []
    text: list[str] = []
    for line in inspect.getsource(dielectrics).splitlines():
        if line.startswith("_FIXED"):
            break
        m = re.match(r"^# (?P<names>[A-Z0-9, ]+): (?P<text>.*)$", line)
        if m:
            for n in current:
                out[n] = " ".join(text)
            current = [n.strip() for n in m.group("names").split(",")]
            text = [m.group("text").strip()]
            continue
        cont = re.match(r"^#\s{3,}(?P<text>.*)$", line)
        if cont and current:
            text.append(cont.group("text").strip())
            continue
        if current:
            for n in current:
                out[n] = " ".join(text)
            current, text = [], []
    return out


def _capacitors(block: Block, design: Design) -> list[Constant]:
    out: list[Constant] = []
    seen: set[str] = set()
    for part in design.parts:
        if part.kind != "capacitance" or part.dielectric is None or part.dielectric in seen:
            continue
        seen.add(part.dielectric)
        d = dielectrics.dielectric(part.dielectric)
        if d.linear:
            value = f"tempco {d.tc_ppm_low:g}…{d.tc_ppm_high:g} ppm/K"
        else:
            value = f"change over {d.t_min:g}…{d.t_max:g} °C {d.drift_low * 100:+g}…" + (
                f"{d.drift_high * 100:+g} %"
            )
        if d.family == "class2":
            source = "EIA-198 class 2 code (standard letters; see timespec.parts.dielectrics)"
        else:
            source = _dielectric_notes().get(d.name, "timespec.parts.dielectrics")
        out.append(
            Constant(
                f"{d.name} dielectric",
                value,
                source,
                f"rated ambient {d.t_min:g}…{d.t_max:g} °C",
            )
        )
        if d.family == "class2":
            lo, hi = dielectrics.class2_ageing_band(d)
            out.append(
                Constant(
                    f"{d.name} ageing rate",
                    f"{lo * 100:g}…{hi * 100:g} %/decade-hour after the last heat",
                    "[AN/Mem] class 2 ceramic ageing curves",
                    _held(dielectrics.ageing_held(d)),
                )
            )
            out.append(
                Constant(
                    f"{d.name} DC-bias loss",
                    f"up to {dielectrics.class2_bias_at_rated(d) * 100:g} % at the rated "
                    "voltage, scaled as √(V/V_rated)",
                    "[AN/Mem] class 2 ceramic bias curves",
                    _held(dielectrics.bias_held(d)),
                )
            )
    return out


def _diode(block: Block, design: Design) -> list[Constant]:
    if block.kind != "astable" or design.variant != "diode":
        return []
    if block.window("diode") is not None:
        lo, hi = DIODE_TC_BAND
        return [
            Constant("steering-diode drop", "as stated", "stated in the spec"),
            Constant(
                "steering-diode drop tempco",
                f"{lo:g}…{hi:g} mV/K",
                "[CP] about −2 mV/K for a silicon junction, ±20 % with current [Mem]",
            ),
        ]
    d = diodes.SMALL_SIGNAL
    entry = d.name
    rows = [
        ("is_band", _band(*d.is_band, "current")),
        ("n_band", f"{d.n_band[0]:g}…{d.n_band[1]:g}"),
        ("eg", f"{d.eg:g} eV"),
        ("xti", f"{d.xti:g}"),
    ]
    return [
        Constant(
            f"{entry} diode {field}",
            value,
            _mark(diodes, entry, field, "diode class"),
            _held(d.held) if field == "is_band" else "",
        )
        for field, value in rows
    ]


def _logic_input(block: Block) -> list[Constant]:
    if block.kind not in ("delay", "relaxation"):
        return []
    out: list[Constant] = []
    if "stray" in block.positions:
        out.append(Constant("node stray", "as stated", "stated in the spec"))
    else:
        if block.gate is None:
            out.append(
                Constant(
                    "logic input pin capacitance",
                    _band(*devices.LOGIC_INPUT_CAPACITANCE, "capacitance"),
                    "[DS] generic CMOS logic input (typ about 3–5 pF, max 10 pF)",
                )
            )
        out.append(_board_stray())
    if "leakage" in block.positions:
        out.append(Constant("node leakage", "as stated", "stated in the spec"))
    elif block.gate is None:
        out.append(
            Constant(
                "logic input leakage",
                f"±{format_quantity(devices.LOGIC_INPUT_LEAKAGE, 'current')}",
                "[DS] generic CMOS logic input over temperature",
            )
        )
    return out


def _crystal(block: Block) -> list[Constant]:
    if block.kind != "crystal":
        return []
    out = []
    for key, kind in (
        ("frequency", "frequency"),
        ("load", "capacitance"),
        ("shunt", "capacitance"),
        ("motional", "capacitance"),
        ("esr", "resistance"),
        ("gm", "transconductance"),
        ("swing", "voltage"),
    ):
        v = block.number(key)
        if v is not None:
            out.append(Constant(f"crystal {key}", format_quantity(v, kind), "stated in the spec"))
    if block.window("stray") is None:
        out.append(
            Constant(
                "crystal stray",
                _band(DEFAULT_STRAY.low, DEFAULT_STRAY.high, "capacitance"),
                "[CP] default pin and board stray of a Pierce oscillator",
            )
        )
    out.append(
        Constant(
            "smallest gain margin",
            f"{MIN_GAIN_MARGIN:g}",
            "[CP] the usual start-up target of published crystal-oscillator notes",
        )
    )
    return out


def block_constants(block: Block, design: Design) -> tuple[Constant, ...]:
    """Every class constant the block's model uses, with value, source and range.

    Parameters
    ----------
    block
        The block.
    design
        Its design (the parts' dielectrics, the astable's variant).

    Returns
    -------
    tuple of Constant
        Timer, gate, diode and dielectric constants, the board stray, and the
        crystal's stated data, as they apply.
    """
    out: list[Constant] = []
    out.extend(_timer(block))
    if block.timer is not None:
        out.append(_board_stray())
    out.extend(_gate(block))
    out.extend(_logic_input(block))
    out.extend(_diode(block, design))
    out.extend(_capacitors(block, design))
    out.extend(_crystal(block))
    for part in design.parts:
        if part.kind == "resistance" and part.tempco_ppm is not None:
            out.append(
                Constant(
                    f"{part.ref} tempco",
                    f"±{part.tempco_ppm:g} ppm/K",
                    "the pinned part or the resistor policy"
                    if part.pinned
                    else "the spec's resistor policy (100 ppm/K when it states none: the "
                    "thick-film figure, from memory)",
                )
            )
    return tuple(out)
