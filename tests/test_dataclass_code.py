"""The kept code of the dataclass methods: the same code as compiling, read only when trusted."""

from __future__ import annotations

import dataclasses
import marshal
import os
import subprocess
import sys
import types
from importlib.util import MAGIC_NUMBER

import pytest

from notelsp import dataclass_code


def _run(code: str, cache: str, **extra: str) -> str:
    env = {**os.environ, "XDG_CACHE_HOME": cache, **extra}
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=300)
    assert done.returncode == 0, done.stderr
    return done.stdout.strip()


PROBE = ("import dataclasses, notelsp.cli, notelsp.review.document\n"
         "kept = dataclasses.exec\n"
         "print(type(kept).__name__, kept.compiled, len(kept.used))\n")


def test_a_second_start_compiles_none_of_notelsps_dataclass_methods(tmp_path):
    first = _run(PROBE, str(tmp_path)).split()
    second = _run(PROBE, str(tmp_path)).split()
    assert first[0] == second[0] == "KeptCode"
    assert int(first[1]) == int(first[2]) > 150  # every method compiled once, on first use
    assert (int(second[1]), int(second[2])) == (0, int(first[2]))  # then all read back


def test_every_kept_code_object_is_what_compiling_its_text_gives(tmp_path):
    _run(PROBE, str(tmp_path))
    kept = dataclass_code.read_kept(tmp_path / "notelsp" / dataclass_code.FILE_NAME)
    assert len(kept) > 150
    for text, code in kept.items():
        assert code == compile(text, "<string>", "exec"), text  # code objects compare by their contents


def test_switched_off_python_compiles_as_usual(tmp_path):
    out = _run("import dataclasses, notelsp.cli; print(hasattr(dataclasses, 'exec'))", str(tmp_path),
               NOTELSP_DATACLASS_CODE="off")
    assert out == "False"  # the builtin exec, as in any other program
    assert not (tmp_path / "notelsp" / dataclass_code.FILE_NAME).exists()


def _module(name: str) -> dict:
    module = types.ModuleType(name)
    sys.modules[name] = module
    return module.__dict__


@pytest.mark.parametrize("module_name", ["notelsp.probe_kept", "elsewhere.probe"])
def test_a_class_made_through_the_kept_code_behaves_as_one_made_without(tmp_path, monkeypatch, module_name):
    kept = dataclass_code.KeptCode(tmp_path / "code.marshal")
    namespace = _module(module_name)

    def make() -> type:
        exec("from dataclasses import dataclass\n"  # noqa: S102 - a class defined in the probe module
             "@dataclass(frozen=True, slots=True)\n"
             "class Probe:\n"
             "    \"\"\"x\"\"\"\n"
             "    a: int\n"
             "    b: tuple = ()\n", namespace)
        return namespace["Probe"]

    try:
        plain = make()
        monkeypatch.setattr(dataclasses, "exec", kept, raising=False)
        through = make()
    finally:
        sys.modules.pop(module_name, None)
    for cls in (plain, through):
        value = cls(1, (2,))
        assert (value.a, value.b, repr(value), value == cls(1, (2,)), hash(value) == hash(cls(1, (2,)))) == (
            1, (2,), "Probe(a=1, b=(2,))", True, True)
        with pytest.raises(dataclasses.FrozenInstanceError):
            value.a = 3  # type: ignore[misc]
    own = module_name.startswith("notelsp.")
    assert bool(kept.used) is own and kept.compiled == len(kept.used)  # only notelsp's own sources are kept
    kept.write()
    assert (tmp_path / "code.marshal").exists() is own


def _kept_file(tmp_path, data: bytes, mode: int = 0o600):
    path = tmp_path / "code.marshal"
    path.write_bytes(data)
    path.chmod(mode)
    return path


def test_a_damaged_foreign_or_other_interpreters_file_is_not_read(tmp_path):
    good = {"def f(): pass": compile("def f(): pass", "<string>", "exec")}
    assert dataclass_code.read_kept(_kept_file(tmp_path, MAGIC_NUMBER + marshal.dumps(good))) == good
    assert dataclass_code.read_kept(_kept_file(tmp_path, b"\0\0\r\n" + marshal.dumps(good))) == {}
    assert dataclass_code.read_kept(_kept_file(tmp_path, MAGIC_NUMBER + b"\xff garbage")) == {}
    assert dataclass_code.read_kept(_kept_file(tmp_path, MAGIC_NUMBER + marshal.dumps({"x": "not code"}))) == {}
    assert dataclass_code.read_kept(_kept_file(tmp_path, MAGIC_NUMBER + marshal.dumps([1, 2]))) == {}
    if hasattr(os, "getuid"):  # a file others may write is never run
        assert dataclass_code.read_kept(_kept_file(tmp_path, MAGIC_NUMBER + marshal.dumps(good), 0o620)) == {}
    assert dataclass_code.read_kept(tmp_path / "absent") == {}


def test_past_the_cap_only_what_the_process_used_is_written(tmp_path, monkeypatch):
    stale = {f"x = {n}": compile(f"x = {n}", "<string>", "exec") for n in range(dataclass_code.MAX_KEPT)}
    path = _kept_file(tmp_path, MAGIC_NUMBER + marshal.dumps(stale))
    kept = dataclass_code.KeptCode(path)
    assert kept.kept == stale
    kept("y = 1", {"__name__": "notelsp.probe"}, {})  # one new source: over the cap with the stale ones
    kept.write()
    assert list(dataclass_code.read_kept(path)) == ["y = 1"]
    kept = dataclass_code.KeptCode(path)
    kept("x = 2", {"__name__": "notelsp.probe"}, {})
    kept.write()
    assert sorted(dataclass_code.read_kept(path)) == ["x = 2", "y = 1"]  # under the cap: both kept
