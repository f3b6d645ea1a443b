"""Assemble parsed statements into a :class:`~timespec.model.Spec`.

Reads headers and statements in order, resolves ``include`` files (relative to
the including file, never outside the spec's root folder), merges ``defaults``
into every block, applies the built-in defaults, and checks what can only be
checked once a block is complete (a missing requirement, a supply outside the
timer class's range, a pinned part the circuit does not have).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from timespec.errors import Pos, SpecError, SpecIncludeError, SpecValueError
from timespec.language.arguments import did_you_mean, error_at
from timespec.language.parser import Entry, Header, Statement, parse_entries
from timespec.language.sources import (
    BOM,
    MAX_INCLUDE_DEPTH,
    MAX_INCLUDES,
    SourceError,
    read_spec_file,
)
from timespec.language.statements import read_statement
from timespec.language.values import Text
from timespec.language.vocabulary import KEYWORDS
from timespec.model import (
    BLOCK_KINDS,
    Block,
    CapacitorPolicy,
    Conditions,
    Fixture,
    PinnedPart,
    Requirement,
    ResistorPolicy,
    Spec,
    Statistics,
    Window,
)
from timespec.parts.devices import GATE_CLASSES, TIMER_CLASSES, TimerClass

__all__ = ["DEFAULT_TIMER", "PART_REFS", "REQUIRED", "load", "parse"]

#: Timer class used when neither the block nor the defaults name one.
DEFAULT_TIMER = "bipolar"
#: Gate class used when neither the block nor the defaults name one.
DEFAULT_GATE = "highspeed"

#: Which statements a block must have: each inner tuple needs at least one of its words.
REQUIRED: dict[str, tuple[tuple[str, ...], ...]] = {
    "oneshot": (("width",),),
    "astable": (("frequency", "period", "high", "low"),),
    "delay": (("delay",), ("threshold",)),
    "relaxation": (("frequency", "period"),),
    "crystal": (("frequency",), ("load",), ("shunt",), ("motional",), ("esr",)),
}

#: The parts each circuit has, by reference.
PART_REFS: dict[str, tuple[str, ...]] = {
    "oneshot": ("R", "C"),
    "astable": ("RA", "RB", "C", "R"),
    "delay": ("R", "C"),
    "relaxation": ("R", "C"),
    "crystal": ("C1", "C2"),
}

_NEEDS_SUPPLY = ("oneshot", "astable", "delay", "relaxation")


@dataclass
class _Section:
    kind: str
    name: str | None
    pos: Pos
    readings: dict[str, tuple[Any, Pos, str]] = field(default_factory=dict)
    requirements: list[Requirement] = field(default_factory=list)


@dataclass
class _Reads:
    """What one top spec has read: each file parsed once, and the include budget."""

    parsed: dict[Path, list[Entry]] = field(default_factory=dict)
    includes: int = 0


def _walk(
    text: str,
    path: Path | None,
    root: Path | None,
    seen: tuple[Path, ...],
    shown: str | None = None,
    reads: _Reads | None = None,
) -> list[Entry]:
    """Parse and splice ``include`` files in; an include ends the current block."""
    if shown is None and path is not None:
        shown = str(path)
    reads = reads if reads is not None else _Reads()
    key = seen[-1] if seen else None
    if key is not None and key in reads.parsed:
        entries = reads.parsed[key]
    else:
        entries = parse_entries(text, shown)
        if key is not None:
            reads.parsed[key] = entries
    out: list[Entry] = []
    for entry in entries:
        if isinstance(entry, Statement) and entry.keyword == "include":
            reading = read_statement(entry, "include")
            target: Text = reading.value
            out.append(Header("include", None, entry.pos, None))
            out.extend(_include(target, path, root, seen, reads))
            out.append(Header("include", None, entry.pos, None))
        else:
            out.append(entry)
    return out


def _include(
    target: Text, path: Path | None, root: Path | None, seen: tuple[Path, ...], reads: _Reads
) -> list[Entry]:
    if path is None or root is None:
        raise error_at(
            SpecIncludeError,
            "'include' works only in a spec read from a file",
            target.pos,
            "use timespec.load(path) so that included files can be found",
        )
    wanted = (path.parent / target.text).resolve()
    if not wanted.is_relative_to(root):
        raise error_at(
            SpecIncludeError,
            f"{target.text!r} lies outside the spec's folder {str(root)!r}",
            target.pos,
            "included files must sit in the folder of the top spec or below it",
        )
    if wanted in seen:
        raise error_at(
            SpecIncludeError,
            f"{target.text!r} includes itself (through {len(seen)} files)",
            target.pos,
        )
    if len(seen) > MAX_INCLUDE_DEPTH:
        raise error_at(
            SpecIncludeError,
            f"includes nest deeper than {MAX_INCLUDE_DEPTH} files",
            target.pos,
            "include shared files from the top spec instead of chaining them",
        )
    reads.includes += 1
    if reads.includes > MAX_INCLUDES:
        raise error_at(
            SpecIncludeError,
            f"the spec pulls in more than {MAX_INCLUDES} included files (repeats counted)",
            target.pos,
            "a file included twice at every level doubles the work per level; include "
            "each shared file once",
        )
    if wanted in reads.parsed:
        return _walk("", _display_path(wanted), root, (*seen, wanted), reads=reads)
    try:
        text = read_spec_file(wanted).text
    except FileNotFoundError:
        raise error_at(SpecIncludeError, f"no such file {target.text!r}", target.pos) from None
    except SourceError as exc:
        raise error_at(
            SpecIncludeError, f"cannot read {target.text!r}: {exc.reason}", target.pos
        ) from None
    return _walk(text, _display_path(wanted), root, (*seen, wanted), reads=reads)


def _display_path(path: Path) -> Path:
    try:
        return path.relative_to(Path.cwd())
    except ValueError:
        return path


def _assemble(entries: list[Entry], path: str | None) -> Spec:
    defaults = _Section("defaults", None, Pos(path, 1, 1, ""))
    fixture = _Section("fixture", None, Pos(path, 1, 1, ""))
    sections: list[_Section] = []
    current: _Section | None = None
    names: dict[str, Pos] = {}
    for entry in entries:
        if isinstance(entry, Header):
            if entry.kind == "include":
                current = None
                continue
            current = _open(entry, defaults, fixture, names)
            if current is not defaults and current is not fixture:
                sections.append(current)
            continue
        if current is None:
            raise error_at(
                SpecValueError,
                f"statement '{entry.keyword}' stands outside any block",
                entry.pos,
                "start a block first, e.g. 'oneshot relay_hold:' or 'defaults:'",
            )
        _add(current, entry)
    if not sections:
        raise SpecValueError(
            "the spec has no blocks",
            path=path,
            line=1,
            column=1,
            hint="add a block, e.g. 'oneshot relay_hold: width 150 ms ±8% at supply 12 V ±5%'",
        )
    blocks = tuple(_finish(sec, defaults) for sec in sections)
    return Spec(blocks, path, _fixture(fixture))


def _open(entry: Header, defaults: _Section, fixture: _Section, names: dict[str, Pos]) -> _Section:
    kind = entry.kind
    if kind in ("defaults", "fixture"):
        if entry.name is not None:
            raise error_at(
                SpecValueError,
                f"'{kind}' takes no name",
                entry.name_pos,
                f"write '{kind}:' on its own",
            )
        if kind == "fixture":
            fixture.pos = entry.pos
            return fixture
        return defaults
    if kind not in BLOCK_KINDS:
        if entry.name is None and kind in KEYWORDS:
            raise error_at(
                SpecValueError,
                f"'{kind}' is a statement and takes no ':'",
                entry.pos,
                f"write it like: {KEYWORDS[kind].example}",
            )
        raise error_at(
            SpecValueError,
            f"unknown block kind {kind!r}",
            entry.pos,
            did_you_mean(kind, [*BLOCK_KINDS, "defaults", "fixture"])
            or "blocks are " + ", ".join(BLOCK_KINDS) + ", defaults and fixture",
        )
    if entry.name is None:
        raise error_at(
            SpecValueError,
            f"a {kind} block needs a name",
            entry.pos,
            f"write it like: {kind} my_{kind}:",
        )
    if entry.name in names:
        first = names[entry.name]
        raise error_at(
            SpecValueError,
            f"a block named {entry.name!r} already stands at line {first.line}",
            entry.name_pos,
            "give each block its own name",
        )
    assert entry.name_pos is not None
    names[entry.name] = entry.name_pos
    return _Section(kind, entry.name, entry.pos)


def _add(section: _Section, stmt: Statement) -> None:
    kw = KEYWORDS.get(stmt.keyword)
    where = section.kind if section.kind in ("defaults", "fixture") else f"a {section.kind} block"
    if kw is None or stmt.keyword == "include":
        allowed = [k.name for k in KEYWORDS.values() if section.kind in k.kinds]
        hint = did_you_mean(stmt.keyword, allowed) or did_you_mean(stmt.keyword, list(KEYWORDS))
        raise error_at(
            SpecValueError,
            f"unknown statement {stmt.keyword!r} in {where}",
            stmt.pos,
            hint or "statements here: " + ", ".join(sorted(allowed)),
        )
    if section.kind not in kw.kinds:
        homes = sorted(k for k in kw.kinds if k not in ("defaults", "fixture"))
        if not homes and "fixture" in kw.kinds:
            raise error_at(
                SpecValueError,
                f"'{stmt.keyword}' belongs in the fixture: section",
                stmt.pos,
                "describe the test fixture in a section of its own, e.g. 'fixture:'",
            )
        raise error_at(
            SpecValueError,
            f"'{stmt.keyword}' does not belong in {where}",
            stmt.pos,
            f"it is used in {', '.join(homes)} blocks" if homes else None,
        )
    reading = read_statement(stmt, section.kind)
    key = f"req:{reading.value.quantity}" if reading.target == "requirement" else stmt.keyword
    if key in section.readings:
        first = section.readings[key][1]
        raise error_at(
            SpecValueError,
            f"'{stmt.keyword}' is given twice in {where} (first at line {first.line})",
            stmt.pos,
            "keep one of them",
        )
    section.readings[key] = (reading.value, stmt.pos, reading.target)
    if reading.target == "requirement":
        section.requirements.append(reading.value)


def _fixture(sec: _Section) -> Fixture | None:
    if not sec.readings:
        return None
    fields: dict[str, Any] = {}
    for key, (value, _pos, _target) in sec.readings.items():
        if isinstance(value, Mapping):
            fields.update(value)
        else:
            fields[key] = value
    if "clock" not in fields:
        raise error_at(
            SpecValueError,
            "the fixture section has no capture clock",
            sec.pos,
            "add e.g. 'clock 16 MHz ±50 ppm'",
        )
    try:
        return Fixture(**fields)
    except ValueError as exc:
        raise error_at(SpecValueError, str(exc), sec.pos) from None


def _get(sec: _Section, defaults: _Section, key: str) -> tuple[Any, Pos] | None:
    for s in (sec, defaults):
        if key in s.readings:
            value, pos, _target = s.readings[key]
            return value, pos
    return None


def _policy(
    cls: type[ResistorPolicy] | type[CapacitorPolicy], sec: _Section, defaults: _Section, key: str
) -> Any:
    merged: dict[str, Any] = {}
    pos: Pos | None = None
    for s in (defaults, sec):
        if key in s.readings:
            value, pos, _ = s.readings[key]
            merged.update(value)
    try:
        return cls(**merged)
    except ValueError as exc:
        raise error_at(SpecValueError, str(exc), pos) from None


def _finish(sec: _Section, defaults: _Section) -> Block:
    assert sec.name is not None
    where = f"block {sec.name!r}"
    # requirements
    for group in REQUIRED[sec.kind]:
        if not any(
            f"req:{w}" in sec.readings or w in sec.readings or w in defaults.readings for w in group
        ):
            need = " or ".join(f"'{w}'" for w in group)
            example = KEYWORDS[group[0]].example
            raise error_at(
                SpecValueError,
                f"{where} ({sec.kind}) has no {need} statement",
                sec.pos,
                f"add one, e.g. '{example}'",
            )
    # conditions
    supply_item = _get(sec, defaults, "supply")
    if supply_item is None:
        if sec.kind in _NEEDS_SUPPLY:
            raise error_at(
                SpecValueError,
                f"{where} has no supply voltage",
                sec.pos,
                "add 'supply 12 V ±5%' to the block or to a defaults: section",
            )
        supply = Window(3.3, 3.3, "voltage", 3.3)
        supply_pos = sec.pos
    else:
        supply, supply_pos = supply_item
    ambient_item = _get(sec, defaults, "ambient")
    ambient = ambient_item[0] if ambient_item else (25.0, 25.0)
    life_item = _get(sec, defaults, "life")
    life = life_item[0] if life_item else 0.0
    conditions = Conditions(supply, ambient[0], ambient[1], life)

    resistors = _policy(ResistorPolicy, sec, defaults, "resistors")
    capacitors = _policy(CapacitorPolicy, sec, defaults, "capacitors")

    timer: TimerClass | None = None
    if sec.kind in ("oneshot", "astable"):
        timer_item = _get(sec, defaults, "timer")
        name, overrides = timer_item[0] if timer_item else (DEFAULT_TIMER, {})
        timer = TIMER_CLASSES[name].with_overrides(**overrides)
        if not (timer.supply_min <= supply.low and supply.high <= timer.supply_max):
            raise error_at(
                SpecValueError,
                f"the supply {supply.low:g}…{supply.high:g} V lies outside the {timer.name} "
                f"timer class's range {timer.supply_min:g}…{timer.supply_max:g} V",
                supply_pos,
                "change the supply or the timer class ('timer cmos' runs from 2 V)",
            )
    gate = None
    # A relaxation oscillator is a gate (defaults apply); a delay block names the gate
    # that watches its node only by its own statement (a default meant for the
    # oscillators must not move a delay onto a gate class it does not use).
    own_gate = sec.kind == "delay" and "gate" in sec.readings
    if sec.kind == "relaxation" or own_gate:
        gate_item = _get(sec, defaults, "gate")
        gate = GATE_CLASSES[gate_item[0] if gate_item else DEFAULT_GATE]
        if not (gate.supply_min <= supply.low and supply.high <= gate.supply_max):
            raise error_at(
                SpecValueError,
                f"the supply {supply.low:g}…{supply.high:g} V lies outside the {gate.name} "
                f"gate class's range {gate.supply_min:g}…{gate.supply_max:g} V",
                supply_pos,
                "change the supply or the gate class",
            )

    pinned: tuple[PinnedPart, ...] = ()
    if "use" in sec.readings:
        pinned, use_pos, _ = sec.readings["use"]
        refs = PART_REFS[sec.kind]
        for part in pinned:
            if part.ref not in refs:
                raise error_at(
                    SpecValueError,
                    f"a {sec.kind} circuit has no part {part.ref!r}",
                    part.pos or use_pos,
                    f"its parts are {', '.join(refs)}",
                )

    stats_fields: dict[str, Any] = {}
    for s in (defaults, sec):
        for key in ("samples", "seed", "spread"):
            if key in s.readings:
                stats_fields.update(s.readings[key][0])
    statistics = Statistics(**stats_fields)

    settings: dict[str, Window | float | str] = {}
    positions: dict[str, Pos] = {}
    for s in (defaults, sec):
        for key, (value, pos, target) in s.readings.items():
            if target == "setting":
                if isinstance(value, Mapping):
                    for k, v in value.items():
                        settings[k] = v
                        positions[k] = pos
                else:
                    settings[key] = value
                    positions[key] = pos
            elif target != "requirement":
                positions[key] = pos
    for req in sec.requirements:
        if req.pos is not None:
            positions[req.quantity] = req.pos
    try:
        return Block(
            kind=sec.kind,
            name=sec.name,
            requirements=tuple(sec.requirements),
            conditions=conditions,
            resistors=resistors,
            capacitors=capacitors,
            timer=timer,
            gate=gate,
            pinned=pinned,
            settings=settings,
            statistics=statistics,
            pos=sec.pos,
            positions=positions,
        )
    except ValueError as exc:
        if isinstance(exc, SpecError):
            raise
        raise error_at(SpecValueError, f"{where}: {exc}", sec.pos) from None


def parse(text: str, path: str | None = None) -> Spec:
    """Parse spec text into a typed, frozen :class:`~timespec.model.Spec`.

    Parameters
    ----------
    text
        The spec text.
    path
        The file name to show in error messages; ``include`` needs a real
        file, so use :func:`load` for specs that include others.

    Returns
    -------
    Spec
        The blocks, validated.

    Raises
    ------
    SpecError
        For any mistake in the text, with file, line, column and a hint.
    """
    if not isinstance(text, str):
        raise SpecValueError(f"spec text must be a str, not {type(text).__name__}")
    entries = _walk(text.removeprefix(BOM), None, None, (), shown=path)
    return _assemble(entries, path)


def load(path: str | Path) -> Spec:
    """Read and parse a spec file (``include`` files are read relative to it).

    Parameters
    ----------
    path
        The spec file.

    Returns
    -------
    Spec
        The blocks, validated.

    Raises
    ------
    SpecError
        When the file cannot be read or has mistakes.
    """
    p = Path(path)
    try:
        text = read_spec_file(p).text
    except FileNotFoundError:
        raise SpecIncludeError(f"no such spec file: {str(p)!r}", path=str(p)) from None
    except SourceError as exc:
        raise SpecIncludeError(f"cannot read {str(p)!r}: {exc.reason}", path=str(p)) from None
    resolved = p.resolve()
    entries = _walk(text, p, resolved.parent, (resolved,))
    return _assemble(entries, str(p))
