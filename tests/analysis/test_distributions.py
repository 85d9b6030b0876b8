"""Full-state linearizability: controllability distributions, involutivity, outputs.

Every verdict is held against something outside the project: the Kalman rank
condition computed with numpy, published worked examples (named beside each
test, "from memory" where recalled), and brackets / Lie derivatives / ranks
recomputed here with plain sympy (Matrix.jacobian, diff, Matrix.rank).
"""

from __future__ import annotations

import re

import numpy as np
import pytest
import sympy as sp

from plantlint.analysis.distributions import (
    analyse_distributions,
    distributions_at,
)
from plantlint.analysis.serialise import distributions_json
from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant
from conftest import REPO, kalman, linear_plant

x1, x2, x3, x4 = sp.symbols("x1 x2 x3 x4")
u, v = sp.symbols("u v")


# -- independent helpers (plain sympy, not the checker's kernel) -----------------------
def lie(phi: sp.Expr, field: list[sp.Expr], states: list[sp.Symbol]) -> sp.Expr:
    return sum((sp.diff(phi, s) * c for s, c in zip(states, field)), sp.Integer(0))


def bracket(X: sp.Matrix, Y: sp.Matrix, states: list[sp.Symbol]) -> sp.Matrix:
    """[X, Y] = DY X - DX Y with sympy's own jacobian."""
    return Y.jacobian(states) * X - X.jacobian(states) * Y


def relative_degree_by_diff(plant: Plant, phi: sp.Expr, point: dict[sp.Symbol, sp.Expr]) -> int | None:
    """First r with L_g L_f^(r-1) phi non-zero at the point, all earlier ones
    identically zero (decided by expand + trigsimp of small expressions)."""
    states = list(plant.states)
    f, g = list(plant.f), list(plant.g[0])
    lf = phi
    for k in range(plant.n):
        lglf = lie(lf, g, states)
        if sp.trigsimp(sp.expand(lglf)) != 0:
            value = lglf.subs(point)
            return k + 1 if sp.nsimplify(value) != 0 else None
        lf = sp.expand(lie(lf, f, states))
    return None


def analyse(plant: Plant, point: dict[sp.Symbol, sp.Expr], name: str = "p"):
    kernel = Kernel(plant)
    structure = analyse_distributions(kernel)
    return structure, distributions_at(kernel, structure, name, point)


def unimodular(rng: np.random.Generator, n: int) -> np.ndarray:
    """An integer matrix of determinant +-1 (a product of integer shears)."""
    T = np.eye(n, dtype=np.int64)
    for _ in range(2 * n):
        i, j = rng.choice(n, size=2, replace=False)
        E = np.eye(n, dtype=np.int64)
        E[i, j] = rng.integers(-2, 3)
        T = E @ T
    return T


def random_systems() -> list[tuple[str, np.ndarray, np.ndarray]]:
    """Seeded random (A, B): dense ones, and deliberately uncontrollable ones
    (an unactuated block in Kalman's decomposition, hidden by a change of
    coordinates)."""
    rng = np.random.default_rng(20240611)
    out = []
    for index in range(24):
        n = int(rng.integers(2, 6))
        m = 1 if index % 3 else 2
        A = rng.integers(-3, 4, size=(n, n))
        B = rng.integers(-2, 3, size=(n, m))
        out.append((f"dense{index}", A, B))
    for index in range(16):
        n = int(rng.integers(3, 6))
        m = 1 if index % 2 else 2
        c = int(rng.integers(1, n))  # size of the actuated block
        A = np.zeros((n, n), dtype=np.int64)
        A[:c, :c] = rng.integers(-3, 4, size=(c, c))
        A[:c, c:] = rng.integers(-2, 3, size=(c, n - c))
        A[c:, c:] = rng.integers(-3, 4, size=(n - c, n - c))
        B = np.zeros((n, m), dtype=np.int64)
        B[:c, :] = rng.integers(-2, 3, size=(c, m))
        if index % 4 == 0:
            T = unimodular(rng, n)
            Tinv = np.rint(np.linalg.inv(T)).astype(np.int64)
            A, B = T @ A @ Tinv, T @ B
        out.append((f"blocked{index}", A, B))
    return out


