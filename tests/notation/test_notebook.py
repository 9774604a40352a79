"""Markdown cells read from notebook files.

Notebooks are written with ``nbformat`` (Jupyter's own library for the file
format), so the layout is the real one, and its reader is the reference for
which cells are Markdown and what their text is.
"""

from __future__ import annotations

import json

import nbformat
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from nbformat import v4

from notelsp.notation.notebook import MAX_NOTEBOOK_CHARS, MarkdownCell, NotebookError, markdown_cells


def notebook_text(*cells) -> str:
    return nbformat.writes(v4.new_notebook(cells=list(cells)))


def test_markdown_cells_keep_their_place_among_all_cells_and_their_text():
    text = notebook_text(
        v4.new_code_cell("x = {1: 2}"),
        v4.new_markdown_cell("# Run 7\n\nThe trifluoride {ClF3: trigonal planar}.\n"),
        v4.new_raw_cell("{SF4: linear}"),
        v4.new_markdown_cell("Water {H2O: bent}"),
    )
    cells = markdown_cells(text)
    assert [cell.index for cell in cells] == [1, 3]
    assert [cell.number for cell in cells] == [2, 4]
    reference = nbformat.reads(text, as_version=4)
    assert [cell.source for cell in cells] == [c.source for c in reference.cells if c.cell_type == "markdown"]


def test_source_as_a_list_of_lines_or_one_string_reads_the_same():
    # nbformat writes multi-line sources as a list of lines, each with its own break (common practice, no source)
    written = json.loads(notebook_text(v4.new_markdown_cell("a {ClF3}\nb\nc")))
    assert written["cells"][0]["source"] == ["a {ClF3}\n", "b\n", "c"]
    as_string = dict(written, cells=[dict(written["cells"][0], source="a {ClF3}\nb\nc")])
    assert markdown_cells(json.dumps(written)) == markdown_cells(json.dumps(as_string)) == (MarkdownCell(0, "a {ClF3}\nb\nc"),)


def test_notebook_without_markdown_cells_has_none():
    assert markdown_cells(notebook_text(v4.new_code_cell("print(1)"))) == ()
    assert markdown_cells(notebook_text()) == ()


def test_nbformat_3_worksheets_are_read_with_cells_numbered_across_them():
    # nbformat 3 layout: cells inside worksheets, headings as their own cell type (nbformat's v3 writer)
    from nbformat import v3

    notebook = v3.new_notebook(
        worksheets=[
            v3.new_worksheet(cells=[v3.new_heading_cell("Fluorides", level=1), v3.new_code_cell("x = 1")]),
            v3.new_worksheet(cells=[v3.new_text_cell("markdown", "Water {H2O: bent}")]),
        ]
    )
    text = nbformat.writes(notebook, version=3)
    assert markdown_cells(text) == (MarkdownCell(0, "Fluorides"), MarkdownCell(2, "Water {H2O: bent}"))


@pytest.mark.parametrize(
    ("text", "says"),
    [
        ("", "not valid JSON (line 1, column 1"),
        ('{"cells": [', "not valid JSON"),
        ("[1, 2]", "the top level is a list"),
        ('"cells"', "the top level is a string"),
        ("{}", "neither cells nor worksheets"),
        ('{"cells": {}}', "cells is an object, not a list"),
        ('{"cells": [3]}', "cell 1 is a number, not an object"),
        ('{"cells": [{"source": "x"}]}', "cell 1 has no cell_type"),
        ('{"cells": [{"cell_type": "code"}, {"cell_type": "markdown", "source": 7}]}', "cell 2: source is neither"),
        ('{"cells": [{"cell_type": "markdown", "source": ["a", 1]}]}', "cell 1: source is neither"),
        ('{"worksheets": [5]}', "worksheet 1 has no list of cells"),
    ],
)
def test_what_is_not_a_notebook_is_refused_with_a_reason(text, says):
    with pytest.raises(NotebookError) as raised:
        markdown_cells(text)
    assert says in str(raised.value)
    assert isinstance(raised.value, ValueError)


@pytest.mark.parametrize("opener, closer", [("[", "]"), ('{"a":', "}")])
def test_deeply_nested_json_is_refused_not_crashed(opener, closer):
    # json.loads recurses once per level and raises RecursionError far below 100,000 levels
    # (CPython's json decoder, common practice, no source)
    text = opener * 100_000 + "1" + closer * 100_000
    with pytest.raises(NotebookError, match="nested too deeply"):
        markdown_cells(text)


def test_oversized_text_is_refused_before_parsing():
    text = '{"cells": []' + " " * MAX_NOTEBOOK_CHARS + "}"
    with pytest.raises(NotebookError, match="larger than"):
        markdown_cells(text)


def test_a_lone_surrogate_escape_becomes_one_replacement_character():
    # "\ud800" alone is valid JSON but no UTF encoding can write it (RFC 8259 section 8.2)
    text = '{"cells": [{"cell_type": "markdown", "source": "a\\ud800b {ClF3}"}]}'
    (cell,) = markdown_cells(text)
    assert cell.source == "a\ufffdb {ClF3}"
    assert cell.source.index("{") == 4  # columns after it are where they were


def test_a_number_of_thousands_of_digits_is_refused_with_a_reason():
    # CPython refuses to convert integers of more than 4,300 digits by default (Python 3.11 docs,
    # "Integer string conversion length limitation")
    with pytest.raises(NotebookError, match="number too long"):
        markdown_cells('{"cells": [], "x": ' + "1" * 5000 + "}")


_JSON = st.recursive(
    st.none() | st.booleans() | st.integers() | st.floats(allow_nan=False) | st.text(max_size=20),
    lambda inner: st.lists(inner, max_size=4) | st.dictionaries(
        st.sampled_from(["cells", "cell_type", "source", "worksheets", "markdown", "code", "x"]), inner, max_size=4),
    max_leaves=30,
)


@settings(max_examples=200, deadline=None)
@given(_JSON)
def test_any_json_value_gives_cells_or_a_notebook_error(value):
    try:
        cells = markdown_cells(json.dumps(value))
    except NotebookError as error:
        assert str(error)
    else:
        assert all(isinstance(cell.source, str) and cell.index >= 0 for cell in cells)


@settings(max_examples=200, deadline=None)
@given(st.text(max_size=200))
def test_any_text_gives_cells_or_a_notebook_error(text):
    try:
        cells = markdown_cells(text)
    except NotebookError as error:  # anything else (RecursionError, TypeError, ...) fails the test
        assert str(error)
    else:
        assert isinstance(cells, tuple)
