"""Line and column of an offset, with LSP's line breaks (\\r\\n, \\r, \\n): common practice, no source."""

from notelsp.positions import LineIndex


def test_columns_count_code_points_and_every_line_break_kind():
    text = "a🧪b\r\nc\rd\ne"
    index = LineIndex(text)
    assert index.line_col(text.index("b")) == (0, 2)  # the emoji is one code point
    assert index.line_col(text.index("c")) == (1, 0)  # after \r\n
    assert index.line_col(text.index("d")) == (2, 0)  # after a lone \r
    assert index.line_col(text.index("e")) == (3, 0)
    assert index.line_col(len(text) + 5) == (3, 1)  # past the end: clamped