# -- linear plants: Kalman rank condition (numpy.linalg.matrix_rank) -----------------
@pytest.mark.parametrize("name,A,B", random_systems(), ids=lambda p: p if isinstance(p, str) else "")
def test_linear_plants_follow_the_kalman_rank_condition(name: str, A: np.ndarray, B: np.ndarray) -> None:
    """A linear plant is state linearizable exactly when [B, AB, ..., A^(n-1)B]
    has rank n (Kalman; common practice, checked with numpy). Its distributions
    are spanned by constant fields, hence always involutive."""
    n = A.shape[0]
    plant = linear_plant(A, B)
    point = {s: sp.Rational(i + 1, 3) for i, s in enumerate(plant.states)}
    structure, pd = analyse(plant, point)
    expected = [int(np.linalg.matrix_rank(kalman(A, B, k))) for k in range(n)]
    assert list(structure.ranks) == expected
    assert list(pd.ranks) == expected and not pd.singular_orders
    assert pd.controllability_rank == expected[-1]
    assert structure.involutive and pd.involutive
    assert pd.state_linearizable == (expected[-1] == n)
    # the combinations the input does not move: a basis of the left null space of the Kalman matrix
    assert len(pd.missing_vectors) == n - expected[-1]
    K = kalman(A, B, n - 1)
    for w in pd.missing_vectors:
        assert np.allclose(np.array([float(c) for c in w]) @ K, 0.0)
    if pd.missing_vectors:
        W = np.array([[float(c) for c in w] for w in pd.missing_vectors])
        assert np.linalg.matrix_rank(W) == n - expected[-1]
        assert [f.rule for f in pd.findings] == ["not-controllable"]
        assert pd.findings[0].anchor == "point p" and pd.findings[0].point == "p"
    else:
        assert pd.findings == ()
    if pd.output_searched and pd.linearizing_output is not None:
        assert relative_degree_by_diff(plant, pd.linearizing_output, point) == n


@pytest.mark.parametrize("seed", range(6))
def test_controllable_canonical_form_gives_the_first_state(seed: int) -> None:
    """Controllable canonical (companion) form, b = e_n: y = x1 has relative
    degree n (common practice; Ogata, Modern Control Engineering, ch. 9, from
    memory). The search tries the states first, so it must suggest x1."""
    rng = np.random.default_rng(seed)
    n = 3 + seed % 3
    A = np.zeros((n, n), dtype=np.int64)
    A[np.arange(n - 1), np.arange(1, n)] = 1
    A[-1, :] = rng.integers(-4, 5, size=n)
    B = np.zeros((n, 1), dtype=np.int64)
    B[-1, 0] = 1
    plant = linear_plant(A, B)
    point = {s: 0 for s in plant.states}
    _, pd = analyse(plant, point)
    assert np.linalg.matrix_rank(kalman(A, B, n - 1)) == n
    assert pd.state_linearizable
    assert pd.linearizing_output == plant.states[0]
    assert relative_degree_by_diff(plant, plant.states[0], point) == n
    assert distributions_json(pd) == {
        "controllability_rank": n,
        "involutive": True,
        "constant_rank": True,
        "rank_drops": [],
        "state_linearizable": True,
        "linearizing_output": "x1",
    }


# -- published nonlinear examples ------------------------------------------------------
def flexible_joint(a: int = 2, b: int = 3, c: int = 5, d: int = 7) -> Plant:
    """Single-link arm with a flexible joint (Spong 1987), in the form
    x1' = x2, x2' = -a sin x1 - b (x1 - x3), x3' = x4, x4' = c (x1 - x3) + d u."""
    f = [x2, -a * sp.sin(x1) - b * (x1 - x3), x4, c * (x1 - x3)]
    return Plant.from_matrices("flexible_joint", [x1, x2, x3, x4], [u], f, [[0, 0, 0, d]], [x1])


def test_flexible_joint_is_state_linearizable_with_the_link_angle() -> None:
    """Spong (1987); Khalil, Nonlinear Systems 3rd ed., Sec. 13.2 flexible-joint
    example; Slotine & Li (1991) Sec. 6.2 (from memory): state linearizable
    everywhere, linearizing output the link angle x1 (relative degree 4)."""
    plant = flexible_joint()
    point = {x1: 0, x2: 0, x3: 0, x4: 0}
    structure, pd = analyse(plant, point, "rest")
    assert structure.ranks == (1, 2, 3, 4)
    assert structure.involutive_by_order == (True, True, True)
    assert pd.state_linearizable and pd.involutive and pd.controllability_rank == 4
    assert pd.linearizing_output == x1
    assert relative_degree_by_diff(plant, x1, point) == 4
    assert pd.findings == () and structure.findings == ()
    # also at a point away from rest (x1 = pi/3 exactly)
    away = {x1: sp.pi / 3, x2: 1, x3: sp.Rational(1, 2), x4: 0}
    pd2 = distributions_at(Kernel(plant), structure, "away", away)
    assert pd2.state_linearizable and pd2.linearizing_output == x1
    assert relative_degree_by_diff(plant, x1, away) == 4


