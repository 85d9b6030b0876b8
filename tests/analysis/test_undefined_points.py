"""Operating points where a derivative of the model does not exist.

d/dw sqrt(w) = 1/(2 sqrt(w)) has no finite value at w = 0 (any calculus text; sympy,
differentiating on its own, gives complex infinity there, which the first test holds).
At such a point the linearisation, the zero dynamics and the brackets of the
distributions are undefined: plantlint must say so, never crash on the infinity, never
report a rank deficit or a direction computed from it, and never call a claim that
rests on it decided. The reproducer is the contract sample with the pendulum's angle
rate made a square root, found by mutating models at random (the crash it caused was
"cannot create mpf from zoo" in the zero dynamics).
"""

from __future__ import annotations

import sympy as sp

from plantlint.run.pipeline import analyse_bytes
from conftest import FIXTURES

SAMPLE = (FIXTURES / "models" / "contract_sample.plant").read_text(encoding="utf-8")
ROOT = SAMPLE.replace("rate th = w\n", "rate th = w^0.5\n") + (
    "expect minimum_phase at rest\nexpect state_linearizable at rest\n")


def test_the_derivative_of_the_square_root_does_not_exist_at_zero() -> None:
    w = sp.Symbol("w")
    assert sp.diff(sp.sqrt(w), w).subs(w, 0) is sp.zoo


def test_undefined_derivatives_are_reported_as_such_at_the_point() -> None:
    assert "rate th = w^0.5" in ROOT
    raw = analyse_bytes(ROOT.encode())
    assert raw.stop is None  # completed: no internal error
    rest = raw.analysis["points"]["rest"]
    assert rest["linearisation"]["status"] == "undefined"
    zd = rest["zero_dynamics"]
    assert zd is None or zd["verdict"] == "undefined"
    rules = [f.rule for f in raw.findings]
    # no rank deficit, and no direction with an infinity in it, drawn from undefined brackets
    assert "not-controllable" not in rules and "distribution-rank-drop" not in rules
    # nor in the JSON: no rank is given there, only why (before: controllability rank 0 and
    # every distribution listed as dropping rank, lower bounds read as ranks)
    fields = rest
    assert fields["controllability_rank"] is None and fields["constant_rank"] is None
    assert fields["rank_drops"] == [] and fields["state_linearizable"] is False
    assert "does not exist at the point" in fields["undefined"]
    assert not any("zoo" in f.message for f in raw.findings)
    claims = {f.message.split("`")[1]: f for f in raw.findings if f.rule == "expectation-failed"}
    linearizable = claims["expect state_linearizable at rest"]
    assert linearizable.undecided and "undefined" in linearizable.message
    minimum = claims["expect minimum_phase at rest"]
    assert "the zero dynamics are not defined: a derivative of the rates or outputs is undefined" in minimum.message


def test_an_entry_that_is_infinite_at_the_point_is_called_undefined_not_zero() -> None:
    # y = x, x' = sqrt(w), w' = -w + F: L_g L_f y = 1/(2 sqrt(w)), infinite at w = 0
    text = ("plant root_drive\nstate x in -1 .. 1\nstate w in 0 .. 4\ninput F in -1 .. 1\n"
            "rate x = w^0.5\nrate w = -w + F\noutput y = x\npoint rest: x = 0, w = 0\n")
    raw = analyse_bytes(text.encode())
    (ill,) = [f for f in raw.findings if f.rule == "relative-degree-ill-defined"]
    assert "1/(2*sqrt(w)) is undefined there" in ill.message and "is zero there" not in ill.message


