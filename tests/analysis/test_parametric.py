"""Verdicts over parameter boxes, held against outside sources: the quadruple-tank zero
condition (Johansson 2000), scipy.signal for a linear family whose zeros cross the
imaginary axis, numpy for Kalman ranks."""

from __future__ import annotations

import itertools
from pathlib import Path

import numpy as np
import pytest
import scipy.optimize
import scipy.signal
import sympy as sp

from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes
from conftest import FIXTURES

MODELS = FIXTURES / "models"
TANK = (MODELS / "quadruple_tank.plant").read_text(encoding="utf-8")


def _check(text: str) -> tuple[dict, list]:
    raw = analyse_bytes(text.encode("utf-8"), Config(envelope_seconds=5.0))
    assert raw.analysis is not None, [f.message for f in raw.findings]
    return raw.analysis, raw.findings


def _tank(gam1: str, gam2: str) -> str:
    """The quadruple tank with other flow-split ranges (nominal value and range)."""
    text = TANK.replace("param gam1 = 0.70 in 0.3 .. 0.9", f"param gam1 = {gam1}")
    text = text.replace("param gam2 = 0.60 in 0.3 .. 0.9", f"param gam2 = {gam2}")
    assert text != TANK or (gam1, gam2) == ("0.70 in 0.3 .. 0.9", "0.60 in 0.3 .. 0.9")
    return text


def _johansson_zeros(gam1: float, gam2: float) -> np.ndarray:
    """Johansson, "The quadruple-tank process: a multivariable laboratory process with an
    adjustable zero", IEEE Trans. Control Systems Technology 8(3), 2000 (from memory): the
    zeros are the roots of (1 + s T3)(1 + s T4) - (1 - gam1)(1 - gam2)/(gam1 gam2), with
    T_i = (A_i/a_i) sqrt(2 h_i/g) at the equilibrium; minimum phase iff gam1 + gam2 > 1."""
    g, vnom, k1, k2 = 981.0, 3.0, 3.33, 3.35
    A3, A4, a3, a4 = 28.0, 32.0, 0.071, 0.057
    h3 = ((1 - gam2) * k2 * vnom / a3) ** 2 / (2 * g)
    h4 = ((1 - gam1) * k1 * vnom / a4) ** 2 / (2 * g)
    T3, T4 = A3 / a3 * np.sqrt(2 * h3 / g), A4 / a4 * np.sqrt(2 * h4 / g)
    return np.roots([T3 * T4, T3 + T4, 1 - (1 - gam1) * (1 - gam2) / (gam1 * gam2)])


def _rules(findings: list) -> list[str]:
    return sorted(f.rule for f in findings)


def _undecided(f: object) -> bool:
    """A claim reported as not decided (its own outcome, rather than a defect found)."""
    return bool(f.undecided) and "not decided" in f.message  # type: ignore[attr-defined]


# -- the quadruple tank -----------------------------------------------------------------------
def test_quadruple_tank_range_across_the_boundary_is_non_minimum_phase_somewhere() -> None:
    analysis, findings = _check(TANK)
    op = analysis["points"]["op"]
    assert op["zero_dynamics"]["verdict"] == "minimum_phase"  # at the nominal 0.70, 0.60
    box = op["parameter_box"]
    assert box["equilibrium"]["outcome"] == "proven"
    # the pump voltages left out are solved for every flow split: the levels were written
    # from the mass balance at v1 = v2 = vnom = 3 (Johansson's model), so u(p) = 3
    assert box["solved_inputs"] == {"v1": "3", "v2": "3"}
    zd = box["zero_dynamics"]
    assert zd["outcome"] == "violated" and zd["witness_verdict"] == "non_minimum_phase"
    g1, g2 = zd["witness"]["gam1"], zd["witness"]["gam2"]
    assert g1 + g2 < 1  # Johansson: non-minimum phase iff gam1 + gam2 < 1
    ours = sorted((complex(re, im) for re, im in zd["witness_eigenvalues"]), key=lambda z: (z.real, z.imag))
    ref = sorted(_johansson_zeros(g1, g2), key=lambda z: (z.real, z.imag))
    assert np.allclose(ours, ref, rtol=1e-9, atol=1e-12)
    assert max(z.real for z in ref) > 0
    assert zd["boundary"] == "gam1 + gam2 < 1"
    assert abs(zd["crossing"]["gam1"] + zd["crossing"]["gam2"] - 1) < 1e-9
    assert "zero-dynamics-unstable" in _rules(findings)
    failed = [f for f in findings if f.rule == "expectation-failed"]
    assert len(failed) == 1 and not _undecided(failed[0])
    assert "gam1 = 0.3, gam2 = 0.3" in failed[0].message and "gam1 + gam2 < 1" in failed[0].message