def test_flexible_joint_rank_matches_sympy_at_the_point() -> None:
    """The fields g, ad_f g, ad_f^2 g, ad_f^3 g recomputed with Matrix.jacobian;
    their exact rank at rest with Matrix.rank (sympy done another way)."""
    plant = flexible_joint()
    states = list(plant.states)
    f = sp.Matrix(plant.f)
    fields = [sp.Matrix(plant.g[0])]
    for _ in range(3):
        fields.append(bracket(f, fields[-1], states))
    M = sp.Matrix.hstack(*fields).subs({x1: 0, x2: 0, x3: 0, x4: 0})
    _, pd = analyse(plant, {x1: 0, x2: 0, x3: 0, x4: 0})
    assert M.rank() == pd.controllability_rank == 4


def khalil_plant(a: int = 2) -> Plant:
    """x1' = a sin x2, x2' = -x1^2 + u."""
    return Plant.from_matrices("khalil", [x1, x2], [u], [a * sp.sin(x2), -x1**2], [[0, 1]], [x1])


def test_khalil_sine_example_is_linearizable_away_from_half_pi() -> None:
    """Khalil, Nonlinear Systems 3rd ed., Ch. 13, x1' = a sin x2, x2' = -x1^2 + u
    (from memory): linearizable for |x2| < pi/2 with z1 = x1, z2 = a sin x2."""
    plant = khalil_plant()
    point = {x1: 0, x2: 0}
    structure, pd = analyse(plant, point, "origin")
    assert pd.state_linearizable and pd.linearizing_output == x1
    assert relative_degree_by_diff(plant, x1, point) == 2


def test_rank_drop_at_a_point_is_reported() -> None:
    """Same example at x2 = pi/2: ad_f g = (-a cos x2, 0) vanishes there, so
    rank [g, ad_f g] drops from 2 (around the point) to 1 (at it): a singular
    point, reported as such in the result and in the finding."""
    plant = khalil_plant()
    kernel = Kernel(plant)
    structure = analyse_distributions(kernel)
    pd = distributions_at(kernel, structure, "edge", {x1: 1, x2: sp.pi / 2})
    assert structure.ranks == (1, 2)
    assert pd.ranks == (1, 1) and pd.singular_orders == (1,)
    assert not pd.state_linearizable and pd.controllability_rank == 1
    assert any("singular point" in note for note in pd.notes)
    (finding,) = pd.findings
    assert finding.rule == "not-controllable" and finding.anchor == "point edge" and finding.point == "edge"
    assert "singular point" in finding.message
    assert pd.missing_vectors == ((1, 0),) and pd.missing_directions == ("x1",)


def test_rank_drop_in_a_lower_distribution_is_the_constant_rank_condition() -> None:
    """x1' = x2, x2' = x3^3, x3' = u (constructed; by hand: g = e3,
    ad_f g = (0, -3 x3^2, 0), ad_f^2 g = (3 x3^2, 0, 0)): D_1 has generic rank 2
    but rank 1 at x3 = 0, so the origin is a singular point of D_1."""
    plant = Plant.from_matrices("cubic", [x1, x2, x3], [u], [x2, x3**3, 0], [[0, 0, 1]], [x1])
    structure, pd = analyse(plant, {x1: 0, x2: 0, x3: 0}, "origin")
    assert structure.ranks == (1, 2, 3) and structure.involutive
    assert pd.ranks == (1, 1, 1) and pd.singular_orders == (1, 2)
    rules = sorted(f.rule for f in pd.findings)
    assert rules == ["distribution-rank-drop", "not-controllable"]
    # the brackets stay in the distributions (involutive), but D_1 loses rank at the origin
    assert pd.involutive and not pd.constant_rank and not pd.state_linearizable
    # away from x3 = 0 all is well and x1 has relative degree 3
    away = {x1: 0, x2: 0, x3: 1}
    pd2 = distributions_at(Kernel(plant), structure, "away", away)
    assert pd2.state_linearizable and pd2.linearizing_output == x1
    assert relative_degree_by_diff(plant, x1, away) == 3


