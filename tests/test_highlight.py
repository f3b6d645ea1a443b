"""The Pygments lexer for specs: found by name, loses no text, makes no Error tokens."""

from __future__ import annotations

from pathlib import Path

import pytest

pygments = pytest.importorskip("pygments")

from pygments.lexers import get_lexer_by_name, get_lexer_for_filename  # noqa: E402
from pygments.token import Error, Keyword  # noqa: E402

from timespec.language.vocabulary import KEYWORDS  # noqa: E402
from timespec.outputs.highlight import TimespecLexer  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
SPECS = sorted((ROOT / "examples").glob("*.tspec"))


def test_found_through_entry_point() -> None:
    assert isinstance(get_lexer_by_name("tspec"), TimespecLexer)
    assert isinstance(get_lexer_for_filename("x.tspec"), TimespecLexer)


@pytest.mark.parametrize("path", SPECS, ids=[p.name for p in SPECS])
def test_round_trip_no_errors(path: Path) -> None:
    text = path.read_text(encoding="utf-8")
    toks = list(TimespecLexer().get_tokens_unprocessed(text))
    assert "".join(t for _, _, t in toks) == text
    assert not [t for _, k, t in toks if k in Error]


def test_every_statement_word_is_a_keyword() -> None:
    for word in KEYWORDS:
        toks = list(TimespecLexer().get_tokens_unprocessed(word + " 1\n"))
        assert toks[0][1] in Keyword, word


DOCS = ROOT / "docs"


def _doc_specs() -> list[tuple[str, str]]:
    """Spec blocks the docs highlight as ``tspec`` (code blocks, or literal blocks
    after ``.. highlight:: tspec``)."""
    found: list[tuple[str, str]] = []
    for page in sorted(DOCS.glob("*.rst")):
        lines = page.read_text(encoding="utf-8").splitlines()
        default = False
        i = 0
        while i < len(lines):
            line = lines[i]
            if line.strip() == ".. highlight:: tspec":
                default = True
            starts = line.strip() == ".. code-block:: tspec" or (
                default and line.endswith("::") and not line.lstrip().startswith("..")
            )
            i += 1
            if not starts:
                continue
            body: list[str] = []
            while i < len(lines) and (not lines[i].strip() or lines[i].startswith(" ")):
                body.append(lines[i])
                i += 1
            text = "\n".join(b[4:] if b.startswith("    ") else b.strip() for b in body).strip()
            if text:
                found.append((f"{page.name}:{len(found)}", text + "\n"))
    return found


DOC_SPECS = _doc_specs()


def test_docs_show_specs_highlighted() -> None:
    assert len(DOC_SPECS) >= 6


@pytest.mark.parametrize(("where", "text"), DOC_SPECS, ids=[w for w, _ in DOC_SPECS])
def test_doc_specs_round_trip_with_no_errors(where: str, text: str) -> None:
    toks = list(TimespecLexer().get_tokens_unprocessed(text))
    assert "".join(t for _, _, t in toks) == text
    assert not [t for _, tt, t in toks if tt in Error]


def test_compound_units_are_one_token() -> None:
    from pygments.token import Keyword as Kw

    toks = [
        (tt, t)
        for _, tt, t in TimespecLexer().get_tokens_unprocessed(
            "resistors E96 1% 100 ppm/K\n  gm 10 mA/V\n  aging ±2 ppm/year\n  samples 500 seed 3\n"
        )
    ]
    units = [t for tt, t in toks if tt is Kw.Type]
    assert units == ["%", "ppm/K", "mA/V", "ppm/year"]
    # a statement word after a number is a keyword, not a unit
    assert (Kw, "seed") in toks