def test_quadruple_tank_range_inside_the_minimum_phase_region_is_proven() -> None:
    # gam1, gam2 in 0.55 .. 0.9: gam1 + gam2 >= 1.1 > 1 everywhere (Johansson: minimum phase)
    text = _tank("0.70 in 0.55 .. 0.9", "0.60 in 0.55 .. 0.9")
    analysis, findings = _check(text)
    zd = analysis["points"]["op"]["parameter_box"]["zero_dynamics"]
    assert zd["outcome"] == "proven"
    assert "minimum phase over the whole parameter box" in zd["detail"]
    assert not [f for f in findings if f.rule in ("expectation-failed", "zero-dynamics-unstable")]
    for g1, g2 in itertools.product([0.55, 0.9], repeat=2):  # the corners, by the closed form
        assert max(_johansson_zeros(g1, g2).real) < 0


def test_quadruple_tank_range_touching_the_boundary_is_critical_at_the_corner() -> None:
    # gam1, gam2 in 0.5 .. 0.9: at the corner gam1 = gam2 = 0.5 the zero sits at s = 0
    text = _tank("0.70 in 0.5 .. 0.9", "0.60 in 0.5 .. 0.9")
    analysis, findings = _check(text)
    zd = analysis["points"]["op"]["parameter_box"]["zero_dynamics"]
    assert zd["outcome"] == "violated" and zd["witness_verdict"] == "critical"
    assert zd["witness"] == {"gam1": 0.5, "gam2": 0.5}
    assert min(abs(_johansson_zeros(0.5, 0.5))) < 1e-12
    assert "zero-dynamics-critical" in _rules(findings)
    assert any(f.rule == "expectation-failed" and not _undecided(f) for f in findings)


def test_quadruple_tank_non_minimum_phase_at_nominal_is_not_reported_twice() -> None:
    # gam1 = 0.43, gam2 = 0.34 (Johansson's non-minimum-phase setting, from memory)
    text = _tank("0.43 in 0.3 .. 0.45", "0.34 in 0.3 .. 0.45")
    analysis, findings = _check(text)
    zd = analysis["points"]["op"]["parameter_box"]["zero_dynamics"]
    assert zd["outcome"] == "violated" and zd["witness"] == {"gam1": 0.43, "gam2": 0.34}
    assert _rules(findings).count("zero-dynamics-unstable") == 1
    assert max(_johansson_zeros(0.43, 0.34).real) > 0


# -- a linear family checked with scipy.signal ----------------------------------------------------
FAMILY = """
# invented linear family: 1/(s+1)^4 realised in companion form, numerator s^3 + 2 s^2 + k s + 1
plant family
param k = 1 in {lo} .. 2
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in -1 .. 1
state x4 in -1 .. 1
input u
rate x1 = x2
rate x2 = x3
rate x3 = x4
rate x4 = -x1 - 4*x2 - 6*x3 - 4*x4 + u
output y = x1 + k*x2 + 2*x3 + x4
point rest: x1 = 0, x2 = 0, x3 = 0, x4 = 0
expect minimum_phase
"""


