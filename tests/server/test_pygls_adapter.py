"""pygls is pinned, and what notelsp relies on in it is checked here first, loudly.

An upgrade of pygls is a deliberate act: the installed version must be the
pin (``pyproject.toml`` and ``pygls_adapter.PYGLS_VERSION``); every private
name the adapter uses must be where it was, in the shape it had; every public
pygls hook the server overrides or wraps keeps its parameters (recorded below
from pygls 2.1.1 with ``inspect.signature``); and no module of
``notelsp.server`` but the adapter touches a private name of pygls.  When one
of these fails, read ``notelsp/server/pygls_adapter.py`` and the failing
hook's module before changing the pin.
"""

from __future__ import annotations

import ast
import inspect
import tomllib
from importlib import import_module
from importlib.metadata import version
from pathlib import Path

import pygls
import pytest
from pygls.lsp.server import LanguageServer

from notelsp.server import pygls_adapter
from notelsp.server.app import build_server

ROOT = Path(__file__).resolve().parents[2]
SERVER_PACKAGE = ROOT / "notelsp" / "server"
UPGRADE = "pygls changed under notelsp: see notelsp/server/pygls_adapter.py before moving the pin. "

# The public pygls callables the server overrides or wraps: (module, owner or None, name) ->
# their parameters as (name, kind), recorded from pygls 2.1.1.
P, K, V, VK = "POSITIONAL_OR_KEYWORD", "KEYWORD_ONLY", "VAR_POSITIONAL", "VAR_KEYWORD"
PUBLIC_HOOKS = {
    ("pygls.protocol.language_server", "LanguageServerProtocol", "lsp_text_document__did_open"):
        [("self", P), ("params", P)],
    ("pygls.protocol.language_server", "LanguageServerProtocol", "lsp_notebook_document__did_open"):
        [("self", P), ("params", P)],
    ("pygls.protocol.language_server", "LanguageServerProtocol", "lsp_notebook_document__did_change"):
        [("self", P), ("params", P)],
    ("pygls.protocol.language_server", "LanguageServerProtocol", "lsp_shutdown"): [("self", P), ("args", V)],
    ("pygls.protocol.language_server", "LanguageServerProtocol", "lsp_workspace__execute_command"):
        [("self", P), ("params", P)],
    ("pygls.protocol.language_server", "LanguageServerProtocol", "structure_message"): [("self", P), ("data", P)],
    ("pygls.protocol.language_server", "LanguageServerProtocol", "handle_message"): [("self", P), ("message", P)],
    ("pygls.protocol.language_server", "LanguageServerProtocol", "set_writer"):
        [("self", P), ("writer", P), ("include_headers", P)],
    ("pygls.protocol.language_server", "LanguageServerProtocol", "get_message_type"): [("self", P), ("method", P)],
    ("pygls.protocol.language_server", None, "lsp_method"): [("method_name", P)],
    ("pygls.lsp.server", "LanguageServer", "__init__"):
        [("self", P), ("name", P), ("version", P), ("text_document_sync_kind", P), ("notebook_document_sync", P),
         ("args", V), ("kwargs", VK)],
    ("pygls.lsp.server", "LanguageServer", "report_server_error"): [("self", P), ("error", P), ("source", P)],
    ("pygls.lsp.server", "LanguageServer", "start_io"): [("self", P), ("stdin", P), ("stdout", P)],
    ("pygls.workspace", "TextDocument", "__init__"):
        [("self", P), ("uri", P), ("source", P), ("version", P), ("language_id", P), ("local", P),
         ("sync_kind", P), ("position_codec", P)],
    ("pygls.workspace", "TextDocument", "apply_change"): [("self", P), ("change", P)],
    ("pygls.workspace", "Workspace", "update_text_document"): [("self", P), ("text_doc", P), ("change", P)],
    ("pygls.workspace", "Workspace", "get_notebook_document"):
        [("self", P), ("notebook_uri", K), ("cell_uri", K)],
}
# Public properties the server reads (or, for text_documents, whose mapping it writes to).
PUBLIC_PROPERTIES = (
    ("pygls.workspace", "Workspace", "text_documents"),
    ("pygls.workspace", "Workspace", "position_codec"),
    ("pygls.workspace", "TextDocument", "source"),
    ("pygls.workspace", "TextDocument", "position_codec"),
    ("pygls.protocol.json_rpc", "JsonRPCProtocol", "msg_id"),
)


