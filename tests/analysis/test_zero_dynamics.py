"""Zero dynamics and normal form, held against outside sources: scipy's transmission
zeros for linear plants, published worked examples for nonlinear ones (book and
example beside each test), and closed forms derived by hand where named so."""

from __future__ import annotations


import numpy as np
import pytest
import scipy.linalg
import scipy.signal
import sympy as sp

from plantlint.kernel.lie import Kernel
from plantlint.analysis.normal_form import normal_form_at
from plantlint.analysis.serialise import normal_form_json
from plantlint.kernel.plant import Plant
from plantlint.analysis.serialise import zero_dynamics_json
from plantlint.analysis.zero_dynamics import zero_dynamics_at
from conftest import ROUNDED, assert_same_set, integer_system, linear_plant, markov_degrees, rosenbrock_zeros

x1, x2, x3 = sp.symbols("x1 x2 x3")
u = sp.Symbol("u")


# -- linear plants ------------------------------------------------------------------


def decoupling(A: np.ndarray, B: np.ndarray, C: np.ndarray, r: list[int]) -> np.ndarray:
    return np.array([C[i] @ np.linalg.matrix_power(A, r[i] - 1) @ B for i in range(len(r))], dtype=float)


def at_origin(P: Plant) -> dict[sp.Symbol, sp.Expr]:
    return {s: sp.Integer(0) for s in P.states}


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_siso_zeros_equal_scipy_transmission_zeros() -> None:
    # reference: scipy.signal.ss2zpk (zeros of the transfer function numerator)
    rng = np.random.default_rng(2024)
    checked = 0
    while checked < 30:
        n = int(rng.integers(3, 6))
        A, B, C = integer_system(rng, n, 1, 1)
        r = markov_degrees(A, B, C)
        if r is None or r[0] >= n:
            continue
        P = linear_plant(A, B, C)
        zd = zero_dynamics_at(Kernel(P), r, at_origin(P), "origin")
        z, _, _ = scipy.signal.ss2zpk(A.astype(float), B.astype(float), C.astype(float), np.zeros((1, 1)))
        finite = [complex(v) for v in z if abs(v) < 1e6]
        assert zd.dimension == n - r[0] and zd.exact and zd.consistent
        assert_same_set(list(zd.eigenvalues), finite, tol=1e-5)
        expected = ("non_minimum_phase" if any(v.real > 1e-6 for v in finite)
                    else "minimum_phase" if all(v.real < -1e-6 for v in finite) else None)
        if expected is not None:
            assert zd.verdict == expected
        checked += 1


def test_square_mimo_zeros_equal_rosenbrock_pencil() -> None:
    # reference: finite generalised eigenvalues of [[A, B], [-C, 0]] - s blockdiag(I, 0)
    # via scipy.linalg.eig(M, N)
    rng = np.random.default_rng(99)
    checked = 0
    while checked < 20:
        n = int(rng.integers(3, 6))
        A, B, C = integer_system(rng, n, 2, 2)
        r = markov_degrees(A, B, C)
        if r is None or sum(r) >= n or abs(np.linalg.det(decoupling(A, B, C, r))) < 0.5:
            continue
        P = linear_plant(A, B, C)
        zd = zero_dynamics_at(Kernel(P), r, at_origin(P), "origin")
        finite = rosenbrock_zeros(A, B, C)
        assert zd.dimension == n - sum(r) and zd.consistent
        assert_same_set(list(zd.eigenvalues), finite, tol=1e-6)
        checked += 1


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_irrational_data_are_decided_in_ball_arithmetic() -> None:
    # A scaled by sqrt(2): zeros scale by sqrt(2) too; reference scipy ss2zpk on the scaled data.
    # The signs come from rigorous balls of the exact numbers: no tolerance is involved.
    rng = np.random.default_rng(5)
    done = 0
    while done < 5:
        A, B, C = integer_system(rng, 4, 1, 1)
        r = markov_degrees(A, B, C)
        if r is None or r[0] >= 4:
            continue
        P = linear_plant(A, B, C, scale=sp.sqrt(2))
        zd = zero_dynamics_at(Kernel(P), r, at_origin(P), "origin")
        As = A * np.sqrt(2.0)
        z, _, _ = scipy.signal.ss2zpk(As, B.astype(float), C.astype(float), np.zeros((1, 1)))
        assert zd.exact and zd.tolerance is None and zd.consistent
        assert_same_set(list(zd.eigenvalues), [complex(v) for v in z if abs(v) < 1e6], tol=1e-5)
        done += 1


def test_full_relative_degree_has_no_zero_dynamics() -> None:
    # triple integrator with y = x1: r = n = 3, no zeros (scipy agrees: ss2zpk gives none)
    P = Plant.from_matrices("int3", [x1, x2, x3], [u], [x2, x3, 0], [[0, 0, 1]], [x1])
    zd = zero_dynamics_at(Kernel(P), [3], at_origin(P), "origin")
    assert zd.verdict == "not_applicable"
    assert zero_dynamics_json(zd) == {"dimension": 0, "eigenvalues": [], "verdict": "not_applicable"}


