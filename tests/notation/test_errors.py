"""Every notation-error code is a named constant of notelsp.notation.errors, and every one is a rule.

The source of the notation layer is read with ``ast``: a ``NotationError`` (or a builder's
``error(...)``) whose code is a string literal, or a name that is not one of the constants,
fails here with the file and line.
"""

from __future__ import annotations

import ast
from pathlib import Path

from notelsp.notation import errors
from notelsp.notation.errors import NOTATION_ERROR_CODES
from notelsp.review.rules import RULES

NOTATION = Path(errors.__file__).resolve().parent
CONSTANTS = {name for name, value in vars(errors).items() if isinstance(value, str) and value in NOTATION_ERROR_CODES}


def _code_arguments():
    """(file:line, first argument) of every NotationError(...) and .error(...) call in the notation layer."""
    for path in sorted(NOTATION.glob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if not isinstance(node, ast.Call) or not node.args:
                continue
            called = node.func
            name = called.id if isinstance(called, ast.Name) else called.attr if isinstance(called, ast.Attribute) else ""
            if name in ("NotationError", "error"):
                yield f"{path.name}:{node.lineno}", node.args[0]


def test_codes_are_named_constants_each_with_a_meaning():
    assert len(CONSTANTS) == len(NOTATION_ERROR_CODES)
    for code, meaning in NOTATION_ERROR_CODES.items():
        assert code == code.lower() and " " not in code and meaning.strip(), code


def test_the_notation_layer_names_codes_only_through_the_constants():
    seen = list(_code_arguments())
    assert seen, "no NotationError is made in the notation layer: the check would pass vacuously"
    for where, argument in seen:
        # ``code`` is a helper's own parameter, passed one of the constants by its callers
        assert isinstance(argument, ast.Name) and argument.id in CONSTANTS | {"code"}, (
            f"{where}: notation-error code written as {ast.unparse(argument)}; use notelsp.notation.errors"
        )


def test_every_code_the_notation_layer_can_produce_is_a_registered_rule():
    for code in NOTATION_ERROR_CODES:
        assert code in RULES, f"notation error {code!r} has no rule, so settings cannot name it"
        assert not RULES[code].whole_note and not RULES[code].claims