def _pinned() -> str:
    dependencies = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]["dependencies"]
    (pin,) = [d for d in dependencies if d.replace(" ", "").startswith("pygls")]
    return pin.replace(" ", "")


def test_the_installed_pygls_is_the_pinned_one():
    assert _pinned() == f"pygls=={pygls_adapter.PYGLS_VERSION}", (
        "pyproject.toml must pin pygls exactly, to the version pygls_adapter.PYGLS_VERSION names")
    assert version("pygls") == pygls_adapter.PYGLS_VERSION, (
        UPGRADE + f"pygls {version('pygls')} is installed, the adapter was written for {pygls_adapter.PYGLS_VERSION}")


def test_every_private_name_the_adapter_uses_is_there_in_its_shape():
    assert pygls_adapter.PRIVATE_NAMES == (("pygls.protocol.json_rpc", "JsonRPCProtocol", "_request_futures"),), (
        "the adapter uses a private name this test does not check yet: add its check here")
    protocol = LanguageServer("probe", "0").protocol  # pygls's own, without notelsp
    assert type(vars(protocol).get("_request_futures")) is dict, (
        UPGRADE + "JsonRPCProtocol no longer keeps its in-flight futures in a plain dict _request_futures")
    # The adapter's dict sees every future only if pygls files them by item assignment.
    from pygls.protocol.json_rpc import JsonRPCProtocol

    filing = inspect.getsource(JsonRPCProtocol._execute_handler)
    assert "self._request_futures[msg_id] = future" in filing, (
        UPGRADE + "JsonRPCProtocol._execute_handler no longer files futures in _request_futures by item")


@pytest.mark.parametrize("hook", sorted(PUBLIC_HOOKS, key=str), ids=lambda hook: ".".join(filter(None, hook[1:])))
def test_every_pygls_hook_the_server_overrides_keeps_its_parameters(hook):
    module_name, owner_name, name = hook
    owner = import_module(module_name)
    if owner_name is not None:
        owner = getattr(owner, owner_name)
    assert hasattr(owner, name), UPGRADE + f"{module_name}.{owner_name}.{name} is gone"
    found = [(p.name, p.kind.name) for p in inspect.signature(getattr(owner, name)).parameters.values()]
    assert found == PUBLIC_HOOKS[hook], UPGRADE + f"{owner_name}.{name} now takes {found}"


@pytest.mark.parametrize("prop", PUBLIC_PROPERTIES, ids=lambda prop: ".".join(prop[1:]))
def test_every_pygls_property_the_server_reads_is_there(prop):
    module_name, owner_name, name = prop
    owner = getattr(import_module(module_name), owner_name)
    assert isinstance(inspect.getattr_static(owner, name, None), property), UPGRADE + f"{owner_name}.{name}"


class _Discarded:
    def write(self, data: bytes) -> None:
        pass

    def close(self) -> None:
        pass


def _edit_session(protocol, edits: int) -> None:
    protocol.set_writer(_Discarded())
    messages = [{"jsonrpc": "2.0", "id": 1, "method": "initialize", "params": {"capabilities": {}}},
                {"jsonrpc": "2.0", "method": "textDocument/didOpen", "params": {"textDocument": {
                    "uri": "file:///n.txt", "languageId": "plaintext", "version": 1, "text": ""}}}]
    for number in range(edits):
        messages.append({"jsonrpc": "2.0", "method": "textDocument/didChange", "params": {
            "textDocument": {"uri": "file:///n.txt", "version": number + 2},
            "contentChanges": [{"range": {"start": {"line": 0, "character": 0}, "end": {"line": 0, "character": 0}},
                                "text": "x"}]}})
    for message in messages:
        protocol.handle_message(protocol.structure_message(message))


