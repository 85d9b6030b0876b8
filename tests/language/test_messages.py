"""Messages a model author reads: near-miss suggestions, where an incomplete
statement is reported, no internal parser names, long literals cut. Models are
invented."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from plantlint.core import limits
from plantlint.language.syntax import parse_text, parser
from plantlint.run.pipeline import read_model
from conftest import REPO

GOOD = """plant lag "first-order lag (invented)"
param k = 2 in 1 .. 3
state z in -1 .. 1
input u in -1 .. 1
let e = -k*z
rate z = e + (u + 1)*sin(z + 1)
output y = z
point rest: z = 0
expect relative_degree(y) = 1 at rest
waive unused-name "demo"
"""


def findings(text: str):  # type: ignore[no-untyped-def]
    return read_model(text.encode())[1]


def test_near_miss_name_gets_a_suggestion() -> None:
    (f,) = [f for f in findings(GOOD.replace("rate z = e", "rate z = Z + e")) if f.rule == "unknown-name"]
    assert f.message == "unknown name 'Z'" and f.hint == "did you mean `z` (the state)?"
    (g,) = [f for f in findings(GOOD.replace("rest: z = 0", "rest: z = 0, U = 0")) if f.rule == "unknown-name"]
    assert g.hint == "did you mean `u` (the input)?"
    (h,) = findings(GOOD.replace("sin(z + 1)", "sine(z + 1)"))
    assert h.hint == "did you mean `sin`?"
    (c,) = findings(GOOD.replace("expect relative_degree(y) = 1 at rest", "expect regulr"))
    assert c.rule == "unknown-reference" and c.hint == "did you mean `regular`?"
    (w,) = findings(GOOD.replace("unused-name", "unused-nam"))
    assert w.hint == "did you mean `unused-name`?"
    # nothing close: no guess
    (far,) = [f for f in findings(GOOD.replace("rate z = e", "rate z = qqq + e")) if f.rule == "unknown-name"]
    assert far.hint is None


def test_misspelt_keyword_gets_a_suggestion() -> None:
    (f,) = findings(GOOD.replace("state z", "stat z"))
    assert f.rule == "syntax" and (f.span.line, f.span.column) == (3, 1)
    assert "unknown statement 'stat'" in f.message and f.hint == "did you mean `state`?"
    (g,) = findings(GOOD.replace("rate z", "rat z"))  # after a complete statement, at a line start
    assert "unknown statement 'rat'" in g.message and g.hint == "did you mean `rate`?"


def test_incomplete_expression_is_reported_where_it_ends() -> None:
    text = "plant p\nstate x in -1 .. 1\nstate v in -1 .. 1\ninput u\nrate x = v +\nrate v = u\noutput y = x\n"
    (f,) = findings(text)
    assert (f.span.line, f.span.column) == (5, 13)  # just after the '+', not at the next line
    assert "stops after '+'" in f.message and "`rate`" in f.message
    assert f.hint == "expected '(', '+', '-', a name, a number"
    # the same with a comment and blank lines in between, and a missing ')'
    (g,) = findings(text.replace("v +\n", "v *   # damping\n\n"))
    assert (g.span.line, g.span.column) == (5, 13)
    (h,) = findings("plant p\nstate x in -1 .. 1\ninput u\nrate x = (x + u\noutput y = x\n")
    assert (h.span.line, h.span.column) == (4, 16) and "')'" in (h.hint or "")
    # at the end of the file: after the last token, not on a trailing comment line
    (e,) = findings("plant p\nstate x in -1 .. 1\ninput u\nrate x = x +\n# trailing\n\n")
    assert (e.span.line, e.span.column) == (4, 13) and "ends in the middle" in e.message


INTERNAL = re.compile(r"\$END|\$end|__ANON|\b(" + "|".join(t.name for t in parser().terminals) + r")\b")


def _cuts(text: str) -> list[str]:
    """The model cut after every token, and with every token left out (broken files)."""
    spans = [m.span() for m in re.finditer(r'"[^"]*"|\[[^\]]*\]|[A-Za-z_][A-Za-z0-9_-]*|\d+(?:\.\d+)?|\.\.|\S', text)]
    return [text[:end] for _, end in spans] + [text[:start] + text[end:] for start, end in spans]


@pytest.mark.parametrize("half", [0, 1])
def test_no_internal_parser_names_reach_users(half: int) -> None:
    cuts = _cuts(GOOD)
    cuts = cuts[half::2]
    seen = 0
    for text in cuts:
        for f in parse_text(text).findings:
            seen += 1
            shown = f"{f.message} {f.hint or ''}"
            assert not INTERNAL.search(shown), (text, shown)
    assert seen > 50  # the cuts really are broken files


def test_documented_limits_are_the_codes_limits() -> None:
    doc = (REPO / "docs" / "language.md").read_text(encoding="utf-8")
    table = doc.split("## Limits for hostile input", 1)[1]
    rows = {line.split("|")[1].strip(): line.split("|", 2)[2] for line in table.splitlines() if line.startswith("| ")}

    def row(start: str) -> str:
        return next(v for k, v in rows.items() if k.startswith(start))

    assert f"{limits.MAX_BYTES:,} bytes" in row("file size")
    assert f"{limits.MAX_TOKENS:,}" in row("tokens per file")
    assert f"{limits.MAX_STATEMENTS:,}" in row("statements")
    assert f"{limits.MAX_DEPTH}" in row("parentheses")
    assert f"{limits.MAX_NAME}" in row("characters in a name")
    assert f"{limits.MAX_LITERAL_DIGITS}" in row("digits") and f"±{limits.MAX_LITERAL_EXP10}" in row("digits")
    assert f"{limits.MAX_EXPONENT:,}" in row("a number's exponent")
    assert f"{limits.MAX_POWER_BITS:,} bits" in row("a power of a number")
    unit = row("a unit text")
    assert f"{limits.MAX_UNIT_TEXT} characters" in unit and f"unit name {limits.MAX_UNIT_NAME} characters" in unit
    assert f"nested {limits.MAX_UNIT_DEPTH} deep" in unit and f"at most {limits.MAX_UNIT_EXPONENT} in size" in unit
    assert f"denominators up to {limits.MAX_UNIT_EXPONENT}" in unit
    # and both counting limits really stop a file, each with its own message
    many_tokens = "plant p\n" + "let a = " + " + ".join(["1"] * (limits.MAX_TOKENS // 2 + 1)) + "\n"
    (f,) = parse_text(many_tokens).findings
    assert f"more than {limits.MAX_TOKENS} tokens" in f.message
    many_statements = "plant p\n" + "".join(f"state s{i}\n" for i in range(limits.MAX_STATEMENTS))
    (g,) = parse_text(many_statements).findings
    assert f"plant models are limited to {limits.MAX_STATEMENTS}" in g.message


def test_envelope_findings_point_at_the_state_ranges_in_every_model() -> None:
    from plantlint.run.config import Config
    from plantlint.run.pipeline import analyse_bytes

    # the actuator gain 1 + x changes sign at x = -1 inside the envelope (invented)
    base = "plant flipper\nstate x in -2 .. 2\ninput u\nrate x = -x + (1 + x)*u\noutput y = x\n"
    for text in (base, base + "expect regular\n"):
        (f,) = [f for f in analyse_bytes(text.encode(), Config()).findings if f.rule == "envelope-singular"]
        assert (f.span.line, f.span.column) == (2, 9), text  # `in -2 .. 2`, not the plant or the claim


def test_huge_literal_is_cut_in_messages() -> None:
    (f,) = findings("plant p\nstate x in -1 .. 1\ninput u\nrate x = 2^1000^1000 + u\noutput y = x\n")
    assert f.rule == "syntax" and len(f.message) < 120
    assert "(3001 digits)" in f.message  # 1000^1000 = 10^3000 has 3,001 digits


def test_huge_exact_values_are_cut_in_model_messages() -> None:
    from plantlint.run.config import Config
    from plantlint.run.pipeline import analyse_bytes

    text = (b"plant p\nstate x in -1 .. 1\ninput u\nrate x = -x + k*u\noutput y = x\n"
            b"param k = 3^600 in 1 .. 2\npoint big: x = 2^1000\n")
    found = analyse_bytes(text, Config()).findings
    by_rule = {f.rule: f.message for f in found}
    # 2^1000 = 1.07151e301 has 302 digits; 3^600 = 1.87393e286 has 287 (Python's own integers)
    assert f"~1.07151e301 (an integer of {len(str(2**1000))} digits)" in by_rule["point-outside-envelope"]
    assert f"~1.87393e286 (an integer of {len(str(3**600))} digits)" in by_rule["bad-range"]
    assert all(len(f.message) < 200 for f in found)


def test_input_limits_are_defined_once_in_a_light_module() -> None:
    """Each limit is assigned only in core/limits.py, and importing it loads no sympy
    (the runner reads MAX_BYTES from there before any model is parsed)."""
    import re
    import subprocess
    import sys

    names = [n for n in vars(limits) if n.startswith("MAX_")]
    assigned = re.compile(r"^\s*(" + "|".join(names) + r")\s*(:[^=]*)?=", re.M)
    package = Path(limits.__file__).resolve().parent.parent
    elsewhere = [str(p.relative_to(package)) for p in package.rglob("*.py")
                 if p.name != "limits.py" and assigned.search(p.read_text(encoding="utf-8"))]
    assert elsewhere == []
    code = "import sys, plantlint.core.limits; print('sympy' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "False"


def test_expression_mentions_and_problems_come_last_first() -> None:
    """The builder's documented order (language/syntax.py, _ExpressionBuilder): every
    unknown function of an expression is named, in source order; names and calls are
    listed last mention first. Invented models."""
    found = parse_text("plant p\nstate x\nrate x = foo(x) + bar(x) + sin(baz(x))\n").findings
    assert [(f.message, f.span.column) for f in found] == [
        ("unknown function 'foo'", 10), ("unknown function 'bar'", 19), ("unknown function 'baz'", 32)]
    expr = parse_text("plant p\nstate x\nrate x = a*b + sin(cos(c))\n").statements[-1].expr
    assert expr is not None
    assert [n.name for n in expr.names] == ["c", "b", "a"]
    assert [c.function for c in expr.calls] == ["cos", "sin"]


@pytest.mark.parametrize("line, column, message", [
    ("param k = 80 [N*m/rad] in 60 .. 100", 24,
     "the range of a parameter comes before its unit: `param NAME = VALUE in LO .. HI [UNIT]`"),
    ("state z in 0 .. 1 [m]", 19, "the unit of a state comes before its range: `state NAME [UNIT] in LO .. HI`"),
    ("input w in -1 .. 1 [N]", 20, "the unit of an input comes before its range: `input NAME [UNIT] in LO .. HI`"),
])
def test_range_and_unit_in_the_wrong_order_say_the_right_order(line: str, column: int, message: str) -> None:
    """The order is the language reference's (docs/language.md, statements table)."""
    (f,) = parse_text(f"plant p\n{line}\nstate x in -1 .. 1\ninput u\nrate x = u\n").findings
    assert (f.rule, f.message, f.span.line, f.span.column) == ("syntax", message, 2, column)