def _family_zeros(k: float) -> np.ndarray:
    A = np.array([[0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1], [-1, -4, -6, -4]], dtype=float)
    B = np.array([[0], [0], [0], [1.0]])
    C = np.array([[1, k, 2, 1]], dtype=float)
    zeros, _, _ = scipy.signal.ss2zpk(A, B, C, np.zeros((1, 1)))
    return np.asarray(zeros)


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_linear_family_zero_crossing_matches_scipy() -> None:
    analysis, findings = _check(FAMILY.format(lo="0.3"))
    zd = analysis["points"]["rest"]["parameter_box"]["zero_dynamics"]
    assert zd["outcome"] == "violated" and zd["witness_verdict"] == "non_minimum_phase"
    # reference: the k where scipy's transmission zeros reach the imaginary axis
    k_cross = scipy.optimize.brentq(lambda k: max(_family_zeros(k).real), 0.3, 1.0, xtol=1e-13)
    assert abs(zd["crossing"]["k"] - k_cross) < 1e-8
    # the Hurwitz determinant Delta_2 = 2k - 1 (by hand from the numerator s^3 + 2 s^2 + k s + 1),
    # written as the threshold on the one parameter; it agrees with scipy's crossing above
    assert zd["boundary"] == "k < 0.5" and abs(k_cross - 0.5) < 1e-8
    kw = zd["witness"]["k"]
    assert kw < k_cross and max(_family_zeros(kw).real) > 0
    ours = sorted((complex(re, im) for re, im in zd["witness_eigenvalues"]), key=lambda z: (z.real, z.imag))
    ref = sorted(_family_zeros(kw), key=lambda z: (z.real, z.imag))
    assert np.allclose(ours, ref, atol=1e-7)
    assert "zero-dynamics-unstable" in _rules(findings)
    # on the boundary itself the zeros sit on the imaginary axis (scipy): not minimum phase
    # either, and the finding says so rather than implying k = 0.5 is fine
    assert abs(max(_family_zeros(0.5).real)) < 1e-6
    (found,) = [f for f in findings if f.rule == "zero-dynamics-unstable"]
    assert "non-minimum phase wherever k < 0.5" in found.message
    assert "not minimum phase on k = 0.5 either, where it is zero" in found.message


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_linear_family_inside_the_stable_range_is_proven() -> None:
    analysis, findings = _check(FAMILY.format(lo="0.6"))
    zd = analysis["points"]["rest"]["parameter_box"]["zero_dynamics"]
    assert zd["outcome"] == "proven"
    assert not [f for f in findings if f.rule == "expectation-failed"]
    for k in np.linspace(0.6, 2.0, 15):  # scipy agrees on a grid of the range
        assert max(_family_zeros(k).real) < 0


CHAIN = """
# invented: ten integrators, output zeros at -1/2, -1, ..., -4 and -k; the Rosenbrock pencil
# (11 x 11) is beyond the symbolic limit, so only the nominal parameter value is checked
plant long_chain
param k = 2 in 1 .. 3
{states}
input u
{rates}
rate x10 = u
output y = {output}
point rest: {point}
expect minimum_phase
"""


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_decided_only_at_nominal_values_is_said_and_not_decided() -> None:
    s = sp.Symbol("s")
    kk = sp.Symbol("k", real=True)
    numerator = sp.Poly(sp.expand((s + kk) * sp.prod([s + sp.Rational(j, 2) for j in range(1, 9)])), s)
    coeffs = list(reversed(numerator.all_coeffs()))  # c0 + c1 s + ... + c9 s^9
    text = CHAIN.format(
        states="\n".join(f"state x{i} in -1 .. 1" for i in range(1, 11)),
        rates="\n".join(f"rate x{i} = x{i + 1}" for i in range(1, 10)),
        output=" + ".join(f"({sp.sstr(c)})*x{i + 1}" for i, c in enumerate(coeffs)),
        point=", ".join(f"x{i} = 0" for i in range(1, 11)),
    )
    analysis, findings = _check(text)
    point = analysis["points"]["rest"]
    # the nominal verdict is right: scipy's zeros at k = 2
    A = np.eye(10, k=1)
    B = np.zeros((10, 1))
    B[9, 0] = 1
    C = np.array([[float(c.subs(kk, 2)) for c in coeffs]])
    zeros, _, _ = scipy.signal.ss2zpk(A, B, C, np.zeros((1, 1)))
    assert max(np.real(zeros)) < 0 and point["zero_dynamics"]["verdict"] == "minimum_phase"
    zd = point["parameter_box"]["zero_dynamics"]
    assert zd["outcome"] == "nominal_only" and "nominal parameter values only" in zd["detail"]
    said = [f for f in findings if f.rule == "analysis-budget"]
    assert said and "nominal parameter values" in said[0].message and "k = 2" in said[0].message
    failed = [f for f in findings if f.rule == "expectation-failed"]
    assert len(failed) == 1 and _undecided(failed[0])