def test_three_state_non_involutive_example_verified_by_hand() -> None:
    """x1' = x2 + x3^2, x2' = x3, x3' = u (constructed, checked by hand):
    g = e3, ad_f g = -(2 x3, 1, 0), [g, ad_f g] = d(ad_f g)/dx3 = (-2, 0, 0) and
    det[g, ad_f g, [g, ad_f g]] = -2: the bracket leaves D_1, while
    ad_f^2 g = (1, 0, 0) makes D_2 full rank."""
    plant = Plant.from_matrices("twisted", [x1, x2, x3], [u], [x2 + x3**2, x3, 0], [[0, 0, 1]], [x1])
    structure, pd = analyse(plant, {x1: 0, x2: 0, x3: 0}, "origin")
    # the generic analysis stops at the first distribution that fails (D_1); the
    # controllability rank at the equilibrium then comes from the Kalman matrix
    assert structure.ranks == (1, 2)
    assert structure.involutive_by_order == (True, False)
    assert structure.failure is not None and structure.failure.pair == "[g, ad_f g]"
    assert structure.failure.order == 1 and structure.failure.certain
    (finding,) = structure.findings
    assert finding.rule == "not-involutive" and finding.anchor == "plant" and finding.point is None
    assert "[g, ad_f g]" in finding.message and "D_1" in finding.message
    assert pd.controllability_rank == 3 and not pd.involutive and not pd.state_linearizable
    assert "linearizing_output" not in distributions_json(pd)
    # sympy done another way: jacobian brackets and exact ranks at two points
    states = [x1, x2, x3]
    f, g = sp.Matrix(plant.f), sp.Matrix(plant.g[0])
    ad = bracket(f, g, states)
    assert list(ad) == [-2 * x3, -1, 0]
    Y = bracket(g, ad, states)
    assert list(Y) == [-2, 0, 0]
    for at in ({x1: 0, x2: 0, x3: 0}, {x1: 1, x2: -2, x3: sp.Rational(3, 5)}):
        assert sp.Matrix.hstack(g, ad).subs(at).rank() == 2
        assert sp.Matrix.hstack(g, ad, Y).subs(at).rank() == 3


def test_ball_and_beam_is_not_state_linearizable() -> None:
    """Ball and beam, Hauser, Sastry & Kokotovic, IEEE TAC 37(3), 1992 (from
    memory): not full-state linearizable. By hand: g = e4,
    ad_f g = (0, -2 B x1 x4, -1, 0), [g, ad_f g] = (0, -2 B x1, 0, 0) is not in
    span{g, ad_f g} where x1 != 0."""
    Bc, G = sp.Rational(5, 7), sp.Rational(981, 100)
    f = [x2, Bc * (x1 * x4**2 - G * sp.sin(x3)), x4, 0]
    plant = Plant.from_matrices("ball_beam", [x1, x2, x3, x4], [u], f, [[0, 0, 0, 1]], [x1])
    structure, pd = analyse(plant, {x1: 0, x2: 0, x3: 0, x4: 0}, "level")
    assert structure.ranks == (1, 2)  # stopped at the failing D_1
    assert structure.failure is not None and structure.failure.pair == "[g, ad_f g]"
    assert not structure.involutive_by_order[1]
    assert pd.controllability_rank == 4 and not pd.state_linearizable
    states = [x1, x2, x3, x4]
    g = sp.Matrix(plant.g[0])
    ad = bracket(sp.Matrix(f), g, states)
    Y = bracket(g, ad, states)
    at = {x1: 1, x2: 0, x3: 0, x4: 1}
    assert sp.Matrix.hstack(g, ad, Y).subs(at).rank() == 3


def test_nonholonomic_integrator_multi_input() -> None:
    """Brockett's nonholonomic integrator x1' = u, x2' = v, x3' = x1 v - x2 u
    (Brockett 1983, from memory): not static-feedback linearizable; G_0 is not
    involutive ([g1, g2] = (0, 0, 2) by hand) and, with no drift, G_2 = G_0 has
    rank 2: at the origin no input moves x3 (to first order: its differential dx3
    annihilates G_2 there)."""
    plant = Plant.from_matrices("brockett", [x1, x2, x3], [u, v], [0, 0, 0], [[1, 0, -x2], [0, 1, x1]], [x1])
    structure, pd = analyse(plant, {x1: 0, x2: 0, x3: 0}, "origin")
    assert structure.ranks == (2,)  # stopped at the failing G_0
    assert structure.failure is not None and structure.failure.pair == "[g1, g2]"
    assert structure.failure.order == 0
    assert "G_0" in structure.findings[0].message
    assert pd.controllability_rank == 2 and pd.missing_directions == ("x3",)
    assert [f.rule for f in pd.findings] == ["not-controllable"]
    assert not pd.output_searched
    states = [x1, x2, x3]
    Y = bracket(sp.Matrix(plant.g[0]), sp.Matrix(plant.g[1]), states)
    assert list(Y) == [0, 0, 2]


def test_unicycle_does_not_move_sideways() -> None:
    """Kinematic unicycle x' = v cos th, y' = v sin th, th' = w (common practice):
    [g1, g2] = (sin th, -cos th, 0) leaves span{g1, g2}; at th = 0 the input fields
    do not move the sideways position py (dpy annihilates span{g1, g2} there)."""
    px, py, th = sp.symbols("px py th")
    plant = Plant.from_matrices(
        "unicycle", [px, py, th], [u, v], [0, 0, 0], [[sp.cos(th), sp.sin(th), 0], [0, 0, 1]], [px]
    )
    structure, pd = analyse(plant, {px: 0, py: 0, th: 0}, "start")
    assert structure.failure is not None and structure.failure.pair == "[g1, g2]"
    assert pd.missing_directions == ("py",)


