"""kernel/laurent.py (zero tests and expansion in flint's polynomial ring) and the kernel's
lazily formed Jacobian entries, held against sympy done the ordinary way and published identities."""

from __future__ import annotations

import random

import pytest
import sympy as sp

from plantlint.kernel.laurent import expanded, identically_zero
from plantlint.kernel.lie import Kernel, confirm_zero
from plantlint.kernel.plant import Plant

a, b, c, d, x, y, m, t = sp.symbols("a b c d x y m t", real=True)


def _random_expr(rng: random.Random, atoms: list[sp.Expr], depth: int) -> sp.Expr:
    """A seeded random unexpanded expression: sums, products, small integer powers and
    monomial denominators of the atoms (the shape of bracket fields and minors)."""
    if depth == 0 or rng.random() < 0.2:
        if rng.random() < 0.3:
            return sp.Rational(rng.randint(-5, 5), rng.randint(1, 4))
        atom = rng.choice(atoms)
        return atom ** rng.choice([1, 1, 2, -1]) if not atom.is_Number else atom
    kind = rng.choice(["add", "mul", "pow"])
    if kind == "pow":
        return _random_expr(rng, atoms, depth - 1) ** rng.randint(2, 3)
    parts = [_random_expr(rng, atoms, depth - 1) for _ in range(rng.randint(2, 3))]
    return sp.Add(*parts) if kind == "add" else sp.Mul(*parts)


@pytest.mark.parametrize("seed", range(12))
def test_expanded_is_sympy_expand(seed: int) -> None:
    """The rebuilt sum of monomials is structurally the expression sympy.expand returns
    (reference: sympy's expand, the canonical form _normal used before)."""
    rng = random.Random(seed)
    atoms = [x, y, m, sp.sin(t), sp.cos(t), sp.cos(x - y), sp.tan(t)]
    for _ in range(8):
        e = _random_expr(rng, atoms, 4)
        quick = expanded(e)
        if e.is_Number or e.is_Symbol or quick is None:
            continue
        assert quick == sp.expand(e), e


@pytest.mark.parametrize("seed", range(12))
def test_zero_tests_agree_with_cancel(seed: int) -> None:
    """identically_zero on differences of equal and unequal rational expressions agrees with
    sympy's cancel(together(.)) (reference: sympy's rational-function normal form); an
    expression and its expansion differ by an identically zero expression."""
    rng = random.Random(100 + seed)
    atoms = [x, y, m]
    for _ in range(6):
        e = _random_expr(rng, atoms, 4)
        same = e - sp.expand(e)
        if same != 0:  # sympy may cancel it already
            assert identically_zero(same) is True
        other = e - _random_expr(rng, atoms, 3)
        answer = identically_zero(other)
        assert answer is not None  # a Laurent polynomial in symbols: always decided
        assert answer == (sp.cancel(sp.together(other)) == 0), other


def test_published_identities() -> None:
    # Brahmagupta-Fibonacci two-square identity (any algebra text, e.g. Hardy & Wright,
    # An Introduction to the Theory of Numbers, sec. 20.1; from memory)
    two = (a**2 + b**2) * (c**2 + d**2) - (a * c - b * d) ** 2 - (a * d + b * c) ** 2
    assert identically_zero(two) is True
    # Euler's four-square identity (Hardy & Wright sec. 20.5; from memory)
    p = sp.symbols("p1:5")
    q = sp.symbols("q1:5")
    z = [p[0]*q[0] - p[1]*q[1] - p[2]*q[2] - p[3]*q[3], p[0]*q[1] + p[1]*q[0] + p[2]*q[3] - p[3]*q[2],
         p[0]*q[2] - p[1]*q[3] + p[2]*q[0] + p[3]*q[1], p[0]*q[3] + p[1]*q[2] - p[2]*q[1] + p[3]*q[0]]
    four = sum(v**2 for v in p) * sum(v**2 for v in q) - sum(v**2 for v in z)
    assert identically_zero(four) is True
    assert identically_zero(four + 1) is False
    # the same with the atoms sin(t), cos(t) and a monomial denominator: still a ring identity
    s, co = sp.sin(t), sp.cos(t)
    assert identically_zero(((s**2 + m**2) * (co**2 + x**2) - (s*co - m*x)**2 - (s*x + m*co)**2) / m) is True