# -- equilibria and ranks over the box ----------------------------------------------------------------
LEAK = """
# invented: a leaky integrator held at x = 1
plant leak
param a = 1 in 0.5 .. 2
state x in -5 .. 5
state z in -5 .. 5
input u in -10 .. 10
rate x = -a*x + u
rate z = -z + x - 1
output y = x
point hold: x = 1, z = 0{inputs}
expect minimum_phase
"""


def test_point_that_is_an_equilibrium_only_at_nominal_values_is_reported() -> None:
    analysis, findings = _check(LEAK.format(inputs=", u = 1"))
    box = analysis["points"]["hold"]["parameter_box"]
    assert box["equilibrium"]["outcome"] == "violated"
    witness = box["equilibrium"]["witness"]
    # sympy done by hand: dx/dt = -a*1 + 1 at the witness must be non-zero
    assert -witness["a"] + 1 != 0
    found = [f for f in findings if f.rule == "point-not-equilibrium"]
    assert len(found) == 1 and "nominal parameter values" in found[0].message
    assert f"dx/dt = {-witness['a'] + 1:g}" in found[0].message
    failed = [f for f in findings if f.rule == "expectation-failed"]
    assert len(failed) == 1 and not _undecided(failed[0])


def test_inputs_left_out_are_solved_per_parameter_value() -> None:
    analysis, findings = _check(LEAK.format(inputs=""))
    box = analysis["points"]["hold"]["parameter_box"]
    assert box["equilibrium"]["outcome"] == "proven"
    assert box["solved_inputs"] == {"u": "a"}  # -a*1 + u = 0 by hand
    assert box["zero_dynamics"]["outcome"] == "proven"  # z' = -z, independent of a
    assert not [f for f in findings if f.severity.value == "error"]


TWO_ROUTES = """
# invented: the input enters x2 through (k - 2) and x4 directly; at k = 2 the first route closes
plant two_routes
param k = 2.5 in 1 .. 3
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in -1 .. 1
state x4 in -1 .. 1
input u in -1 .. 1
rate x1 = x2
rate x2 = -x1 + (k - 2)*u + x3
rate x3 = x4
rate x4 = -2*x3 - x4 + x1 + u
output y = x1
point o: x1 = 0, x2 = 0, x3 = 0, x4 = 0
expect minimum_phase
"""


def test_inputs_are_solved_from_equations_that_determine_them_over_the_whole_box() -> None:
    """The x2 equation (k - 2) u = 0 does not determine u at k = 2, but the x4 equation u = 0
    does, for every k: the origin is an equilibrium over the whole box (a false
    point-not-equilibrium came from trying only the first equation)."""
    analysis, findings = _check(TWO_ROUTES)
    box = analysis["points"]["o"]["parameter_box"]
    assert box["equilibrium"]["outcome"] == "proven" and box["solved_inputs"] == {"u": "0"}
    assert not [f for f in findings if f.rule == "point-not-equilibrium"]
    # reference, sympy done another way: the equilibrium equations at the origin, solved for u
    # at the parameter value where the first route closes and at the nominal one
    k, u = sp.symbols("k u")
    for value in (2, sp.Rational(5, 2)):
        rates = [sp.Integer(0), (k - 2) * u, sp.Integer(0), u]
        assert sp.solve([r.subs(k, value) for r in rates], [u], dict=True) == [{u: 0}]
    # the relative degree is lost at k = 2 (L_g L_f y = k - 2, by hand), which is what the
    # minimum-phase claim fails on
    failed = [f for f in findings if f.rule == "expectation-failed"]
    assert len(failed) == 1 and "vanishes at k = 2" in failed[0].message