def test_numbers_too_long_to_write_out_are_shortened_inside_expressions() -> None:
    # A singular denominator with a literal 1e-300 used to be printed with its 301 digits.
    # Reference: Python's decimal module and fractions (exactness of the decimal shown).
    from decimal import Decimal
    from fractions import Fraction

    import sympy as sp

    from plantlint.language.printer import show_expr

    w = sp.Symbol("w1")
    assert show_expr(w - sp.Rational(1, 10**300)) == "-1e-300 + w1"  # exact: 1e-300 is that number
    assert Fraction(Decimal("1e-300")) == Fraction(1, 10**300)
    shown = show_expr(w * sp.Integer(3) ** 200 + 1)  # not a short decimal: rounded, marked ~
    assert shown == "1 + ~2.65614e+95*w1"
    assert abs(Fraction(Decimal("2.65614e+95")) / Fraction(3**200) - 1) < Fraction(1, 10**5)
    assert show_expr(sp.Rational(2, 7) * w + 60000000000) == "60000000000 + 2*w1/7"  # short: exact as before
    from plantlint.run.pipeline import analyse_bytes

    text = GOOD.replace("rate z = e + (u + 1)*sin(z + 1)", "rate z = e + u/(z - 1e-300)")
    (singular,) = [f for f in analyse_bytes(text.encode()).findings if f.rule == "singular-model"]
    assert "1e-300" in singular.message and "000000000000000" not in singular.message


