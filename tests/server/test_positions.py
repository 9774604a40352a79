"""Code-point offsets <-> LSP positions, in each negotiable encoding.

Expected code-unit counts follow the Unicode encodings themselves (UTF-16:
astral characters are surrogate pairs; UTF-8: 1-4 bytes) — common practice,
no source beyond the Unicode standard.
"""

import pytest
from hypothesis import given, strategies as st
from lsprotocol.types import Position, Range

from notelsp.notation.model import Span
from notelsp.server.positions import UTF8, UTF16, UTF32, line_index

EMOJI = "\N{TEST TUBE}"  # U+1F9EA, outside the BMP
TEXT = f"# Note\r\n{EMOJI} 氟 {{ClF3: t-shaped}}\r\nlast\rend"


def test_crlf_and_lone_cr_start_new_lines():
    index = line_index(TEXT, UTF16)
    assert index.position(TEXT.index("last")) == Position(2, 0)
    assert index.position(TEXT.index("end")) == Position(3, 0)
    assert index.position(TEXT.index("\r\n")) == Position(0, 6)


@pytest.mark.parametrize(
    "encoding, column",
    [
        (UTF16, 2 + 1 + 1 + 1),  # emoji = 2 units, space, CJK = 1, space
        (UTF8, 4 + 1 + 3 + 1),  # emoji = 4 bytes, CJK = 3 bytes
        (UTF32, 1 + 1 + 1 + 1),
    ],
)
def test_columns_after_emoji_and_cjk(encoding, column):
    brace = TEXT.index("{")
    index = line_index(TEXT, encoding)
    assert index.position(brace) == Position(1, column)
    assert index.offset(Position(1, column)) == brace


def test_range_and_span_round_trip():
    index = line_index(TEXT, UTF16)
    span = Span(TEXT.index("t-shaped"), TEXT.index("t-shaped") + len("t-shaped"))
    assert index.span(index.range(span)) == span
    assert index.range(span) == Range(Position(1, 12), Position(1, 20))  # 2 + 1 + 1 + 1 units, "{ClF3: " = 7


def test_columns_past_the_line_end_clamp_before_the_terminator():
    index = line_index(TEXT, UTF16)
    assert index.offset(Position(0, 99)) == TEXT.index("\r\n")
    assert index.offset(Position(99, 0)) == len(TEXT)


def test_empty_document():
    index = line_index("", UTF16)
    assert index.position(0) == Position(0, 0)
    assert index.offset(Position(0, 5)) == 0


@given(st.text(alphabet=st.sampled_from(["a", "\n", "\r", EMOJI, "氟", "é"]), max_size=40), st.data())
def test_every_offset_round_trips(text, data):
    offset = data.draw(st.integers(0, len(text)))
    for encoding in (UTF8, UTF16, UTF32):
        index = line_index(text, encoding)
        back = index.offset(index.position(offset))
        # An offset between \r and \n is not addressable in LSP; it lands on the line end.
        if 0 < offset < len(text) and text[offset - 1] == "\r" and text[offset] == "\n":
            assert back == offset - 1
        else:
            assert back == offset


# --- long lines: measured in blocks, compared with the plain definition ------------------------


def _plain_units(text: str, encoding: str) -> int:
    """Code units of ``text`` by the definition itself: encode it and count (the simple converter)."""
    if encoding == UTF32:
        return len(text)
    return len(text.encode("utf-16-le" if encoding == UTF16 else "utf-8", "surrogatepass")) // (2 if encoding == UTF16 else 1)


@given(st.text(alphabet=st.sampled_from(["a", "\n", EMOJI, "氟", "é"]), min_size=0, max_size=1_500), st.data())
def test_long_lines_agree_with_the_plain_converter(text, data):
    from notelsp.positions import line_starts

    starts = line_starts(text)
    for encoding in (UTF8, UTF16):
        index = line_index(text, encoding)
        for offset in data.draw(st.lists(st.integers(0, len(text)), max_size=20)):
            line = max(i for i, s in enumerate(starts) if s <= offset)
            assert index.position(offset) == Position(line, _plain_units(text[starts[line]:offset], encoding))
            assert index.offset(index.position(offset)) == offset


def test_a_megabyte_line_with_one_character_outside_the_bmp():
    """The attack measured at 0.33 s per position: every position agrees with a single plain pass."""
    line = "x" * 500_000 + EMOJI + "氟" * 500_000
    text = line + "\n{H2O: bent}\n"
    index = line_index(text, UTF16)
    offsets = sorted({0, 1, 499_999, 500_000, 500_001, 500_002, len(line) - 1, len(line), *range(7, len(line), 997)})
    for offset in offsets:
        expected = offset + (1 if offset > 500_000 else 0)  # the emoji is two UTF-16 units, the rest one
        assert index.position(offset) == Position(0, expected)
        assert index.offset(Position(0, expected)) == offset
    assert index.offset(Position(0, 500_001)) == 500_001  # the middle of the surrogate pair: after it
    assert index.offset(Position(0, 10**9)) == len(line)
    assert index.position(len(line) + 1) == Position(1, 0)