def test_inputs_undetermined_where_every_equation_loses_them_is_a_violation() -> None:
    """Only the x2 equation carries u: at k = 2 no equation determines it."""
    text = TWO_ROUTES.replace("+ x1 + u", "+ x1").replace("expect minimum_phase", "")
    analysis, findings = _check(text)
    box = analysis["points"]["o"]["parameter_box"]
    assert box["equilibrium"]["outcome"] == "violated" and box["equilibrium"]["witness"] == {"k": 2.0}
    (found,) = [f for f in findings if f.rule == "point-not-equilibrium"]
    assert "at k = 2 the equilibrium equations do not determine the input(s) u" in found.message


CONTROL = """
# invented: the coupling c carries the input into x1; with c = 0 it cannot
plant coupling
param c = 1 in -1 .. 2
state x1 in -1 .. 1
state x2 in -1 .. 1
input u
rate x1 = -x1 + c*x2
rate x2 = u
output y = x2
point rest: x1 = 0, x2 = 0
expect state_linearizable at rest
"""


def test_controllability_rank_over_the_box_gives_an_exact_witness() -> None:
    analysis, findings = _check(CONTROL)
    ctrl = analysis["points"]["rest"]["parameter_box"]["controllability"]
    assert ctrl["outcome"] == "violated" and ctrl["witness"] == {"c": 0.0}
    # reference: numpy's Kalman rank of (A, B) at the witness
    A = np.array([[-1.0, ctrl["witness"]["c"]], [0.0, 0.0]])
    B = np.array([[0.0], [1.0]])
    assert np.linalg.matrix_rank(np.hstack([B, A @ B])) == 1
    assert "not-controllable" in _rules(findings)
    failed = [f for f in findings if f.rule == "expectation-failed"]
    assert len(failed) == 1 and "c = 0" in failed[0].message


@pytest.mark.parametrize("lo", ["0.2", "1.5"])
def test_controllability_proven_when_the_coupling_stays_away_from_zero(lo: str) -> None:
    analysis, findings = _check(CONTROL.replace("param c = 1 in -1 .. 2", f"param c = 2 in {lo} .. 3"))
    ctrl = analysis["points"]["rest"]["parameter_box"]["controllability"]
    assert ctrl["outcome"] == "proven"
    A = np.array([[-1.0, float(lo)], [0.0, 0.0]])  # numpy: full Kalman rank at the low end
    assert np.linalg.matrix_rank(np.hstack([[[0.0], [1.0]], A @ [[0.0], [1.0]]])) == 2
    assert not [f for f in findings if f.rule == "expectation-failed"]


def test_explain_shows_the_box_verdicts(tmp_path: Path) -> None:
    # the text derivation names each property over the box; JSON carries the same record
    import io
    import json

    from plantlint.cli import explain_file

    model = tmp_path / "tank.plant"
    model.write_text(_tank("0.70 in 0.55 .. 0.9", "0.60 in 0.55 .. 0.9"), encoding="utf-8")
    text, data = io.StringIO(), io.StringIO()
    assert explain_file(model, "op", "text", text, color=False) == 0
    assert "over the parameter box (gam1 in 0.55 .. 0.9, gam2 in 0.55 .. 0.9)" in text.getvalue()
    assert "minimum phase: proven" in text.getvalue()
    assert explain_file(model, "op", "json", data, color=False) == 0
    (op,) = json.loads(data.getvalue())["points"]
    assert op["parameter_box"]["zero_dynamics"]["outcome"] == "proven"
    assert max(_johansson_zeros(0.55, 0.55).real) < 0  # the worst corner, by the closed form