def test_pygls_alone_keeps_a_future_per_edit_and_the_adapter_drops_them():
    """The reason the adapter exists, checked against pygls itself: if pygls stops keeping them, drop it."""
    bare = LanguageServer("probe", "0")
    _edit_session(bare.protocol, 50)
    assert len(vars(bare.protocol)["_request_futures"]) >= 50, (
        "pygls no longer keeps a future per notification: pygls_adapter.drop_finished_futures can go")
    ours = build_server()
    _edit_session(ours.protocol, 50)
    assert pygls_adapter.held_futures(ours.protocol) == 0
    assert ours.workspace.get_text_document("file:///n.txt").source == "x" * 50


# --- the architecture rule: only the adapter touches pygls's private names ---------------------


def _pygls_private_names() -> set[str]:
    """Every single-underscore name pygls defines or reads as an attribute (its private surface)."""
    names: set[str] = set()
    for path in Path(pygls.__file__).parent.rglob("*.py"):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            name = node.attr if isinstance(node, ast.Attribute) else getattr(node, "name", None)
            if isinstance(name, str) and name.startswith("_") and not name.startswith("__"):
                names.add(name)
    return names


def _pygls_names(tree: ast.Module) -> set[str]:
    """Names a module imports from pygls (its classes, to know which of its own classes extend them)."""
    return {alias.asname or alias.name for node in ast.walk(tree)
            if isinstance(node, ast.ImportFrom) and (node.module or "").startswith("pygls")
            for alias in node.names}


def private_pygls_uses(source: str, private: set[str]) -> list[str]:
    """Where ``source`` touches a private name of pygls: ``line: what``."""
    tree = ast.parse(source)
    from_pygls = _pygls_names(tree)
    extending: set[int] = set()  # ids of nodes inside classes that extend a pygls class
    for node in ast.walk(tree):
        if isinstance(node, ast.ClassDef) and any(isinstance(base, ast.Name) and base.id in from_pygls
                                                  for base in node.bases):
            extending.update(id(inner) for inner in ast.walk(node))
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and (node.module or "").startswith("pygls"):
            parts = (node.module or "").split(".") + [alias.name for alias in node.names]
            found += [f"{node.lineno}: imports {part}" for part in parts if part.startswith("_")]
        elif isinstance(node, ast.Attribute) and node.attr == "__class__" and isinstance(node.ctx, ast.Store):
            found.append(f"{node.lineno}: assigns __class__")
        elif isinstance(node, ast.Attribute) and node.attr in private:
            on_self = isinstance(node.value, ast.Name) and node.value.id in ("self", "cls")
            if not on_self or id(node) in extending:
                found.append(f"{node.lineno}: .{node.attr}")
        elif isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and node.name in private \
                and id(node) in extending:
            found.append(f"{node.lineno}: overrides {node.name}")
    return sorted(found, key=lambda where: (int(where.split(":")[0]), where))


def test_the_check_finds_each_way_of_touching_pygls_internals():
    private = _pygls_private_names()
    source = (
        "from pygls.protocol import LanguageServerProtocol\n"
        "from pygls.lsp._base_server import LanguageServerBase\n"
        "class P(LanguageServerProtocol):\n"
        "    def _send_response(self, msg_id): return self._result_types\n"
        "def f(server, workspace, W):\n"
        "    server._notebook_document_sync = None\n"
        "    workspace.__class__ = W\n"
        "class Own:\n"
        "    def _send_response(self): return self._result_types\n"  # its own names: not pygls's
    )
    assert private_pygls_uses(source, private) == [
        "2: imports _base_server", "4: ._result_types", "4: overrides _send_response",
        "6: ._notebook_document_sync", "7: assigns __class__",
    ]


def test_no_server_module_but_the_adapter_touches_pygls_private_names():
    private = _pygls_private_names()
    adapter = Path(pygls_adapter.__file__).resolve()
    touching = {}
    for path in sorted(SERVER_PACKAGE.rglob("*.py")):
        if path.resolve() == adapter:
            continue
        found = private_pygls_uses(path.read_text(encoding="utf-8"), private)
        if found:
            touching[path.relative_to(ROOT).as_posix()] = found
    assert touching == {}, "only notelsp/server/pygls_adapter.py may use pygls's private names: " + repr(touching)