def test_linearizing_output_sign_identity() -> None:
    """Isidori's identity L_g L_f^(n-1) phi = (-1)^(n-1) <dphi, ad_f^(n-1) g> for an
    output of relative degree n (Isidori 1995, Lemma 4.1.2, from memory),
    evaluated with plain sympy on the suggested output of the flexible joint."""
    plant = flexible_joint()
    point = {x1: sp.Rational(1, 2), x2: 0, x3: 1, x4: 2}
    _, pd = analyse(plant, point)
    phi = pd.linearizing_output
    assert phi is not None
    states = list(plant.states)
    f, g = sp.Matrix(plant.f), sp.Matrix(plant.g[0])
    ad = g
    for _ in range(3):
        ad = bracket(f, ad, states)
    lf = phi
    for _ in range(3):
        lf = lie(lf, list(f), states)
    lhs = lie(lf, list(g), states).subs(point)
    rhs = (-1) ** 3 * (sp.Matrix([[sp.diff(phi, s) for s in states]]) * ad)[0].subs(point)
    assert sp.nsimplify(lhs - rhs) == 0 and lhs != 0


def test_output_not_in_the_simple_list_gives_a_note() -> None:
    """A linear controllable plant whose only linearizing outputs are
    combinations of three or more states (constructed): the rank test passes
    (numpy) and the result says an output exists but was not found."""
    A = np.array([[0, 1, 0], [0, 0, 1], [0, 0, 0]])
    Tinv = np.array([[1, 1, 1], [0, 1, 2], [0, 0, 1]])  # det 1
    T = np.rint(np.linalg.inv(Tinv)).astype(np.int64)
    B = np.array([[0], [0], [1]])
    A2, B2 = T @ A @ Tinv, T @ B
    plant = linear_plant(A2, B2)
    _, pd = analyse(plant, {s: 0 for s in plant.states})
    assert np.linalg.matrix_rank(kalman(A2, B2, 2)) == 3 and pd.state_linearizable
    # the exact linearizing outputs are multiples of e1^T T^-1 x (by hand)
    c = Tinv[0]
    assert np.count_nonzero(c) == 3
    assert pd.output_searched and pd.linearizing_output is None
    assert any("not found" in note for note in pd.notes)
    assert distributions_json(pd)["linearizing_output"] is None


def test_ranged_parameter_stays_symbolic() -> None:
    """Flexible joint with an uncertain stiffness k in [1, 4]: the verdict holds
    over the parameter range (Spong 1987, from memory), nominal value at points."""
    k = sp.Symbol("k")
    f = [x2, -2 * sp.sin(x1) - k * (x1 - x3), x4, k * (x1 - x3)]
    plant = Plant.from_matrices(
        "flex_k", [x1, x2, x3, x4], [u], f, [[0, 0, 0, 1]], [x1],
        params=(k,), param_nominal={k: sp.Integer(2)}, param_box={k: (sp.Integer(1), sp.Integer(4))},
    )
    structure, pd = analyse(plant, {x1: 0, x2: 0, x3: 0, x4: 0})
    assert structure.ranks == (1, 2, 3, 4) and pd.state_linearizable and pd.linearizing_output == x1


def test_module_never_evaluates_text_or_simplifies() -> None:
    """House rule: no eval/exec/sympify/parse_expr/simplify in the analysis."""
    source = (REPO / "checker" / "plantlint" / "analysis" / "distributions.py").read_text()
    for banned in ("eval(", "exec(", "sympify(", "parse_expr(", "simplify("):
        assert not re.search(r"(?<![A-Za-z_])" + re.escape(banned), source), banned


def test_random_linear_set_covers_both_verdicts() -> None:
    """Guard on the data of the Kalman test: controllable and uncontrollable,
    single and multi input systems are all present (numpy.linalg.matrix_rank)."""
    kinds = set()
    for _, A, B in random_systems():
        n, m = B.shape
        kinds.add((m == 1, int(np.linalg.matrix_rank(kalman(A, B, n - 1))) == n))
    assert kinds == {(True, True), (True, False), (False, True), (False, False)}


def test_plant_without_inputs_misses_every_direction() -> None:
    """No input: every distribution is {0}; rank 0 and all n directions missing
    (the Kalman matrix is empty: common practice)."""
    plant = Plant.from_matrices("free", [x1, x2], [], [x2, -x1], [], [x1])
    _, pd = analyse(plant, {x1: 0, x2: 0})
    assert pd.controllability_rank == 0 and pd.missing_directions == ("x1", "x2")
    assert not pd.state_linearizable