def test_values_beyond_double_precision_are_reported_not_crashed_on() -> None:
    """The demo boost converter with a battery of 1e300 V (a mutation that crashed the
    linearisation with OverflowError): its poles and zeros, decided exactly, exceed the
    largest double (IEEE 754: sys.float_info.max, about 1.8e308). The linearisation says
    so; the zero dynamics keep their exact verdict and show the eigenvalue as beyond
    that range; the JSON report stays strict JSON and valid under its schema."""
    import io
    import json
    import sys

    import jsonschema

    from plantlint.core.catalogue import load_catalogue
    from plantlint.core.findings import Report
    from plantlint.report.formats import get_formatter
    from plantlint.report.formats.json_report import report_schema
    from plantlint.run.config import Config
    from plantlint.run.pipeline import finish
    from conftest import REPO

    assert sys.float_info.max < 1.8e308
    path = REPO / "example_repo" / "models" / "power" / "dc_bus_boost.plant"
    text = path.read_text(encoding="utf-8").replace("param v_in   = 24 ", "param v_in   = 1e300 ")
    assert "1e300" in text
    raw = analyse_bytes(text.encode())
    assert raw.stop is None
    for point in ("rated", "reduced"):
        lin = raw.analysis["points"][point]["linearisation"]
        assert lin["status"] == "undefined" and "beyond the range of double-precision" in lin["reason"]
    unstable = [f for f in raw.findings if f.rule == "zero-dynamics-unstable"]
    assert unstable and all("positive real part > 1.8e308" in f.message for f in unstable)
    config = Config()
    defaults = {r.id: r.severity for r in load_catalogue()}
    report = Report(files=[finish("boost.plant", raw, text, config, defaults)], tool_version="test")
    out = io.StringIO()
    get_formatter("json").render(report, out, color=False)
    jsonschema.validate(json.loads(out.getvalue()), report_schema())


HUGE = """plant huge "exact values beyond double range (mutant reproducers, invented)"
param k = 1 in 0 .. 1e400
state x in -1 .. 1
state v in -1 .. 1
input u in -1 .. 1
rate x = v*1e400
rate v = u*1e400 - k*x
output y = x
point rest: x = 0, v = 0
point far: x = (1e300)^2/3, v = 0
point tiny: x = 0, v = -1e-400
"""


def test_exact_values_beyond_double_range_are_written_as_decimals_never_as_inf_or_zero() -> None:
    """1e600/3 is about 3.3e599 and -1e-400 is not zero (Python's decimal module, the
    reference: exact decimal division at 17 digits); the messages and the JSON say those
    numbers, where a float would read inf or -0 (IEEE 754 double range, sys.float_info)."""
    import io
    import json
    import sys
    from decimal import Context, Decimal

    import jsonschema

    from plantlint.core.catalogue import load_catalogue
    from plantlint.core.findings import Report
    from plantlint.report.formats import get_formatter
    from plantlint.report.formats.json_report import report_schema
    from plantlint.run.config import Config
    from plantlint.run.pipeline import finish

    assert sys.float_info.max < 1e309  # the double range ends below these values
    third = format(Context(prec=17).divide(Decimal(10**600), Decimal(3)).normalize(), "g").replace("E", "e")
    raw = analyse_bytes(HUGE.encode())
    messages = " ".join(f.message for f in raw.findings)
    assert "inf" not in messages and "~-0" not in messages
    assert "x = ~3.33333e+599" in messages and "exact equilibrium with v = 0 (written -1e-400)" in messages
    points = raw.analysis["points"]
    assert points["far"]["values"]["x"] == third == "3.3333333333333333e+599"
    lin = points["rest"]["linearisation"]
    assert lin["A"][0][1] == "1e+400" and lin["B"][1][0] == "1e+400"
    assert points["rest"]["parameter_box"]["box"]["k"] == [0.0, "1e+400"]
    report = Report(files=[finish("huge.plant", raw, HUGE, Config(), {r.id: r.severity for r in load_catalogue()})],
                    tool_version="test")
    out = io.StringIO()
    get_formatter("json").render(report, out, color=False)
    jsonschema.validate(json.loads(out.getvalue()), report_schema())


CREEP = b"""plant creep "a point value within 2^-1024 of a range end (mutant reproducer)"
param k0 = 3.0e9
param E_R = 8000
state c in 0.02 .. 1.0
state T in 300 .. 380
input Tj in 280 .. 390
rate c = 1 - c - k0*exp(-E_R/T)*c
rate T = Tj - T
output y = T
point run: T = 335, c = 1/(1 + k0*exp(-E_R/1e-300))
expect relative_degree(y) = 1
"""


def test_a_value_too_close_to_zero_to_decide_is_named_not_crashed_on() -> None:
    """c = 1/(1 + 3e9 exp(-8e303)) differs from the range end 1 by about 3e9 exp(-8e303):
    no ball of practical precision separates it from 1, and sympy's ``equals`` overflows
    mpmath on it ("too many digits in integer"; the crash a random mutant found). The
    check must complete, name the value it took as zero in an analysis-budget finding,
    and leave the claims that rest on it not decided, with a pointer that exists."""
    gap = 1 - 1 / (1 + sp.Integer(3 * 10**9) * sp.exp(-sp.Integer(8000) / sp.Rational(1, 10**300)))
    assert gap != 0  # sympy keeps the constant exact: it is not zero, only tiny
    raw = analyse_bytes(CREEP)
    assert raw.stop is None
    (budget,) = [f for f in raw.findings if f.rule == "analysis-budget"]
    assert "taken as zero without proof" in budget.message and "exp(" in budget.message
    claims = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert claims and all(f.undecided and "see the analysis-budget finding" in f.message for f in claims)


