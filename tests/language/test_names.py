"""The name pass: what it reports is what the model build reports, and a model it stops is
answered without sympy.

The reference is the model build itself (``build_model``), which runs the same checks
among its value passes: the pass may report fewer problems than the build (the checks
that need a value are the build's), never another one, never in another order, and it
never stops a model that the build would have let through to the analysis.
"""

from __future__ import annotations

import importlib.util
import random
import re
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import REPO
from plantlint.language.model import build_model
from plantlint.language.names import STOPPING, name_problems
from plantlint.language.syntax import parse_text

_SPEC = importlib.util.spec_from_file_location("mutate_models", REPO / "tools" / "mutate_models.py")
assert _SPEC is not None and _SPEC.loader is not None
mutate_models = importlib.util.module_from_spec(_SPEC)
_SPEC.loader.exec_module(mutate_models)


def _key(f):  # type: ignore[no-untyped-def]
    return (f.rule, f.message, f.span, f.anchor, f.hint, f.point)


def _compare(text: str) -> tuple[list, list] | None:  # type: ignore[type-arg]
    """(what the name pass reports, what the build reports), or None for a file that does
    not parse (neither runs)."""
    parsed = parse_text(text)
    if parsed.findings:
        return None
    return [_key(f) for f in name_problems(parsed)], [_key(f) for f in build_model(parsed, "m.plant")[1]]


def _ordered_part(part: list, whole: list) -> bool:  # type: ignore[type-arg]
    it = iter(whole)
    return all(any(x == y for y in it) for x in part)


def _typo(text: str, rng: random.Random) -> str:
    """One mention of a name misspelt (a letter dropped, doubled or changed)."""
    mentions = [m for m in re.finditer(r"\b[A-Za-z_][A-Za-z0-9_]*\b", text)
                if m.group() not in ("plant", "const", "param", "state", "input", "let", "rate", "output", "point",
                                     "expect", "waive", "at", "in", "tolerance")]
    if not mentions:
        return text
    m = rng.choice(mentions)
    word = m.group()
    i = rng.randrange(len(word))
    new = rng.choice([word[:i] + word[i + 1:], word[:i] + word[i] + word[i:], word[:i] + "q" + word[i + 1:]]) or "q"
    return text[:m.start()] + new + text[m.end():]


def _corpus(count: int, seed: int) -> list[str]:
    rng = random.Random(seed)
    sources = [p.read_text(encoding="utf-8") for p in mutate_models.sources()]
    out = list(sources)
    for _ in range(count):
        text = rng.choice(sources)
        text = _typo(text, rng) if rng.random() < 0.5 else mutate_models.mutate(text, rng, True, 3)
        out.append(text)
    return out


def test_the_name_pass_reports_a_part_of_what_the_build_reports_in_its_order() -> None:
    """Over the project's models and 300 mutants of them (misspelt names, deleted and
    repeated lines, cut lines): every problem the pass reports is one the build reports,
    in the build's order; the pass stops only models the build does not analyse."""
    stopped = agreed = 0
    for text in _corpus(300, seed=20261203):
        pair = _compare(text)
        if pair is None:
            continue
        names, built = pair
        assert _ordered_part(names, built), (text, names, built)
        if names:
            stopped += 1
            assert all(rule in STOPPING for rule, *_ in names)
            agreed += names == [f for f in built if f[0] in STOPPING]
    # the corpus exercises the pass: most mutants with a misspelt name stop there, and in
    # most of those the pass finds every stopping problem the build finds
    assert stopped >= 60, stopped
    assert agreed >= 0.9 * stopped, (agreed, stopped)


MODEL = """plant cart
const k = 2
param c = 0.5 in 0.1 .. 1
state x in -1 .. 1
state v in -1 .. 1
input u in -1 .. 1
let drag = c*v
rate x = v
rate v = -k*x - drag + u
output y = x
point rest: x = 0, v = 0, u = 0
expect relative_degree(y) = 2 at rest
waive unused-name "kept for the next revision"
"""

# (edit of MODEL, what the pass reports: rule and message)
CASES = [
    (("-k*x", "-kk*x"), [("unknown-name", "unknown name 'kk'")]),
    (("let drag = c*v", "let drag = c*w"), [("unknown-name", "unknown name 'w'")]),
    (("rate x = v\n", "rate z = v\n"), [("orphan-rate", "rate for 'z', which is not declared; rates belong to states"),
                                       ("missing-rate", "state 'x' has no rate")]),
    (("rate x = v\n", "rate x = v\nrate x = -v\n"), [("duplicate-name", "second rate for state 'x' (the first is on line 8)")]),
    (("const k = 2\n", "const k = 2\nconst k = 3\n"), [("duplicate-name", "'k' is already declared as a const on line 2")]),
    (("let drag = c*v", "let drag = c*drag"), [("unknown-name", "'drag' is used in its own definition; a definition "
                                                                 "cannot use itself")]),
    (("output y = x", "output y = x + y"), [("unknown-name", "'y' is an output and cannot be used here")]),
    (("point rest: x = 0", "point rest: x = v0"), [("unknown-name", "point 'rest' value uses unknown name 'v0'; point "
                                                                  "values must be constant")]),
    (("point rest: x = 0", "point rest: q = 0"), [("unknown-name", "point 'rest' sets 'q', which is not declared; points "
                                                                 "set states and inputs")]),
    (("in 0.1 .. 1", "in 0.1 .. cmax"), [("unknown-name", "unknown name 'cmax'")]),
    (('"kept for the next revision"', '""'), [("syntax", "a waiver needs a reason")]),
    (("expect relative_degree(y) = 2 at rest", "expect regular(y)"), []),  # a grammar error: the parser's
]