# -- a zero crossing the imaginary axis ------------------------------------------------
@pytest.mark.parametrize(
    "a, verdict",
    [(sp.Rational(-1, 2), "minimum_phase"), (sp.Rational(-1, 10**9), "minimum_phase"),
     (sp.Integer(0), "critical"), (sp.Rational(1, 10**9), "non_minimum_phase"), (sp.Integer(3), "non_minimum_phase")],
)
def test_linear_family_zero_at_a(a: sp.Rational, verdict: str) -> None:
    # controllable canonical form of (s - a) / ((s+1)(s+2)(s+3)) (common practice): the
    # zero is exactly a; at a = 0 the zero sits on the imaginary axis (decided exactly)
    xs = [x1, x2, x3]
    P = Plant.from_matrices("fam", xs, [u], [x2, x3, -6 * x1 - 11 * x2 - 6 * x3], [[0, 0, 1]], [-a * x1 + x2])
    zd = zero_dynamics_at(Kernel(P), [2], at_origin(P), "rest")
    assert zd.verdict == verdict and zd.exact
    assert zd.characteristic_polynomial == str(sp.Symbol("s") - a)
    assert zero_dynamics_json(zd)["eigenvalues"] == [[float(a), 0.0]]
    rule = {"critical": ["zero-dynamics-critical"], "non_minimum_phase": ["zero-dynamics-unstable"]}
    assert [f.rule for f in zd.findings] == rule.get(verdict, [])


@pytest.mark.parametrize("a, verdict", [(-1, "minimum_phase"), (0, "critical"), (2, "non_minimum_phase")])
def test_nonlinear_family_with_ranged_parameter(a: int, verdict: str) -> None:
    # x1' = a x1 - x1^3 + x2, x2' = u, y = x2 (invented): zero dynamics x1' = a x1 - x1^3,
    # whose linearisation at 0 is a (sympy's derivative is the reference)
    k = sp.Symbol("k")
    P = Plant.from_matrices("nlfam", [x1, x2], [u], [k * x1 - x1**3 + x2, 0], [[0, 1]], [x2],
                            params=(k,), param_nominal={k: sp.Integer(a)},
                            param_box={k: (sp.Integer(-3), sp.Integer(3))})
    zd = zero_dynamics_at(Kernel(P), [1], at_origin(P), "rest")
    assert zd.verdict == verdict
    reference = sp.diff(a * x1 - x1**3, x1).subs(x1, 0)
    assert zd.eigenvalues == (complex(reference),)


def test_axis_roots_inside_irreducible_factor() -> None:
    # zeros = roots of s^4 + s^2 - 1 (irreducible over Q): two real roots +-0.786 and two
    # exactly on the axis, +-1.272i; reference numpy.roots. Controllable canonical form
    # (common practice): the output row holds the numerator's coefficients.
    coeffs = [-1, 0, 1, 0, 1]  # c(s) = -1 + s^2 + s^4, monic degree 4
    n = 6
    xs = sp.symbols("q1:7")
    den = [1, 2, 3, 4, 5, 6]  # any stable-looking denominator; zeros do not depend on it
    f = [xs[i + 1] for i in range(n - 1)] + [-sum(den[i] * xs[i] for i in range(n))]
    h = [sum(coeffs[i] * xs[i] for i in range(5))]
    P = Plant.from_matrices("axis", list(xs), [u], f, [[0] * (n - 1) + [1]], h)
    zd = zero_dynamics_at(Kernel(P), [2], {s: 0 for s in xs}, "rest")
    assert zd.verdict == "non_minimum_phase" and zd.exact
    ref = np.roots(coeffs[::-1])
    assert_same_set(list(zd.eigenvalues), [complex(v) for v in ref], tol=1e-9)
    assert sum(1 for z in zd.eigenvalues if z.real == 0.0) == 2  # exactly on the axis


# -- published nonlinear examples ----------------------------------------------------------
def test_khalil_example_13_8() -> None:
    # Khalil, Nonlinear Systems 3rd ed., Example 13.8 (from memory):
    # x1' = -x1 + (2 + x3^2)/(1 + x3^2) u, x2' = x3, x3' = x1 x3 + u, y = x2.
    # Relative degree 2; zero dynamics x1' = -x1 (eta' = -eta): minimum phase.
    P = Plant.from_matrices("khalil", [x1, x2, x3], [u], [-x1, x3, x1 * x3],
                            [[(2 + x3**2) / (1 + x3**2), 0, 1]], [x2])
    K = Kernel(P)
    zd = zero_dynamics_at(K, [2], at_origin(P), "origin")
    assert zd.verdict == "minimum_phase" and zd.eigenvalues == (-1 + 0j,)
    nf = normal_form_at(K, [2], at_origin(P))
    assert nf.xi == ("x2", "x3") and nf.invertible and nf.jacobian_rank == 3
    assert nf.zero_dynamics == ("x1' = -x1",)
    # the book's input-free coordinate (-x1 + x3 + atan x3) is not among states or
    # their sums/differences, so the preference cannot be met here
    assert nf.input_free is False


