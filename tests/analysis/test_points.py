"""Operating points as engineers write them: values from definitions, one finding
per cause, rounded values near an equilibrium. Plants are invented demo data unless
a source is named."""

from __future__ import annotations

import json
import math
from dataclasses import replace
from pathlib import Path

import pytest

from plantlint.run.config import Config, ConfigError, load_config
from plantlint.run.pipeline import analyse_bytes, read_model
from conftest import CRANE_RATES, MAGLEV, ROUNDED

# One tank of a quadruple-tank rig (demo numbers, invented): the level at the
# operating point is written from the flow through a `let`, as engineers do.
TANK = b"""plant tank3
const grav = 981
param a3 = 0.071
param A3 = 28
param gam2 = 0.7
param k2 = 3.35
param vnom = 3
state h3 in 0.1 .. 20
input v in 0 .. 6
let q3 = (1 - gam2)*k2*vnom
rate h3 = -a3/A3*sqrt(2*grav*h3) + (1 - gam2)*k2/A3*v
output y = h3
point op: h3 = (q3/a3)^2/(2*grav), v = vnom
"""


def rules(data: bytes) -> list[str]:
    return sorted(f.rule for f in analyse_bytes(data, Config()).findings)


def test_point_value_may_use_a_constant_definition() -> None:
    model, findings = read_model(TANK)
    assert findings == []
    h3 = float(model.point("op").values["h3"])
    # Torricelli's law (any fluid-mechanics text, e.g. White, Fluid Mechanics, sec. 3.6,
    # from memory): outflow a*sqrt(2 g h) equals the inflow q at h = (q/a)^2 / (2 g)
    q3 = (1 - 0.7) * 3.35 * 3
    assert math.isclose(h3, (q3 / 0.071) ** 2 / (2 * 981), rel_tol=1e-12)
    # the same rate in floats (math.sqrt, not the checker) vanishes there
    assert abs(-0.071 / 28 * math.sqrt(2 * 981 * h3) + q3 / 28) < 1e-12
    raw = analyse_bytes(TANK, Config())
    assert raw.findings == []
    assert raw.analysis is not None and raw.analysis["points"]["op"]["equilibrium"] is True


def test_point_value_from_a_state_dependent_definition_is_refused_once() -> None:
    text = TANK.replace(b"point op: h3 = (q3/a3)^2/(2*grav)", b"let lvl = 2*h3\npoint op: h3 = lvl/2")
    _, findings = read_model(text)
    assert [f.rule for f in findings] == ["unknown-name", "unused-name"]  # q3 is no longer used
    assert "definition 'lvl', which depends on the state 'h3'" in findings[0].message
    # the state is given (with a bad value): it is not also reported as missing
    assert not any(f.rule == "point-incomplete" for f in findings)


def test_missing_state_is_reported_once() -> None:
    text = b"plant cart\nstate x in -1 .. 1\nstate v in -1 .. 1\ninput F\nrate x = v\nrate v = F\n" \
           b"output y = x\npoint home: x = 0\n"
    assert rules(text) == ["point-incomplete"]


# The force balance m g = k i^2 / x^2 gives i = x sqrt(m g / k) (the magnetic suspension
# of Khalil, Nonlinear Systems 3rd ed., Exercise 1.18, from memory), here by math.sqrt:
I_EXACT = 0.01 * math.sqrt(0.05 * 9.81 / 0.0001)
# dv/dt at i = 0.7004 by hand: 9.81 - 1e-4 * 0.7004^2 / (0.05 * 1e-4) = -0.0012032, and the
# size of its terms is the larger of 9.81 and 9.8112032
RELATIVE = 0.0012032 / 9.8112032


def _one(raw, rule):  # type: ignore[no-untyped-def]
    (f,) = [f for f in raw.findings if f.rule == rule]
    return f


