"""Relative degree, decoupling matrix and regularity, held against outside sources.

Sources: scipy.signal.ss2tf (pole excess of linear plants), numpy (ranks),
sympy written another way (Lie derivatives and brackets via Matrix.jacobian),
and textbook examples recalled from memory (named beside each test).
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.signal
import sympy as sp

from plantlint.core.findings import Severity
from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant
from plantlint.analysis.structure import (
    analyse_structure,
    certify_envelope,
    structure_at_point,
)
from plantlint.analysis.serialise import envelope_json, point_json, structure_json
from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes
from conftest import MAGLEV, REPO, linear_plant

I = sp.Integer
R = sp.Rational
x1, x2, x3, x4, u, u1, u2 = sp.symbols("x1 x2 x3 x4 u u1 u2")


def rules(findings) -> list[str]:
    return sorted(f.rule for f in findings)


def pole_excess(num: np.ndarray, den: np.ndarray) -> int | None:
    """deg den - deg num after trimming numerically-zero leading coefficients."""
    def degree(c: np.ndarray) -> int | None:
        c = np.atleast_1d(np.asarray(c, dtype=float))
        tol = 1e-8 * max(1.0, float(np.max(np.abs(c))))
        nz = np.nonzero(np.abs(c) > tol)[0]
        return None if len(nz) == 0 else len(c) - 1 - int(nz[0])
    dn = degree(num)
    return None if dn is None else degree(den) - dn  # type: ignore[operator]


# -- linear plants against scipy.signal.ss2tf -----------------------------------------------
def test_siso_relative_degree_is_the_pole_excess_of_the_transfer_function() -> None:
    """Outside source: scipy.signal.ss2tf (pole excess of C (sI - A)^-1 B)."""
    rng = np.random.default_rng(20240611)
    seen = set()
    for _ in range(40):
        n = int(rng.integers(2, 5))
        A = rng.integers(-2, 3, size=(n, n))
        B = rng.integers(-1, 2, size=(n, 1)) * (rng.random((n, 1)) < 0.5)
        C = rng.integers(-1, 2, size=(1, n)) * (rng.random((1, n)) < 0.6)
        num, den = scipy.signal.ss2tf(A.astype(float), B.astype(float), C.astype(float), np.zeros((1, 1)))
        expected = pole_excess(num[0], den)
        s = analyse_structure(Kernel(linear_plant(A, B, C)))
        assert s.relative_degree["y1"] == expected, (A, B, C)
        seen.add(expected)
    assert len(seen) >= 3  # the draw exercised several relative degrees (and unreachable outputs)


def test_mimo_relative_degrees_are_the_smallest_pole_excess_per_output() -> None:
    """Outside source: scipy.signal.ss2tf per input column; r_i = min_j excess(G_ij)."""
    rng = np.random.default_rng(7)
    for _ in range(15):
        n = 4
        A = rng.integers(-2, 3, size=(n, n))
        B = rng.integers(-1, 2, size=(n, 2)) * (rng.random((n, 2)) < 0.5)
        C = rng.integers(-1, 2, size=(2, n)) * (rng.random((2, n)) < 0.6)
        s = analyse_structure(Kernel(linear_plant(A, B, C)))
        for i in range(2):
            excess = []
            for j in range(2):
                num, den = scipy.signal.ss2tf(A.astype(float), B.astype(float), C.astype(float), np.zeros((2, 2)), input=j)
                e = pole_excess(num[i], den)
                if e is not None:
                    excess.append(e)
            assert s.relative_degree[f"y{i + 1}"] == (min(excess) if excess else None)
        if s.decoupling is not None:
            # A_ij = C_i A^(r_i - 1) B_j for linear plants; its rank from numpy
            rows = [C[i] @ np.linalg.matrix_power(A, s.outputs[i].relative_degree - 1) @ B for i in range(2)]
            assert s.generic_rank == np.linalg.matrix_rank(np.array(rows, dtype=float))


# -- textbook examples -------------------------------------------------------------------------
def van_der_pol(h: sp.Expr, box: dict | None = None) -> Plant:
    eps = sp.Symbol("eps")
    return Plant.from_matrices(
        "vdp", [x1, x2], [u], [x2, -x1 + eps * (1 - x1**2) * x2], [[0, 1]], [h], ["y"],
        params=(eps,), param_nominal={eps: I(1)}, param_box={eps: (R(1, 10), I(2))},
        state_box=box or {x1: (I(-2), I(2)), x2: (I(-2), I(2))},
    )


def test_khalil_example_13_6_van_der_pol_outputs() -> None:
    """Khalil, Nonlinear Systems 3rd ed., Example 13.6 (from memory): y = x1 has relative
    degree 2, y = x2 relative degree 1, y = x1 + x2^2 relative degree 1 where x2 != 0."""
    assert analyse_structure(Kernel(van_der_pol(x1))).relative_degree == {"y": 2}
    assert analyse_structure(Kernel(van_der_pol(x2))).relative_degree == {"y": 1}
    k = Kernel(van_der_pol(x1 + x2**2))
    s = analyse_structure(k)
    assert s.relative_degree == {"y": 1}
    assert sp.expand(s.outputs[0].row[0] - 2 * x2) == 0
    off = structure_at_point(k, s, "off", {x1: I(1), x2: R(1, 2)})
    assert off.relative_degree == {"y": 1} and off.well_defined and off.findings == ()
    on = structure_at_point(k, s, "on", {x1: I(1), x2: I(0), u: I(3)})
    assert on.relative_degree == {"y": None} and not on.well_defined
    (f,) = on.findings
    assert (f.rule, f.severity, f.point, f.anchor) == ("relative-degree-ill-defined", Severity.ERROR, "on", "point on")
    assert "2*x2" in f.message and "y" in f.message
    env = certify_envelope(k, s)
    assert env.regular is False and env.witness is not None and abs(env.witness["x2"]) < 1e-9
    assert set(env.witness) == {"x1", "x2", "eps"}
    clear = Kernel(van_der_pol(x1 + x2**2, {x1: (I(-2), I(2)), x2: (R(1, 4), I(2))}))
    env = certify_envelope(clear, analyse_structure(clear))
    assert env.regular is True and 0 < env.margin <= 0.5  # min |2 x2| = 1/2 on the box


def dc_motor(box: dict) -> Plant:
    a, b, c, theta, kk = 1, 2, 1, 3, 4  # invented numbers; the structure does not depend on them
    return Plant.from_matrices(
        "motor", [x1, x2, x3], [u],
        [-a * x1, -b * x2 + kk - c * x1 * x3, theta * x1 * x2], [[1, 0, 0]], [x3], ["y"],
        state_box=box,
    )


def test_khalil_example_13_7_field_controlled_dc_motor() -> None:
    """Khalil, Nonlinear Systems 3rd ed., Example 13.7 (from memory): y = x3 has relative
    degree 2 on the region x2 != 0 (L_g L_f h = theta x2)."""
    box = {x1: (I(-1), I(1)), x2: (R(1, 2), I(2)), x3: (I(-1), I(1))}
    k = Kernel(dc_motor(box))
    s = analyse_structure(k)
    assert s.relative_degree == {"y": 2}
    assert sp.expand(s.outputs[0].row[0] - 3 * x2) == 0
    bad = structure_at_point(k, s, "stalled", {x1: I(0), x2: I(0), x3: I(1)})
    assert bad.relative_degree == {"y": None} and rules(bad.findings) == ["relative-degree-ill-defined"]
    env = certify_envelope(k, s)
    assert env.regular is True and env.margin == pytest.approx(1.5, rel=1e-6)  # 3 * min x2
    k2 = Kernel(dc_motor({x1: (I(-1), I(1)), x2: (I(-1), I(1)), x3: (I(-1), I(1))}))
    env2 = certify_envelope(k2, analyse_structure(k2))
    assert env2.regular is False and abs(env2.witness["x2"]) < 1e-9
    assert rules(env2.findings) == ["envelope-singular"]
    assert env2.findings[0].anchor == "envelope" and "x2" in env2.findings[0].message


def test_slotine_li_example_6_10_singular_where_x2_is_minus_one() -> None:
    """Slotine & Li, Applied Nonlinear Control, Example 6.10 (from memory): x1' = sin x2 +
    (x2 + 1) x3, x2' = x1^5 + x3, x3' = x1^2 + u, y = x1: relative degree 2, u appears with
    the factor x2 + 1."""
    p = Plant.from_matrices(
        "sl", [x1, x2, x3], [u], [sp.sin(x2) + (x2 + 1) * x3, x1**5 + x3, x1**2], [[0, 0, 1]], [x1], ["y"],
        state_box={x1: (I(-1), I(1)), x2: (I(-2), I(0)), x3: (I(-1), I(1))},
    )
    k = Kernel(p)
    s = analyse_structure(k)
    assert s.relative_degree == {"y": 2}
    at = structure_at_point(k, s, "edge", {x1: I(0), x2: I(-1), x3: I(0)})
    assert not at.well_defined and ("x2 + 1" in at.findings[0].message or "1 + x2" in at.findings[0].message)
    assert structure_at_point(k, s, "rest", {x1: I(0), x2: I(0), x3: I(0)}).well_defined
    env = certify_envelope(k, s)
    assert env.regular is False and env.witness["x2"] == pytest.approx(-1, abs=1e-9)


# -- MIMO: decoupling matrix ---------------------------------------------------------------------
th, v, a, w = sp.symbols("th v a w")
px, py = sp.symbols("px py")


def test_unicycle_has_a_zero_input_column_and_a_singular_decoupling_matrix() -> None:
    """Unicycle with position outputs: A = [[cos th, 0], [sin th, 0]], rank 1 everywhere; the
    standard remedy is dynamic extension (De Luca, Oriolo & Vendittelli, "Control of wheeled
    mobile robots", 1998 — from memory)."""
    p = Plant.from_matrices(
        "unicycle", [px, py, th], [v, w], [0, 0, 0], [[sp.cos(th), sp.sin(th), 0], [0, 0, 1]], [px, py],
        ["yx", "yy"], state_box={px: (I(-1), I(1)), py: (I(-1), I(1)), th: (-sp.pi, sp.pi)},
    )
    k = Kernel(p)
    s = analyse_structure(k)
    assert s.relative_degree == {"yx": 1, "yy": 1}
    assert s.generic_rank == 1 and s.rank_certain and s.zero_columns == (1,)
    (f,) = s.findings
    assert (f.rule, f.anchor) == ("decoupling-singular", "plant")
    assert "singular everywhere" in f.message and "rank 1" in f.message
    assert "w" in f.hint and "dynamic extension" in f.hint
    env = certify_envelope(k, s)
    assert env.regular is False


def extended_unicycle(v_range: tuple) -> Plant:
    return Plant.from_matrices(
        "unicycle_ext", [px, py, th, v], [a, w],
        [v * sp.cos(th), v * sp.sin(th), 0, 0], [[0, 0, 0, 1], [0, 0, 1, 0]], [px, py], ["yx", "yy"],
        state_box={px: (I(-1), I(1)), py: (I(-1), I(1)), th: (-sp.pi, sp.pi), v: v_range},
    )


def test_dynamic_extension_of_the_unicycle_is_singular_only_at_rest() -> None:
    """Same source: with an integrator on v, A = [[cos th, -v sin th], [sin th, v cos th]],
    det A = v; rank at points checked with numpy.linalg.matrix_rank."""
    k = Kernel(extended_unicycle((R(1, 2), I(2))))
    s = analyse_structure(k)
    assert s.relative_degree == {"yx": 2, "yy": 2} and s.findings == () and s.generic_rank == 2
    moving = structure_at_point(k, s, "cruise", {px: I(0), py: I(0), th: R(1, 3), v: I(1)})
    assert moving.well_defined and moving.decoupling_rank == 2
    rest = structure_at_point(k, s, "rest", {px: I(0), py: I(0), th: R(1, 3), v: I(0), a: I(0)})
    numeric = np.array([[np.cos(1 / 3), 0.0], [np.sin(1 / 3), 0.0]])
    assert rest.decoupling_rank == np.linalg.matrix_rank(numeric) == 1
    assert rest.relative_degree == {"yx": 2, "yy": 2} and not rest.well_defined
    (f,) = rest.findings
    assert (f.rule, f.point, f.anchor) == ("decoupling-singular", "rest", "point rest")
    assert "rank 1" in f.message and "w" in f.hint
    assert point_json(rest) == {"relative_degree": {"yx": 2, "yy": 2}, "well_defined": False, "decoupling_rank": 1}
    env = certify_envelope(k, s)
    assert env.regular is True and 0 < env.margin <= 0.5  # a lower bound of min |det A| = min v
    assert envelope_json(env) == {"regular": True, "margin": env.margin, "witness": None}
    k0 = Kernel(extended_unicycle((I(-1), I(1))))
    env0 = certify_envelope(k0, analyse_structure(k0))
    assert env0.regular is False and env0.witness["v"] == 0
    assert "det A" in env0.findings[0].message


def test_proportional_rows_are_singular_everywhere_without_a_zero_column() -> None:
    """Rows (1, x2) and (2, 2 x2) are proportional: rank 1 at random points (numpy)."""
    p = Plant.from_matrices("prop", [x1, x2], [u1, u2], [0, 0], [[1, 1], [x2, 0]], [x1, 2 * x1])
    s = analyse_structure(Kernel(p))
    rng = np.random.default_rng(3)
    for _ in range(5):
        z = rng.normal()
        assert np.linalg.matrix_rank(np.array([[1, z], [2, 2 * z]])) == s.generic_rank == 1
    (f,) = s.findings
    assert f.rule == "decoupling-singular" and s.zero_columns == () and "independent outputs" in f.hint


def test_output_unaffected_by_the_input_has_no_relative_degree() -> None:
    """x2 never drives x1 (scipy.signal.ss2tf gives a zero transfer function)."""
    p = Plant.from_matrices("blind", [x1, x2], [u], [-x1, x1], [[0, 1]], [x1], ["y"], state_box={x1: (I(-1), I(1))})
    k = Kernel(p)
    s = analyse_structure(k)
    num, _ = scipy.signal.ss2tf(np.array([[-1.0, 0], [1, 0]]), np.array([[0.0], [1]]), np.array([[1.0, 0]]), np.zeros((1, 1)))
    assert np.allclose(num, 0)
    assert structure_json(s) == {"relative_degree": {"y": None}}
    (f,) = s.findings
    assert (f.rule, f.severity, f.anchor) == ("relative-degree-undefined", Severity.ERROR, "output y")
    ps = structure_at_point(k, s, "rest", {x1: I(0), x2: I(0)})
    assert point_json(ps) == {"relative_degree": {"y": None}, "well_defined": False, "decoupling_rank": 0}
    env = certify_envelope(k, s)  # x2 has no range: not a box
    assert env.regular is None and rules(env.findings) == ["envelope-unproven"] and "x2" in env.findings[0].message


# -- the model's own domain over the envelope ----------------------------------------------------
@pytest.mark.parametrize(
    "rate, box_x1, anchor, word",
    [
        (x2 / (x1 - R(1, 3)), (I(0), I(1)), "rate x1", "denominator"),
        (sp.sqrt(x1), (I(-1), I(1)), "rate x1", "square-root"),
        (sp.log(x1 + 1), (R(-3, 2), I(1)), "rate x1", "log"),
        (sp.asin(x1 / 2), (I(0), I(3)), "rate x1", "asin"),
    ],
)
def test_model_undefined_inside_the_envelope_is_reported_with_a_witness(rate, box_x1, anchor, word) -> None:
    """Domains from the functions' definitions (denominator != 0, sqrt >= 0, log > 0, |asin| <= 1)."""
    p = Plant.from_matrices("dom", [x1, x2], [u], [rate, 0], [[0, 1]], [x2], ["y"], state_box={x1: box_x1, x2: (I(1), I(2))})
    k = Kernel(p)
    env = certify_envelope(k, analyse_structure(k))
    assert env.regular is False
    (f,) = [f for f in env.findings if f.rule == "singular-model"]
    assert f.anchor == anchor and word in f.message and f.severity is Severity.ERROR
    x = env.witness["x1"]
    assert box_x1[0] <= x <= box_x1[1]
    bad = {"denominator": abs(x - 1 / 3) < 1e-9, "square-root": x <= 0, "log": x + 1 <= 0, "asin": abs(x / 2) >= 1}
    assert bad[word]


def test_square_root_reaching_zero_is_not_smooth() -> None:
    """d/dh sqrt(h) = 1 / (2 sqrt(h)) is unbounded at h = 0 (calculus): a tank level range
    starting at 0 makes the rate non-smooth there; starting at 0.05 is clean."""
    h, q = sp.symbols("h q")
    for lo, expected in ((I(0), False), (R(1, 20), True)):
        p = Plant.from_matrices("tank", [h], [q], [-R(1, 25) * sp.sqrt(h)], [[2]], [h], ["level"],
                                state_box={h: (lo, I(2))})
        k = Kernel(p)
        env = certify_envelope(k, analyse_structure(k))
        assert env.regular is expected
        if not expected:
            (f,) = env.findings
            assert (f.rule, f.anchor) == ("singular-model", "rate h") and env.witness == {"h": 0.0}


def test_zero_decision_without_symbolic_proof_is_reported() -> None:
    """sin^2 + cos^2 - 1 = 0 (trigonometry) times a polynomial too large to simplify: the
    kernel can only screen it, and the relative degree says it relies on that."""
    big = sum(x1**j * x2**k for j in range(10) for k in range(10))
    p = Plant.from_matrices("trig", [x1, x2], [u], [x2, 0], [[(sp.sin(x1) ** 2 + sp.cos(x1) ** 2 - 1) * big, 1]],
                            [x1], ["y"])
    s = analyse_structure(Kernel(p))
    assert s.relative_degree == {"y": 2} and s.outputs[0].unconfirmed == ("L_g y",)
    (f,) = s.findings
    assert (f.rule, f.severity, f.anchor) == ("analysis-budget", Severity.WARNING, "output y")


def test_model_with_a_denominator_kept_away_from_zero_is_clean() -> None:
    """2 + sin(x1) >= 1 everywhere (elementary bound)."""
    p = Plant.from_matrices("ok", [x1, x2], [u], [x2, 0], [[0, 1 / (2 + sp.sin(x1))]], [x1], ["y"],
                            state_box={x1: (I(-4), I(4)), x2: (I(-1), I(1))})
    k = Kernel(p)
    env = certify_envelope(k, analyse_structure(k))
    assert env.regular is True and env.findings == () and 0 < env.margin <= 1 / 3


def test_budget_exhaustion_gives_unproven_not_a_verdict() -> None:
    """(x1^2 - 2)^2 vanishes only at the irrational sqrt(2) without a sign change: no
    finite search can prove either answer (math: the root is irrational)."""
    p = Plant.from_matrices("tangent", [x1], [u], [0], [[(x1**2 - 2) ** 2]], [x1], ["y"], state_box={x1: (I(1), I(2))})
    k = Kernel(p)
    env = certify_envelope(k, analyse_structure(k), max_boxes=100)
    assert env.regular is None and env.margin is None and env.witness is None
    (f,) = env.findings
    assert f.rule == "envelope-unproven" and f.severity is Severity.WARNING and "undecided" in f.message


# -- the pairing identity of the theory notes ------------------------------------------------------
def _lie(h: sp.Expr, F: sp.Matrix, X: sp.Matrix) -> sp.Expr:
    return sp.expand((sp.Matrix([h]).jacobian(X) * F)[0])


def _bracket(F: sp.Matrix, G: sp.Matrix, X: sp.Matrix) -> sp.Matrix:
    return (G.jacobian(X) * F - F.jacobian(X) * G).expand()


def random_plant(rng: np.random.Generator) -> Plant:
    xs = (x1, x2, x3)
    monomials = [I(1), x1, x2, x3, x1 * x2, x1**2, x2 * x3, x3**2]

    def poly(k: int) -> sp.Expr:
        return sum(int(rng.choice([-2, -1, 1, 2])) * monomials[int(rng.integers(len(monomials)))] for _ in range(k))

    f = [x2 * int(rng.integers(0, 2)) + poly(1), x3 + poly(int(rng.integers(0, 2))), poly(2)]
    g = [poly(1) if rng.random() < 0.3 else 0, poly(1) if rng.random() < 0.3 else 0, 1 + poly(int(rng.integers(0, 2)))]
    h = x1 + (poly(1) if rng.random() < 0.3 else 0)
    return Plant.from_matrices("random", list(xs), [u], f, [g], [h], ["y"])


def test_pairing_matrix_is_anti_triangular_with_nonzero_anti_diagonal() -> None:
    """Theory notes (Isidori, Nonlinear Control Systems 3rd ed., Lemma 4.1.2 — from memory):
    <dL_f^j h, ad_f^i g>(x0) = 0 for i + j < r - 1 and (-1)^i L_g L_f^(r-1) h(x0) on the
    anti-diagonal; the r differentials are independent (numpy rank). Computed here with
    sympy Matrix.jacobian, independently of the kernel."""
    rng = np.random.default_rng(11)
    X = sp.Matrix([x1, x2, x3])
    degrees: list[int] = []
    for _ in range(25):
        plant = random_plant(rng)
        k = Kernel(plant)
        s = analyse_structure(k)
        r = s.relative_degree["y"]
        point = {x: R(int(rng.integers(-5, 6)), int(rng.integers(1, 4))) for x in (x1, x2, x3)}
        ps = structure_at_point(k, s, "x0", point)
        if r is None or ps.relative_degree["y"] != r:
            continue
        degrees.append(r)
        F, G = sp.Matrix(plant.f), sp.Matrix(plant.g[0])
        lf = [plant.h[0]]
        for _ in range(r):
            lf.append(_lie(lf[-1], F, X))
        ads = [G]
        for _ in range(r - 1):
            ads.append(_bracket(F, ads[-1], X))
        dl = [sp.Matrix([e]).jacobian(X) for e in lf[:r]]
        lglf = _lie(lf[r - 1], G, X).xreplace(point)
        assert lglf != 0
        for i in range(r):
            for j in range(r):
                pairing = (dl[j] * ads[i])[0].xreplace(point)
                if i + j < r - 1:
                    assert pairing == 0
                elif i + j == r - 1:
                    assert pairing == (-1) ** i * lglf
        D = np.array([[float(e) for e in d.xreplace(point)] for d in dl])
        assert np.linalg.matrix_rank(D) == r
    assert len(degrees) >= 15 and len(set(degrees)) >= 2


def _kernel_of(path) -> Kernel:
    from plantlint.run.pipeline import read_model

    model, _ = read_model(path.read_bytes())
    return Kernel(model.plant())


def test_pendulum_chain_of_8_with_a_product_of_cosines_stays_proven_with_a_tight_margin() -> None:
    """The 8-pendulum chain (benchmarks/generate.py) has the decoupling term
    c * prod_i cos(q_i - q_i+1). On the envelope |q_i - q_i+1| <= 1 < pi/2, so every
    factor is at least cos(1) (math.cos), reached at a corner: the true minimum of
    |term| is c * cos(1)^7. The certified margin is a lower bound of it and, with the
    period-aware cosine enclosures, within 1e-6 of it."""
    from conftest import REPO
    import math

    k = _kernel_of(REPO / "benchmarks" / "results" / "models" / "pendulum_chain_8.plant")
    s = analyse_structure(k)
    (term,) = list(s.decoupling)
    c, parts = term.as_coeff_mul()
    assert len(parts) == 7 and all(isinstance(p, sp.cos) for p in parts)
    env = certify_envelope(k, s)
    assert env.regular is True and not env.findings
    true_min = float(c) * math.cos(1) ** 7
    assert true_min * (1 - 1e-6) <= env.margin <= true_min * (1 + 1e-12)


def test_envelope_proof_forms_no_symbolic_derivative(monkeypatch) -> None:
    """The centred form's gradients come from interval forward mode on the
    expression graph, not from sympy.diff: the palletizer arm (two-link arm, whose
    determinant proof uses the centred form) is certified with Expr.diff disabled,
    and the margin is a lower bound of min |det A| sampled with numpy on a grid."""
    from conftest import REPO
    from sympy.core.expr import Expr

    k = _kernel_of(REPO / "example_repo" / "models" / "handling" / "palletizer_arm.plant")
    s = analyse_structure(k)

    def refuse(self, *args, **kwargs):
        raise AssertionError("sympy differentiation inside the envelope proof")

    monkeypatch.setattr(Expr, "diff", refuse)
    env = certify_envelope(k, s)
    monkeypatch.undo()
    assert env.regular is True and env.boxes_examined > 1
    det = sp.Matrix(s.decoupling).det()
    syms = sorted(det.free_symbols, key=str)
    box = {**k.plant.state_box, **k.plant.param_box}
    grids = np.meshgrid(*[np.linspace(float(box[v][0]), float(box[v][1]), 9) for v in syms])
    values = sp.lambdify(syms, det, "numpy")(*grids)
    assert 0 < env.margin <= float(np.min(np.abs(values)))


def test_domain_conditions_render_their_description_only_when_shown(monkeypatch) -> None:
    """The readable (factored) form of a condition is built when a message shows it, not before."""
    import plantlint.analysis.structure as structure

    shown: list[sp.Expr] = []
    real = structure.readable
    monkeypatch.setattr(structure, "readable", lambda e: shown.append(e) or real(e))
    conds = structure.domain_conditions(1 / (x1**2 - 1) + sp.sqrt(x2 + 2) + sp.log(x1 + 3), {x1, x2})
    assert {(kind, e) for kind, e, _ in conds} == {("nonzero", x1**2 - 1), ("positive", x2 + 2), ("positive", x1 + 3)}
    assert shown == []
    words = {str(what) for _, _, what in conds}
    assert len(shown) == 3
    assert words == {"denominator " + real(x1**2 - 1), "square-root argument " + real(x2 + 2),
                     "log argument " + real(x1 + 3)}
    assert "denominator -1 + x1^2" in words



def test_singular_envelope_is_shown_at_the_range_to_narrow() -> None:
    # The magnetic levitation model of conftest with the coil current allowed through zero.
    # Independent reference, plain sympy: L_g L_f^2 x = d/di(L_f^2 x) * (1/L), with
    # L_f^2 x = grav - k i^2/(m x^2): -2 k i/(m L x^2), which vanishes exactly where i = 0.
    # That the range of i (line 9) is the one to narrow, not the first range (x, line 7),
    # is the point of the check.
    x, i = sp.symbols("x i")
    k, m, L = sp.Rational(1, 10000), sp.Rational(5, 100), sp.Rational(1, 10)
    lf2 = sp.Rational(981, 100) - k * i**2 / (m * x**2)
    assert sp.simplify(sp.diff(lf2, i) / L - (-2 * k * i / (m * L * x**2))) == 0
    through_zero = MAGLEV.replace(b"state i in 0.1 .. 2", b"state i in -2 .. 2")
    raw = analyse_bytes(through_zero)
    (singular,) = [f for f in raw.findings if f.rule == "envelope-singular"]
    assert "i = 0" in singular.message and singular.anchor == "envelope"
    assert singular.span is not None and (singular.span.line, singular.span.column) == (9, 9)
    # as written (i in 0.1 .. 2) the envelope is regular
    assert "envelope-singular" not in [f.rule for f in analyse_bytes(MAGLEV).findings]


def test_generic_rank_by_balls_is_the_exact_rank(monkeypatch: pytest.MonkeyPatch) -> None:
    # The ball screen may only shortcut a full rank that exact arithmetic would find too.
    # Reference: sympy's own Matrix.rank of the matrix at the same sample point.
    from plantlint.analysis import structure

    x1, x2, x3 = sp.symbols("x1 x2 x3")
    u1, u2 = sp.symbols("u1 u2")
    cases = [
        sp.Matrix([[1 + x1**2, x2], [x3, sp.sin(x1) + 2]]),           # full
        sp.Matrix([[x1, x2], [2 * x1, 2 * x2]]),                       # rank 1
        sp.Matrix([[sp.Rational(981, 100) ** x1, 1], [0, x2 - 3]]),    # full, a radical at samples
    ]
    for A in cases:
        plant = Plant.from_matrices("p", [x1, x2, x3], [u1, u2], [x2, x3, -x1], [[1, 0, 0], [0, 1, 0]], [x1, x2])
        kernel = Kernel(plant)
        fast = structure._generic_rank(kernel, A)
        with monkeypatch.context() as m:
            m.setattr(structure, "_ball_rank_at", lambda *a: 0)
            slow = structure._generic_rank(kernel, A)
        sample = kernel.samples()[0]
        reference = A.xreplace({s: sp.Rational(v.numerator, v.denominator) for s, v in sample.items()}).rank()
        assert fast == slow and fast[0] == reference, (A, fast, slow, reference)


def test_messages_do_not_factor_polynomials_of_huge_degree() -> None:
    # sympy's factor reads exp(-8000/T) as (exp(1/T))^(-8000) (its own generator choice,
    # seen with sp.factor's gens), a degree-8000 polynomial factored in C code that no time
    # bound interrupts (a mutated reactor model spent its whole budget there). Such an
    # expression is shown as it is; small ones are still factored.
    from plantlint.analysis.structure import _small_degrees, readable

    T, x = sp.symbols("T_r x")
    big = -2 + 3000000000 * sp.exp(-8000 / T)
    assert not _small_degrees(big) and readable(big) == "-2 + 3000000000*exp(-8000/T_r)"
    small = x**3 - 3 * x**2 + 3 * x - 1  # the binomial expansion of (x - 1)^3
    assert _small_degrees(small) and readable(small) == "(-1 + x)^3"


BALL_BEAM = b"""plant ball_beam "ball and beam (invented numbers)"
const g = 9.81
param B = 0.7
state r in -0.4 .. 0.4
state vr in -1 .. 1
state th in -0.3 .. 0.3
state w in -1 .. 1
input a in -5 .. 5
rate r = vr
rate vr = B*(r*w^2 - g*sin(th))
rate th = w
rate w = a
output pos = r
"""


def test_ball_and_beam_singular_envelope_names_the_vanishing_factor() -> None:
    """Ball and beam with the beam's angular acceleration as input (Hauser, Sastry &
    Kokotovic, IEEE TAC 37(3), 1992, from memory): y = r has L_g L_f^2 h = 2 B r w, zero on
    r = 0 and on w = 0, so the relative degree is not well defined at any rest point. The
    term is recomputed here with sympy's diff (Lie derivatives written out by hand)."""
    r, vr, th_, w_ = sp.symbols("r vr th w")
    B, g = sp.Rational(7, 10), sp.Rational(981, 100)
    f = [vr, B * (r * w_**2 - g * sp.sin(th_)), w_, 0]
    x = [r, vr, th_, w_]

    def lie(e: sp.Expr, field: list) -> sp.Expr:
        return sum((sp.diff(e, xi) * fi for xi, fi in zip(x, field)), sp.Integer(0))

    term = sp.factor(lie(lie(lie(r, f), f), [0, 0, 0, 1]))
    assert term == sp.Rational(7, 5) * r * w_
    (singular,) = [f for f in analyse_bytes(BALL_BEAM).findings if f.rule == "envelope-singular"]
    assert "L_g L_f^2 pos vanishes at" in singular.message
    # every factor that is zero at the witness is named (at r = w = 0 both are), and the
    # finding points at the range of the first of them
    witness = dict(p.split(" = ") for p in singular.message.split(" vanishes at ")[1].split(" (")[0].split(", "))
    zero = [name for name in ("r", "w") if float(witness[name]) == 0]
    phrase = (f"its factor {zero[0]} is zero there" if len(zero) == 1 else "its factors r and w are zero there")
    assert zero and phrase in singular.message
    assert singular.span is not None and singular.span.line == 4 + (zero[0] == "w") * 3  # its range


ARM_TIP = b"""plant arm_tip "planar arm, tip position (invented numbers)"
param l1 = 0.5
param l2 = 0.4
state q1 in -1 .. 1
state q2 in -2 .. 2
state w1 in -2 .. 2
state w2 in -2 .. 2
input a1 in -10 .. 10
input a2 in -10 .. 10
rate q1 = w1
rate q2 = w2
rate w1 = a1
rate w2 = a2
output px = l1*cos(q1) + l2*cos(q1 + q2)
output py = l1*sin(q1) + l2*sin(q1 + q2)
"""


def test_arm_singularity_points_at_the_elbow_range() -> None:
    """The tip Jacobian of a planar two-link arm has det J = l1 l2 sin q2 (Spong, Hutchinson
    & Vidyasagar, Robot Modeling and Control, the planar elbow manipulator; from memory):
    singular with the arm stretched, q2 = 0, whatever q1. With joint accelerations as inputs
    the decoupling matrix is J, so envelope-singular must point at the range of q2, though
    the determinant as formed still names q1 (sympy's trigsimp shows d det / d q1 = 0)."""
    q1, q2 = sp.symbols("q1 q2")
    l1, l2 = sp.Rational(1, 2), sp.Rational(2, 5)
    J = sp.Matrix([l1 * sp.cos(q1) + l2 * sp.cos(q1 + q2), l1 * sp.sin(q1) + l2 * sp.sin(q1 + q2)]).jacobian([q1, q2])
    assert sp.trigsimp(J.det()) == l1 * l2 * sp.sin(q2)
    (singular,) = [f for f in analyse_bytes(ARM_TIP).findings if f.rule == "envelope-singular"]
    assert "q2 = 0" in singular.message
    assert singular.span is not None and singular.span.line == 5  # state q2, not q1 on line 4


UNICYCLE = """
# invented: a kinematic cart with forward speed and turn rate, position outputs
plant cart
state px in -5 .. 5
state py in -5 .. 5
state th in -3 .. 3
input v in -1 .. 1
input w in -2 .. 2
rate px = v*cos(th)
rate py = v*sin(th)
rate th = w
output xo = px
output yo = py
expect regular
"""


def test_a_decoupling_matrix_singular_everywhere_is_not_described_as_one_singular_spot() -> None:
    """The envelope claim on a plant whose decoupling matrix has generic rank 1 names the
    rank, not "singular at px = 0, py = 0, th = 0" as if one point were the trouble."""
    from plantlint.run.pipeline import analyse_bytes

    # reference, sympy done by hand: the decoupling matrix [[cos th, 0], [sin th, 0]]
    # (the outputs' first derivatives, differentiated in v and w) has determinant 0
    th = sp.Symbol("th")
    assert sp.Matrix([[sp.cos(th), 0], [sp.sin(th), 0]]).det() == 0
    raw = analyse_bytes(UNICYCLE.encode())
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert claim.message == ("`expect regular` does not hold: the decoupling matrix is singular everywhere (generic "
                             "rank 1 for 2 outputs; see the decoupling-singular finding)")


ARM = """
# invented: a two-link arm with its elbow range through the stretched-out pose q2 = 0
plant arm
const l1 = 0.5
const l2 = 0.4
state q1 in -1.5 .. 1.5
state q2 in -0.2 .. 2.8
state w1 in -3 .. 3
state w2 in -3 .. 3
input tau1
input tau2
rate q1 = w1
rate q2 = w2
rate w1 = tau1 - w1/10
rate w2 = tau2 - w2/20
output px = l1*cos(q1) + l2*cos(q1 + q2)
output py = l1*sin(q1) + l2*sin(q1 + q2)
"""


def test_a_singular_set_through_a_simple_point_is_reported_at_that_point_exactly() -> None:
    """The arm's decoupling determinant is l1 l2 sin(q2) (the Jacobian of the tip position,
    a textbook result for two-link arms, from memory; sympy below): bisection alone stops
    at q2 = -1.6e-38, the exact zero is q2 = 0."""
    from plantlint.run.pipeline import analyse_bytes

    q1, q2 = sp.symbols("q1 q2")
    l1, l2 = sp.Rational(1, 2), sp.Rational(2, 5)
    tip = sp.Matrix([l1 * sp.cos(q1) + l2 * sp.cos(q1 + q2), l1 * sp.sin(q1) + l2 * sp.sin(q1 + q2)])
    assert sp.simplify(tip.jacobian([q1, q2]).det() - l1 * l2 * sp.sin(q2)) == 0
    (f,) = [f for f in analyse_bytes(ARM.encode()).findings if f.rule == "envelope-singular"]
    assert "q2 = 0 " in f.message and " (exactly" in f.message.split(" vanishes at ")[1]


def test_an_exact_witness_is_as_plain_as_the_zero_allows() -> None:
    """The arm's det A vanishes at q2 = 0 whatever q1 (above); bisection's witness had
    q1 = -1.3, which tells the reader nothing, and q1 = 0 (the arm stretched along x) says
    the same plainly. The rates w1, w2 do not enter det A at all, so the message gives no
    value for them (it gave the box's centre) and says it vanishes whatever they are.
    Reference: numpy, the decoupling matrix of the tip outputs with joint accelerations as
    inputs is the tip Jacobian J(q), which has no w; its rank at the witness is 1."""
    from plantlint.run.pipeline import analyse_bytes

    (f,) = [f for f in analyse_bytes(ARM.encode()).findings if f.rule == "envelope-singular"]
    assert "vanishes at q1 = 0, q2 = 0 (exactly, whatever w1 and w2)" in f.message, f.message
    (claim,) = [f for f in analyse_bytes((ARM + "expect regular\n").encode()).findings
                if f.rule == "expectation-failed"]  # a failed claim quotes the same place
    assert claim.message.endswith("(singular at q1 = 0, q2 = 0, whatever w1 and w2)"), claim.message
    l1, l2, q1, q2 = 0.5, 0.4, 0.0, 0.0
    J = np.array([[-l1 * np.sin(q1) - l2 * np.sin(q1 + q2), -l2 * np.sin(q1 + q2)],
                  [l1 * np.cos(q1) + l2 * np.cos(q1 + q2), l2 * np.cos(q1 + q2)]])
    assert np.linalg.matrix_rank(J) == 1


def test_a_relative_degree_read_off_a_linearisation_is_explained() -> None:
    """The ball and beam has relative degree 3 (L_g L_f^2 pos = 2 B r w, by hand above), which
    vanishes at rest: the linearisation at a rest point has relative degree 4 (its first
    non-zero Markov parameter C A^(k-1) B is at k = 4; numpy below). A claim of 4 fails and
    says where the 4 comes from."""
    from plantlint.run.pipeline import analyse_bytes

    B, g = 0.7, 9.81
    A = np.array([[0, 1, 0, 0], [0, 0, -B * g, 0], [0, 0, 0, 1], [0, 0, 0, 0]], dtype=float)
    b = np.array([0, 0, 0, 1.0])
    c = np.array([1.0, 0, 0, 0])
    markov = [c @ np.linalg.matrix_power(A, k - 1) @ b for k in range(1, 5)]
    assert [k for k, m in enumerate(markov, start=1) if m != 0][0] == 4
    by_hand = 2 * sp.Rational(7, 10) * sp.Symbol("r") * sp.Symbol("w")  # 2 B r w with B = 0.7, written by sympy
    text = BALL_BEAM.decode() + "point rest: r = 0.2, vr = 0, th = 0, w = 0, a = 0\n" + (
        "expect relative_degree(pos) = 4\nexpect relative_degree(pos) = 4 at rest\n")
    claims = sorted(f.message for f in analyse_bytes(text.encode()).findings if f.rule == "expectation-failed")
    assert claims == [
        "`expect relative_degree(pos) = 4 at rest` does not hold: at point 'rest' it is not well defined (generic "
        "relative degree 3); its linearisation there has relative degree 4",
        "`expect relative_degree(pos) = 4` does not hold: the relative degree of 'pos' is 3: the input 'a' first "
        f"enters its 3rd derivative, through L_g L_f^2 pos = {by_hand}; 4 is the relative degree of the "
        "linearisation at point 'rest', where the nonlinear relative degree is not defined",
    ]


def test_a_failed_regular_claim_at_a_point_says_which_part_fails() -> None:
    """Invented plants. (1) y = x1 with x1' = x1*u: L_g y = x1 vanishes at x1 = 0, so y's
    relative degree is not well defined there. (2) x1' = u1 + u2, x2' = x3*u1 + u2: both rows
    of the decoupling matrix are non-zero at x3 = 1 but its determinant 1 - x3 (sympy below)
    vanishes: each output has relative degree 1 and the matrix is singular, rank 1."""
    from plantlint.run.pipeline import analyse_bytes

    x3 = sp.Symbol("x3")
    assert sp.Matrix([[1, 1], [x3, 1]]).det().subs(x3, 1) == 0
    one = b"""plant one
state x1 in -1 .. 1
state x2 in -1 .. 1
input u
rate x1 = x1*u
rate x2 = -x2
output y = x1
point o: x1 = 0, x2 = 0, u = 0
expect regular at o
"""
    two = b"""plant two
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in 0 .. 2
input u1
input u2
rate x1 = u1 + u2
rate x2 = x3*u1 + u2
rate x3 = -x3 + 1
output y1 = x1
output y2 = x2
point o: x1 = 0, x2 = 0, x3 = 1, u1 = 0, u2 = 0
expect regular at o
"""
    (claim,) = [f for f in analyse_bytes(one).findings if f.rule == "expectation-failed"]
    assert "at point 'o' the relative degree of y is not well defined" in claim.message
    (claim,) = [f for f in analyse_bytes(two).findings if f.rule == "expectation-failed"]
    assert "at point 'o' the decoupling matrix is singular (rank 1 for 2 outputs)" in claim.message


def test_an_envelope_left_open_by_precision_says_so_rather_than_blame_the_budget() -> None:
    """A reviewer's model (invented): L_g y = x1 - 1/3 - 1e-20 on x1 in -1 .. 1/3 is at most
    -1e-20 (by hand), below what the 64-bit search resolves next to 1/3. The boxes there
    cannot be split any more: the finding and the claim say that, not "within its budget"."""
    from plantlint.run.pipeline import analyse_bytes

    text = b"""plant sliver
state x1 in -1 .. 1/3
state x2 in -1 .. 1
input u
rate x1 = -x1 - 1
rate x2 = -x2 + (x1 - 1/3 - 1e-20)*u
output y = x2
expect regular
"""
    raw = analyse_bytes(text)
    (unproven,) = [f for f in raw.findings if f.rule == "envelope-unproven"]
    assert "cannot be split further at double precision" in unproven.message
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert claim.undecided and "within its budget" not in claim.message
    assert "cannot be split further at double precision" in claim.message


ARM_HANGING = b"""plant arm2
param l1 = 0.5
param l2 = 0.4
param m1 = 2
param m2 = 1.5
state q1 in -2 .. 2
state q2 in -0.5 .. 2.5
state w1 in -3 .. 3
state w2 in -3 .. 3
input t1
input t2
let a = (m1 + m2)*l1^2 + m2*l2^2
let b = m2*l1*l2
let c = m2*l2^2
let M11 = a + 2*b*cos(q2)
let M12 = c + b*cos(q2)
let det = M11*c - M12^2
let r1 = t1 + b*sin(q2)*(2*w1*w2 + w2^2)
let r2 = t2 - b*sin(q2)*w1^2
rate q1 = w1
rate q2 = w2
rate w1 = (c*r1 - M12*r2)/det
rate w2 = (M11*r2 - M12*r1)/det
output tip_x = l1*cos(q1) + l2*cos(q1 + q2)
output tip_y = l1*sin(q1) + l2*sin(q1 + q2)
point hang: q1 = -pi/2, q2 = 0, w1 = 0, w2 = 0
"""


def test_a_vanishing_row_of_long_terms_is_named_not_cut() -> None:
    """Two-link planar arm with point masses at the link ends (the kinematics and mass
    matrix of Spong, Hutchinson & Vidyasagar, Robot Modeling and Control, ch. 7, from
    memory; numbers invented). Hanging straight down (q1 = -pi/2, q2 = 0) the Jacobian row
    of the tip height, (l1 cos q1 + l2 cos(q1 + q2), l2 cos(q1 + q2)), is zero, so
    L_g L_f tip_y = dtip_y/dq M^-1 vanishes for both torques while tip_x keeps degree 2.
    Its terms are long quotients: the message names them instead of cutting them."""
    raw = analyse_bytes(ARM_HANGING, Config())
    (f,) = [f for f in raw.findings if f.rule == "relative-degree-ill-defined"]
    assert "L_g[t1] L_f tip_y and L_g[t2] L_f tip_y are both zero there (generic relative degree 2)" in f.message
    assert "..." not in f.message and "plantlint explain --point hang" in (f.hint or "")
    assert raw.analysis["points"]["hang"]["relative_degree"] == {"tip_x": 2, "tip_y": None}


def test_terms_with_sin_squared_plus_cos_squared_are_shown_simplified() -> None:
    """A gantry crane with hoisting (tests/fixtures/models/gantry_crane.plant): the load
    position's decoupling terms come out of the towers as -(-1 + cos(th)^2 + sin(th)^2)/200
    and -(-3 + 5 cos(th)^2 + 5 sin(th)^2) sin(th)/1000, which a reader has to simplify in
    their head. The message shows 0 and -sin(th)/500. Reference: the same terms by sympy
    directly (diff, then trigsimp), with the crane's equations written out here."""
    x, l, th, vx, vl, w = sp.symbols("x l th vx vl w")
    F, Fh = sp.symbols("F Fh")
    g, mt, ml, bt = sp.Rational(981, 100), 200, 500, 40
    push = F - bt * vx + Fh * sp.sin(th)
    rates = [vx, vl, w, push / mt, g * sp.cos(th) + l * w**2 - Fh / ml - push * sp.sin(th) / mt,
             (-g * sp.sin(th) - 2 * vl * w - push * sp.cos(th) / mt) / l]
    X = [x, l, th, vx, vl, w]
    f = [e.subs({F: 0, Fh: 0}) for e in rates]
    load_x = x + l * sp.sin(th)
    lf = sum(sp.diff(load_x, s) * v for s, v in zip(X, f))
    terms = [sp.trigsimp(sum(sp.diff(lf, s) * sp.diff(rate, u) for s, rate in zip(X, rates))) for u in (F, Fh)]
    assert terms == [0, -sp.sin(th) / 500]
    raw = analyse_bytes((REPO / "tests" / "fixtures" / "models" / "gantry_crane.plant").read_bytes())
    (ill,) = [f for f in raw.findings if f.rule == "relative-degree-ill-defined"]
    assert "L_g[F] L_f load_x = 0; L_g[Fh] L_f load_x = -sin(th)/500 are both zero there" in ill.message


def test_factors_are_certified_in_the_form_the_term_holds_them() -> None:
    """Invented (a campaign mutant of benchmarks' spring_chain_3, first mass allowed
    hundreds of metres away): the decoupling term is (k^2 / mass^3) (1 + 3 eps (p2 - p1)^2)
    (1 + 3 eps (p3 - p2)^2), each factor at least 1 (by hand; sympy's Lie derivatives,
    written with Matrix.jacobian, below). sympy's factor_list expands a factor to
    150 p1^2 - 300 p1 p2 + 150 p2^2 + 1, whose enclosure over p1 in [-10, 1e6] holds 0 for
    tens of thousands of boxes; the held square encloses as at least 1. Regular, proven."""
    text = (REPO / "benchmarks" / "results" / "models" / "spring_chain_3.plant").read_text()
    text = text.replace("state p1 [m] in -1/5 .. 1/5", "state p1 [m] in -10 .. 1e6")
    assert "-10 .. 1e6" in text
    raw = analyse_bytes(text.encode())
    assert raw.analysis["envelope"]["regular"] is True
    assert not [f for f in raw.findings if f.rule in ("envelope-unproven", "expectation-failed")]
    # the margin is a lower bound of |term|, whose minimum k^2 / mass^3 = 320000/27 is reached
    # where p1 = p2 = p3 (by hand); the held factors' constants are taken out of the product
    assert 0 < raw.analysis["envelope"]["margin"] <= 320000 / 27
    narrow = analyse_bytes((REPO / "benchmarks" / "results" / "models" / "spring_chain_3.plant").read_bytes())
    assert 0.999 * 320000 / 27 <= narrow.analysis["envelope"]["margin"] <= 320000 / 27
    # reference: L_g L_f^5 p3 by sympy's jacobian, and its factors by hand
    p1, p2, p3, v1, v2, v3 = xs = sp.symbols("p1 p2 p3 v1 v2 v3")
    k, eps, c, m = 200, 50, 2, R(3, 2)
    spring = lambda d: k * (d + eps * d**3)  # noqa: E731
    f = sp.Matrix([v1, v2, v3, (spring(p2 - p1) - c * v1 - spring(p1)) / m,
                   (spring(p3 - p2) - c * v2 - spring(p2 - p1)) / m, (-c * v3 - spring(p3 - p2)) / m])
    g = sp.Matrix([0, 0, 0, 1 / m, 0, 0])
    X = sp.Matrix(xs)
    h = sp.Matrix([p3])
    for _ in range(5):
        h = h.jacobian(X) * f
    term = sp.expand((h.jacobian(X) * g)[0])
    by_hand = sp.expand(k**2 / m**3 * (1 + 3 * eps * (p2 - p1) ** 2) * (1 + 3 * eps * (p3 - p2) ** 2))
    assert term == by_hand


def test_a_vanishing_factor_gives_the_place_of_its_own_quantities_only() -> None:
    """Invented maglev with a voltage-driven coil: L_g L_f^2 z = -2 kf i / (m L0 z^2) (by
    hand; sympy's jacobian below), whose factor i vanishes at zero current, for every gap
    and speed. The witness's value of z (a box centre) says nothing, so it is not given."""
    text = b"""plant coil
const m = 0.05
const g0 = 9.81
const kf = 0.0002
const R = 4
const L0 = 0.1
state z in 0.005 .. 0.03
state vz in -1 .. 1
state i in 0 .. 3
input V in 0 .. 24
rate z = vz
rate vz = g0 - kf*i^2/(m*z^2)
rate i = (V - R*i)/L0
output gap = z
"""
    z, vz, i = xs = sp.symbols("z vz i")
    m, kf, L0 = R(1, 20), R(1, 5000), R(1, 10)
    f = sp.Matrix([vz, R(981, 100) - kf * i**2 / (m * z**2), -4 * i / L0])
    g = sp.Matrix([0, 0, 1 / L0])
    h = sp.Matrix([z])
    X = sp.Matrix(xs)
    for _ in range(2):
        h = h.jacobian(X) * f
    assert sp.simplify((h.jacobian(X) * g)[0] + 2 * kf * i / (m * L0 * z**2)) == 0
    raw = analyse_bytes(text)
    (singular,) = [f for f in raw.findings if f.rule == "envelope-singular"]
    assert "vanishes at i = 0 (exactly, whatever z and vz): its factor i is zero there" in singular.message
