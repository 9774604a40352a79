"""The Markdown cells of a Jupyter notebook (``.ipynb``), read from the file's text.

Pure: text in, cells out.  A notebook is JSON; only its Markdown cells are
notes (code cells hold code, outputs hold what code printed).  Each cell keeps
its position among all the notebook's cells, so a report can name it, and its
own source text, so positions in findings count within the cell.

nbformat 4 keeps the cells in ``cells``; nbformat 3 kept them in
``worksheets[*].cells`` and had separate ``heading`` cells, whose text is read
as Markdown too.
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass
from typing import Any

# A notebook with large outputs (embedded images) is many megabytes of JSON; beyond this it is not
# a lab notebook but a data dump, and parsing it would hold the whole tree in memory.
MAX_NOTEBOOK_CHARS = 64_000_000
_MARKDOWN_KINDS = frozenset({"markdown", "heading"})  # "heading" exists only in nbformat 3
_LONE_SURROGATE = re.compile("[\ud800-\udfff]")


class NotebookError(ValueError):
    """The text is not a notebook this module can read; the message says why, for a person."""


@dataclass(frozen=True)
class MarkdownCell:
    index: int  # 0-based position among all the notebook's cells (code and raw cells count too)
    source: str

    @property
    def number(self) -> int:
        """The cell's position as people count it (1-based), for reports."""
        return self.index + 1


def markdown_cells(text: str) -> tuple[MarkdownCell, ...]:
    """Every Markdown cell of the notebook ``text``, in order; raises :class:`NotebookError`."""
    if len(text) > MAX_NOTEBOOK_CHARS:
        raise NotebookError(f"larger than {MAX_NOTEBOOK_CHARS:,} characters, more than a notebook of notes")
    try:
        document = json.loads(text)
    except json.JSONDecodeError as error:
        raise NotebookError(f"not valid JSON (line {error.lineno}, column {error.colno}: {error.msg})") from None
    except RecursionError:  # the decoder recurses per nesting level; no notebook nests this deep
        raise NotebookError("not a notebook: JSON nested too deeply") from None
    except ValueError:  # Python refuses integers of thousands of digits (int_max_str_digits)
        raise NotebookError("not a notebook: it holds a number too long to read") from None
    except MemoryError:
        raise NotebookError("not a notebook: too large to read") from None
    if not isinstance(document, dict):
        raise NotebookError(f"not a notebook: the top level is {_json_kind(document)}, not an object")
    cells = _all_cells(document)
    found: list[MarkdownCell] = []
    for index, cell in enumerate(cells):
        if not isinstance(cell, dict):
            raise NotebookError(f"cell {index + 1} is {_json_kind(cell)}, not an object")
        kind = cell.get("cell_type")
        if not isinstance(kind, str):
            raise NotebookError(f"cell {index + 1} has no cell_type")
        if kind in _MARKDOWN_KINDS:
            found.append(MarkdownCell(index, _source_text(cell, index)))
    return tuple(found)


def _all_cells(document: dict[str, Any]) -> list[Any]:
    if "cells" in document:  # nbformat 4
        cells = document["cells"]
        if not isinstance(cells, list):
            raise NotebookError(f"not a notebook: cells is {_json_kind(cells)}, not a list")
        return cells
    worksheets = document.get("worksheets")  # nbformat 3: cells are numbered across the worksheets
    if isinstance(worksheets, list):
        cells = []
        for number, worksheet in enumerate(worksheets, 1):
            if not isinstance(worksheet, dict) or not isinstance(worksheet.get("cells", []), list):
                raise NotebookError(f"not a notebook: worksheet {number} has no list of cells")
            cells.extend(worksheet.get("cells", []))
        return cells
    raise NotebookError("not a notebook: it has neither cells nor worksheets")


def _source_text(cell: dict[str, Any], index: int) -> str:
    # nbformat 3 named the text "input" in code cells only; Markdown and heading cells use "source".
    source = cell.get("source", "")
    if isinstance(source, list) and all(isinstance(line, str) for line in source):
        source = "".join(source)  # each piece keeps its own line break
    if not isinstance(source, str):
        raise NotebookError(f"cell {index + 1}: source is neither a string nor a list of strings")
    # JSON escapes can spell a lone surrogate (\ud800), which no output can encode; one character
    # for one keeps every column where it was.
    return _LONE_SURROGATE.sub("\ufffd", source)


def _json_kind(value: Any) -> str:
    if isinstance(value, list):
        return "a list"
    if isinstance(value, str):
        return "a string"
    if isinstance(value, bool) or value is None:
        return json.dumps(value)
    if isinstance(value, (int, float)):
        return "a number"
    return "an object"