@pytest.mark.parametrize("rate, affine", [
    ("x*u + u", True),                 # affine by its form (no derivative built)
    ("(u + x)^2 - u^2 - x^2", True),   # degree 2 by its form, affine once differentiated
    ("u^2 - x", False),
    ("x/(1 + u)", False),
    ("sin(u)", False),
])
def test_input_affinity_by_form_and_by_second_derivative(rate: str, affine: bool) -> None:
    """A rate is affine in u when d2F/du2 vanishes identically (the definition of
    dx/dt = f(x) + g(x) u, common practice). The form-based bound may only skip the
    derivative when it proves affinity; a rate of degree 2 by its form that cancels
    must still pass."""
    text = f"plant p\nstate x in -1 .. 1\ninput u in -1 .. 1\nrate x = {rate}\noutput y = x\n"
    rules = [f.rule for f in findings(text)]
    assert ("not-input-affine" not in rules) == affine, rules


@pytest.mark.parametrize("rate, affine", [
    ("sat(6*u, -3, 3) - x", True),     # piecewise affine in u: its kinks are the non-smooth finding
    ("abs(u) - x", True),
    ("abs(u)*x", True),
    ("u^2 + abs(u) - x", False),       # nonlinear between the kinks as well
])
def test_input_affinity_between_kinks(rate: str, affine: bool) -> None:
    """A rate whose second derivative in u is DiracDelta terms only is affine between its
    kinks; the kinks are reported as non-smooth, not as a non-affine input. Reference:
    numpy's second differences of the rate in u, away from the kinks (common practice)."""
    import numpy as np

    text = f"plant p\nstate x in -1 .. 1\ninput u in -1 .. 1\nrate x = {rate}\noutput y = x\n"
    rules = [f.rule for f in findings(text)]
    assert "non-smooth" in rules
    assert ("not-input-affine" not in rules) == affine, rules
    functions = {
        "sat(6*u, -3, 3) - x": lambda u: np.clip(6 * u, -3, 3), "abs(u) - x": np.abs,
        "u^2 + abs(u) - x": lambda u: u**2 + np.abs(u), "abs(u)*x": lambda u: 0.3 * np.abs(u),  # at x = 0.3
    }
    u = np.array([-0.9, -0.7, -0.3, 0.2, 0.35, 0.8])  # away from the kinks at 0 and +-0.5 (sat)
    h = 1e-3
    second = (functions[rate](u + h) - 2 * functions[rate](u) + functions[rate](u - h)) / h**2
    assert np.allclose(second, 0, atol=1e-6) == affine