def test_khalil_field_controlled_dc_motor() -> None:
    # Khalil, Nonlinear Systems 3rd ed., field-controlled DC motor of ch. 13 (from memory):
    # x1' = -a x1 + u, x2' = -b x2 + k - c x1 x3, x3' = theta x1 x2, y = x3.
    # Relative degree 2 where x2 != 0; zero dynamics x2' = -b x2 + k, stable at k/b.
    a, b, c, th, k = 2, 3, 1, 5, 6  # numbers invented
    P = Plant.from_matrices("dc", [x1, x2, x3], [u], [-a * x1, -b * x2 + k - c * x1 * x3, th * x1 * x2],
                            [[1, 0, 0]], [x3])
    K = Kernel(P)
    point = {x1: sp.Integer(0), x2: sp.Integer(2), x3: sp.Integer(7)}
    zd = zero_dynamics_at(K, [2], point, "run")
    assert zd.verdict == "minimum_phase" and zd.eigenvalues == (-b + 0j,)
    nf = normal_form_at(K, [2], point)
    assert nf.eta == ("x2",) and nf.input_free
    assert nf.zero_dynamics == ("x2' = 6 - 3*x2",)
    # at x2 = 0 the decoupling entry theta x2 vanishes: relative degree not defined there
    assert zero_dynamics_at(K, [2], {x1: 0, x2: 0, x3: 0}, "bad").verdict == "undefined"


def test_slotine_li_internal_dynamics_cubic() -> None:
    # Slotine & Li, Applied Nonlinear Control (1991), sec. 6.1, example with
    # x1' = x2^3 + u, x2' = u, y = x1 (from memory): internal dynamics x2' + x2^3 = 0,
    # asymptotically stable, but the linearisation has eigenvalue 0: a critical case.
    P = Plant.from_matrices("sl", [x1, x2], [u], [x2**3, 0], [[1, 1]], [x1])
    K = Kernel(P)
    zd = zero_dynamics_at(K, [1], at_origin(P), "origin")
    assert zd.verdict == "critical" and zd.exact and zd.eigenvalues == (0j,)
    assert [f.rule for f in zd.findings] == ["zero-dynamics-critical"]
    assert zd.findings[0].anchor == "point origin" and zd.findings[0].severity.value == "warning"
    nf = normal_form_at(K, [1], at_origin(P))
    # eta = x1 - x2 has L_g eta = 0; on y = 0, x2 = -eta so eta' = x2^3 = -eta^3
    assert nf.eta == ("x1 - x2",) and nf.input_free
    assert nf.zero_dynamics == ("eta1 = x1 - x2", "eta1' = -eta1^3")


def crane() -> Plant:
    """Gantry crane of the plant-language contract (demo numbers, invented)."""
    x, v, th, w = sp.symbols("x v th w")
    g, m_c, m_p, L = sp.Rational(981, 100), sp.Integer(12), sp.Rational(7, 2), sp.Rational(11, 5)
    den = m_c + m_p * sp.sin(th) ** 2
    f = [v, m_p * sp.sin(th) * (L * w**2 + g * sp.cos(th)) / den, w,
         -(m_p * L * w**2 * sp.sin(th) * sp.cos(th) + (m_c + m_p) * g * sp.sin(th)) / (L * den)]
    gcol = [0, 1 / den, 0, -sp.cos(th) / (L * den)]
    return Plant.from_matrices("crane", [x, v, th, w], [sp.Symbol("F")], f, [gcol], [x])


def test_crane_zero_dynamics_is_the_fixed_pivot_pendulum() -> None:
    # Holding the trolley still leaves a simple pendulum th'' = -(g/L) sin th (handbook:
    # small-oscillation frequency sqrt(g/L)). Hanging: +-i sqrt(g/L), exactly on the axis.
    # Inverted (th = pi): +-sqrt(g/L), unstable (the classic cart-pole result).
    P = crane()
    x, v, th, w = P.states
    K = Kernel(P)
    omega = (9.81 / 2.2) ** 0.5
    hanging = zero_dynamics_at(K, [2], {x: 0, v: 0, th: 0, w: 0}, "rest")
    assert hanging.verdict == "critical" and hanging.exact
    assert_same_set(list(hanging.eigenvalues), [1j * omega, -1j * omega], tol=1e-12)
    assert all(z.real == 0.0 for z in hanging.eigenvalues)
    assert "\u00b1" in hanging.findings[0].message
    upright = zero_dynamics_at(K, [2], {x: 0, v: 0, th: sp.pi, w: 0}, "up")
    assert upright.verdict == "non_minimum_phase"
    assert_same_set(list(upright.eigenvalues), [omega, -omega], tol=1e-12)
    nf = normal_form_at(K, [2], {x: 0, v: 0, th: 0, w: 0})
    # the pendulum written out: w' = -(g/L) sin th with g/L = 9.81/2.2 = 981/220
    assert nf.eta == ("th", "w") and nf.zero_dynamics == ("th' = w", "w' = -981*sin(th)/220")


# -- numeric route ---------------------------------------------------------------------------
def test_transcendental_point_against_hand_derivative() -> None:
    # x1' = x1 sin(x1) - (1/3) sin(1/3) + x2, x2' = u, y = x2 (invented); zero dynamics
    # x1' = x1 sin x1 - c, linearisation sin(1/3) + cos(1/3)/3 (sympy.diff as reference)
    c = sp.Rational(1, 3)
    P = Plant.from_matrices("tr", [x1, x2], [u], [x1 * sp.sin(x1) - c * sp.sin(c) + x2, 0], [[0, 1]], [x2])
    zd = zero_dynamics_at(Kernel(P), [1], {x1: c, x2: 0}, "p")
    ref = float(sp.diff(x1 * sp.sin(x1), x1).subs(x1, c))
    assert zd.exact and zd.verdict == "non_minimum_phase"  # the sign from a ball, proven
    assert abs(zd.eigenvalues[0].real - ref) < 1e-14 and zd.eigenvalues[0].imag == 0