def test_dependent_input_fields_need_a_proved_zero_minor() -> None:
    """g2 = x3 g1 written multiplied out (constructed): the 2-minors of [g1, g2]
    vanish only after expansion, so G_0 has generic rank 1, proved (no
    uncertainty). Cross-checked with sympy's Matrix.rank on the expanded
    symbolic matrix."""
    g1 = [1 + x2**2, x1, 0]
    g2 = [x3 + x3 * x2**2, x1 * x3, 0]
    plant = Plant.from_matrices("dependent", [x1, x2, x3], [u, v], [0, 0, x1], [g1, g2], [x1])
    structure, pd = analyse(plant, {x1: 1, x2: 0, x3: 2})
    expected = sp.Matrix([g1, g2]).T.applyfunc(sp.expand).rank(simplify=True)
    assert structure.ranks[0] == expected == 1
    assert structure.uncertain == ()
    assert pd.ranks[0] == 1


def test_ball_determinant_proves_only_what_is_certain() -> None:
    """The sample-point shortcut of the bordered minors: a ball determinant is
    'non-zero' only when Gaussian elimination keeps certain pivots (numpy's det
    as the outside reference for the values)."""
    import numpy as np
    from flint import arb

    from plantlint.kernel.exact import ball_rank

    rng = np.random.default_rng(3)
    for _ in range(20):
        M = rng.integers(-3, 4, size=(4, 4))
        balls = [[arb(int(v)) for v in row] for row in M]
        assert (ball_rank(balls)[0] == len(balls)) == (round(np.linalg.det(M)) != 0)
    singular = [[arb(1), arb(2)], [arb(2), arb(4)]]
    assert ball_rank(singular)[0] < len(singular)
    blurred = [[arb(1), arb(0, 1e-30)], [arb(0, 1e-30), arb(0, 1e-30)]]  # may be singular: not proven
    assert ball_rank(blurred)[0] < len(blurred)


def test_a_linearizing_output_bent_by_a_square_is_found() -> None:
    """A reviewer's plant (invented): x1' = x2 + 2 x2 x3, x2' = x3, x3' = -x3 - x1 + u. The
    measured x1 has relative degree 2, but phi = x1 - x2^2 has relative degree 3 = n (by
    hand: L_f phi = x2, L_f^2 phi = x3, L_g L_f^2 phi = 1; sympy below), so the plant is
    state linearizable through it."""
    from plantlint.run.pipeline import analyse_bytes

    x1, x2, x3 = sp.symbols("x1 x2 x3")
    f = sp.Matrix([x2 + 2 * x2 * x3, x3, -x3 - x1])
    g = sp.Matrix([0, 0, 1])
    xs = [x1, x2, x3]

    def lie(h: sp.Expr, v: sp.Matrix) -> sp.Expr:
        return sp.expand((sp.Matrix([h]).jacobian(xs) * v)[0])

    phi = x1 - x2**2
    assert lie(phi, g) == 0 and lie(lie(phi, f), g) == 0 and lie(lie(lie(phi, f), f), g) != 0
    text = b"""plant bent
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in -1 .. 1
input u
rate x1 = x2 + 2*x2*x3
rate x2 = x3
rate x3 = -x3 - x1 + u
output y = x1
point origin: x1 = 0, x2 = 0, x3 = 0
expect state_linearizable
"""
    raw = analyse_bytes(text)
    point = raw.analysis["points"]["origin"]
    assert point["state_linearizable"] is True and point["linearizing_output"] == "x1 - x2^2"


SPACECRAFT_MUTANTS = [  # (the rate as written, as a mutant wrote it; the mutant's seed)
    ("rate w2 = ((J3 - J1)*w3*w1 + T2)/J2\n", "rate w2 = ((J3 - J1)*w3*w1 + T2)/J2/(w1 - 1e-9)\n"),  # 9517
    ("rate q3 = (q0*w3 + q1*w2 - q2*w1)/2\n", "rate q3 = (q0*w3 + q1*w2 - q2*w1)/2^(1/3)\n"),  # 9521
    ("rate w3 = ((J1 - J2)*w1*w2 + T3)/J3\n", "rate w3 = ((J1 - J2)*w1*sqrt(w2) + T3)/J3\n"),  # 9525
]


