"""Assemble parsed statements into a :class:`~timespec.model.Spec`.

Reads headers and statements in order, resolves ``include`` files (relative to
the including file, never outside the project root: see
``timespec.language.project``), merges ``defaults``
into every block, applies the built-in defaults, and checks what can only be
checked once a block is complete (a missing requirement, a supply outside the
timer class's range, a pinned part the circuit does not have).
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from timespec.errors import (
    MAX_ERRORS,
    Pos,
    SpecEmptyError,
    SpecError,
    SpecErrors,
    SpecIncludeError,
    SpecValueError,
    collect_errors,
)
from timespec.language.arguments import did_you_mean, error_at
from timespec.language.parser import (
    Broken,
    Entry,
    Header,
    Statement,
    parse_entries,
    parse_recovering,
)
from timespec.language.project import PROJECT_FILE, Project, project_for
from timespec.language.refs import Designation, check_unique
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
    BUILTIN_CAPACITORS,
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
    builtin_resistor_high,
)
from timespec.parts.devices import GATE_CLASSES, TIMER_CLASSES, TimerClass

__all__ = ["AS_BUILT_OPTIONAL", "DEFAULT_TIMER", "PART_REFS", "REQUIRED", "load", "parse"]

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

#: The requirement a block may leave out when every part is pinned (``use``): it then
#: describes a board as built, reported with its nominal, worst case and statistics.
AS_BUILT_OPTIONAL: dict[str, tuple[str, ...]] = {
    "oneshot": ("width",),
    "astable": ("frequency", "period", "high", "low"),
    "delay": ("delay",),
    "relaxation": ("frequency", "period"),
}

#: Part sets that make a whole circuit, per kind (the astable: RA, RB, C or R, C).
_WHOLE_CIRCUITS: dict[str, tuple[frozenset[str], ...]] = {
    "oneshot": (frozenset({"R", "C"}),),
    "astable": (frozenset({"RA", "RB", "C"}), frozenset({"R", "C"})),
    "delay": (frozenset({"R", "C"}),),
    "relaxation": (frozenset({"R", "C"}),),
}


def _class_hint(supply: Window, classes: Mapping[str, Any], what: str, current: str) -> str:
    """Which other classes the supply window fits, for the hint of a supply error."""
    fits = [
        name
        for name, cls in classes.items()
        if name != current and cls.supply_min <= supply.low and supply.high <= cls.supply_max
    ]
    if fits:
        return "use " + " or ".join(f"'{what} {name}'" for name in fits) + ", or change the supply"
    spans = ", ".join(
        f"{name} {cls.supply_min:g}…{cls.supply_max:g} V" for name, cls in classes.items()
    )
    return f"no {what} class takes this supply ({spans}): change the supply"


def _all_pinned(sec: _Section) -> bool:
    """Whether the block's own ``use`` pins every part of one whole circuit."""
    if "use" not in sec.readings:
        return False
    refs = {part.ref for part in sec.readings["use"][0]}
    return any(whole <= refs for whole in _WHOLE_CIRCUITS.get(sec.kind, ()))


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

    parsed: dict[Path, list[Entry | Broken]] = field(default_factory=dict)
    includes: int = 0
    #: The project file that set the include root, or ``None`` (the top spec's folder).
    project_file: Path | None = None


def _walk(
    text: str,
    path: Path | None,
    root: Path | None,
    seen: tuple[Path, ...],
    shown: str | None = None,
    reads: _Reads | None = None,
) -> list[Entry | Broken]:
    """Parse and splice ``include`` files in; an include ends the current block."""
    if shown is None and path is not None:
        shown = str(path)
    reads = reads if reads is not None else _Reads()
    key = seen[-1] if seen else None
    if key is not None and key in reads.parsed:
        entries = reads.parsed[key]
    else:
        entries = _read_entries(text, shown)
        if key is not None:
            reads.parsed[key] = entries
    out: list[Entry | Broken] = []
    for entry in entries:
        if isinstance(entry, Statement) and entry.keyword == "include":
            out.append(Header("include", None, entry.pos, None))
            try:
                reading = read_statement(entry, "include")
                target: Text = reading.value
                out.extend(_include(target, path, root, seen, reads))
            except SpecError as exc:  # reported with the others; no block is finished
                if reads.includes > MAX_INCLUDES:
                    raise  # the budget stops runaway work: nothing more is read
                out.append(Broken(exc, "include"))
            out.append(Header("include", None, entry.pos, None))
        else:
            out.append(entry)
    return out