def test_an_eigenvalue_exactly_zero_but_not_written_so_is_proven_on_the_axis() -> None:
    # the coefficient sin(1/3)^2 + cos(1/3)^2 - 1 is exactly 0 but not written so (the
    # Pythagorean identity; sympy's simplify below). Its ball holds 0 without excluding it;
    # the exact polynomial p(s) = s is odd, so the root is its own mirror image: Re = 0.
    s, co = sp.sin(sp.Rational(1, 3)), sp.cos(sp.Rational(1, 3))
    assert sp.simplify(s**2 + co**2 - 1) == 0
    P = Plant.from_matrices("crit", [x1, x2], [u], [(s**2 + co**2 - 1) * x1 + s * x2, 0], [[0, 1]], [x2])
    zd = zero_dynamics_at(Kernel(P), [1], at_origin(P), "p")
    assert zd.verdict == "critical" and zd.exact and zd.tolerance is None and zd.eigenvalues == (0j,)
    assert "exactly on the imaginary axis: the characteristic polynomial of the zero dynamics is odd in s" \
        in zd.findings[0].message


def test_roots_shared_by_p_of_s_and_p_of_minus_s_are_proven_on_the_axis() -> None:
    """Invented: with xi held at 0, z' = M z, M = diag([[sqrt 2, 1], [-3, -sqrt 2]], -1),
    whose characteristic polynomial is (s^2 + 1)(s + 1) = s^3 + s^2 + s + 1 (sympy below):
    no coefficient is zero and p is neither even nor odd. The balls bound the real parts
    of +-i without signing them. gcd(p(s), p(-s)) = s^2 + 1 (sympy's gcd, checked by exact
    division), so each root of it has its mirror image among the roots: +-i are on the
    axis, and the claim fails, decided."""
    from plantlint.run.pipeline import analyse_bytes

    sq = sp.sqrt(2)
    z1, z2, z3, xi = sp.symbols("z1 z2 z3 xi", real=True)
    s = sp.Symbol("s")
    M = sp.Matrix([[sq, 1, 0], [-3, -sq, 0], [0, 0, -1]])
    p = sp.expand(M.charpoly(s).as_expr())
    assert p == s**3 + s**2 + s + 1 and sp.gcd(p, p.subs(s, -s)) == s**2 + 1
    f = [sq * z1 + z2 + xi, -3 * z1 - sq * z2, -z3 + xi, 0]
    P = Plant.from_matrices("near", [z1, z2, z3, xi], [u], f, [[0, 0, 0, 1]], [xi])
    zd = zero_dynamics_at(Kernel(P), [1], at_origin(P), "p")
    assert zd.verdict == "critical" and zd.exact and zd.tolerance is None
    assert_same_set(list(zd.eigenvalues), [-1, 1j, -1j], tol=1e-12)
    assert "exactly on the imaginary axis: they are roots of both p(s) and p(-s)" in zd.findings[0].message
    assert "common factor s^2 + 1, exact" in zd.findings[0].message
    raw = analyse_bytes(b"""plant near
state z1 in -1 .. 1
state z2 in -1 .. 1
state z3 in -1 .. 1
state xi in -1 .. 1
input u
rate z1 = sqrt(2)*z1 + z2 + xi
rate z2 = -3*z1 - sqrt(2)*z2
rate z3 = -z3 + xi
rate xi = u
output y = xi
point o: z1 = 0, z2 = 0, z3 = 0, xi = 0
expect minimum_phase at o
""")
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert not claim.undecided and "have eigenvalues on the imaginary axis (±1i)" in claim.message


def test_eigenvalues_off_the_axis_by_less_than_the_balls_see_are_critical_within_a_bound() -> None:
    """Invented: with xi held at 0, z' = [[e, 1], [-1, e]] z with e = sqrt(2)/10^300, whose
    eigenvalues are e +- i (by hand; sympy below): unstable, by less than the balls can
    resolve at 512 bits (about 1e-154). p(s) = s^2 - 2 e s + e^2 + 1 shares no factor with p(-s), so
    nothing proves them on the axis either: critical within the stated bound, and the
    claim is not decided (not passed)."""
    from plantlint.run.pipeline import analyse_bytes

    e = sp.sqrt(2) / sp.Integer(10) ** 300
    z1, z2, xi = sp.symbols("z1 z2 xi", real=True)
    s = sp.Symbol("s")
    M = sp.Matrix([[e, 1], [-1, e]])
    p = sp.expand(M.charpoly(s).as_expr())
    assert sp.expand(p.subs(s, e + sp.I)) == 0 and sp.expand(p.subs(s, e - sp.I)) == 0
    assert sp.gcd(p, p.subs(s, -s)) == 1
    f = [e * z1 + z2 + xi, -z1 + e * z2, 0]
    P = Plant.from_matrices("near", [z1, z2, xi], [u], f, [[0, 0, 1]], [xi])
    zd = zero_dynamics_at(Kernel(P), [1], at_origin(P), "p")
    assert zd.verdict == "critical" and not zd.exact and zd.tolerance is not None and zd.tolerance < 1e-70
    assert zd.not_hurwitz is None
    assert f"within {zd.tolerance:.3g} of the imaginary axis" in zd.findings[0].message
    raw = analyse_bytes(b"""plant tiny
state z1 in -1 .. 1
state z2 in -1 .. 1
state xi in -1 .. 1
input u
rate z1 = sqrt(2)/10^300*z1 + z2 + xi
rate z2 = -z1 + sqrt(2)/10^300*z2
rate xi = u
output y = xi
point o: z1 = 0, z2 = 0, xi = 0
expect minimum_phase at o
""")
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert claim.undecided