ROWS = """
# invented: two decoupled channels; the gain b of the first may vanish
plant channels
param b = 1 in -1 .. 2
state x1 in -1 .. 1
state x2 in -1 .. 1
input u1
input u2
rate x1 = -x1 + b*u1
rate x2 = -x2 + u2
output y1 = x1
output y2 = x2
point rest: x1 = 0, x2 = 0
expect relative_degree(y1) = 1 at rest
expect relative_degree(y2) = 1 at rest
"""


def test_relative_degree_at_a_point_over_the_box_per_output() -> None:
    analysis, findings = _check(ROWS)
    box = analysis["points"]["rest"]["parameter_box"]
    assert box["decoupling"]["outcome"] == "violated"
    rows = box["relative_degree"]
    assert rows["y1"]["outcome"] == "violated" and rows["y1"]["witness"] == {"b": 0.0}
    assert rows["y2"]["outcome"] == "proven"
    # reference: numpy Markov parameters C_1 A^k B at the witness all vanish (no relative degree)
    A, B, C1 = -np.eye(2), np.array([[0.0, 0.0], [0.0, 1.0]]), np.array([[1.0, 0.0]])
    assert all(not np.any(C1 @ np.linalg.matrix_power(A, k) @ B) for k in range(2))
    failed = [f for f in findings if f.rule == "expectation-failed"]
    assert len(failed) == 1 and "relative_degree(y1)" in failed[0].message and "b = 0" in failed[0].message
    assert {"decoupling-singular", "relative-degree-ill-defined"} <= set(_rules(findings))


PARAMETER_DEGREE = """plant reach
param a = 0.5 in 0 .. 2
state x1 in -1 .. 1
state x2 in -1 .. 1
input u
rate x1 = -x1 + x2 + ({gain})*u
rate x2 = -x2 + u
output y = x1
point rest: x1 = 0, x2 = 0, u = 0
expect relative_degree(y) = 1
"""


_a, _x1, _x2, _u = sp.symbols("a x1 x2 u")


@pytest.mark.parametrize(("gain", "reference", "holds"), [("a - 1", _a - 1, False), ("x1 - a", _x1 - _a, True),
                                                        ("2 + a*x2^2", 2 + _a * _x2**2, True),
                                                        ("x1^2 + a - 1", _x1**2 + _a - 1, True)])
def test_a_relative_degree_claim_holds_for_every_parameter_value(gain: str, reference: sp.Expr, holds: bool) -> None:
    """Invented plants. L_g y is the gain itself (sympy.diff of the rate by u, below). With
    gain a - 1 it vanishes for every state at a = 1, inside the range: there y has relative
    degree 2, so `relative_degree(y) = 1` over the box is false. x1 - a, 2 + a x2^2 and
    x1^2 + a - 1 vanish at some states but for no parameter value at every state: the claim
    holds (for the last no single state shows it, two together do)."""
    from plantlint.run.pipeline import analyse_bytes

    lg = sp.diff(-_x1 + _x2 + reference * _u, _u)
    identically_zero_at_1 = sp.expand(lg.subs(_a, 1)) == 0
    assert identically_zero_at_1 is (not holds)
    raw = analyse_bytes(PARAMETER_DEGREE.format(gain=gain).encode())
    claims = [f for f in raw.findings if f.rule == "expectation-failed"]
    if holds:
        assert claims == []
    else:
        (claim,) = claims
        assert not claim.undecided and "at a = 1 (within its range) L_g y vanishes for every state" in claim.message


def test_a_refined_point_stays_an_equilibrium_over_the_parameter_box() -> None:
    """The rounded four-state plant (conftest) with its damping d ranged over 0.5 .. 1.5. The
    refined point does not depend on d (x4 = 0), so it is an equilibrium for every d, to
    the refinement's accuracy; its residual is a 40-digit rounding, never exactly zero.
    Holding y1, y2 leaves the zero dynamics s^2 + d s + 3 - e^(1/10) (by hand), Hurwitz for
    every d > 0 since 3 - e^(1/10) > 0 (second-order Routh condition; math.exp below)."""
    import math

    from conftest import ROUNDED

    assert 3 - math.exp(0.1) > 0
    text = ROUNDED.replace(b"param d = 1\n", b"param d = 1 in 0.5 .. 1.5\n")
    assert text != ROUNDED
    raw = analyse_bytes(text)
    assert [f.rule for f in raw.findings] == ["point-refined"]  # the minimum-phase claim holds over the box