def test_only_proofs() -> None:
    """Zero is claimed only by ring identities, non-zero only for Laurent polynomials in symbols."""
    assert identically_zero(sp.sin(t) ** 2 + sp.cos(t) ** 2 - 1) is None  # true, but not a ring identity
    assert identically_zero(sp.sin(t) * x) is None  # not claimed non-zero through atoms
    assert identically_zero(x / (x + 1) + 1 / (x + 1) - 1) is None  # the inverse of a sum is an atom
    assert identically_zero((x + y) ** 2 - x**2) is False
    assert identically_zero(x / m - x * m / m**2) is True
    assert identically_zero(sp.Float(0.5) * x * y - x) is None  # floats are not read
    assert expanded(sp.exp(x) * (x + 1)) is None  # exp powers combine: left to sympy
    assert expanded(sp.sqrt(x) * (x + 1)) is None
    assert expanded((x + 1) / (x + 2)) is None
    # confirm_zero keeps its answers: cancel decides the rational case, trigsimp the small trig one
    assert confirm_zero(x / (x + 1) + 1 / (x + 1) - 1).proven_zero
    assert confirm_zero(sp.sin(t) ** 2 + sp.cos(t) ** 2 - 1).proven_zero
    assert confirm_zero(x / m - y / m).proven_nonzero


def test_bracket_of_lazy_entries_is_the_matrix_formula() -> None:
    """Kernel.bracket (Jacobian entries formed one at a time) equals DY X - DX Y with sympy's
    Matrix.jacobian (reference: sympy done the plain way), and brackets satisfy the Jacobi
    identity [X,[Y,Z]] + [Y,[Z,X]] + [Z,[X,Y]] = 0 (any differential-geometry text, e.g.
    Isidori, Nonlinear Control Systems, 3rd ed., sec. 1.2; from memory)."""
    states = [x, y, t]
    u = sp.Symbol("u")
    X = (y * sp.sin(t), sp.Integer(0), x**2 / m)
    Y = (sp.Integer(1), sp.cos(t) * x, sp.Integer(0))
    Z = (t * y, x, sp.tan(t))
    kernel = Kernel(Plant.from_matrices("p", states, [u], list(X), [list(Y)], [x]))
    for P, Q in ((X, Y), (Y, Z), (Z, X)):
        reference = sp.Matrix(Q).jacobian(states) * sp.Matrix(P) - sp.Matrix(P).jacobian(states) * sp.Matrix(Q)
        assert all(sp.expand(e - r) == 0 for e, r in zip(kernel.bracket(P, Q), reference))
    jacobi = [sum(v) for v in zip(kernel.bracket(X, kernel.bracket(Y, Z)), kernel.bracket(Y, kernel.bracket(Z, X)),
                                   kernel.bracket(Z, kernel.bracket(X, Y)))]
    assert all(sp.simplify(e) == 0 for e in jacobi)
    assert kernel.jacobian(X) == sp.Matrix(X).jacobian(states)


@pytest.mark.parametrize("seed", range(4))
def test_ring_brackets_are_expanded_tree_brackets(seed: int) -> None:
    """ad_f^k g and brackets formed in the ring (Kernel.expanded_ad / expanded_bracket) are,
    entry by entry, sympy.expand of the brackets by tree differentiation (reference: sympy's
    diff and expand, the route the distributions took before)."""
    rng = random.Random(300 + seed)
    states = [x, y, t]
    u = sp.Symbol("u")
    atoms = [x, y, m, sp.sin(t), sp.cos(t), sp.cos(x - y), sp.tan(t)]

    def entry() -> sp.Expr:
        return _random_expr(rng, atoms, 2) if rng.random() < 0.8 else sp.Integer(0)

    f = [y, entry(), entry()]
    g = [sp.Integer(0), entry(), sp.Integer(1)]
    kernel = Kernel(Plant.from_matrices("p", states, [u], f, [g], [x]))
    assert kernel.field_ring() is not None

    def same(ours: tuple[sp.Expr, ...] | None, theirs: list[sp.Expr]) -> bool:
        # srepr: the very expression sympy builds (the ring writes its sums and products in
        # sympy's canonical order without sympy's flattening)
        return ours is not None and [sp.srepr(e) for e in ours] == [sp.srepr(e) for e in theirs]

    for k in range(3):
        assert same(kernel.expanded_ad(0, k), [sp.expand(e) for e in kernel.ad(0, k)])
    X, Y = kernel.expanded_ad(0, 0), kernel.expanded_ad(0, 1)
    assert same(kernel.expanded_bracket(X, Y), [sp.expand(e) for e in kernel.bracket(X, Y)])