def _read_entries(text: str, shown: str | None) -> list[Entry | Broken]:
    """The entries of one file; with a mistake, read again past every broken line."""
    try:
        return list(parse_entries(text, shown))
    except SpecError:
        return parse_recovering(text, shown)


def _include(
    target: Text, path: Path | None, root: Path | None, seen: tuple[Path, ...], reads: _Reads
) -> list[Entry | Broken]:
    if path is None or root is None:
        raise error_at(
            SpecIncludeError,
            "'include' works only in a spec read from a file",
            target.pos,
            "use timespec.load(path) so that included files can be found",
        )
    wanted = (path.parent / target.text).resolve()
    if not wanted.is_relative_to(root):
        raise _outside_root(target, wanted, root, reads.project_file)
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


def _outside_root(target: Text, wanted: Path, root: Path, project_file: Path | None) -> SpecError:
    """The error for an include that leaves the root (symlinks resolved)."""
    through = f" (it resolves to {str(wanted)!r})"
    if project_file is None:
        return error_at(
            SpecIncludeError,
            f"{target.text!r} lies outside the spec's folder {str(root)!r}{through}",
            target.pos,
            "included files must sit in the folder of the top spec or below it; to share "
            f"files from a folder above, make it the project root with a {PROJECT_FILE} there",
        )
    return error_at(
        SpecIncludeError,
        f"{target.text!r} lies outside the project root {str(root)!r}{through}",
        target.pos,
        f"included files must sit under the project root, the folder of {str(project_file)!r}",
    )


def _display_path(path: Path) -> Path:
    try:
        return path.relative_to(Path.cwd())
    except ValueError:
        return path


class _TooManyError(Exception):
    """More mistakes than are reported at once were found."""


@dataclass
class _Found:
    """The mistakes of one spec, each with its place in the entries (to sort them)."""

    items: list[tuple[int, int, SpecError]] = field(default_factory=list)
    keys: set[tuple[object, ...]] = field(default_factory=set)
    more: bool = False

    def add(self, place: int, err: SpecError) -> None:
        """Keep a mistake (a repeat is dropped); past the bound, stop reading."""
        for one in err.errors if isinstance(err, SpecErrors) else (err,):
            key = (one.path, one.line, one.column, one.message)
            if key in self.keys:
                continue
            if len(self.items) >= MAX_ERRORS:
                self.more = True
                raise _TooManyError
            self.keys.add(key)
            self.items.append((place, len(self.items), one))

    def check(self) -> None:
        """Raise every mistake kept, in the order of the text, as one exception."""
        if self.items:
            ordered = sorted(self.items, key=lambda item: item[:2])
            raise collect_errors((err for _, _, err in ordered), truncated=self.more)


def _assemble(entries: list[Entry | Broken], path: str | None) -> Spec:
    """Build the spec, reporting every independent mistake at once.

    A mistake in a block's header (or a statement outside any block) hides the
    statements after it up to the next header; a block with a broken statement
    is not checked as a whole (a missing requirement would only repeat it); when
    a section that may hold the defaults is wrong, or an include fails, no block
    is checked as a whole.  Every other statement and block is still checked.
    """
    found = _Found()
    try:
        return _assemble_into(entries, path, found)
    except _TooManyError:
        found.check()
        raise  # pragma: no cover - check() raises when full