# -- a model undefined all over its envelope --------------------------------------------------
NOWHERE = """
# invented: the input gain log(x - 5) has no real value while x stays in -1 .. 1
plant nowhere
state x in -1 .. 1
state v in -1 .. 1
input u in -1 .. 1
rate x = v
rate v = u*log(x - 5)
output y = x
point rest: x = 0, v = 0
expect relative_degree(y) = 2
"""


def test_a_rate_undefined_all_over_the_envelope_stops_the_analysis_where_it_is_written() -> None:
    """With no point of the envelope where the rates exist, every zero test would be vacuously
    "zero at every sampled point": the analysis must not go on to call the output unreached,
    the point incomplete, or a complex constant "within 2^-1024 of zero"."""
    import math

    # reference, Python's math library: log of x - 5 has no real value anywhere in -1 .. 1
    for x in (-1.0, 0.0, 1.0):
        try:
            math.log(x - 5)
        except ValueError:
            continue
        raise AssertionError("math.log accepted a negative argument")
    raw = analyse_bytes(NOWHERE.encode())
    assert raw.analysis is None
    (only,) = raw.findings
    assert only.rule == "singular-model" and only.message.startswith("rate v is undefined throughout the envelope")
    assert (only.span.line, only.span.column) == (8, 10)
    assert not [f for f in raw.findings if "sampled point" in f.message or "2^-1024" in f.message]


def test_rates_defined_only_apart_are_reported_on_the_plant() -> None:
    """sqrt(x - 1/2) needs x > 1/2, sqrt(-x) needs x < 0: each rate exists somewhere in the
    envelope, never both together."""
    text = NOWHERE.replace("rate x = v", "rate x = v + sqrt(x - 1/2)").replace("u*log(x - 5)", "u + sqrt(-x)")
    raw = analyse_bytes(text.encode())
    assert raw.analysis is None
    (only,) = raw.findings
    assert only.rule == "singular-model" and "never all defined at once" in only.message
    assert only.span.line == 3  # the plant line


def test_a_value_too_large_for_the_balls_is_not_called_undefined() -> None:
    """cosh(1e300*x) is a real number for every real x, only a huge one: the model is
    defined, and calling it "undefined throughout the envelope" (an error the model does not
    have) was wrong. The balls cannot hold it, so nothing can be analysed, and the run says
    so as not decided: no error, every claim not decided, the stop named. Reference: mpmath
    (arbitrary exponent range) evaluates cosh(1e300 * 0.5) as a finite number."""
    import mpmath

    with mpmath.workdps(30):
        value = mpmath.cosh(mpmath.mpf(10) ** 300 / 2)
        assert mpmath.isfinite(value) and value > mpmath.mpf(10) ** (10**299)
    text = NOWHERE.replace("u*log(x - 5)", "u*cosh(1e300*x)")
    raw = analyse_bytes(text.encode())
    assert raw.analysis is None and raw.stop is not None and raw.stop.kind == "values"
    assert not [f for f in raw.findings if f.rule == "singular-model"]
    stop = [f for f in raw.findings if f.rule == "analysis-incomplete"]
    assert len(stop) == 1 and stop[0].undecided and "rate v has no finite value" in stop[0].message
    assert "too large for them" in stop[0].message
    claims = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert len(claims) == 1 and claims[0].undecided and claims[0].span.line == 11


