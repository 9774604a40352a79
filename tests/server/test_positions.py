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