def test_rounded_state_is_one_rule_with_relative_residual_and_the_value_to_write() -> None:
    raw = analyse_bytes(MAGLEV, Config())
    assert "point-incomplete" not in [f.rule for f in raw.findings]
    f = _one(raw, "point-not-equilibrium")
    assert "dv/dt = -0.0012032" in f.message and "1.2e-4 of the size of its terms" in f.message
    assert f"i = {I_EXACT:.10g} (written 0.7004)" in f.message
    assert "tolerance 2e-4" in (f.hint or "")
    refinement = raw.analysis["points"]["hover"]["refinement"]
    assert math.isclose(refinement["relative_residual"], RELATIVE, rel_tol=1e-9)
    assert math.isclose(refinement["equilibrium_near"]["changed"]["i"]["value"], I_EXACT, rel_tol=1e-12)
    # the same mismatch with the input written: the same rule, both values refined
    written = analyse_bytes(MAGLEV.replace(b"i = 0.7004", b"i = 0.7004, u = 1.4"), Config())
    g = _one(written, "point-not-equilibrium")
    assert f"i = {I_EXACT:.10g} (written 0.7004)" in g.message
    assert f"u = {2 * I_EXACT:.10g} (written 1.4)" in g.message  # u = R i at rest


def test_following_the_hint_of_an_irrational_equilibrium_ends_the_finding() -> None:
    """The equilibrium current sqrt(m g / k) x is irrational, so no written decimal is an
    equilibrium: the hint gives the value to write with the tolerance its rounding needs
    (the residual by hand, in decimal arithmetic, below), and writing what it says passes.
    It used to say only `write i = 0.7003570517`, which missed again."""
    from decimal import Decimal, getcontext

    f = _one(analyse_bytes(MAGLEV, Config()), "point-not-equilibrium")
    hint = f.hint or ""
    shown = f"{I_EXACT:.10g}"
    assert f"write i = {shown} with `tolerance " in hint and "keep the written value with `tolerance 2e-4`" in hint
    tolerance = hint.split(f"write i = {shown} with `tolerance ")[1].split("`")[0]
    # the residual of dv/dt = g - k i^2/(m x^2) at the rounded i, relative to its largest term
    getcontext().prec = 50
    term = Decimal("0.0001") * Decimal(shown) ** 2 / (Decimal("0.05") * Decimal("0.01") ** 2)
    relative = abs(Decimal("9.81") - term) / max(Decimal("9.81"), term)
    assert Decimal(tolerance) / 10 < relative < Decimal(tolerance)
    fixed = MAGLEV.replace(b"i = 0.7004", f"i = {shown} tolerance {tolerance}".encode())
    raw = analyse_bytes(fixed, Config())
    assert "point-not-equilibrium" not in [g.rule for g in raw.findings]
    note = _one(raw, "point-refined")
    assert note.hint is None  # a rounded value cannot make the point exact: no "write" advice


def test_exact_value_is_given_when_one_exists() -> None:
    text = b"plant cart\nstate x in -1 .. 1\nstate v in -1 .. 1\ninput F\nrate x = v\nrate v = F\n" \
           b"output y = x\npoint moving: x = 0, v = 0.5, F = 0\n"
    f = _one(analyse_bytes(text, Config()), "point-not-equilibrium")
    assert "dx/dt = 0.5" in f.message and "an exact equilibrium with v = 0 (written 0.5)" in f.message


