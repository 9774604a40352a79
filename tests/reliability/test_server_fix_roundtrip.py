"""Quick fixes round-trip through the server: take the code action's edit, send it back as a
didChange, and the finding is gone.  One note per rule that offers a fix.

The notes hold claims the bonding model rejects (VSEPR and the rules' own
predictions; common practice, no source) so that each rule fires once.
"""

from __future__ import annotations

import pytest

from notelsp.review.document import review_text
from notelsp.review.rules import RULES

from .scale import tried
from .stdio_wire import start_server

# rule code -> a note whose only finding of that rule has a fix
FIXABLE_NOTES = {
    "wrong-shape": "{ClF3: trigonal planar}",
    "wrong-electron-geometry": "{SF4: electron geometry octahedral}",
    "wrong-hybridization": "{PH3: sp2}",
    "wrong-lone-pairs": "{NH3: no lone pairs}",
    "implausible-angle": "{NH3: H-N-H 150°}",
    "angle-order-against-bent": "{CH2F2: F-C-F > H-C-H}",
    "bond-length-against-bent": "{C2F6 vs C2H6: C-C shorter}",
    "index-angle-mismatch": "{CH4: i = 0.2}",
    "s-character-mismatch": "{CH4: s-character 50%}",
    "unknown-claim": "{H2O: bnt}",
    "misplaced-ligand": "{PCl3F2: Cl axial}",
    "wrong-polarity": "{CO2: polar}",
    "wrong-point-group": "{BF3: C3v}",
    "wrong-isomer-count": "{SF2Cl2: 9 isomers}",
    "wrong-axe-class": "{ClF3: AX3E}",
    "wrong-unpaired-electrons": "{NO2: diamagnetic}",
    "charge-missing": "{ClO4}",
    "annotation-not-read": "{sf4: seesaw}",
    "unknown-atom": "{CH3OH: O1 bent}",
    "terminal-atom": '{smiles "CC#N": N has 2 lone pairs}',
}
# Put each note in a line of prose with a wide character before it, so the edit's columns matter.
PROSE = "Line one.\r\nWe write \N{TEST TUBE} {note} in the log; ok\r\n"


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fixes")
    wire = start_server(cwd=str(folder))
    wire.initialize(root_uri=folder.as_uri(), capabilities={"textDocument": {"diagnostic": {}}})  # pull
    yield wire
    wire.close()


def _apply(text: str, edit: dict) -> str:
    """Apply one UTF-16 TextEdit independently of the server's conversion."""
    lines = text.split("\r\n")

    def offset(position):
        line = lines[position["line"]]
        units, column = position["character"], 0
        while units > 0:
            units -= 2 if ord(line[column]) > 0xFFFF else 1
            column += 1
        return sum(len(l) + 2 for l in lines[: position["line"]]) + column

    start, end = offset(edit["range"]["start"]), offset(edit["range"]["end"])
    return text[:start] + edit["newText"] + text[end:]


# Rules whose findings have no single correct replacement (the writer must decide).
WITHOUT_FIXES = {"formula-too-large", "impossible-count", "malformed-claim", "malformed-formula", "outside-model",
                 "unknown-element", "isomers-not-enumerated", "note-too-large", "review-continues", "centre-not-named",
                 "implausible-bond-length", "coupling-against-s-character", "outer-d-convention",
                 "angle-against-calculation", "angle-order-against-calculation", "placement-against-calculation",
                 "calculation-failed", "computed-structure", "computed-isomers", "computed-angle", "computed-placement",
                 "cross-check-not-run"}


def test_every_rule_is_either_round_tripped_or_has_no_fix():
    """A new rule must be added to one of the two lists above; each note fires its rule with a fix."""
    assert set(FIXABLE_NOTES) | WITHOUT_FIXES == set(RULES)
    for code, note in FIXABLE_NOTES.items():
        assert any(f.code == code and f.fixes for f in review_text(note).findings), code


@pytest.mark.parametrize("code", sorted(FIXABLE_NOTES))
def test_fix_applied_through_the_server_removes_the_finding(server, tmp_path, code):
    uri = (tmp_path / f"{code}.md").as_uri()
    text = PROSE.format(note=FIXABLE_NOTES[code])
    server.notify("textDocument/didOpen", {"textDocument": {"uri": uri, "languageId": "markdown",
                                                            "version": 1, "text": text}})
    items = server.request("textDocument/diagnostic", {"textDocument": {"uri": uri}})["result"]["items"]
    (diagnostic,) = [d for d in items if d["code"] == code]
    actions = server.request("textDocument/codeAction", {"textDocument": {"uri": uri}, "range": diagnostic["range"],
                                                         "context": {"diagnostics": [diagnostic]}})["result"]
    fixes = [a for a in actions if a.get("kind") == "quickfix" and a["diagnostics"][0]["code"] == code]
    assert fixes, actions
    for version, fix in enumerate(fixes, start=2):
        (edit,) = fix["edit"]["changes"][uri]
        fixed = _apply(text, edit)
        assert fixed.startswith("Line one.\r\nWe write \N{TEST TUBE} {") and fixed.endswith("} in the log; ok\r\n")
        server.notify("textDocument/didChange", {"textDocument": {"uri": uri, "version": version},
                                                 "contentChanges": [{"range": edit["range"], "text": edit["newText"]}]})
        after = server.request("textDocument/diagnostic", {"textDocument": {"uri": uri}})["result"]["items"]
        assert not [d for d in after if d["code"] == code], (fix["title"], after)
        assert not [d for d in after if d["code"] in ("unknown-claim", "malformed-claim")], (fix["title"], after)
        tried("quick fixes applied through the server")
        # undo, so the next fix starts from the same text
        server.notify("textDocument/didChange", {"textDocument": {"uri": uri, "version": version + 100},
                                                 "contentChanges": [{"text": text}]})
    server.notify("textDocument/didClose", {"textDocument": {"uri": uri}})
