"""Second-order Taylor forms over a box (kernel/taylor_forms.py).

References: every enclosure is held against numpy evaluating the same expression (sympy's
lambdify) at the corners, on a grid and at random points of the box; a form encloses the
value over the whole box, so no sampled value may fall outside its range. The expressions
are built with sympy, a general-purpose library, and compiled into the project's graph as a
model's expressions are. The cancellation checks use identities by hand.
"""

from __future__ import annotations

import itertools
import random
from fractions import Fraction

import numpy as np
import pytest
import sympy as sp
from flint import arb

from plantlint.kernel.taylor_forms import (Form, FormField, UndefinedOver, _parabola, box_forms, determinant,
                                     value_range)
from plantlint.kernel.dag import graph_of
from plantlint.kernel.regularity import ball
from plantlint.kernel.taylor import ArbField, Undefined, evaluate

x, y, z = sp.symbols("x y z")
XS = (x, y, z)


def _forms_of(exprs: list[sp.Expr], box: list[tuple[Fraction, Fraction]]) -> list:
    graph, nodes = graph_of(exprs, XS)
    return evaluate(graph.compile(nodes), box_forms(box), FormField(64))


def _samples(box: list[tuple[Fraction, Fraction]], rng: np.random.Generator, count: int = 400) -> np.ndarray:
    corners = np.array(list(itertools.product(*[(float(lo), float(hi)) for lo, hi in box])))
    grid = np.array(list(itertools.product(*[np.linspace(float(lo), float(hi), 9) for lo, hi in box])))
    inside = np.array([[rng.uniform(float(lo), float(hi)) for lo, hi in box] for _ in range(count)])
    return np.vstack([corners, grid, inside])


def _assert_encloses(expr: sp.Expr, value: object, box: list[tuple[Fraction, Fraction]],
                     rng: np.random.Generator) -> None:
    fn = sp.lambdify(XS, expr, "numpy")
    pts = _samples(box, rng)
    with np.errstate(all="ignore"):
        vals = np.asarray(fn(pts[:, 0], pts[:, 1], pts[:, 2]), dtype=float) * np.ones(len(pts))
    r = value_range(value)
    lo, hi = float(r.lower()), float(r.upper())
    slack = 1e-9 * max(1.0, abs(lo), abs(hi))
    assert np.all(np.isfinite(vals)), expr
    assert vals.min() >= lo - slack and vals.max() <= hi + slack, (expr, lo, hi, vals.min(), vals.max())


BOX = [(Fraction(1, 2), Fraction(3, 2)), (Fraction(-1), Fraction(1, 3)), (Fraction(2), Fraction(5, 2))]
CASES = [
    x * y - z ** 2 + 3,
    1 / x + y / z,
    sp.sin(3 * x + y) * sp.cos(z - x),
    sp.tan(y) + sp.exp(-x * z),
    sp.log(x + z) - sp.sqrt(z - y),
    sp.atan(x * y) + sp.asin(y / 2) - sp.acos(y / 3),
    sp.sinh(y) * sp.cosh(x) - sp.tanh(x * y),
    x ** sp.Rational(2, 3) * z ** sp.Rational(-5, 2),
    sp.atan2(y, x),  # x > 0: the quotient
    sp.atan2(z, y),  # y crosses 0, z > 0: the upper half-plane
    sp.atan2(-z, y - 2),  # the lower half-plane, x < 0
    z ** x,  # powx: exp(x log z)
    (x + y) ** 5 - (x - y) ** 4 * z,
    (1 + x * y) / (z ** 2 - x),
]


@pytest.mark.parametrize("expr", CASES, ids=[str(e) for e in CASES])
def test_forms_enclose_every_sampled_value(expr: sp.Expr) -> None:
    rng = np.random.default_rng(7)
    (value,) = _forms_of([expr], BOX)
    _assert_encloses(expr, value, BOX, rng)


def test_forms_enclose_random_expressions_on_random_boxes() -> None:
    """200 random compositions on random boxes, each held against 400+ numpy samples."""
    rng = np.random.default_rng(11)
    pyr = random.Random(11)
    unary = [sp.sin, sp.cos, sp.exp, sp.atan, sp.tanh, lambda e: sp.sqrt(2 + e ** 2), lambda e: 1 / (3 + e ** 2)]
    for _ in range(200):
        leaves = [x, y, z, sp.Rational(pyr.randint(-3, 3), pyr.randint(1, 3))]
        expr = pyr.choice(leaves[:3])
        for _ in range(pyr.randint(2, 6)):
            other = pyr.choice(leaves)
            op = pyr.randrange(4)
            expr = (expr + other if op == 0 else expr * other if op == 1 else expr - other
                    if op == 2 else pyr.choice(unary)(expr))
        box = []
        for _ in range(3):
            lo = Fraction(pyr.randint(-20, 20), 10)
            box.append((lo, lo + Fraction(pyr.randint(1, 15), 10)))
        (value,) = _forms_of([expr], box)
        _assert_encloses(expr, value, box, rng)