def test_not_a_rest_point_is_undefined() -> None:
    P = Plant.from_matrices("k", [x1, x2], [u], [-x1, 0], [[0, 1]], [x2])
    zd = zero_dynamics_at(Kernel(P), [1], {x1: 1, x2: 0}, "moving")
    assert zd.verdict == "undefined" and "rest point" in zd.reason


def test_json_eigenvalues_sorted() -> None:
    # zeros -2, -1 +- i (numerator (s + 2)(s^2 + 2 s + 2) = s^3 + 4 s^2 + 6 s + 4); numpy.roots reference
    xs = sp.symbols("q1:6")
    f = [xs[i + 1] for i in range(4)] + [-sum(xs)]
    h = [4 * xs[0] + 6 * xs[1] + 4 * xs[2] + xs[3]]
    P = Plant.from_matrices("sorted", list(xs), [u], f, [[0, 0, 0, 0, 1]], h)
    data = zero_dynamics_json(zero_dynamics_at(Kernel(P), [2], {s: 0 for s in xs}, "p"))
    ref = sorted(np.roots([1, 4, 6, 4]), key=lambda z: (z.real, z.imag))
    assert data["dimension"] == 3 and data["verdict"] == "minimum_phase"
    assert np.allclose([complex(a, b) for a, b in data["eigenvalues"]], ref, atol=1e-12)  # type: ignore[union-attr]
    assert normal_form_json(normal_form_at(Kernel(P), [2], {s: 0 for s in xs}))["invertible"] is True


def test_mimo_nonlinear_numeric_route_against_sympy_closed_loop() -> None:
    # reference done another way: build f* = f + g u* symbolically with sympy, take its
    # Jacobian, evaluate in floats, restrict to the null space of dXi (scipy.linalg.null_space)
    # and take numpy eigenvalues. Plant invented (two carts, one carrying a pendulum).
    p1, v1, p2, v2, th, w = sp.symbols("p1 v1 p2 v2 th w")
    k, g = sp.Integer(4), sp.Rational(981, 150)
    mass1 = 1 + sp.sin(th) ** 2 / 4
    f = sp.Matrix([v1, -k * (p1 - p2) - v1 / 2 + sp.sin(th) * w**2 / (2 + sp.cos(th)), v2,
                   k * (p1 - p2) - v2 / 2, w, -g * sp.sin(th) - w / 10])
    G = sp.Matrix([[0, 0], [1 / mass1, 0], [0, 0], [0, 1], [0, 0], [sp.cos(th) / 3, -sp.cos(th) / 3]])
    xs = [p1, v1, p2, v2, th, w]
    P = Plant.from_matrices("carts", xs, list(sp.symbols("F1 F2")), list(f), [list(G[:, 0]), list(G[:, 1])], [p1, p2])
    th0 = sp.Rational(1, 5)
    delta = 2 * g * sp.tan(th0) / (k * (2 + sp.sin(th0) ** 2 / 4)) * sp.Rational(3, 2)  # g here is g/L, L = 3/2
    point = {p1: delta, v1: 0, p2: 0, v2: 0, th: th0, w: 0}
    zd = zero_dynamics_at(Kernel(P), [2, 2], point, "tilted")
    # reference
    Lf = [(f.T * sp.Matrix([sp.diff(p, x) for x in xs]))[0] for p in (p1, p2)]
    grad = lambda e: sp.Matrix([[sp.diff(e, x) for x in xs]])  # noqa: E731
    A = sp.Matrix.vstack(grad(Lf[0]) * G, grad(Lf[1]) * G)
    b = sp.Matrix([(grad(e) * f)[0] for e in Lf])
    fstar = f - G * A.inv() * b
    subs = {s: float(v) for s, v in point.items()}
    J = np.array(fstar.jacobian(xs).subs(subs).evalf(), dtype=float)
    assert np.allclose(np.array(fstar.subs(subs).evalf(), dtype=float), 0, atol=1e-12)  # a rest point
    dXi = np.array(sp.Matrix.vstack(grad(p1), grad(Lf[0]), grad(p2), grad(Lf[1])).subs(subs).evalf(), dtype=float)
    N = scipy.linalg.null_space(dXi)
    ref = np.linalg.eigvals(N.T @ J @ N)
    assert zd.exact and zd.consistent and zd.verdict == "minimum_phase"
    assert_same_set(list(zd.eigenvalues), [complex(v) for v in ref], tol=1e-9)