def _assemble_into(entries: list[Entry | Broken], path: str | None, found: _Found) -> Spec:
    defaults = _Section("defaults", None, Pos(path, 1, 1, ""))
    fixture = _Section("fixture", None, Pos(path, 1, 1, ""))
    sections: list[tuple[int, _Section]] = []
    current: _Section | None = None
    dead = False  # the statements up to the next header are not checked
    tainted: set[int] = set()  # id() of the sections with a broken statement
    astray: set[int] = set()  # id() of the sections that hold another block's statements
    names: dict[str, Pos] = {}
    for place, entry in enumerate(entries):
        if isinstance(entry, Broken):
            found.add(place, entry.error)
            if entry.kind == "header":
                current, dead = None, True
                if _first_word(entry.error.source_line) not in BLOCK_KINDS:
                    tainted.add(id(defaults))  # it may have been the defaults
            elif entry.kind == "include":
                tainted.add(id(defaults))  # the file may have held the defaults
            elif current is not None:
                tainted.add(id(current))
            continue
        if isinstance(entry, Header):
            current, dead = None, False
            if entry.kind == "include":
                continue
            try:
                current = _open(entry, defaults, fixture, names)
            except SpecError as exc:
                found.add(place, exc)
                dead = True
                if entry.kind not in BLOCK_KINDS or entry.name is None:
                    tainted.add(id(defaults))  # it may have been meant as the defaults
                continue
            if current is not defaults and current is not fixture:
                sections.append((place, current))
            continue
        if dead:
            continue
        if current is None:
            found.add(
                place,
                error_at(
                    SpecValueError,
                    f"statement '{entry.keyword}' stands outside any block",
                    entry.pos,
                    "start a block first, e.g. 'oneshot relay_hold:' or 'defaults:'",
                ),
            )
            dead = True
            tainted.add(id(defaults))  # the missing header may have been 'defaults:'
            continue
        kw = KEYWORDS.get(entry.keyword)
        # A statement of another kind of block, or one given twice, is the mark of a
        # missing header; after the first, the others repeat it.
        astray_mark = (kw is not None and current.kind not in kw.kinds) or any(
            k in current.readings for k in (entry.keyword, f"req:{entry.keyword}")
        )
        if astray_mark and id(current) in astray:
            continue
        try:
            _add(current, entry)
        except SpecError as exc:
            found.add(place, exc)
            tainted.add(id(current))
            if kw is None and entry.keyword in _OPENERS:
                # a header without its ':' ("crystal mcu_clock"): its block's statements
                # follow, and would each be a complaint about the wrong block
                current, dead = None, True
                if entry.keyword not in BLOCK_KINDS:
                    tainted.add(id(defaults))
            elif astray_mark:
                astray.add(id(current))
    if not sections and not found.items:
        raise SpecEmptyError(
            "the spec has no blocks",
            path=path,
            line=1,
            column=1,
            hint="add a block, e.g. 'oneshot relay_hold: width 150 ms ±8% at supply 12 V ±5%'",
        )
    blocks: list[Block] = []
    if id(defaults) not in tainted:
        for place, sec in sections:
            if id(sec) in tainted:
                continue
            try:
                blocks.append(_finish(sec, defaults))
            except SpecError as exc:
                found.add(place, exc)
    end = len(entries)
    try:
        check_unique(
            (sec.name or "", item)
            for _, sec in sections
            if id(sec) not in tainted
            for item in _designations(sec)
        )
    except SpecError as exc:
        found.add(end, exc)
    spec_fixture: Fixture | None = None
    if id(fixture) not in tainted:
        try:
            spec_fixture = _fixture(fixture)
        except SpecError as exc:
            found.add(end, exc)
    found.check()
    return Spec(tuple(blocks), path, spec_fixture)


#: The words that open a block or section.
_OPENERS = frozenset((*BLOCK_KINDS, "defaults", "fixture"))


def _first_word(line: str | None) -> str:
    words = (line or "").split()
    return words[0].rstrip(":") if words else ""


def _designations(sec: _Section) -> tuple[Designation, ...]:
    """The items of a block's ``refs`` statement (none without one)."""
    if "refs" not in sec.readings:
        return ()
    items: tuple[Designation, ...] = sec.readings["refs"][0]
    return items


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


def _resistor_policy(
    sec: _Section, defaults: _Section, timer: TimerClass | None, supply: Window
) -> ResistorPolicy:
    """The resistor policy; a range nobody gives tops out where the timer class allows.

    See :func:`timespec.model.builtin_resistor_high`: 10 MΩ for a timer class whose
    threshold current allows it (CMOS), else 1 MΩ.
    """
    given = any(
        "high" in s.readings["resistors"][0] for s in (defaults, sec) if "resistors" in s.readings
    )
    policy: ResistorPolicy = _policy(ResistorPolicy, sec, defaults, "resistors")
    if given:
        return policy
    return dataclasses.replace(policy, high=builtin_resistor_high(timer, supply.low))


def _capacitor_policies(sec: _Section, defaults: _Section) -> tuple[CapacitorPolicy, ...]:
    """The capacitor technologies of a block, the first one its ``capacitors``.

    No ``capacitors`` statement anywhere: the built-in technologies
    (:data:`timespec.model.BUILTIN_CAPACITORS`), or the single default policy for a
    crystal (load capacitors are class 1 ceramics).  A statement listing several
    technologies (``... or ...``) replaces what came before it; a statement of one
    technology merges item by item into each technology before it (a block's
    ``capacitors rated 16 V`` rates every technology of its defaults), items nobody
    gives coming from :class:`~timespec.model.CapacitorPolicy`'s defaults.  A crystal
    keeps the first technology of a list.
    """
    stated = [s.readings["capacitors"] for s in (defaults, sec) if "capacitors" in s.readings]
    if not stated:
        return (CapacitorPolicy(),) if sec.kind == "crystal" else BUILTIN_CAPACITORS
    current: list[dict[str, Any]] = [{}]
    for value, _pos, _ in stated:
        if isinstance(value, tuple):
            current = [dict(v) for v in value]
        else:
            current = [{**c, **value} for c in current]
    if sec.kind == "crystal":
        current = current[:1]
    try:
        return tuple(CapacitorPolicy(**fields) for fields in current)
    except ValueError as exc:
        raise error_at(SpecValueError, str(exc), stated[-1][1]) from None