def test_a_definition_that_uses_itself_says_so() -> None:
    (f,) = [f for f in findings(GOOD.replace("let e = -k*z", "let e = -k*z + e")) if f.rule == "unknown-name"]
    assert f.message == "'e' is used in its own definition; a definition cannot use itself"
    assert (f.span.line, f.span.column) == (5, 16)


def test_a_repeated_waiver_is_reported_where_it_is_repeated() -> None:
    text = GOOD + 'waive unused-name "demo, again"\n'
    (f,) = [f for f in findings(text) if f.rule == "unused-waiver"]
    assert f.message == "the waiver of 'unused-name' repeats the one on line 10: it silences nothing that one does not"
    assert f.span.line == 11
    assert len(read_model(text.encode())[0].waivers) == 1


def test_refusing_a_waiver_of_the_waiver_rules_gives_their_own_reason() -> None:
    text = GOOD + 'waive unused-waiver "quiet"\nwaive syntax "quiet"\n'
    refused = {f.message.split("'")[1]: f.message for f in findings(text) if f.rule == "waiver-refused"}
    assert refused["unused-waiver"].endswith("cannot be waived: they judge the waivers themselves")
    assert refused["syntax"].endswith("they mean the file was not read as a model, so nothing about it was checked")


def test_an_empty_state_range_is_not_called_missing() -> None:
    from plantlint.run.pipeline import analyse_bytes

    raw = analyse_bytes(GOOD.replace("state z in -1 .. 1", "state z in 1 .. -1").encode())
    (f,) = [f for f in raw.findings if f.rule == "envelope-unproven"]
    assert "state z has an unusable range (see bad-range)" in f.message and "no range" not in f.message