def test_the_quadratic_terms_cancel_exactly() -> None:
    """(x + y)^2 - (x - y)^2 - 4 x y = 0 and x^2 - x*x = 0 by hand: the forms hold exactly 0
    (the second-order terms cancel term by term, nothing is left over)."""
    for expr in [(x + y) ** 2 - (x - y) ** 2 - 4 * x * y, x ** 2 - x * x * sp.Integer(1)]:
        graph, nodes = graph_of([expr], XS)
        (value,) = evaluate(graph.compile(nodes), box_forms(BOX), FormField(64))
        r = value_range(value)
        assert abs(float(r.upper())) < 1e-12 and abs(float(r.lower())) < 1e-12


def test_the_inverse_mass_matrix_determinant_excludes_zero_where_balls_do_not() -> None:
    """det of M^-1 for M = [[p1 + 2 p2 cos q, p3 + p2 cos q], [p3 + p2 cos q, p3]] is 1/det M
    (by hand), positive; over a small box the forms exclude 0, keeping the cancellation
    between M22/det M times M11/det M and (M12/det M)^2, while the natural ball enclosure
    cannot even form the quotients (its det M holds 0). The numbers are a two-link arm's,
    invented; the bound is held against sympy's simplified 1/det M on a grid."""
    q, m = x, y
    p1, p2, p3 = 8.6 + 1.13 * m, 1.68 + 0.56 * m, 0.98 + 0.49 * m
    M11, M12, M22 = p1 + 2 * p2 * sp.cos(q), p3 + p2 * sp.cos(q), p3
    d = M11 * M22 - M12 ** 2
    entries = [M22 / d, -M12 / d, M11 / d]
    box = [(Fraction(0), Fraction(1, 8)), (Fraction(7), Fraction(8)), (Fraction(0), Fraction(0))]
    a11, a12, a22 = _forms_of(entries, box)
    det = determinant([[a11, a12], [a12, a22]])
    r = value_range(det)
    assert r > 0
    exact = sp.lambdify((x, y), sp.simplify(1 / d))
    grid = [(float(a), float(b)) for a in np.linspace(0, 0.125, 11) for b in np.linspace(7, 8, 11)]
    assert min(exact(*g) for g in grid) >= float(r.lower())
    graph, nodes = graph_of(entries, XS)
    with pytest.raises(Undefined):  # the natural enclosure of det M holds 0: no quotient at all
        evaluate(graph.compile(nodes), [ball(lo, hi) for lo, hi in box], ArbField(64))


def test_a_division_by_a_range_holding_zero_names_its_argument() -> None:
    graph, nodes = graph_of([1 / (x - 1) + z], XS)
    with pytest.raises(UndefinedOver) as caught:
        evaluate(graph.compile(nodes), box_forms(BOX), FormField(64))
    assert isinstance(caught.value.form, Form) and caught.value.form.side_sizes(3)[0] > 0


def test_atan2_across_its_branch_cut_is_undefined() -> None:
    """numpy.arctan2 jumps by 2 pi across y = 0 for x < 0: no form holds it."""
    assert np.arctan2(1e-12, -1.0) - np.arctan2(-1e-12, -1.0) == pytest.approx(2 * np.pi)
    graph, nodes = graph_of([sp.atan2(y, x - 2)], XS)
    with pytest.raises(UndefinedOver):
        evaluate(graph.compile(nodes), box_forms(BOX), FormField(64))


def test_the_parabola_range_holds_every_value_and_its_vertex() -> None:
    """l e + q e^2 over e in [-1, 1]: held against numpy on a fine grid, and tight at the
    vertex (min -l^2 / 4q for q > 0 when |l| <= 2q, by hand)."""
    rng = np.random.default_rng(3)
    e = np.linspace(-1, 1, 4001)
    for _ in range(300):
        l, q = rng.uniform(-3, 3), rng.uniform(-3, 3)
        r = _parabola(arb(l), arb(q))
        v = l * e + q * e * e
        assert float(r.lower()) <= v.min() + 1e-12 and v.max() - 1e-12 <= float(r.upper())
    r = _parabola(arb(1), arb(2))
    assert float(r.lower()) == pytest.approx(-1 / 8, abs=1e-8)  # the union rounds its radius


def test_an_eliminated_determinant_encloses_numpys() -> None:
    """A 4 x 4 matrix of forms (elimination, not cofactors) against numpy.linalg.det at
    samples of the box."""
    rng = np.random.default_rng(5)
    entries = [[(4 + x if i == j else 0) + sp.Rational(i - j, 5) * sp.cos(y + i) + sp.Rational(j, 7) * z
                for j in range(4)] for i in range(4)]
    box = [(Fraction(1), Fraction(6, 5)), (Fraction(0), Fraction(1, 5)), (Fraction(-1, 10), Fraction(1, 10))]
    forms = _forms_of([e for row in entries for e in row], box)
    det = determinant([forms[4 * i:4 * i + 4] for i in range(4)])
    fn = sp.lambdify(XS, sp.Matrix(entries), "numpy")
    r = value_range(det)
    for p in _samples(box, rng, 100):
        d = float(np.linalg.det(np.array(fn(*p), dtype=float)))
        assert float(r.lower()) - 1e-9 <= d <= float(r.upper()) + 1e-9