def test_a_row_that_vanishes_names_only_the_parameters_it_depends_on() -> None:
    """A reviewer's model (invented numbers): the decoupling rows are (a - 1, 0) for y1 and
    (0, b - 1) for y2 (by hand: L_g x1 and L_g x3). The row of y2 vanishes at b = 1 whatever
    a is; naming a as well (the box's midpoint) said nothing true about it."""
    text = b"""plant two_gains
param a = 0.5 in 0 .. 2
param b = 2 in 1 .. 2
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in -1 .. 1
input u1
input u2
rate x1 = -x1 + x2 + (a - 1)*u1
rate x2 = -x2 + u1 + u2
rate x3 = -x3 + x1 + (b - 1)*u2
output y1 = x1
output y2 = x3
point origin: x1 = 0, x2 = 0, x3 = 0, u1 = 0, u2 = 0
"""
    (finding,) = [f for f in analyse_bytes(text).findings if f.rule == "relative-degree-ill-defined"]
    assert "the row of y1 in A vanishes at a = 1 (exactly)" in finding.message
    assert "the row of y2 in A vanishes at b = 1 (exactly)" in finding.message


HOIST = (FIXTURES / "light" / "hoist.plant").read_text(encoding="utf-8")


def test_a_point_inside_its_ranges_at_nominal_values_is_checked_over_the_parameter_box() -> None:
    """The sprung hoist (tests/fixtures/light/hoist.plant) with a payload range to 1200 kg:
    held at z = 1/2, the force needed is F = k/2 + m g = 2500 + 9.81 m N (by hand), inside
    -5000 .. 5000 at the nominal 60 kg (3088.6 N) but 14272 N at the heavy end m = 1200;
    the sag z = -m g / k is -2.3544 m there, below -0.5 (by hand). Both are reported at the
    parameter value farthest out; with the payload range of the file (20 .. 120 kg, at most
    3677.2 N and -0.235 m) both are proven inside."""
    wide = HOIST.replace("in 20 .. 120 [kg]", "in 20 .. 1200 [kg]")
    analysis, findings = _check(wide)
    outside = {f.point: f.message for f in findings if f.rule == "point-outside-envelope"}
    assert set(outside) == {"held", "sag"}
    m = 1200  # the heavy end of the payload range: farthest out for both
    assert f"m = {m}" in outside["held"] and "14272" in outside["held"] and "above" in outside["held"]
    assert f"m = {m}" in outside["sag"] and "-2.3544" in outside["sag"] and "below" in outside["sag"]
    assert analysis["points"]["held"]["parameter_box"]["ranges"]["outcome"] == "violated"
    analysis, findings = _check(HOIST)
    assert not findings
    assert analysis["points"]["held"]["parameter_box"]["ranges"]["outcome"] == "proven"
    assert analysis["points"]["sag"]["parameter_box"]["ranges"]["outcome"] == "proven"


def test_a_value_that_touches_its_range_at_a_corner_of_the_box_is_not_decided() -> None:
    """The hoist's holding force reaches 2500 + 9.81 * 120 = 3677.2 N exactly at the heavy
    end of the payload range (by hand): with the force range ending there, the value stays
    inside the closed range, but interval bounds that touch it at the corner cannot show
    it. The range over the box is then not decided (an analysis-budget finding that says
    which bound), never passed silently and never reported as outside."""
    touching = HOIST.replace("input F [N] in -5000 .. 5000", "input F [N] in -5000 .. 3677.2")
    analysis, findings = _check(touching)
    assert analysis["points"]["held"]["parameter_box"]["ranges"]["outcome"] == "undecided"
    budget = [f for f in findings if f.rule == "analysis-budget" and f.point == "held"]
    assert budget and "F <= 3677.2" in budget[0].message, [f.message for f in findings]
    assert not [f for f in findings if f.rule == "point-outside-envelope"]