@pytest.mark.parametrize("written, mutated", SPACECRAFT_MUTANTS)
def test_a_rational_or_irrational_spacecraft_is_bracketed_in_the_ring(written: str, mutated: str) -> None:
    """The spacecraft fixture (quaternion kinematics, Euler's equations, three torques;
    invented inertias) as three mutants of the robustness campaign wrote it: one rate
    divided by (w1 - 1e-9), the q3 rate over 2^(1/3) instead of 2, or sqrt(w2) for w2 in
    the w3 rate. Their brackets were formed by tree differentiation, which swelled with each
    order: the distributions stage stopped at its budget (the sqrt mutant: 55 s). The
    inverse of the sum, the irrational constant and the root are now atoms of the kernel's
    ring.

    References: by hand, f keeps a weighted |q|^2 constant (q0^2 + q1^2 + q2^2 + (a/2) q3^2
    with a = 2 as written, a = 2^(1/3) in the second mutant: its derivative cancels term by
    term for every w), and g does not move q, so every D_k annihilates its differential and
    has rank at most 6; D_0 is span{d/dw1, d/dw2, d/dw3} (involutive), and D_1, annihilated
    by an exact differential and of constant rank 6, is involutive by Frobenius. numpy's
    matrix_rank of [g, ad_f g] at a random point, with ad_f g = Dg f - Df g from sympy's
    Jacobians, gives the 6."""
    from pathlib import Path

    from plantlint.run.pipeline import analyse_bytes

    from plantlint.kernel.lie import Kernel
    from plantlint.run.pipeline import read_model

    text = (Path(REPO) / "tests" / "fixtures" / "models" / "satellite.plant").read_text(encoding="utf-8")
    assert written in text
    model, _ = read_model(text.replace(written, mutated).encode())
    assert model is not None and Kernel(model.plant()).field_ring() is not None  # the ring's route
    raw = analyse_bytes(text.replace(written, mutated).encode())
    analysis = raw.analysis
    assert analysis is not None and analysis["stages"]["not_completed"] == []
    assert analysis["distributions"]["ranks"] == [3] + [6] * 6 and analysis["distributions"]["involutive"]

    q0, q1, q2, q3, w1, w2, w3 = X = sp.symbols("q0 q1 q2 q3 w1 w2 w3")
    J1, J2, J3 = 12, 15, 9
    over = 1 / (w1 - sp.Rational(1, 10**9)) if "w1 - 1e-9" in mutated else 1
    a = sp.cbrt(2) if "2^(1/3)" in mutated else 2
    w2_in_w3 = sp.sqrt(w2) if "sqrt(w2)" in mutated else w2
    f = sp.Matrix([-(q1 * w1 + q2 * w2 + q3 * w3) / 2, (q0 * w1 + q2 * w3 - q3 * w2) / 2,
                   (q0 * w2 + q3 * w1 - q1 * w3) / 2, (q0 * w3 + q1 * w2 - q2 * w1) / a,
                   sp.Rational(J2 - J3, J1) * w2 * w3, sp.Rational(J3 - J1, J2) * w3 * w1 * over,
                   sp.Rational(J1 - J2, J3) * w1 * w2_in_w3])
    gs = [sp.Matrix([0, 0, 0, 0, sp.Rational(1, J1), 0, 0]), sp.Matrix([0, 0, 0, 0, 0, over / J2, 0]),
          sp.Matrix([0, 0, 0, 0, 0, 0, sp.Rational(1, J3)])]
    weights = [2, 2, 2, a]  # d/dt (q0^2 + q1^2 + q2^2 + (a/2) q3^2), times 1
    assert sp.expand(sum(w * q * f[i] for i, (w, q) in enumerate(zip(weights, X[:4])))) == 0
    rng = np.random.default_rng(5)
    point = dict(zip(X, [sp.Rational(int(v), 1000) for v in rng.integers(-400, 400, size=7)]))
    point[w2] = abs(point[w2]) + sp.Rational(1, 10)  # where sqrt(w2) is real
    columns = [g.subs(point) for g in gs] + [(g.jacobian(X) * f - f.jacobian(X) * g).subs(point) for g in gs]
    matrix = np.array([[float(v) for v in col] for col in columns]).T
    assert np.linalg.matrix_rank(matrix) == 6


