"""Fuzzing the spec language (issue 11): a grammar-aware generator and a mutator.

Invariants, through the API:

* only :class:`timespec.errors.SpecError` escapes ``timespec.parse`` (any other
  exception is a bug: there is no list of tolerated crashes), and its line and
  column lie inside the input;
* ``timespec format`` (:func:`~timespec.language.canonical.layout`) keeps every
  comment's text, keeps the meaning (its own re-parse check) and is idempotent.

The normal run checks 200 + 200 hypothesis cases and 3,000 cases over fixed seeds
(a failure names its seed, so ``check(generate(random.Random(seed)))`` reproduces
it); ``-m long`` runs 100,000 seeded cases.
"""

from __future__ import annotations

import random
from collections.abc import Callable
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import timespec
from timespec.errors import SpecError
from timespec.language.canonical import _split_comment, layout
from timespec.language.parser import parse_entries, source_lines
from timespec.language.vocabulary import KEYWORDS

ROOT = Path(__file__).resolve().parents[1]


def _seeds() -> list[str]:
    out = [p.read_text(encoding="utf-8") for p in sorted((ROOT / "examples").glob("*.tspec"))]
    for rst in sorted((ROOT / "docs").glob("*.rst")):
        text = rst.read_text(encoding="utf-8")
        for chunk in text.split(".. code-block:: tspec")[1:]:
            body = [ln[4:] for ln in chunk.split("\n")[1:] if ln.startswith("    ") or not ln]
            lines: list[str] = []
            for ln in chunk.split("\n")[1:]:
                if ln and not ln.startswith((" ", "\t")):
                    break
                lines.append(ln[4:] if ln.startswith("    ") else ln)
            if body:
                out.append("\n".join(lines).strip("\n") + "\n")
    return out


SEEDS = _seeds()


def _block_seeds() -> list[str]:
    """Every block of the seeds on its own (with the file's defaults before it, when it
    has them): small inputs, so a case costs a parse of a few lines, not of a file."""
    out: list[str] = []
    for text in SEEDS:
        chunks: list[list[str]] = [[]]
        for line in text.split("\n"):
            if line[:1].isalpha():
                chunks.append([])
            chunks[-1].append(line)
        blocks = ["\n".join(c).strip("\n") + "\n" for c in chunks if any(c)]
        defaults = [b for b in blocks if b.startswith(("defaults", "fixture"))]
        for b in blocks:
            out.append(b if b in defaults else "".join(defaults) + b)
    return out


BLOCK_SEEDS = _block_seeds()

KINDS = ["oneshot", "astable", "delay", "relaxation", "crystal", "defaults"]
UNITS = [
    "",
    "ms",
    "us",
    "ns",
    "s",
    "min",
    "Hz",
    "kHz",
    "MHz",
    "V",
    "mV",
    "mA",
    "nA",
    "uA",
    "ohm",
    "kohm",
    "kΩ",
    "MΩ",
    "pF",
    "nF",
    "uF",
    "fF",
    "%",
    "ppm",
    "ppm/K",
    "degC",
    "°C",
    "uW",
    "mA/V",
    "ppm/year",
    "years",
    "K",
]
NUMBER_WORDS = [
    "0",
    "1",
    "5",
    "150",
    "0.5",
    ".5",
    "1e3",
    "1e400",
    "1e-300",
    "4k7",
    "R47",
    "2R2",
    "100n",
    "1u0",
    "99999999999999999999",
    "0.0",
]
WHITESPACE = [" ", "  ", "\t", " \f ", "\u00a0"]
#: Words a value may be instead of a number (classes, series, dielectrics, a path),
#: and part references and board designators, for 'refs' (issue 13).
WORDS = ["cmos", "bipolar", "E24", "E96", "C0G", "X7R", '"a.tspec"']
WORDS += ["R", "RA", "C1", "R12", "C7", "r3", "R0"]
#: ... and the word that lists capacitor technologies, with film and electrolytic kinds
#: (issue 10).
WORDS += ["or", "PP", "AL"]
#: Characters a comment may hold: printable ASCII and a sample of the rest of Unicode
#: (line breaks excluded; the odd separators of :data:`ODD` included on purpose).
COMMENT_CHARS = [chr(c) for c in range(32, 127)]
COMMENT_CHARS += list("±Ωµ°−éß€中\u00a0\f\u2028\u2029\u0085\ufeff\x00\x0b")
ODD = [
    "\x00",
    "\f",
    "\r",
    "\u2028",
    "\u2029",
    "\u0085",
    "\ufeff",
    "±",
    "Ω",
    "µ",
    "°",
    "−",
    "#",
    ":",
    ",",
    ";",
    '"',
    "+",
    "-",
    ".",
    "e",
    "\t",
    " ",
    "\n",
    "to",
    "min",
    "at",
]


# -- the generator and the mutator: plain functions of a random.Random ---------------
# One implementation serves the hypothesis tests (st.randoms, reproducible and
# shrinkable by hypothesis) and the bulk runs over fixed seeds (cheap enough for
# thousands of cases in the normal suite).


def _number(r: random.Random) -> str:
    form = r.randrange(3)
    if form == 0:
        return r.choice(NUMBER_WORDS)
    if form == 1:
        return str(r.randrange(10**6 + 1))
    return repr(r.uniform(0.0, 1e12) if r.random() < 0.5 else r.uniform(0.0, 10.0))


def _quantity(r: random.Random) -> str:
    sign = r.choice(["", "", "-", "+"])
    unit = r.choice(UNITS)
    gap = r.choice(["", " "]) if unit else ""
    return f"{sign}{_number(r)}{gap}{unit}"


