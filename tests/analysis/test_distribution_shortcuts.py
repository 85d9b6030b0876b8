"""The structural shortcuts of the distributions stage, held against outside references.

* Structural singularity of a bordered minor (no perfect matching of its non-zero
  pattern) is compared with scipy's ``maximum_bipartite_matching`` and, when it says
  "identically zero", with sympy's own determinant of the pattern filled with integers.
* The coordinate-distribution shortcut of involutivity is compared with brackets and
  ranks recomputed with plain sympy (Matrix.jacobian, Matrix.rank); that a distribution
  spanned by coordinate fields is involutive is the Frobenius theorem's trivial case
  (Isidori, Nonlinear Control Systems, 3rd ed., sec. 1.4, from memory).
* The small float solve that orders the rows of bordered minors is compared with
  ``numpy.linalg.solve`` (and, on singular systems, checked to satisfy the equations it
  can).
"""

from __future__ import annotations

import numpy as np
import sympy as sp
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import maximum_bipartite_matching

from plantlint.analysis.distributions import _float_solve, _structurally_nonsingular, analyse_distributions, distributions_at
from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant


def test_structural_singularity_agrees_with_scipy_matching_and_sympy_det():
    rng = np.random.default_rng(20261202)
    singular_seen = nonsingular_seen = 0
    for _ in range(300):
        size = int(rng.integers(1, 7))
        pattern = rng.random((size, size)) < rng.uniform(0.15, 0.7)
        rows = list(range(size))
        supports = [frozenset(i for i in range(size) if pattern[i, c]) for c in range(size)]
        ours = _structurally_nonsingular(rows, supports)
        # scipy: a perfect matching exists exactly when every row is matched
        matched = maximum_bipartite_matching(csr_matrix(pattern.astype(np.int8)), perm_type="column")
        assert ours == bool(np.all(matched >= 0)), pattern
        if ours:
            nonsingular_seen += 1
        else:
            singular_seen += 1
            filled = sp.Matrix(size, size, lambda i, j: int(rng.integers(1, 50)) if pattern[i, j] else 0)
            assert filled.det() == 0  # sympy's determinant: Leibniz terms all hit a zero
    assert singular_seen > 20 and nonsingular_seen > 20


def test_coordinate_distribution_shortcut_matches_plain_sympy_brackets():
    # G_0 = span{g1, g2}, g1 = (0, 0, 1, x4^2), g2 = (0, 0, 0, 1): supported in {x3, x4},
    # rank 2, so the checker proves it involutive without building [g1, g2]
    x1, x2, x3, x4 = xs = list(sp.symbols("x1:5"))
    us = list(sp.symbols("u1:3"))
    f = [x3, x4, sp.Integer(0), sp.Integer(0)]
    g = [[sp.Integer(0), sp.Integer(0), sp.Integer(1), x4**2], [sp.Integer(0)] * 3 + [sp.Integer(1)]]
    plant = Plant.from_matrices("coordinate", xs, us, f, g, [x1, x2])
    kernel = Kernel(plant)
    structure = analyse_distributions(kernel)
    # plain sympy: [g1, g2] = Dg2 g1 - Dg1 g2 lies in span{g1, g2} (rank stays 2)
    G1, G2 = sp.Matrix(g[0]), sp.Matrix(g[1])
    br = G2.jacobian(xs) * G1 - G1.jacobian(xs) * G2
    assert br != sp.zeros(4, 1)
    assert sp.Matrix.hstack(G1, G2, br).rank(simplify=True) == 2
    assert structure.involutive_by_order[0] is True
    # G_1 adds ad_f g_j = Dg_j f - Df g_j; sympy's rank of the four fields is 4
    F = sp.Matrix(f)
    ads = [G.jacobian(xs) * F - F.jacobian(xs) * G for G in (G1, G2)]
    assert sp.Matrix.hstack(G1, G2, *ads).rank(simplify=True) == 4
    assert structure.ranks[:2] == (2, 4)
    assert structure.involutive
    at = distributions_at(kernel, structure, "origin", {s: sp.Integer(0) for s in xs})
    # at the origin: sympy's rank of the evaluated fields
    origin = {s: 0 for s in xs}
    assert at.ranks[0] == sp.Matrix.hstack(G1, G2).subs(origin).rank() == 2
    assert at.controllability_rank == sp.Matrix.hstack(G1, G2, *ads).subs(origin).rank() == 4
    assert at.state_linearizable


def test_row_ordering_solve_agrees_with_numpy():
    rng = np.random.default_rng(7)
    for _ in range(200):
        k = int(rng.integers(1, 9))
        M = rng.normal(size=(k, k)) * rng.choice([1e-3, 1.0, 1e3], size=(k, 1))
        b = rng.normal(size=k)
        ours = np.array(_float_solve(M.tolist(), b.tolist()))
        theirs = np.linalg.solve(M, b)
        assert np.allclose(ours, theirs, rtol=1e-7, atol=1e-9 * np.abs(theirs).max())
    # singular: a zero column leaves its unknown at 0 and the rest still solves the system
    M = [[1.0, 0.0, 2.0], [3.0, 0.0, 1.0], [0.0, 0.0, 0.0]]
    x = _float_solve(M, [5.0, 5.0, 0.0])
    assert x[1] == 0.0 and np.allclose(np.array(M) @ np.array(x), [5.0, 5.0, 0.0])