def test_the_balls_prove_a_value_undefined_only_outside_the_domain() -> None:
    """What counts as proven undefined at a point (Python's math library, the reference,
    raises ValueError on the same arguments): log(-2), sqrt(-3), asin(2), 1/0 and a
    fractional power of -2 have no real value; exp(10^300) has one (math only overflows)."""
    import math

    from fractions import Fraction

    from plantlint.kernel.balls import Program

    x = sp.Symbol("x", real=True)
    point = {x: Fraction(-2)}
    for expr, call in ((sp.log(x), lambda: math.log(-2)), (sp.sqrt(x - 1), lambda: math.sqrt(-3)),
                       (sp.asin(x + 4), lambda: math.asin(2)), (1 / (x + 2), lambda: 1 / (-2 + 2)),
                       (x ** sp.Rational(1, 3), lambda: math.pow(-2, 1 / 3))):
        try:
            call()
        except (ValueError, ZeroDivisionError):
            pass
        else:
            raise AssertionError(f"math accepted the argument of {expr}")
        assert Program([expr], [x]).proven_undefined(point) is True, expr
    try:
        math.exp(1e300)
    except OverflowError:
        pass
    huge = Program([sp.exp(sp.Integer(10) ** 300 * x ** 2)], [x])
    assert huge.proven_undefined(point) is False  # not finite in balls, not undefined
    assert Program([sp.exp(x)], [x]).proven_undefined(point) is None  # finite: defined


def test_a_polynomial_of_huge_degree_is_not_multiplied_out() -> None:
    """a_(i+1) = a_i^2 + a_i, twelve times: degree 2^11 in x + v. The relative degree is 2 = n,
    so nothing needs the polynomial multiplied out; the analysis used to spend its whole
    budget doing so (a mutant reproducer). sympy's Poly is the reference for the degree."""
    from plantlint.kernel.lie import _degree_bound

    x, v = sp.symbols("x v")
    a = x + v
    for _ in range(3):
        a = a * a + a
    assert _degree_bound(a) == sp.Poly(sp.expand(a), x, v).total_degree() == 8
    assert _degree_bound(sp.sin(x) + x) == float("inf")
    lets = "".join(f"let a{i} = a{i - 1}*a{i - 1} + a{i - 1}\n" for i in range(1, 12))
    text = ("plant deep\nstate x in -1 .. 1\nstate v in -1 .. 1\ninput u in -1 .. 1\nlet a0 = x + v\n" + lets
            + "rate x = v\nrate v = u + a11\noutput y = x\npoint rest: x = 0, v = 0\nexpect relative_degree(y) = 2\n")
    from plantlint.kernel.lie import Kernel
    from plantlint.run.pipeline import read_model

    model, _ = read_model(text.encode())
    assert not Kernel(model.plant()).polynomial_ring  # the tree route: only what is asked for
    raw = analyse_bytes(text.encode())
    assert "claims" in raw.stages
    assert not [f for f in raw.findings if f.rule == "expectation-failed"]


def test_a_characteristic_polynomial_beyond_double_range_does_not_stop_the_analysis() -> None:
    """The demo palletizer with a shoulder friction of 1e300 (a mutant that stopped the
    linearisation with numpy's "Array must not contain infs or NaNs"): the pole search
    falls back to the companion matrix in mpmath's exponent range. Reference for the
    largest pole, by hand: about -b1 over the shoulder inertia, so of the order of -1e299."""
    from conftest import REPO

    path = REPO / "example_repo" / "models" / "handling" / "palletizer_arm.plant"
    text = path.read_text(encoding="utf-8").replace("param b1  = 2.0 ", "param b1  = 1e300 ")
    assert "1e300" in text
    raw = analyse_bytes(text.encode())
    assert raw.stop is None and "claims" in raw.stages
    for point in raw.analysis["points"].values():
        lin = point["linearisation"]
        assert lin["status"] in ("computed", "undefined")
        if lin["status"] == "computed":
            assert min(re for re, _ in lin["poles"]) < -1e297


def test_display_values_of_large_constant_expressions_come_from_balls() -> None:
    """A linearisation entry built from acos(7/10) and sqrt(3) (600 operations, from a mutant
    whose analysis spent 16 s in sympy's evalf) is shown from a 128-bit ball; mpmath at 30
    digits is the reference value."""
    import mpmath

    from plantlint.analysis.serialise import _display_float

    a = sp.acos(sp.Rational(7, 10))
    e = sp.sqrt(3) * (sp.Rational(42, 25) + 32 * a / 5) / (1 + a**2) - sp.Rational(1, 7)
    with mpmath.workdps(30):
        a_ref = mpmath.acos(mpmath.mpf(7) / 10)
        ref = mpmath.sqrt(3) * (mpmath.mpf(42) / 25 + 32 * a_ref / 5) / (1 + a_ref**2) - mpmath.mpf(1) / 7
    assert _display_float(e) == float(ref)
    assert _display_float(sp.sin(sp.pi) + sp.cos(sp.pi / 2)) == 0.0  # an exact zero, quickly


