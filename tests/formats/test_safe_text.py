"""File names and claim text made safe to print: valid UTF-8, one line, no terminal controls."""

import json
import os
import unicodedata

from hypothesis import given
from hypothesis import strategies as st

from notelsp.formats import json_text, terminal_safe, utf8_safe

# Bidirectional embeddings, overrides and isolates (Unicode Standard Annex #9) can reorder what a
# terminal shows.
BIDI_CONTROLS = [chr(c) for c in (*range(0x202A, 0x202F), *range(0x2066, 0x206A))]


def test_undecodable_bytes_are_written_as_hex():
    name = os.fsdecode(b"run\xff\xfe.md")  # how Python names a file whose bytes are not UTF-8
    assert terminal_safe(name) == utf8_safe(name) == "run\\xff\\xfe.md"


def test_line_breaks_tabs_and_escape_sequences():
    assert terminal_safe("a\nb\rc\td") == "a\\nb\\rc\\td"
    assert terminal_safe("\x1b[31mred\x1b[0m") == "\\x1b[31mred\\x1b[0m"
    assert terminal_safe("\x9b2J") == "\\x9b2J"  # C1 CSI (ECMA-48)
    assert terminal_safe("é ClF₃ 🧪") == "é ClF₃ 🧪"  # printable text is left as it is


@given(st.text(alphabet=st.characters(), max_size=40) | st.binary(max_size=40).map(os.fsdecode))
def test_anything_becomes_printable_utf8_on_one_line(text):
    safe = terminal_safe(text)
    safe.encode("utf-8")  # strict: raises on a lone surrogate
    categories = {unicodedata.category(char) for char in safe}
    assert "Cc" not in categories and "Cs" not in categories  # no controls, no surrogates (Unicode categories)
    assert not any(char in safe for char in BIDI_CONTROLS)
    utf8_safe(text).encode("utf-8")


@given(st.dictionaries(st.text(max_size=5), st.text(max_size=20) | st.binary(max_size=20).map(os.fsdecode), max_size=4))
def test_json_text_is_utf8_and_reads_back_the_same(value):
    text = json_text(value)
    text.encode("utf-8")  # strict
    assert json.loads(text) == value  # the json module reads a surrogate escape back as the surrogate
    assert json.loads(json_text(value, indent=2)) == value