def test_the_failed_claim_says_how_close_to_the_axis_the_numeric_route_saw_the_eigenvalues() -> None:
    """Invented: a link on a stiff joint, motor angle measured (relative degree 2); at a
    hanging point with sin(1/2) in it the zero dynamics x'' = -(mgl cos q + k) x / I are
    undamped (eigenvalues on the imaginary axis, textbook mass-spring, from memory) but the
    numbers are not rational, so the numeric route decides within a stated tolerance; the
    claim's message and the finding's use the same words."""
    from plantlint.analysis.engine import check_claims, run_analysis
    from plantlint.language.model import build_model
    from plantlint.language.syntax import parse_text

    text = """plant joint
const mgl = 49/10
const I = 1/2
const J = 1/20
const k = 80
state q1 in -3/2 .. 3/2
state w1 in -5 .. 5
state q2 in -3/2 .. 3/2
state w2 in -5 .. 5
input tau
rate q1 = w1
rate w1 = (-mgl*sin(q1) - k*(q1 - q2))/I
rate q2 = w2
rate w2 = (tau - k*(q2 - q1))/J
output motor = q2
point held: q1 = 1/2, w1 = 0, q2 = 1/2 + mgl*sin(1/2)/k, w2 = 0
expect minimum_phase at held
"""
    model, findings = build_model(parse_text(text), "joint.plant")
    assert model is not None and not findings
    analysis = run_analysis(model)
    (zd_finding,) = [f for f in analysis.findings if f.rule == "zero-dynamics-critical"]
    (claim,) = check_claims(analysis)
    zd = analysis.points[0].zero_dynamics
    assert zd is not None and zd.verdict == "critical"
    # reference: the eigenvalues are +-i sqrt((mgl cos(1/2) + k)/I) (math, not plantlint)
    import math
    expected = math.sqrt((4.9 * math.cos(0.5) + 80) / 0.5)
    assert all(abs(abs(z.imag) - expected) < 1e-6 and abs(z.real) < 1e-6 for z in zd.eigenvalues)
    how = "exactly on the imaginary axis" if zd.exact else f"within {zd.tolerance:.3g} of the imaginary axis"
    assert how in zd_finding.message
    assert ("on the imaginary axis" if zd.exact else how) in claim.message


FLEX = """
# invented: a flexible joint (link q1, motor q2), the motor angle measured, tilted link
plant flex
const Il = 0.03
const Jm = 0.004
const ks = 8
const MgL = 0.8
state q1 in -2 .. 2
state w1 in -5 .. 5
state q2 in -2 .. 2
state w2 in -5 .. 5
input u
rate q1 = w1
rate w1 = -(MgL*sin(q1) + ks*(q1 - q2))/Il
rate q2 = w2
rate w2 = (ks*(q1 - q2) - w2/100 + u)/Jm
output motor = q2
point tilt: q1 = pi/6, w1 = 0, q2 = pi/6 + MgL*sin(pi/6)/ks, w2 = 0
expect minimum_phase at tilt
"""


def test_eigenvalues_near_the_axis_fail_the_claim_only_when_an_exact_coefficient_says_so() -> None:
    """With the motor angle held, the link obeys q1'' = -(MgL sin q1 + ks (q1 - q2) + c q1')/Il,
    whose linearisation has the characteristic polynomial s^2 + (c/Il) s + (MgL cos q1 + ks)/Il
    (by hand; sympy and numpy below). At the irrational point q1 = pi/6 the numeric route
    bounds the eigenvalues' real parts without signing them. Without link damping (c = 0)
    the s coefficient is exactly zero: the polynomial is even, so its roots mirror across
    the axis and, each alone near its mirror image, lie on it; the claim fails, decided. With c = 1e-12 the eigenvalues are stable but
    stable by 1.7e-11 only: their balls prove it, and the claim holds."""
    from plantlint.run.pipeline import analyse_bytes

    s, c = sp.symbols("s c")
    stiffness = (sp.Rational(4, 5) * sp.cos(sp.pi / 6) + 8) / sp.Rational(3, 100)
    J = sp.Matrix([[0, 1], [-stiffness, -c / sp.Rational(3, 100)]])
    assert J.charpoly(s).all_coeffs()[1].subs(c, 0) == 0
    ref = sorted(np.linalg.eigvals(np.array(J.subs(c, 0).evalf(), dtype=float)), key=lambda z: z.imag)
    raw = analyse_bytes(FLEX.encode())
    zd = raw.analysis["points"]["tilt"]["zero_dynamics"]
    assert zd["verdict"] == "critical"
    ours = sorted((complex(re, im) for re, im in zd["eigenvalues"]), key=lambda z: z.imag)
    assert np.allclose(ours, ref, atol=1e-9)
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert not claim.undecided and "have eigenvalues on the imaginary axis" in claim.message
    damped = FLEX.replace("rate w1 = -(MgL*sin(q1) + ks*(q1 - q2))/Il", "rate w1 = -(MgL*sin(q1) + ks*(q1 - q2) + 1e-12*w1)/Il")
    assert damped != FLEX
    raw = analyse_bytes(damped.encode())
    assert [f for f in raw.findings if f.rule in ("expectation-failed", "zero-dynamics-critical")] == []
    zd = raw.analysis["points"]["tilt"]["zero_dynamics"]
    # real part -(c/Il)/2 with c = 1e-12, Il = 0.03 (the polynomial above, by hand)
    assert zd["verdict"] == "minimum_phase"
    assert all(abs(re + 1e-12 / 0.06) < 1e-20 for re, _ in zd["eigenvalues"])