def test_atan2_arguments_are_plural() -> None:
    from plantlint.run.pipeline import analyse_bytes

    text = "plant a\nstate x in -1 .. 1\nstate v in -1 .. 1\ninput u in -1 .. 1\nrate x = v\nrate v = u + atan2(x, v)\noutput y = x\n"
    (f,) = [f for f in analyse_bytes(text.encode()).findings if f.rule == "singular-model"]
    assert f.message.startswith("the atan2 arguments x, v (both zero) in rate v vanish together inside the envelope")


def test_a_model_without_states_is_not_a_plant() -> None:
    """An empty plant used to pass, and a stateless one gave "k = 0..-1" and "rank 0 < 0"."""
    (f,) = [f for f in findings("plant empty\n") if f.severity.value == "error"]
    assert f.rule == "syntax" and f.message == "the model declares no states: there is no dynamics to analyse"
    stateless = findings("plant p\ninput u\noutput y = 1\nexpect relative_degree(y) = 1\n")
    assert [f.rule for f in stateless if f.severity.value == "error"] == ["syntax"]


def test_a_function_of_a_number_outside_its_domain_is_named_where_it_is_written() -> None:
    import math

    # reference, Python's math library: none of these has a real value
    for bad in (lambda: math.log(0), lambda: math.sqrt(-1), lambda: math.acos(2)):
        try:
            bad()
        except ValueError:
            continue
        raise AssertionError("expected a domain error")
    text = "plant p\nstate x in -1 .. 1\ninput u\nrate x = u + log(0) + sqrt(-1) + acos(2)\noutput y = x\n"
    found = [(f.span.column, f.message) for f in findings(text) if f.rule == "singular-model"]
    assert found == [(14, "log(0) in rate x has no real value, so rate x is undefined for every state"),
                     (23, "sqrt(-1) in rate x has no real value, so rate x is undefined for every state"),
                     (34, "acos(2) in rate x has no real value, so rate x is undefined for every state")]


@pytest.mark.parametrize("tail", ["", "\nexpect regular", " at rest", " at rest\nexpect regular", " because"])
def test_a_waiver_without_its_reason_says_so(tail: str) -> None:
    """`waive RULE` with nothing (or a word) where the quoted reason belongs: the message
    names what is missing, wherever the statement stops, rather than 'file ends in the
    middle of a statement'."""
    text = ("plant w\nstate x in -1 .. 1\ninput u\nrate x = -x + u\noutput y = x\npoint rest: x = 0, u = 0\n"
            f"waive envelope-singular{tail}\n")
    (problem,) = parse_text(text).findings
    assert problem.message == "a waiver needs a reason, in double quotes after the rule id"
    assert problem.span is not None and problem.span.line == 7
    written = "waive envelope-singular at rest" if tail.startswith(" at rest") else "waive envelope-singular"
    assert problem.hint == f'{written} "why it is accepted"'


def test_a_negative_multiple_of_a_sum_is_written_with_the_sign_inside() -> None:
    """-(-176 + 225*cos(q)^2)/100 reads (176 - 225*cos(q)^2)/100: the printer takes the sign
    into the sum when that writes no more minus signs, and the value stays the same (sympy,
    the reference, simplifies the difference to 0)."""
    import sympy as sp

    from plantlint.language.printer import _sign_inside, show_expr

    q, x = sp.symbols("q x", real=True)
    cases = {
        sp.Mul(sp.Rational(-1, 100), sp.Add(-176, 225 * sp.cos(q) ** 2), evaluate=False): "(176 - 225*cos(q)^2)/100",
        sp.Mul(-2, x - 1, evaluate=False): "2*(1 - x)",
        sp.Mul(-1, x + 3, evaluate=False): "-(3 + x)",  # flipping would write two minus signs
    }
    for expr, text in cases.items():
        assert show_expr(expr) == text
        assert sp.simplify(_sign_inside(expr) - expr) == 0
