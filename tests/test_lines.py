"""One definition of a line: the grammar's (LF or CR LF), for errors and for format alike.

``str.splitlines`` also splits at FF, VT, FS/GS/RS, U+0085, U+2028, U+2029 and a
lone CR (Python documentation, "str.splitlines"); the grammar (``_NL`` in
grammar/timespec.lark) ends a line only at LF or CR LF.  These tests hold the
two together.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import timespec
from timespec.errors import SpecError
from timespec.language.canonical import layout
from timespec.language.parser import source_lines

ODD = ["\f", "\v", "\x1c", "\x1d", "\x1e", "\x85", "\u2028", "\u2029", "\r"]


def _spec(comment: str) -> str:
    return (
        f"# top {comment} note\n"
        "oneshot hold:\n"
        f"  width 10 ms ±10%   # inline {comment} remark\n"
        "  supply 5 V\n"
        "# closing remark\n"
    )


@pytest.mark.parametrize("odd", ODD, ids=[repr(c) for c in ODD])
def test_format_keeps_comments_with_odd_characters(odd: str) -> None:
    text = _spec(odd)
    out = layout(text)
    assert f"top {odd} note" in out
    assert f"inline {odd} remark" in out
    assert "# closing remark" in out
    # the inline comment stays on its statement's line
    (width_line,) = [ln for ln in source_lines(out) if "width" in ln]
    assert "remark" in width_line


@pytest.mark.parametrize("odd", ODD, ids=[repr(c) for c in ODD])
def test_error_points_at_the_right_line(odd: str) -> None:
    text = f"# a {odd} b\noneshot hold:\n  widht 10 ms ±10%\n  supply 5 V\n"
    with pytest.raises(SpecError) as info:
        timespec.parse(text)
    assert info.value.line == 3
    assert "widht" in str(info.value)


def test_crlf_is_one_line_end() -> None:
    assert source_lines("a\r\nb\r\n") == ["a", "b"]
    assert source_lines("a\rb\n") == ["a\rb"]
    assert source_lines("a\u2028b\nc") == ["a\u2028b", "c"]


comment_text = st.text(
    alphabet=st.sampled_from([*ODD, "a", "z", " ", "#", "±", "µ", ":", ";"]), max_size=20
)


@settings(max_examples=200, derandomize=True)
@given(comment_text, comment_text)
def test_format_keeps_every_comment_and_the_meaning(a: str, b: str) -> None:
    text = f"# {a}\noneshot hold:\n  width 10 ms ±10%  # {b}\n  supply 5 V\n"
    out = layout(text)
    assert f"# {a}".rstrip() in out
    assert f"# {b}".rstrip() in out
    assert timespec.parse(out) == timespec.parse(text)
    assert layout(out) == out