def test_a_chemostat_names_its_mass_balance_as_what_no_input_moves() -> None:
    """A continuous bioreactor with Monod growth (invented numbers), dilution rate D as the
    input: X' = mu(S) X - D X, S' = -mu(S) X / Y + D (S_in - S). By hand,
    z = X + Y S - Y S_in obeys z' = -D z (the reaction invariant of the mass balance;
    common practice in bioprocess control), so at an equilibrium on z = 0 the linearisation
    cannot move X + Y S = X + 2/5 S, i.e. 5 X + 2 S: the left null vector of the Kalman
    matrix (numpy's SVD below) is (5, 2) up to scale. Around the point (z != 0) D moves z,
    so the rank drop is at a singular point of the distribution."""
    from plantlint.run.pipeline import analyse_bytes

    model = b"""plant chemostat
param mu_max = 0.5
param K_s = 0.2
param Y = 0.4
param S_in = 10
state X in 0.01 .. 5
state S in 0 .. 10
input D in 0 .. 0.45
let mu = mu_max*S/(K_s + S)
rate X = mu*X - D*X
rate S = -mu*X/Y + D*(S_in - S)
output biomass = X
point design: X = 3.92, S = 0.2, D = 0.25
"""
    raw = analyse_bytes(model)
    (note,) = [f for f in raw.findings if f.rule == "not-controllable"]
    assert "has rank 1 < 2; no input moves 5*X + 2*S there, to first order" in note.message
    assert "design is a singular point of the distribution" in note.message
    # the linearisation at the point by hand: mu = D = 1/4, mu'(S) = mu_max K_s / (K_s + S)^2
    mu, dmu, X, S, Y, S_in, D = 0.25, 0.5 * 0.2 / 0.4**2, 3.92, 0.2, 0.4, 10.0, 0.25
    A = np.array([[mu - D, dmu * X], [-mu / Y, -dmu * X / Y - D]])
    B = np.array([[-X], [S_in - S]])
    _, singular, vt = np.linalg.svd(np.hstack([B, A @ B]).T)
    assert singular[-1] < 1e-12 * singular[0]
    left = vt[-1] / vt[-1][0]
    assert np.allclose(left, [1.0, 2 / 5])


REACTOR = b"""plant reactor "A -> B -> C with a heated jacket (invented numbers)"
const k10 = 7.2e10
const k20 = 5.2e9
const E1 = 8750
const E2 = 9750
state CA in 0.01 .. 2
state CB in 0 .. 2
state T in 300 .. 420
state Tj in 280 .. 400
input qj in 0 .. 0.5
input heat in -5 .. 5
let r1 = k10*exp(-E1/T)*CA
let r2 = k20*exp(-E2/T)*CB
rate CA = 0.1*(2 - CA) - r1
rate CB = -0.1*CB + r1 - r2
rate T = 0.1*(350 - T) + 50*r1 + 30*r2 - 0.5*(T - Tj) + heat
rate Tj = 5*qj*(290 - Tj) + 2.5*(T - Tj)
output temp = T
expect state_linearizable
"""


def test_a_state_linearizable_claim_names_the_first_failing_distribution() -> None:
    """A reactor with two consecutive Arrhenius reactions, heated directly and through its
    jacket. G_1 = span{g1, g2, ad_f g1, ad_f g2} is not involutive: with g2 = d/dT,
    [g2, ad_f g2] = -d^2 f/dT^2, whose (CA, CB) part is parallel to that of d f/dT only
    when r1_T r2_TT = r1_TT r2_T, i.e. E1 E2 (E2 - E1) = 0 (by hand, r = k0 exp(-E/T)).
    The analysis stops there, so the claim must say so; it said "the controllability
    distribution has generic rank 3 < 4", G_1's rank, though G_3 has rank 4. Reference for
    that: a 4 x 4 minor of [g, ad_f g, ..., ad_f^3 g] at a rational point, by sympy's diff
    and evalf at 50 digits, is far from zero."""
    from plantlint.run.pipeline import analyse_bytes

    raw = analyse_bytes(REACTOR)
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert claim.message == ("`expect state_linearizable` does not hold: G_1 is not involutive "
                             "([g2, ad_f g2] leaves it)")
    CA, CB, T, Tj = X = sp.symbols("CA CB T Tj")
    r1 = sp.Rational(72 * 10**9) * sp.exp(-sp.Integer(8750) / T) * CA
    r2 = sp.Rational(52 * 10**8) * sp.exp(-sp.Integer(9750) / T) * CB
    f = sp.Matrix([sp.Rational(1, 10) * (2 - CA) - r1, -CB / 10 + r1 - r2,
                   (350 - T) / 10 + 50 * r1 + 30 * r2 - (T - Tj) / 2, sp.Rational(5, 2) * (T - Tj)])
    g1, g2 = sp.Matrix([0, 0, 0, 5 * (290 - Tj)]), sp.Matrix([0, 0, 1, 0])

    def ad(v: sp.Matrix) -> sp.Matrix:
        return v.jacobian(X) * f - f.jacobian(X) * v

    columns = [ad(g1), ad(ad(g1)), ad(ad(ad(g1))), ad(ad(ad(g2)))]
    point = {CA: sp.Rational(1, 2), CB: sp.Rational(3, 10), T: 360, Tj: 320}
    minor = sp.Matrix([[sp.N(e.subs(point), 50) for e in col] for col in columns]).det()
    assert abs(minor) > 1