def test_ring_declines_what_it_cannot_read() -> None:
    u = sp.Symbol("u")
    for f1 in (sp.exp(x), sp.Float(0.5) * x, sp.exp(x) ** sp.Rational(1, 2)):
        kernel = Kernel(Plant.from_matrices("p", [x, y], [u], [y, f1], [[sp.Integer(0), sp.Integer(1)]], [x]))
        assert kernel.field_ring() is None and kernel.expanded_ad(0, 1) is None
    # a root of a state or of a sum is read as an atom B^(1/q): its powers and inverse are
    # powers of it, and its derivative (1/q) B^(1/q) B' / B stays in the ring
    for f1 in (sp.sqrt(x), 1 / (x + 1) ** sp.Rational(1, 2), x ** sp.Rational(3, 2) - y * sp.cbrt(x)):
        kernel = Kernel(Plant.from_matrices("p", [x, y], [u], [y, f1], [[sp.Integer(0), sp.Integer(1)]], [x]))
        assert kernel.field_ring() is not None and kernel.expanded_ad(0, 1) is not None
    # atan's derivative 1/(x^2 + 1) is the inverse of a sum: read (d/dx atan x by sympy's diff)
    kernel = Kernel(Plant.from_matrices("p", [x, y], [u], [y, sp.atan(x)], [[sp.Integer(0), sp.Integer(1)]], [x]))
    ring = kernel.field_ring()
    assert ring is not None and sp.diff(sp.atan(x), x) in ring.atoms


