"""The hover floor: a bare pygls server whose hover returns a constant string.

Same transport and library as notelsp's server, no work: the difference
between the two round trips is what notelsp's hover itself costs.
"""

from lsprotocol import types
from pygls.lsp.server import LanguageServer

server = LanguageServer("bare-hover", "0", text_document_sync_kind=types.TextDocumentSyncKind.Incremental)


@server.feature(types.TEXT_DOCUMENT_HOVER)
def hover(ls: LanguageServer, params: types.HoverParams) -> types.Hover:
    return types.Hover(contents=types.MarkupContent(kind=types.MarkupKind.Markdown, value="constant"))


if __name__ == "__main__":
    server.start_io()
