"""The rules and what hands them their inputs are typed, and mypy (a general-purpose checker) agrees.

A rule reads the analysis, the settings and the computed results through
``RuleContext``; these tests keep those types real: mypy finds no error in the
rules, ``review/document.py``, ``target.py`` and ``calculated.py`` under the
settings of ``[tool.mypy]`` in pyproject.toml, the context's annotations
resolve to the project's own classes (never ``Any``), and no rule reads the
analysis by ``getattr``.
"""

from __future__ import annotations

import ast
import dataclasses
import getpass
import inspect
import subprocess
import sys
import tempfile
import typing
from pathlib import Path
from types import ModuleType

import pytest

from notelsp.review import rules
from notelsp.review.rules import DocumentContext, RuleContext

ROOT = Path(__file__).resolve().parents[2]
# What the strict section of [tool.mypy] names; the rules' package is the one checked most.
TYPED = ("notelsp/review/rules", "notelsp/review/document.py", "notelsp/review/target.py",
         "notelsp/review/calculated.py", "notelsp/review/describe.py", "notelsp/review/predictions.py")


def _mypy(*arguments: str, cache: str) -> subprocess.CompletedProcess[str]:
    pytest.importorskip("mypy", reason="mypy is not installed (it is in the test extra: pip install -e '.[test]')")
    # kept between runs in the temporary folder: a warm run takes about a second, a cold one several
    cache_dir = Path(tempfile.gettempdir()) / f"notelsp-mypy-{cache}-{getpass.getuser()}"
    return subprocess.run(
        [sys.executable, "-m", "mypy", "--config-file", str(ROOT / "pyproject.toml"), "--cache-dir", str(cache_dir),
         *arguments],
        cwd=ROOT, capture_output=True, text=True, timeout=240,
    )


def test_mypy_finds_no_error_in_the_rules_and_their_inputs():
    result = _mypy(*TYPED, cache="cache")
    report = f"mypy said:\n{result.stdout}{result.stderr}"
    assert result.returncode == 0, report
    assert result.stdout.startswith("Success: no issues found"), report


def test_mypy_would_report_an_untyped_function_or_an_explicit_any_in_the_rules(tmp_path):
    # The check above means something only if these settings reject what they are meant to: the same
    # package with a probe added to the rules' registry, checked in place of the real file.
    source = ROOT / "notelsp/review/rules/__init__.py"
    shadow = tmp_path / "__init__.py"
    shadow.write_text(source.read_text(encoding="utf-8")
                      + "\n\nfrom typing import Any\n\n\ndef _probe(value):\n    return value\n\n\n_PROBED: Any = None\n",
                      encoding="utf-8")
    result = _mypy("--shadow-file", str(source), str(shadow), *TYPED, cache="probe")
    assert result.returncode == 1, result.stdout + result.stderr
    assert "[no-untyped-def]" in result.stdout, result.stdout
    assert "[explicit-any]" in result.stdout, result.stdout


def _type_checking_namespace(module: ModuleType) -> dict[str, object]:
    """The module's globals plus what it imports only for type checkers (its ``if TYPE_CHECKING:`` block)."""
    namespace = dict(vars(module))
    for node in ast.parse(inspect.getsource(module)).body:
        if isinstance(node, ast.If) and ast.unparse(node.test) == "TYPE_CHECKING":
            exec(compile(ast.Module(body=node.body, type_ignores=[]), module.__file__, "exec"), namespace)
    return namespace


def _mentions_any(hint: object) -> bool:
    return hint is typing.Any or any(_mentions_any(argument) for argument in typing.get_args(hint))


@pytest.mark.parametrize("context", [RuleContext, DocumentContext])
def test_every_field_of_a_rule_context_has_a_real_type(context):
    hints = typing.get_type_hints(context, globalns=_type_checking_namespace(rules))
    for field in dataclasses.fields(context):
        assert field.name in hints, f"{context.__name__}.{field.name} has no annotation"
        assert not _mentions_any(hints[field.name]), f"{context.__name__}.{field.name} is annotated {hints[field.name]}"


def test_rule_context_hands_the_rules_the_analysis_settings_and_computed_results_by_their_own_classes():
    from notelsp.chem.analysis import SpeciesAnalysis
    from notelsp.chem.exceptions import KnownException
    from notelsp.compute.result import ComputedSpecies
    from notelsp.review.calculated import Calculation
    from notelsp.review.settings import Settings

    namespace = _type_checking_namespace(rules)
    fields = typing.get_type_hints(RuleContext, globalns=namespace)
    assert fields["analyses"] == tuple[SpeciesAnalysis, ...]
    assert fields["settings"] is Settings
    assert fields["computed"] == tuple[ComputedSpecies | None, ...]
    assert typing.get_type_hints(DocumentContext, globalns=namespace)["settings"] is Settings
    returns = {name: typing.get_type_hints(getattr(RuleContext, name).fget, globalns=namespace)["return"]
               for name in ("analysis", "exception")}
    returns.update({method.__name__: typing.get_type_hints(method, globalns=namespace)["return"]
                    for method in (RuleContext.computed_of, RuleContext.calculation)})
    assert returns == {"analysis": SpeciesAnalysis | None, "exception": KnownException | None,
                       "computed_of": ComputedSpecies | None, "calculation": Calculation | None}


def test_no_rule_reads_the_analysis_with_getattr():
    # An attribute some analyses lack is a declared optional field of the chemistry's dataclass
    # (SpeciesAnalysis.molecule), so mypy sees every read; getattr would hide a misspelt or removed one.
    modules = sorted((ROOT / "notelsp/review/rules").glob("*.py")) + [
        ROOT / "notelsp/review" / name for name in ("target.py", "describe.py", "predictions.py")]
    found = []
    for path in modules:
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Call) and isinstance(node.func, ast.Name) and node.func.id == "getattr":
                found.append(f"{path.relative_to(ROOT)}:{node.lineno}: {ast.unparse(node)}")
    assert not found, "read the declared field instead:\n" + "\n".join(found)
