"""Model text is data: nothing in it is ever run as program code.

(a) Payloads that would create a marker file if any of them were executed, placed
    in every position a model offers (names, docs, units, expressions, points,
    waivers, comments), go through the pipeline and the command line; the marker
    must not exist afterwards.
(b) A static check of ``checker/`` with Python's own ``ast`` module: no call of
    eval, exec, compile (the builtin), sympify, parse_expr, sympy's ``S(...)`` or
    __import__, so comments and docstrings that mention them do not count.
"""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes
from conftest import REPO

CHECKER = REPO / "checker"


def payloads(marker: Path) -> list[str]:
    """Ways of asking Python (or sympy's string parser) to create ``marker``."""
    touch = f"__import__('os').system('touch {marker}')"
    return [
        touch,
        f"exec(\"open('{marker}', 'w').close()\")",
        f"eval(\"{touch}\")",
        f"(lambda: {touch})()",
        f"().__class__.__base__.__subclasses__()  # {touch}",
        f"f'{{{touch}}}'",
        f"`{touch}`",
        f"Symbol('x') + sympify(\"{touch}\")",
        f"S(\"{touch}\")",
        f"parse_expr(\"{touch}\")",
        f"compile(\"{touch}\", 'x', 'exec')",
        f"$(touch {marker})",
    ]


def models(marker: Path) -> list[str]:
    """Each payload in each position of an otherwise ordinary model (invented numbers)."""
    out = []
    for p in payloads(marker):
        quoted = p.replace('"', "'")
        unit = p.replace("[", "(").replace("]", ")")
        out += [
            f'plant demo "{quoted}"\nstate x in -1 .. 1\ninput u\nrate x = {p}\noutput y = x\n',
            f"plant demo\nstate x [{unit}] in -1 .. 1 \"{quoted}\"\ninput u [{unit}]\nrate x = -x + u\n"
            f"output y [{unit}] = x \"{quoted}\"\n",
            f"plant {p}\nstate x\nrate x = 0\n",
            f"plant demo\nconst c = {p}\nparam k = {p} in {p} .. 1\nstate {p} in -1 .. 1\nrate x = -x\n",
            f"plant demo\nstate x in -1 .. 1\ninput u\nlet z = {p}\nrate x = z + u\noutput y = {p}\n",
            f"plant demo\nstate x in -1 .. 1\ninput u\nrate x = -x + u\noutput y = x\npoint rest: x = {p}\n"
            f"expect {p}\nexpect relative_degree(y) = {p}\nwaive syntax \"{quoted}\"\n",
            f"plant demo\n# {p}\nstate x in -1 .. 1\ninput u\nrate x = -x + u  # {p}\noutput y = x\n",
        ]
    return out


def test_payloads_through_the_pipeline(tmp_path: Path) -> None:
    marker = tmp_path / "executed"
    for text in models(marker):
        raw = analyse_bytes(text.encode("utf-8"), Config())
        assert raw.to_data() is not None
        assert not marker.exists(), text
    # the payloads are not silently accepted as expressions either
    raw = analyse_bytes(models(marker)[0].encode("utf-8"), Config())
    assert any(f.rule == "syntax" for f in raw.findings)


def test_payloads_through_the_command_line(tmp_path: Path) -> None:
    """Every position with two payloads (the in-process test covers all payloads);
    each worker process pays for parser start-up, so the file count is kept small."""
    marker = tmp_path / "executed"
    chosen = [p for i, p in enumerate(payloads(marker)) if i in (0, 7)]
    texts = [t for t in models(marker) if any(p in t or p.replace('"', "'") in t for p in chosen)]
    files = []
    for i, text in enumerate(texts):
        path = tmp_path / f"m{i:03d}.plant"
        path.write_text(text, encoding="utf-8")
        files.append(str(path))
    assert len(files) >= 10
    for fmt, subset in (("json", files), ("sarif", files[:4]), ("text", files[:4])):
        proc = subprocess.run([sys.executable, "-m", "plantlint", "check", "--no-cache", "--jobs", "2", "--timeout", "30",
                               "--format", fmt, *subset], cwd=tmp_path, capture_output=True, text=True, timeout=600)
        assert proc.returncode in (0, 1), proc.stderr
        assert "Traceback" not in proc.stderr
        assert not marker.exists()
    proc = subprocess.run([sys.executable, "-m", "plantlint", "explain", files[0]], cwd=tmp_path,
                          capture_output=True, text=True, timeout=300)
    assert "Traceback" not in proc.stderr
    assert not marker.exists()


