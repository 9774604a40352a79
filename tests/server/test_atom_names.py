"""Atom names in claims (``C2 trigonal planar``) in semantic tokens and hover.

An atom name is coloured as a formula is (``type``: what the claim is about), the word after
it (``is``/``has``) and the ``smiles`` marker as claim words (``keyword``).  Hovering a claim
about one centre shows that centre first.  Acetic acid's atoms: C1 the methyl carbon, C2 the
carboxyl carbon, O2 the OH oxygen (README "Formulas"; chemistry common practice, no source).
Token types are the LSP specification's standard names, decoded as the specification describes.
"""

from __future__ import annotations

import pytest
import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient

from notelsp.review.describe import hover_markdown
from notelsp.review.document import review_text
from notelsp.server.semantic_tokens import TOKEN_TYPES, annotation_tokens

from .lsp_harness import SERVER_COMMAND, file_uri
from .test_session import open_note, start
from .test_workspace_features import decoded

NOTE = '{CH3COOH: C2 trigonal planar, O2 is sp2, H-C1-H 109°}\n{smiles "CC#N": N has one lone pair}\n'


def _tokens(text: str) -> list[tuple[str, str]]:
    review = review_text(text, "markdown")
    return [(text[start:end], TOKEN_TYPES[kind]) for annotation in review.annotations
            for start, end, kind in annotation_tokens(annotation, text)]


def test_atom_names_are_tokens_like_formulas():
    assert _tokens(NOTE) == [
        ("CH3COOH", "type"), (":", "operator"), ("C2", "type"), ("trigonal", "keyword"), ("planar", "keyword"),
        (",", "operator"), ("O2", "type"), ("is", "keyword"), ("sp2", "keyword"), (",", "operator"),
        ("H-C1-H", "keyword"), ("109", "number"), ("°", "operator"),
        ("smiles", "keyword"), ('"', "operator"), ("CC#N", "type"), ('"', "operator"), (":", "operator"),
        ("N", "type"), ("has", "keyword"), ("one", "keyword"), ("lone", "keyword"), ("pair", "keyword"),
    ]


def test_every_token_of_an_atom_claim_lies_inside_the_annotation_and_in_order():
    text = "Lab 4: {CH3CN: C2 linear, C1 is tetrahedral} and {SF4: seesaw} done.\n"
    review = review_text(text, "markdown")
    for annotation in review.annotations:
        tokens = annotation_tokens(annotation, text)
        assert all(annotation.body.start <= start < end <= annotation.body.end for start, end, _ in tokens)
        assert all(a[1] <= b[0] for a, b in zip(tokens, tokens[1:]))  # no overlap


@pytest.mark.parametrize("under, first", [
    ("C2 trigonal", "C2"),  # on the atom name
    ("trigonal planar", "C2"),  # on the claim after the name
    ("O2 is", "O2"),
    ("H-C1-H", "C1"),  # an angle names its centre in the middle
])
def test_hover_shows_the_named_centre_first(under, first):
    review = review_text(NOTE, "markdown")
    annotation = review.annotations[0]
    markdown = hover_markdown(review, annotation, NOTE.index(under) + 1)
    assert markdown.split("**Centre ")[1].startswith(f"{first} (bonded to")


def test_hover_on_an_angle_written_with_element_symbols_finds_its_centre():
    # O=C-O in acetic acid can only be the carboxyl carbon, C2
    text = "{CH3COOH: O=C-O 123°}\n"
    review = review_text(text, "markdown")
    markdown = hover_markdown(review, review.annotations[0], text.index("O=C") + 2)
    assert markdown.split("**Centre ")[1].startswith("C2 (bonded to")


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND))
async def client(lsp_client: LanguageClient):
    yield
    await lsp_client.shutdown_session()


async def test_atom_names_through_the_server(client, tmp_path):
    result = await start(client, tmp_path)
    legend = result.capabilities.semantic_tokens_provider.legend
    uri = file_uri(tmp_path / "acids.md")
    open_note(client, uri, NOTE)
    document = types.TextDocumentIdentifier(uri)
    full = await client.text_document_semantic_tokens_full_async(types.SemanticTokensParams(document))
    tokens = decoded(full.data, legend, NOTE)
    assert (0, "C2", "type") in tokens and (0, "O2", "type") in tokens and (1, "N", "type") in tokens
    assert (1, "smiles", "keyword") in tokens
    hover = await client.text_document_hover_async(types.HoverParams(document, types.Position(0, NOTE.index("O2"))))
    assert hover is not None and hover.contents.value.split("**Centre ")[1].startswith("O2 (bonded to")