def test_a_large_coupling_does_not_hide_an_unstable_zero_dynamics() -> None:
    """Invented: z' = 2 sin z - sqrt(2) + 1e12 xi, xi' = -xi + u, y = xi, at z = pi/4. With
    xi held at 0 the zero dynamics are z' = 2 sin z - sqrt(2), whose linearisation at pi/4 is
    2 cos(pi/4) = sqrt(2) > 0 (sympy.diff below): unstable, however large the coupling that
    makes Df* large. (A tolerance relative to |Df*| once called it critical, a warning.)"""
    from plantlint.run.pipeline import analyse_bytes

    text = b"""plant scaled
state z in 0 .. 2
state xi in -1 .. 1
input u
rate z = 2*sin(z) - sqrt(2) + 1e12*xi
rate xi = -xi + u
output y = xi
point o: z = pi/4, xi = 0, u = 0
expect minimum_phase at o
"""
    z = sp.Symbol("z")
    ref = sp.diff(2 * sp.sin(z) - sp.sqrt(2), z).subs(z, sp.pi / 4)
    assert sp.simplify(ref - sp.sqrt(2)) == 0
    raw = analyse_bytes(text)
    zd = raw.analysis["points"]["o"]["zero_dynamics"]
    assert zd["verdict"] == "non_minimum_phase"
    assert abs(zd["eigenvalues"][0][0] - float(ref)) < 1e-12
    rules = sorted((f.rule, f.undecided) for f in raw.findings)
    assert rules == [("expectation-failed", False), ("zero-dynamics-unstable", False)]


IRRATIONAL_CENTRE = b"""plant centre
state z1 in -1 .. 1
state z2 in -1 .. 1
state xi in -1 .. 1
input u
rate xi = u
rate z1 = sqrt(2)*z1 + z2 + xi
rate z2 = -3*z1 - sqrt(2)*z2
output y = xi
point o: z1 = 0, z2 = 0, xi = 0, u = 0
expect minimum_phase at o
"""


def test_irrational_zero_dynamics_on_the_axis_and_the_pencil_zeros_there() -> None:
    """Invented: with xi held at 0, (z1, z2) obey [[sqrt 2, 1], [-3, -sqrt 2]], whose
    characteristic polynomial is s^2 + 1 (sympy below): eigenvalues +-i, on the axis with
    irrational entries. The balls cannot sign a real part that is 0; they bound it. The
    exact polynomial is even (its s coefficient is exactly zero), so each root's mirror
    image across the axis is a root too, and a root alone near its mirror image is on the
    axis: the claim fails, decided. The linearisation's transmission
    zeros are +-i too (the z block is unobservable); they are computed on a circle off the
    roots of unity, where a ball determinant at a zero of the pencil would lose every digit
    (reference: the Rosenbrock pencil, scipy)."""
    from plantlint.run.pipeline import analyse_bytes

    s = sp.Symbol("s")
    block = sp.Matrix([[sp.sqrt(2), 1], [-3, -sp.sqrt(2)]])
    assert sp.expand(block.charpoly(s).as_expr()) == s**2 + 1
    raw = analyse_bytes(IRRATIONAL_CENTRE)
    point = raw.analysis["points"]["o"]
    zd = point["zero_dynamics"]
    assert zd["verdict"] == "critical"
    assert_same_set([complex(a, b) for a, b in zd["eigenvalues"]], [1j, -1j], tol=1e-12)
    (critical,) = [f for f in raw.findings if f.rule == "zero-dynamics-critical"]
    assert "exactly on the imaginary axis: the characteristic polynomial of the zero dynamics is even in s" \
        in critical.message
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert not claim.undecided
    assert not [f for f in raw.findings if f.rule == "internal-inconsistency"]
    r2 = np.sqrt(2.0)
    A = np.array([[r2, 1, 1], [-3, -r2, 0], [0, 0, 0]])
    B = np.array([[0.0], [0.0], [1.0]])
    C = np.array([[0.0, 0.0, 1.0]])
    zeros = [complex(a, b) for a, b in point["linearisation"]["transmission_zeros"]]
    assert_same_set(zeros, rosenbrock_zeros(A, B, C), tol=1e-12)
    assert point["linearisation"]["cross_check"]["status"] == "agrees"


def test_zero_dynamics_at_a_refined_equilibrium() -> None:
    """A reviewer's model (invented numbers). The written x1 is rounded; the analysis runs
    at the equilibrium refined near it, known to ~40 digits, not exactly, where the
    zero dynamics were once "not defined" and the true claim failed. Holding y1 = x1 and
    y2 = x2 (u1 = x1 - x3, u2 = x2 - x4^2) leaves x3' = x4,
    x4' = -3 x3 - x4 + 2 x1 + exp(x3) - 1 + x4^2 (by hand), whose Jacobian at x3 = 1/10,
    x4 = 0 has the eigenvalues of s^2 + s + 3 - e^(1/10) (numpy below)."""
    from plantlint.run.pipeline import analyse_bytes

    x3, x4 = sp.symbols("x3 x4")
    field = sp.Matrix([x4, -3 * x3 - x4 + sp.exp(x3) - 1 + x4**2])
    J = np.array(field.jacobian([x3, x4]).subs({x3: sp.Rational(1, 10), x4: 0}).evalf(), dtype=float)
    ref = np.linalg.eigvals(J)
    raw = analyse_bytes(ROUNDED)
    assert [f.rule for f in raw.findings] == ["point-refined"]  # the claim holds
    zd = raw.analysis["points"]["rounded"]["zero_dynamics"]
    assert zd["verdict"] == "minimum_phase"
    assert_same_set([complex(a, b) for a, b in zd["eigenvalues"]], list(ref), tol=1e-9)