@pytest.mark.parametrize("seed", range(6))
def test_ring_brackets_of_rational_fields_are_the_tree_brackets(seed: int) -> None:
    """Fields with inverses of sums (a mass matrix's determinant, a gantry crane's
    m_c + m_p sin(th)^2, a rate over (w - c)), irrational constants and roots of states and
    of sums (a tank's Torricelli outflow sqrt(h)) are read in the ring with the sums'
    inverses, the constants and the roots as atoms. The brackets formed there are the
    brackets by tree differentiation as functions (reference: sympy's diff; the numerator of together(difference) multiplies out
    to 0 for ad_f g, and ad_f^2 g has the same values to 35 digits at random rational points,
    by sympy's evalf at 50)."""
    rng = random.Random(700 + seed)
    states = [x, y, t]
    u = sp.Symbol("u")
    dets = [m + sp.sin(t) ** 2, x - sp.Rational(1, 10**9), 2 + sp.cos(x - y) * y]
    atoms = [x, y, m, sp.sin(t), sp.cos(t), *(1 / e for e in dets)]
    if seed % 2:  # irrational constants (sqrt(3)/2 of three-phase models, 2^(1/3), pi)
        atoms += [sp.sqrt(3), sp.cbrt(2), sp.pi]
    if seed >= 4:  # roots of states and sums (x > 0 at the points below)
        atoms += [sp.sqrt(x), sp.cbrt(x), sp.sqrt(1 + y**2), 1 / sp.sqrt(x + 3)]

    def entry() -> sp.Expr:
        return _random_expr(rng, atoms, 2) if rng.random() < 0.8 else sp.Integer(0)

    f = [y, entry(), entry()]
    if seed >= 4:  # a root in f whatever the draw (a Torricelli outflow, a cube-root law)
        f[1], f[2] = f[1] + sp.sqrt(1 + y**2) * x, f[2] - sp.cbrt(x)
    g = [sp.Integer(0), entry(), 1 / dets[rng.randrange(3)]]
    kernel = Kernel(Plant.from_matrices("p", states, [u], f, [g], [x]))
    ring = kernel.field_ring()
    assert ring is not None
    if seed >= 4:
        assert any(a.is_Pow and not a.exp.is_Integer and not a.base.is_number for a in ring.atoms)
    tree = [g]
    for _ in range(2):  # ad_f g, ad_f^2 g by sympy's diff: [f, Y] = DY f - Df Y
        Y = tree[-1]
        tree.append([sum(sp.diff(Y[i], s) * f[k] - sp.diff(f[i], s) * Y[k] for k, s in enumerate(states))
                     for i in range(3)])
    for k in range(3):
        ours = kernel.expanded_ad(0, k)
        assert ours is not None
        for mine, theirs in zip(ours, tree[k]):
            point = {x: sp.Rational(rng.randint(2, 40), 7), y: sp.Rational(rng.randint(-9, 9), 5),
                     t: sp.Rational(rng.randint(-9, 9), 4), m: sp.Rational(3, 2)}
            ours_value, their_value = sp.N(mine.subs(point), 50), sp.N(theirs.subs(point), 50)
            assert abs(ours_value - their_value) <= sp.Float("1e-35", 50) * (1 + abs(their_value))
        if k < 2:
            # the numerator over the common denominator multiplies out to 0 (sympy's cancel
            # can return two opposite large rationals unsummed)
            assert all(sp.expand(sp.fraction(sp.together(mine - theirs))[0]) == 0
                       for mine, theirs in zip(ours, tree[k]))


def test_a_rate_the_ring_cannot_read_leaves_the_higher_brackets_to_sympy() -> None:
    """Two masses on springs with v2^200 in the second rate (a mutant, seed 9511, wrote
    `-c*v2 ^ k*(...)` with k = 200): the ring reads g but not that rate, so ad_f g is not
    formed there. The distributions stage used to stop with an internal error
    ("'NoneType' object is not subscriptable"); it now takes the brackets from sympy. At the
    rest point, an equilibrium, the controllability rank is the Kalman rank of the
    linearisation (sympy's Jacobian, numpy's rank)."""
    import numpy as np

    from plantlint.run.pipeline import analyse_bytes

    text = """plant two_masses
const k = 200
const eps = 50
const c = 2
const mass = 1.5
state p1 in -1/5 .. 1/5
state p2 in -1/5 .. 1/5
state v1 in -2 .. 2
state v2 in -2 .. 2
input F1 in -100 .. 100
rate p1 = v1
rate p2 = v2
rate v1 = (F1 - c*v1 - k*(p1 - (p2 - p1) + eps*p1^3))/mass
rate v2 = (-c*v2 ^ k*(p2 - p1 + eps*(p2 - p1)^3))/mass
output far_end = p2
point rest: p1 = 0, p2 = 0, v1 = 0, v2 = 0
expect state_linearizable
"""
    raw = analyse_bytes(text.encode())
    assert raw.stop is None and "distributions" in raw.stages
    p1, p2, v1, v2 = X = sp.symbols("p1 p2 v1 v2")
    f = sp.Matrix([v1, v2, (-2 * v1 - 200 * (p1 - (p2 - p1) + 50 * p1**3)) / sp.Rational(3, 2),
                   (-2 * v2**200 * (p2 - p1 + 50 * (p2 - p1) ** 3)) / sp.Rational(3, 2)])
    rest = {x: 0 for x in X}
    A = np.array(f.jacobian(X).subs(rest), dtype=float)
    B = np.array([[0.0], [0.0], [1 / 1.5], [0.0]])
    kalman = np.hstack([np.linalg.matrix_power(A, j) @ B for j in range(4)])
    assert raw.analysis["points"]["rest"]["controllability_rank"] == np.linalg.matrix_rank(kalman) == 2