def test_tolerance_in_the_file_runs_the_analysis_at_the_refined_equilibrium() -> None:
    raw = analyse_bytes(MAGLEV.replace(b"i = 0.7004", b"i = 0.7004 tolerance 1e-3"), Config())
    assert "point-not-equilibrium" not in [f.rule for f in raw.findings]
    note = _one(raw, "point-refined")
    assert "within its tolerance 0.001 (written on the point)" in note.message
    assert f"refined equilibrium i = {I_EXACT:.10g} (written 0.7004)" in note.message
    point = raw.analysis["points"]["hover"]
    assert point["equilibrium"] is True and point["refinement"]["refined"] is True
    assert math.isclose(point["values"]["i"], I_EXACT, rel_tol=1e-12)
    assert math.isclose(point["values"]["u"], 2 * I_EXACT, rel_tol=1e-12)
    # the linearisation at the refined point: poles +-sqrt(2 g / x) and -R/L by hand
    poles = sorted(p[0] for p in point["linearisation"]["poles"])
    expected = sorted([-math.sqrt(2 * 9.81 / 0.01), math.sqrt(2 * 9.81 / 0.01), -20.0])
    assert all(math.isclose(a, b, rel_tol=1e-9) for a, b in zip(poles, expected))
    # a tolerance below the residual does not hide the miss
    tight = analyse_bytes(MAGLEV.replace(b"i = 0.7004", b"i = 0.7004 tolerance 1e-5"), Config())
    assert "point-not-equilibrium" in [f.rule for f in tight.findings]