def test_the_marker_would_be_created_by_running_a_payload(tmp_path: Path) -> None:
    """Control: the payload does work when Python runs it (so the tests above can fail)."""
    marker = tmp_path / "executed"
    subprocess.run([sys.executable, "-c", payloads(marker)[0]], check=True, timeout=60)
    assert marker.exists()


# -- static check ------------------------------------------------------------------------

FORBIDDEN_BUILTINS = {"eval", "exec", "compile", "__import__", "sympify", "parse_expr"}
SYMPY_MODULE_NAMES = {"sp", "sympy"}


def forbidden_calls(source: str, filename: str) -> list[str]:
    """Calls of code-running functions in ``source`` (by the syntax tree, not by text)."""
    tree = ast.parse(source, filename)
    imported_s = {alias.asname or alias.name for node in ast.walk(tree) if isinstance(node, ast.ImportFrom)
                  and (node.module or "").startswith("sympy") for alias in node.names
                  if alias.name in ("S", "sympify", "parse_expr")}
    found = []
    for node in ast.walk(tree):
        if not isinstance(node, ast.Call):
            continue
        fn = node.func
        where = f"{filename}:{node.lineno}"
        if isinstance(fn, ast.Name) and (fn.id in FORBIDDEN_BUILTINS or fn.id in imported_s):
            found.append(f"{where} {fn.id}(")
        elif isinstance(fn, ast.Attribute):
            owner = fn.value.id if isinstance(fn.value, ast.Name) else None
            if fn.attr in ("sympify", "parse_expr", "eval", "exec", "__import__"):
                found.append(f"{where} .{fn.attr}(")
            elif fn.attr == "S" and owner in SYMPY_MODULE_NAMES:
                found.append(f"{where} {owner}.S(")
            elif fn.attr == "compile" and owner in ("builtins",):
                found.append(f"{where} builtins.compile(")
    for node in ast.walk(tree):
        if isinstance(node, ast.Name) and node.id == "__import__":
            found.append(f"{filename}:{node.lineno} __import__")
    return found


def test_checker_source_has_no_code_running_calls() -> None:
    sources = sorted(CHECKER.rglob("*.py"))
    assert len(sources) > 10
    problems = []
    for path in sources:
        problems += forbidden_calls(path.read_text(encoding="utf-8"), str(path.relative_to(REPO)))
    assert problems == []


@pytest.mark.parametrize("snippet, hits", [
    ("eval('1')", 1),
    ("x = exec", 0),  # a name, not a call
    ("import sympy as sp\nsp.sympify('x')", 1),
    ("import sympy\nsympy.S('x')", 1),
    ("from sympy import S\nS('x')", 1),
    ("from sympy import sympify as read\nread('x')", 1),
    ("import re\nre.compile('a')", 0),  # allowed
    ("compile('1', 'f', 'eval')", 1),
    ("__import__('os')", 2),  # the call and the name
    ("from sympy.parsing.sympy_parser import parse_expr\nparse_expr('x')", 1),
    ("'''eval(1) in a docstring'''\n# exec(2) in a comment", 0),
    ("sp.S.Zero", 0),  # sympy's singleton registry, not a call
])
def test_static_check_finds_what_it_should(snippet: str, hits: int) -> None:
    assert len(forbidden_calls(snippet, "snippet.py")) == hits
