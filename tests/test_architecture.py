"""The architecture's invariants, as DEVELOPERS.md states them, checked on the source itself.

Imports are read with ``ast`` (nothing is imported to check them), so a rule that is broken
fails here with the module and the import that breaks it.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "notelsp"

# What each analysis layer may not import: the layers above it, the protocol and the processes.
EDGE = ("notelsp.server", "notelsp.cli", "notelsp.formats", "notelsp.crosscheck", "pygls", "lsprotocol",
        "subprocess", "socket", "multiprocessing", "concurrent", "asyncio", "threading.Thread")
FORBIDDEN = {
    "notation": EDGE + ("notelsp.chem", "notelsp.review", "notelsp.compute"),
    "chem": EDGE + ("notelsp.review", "notelsp.compute"),
    "review": EDGE + ("notelsp.compute.pool", "notelsp.compute.worker", "notelsp.compute.geometry",
                      "notelsp.compute.cache"),
}
# Reading files is allowed in one place of the analysis: the grammar's own file and its built-parser cache.
IO_ALLOWED = {"notation/grammar.py"}
IO_CALLS = {"open", "read_text", "read_bytes", "write_text", "write_bytes", "unlink", "mkdir",
            "rename", "fdopen", "iterdir", "glob", "rglob", "listdir", "scandir", "getenv"}


def _import_drawing():
    """tools/import_drawing.py: the one reader of the package's imports (the drawing and these tests)."""
    import importlib.util

    spec = importlib.util.spec_from_file_location("import_drawing", PACKAGE.parent / "tools" / "import_drawing.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


drawing = _import_drawing()
module_name = drawing.module_name


def imported(path: Path, top_level_only: bool = False) -> set[str]:
    """Every module ``path`` imports, for the type checker too (relative imports resolved); only those
    run at import if asked."""
    return {module for module, at_import in drawing.imports_of(path, typing_too=True)
            if at_import or not top_level_only}


def layer_files(layer: str) -> list[Path]:
    return sorted((PACKAGE / layer).rglob("*.py"))


@pytest.mark.parametrize("layer", sorted(FORBIDDEN))
def test_an_analysis_layer_imports_only_below_itself(layer: str) -> None:
    broken = {
        str(path.relative_to(PACKAGE)): sorted(m for m in imported(path)
                                               if any(m == f or m.startswith(f + ".") for f in FORBIDDEN[layer]))
        for path in layer_files(layer)
    }
    assert {k: v for k, v in broken.items() if v} == {}


@pytest.mark.parametrize("layer", sorted(FORBIDDEN))
def test_the_analysis_does_no_io(layer: str) -> None:
    """Text in, findings out: files, the environment and processes belong to the CLI and the server."""
    broken = {}
    for path in layer_files(layer):
        relative = str(path.relative_to(PACKAGE))
        if relative in IO_ALLOWED:
            continue
        calls = []
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Call):
                name = node.func.attr if isinstance(node.func, ast.Attribute) else getattr(node.func, "id", "")
                if name in IO_CALLS:
                    calls.append(f"{name}() line {node.lineno}")
            elif isinstance(node, ast.Attribute) and node.attr == "environ":
                calls.append(f"environ line {node.lineno}")
        if calls:
            broken[relative] = calls
    assert broken == {}


def test_no_import_cycle_between_modules() -> None:
    """Module-level imports form no cycle anywhere in the package (imports inside functions are lazy loads)."""
    modules = {module_name(p): p for p in PACKAGE.rglob("*.py")}
    graph = {name: {m for m in imported(path, top_level_only=True) if m in modules and m != name}
             for name, path in modules.items()}
    # a package's __init__ importing its own submodules is how registries load: not a cycle of design
    for name in graph:
        graph[name] = {m for m in graph[name] if not m.startswith(name + ".")}
    assert drawing.cycle({(a, b): True for a in graph for b in graph[a]}) is None



def test_the_server_has_no_import_cycle_even_through_lazy_imports() -> None:
    """Within notelsp/server not even an import inside a function closes a loop: the protocol layer is a line."""
    modules = {module_name(p): p for p in (PACKAGE / "server").rglob("*.py")}
    graph = {name: {m for m in imported(path) if m in modules and m != name and not m.startswith(name + ".")}
             for name, path in modules.items()}
    assert drawing.cycle({(a, b): False for a in graph for b in graph[a]}, lazy_too=True) is None


