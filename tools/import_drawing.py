"""Draw which parts of notelsp import which, from the source, into DEVELOPERS.md.

A part is a subpackage (``notation``, ``chem``, ``review``, ``compute``, ...) or a
top-level module (``cli``, ``elements``).  An arrow ``a --> b`` means some module
of ``a`` imports one of ``b`` at module level; ``a -.-> b`` means only inside a
function (imported when first needed).  Imports are read with ``ast``; nothing
is imported.  Run ``python tools/import_drawing.py`` after moving imports;
``tests/test_architecture.py`` fails while the drawing is out of date.
"""

from __future__ import annotations

import ast
import sys
from collections.abc import Mapping
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PACKAGE = ROOT / "notelsp"
DEVELOPERS = ROOT / "DEVELOPERS.md"
START, END = "<!-- imports:start -->", "<!-- imports:end -->"


def part_of(module: str, within: str = "") -> str | None:
    """The part a dotted module name belongs to: a part of notelsp, or a module of ``within`` (a subpackage).

    None outside (``from notelsp import x`` also names ``notelsp.x``, which is what counts).
    """
    prefix = ["notelsp", *([within] if within else [])]
    pieces = module.split(".")
    if pieces[: len(prefix)] != prefix or len(pieces) <= len(prefix):
        return None
    name = pieces[len(prefix)]
    folder = PACKAGE.joinpath(*prefix[1:])
    return name if (folder / name).is_dir() or (folder / f"{name}.py").is_file() else None


def module_name(path: Path) -> str:
    parts = path.relative_to(ROOT).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def imports_of(path: Path, typing_too: bool = False) -> list[tuple[str, bool]]:
    """(imported module, run at import?) for every import of ``path``, relative ones resolved.

    Imports under ``if TYPE_CHECKING:`` are for the type checker only: left out unless ``typing_too``
    (then counted as not run at import)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    name = module_name(path)
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    at_import = _run_at_import(tree)
    # imports under ``if TYPE_CHECKING:`` at module level are for the type checker only: not drawn
    typing_only = {id(child) for node in tree.body if isinstance(node, ast.If)
                   and "TYPE_CHECKING" in ast.unparse(node.test) for child in ast.walk(node)}
    found = []
    for node in ast.walk(tree):
        if id(node) in typing_only and not typing_too:
            continue
        at_top = id(node) in at_import and id(node) not in typing_only
        if isinstance(node, ast.Import):
            found.extend((alias.name, at_top) for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")[: len(package.split(".")) - node.level + 1]
                module = ".".join(base + ([node.module] if node.module else []))
            else:
                module = node.module or ""
            found.append((module, at_top))
            found.extend((f"{module}.{alias.name}", at_top) for alias in node.names)
    return found


def _run_at_import(tree: ast.Module) -> set[int]:
    """The nodes outside every function body: they run when the module is imported."""
    inside_functions = {id(child) for node in ast.walk(tree)
                        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef))
                        for child in ast.walk(node) if child is not node}
    return {id(node) for node in ast.walk(tree) if id(node) not in inside_functions}


def edges(within: str = "") -> dict[tuple[str, str], bool]:
    """(importer part, imported part) -> True if any of those imports is at module level."""
    drawn: dict[tuple[str, str], bool] = {}
    for path in sorted(PACKAGE.joinpath(within).rglob("*.py")):
        source = part_of(module_name(path), within)
        if source is None:
            continue
        for module, at_top in imports_of(path):
            target = part_of(module, within)
            if target is None or target == source:
                continue
            drawn[(source, target)] = drawn.get((source, target), False) or at_top
    return drawn


def cycle(drawn: Mapping[tuple[str, str], bool], lazy_too: bool = False) -> list[str] | None:
    """A cycle through module-level arrows (every arrow if ``lazy_too``), or None."""
    graph: dict[str, list[str]] = {}
    for (a, b), at_top in drawn.items():
        if at_top or lazy_too:
            graph.setdefault(a, []).append(b)
    state: dict[str, int] = {}
    path: list[str] = []

    def visit(node: str) -> list[str] | None:
        state[node] = 1
        path.append(node)
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == 1:
                return path[path.index(nxt):] + [nxt]
            if nxt not in state and (found := visit(nxt)):
                return found
        path.pop()
        state[node] = 2
        return None

    for node in sorted(graph):
        if node not in state and (found := visit(node)):
            return found
    return None


# What is drawn: the parts of the package, then the modules of the server (the edge with most modules).
DRAWN = ("", "server")


def drawing(within: str = "") -> str:
    """The Mermaid flowchart of the parts, arrows sorted so the text is stable."""
    drawn = edges(within)
    title = f"`notelsp/{within}`, its modules:" if within else "`notelsp`, its parts:"
    lines = [title, "", "```mermaid", "flowchart LR"]
    for (a, b), at_top in sorted(drawn.items()):
        lines.append(f"    {a} {'-->' if at_top else '-.->'} {b}")
    lines.append("```")
    return "\n".join(lines)


def rewritten(text: str) -> str:
    head, rest = text.split(START, 1)
    _, tail = rest.split(END, 1)
    drawings = "\n\n".join(drawing(within) for within in DRAWN)
    return f"{head}{START}\n{drawings}\n{END}{tail}"


def main() -> int:
    for within in DRAWN:
        if found := cycle(edges(within), lazy_too=within == "server"):
            print("import cycle: " + " -> ".join(found), file=sys.stderr)
            return 1
    DEVELOPERS.write_text(rewritten(DEVELOPERS.read_text(encoding="utf-8")), encoding="utf-8")
    return 0


if __name__ == "__main__":
    sys.exit(main())