def _finish(sec: _Section, defaults: _Section) -> Block:
    assert sec.name is not None
    where = f"block {sec.name!r}"
    # requirements
    for group in REQUIRED[sec.kind]:
        if not any(
            f"req:{w}" in sec.readings or w in sec.readings or w in defaults.readings for w in group
        ):
            as_built = group == AS_BUILT_OPTIONAL.get(sec.kind)
            if as_built and _all_pinned(sec):
                continue  # the circuit as built: characterised, nothing to fail
            need = " or ".join(f"'{w}'" for w in group)
            example = KEYWORDS[group[0]].example
            hint = f"add one, e.g. '{example}'"
            if as_built:
                hint += ", or pin every part with 'use' to characterise a board as built"
            raise error_at(
                SpecValueError, f"{where} ({sec.kind}) has no {need} statement", sec.pos, hint
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

    technologies = _capacitor_policies(sec, defaults)

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
                _class_hint(supply, TIMER_CLASSES, "timer", timer.name),
            )
    resistors = _resistor_policy(sec, defaults, timer, supply)
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
                _class_hint(supply, GATE_CLASSES, "gate", gate.name),
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

    roles = PART_REFS[sec.kind]
    for item in _designations(sec):
        if item.ref not in roles:
            raise error_at(
                SpecValueError,
                f"a {sec.kind} circuit has no part {item.ref!r}",
                item.pos,
                f"its parts are {', '.join(roles)}",
            )
    designators = {item.ref: item.names for item in _designations(sec)}

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
            capacitors=technologies[0],
            capacitor_options=technologies[1:],
            timer=timer,
            gate=gate,
            pinned=pinned,
            settings=settings,
            statistics=statistics,
            pos=sec.pos,
            positions=positions,
            refs=designators,
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


def load(path: str | Path, *, project: Project | None = None) -> Spec:
    """Read and parse a spec file (``include`` files are read relative to it).

    Parameters
    ----------
    path
        The spec file.
    project
        Its project (root and project-wide options); ``None`` finds it with
        ``timespec.language.project.project_for``: the nearest folder upward
        with a ``timespec.toml`` or a ``[tool.timespec]`` table in
        ``pyproject.toml``, else the spec's own folder.

    Returns
    -------
    Spec
        The blocks, validated; a block whose spec sets no ``samples`` or
        ``seed`` takes the project's.

    Raises
    ------
    SpecError
        When the file cannot be read or has mistakes, when an ``include`` leaves
        the project root, or when the project file has mistakes.
    """
    p = Path(path)
    try:
        text = read_spec_file(p).text
    except FileNotFoundError:
        raise SpecIncludeError(f"no such spec file: {str(p)!r}", path=str(p)) from None
    except SourceError as exc:
        raise SpecIncludeError(f"cannot read {str(p)!r}: {exc.reason}", path=str(p)) from None
    resolved = p.resolve()
    if project is None:
        project = project_for(p)
    reads = _Reads(project_file=project.file)
    entries = _walk(text, p, project.root, (resolved,), reads=reads)
    return _with_project(_assemble(entries, str(p)), project)


def _with_project(spec: Spec, project: Project) -> Spec:
    """Blocks whose spec sets no ``samples`` (``seed``) take the project's.

    A ``samples`` or ``seed`` statement in a block or in ``defaults:`` leaves a
    position in the block; only blocks without one take the project's value,
    so the spec's own settings win over the project file.
    """
    if project.samples is None and project.seed is None:
        return spec
    import dataclasses

    blocks = []
    for block in spec.blocks:
        stats = block.statistics
        if project.samples is not None and "samples" not in block.positions:
            stats = dataclasses.replace(stats, samples=project.samples)
        if project.seed is not None and "seed" not in block.positions:
            stats = dataclasses.replace(stats, seed=project.seed)
        blocks.append(dataclasses.replace(block, statistics=stats))
    return dataclasses.replace(spec, blocks=tuple(blocks))