@pytest.mark.parametrize("edit, expected", CASES, ids=[c[0][1].strip()[:24] for c in CASES])
def test_each_name_problem_is_found_by_the_pass_as_the_build_words_it(edit: tuple[str, str], expected: list) -> None:  # type: ignore[type-arg]
    old, new = edit
    assert old in MODEL
    text = MODEL.replace(old, new, 1)
    pair = _compare(text)
    if pair is None:
        assert not expected
        return
    names, built = pair
    assert [(rule, message) for rule, message, *_ in names] == expected
    assert names == [f for f in built if f[0] in STOPPING]


def test_the_unedited_model_passes_names_and_the_build_agrees() -> None:
    names, built = _compare(MODEL)  # type: ignore[misc]
    assert names == []
    assert not [f for f in built if f[0] in STOPPING]


def test_a_value_decides_what_the_pass_leaves_to_the_build() -> None:
    """A point value that uses a definition is constant only if the definition's value is:
    the pass leaves it to the build (here the definition uses the state v), and says nothing."""
    text = MODEL.replace("point rest: x = 0", "point rest: x = drag")
    names, built = _compare(text)  # type: ignore[misc]
    assert names == []
    assert ("unknown-name", "point 'rest' value uses the definition 'drag', which depends on the state 'v'; point "
            "values must be constant") in [(r, m) for r, m, *_ in built]


def test_a_follow_on_problem_of_a_refused_value_is_left_to_the_build() -> None:
    """A constant whose value uses a later name has no value, and the build then also says
    that the rate's use of it 'cannot be used here'. That depends on the value; the pass
    reports the cause alone."""
    names, built = _compare(MODEL.replace("const k = 2\n", "const k = c\n"))  # type: ignore[misc]
    cause = ("unknown-name", "'c' is declared later; a const value may use only earlier constants and parameters")
    assert [(r, m) for r, m, *_ in names] == [cause]
    assert [(r, m) for r, m, *_ in built if r in STOPPING] == [cause, ("unknown-name", "'k' is a const and cannot be "
                                                                                          "used here")]


def test_a_power_that_only_a_value_shows_is_still_refused() -> None:
    """sqrt(4^1000)^1000 is a power of the number 2^1000 once sqrt(4^1000) is built: the
    parser cannot see that, the build refuses it as the parser refuses (2^1000)^1000."""
    from plantlint.run.pipeline import read_model

    seen = {}
    for base in ("(2^1000)", "sqrt(4^1000)"):
        text = MODEL.replace("const k = 2", f"const k = {base}^1000")
        _, findings = read_model(text.encode())
        seen[base] = [(f.rule, f.message, f.span.line, f.span.column) for f in findings if f.span is not None]
    assert seen["(2^1000)"] == seen["sqrt(4^1000)"] == [
        ("syntax", "this power of a number is too large to compute exactly", 2, 11)]


def test_an_exponent_that_only_a_value_shows_is_held_to_the_written_limit() -> None:
    """x^(l^2) with l = 1e-9 is x^(1/10^18) once l is replaced: beyond the limit on a
    written exponent (docs/language.md, Limits: |p|, |q| <= 1,000), refused the same way.
    Before, a point's value of it asked for a 10^18-th root and the check stopped at its
    budget. An exponent within the limit (l = 1/10, x^(1/100)) is kept."""
    from plantlint.run.pipeline import read_model

    tiny = MODEL.replace("const k = 2\n", "const k = 2\nconst l = 1e-9\n").replace("-k*x", "-k*(x + 2)^(l^2)")
    _, findings = read_model(tiny.encode())
    assert [(f.rule, f.span.line) for f in findings if f.span is not None] == [("syntax", 10)]
    assert "an exponent is beyond the supported range once the names in it are replaced" in findings[0].message
    fine = tiny.replace("const l = 1e-9", "const l = 1/10")
    model, findings = read_model(fine.encode())
    assert model is not None and not [f for f in findings if f.rule == "syntax"]


def test_an_integer_root_that_cannot_exist_is_not_searched_for() -> None:
    """14 has no integer 10^18-th root: 2^(10^18) > 14 (Python integers), and the search
    answers at once instead of forming 2^(10^18); real roots are still found."""
    from plantlint.kernel.taylor import _iroot_exact

    assert _iroot_exact(14, 10**18) is None
    assert _iroot_exact(1, 10**18) == 1 and _iroot_exact(0, 7) == 0
    assert _iroot_exact(3**40, 20) == 9 and _iroot_exact(3**40 + 1, 20) is None


def _imported(stderr: str) -> set[str]:
    return {line.rsplit("|", 1)[1].strip().split(".")[0] for line in stderr.splitlines()
            if line.startswith("import time:") and line.count("|") == 2}


def test_a_misspelt_name_is_reported_without_sympy(tmp_path: Path) -> None:
    """What a pre-commit hook meets most: a typo in a name. It is answered without
    sympy's import, in the parent and in the worker (``-X importtime`` is inherited)."""
    model = tmp_path / "typo.plant"
    model.write_text(MODEL.replace("-k*x", "-kk*x"))
    out = subprocess.run([sys.executable, "-X", "importtime", "-m", "plantlint", "check", "--no-cache",
                          "--format", "lines", str(model)], cwd=tmp_path, capture_output=True, text=True, timeout=300)
    assert out.returncode == 1, out.stdout
    assert "unknown name 'kk'" in out.stdout and "[unknown-name]" in out.stdout
    assert "sympy" not in _imported(out.stderr)
