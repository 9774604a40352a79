"""Pushed diagnostics are built as JSON directly; lsprotocol's own converter is the reference for that JSON."""

from __future__ import annotations

import pytest
from lsprotocol import types
from pygls.protocol import default_converter

from notelsp.review.document import review_text
from notelsp.server.diagnostics import diagnostic_json, to_diagnostic
from notelsp.server.positions import line_index

# Wide characters before and between findings, a CRLF line and one finding per line (common practice, no source).
NOTE = (
    "# Fluorides \N{TEST TUBE}\r\n"
    "e\u0301 {ClF3: trigonal planar} and 氟 {PCl3F2: Cl axial}\n"
    "{XeF4: tetrahedral} {H2O: zigzag}\n"
)


@pytest.mark.parametrize("encoding", ["utf-8", "utf-16", "utf-32"])
def test_diagnostic_json_is_what_lsprotocol_makes_of_the_diagnostic(encoding):
    findings = review_text(NOTE, "markdown").findings
    assert len(findings) >= 3
    index = line_index(NOTE, encoding)
    converter = default_converter()
    for finding in findings:
        expected = converter.unstructure(to_diagnostic(finding, index), types.Diagnostic)
        assert diagnostic_json(finding, index) == expected