def _value(r: random.Random) -> str:
    q = _quantity(r)
    form = r.randrange(8)
    if form == 1:
        return f"{q} ±{_quantity(r)}"
    if form == 2:
        return f"{q} to {_quantity(r)}"
    if form == 3:
        return f"{q} {r.choice(['min', 'max'])}"
    if form == 4:
        return f"{q} +{_number(r)}% -{_number(r)}%"
    if form == 5:
        return f"{q} to {_quantity(r)} of supply"
    if form == 6:
        return r.choice(WORDS)
    return q


def _comment(r: random.Random) -> str:
    return "# " + "".join(r.choice(COMMENT_CHARS) for _ in range(r.randrange(21)))


_KEYWORDS = sorted(KEYWORDS)


def _statement(r: random.Random) -> str:
    args = [[_value(r) for _ in range(r.randint(1, 3))] for _ in range(r.randrange(4))]
    ws = r.choice(WHITESPACE)
    first = "".join(ws + " ".join(a) for a in args[:1])
    return r.choice(_KEYWORDS) + first + "".join(", " + " ".join(a) for a in args[1:])


def generate(r: random.Random) -> str:
    """A grammar-aware random spec: block headers, statements, comments, odd endings."""
    lines: list[str] = []
    for _ in range(r.randint(1, 3)):
        kind = r.choice(KINDS)
        head = f"{kind}:" if kind == "defaults" else f"{kind} b{r.randrange(10)}:"
        if r.random() < 0.5:
            head += " " + _statement(r)
        lines.append(head + (" " + _comment(r) if r.random() < 0.5 else ""))
        for _ in range(r.randrange(6)):
            stmt = _statement(r)
            if r.randrange(5) == 0:
                stmt += r.choice(["; ", " at "]) + _statement(r)
            tail = " " + _comment(r) if r.randrange(4) == 0 else ""
            lines.append(r.choice(["  ", "\t", "    "]) + stmt + tail)
        if r.random() < 0.5:
            lines.append(r.choice(["", _comment(r)]))
    return "\n".join(lines) + r.choice(["\n", "", "\r\n", "\n\n"])


def mutate(r: random.Random) -> str:
    """One of the seeds (a whole file or a single block) with one to four token edits."""
    text = r.choice(SEEDS if r.random() < 0.1 else BLOCK_SEEDS)
    for _ in range(r.randint(1, 4)):
        tokens = text.split(" ")
        op = r.randrange(6)
        i = r.randrange(len(tokens))
        if op == 0 and len(tokens) > 1:
            del tokens[i]
        elif op == 1:
            tokens.insert(i, tokens[i])
        elif op == 2:
            j = r.randrange(len(tokens))
            tokens[i], tokens[j] = tokens[j], tokens[i]
        elif op == 3:
            k = r.randint(0, len(tokens[i]))
            tokens[i] = tokens[i][:k] + r.choice(ODD) + tokens[i][k:]
        elif op == 4:
            t = tokens[i]
            tokens[i] = t[1:] if t[:1] in "+-" else r.choice(["-", "+", "±"]) + t
        else:
            tokens[i] = _number(r)
        text = " ".join(tokens)
    return text


def _check_location(exc: SpecError, text: str) -> None:
    lines = source_lines(text) or [""]
    if exc.line is None:
        return
    assert 1 <= exc.line <= len(lines) + 1, (exc.line, len(lines))
    if exc.column is not None and exc.line <= len(lines):
        assert 1 <= exc.column <= len(lines[exc.line - 1]) + 2, (exc.column, exc.line)


def check(text: str) -> None:
    """Every invariant on one input."""
    try:
        timespec.parse(text)
    except SpecError as exc:
        _check_location(exc, text)
    try:
        parse_entries(text)
    except SpecError:
        return
    once = layout(text)  # its own check: the re-parse has the same meaning
    assert layout(once) == once
    kept = "".join(_split_comment(ln)[1] for ln in source_lines(once))
    for ln in source_lines(text):
        comment = _split_comment(ln)[1]
        assert comment.rstrip() in kept


FAST = settings(
    max_examples=200,
    derandomize=True,
    deadline=None,
    database=None,
    suppress_health_check=list(HealthCheck),
)

#: Cases over fixed seeds per kind in the normal run, and in the long run (``-m long``).
BULK = 1_500
LONG = 50_000


def _bulk(make: Callable[[random.Random], str], seeds: range) -> None:
    """Run ``check`` on ``make(random.Random(seed))`` for every seed; report the first
    failures with their seeds."""
    failures: list[str] = []
    for seed in seeds:
        text = make(random.Random(seed))
        try:
            check(text)
        except Exception as exc:  # collected, then reported with the seed
            failures.append(f"seed {seed}: {type(exc).__name__}: {exc} in {text!r}")
            if len(failures) >= 5:
                break
    assert not failures, "\n".join(failures)


def test_seeds_exist() -> None:
    assert len(SEEDS) >= 2
    assert len(BLOCK_SEEDS) > len(SEEDS)


@FAST
@given(st.randoms(use_true_random=False).map(generate))
def test_generated(text: str) -> None:
    check(text)


@FAST
@given(st.randoms(use_true_random=False).map(mutate))
def test_mutated(text: str) -> None:
    check(text)


def test_generated_bulk() -> None:
    _bulk(generate, range(BULK))


def test_mutated_bulk() -> None:
    _bulk(mutate, range(BULK))


@pytest.mark.long
def test_generated_long() -> None:
    _bulk(generate, range(BULK, BULK + LONG))


@pytest.mark.long
def test_mutated_long() -> None:
    _bulk(mutate, range(BULK, BULK + LONG))