def test_minimum_phase_of_a_plant_that_is_not_square_is_not_decided() -> None:
    """One output, two inputs (invented): the zero dynamics as computed here need as many
    outputs as inputs, so a minimum-phase claim is not decided rather than failed."""
    from plantlint.run.pipeline import analyse_bytes

    text = b"""plant wide
state x1 in -1 .. 1
state x2 in -1 .. 1
input u1
input u2
rate x1 = -x1 + u1 + u2
rate x2 = -x2 + x1 + u2
output y = x1
point rest: x1 = 0, x2 = 0, u1 = 0, u2 = 0
expect minimum_phase at rest
"""
    (claim,) = [f for f in analyse_bytes(text).findings if f.rule == "expectation-failed"]
    assert claim.undecided and "computed for square plants" in claim.message
    # a CI maintainer reads "not decided" as "give it more time": the hint says it will not help
    assert claim.hint is not None and claim.hint.startswith("no budget decides this")


def test_a_barely_unstable_mode_at_a_refined_point_is_not_called_critical() -> None:
    """A reviewer's probe (invented numbers). y = x3 held; x1'' = -x1^3 + 2 + 1e-12 x1' + x3
    linearises at x1 to s^2 - 1e-12 s + 3 x1^2 (by hand; numpy below): real parts +5e-13,
    unstable. The point is rounded (1.2599 for 2^(1/3)), so the analysis runs at a refined
    equilibrium known to ~40 digits; a tolerance of 1e-9 |Df*| once called these modes
    "critical", a warning that passes a gate."""
    from plantlint.run.pipeline import analyse_bytes

    text = b"""plant nudge
state x1 in -3 .. 3
state x2 in -3 .. 3
state x3 in -3 .. 3
input u in -5 .. 5
rate x1 = x2
rate x2 = -x1^3 + 2 + 1e-12*x2 + x3
rate x3 = u
output y = x3
point p: x1 = 1.2599, x2 = 0, x3 = 0, u = 0 tolerance 1e-3
"""
    ref = np.roots([1.0, -1e-12, 3 * 1.2599**2])
    assert all(r.real > 0 for r in ref)
    raw = analyse_bytes(text)
    rules = sorted(f.rule for f in raw.findings)
    assert rules == ["point-refined", "zero-dynamics-unstable"], rules
    zd = raw.analysis["points"]["p"]["zero_dynamics"]
    assert zd["verdict"] == "non_minimum_phase"
    assert all(abs(re - 5e-13) < 1e-18 for re, _ in zd["eigenvalues"])


def test_a_repeated_root_near_the_axis_fails_the_claim_by_a_missing_coefficient() -> None:
    """Invented: with xi held at 0, z1' = z2, z2' = 0, z3' = -sqrt(2) z3, whose characteristic
    polynomial is s^2 (s + sqrt 2) = s^3 + sqrt(2) s^2 (sympy below). The double root at 0
    cannot be isolated by balls, so the mpmath route bounds it, and p is not mirrored (its
    s^2 coefficient is not zero). Its s coefficient is exactly zero, so p is not Hurwitz
    (Stodola's necessary condition, e.g. Ogata, Modern Control Engineering): the claim
    fails, decided, and the finding says why."""
    from plantlint.run.pipeline import analyse_bytes

    sq = sp.sqrt(2)
    z1, z2, z3, xi = sp.symbols("z1 z2 z3 xi", real=True)
    s = sp.Symbol("s")
    M = sp.Matrix([[0, 1, 0], [0, 0, 0], [0, 0, -sq]])
    assert sp.expand(M.charpoly(s).as_expr()) == s**3 + sq * s**2
    f = [z2 + xi, xi, -sq * z3 + xi, 0]
    P = Plant.from_matrices("double", [z1, z2, z3, xi], [u], f, [[0, 0, 0, 1]], [xi])
    zd = zero_dynamics_at(Kernel(P), [1], at_origin(P), "p")
    assert zd.verdict == "critical" and not zd.exact and zd.tolerance is not None
    assert zd.not_hurwitz is not None and "has no s term (its coefficient is exactly zero)" in zd.not_hurwitz
    assert_same_set(list(zd.eigenvalues), [0, 0, -float(sq)], tol=1e-6)
    assert "of the imaginary axis" in zd.findings[0].message and "so it is not Hurwitz" in zd.findings[0].message
    raw = analyse_bytes(b"""plant double
state z1 in -1 .. 1
state z2 in -1 .. 1
state z3 in -1 .. 1
state xi in -1 .. 1
input u
rate z1 = z2 + xi
rate z2 = xi
rate z3 = -sqrt(2)*z3 + xi
rate xi = u
output y = xi
point o: z1 = 0, z2 = 0, z3 = 0, xi = 0
expect minimum_phase at o
""")
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert not claim.undecided and "has no s term" in claim.message and "within" in claim.message