# Module-level memo of pure functions keyed by value may stay outside the analysis host: the same
# arguments always give the same result, so sharing it between hosts changes no finding.
VALUE_KEYED_MEMO = {
    "notation/scanner.py": {"_segment_groups", "_segment_annotations"},  # a segment's text -> its annotations, capped
    "chem/analysis.py": {"_cache"},  # a formula -> its analysis, capped
}
MUTABLE_CALLS = {"dict", "list", "set", "OrderedDict", "defaultdict", "deque", "WeakValueDictionary",
                 "WeakKeyDictionary", "Counter"}


def _module_state(path: Path) -> list[str]:
    """Module-level mutable containers named as state (lower case: UPPER_CASE tables are constants) and
    names rebound through ``global``, with their lines."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    found = []
    for node in tree.body:
        if isinstance(node, (ast.Assign, ast.AnnAssign)) and node.value is not None:
            value = node.value
            mutable = isinstance(value, (ast.Dict, ast.List, ast.Set, ast.DictComp, ast.ListComp, ast.SetComp)) or (
                isinstance(value, ast.Call)
                and (value.func.attr if isinstance(value.func, ast.Attribute) else getattr(value.func, "id", ""))
                in MUTABLE_CALLS)
            targets = node.targets if isinstance(node, ast.Assign) else [node.target]
            for target in targets:
                if mutable and isinstance(target, ast.Name) and target.id != "__all__" \
                        and not target.id.lstrip("_").isupper():
                    found.append((target.id, node.lineno))
    for node in ast.walk(tree):
        if isinstance(node, ast.Global):
            found.extend((name, node.lineno) for name in node.names)
    return [f"{name} line {line}" for name, line in found]


@pytest.mark.parametrize("layer", sorted(FORBIDDEN))
def test_only_the_analysis_host_keeps_state(layer: str) -> None:
    """The analysis host (``review/host.py``) owns what reviews leave behind; no analysis module keeps
    results in module-level containers, except the memo of pure functions keyed by value."""
    broken = {}
    for path in layer_files(layer):
        relative = str(path.relative_to(PACKAGE))
        allowed = VALUE_KEYED_MEMO.get(relative, set())
        state = [entry for entry in _module_state(path) if entry.split(" line ")[0] not in allowed]
        if state:
            broken[relative] = state
    assert broken == {}


def test_the_state_check_sees_a_module_level_cache(tmp_path: Path) -> None:
    """The control for the test above: a module keeping reviews at module level is caught."""
    module = tmp_path / "kept.py"
    module.write_text("_reviews: dict = {}\n_recent = []\nTABLE = {'a': 1}\n__all__ = ['x']\n"
                      "def f():\n    global _count\n", encoding="utf-8")
    assert _module_state(module) == ["_reviews line 1", "_recent line 2", "_count line 6"]



def test_the_drawing_of_the_imports_in_developers_md_is_current() -> None:
    text = drawing.DEVELOPERS.read_text(encoding="utf-8")
    assert drawing.rewritten(text) == text, "DEVELOPERS.md's drawing of the imports is stale: run tools/import_drawing.py"


def test_the_drawing_shows_no_cycle_and_the_layers_one_way() -> None:
    parts = drawing.edges()
    assert drawing.cycle(parts) is None
    assert drawing.cycle(drawing.edges("server"), lazy_too=True) is None
    # the analysis layers, drawn: each reaches only downwards (common practice, no source: layering)
    order = ["notation", "chem", "review"]
    for (importer, imported), _ in parts.items():
        if importer in order and imported in order:
            assert order.index(imported) < order.index(importer), (importer, imported)


def test_the_cycle_finder_finds_a_cycle() -> None:
    assert drawing.cycle({("a", "b"): True, ("b", "a"): True}) == ["a", "b", "a"]
    assert drawing.cycle({("a", "b"): True, ("b", "a"): False}) is None
    assert drawing.cycle({("a", "b"): True, ("b", "a"): False}, lazy_too=True) == ["a", "b", "a"]