def test_explain_says_the_point_was_refined(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    from plantlint.cli import main

    model = tmp_path / "maglev.plant"
    model.write_bytes(MAGLEV.replace(b"i = 0.7004", b"i = 0.7004 tolerance 1e-3"))
    main(["explain", str(model)])
    out = capsys.readouterr().out
    assert "equilibrium: yes, refined from the written values" in out
    # its linearisation is exact arithmetic on 40-digit values, not the exact equilibrium's;
    # det(sI - A) then has coefficients of hundreds of digits: left to the JSON report
    assert "exact arithmetic on the refined equilibrium's 40-digit values" in out
    assert "det(sI - A) = (exact, " in out and max(len(line) for line in out.splitlines()) < 400
    main(["explain", str(model), "--format", "json"])
    data = json.loads(capsys.readouterr().out)
    (point,) = data["points"] if isinstance(data["points"], list) else data["points"].values()
    assert len(point["linearisation"]["characteristic_polynomial"]) > 160


def test_tolerance_in_the_configuration_and_the_point_taking_precedence() -> None:
    raw = analyse_bytes(MAGLEV, replace(Config(), point_tolerance=1e-3))
    assert "point-tolerance in the configuration" in _one(raw, "point-refined").message
    strict = analyse_bytes(MAGLEV.replace(b"i = 0.7004", b"i = 0.7004 tolerance 0"),
                           replace(Config(), point_tolerance=1e-3))
    assert "point-not-equilibrium" in [f.rule for f in strict.findings]


def test_tolerance_values_are_validated(tmp_path: Path) -> None:
    bad = read_model(MAGLEV.replace(b"i = 0.7004", b"i = 0.7004 tolerance 2"))[1]
    assert [f.rule for f in bad] == ["bad-range"] and "0 <= T < 1" in bad[0].message
    config = tmp_path / "plantlint.toml"
    config.write_text("point-tolerance = 1e-4\n", encoding="utf-8")
    assert load_config(tmp_path).point_tolerance == 1e-4
    for wrong in ("-1", "1.5", '"small"', "true"):
        config.write_text(f"point-tolerance = {wrong}\n", encoding="utf-8")
        with pytest.raises(ConfigError, match="point-tolerance"):
            load_config(tmp_path)


def test_a_rate_whose_terms_all_vanish_does_not_stop_the_refinement() -> None:
    """A reviewer's model (invented numbers). x2' = -x2 + x4^2 + u2 has every term zero at
    the equilibrium (x2 = x4 = 0), so what is left of it is the miss or an input fitted to
    it, with no scale of its own; it once made the rounded point "not an equilibrium".
    Changing x1 alone to (13/10 - e^(1/10))/2 makes the point an exact equilibrium (by
    hand: x1' = 0 gives u1 = x1 - 1/10, then x4' = 0 gives 2 x1 - 13/10 + e^(1/10) = 0;
    math.exp below)."""
    import math

    from plantlint.run.pipeline import analyse_bytes

    raw = analyse_bytes(ROUNDED)
    (note,) = [f for f in raw.findings if f.rule == "point-refined"]
    assert not [f for f in raw.findings if f.rule == "point-not-equilibrium"]
    x1 = (1.3 - math.exp(0.1)) / 2
    assert f"x1 = {x1:.10g}" in note.message and "u2 = 0" in note.message
    relative = raw.analysis["points"]["rounded"]["refinement"]["relative_residual"]
    assert relative < 1e-6  # the rounding of x1 (6e-7 of its value), not 100 %


def test_a_written_input_that_misses_is_measured_against_its_own_rate() -> None:
    """A reviewer's model (invented): x2' = -x2 + u2 with x2 = 0 and u2 = 0.5 written. The
    rate is 0.5 (by hand), all of its one non-zero term: a miss of 100 %, whatever the
    scale of the other rate (-1000 x1 + 1000 u1). Only an input left out of the point, whose
    value is fitted to the miss, has no size of its own."""
    text = b"""plant scales
state x1 in -2 .. 2
state x2 in -1 .. 1
input u1
input u2
rate x1 = -1000*x1 + 1000*u1
rate x2 = -x2 + u2
output y1 = x1
output y2 = x2
point p: x1 = 1, u1 = 1, x2 = 0, u2 = 0.5 tolerance 1e-3
"""
    raw = analyse_bytes(text)
    (missed,) = [f for f in raw.findings if f.rule == "point-not-equilibrium"]
    assert "dx2/dt = 0.5 (the largest rate is 100% of the size of its terms)" in missed.message
    assert not [f for f in raw.findings if f.rule == "point-refined"]


# The crane with its swing angle rounded.
CRANE = CRANE_RATES + b"point rest: x = 0, v = 0, th = 0.001, w = 0\n"

# A two-link arm with elastic joints (Spong's reduced model; Spong, Hutchinson and
# Vidyasagar, Robot Modeling and Control, ch. 6, from memory), invented numbers. The link
# rates are the inverse mass matrix written out: each is one quotient over det M.
ELASTIC_ARM = b"""plant flex_arm2
const g = 9.81
const l1 = 0.5
const lc1 = 0.25
const lc2 = 0.2
const m1 = 3
const m2 = 2
const I1 = 0.1
const I2 = 0.06
const Jm = 0.05
const k = 300
state q1 in -1 .. 1
state q2 in 0.2 .. 2
state w1 in -2 .. 2
state w2 in -2 .. 2
state t1 in -1.2 .. 1.2
state t2 in 0 .. 2.2
state v1 in -3 .. 3
state v2 in -3 .. 3
input u1 in -30 .. 30
input u2 in -20 .. 20
let a11 = I1 + I2 + m1*lc1^2 + m2*(l1^2 + lc2^2 + 2*l1*lc2*cos(q2))
let a12 = I2 + m2*(lc2^2 + l1*lc2*cos(q2))
let a22 = I2 + m2*lc2^2
let hh = m2*l1*lc2*sin(q2)
let r1 = k*(t1 - q1) + hh*w2*(2*w1 + w2) - (m1*lc1 + m2*l1)*g*cos(q1) - m2*lc2*g*cos(q1 + q2)
let r2 = k*(t2 - q2) - hh*w1^2 - m2*lc2*g*cos(q1 + q2)
let dM = a11*a22 - a12^2
rate q1 = w1
rate q2 = w2
rate w1 = (a22*r1 - a12*r2)/dM
rate w2 = (a11*r2 - a12*r1)/dM
rate t1 = v1
rate t2 = v2
rate v1 = (u1 - k*(t1 - q1))/Jm
rate v2 = (u2 - k*(t2 - q2))/Jm
output y1 = q1
output y2 = q2
point reach: q1 = 0, q2 = 1, w1 = 0, w2 = 0, t1 = 0, t2 = 1, v1 = 0, v2 = 0
"""


def test_a_rate_written_as_one_quotient_is_measured_by_its_terms() -> None:
    """A rate written as one quotient is one sympy term; measured against itself it was
    always 100 % of its size, and Newton's convergence was never recognised ("no
    equilibrium was found near it"). The crane at th = 0.001 has the exact equilibrium
    th = 0 with F = 0 (the contract's own point `rest`; by hand: both rates vanish with
    sin th = 0 and F = 0)."""
    raw = analyse_bytes(CRANE)
    (missed,) = [f for f in raw.findings if f.rule == "point-not-equilibrium"]
    assert "it is an exact equilibrium with th = 0 (written 0.001)" in missed.message
    assert missed.hint == "write th = 0"


def test_an_elastic_arm_is_brought_to_equilibrium_by_its_motor_angles() -> None:
    """The arm's links are written where they should hang (q1 = 0, q2 = 1); the motor angles
    as if the joints were rigid. The equilibrium nearby keeps the links and winds the
    springs: k (t - q) = gravity torque (Spong's model at rest: the link equation gives
    k (t - q) = G(q), the motor equation u = k (t - q)). Reference: the gravity torques by
    math.cos, written here from the model's physics, not from the checker."""
    raw = analyse_bytes(ELASTIC_ARM)
    (missed,) = [f for f in raw.findings if f.rule == "point-not-equilibrium"]
    changed = raw.analysis["points"]["reach"]["refinement"]["equilibrium_near"]["changed"]
    assert sorted(changed) == ["t1", "t2"]
    g, l1, lc1, lc2, m1, m2, k = 9.81, 0.5, 0.25, 0.2, 3, 2, 300
    G1 = (m1 * lc1 + m2 * l1) * g * math.cos(0) + m2 * lc2 * g * math.cos(0 + 1)
    G2 = m2 * lc2 * g * math.cos(0 + 1)
    assert math.isclose(changed["t1"]["value"], 0 + G1 / k, rel_tol=1e-9)
    assert math.isclose(changed["t2"]["value"], 1 + G2 / k, rel_tol=1e-9)
    assert f"t1 = {G1 / k:.10g} (written 0)" in missed.message


def test_rounded_motor_angles_are_refined_rather_than_a_link_written_as_zero() -> None:
    """The same arm with the motor angles written as an engineer rounds them (0.0643 and
    1.0071 for G(q)/k and q2 + G2/k). The smallest relative change alone moved the link
    angle written 0 (by 8e-6 of its range) with t2; the motor angles move within the
    rounding of their written digits, which explains the miss. Reference: the gravity
    torques by math.cos, as in the test above."""
    rounded = ELASTIC_ARM.replace(b"t1 = 0, t2 = 1,", b"t1 = 0.0643, t2 = 1.0071,")
    raw = analyse_bytes(rounded)
    (missed,) = [f for f in raw.findings if f.rule == "point-not-equilibrium"]
    changed = raw.analysis["points"]["reach"]["refinement"]["equilibrium_near"]["changed"]
    assert sorted(changed) == ["t1", "t2"], missed.message
    g, l1, lc1, lc2, m1, m2, k = 9.81, 0.5, 0.25, 0.2, 3, 2, 300
    G1 = (m1 * lc1 + m2 * l1) * g * math.cos(0) + m2 * lc2 * g * math.cos(0 + 1)
    G2 = m2 * lc2 * g * math.cos(0 + 1)
    assert math.isclose(changed["t1"]["value"], G1 / k, rel_tol=1e-9)
    assert math.isclose(changed["t2"]["value"], 1 + G2 / k, rel_tol=1e-9)
    assert abs(G1 / k - 0.0643) <= 0.00005 and abs(1 + G2 / k - 1.0071) <= 0.00005  # the premise: rounding


def test_the_places_and_digits_of_a_written_decimal() -> None:
    """The places after the point (a unit in the last place is the rounding a written
    decimal allows) and the significant digits, read off its exact rational. Reference: the
    standard library's decimal module (the exponent and digits of the normalised written
    text); integers, fractions that are no decimal and irrational values read as chosen
    (None)."""
    from decimal import Decimal
    from fractions import Fraction

    import sympy as sp

    from plantlint.analysis.refine import _decimal

    for text in ("0.0643", "1.0071", "2.5", "0.50", "-0.125", "1e-3", "12.34567", "-7.2e-5", "0.0974146"):
        written = Decimal(text).normalize().as_tuple()
        value = Fraction(text)
        rational = sp.Rational(value.numerator, value.denominator)
        assert _decimal(rational) == (-written.exponent, len(written.digits)), text  # places, significant digits
    for value in (sp.Integer(0), sp.Integer(3), sp.Integer(-40), sp.Rational(1, 3), sp.Rational(5, 7), sp.pi / 2,
                  sp.sqrt(2)):
        assert _decimal(value) is None, value


def test_the_size_of_a_product_of_sums_is_its_largest_expanded_term() -> None:
    """The refinement measures a rate against its largest term as it would be multiplied
    out, denominators kept as values, like terms not collected (a power of a sum counts as
    the product of its copies). Reference: sympy's expand of the same products, with the
    copies of a power's base given symbols of their own so that nothing collects (generic
    random values), the largest |term| taken over Add.make_args."""
    import random

    import mpmath
    import sympy as sp

    from plantlint.analysis.refine import _size, _size_tree

    a, b, c, d, e = sp.symbols("a b c d e")
    a1, a2, a3, b1, b2, b3, c1, c2, d1, d2 = sp.symbols("a1 a2 a3 b1 b2 b3 c1 c2 d1 d2")
    copies = {a1: a, a2: a, a3: a, b1: b, b2: b, b3: b, c1: c, c2: c, d1: d, d2: d}
    rng = random.Random(11)
    cases = (  # (expression, the same written with a power's copies apart)
        ((a + b) * (c - d) / e, None),
        (-(a * sp.cos(c) + b**2) * (d - 3 * e) / (a + e), None),
        ((a + 2 * b) ** 3 * c, (a1 + 2 * b1) * (a2 + 2 * b2) * (a3 + 2 * b3) * c),
        (a * b + (c - d) ** 2 / e, a * b + (c1 - d1) * (c2 - d2) / e),
        (sp.sin(a + b) * (c + d), None),
    )
    for expr, apart in cases:
        values = {s: sp.Rational(rng.randint(1, 97), rng.randint(1, 13)) * rng.choice((1, -1))
                  for s in (a, b, c, d, e)}
        leaves: list[sp.Expr] = []
        tree = _size_tree(expr, leaves)
        mine = _size(tree, [mpmath.mpf(sp.N(leaf.subs(values), 30)) for leaf in leaves])
        terms = []
        for part in sp.Add.make_args(apart if apart is not None else expr):
            numerator, denominator = sp.fraction(part)
            terms += [t / denominator for t in sp.Add.make_args(sp.expand(numerator, deep=False))]
        reference = max(abs(sp.N(t.subs(copies).subs(values), 30)) for t in terms)
        assert math.isclose(float(mine), float(reference), rel_tol=1e-12), expr


def test_the_fast_least_squares_step_is_numpys_minimum_norm_solution() -> None:
    """The refinement's Gauss-Newton step solves the normal equations by LU when the
    Jacobian has full rank (an mpmath SVD of 20 x 21 took most of a second per step); it
    must be the minimum-norm least-squares solution, as numpy.linalg.lstsq computes it,
    for wide, square and tall matrices (tall: more rates than free values, the pairs of
    written values), and leave singular and badly scaled ones (values of 1e300 next to 1:
    the normal equations square the condition number) to the SVD."""
    import numpy as np
    import mpmath

    from plantlint.analysis.refine import DIGITS, _full_rank_least_squares, _least_squares

    rng = np.random.default_rng(7)
    with mpmath.workdps(DIGITS):
        for rows, cols in ((20, 21), (6, 3), (4, 4)):
            A = rng.normal(size=(rows, cols))
            b = rng.normal(size=rows)
            rows_mp, b_mp = [[mpmath.mpf(v) for v in r] for r in A], [mpmath.mpf(v) for v in b]
            fast = _full_rank_least_squares(rows_mp, b_mp)
            reference = np.linalg.lstsq(A, b, rcond=None)[0]
            assert fast is not None and np.allclose([float(v) for v in fast], reference, rtol=1e-9, atol=1e-12)
            assert np.allclose([float(v) for v in _least_squares(rows_mp, b_mp)], reference, rtol=1e-9, atol=1e-12)
        scaled = [[mpmath.mpf("1e300"), mpmath.mpf(1)], [mpmath.mpf(1), mpmath.mpf("1e-300")]]
        x = _full_rank_least_squares(scaled, [mpmath.mpf(1), mpmath.mpf(1)])
        if x is not None:  # accepted only when it solves the system
            assert abs(scaled[0][0] * x[0] + scaled[0][1] * x[1] - 1) < mpmath.mpf("1e-25")
        singular = [[mpmath.mpf(1), mpmath.mpf(2)], [mpmath.mpf(2), mpmath.mpf(4)]]
        assert _full_rank_least_squares(singular, [mpmath.mpf(1), mpmath.mpf(2)]) is None
        x = _least_squares(singular, [mpmath.mpf(1), mpmath.mpf(2)])  # the SVD's pseudo-inverse
        reference = np.linalg.lstsq(np.array([[1.0, 2.0], [2.0, 4.0]]), np.array([1.0, 2.0]), rcond=None)[0]
        assert np.allclose([float(v) for v in x], reference)
        tall = [[mpmath.mpf(1), mpmath.mpf(2)], [mpmath.mpf(2), mpmath.mpf(4)], [mpmath.mpf(3), mpmath.mpf(6)]]
        rhs = [mpmath.mpf(1), mpmath.mpf(0), mpmath.mpf(2)]
        assert _full_rank_least_squares(tall, rhs) is None  # rank 1: A^T A is singular
        reference = np.linalg.lstsq(np.array([[1.0, 2.0], [2.0, 4.0], [3.0, 6.0]]), np.array([1.0, 0.0, 2.0]),
                                    rcond=None)[0]
        assert np.allclose([float(v) for v in _least_squares(tall, rhs)], reference)
        # columns 1e400 apart (beyond numpy's doubles): x = (1, 1e-400) by hand; unscaled,
        # the SVD dropped the small column's singular value as rounding and gave (0, 1e-400)
        badly = [[mpmath.mpf(1), mpmath.mpf(0)], [mpmath.mpf(0), mpmath.mpf("2e400")]]
        x = _least_squares(badly, [mpmath.mpf(1), mpmath.mpf(2)])
        assert abs(x[0] - 1) < mpmath.mpf("1e-40") and abs(x[1] / mpmath.mpf("1e-400") - 1) < mpmath.mpf("1e-40")


def test_minimum_phase_without_an_equilibrium_says_where_the_zero_dynamics_live() -> None:
    """The zero dynamics are defined around an equilibrium (Isidori, Nonlinear Control
    Systems, 3rd ed., sec. 4.3, from memory): with none declared, the claim fails and says
    so, pointing at the points' own findings, not at unstable dynamics."""
    raw = analyse_bytes(MAGLEV + b"expect minimum_phase\n", Config())
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert "no declared point is an equilibrium, and the zero dynamics are taken at one" in claim.message
    assert "point-not-equilibrium" in [f.rule for f in raw.findings]
