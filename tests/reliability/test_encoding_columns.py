"""Columns in UTF-16 and UTF-8 for emoji, combining marks, CJK and subscript digits, with CRLF.

Code-unit counts follow the Unicode encodings (common practice, no source):
U+1F9EA 4 UTF-8 bytes / 2 UTF-16 units; U+0301 (combining acute) 2 / 1;
U+6C1F 3 / 1; U+2083 (subscript three) 3 / 1.  The expected columns are
counted here by encoding the prefix, not by the server's own converter.
"""

from __future__ import annotations

import pytest

from .scale import tried
from .stdio_wire import start_server

PREFIXES = [
    "\N{TEST TUBE}\N{TEST TUBE} ",
    "e\u0301e\u0301 acide ",
    "氟化氯 ",
    "x₃y₂ ",
    "\N{TEST TUBE}e\u0301氟₃ ",
]
CLAIM = "trigonal planar"
CODEC = {"utf-8": ("utf-8", 1), "utf-16": ("utf-16-le", 2)}


def _units(text: str, encoding: str) -> int:
    codec, width = CODEC[encoding]
    return len(text.encode(codec)) // width


@pytest.mark.parametrize("encoding", ["utf-16", "utf-8"])
def test_columns_of_findings_and_hover_in_each_encoding(tmp_path, encoding):
    server = start_server(cwd=str(tmp_path))
    try:
        result = server.initialize(capabilities={"general": {"positionEncodings": [encoding]},
                                                 "textDocument": {"diagnostic": {}}})
        assert result["result"]["capabilities"]["positionEncoding"] == encoding
        for number, prefix in enumerate(PREFIXES):
            # the formula itself carries a subscript digit (ClF₃) on the second line, after CRLF
            line = f"{prefix}{{ClF₃: {CLAIM}}} {prefix}"
            text = f"# Unicode\r\n{line}\r\nend\r\n"
            uri = (tmp_path / f"note{number}.md").as_uri()
            server.notify("textDocument/didOpen", {"textDocument": {"uri": uri, "languageId": "markdown",
                                                                    "version": 1, "text": text}})
            items = server.request("textDocument/diagnostic", {"textDocument": {"uri": uri}})["result"]["items"]
            (shape,) = [d for d in items if d["code"] == "wrong-shape"]
            start = _units(prefix + "{ClF₃: ", encoding)
            assert shape["range"] == {"start": {"line": 1, "character": start},
                                      "end": {"line": 1, "character": start + len(CLAIM)}}, prefix
            hover = server.request("textDocument/hover", {"textDocument": {"uri": uri},
                                                          "position": {"line": 1, "character": start - 3}})
            assert hover["result"] is not None and hover["result"]["range"]["start"] == {
                "line": 1, "character": _units(prefix, encoding)}
            # a column in the middle of a wide character must not break anything
            inside = server.request("textDocument/hover", {"textDocument": {"uri": uri},
                                                           "position": {"line": 1, "character": 1}})
            assert "result" in inside
            tried("notes checked for position encodings")
    finally:
        server.close()