# A level sensor read through asin (a mutant of the quadruple tank had `kc*asin(h2)` with h2
# around 27 cm at its point): asin is real only on [-1, 1] (any calculus text; sympy agrees,
# below), so at h = 27 the output and its derivative 1/sqrt(1 - h^2) have no real value. The
# zero dynamics crashed on sympy's imaginary number ("cannot create mpf from ...*I"), the
# relative degree was called well defined, and the input fields, which do not involve the
# output at all, were reported with rank 0 at the point.
ASIN_SENSOR = b"""plant level_sensor
state h in 0.5 .. 40
state z in 0.5 .. 40
input q in 0 .. 50
rate h = -h + q
rate z = -z + h
output y = asin(h)
point op: h = 27, z = 27, q = 27
expect minimum_phase at op
"""


def test_sympy_says_asin_and_its_derivative_are_not_real_beyond_1() -> None:
    h = sp.Symbol("h", real=True)
    assert sp.asin(27).is_extended_real is False
    assert sp.diff(sp.asin(h), h).subs(h, 27).is_extended_real is False


def test_an_output_that_is_not_real_at_the_point_is_undefined_there() -> None:
    raw = analyse_bytes(ASIN_SENSOR)
    assert raw.stop is None  # completed: no internal error
    op = raw.analysis["points"]["op"]
    assert op["relative_degree"] == {"y": None} and op["well_defined"] is False
    (ill,) = [f for f in raw.findings if f.rule == "relative-degree-ill-defined"]
    assert "L_g y = 1/sqrt(1 - h^2) is undefined there" in ill.message
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert "zero dynamics are not defined" in claim.message


def test_the_input_fields_at_a_point_do_not_depend_on_the_outputs() -> None:
    """f and g are linear here: A = [[-1, 0], [1, -1]], B = [1, 0]^T everywhere, Kalman rank 2
    (numpy below). The output being undefined at the point changes none of that."""
    import numpy as np

    A, B = np.array([[-1.0, 0.0], [1.0, -1.0]]), np.array([[1.0], [0.0]])
    assert np.linalg.matrix_rank(np.hstack([B, A @ B])) == 2
    op = analyse_bytes(ASIN_SENSOR).analysis["points"]["op"]
    assert op["controllability_rank"] == 2 and op["rank_drops"] == [] and op["state_linearizable"] is True


def test_a_report_with_undefined_fields_at_a_point_is_valid_against_the_schema(tmp_path) -> None:
    """The JSON report of that model is valid against the project's own schema (common
    practice: validate what you emit against its schema; jsonschema's Draft 2020-12)."""
    import json

    import jsonschema

    from plantlint.cli import main
    from plantlint.report.formats.json_report import report_schema

    model = tmp_path / "root.plant"
    model.write_text(ROOT, encoding="utf-8")
    out = tmp_path / "report.json"
    main(["check", "--no-cache", "--format", "json", "--output", str(out), str(model)])
    report = json.loads(out.read_text(encoding="utf-8"))
    assert report["files"][0]["analysis"]["points"]["rest"]["controllability_rank"] is None
    jsonschema.Draft202012Validator(report_schema()).validate(report)


def test_a_degree_claim_over_parameters_passes_over_states_where_the_row_has_no_value() -> None:
    """The demo palletizer with the elbow angle rate made sqrt(w2) (mutation seed 9511): the
    row L_g L_f elbow has 1/sqrt(w2) in it, no value at the envelope's centre (w2 = 0) and
    none for w2 < 0 (the first test of this file). Deciding `expect relative_degree(...)` over
    the payload's range tried the centre and stopped with an internal error ("cannot
    represent ComplexInfinity"); states where the row has no value prove nothing, and other
    states of the envelope (w2 > 0) decide the claims."""
    from conftest import REPO

    path = REPO / "example_repo" / "models" / "handling" / "palletizer_arm.plant"
    text = path.read_text(encoding="utf-8")
    assert "rate q2 = w2\n" in text
    raw = analyse_bytes(text.replace("rate q2 = w2\n", "rate q2 = w2^0.5\n").encode())
    assert raw.stop is None and "claims" in raw.stages
    degree_claims = [f for f in raw.findings if f.rule == "expectation-failed" and "relative_degree" in f.message]
    assert degree_claims == []
