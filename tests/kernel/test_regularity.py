"""Regularity over a box by the mean-value form on the towers and by second-order forms
through the rows' common factors (kernel/regularity.py).

References: the values are held against numpy on a fine grid (a proven margin is a lower
bound of |det A| over the box, so it cannot exceed the grid's minimum), against sympy's
determinant of the model's g columns (another way to det A) and against zeros found by
hand. The models are invented.
"""

from __future__ import annotations

from fractions import Fraction
from pathlib import Path
from typing import Any

import numpy as np
import pytest
import sympy as sp

from plantlint.kernel.regularity import SECOND_TRY_BOXES, RowFactors, ball, prove_regular
from plantlint.kernel.taylor import ArbField, Towers
from plantlint.language.syntax import parse_text
from plantlint.language.written import read_plant
from plantlint.run.pipeline import read_model


def _towers(text: str) -> Towers:
    plant = read_plant(parse_text(text).statements)
    return Towers(plant.states, (), plant.f, plant.g, plant.h, graph=plant.graph)


def test_a_gain_bounded_away_from_zero_is_proven_with_a_true_lower_bound() -> None:
    towers = _towers("plant p\nstate x in -10 .. 10\ninput u\nrate x = -x + (2 + sin(x))*u\noutput y = x\n")
    proof = prove_regular(towers, [(Fraction(-10), Fraction(10))], [0])
    grid = np.linspace(-10, 10, 200001)
    assert proof.proven and 0 < proof.margin <= float(np.min(np.abs(2 + np.sin(grid))))  # min 1, by hand


def test_a_gain_that_vanishes_inside_is_never_proven() -> None:
    """1 + x vanishes at x = -1 (by hand): no number of boxes proves it."""
    towers = _towers("plant p\nstate x in -2 .. 2\ninput u\nrate x = -x + (1 + x)*u\noutput y = x\n")
    proof = prove_regular(towers, [(Fraction(-2), Fraction(2))], [0], max_boxes=2000)
    assert not proof.proven and proof.stopped == "boxes" and proof.boxes == 2000


def test_a_rate_undefined_inside_the_box_is_never_proven() -> None:
    """The gain is 1, but the drift divides by x, which is 0 inside the box."""
    towers = _towers("plant p\nstate x in -1 .. 1\ninput u\nrate x = 1/x + u\noutput y = x\n")
    proof = prove_regular(towers, [(Fraction(-1), Fraction(1))], [0], max_boxes=500)
    assert not proof.proven


def test_a_two_input_decoupling_matrix() -> None:
    """A = [[1, x2], [0, 2 + cos(x1)]] (by hand): det = 2 + cos(x1) >= 1."""
    towers = _towers("plant p\nstate x1 in -3 .. 3\nstate x2 in -3 .. 3\ninput u1\ninput u2\n"
                     "rate x1 = u1 + x2*u2\nrate x2 = (2 + cos(x1))*u2\noutput y1 = x1\noutput y2 = x2\n")
    proof = prove_regular(towers, [(Fraction(-3), Fraction(3))] * 2, [0, 0], SECOND_TRY_BOXES)
    grid = np.linspace(-3, 3, 60001)
    assert proof.proven and 0 < proof.margin <= float(np.min(2 + np.cos(grid)))


# -- rows through their common factors (RowFactors) and second-order forms ----------------------

PALLETIZER = Path(__file__).resolve().parents[2] / "example_repo" / "models" / "handling" / "palletizer_arm.plant"


def _palletizer() -> tuple[Towers, list[tuple[Fraction, Fraction]], Any]:
    """The demo palletizer arm (invented numbers): its decoupling matrix is the inverse of
    the mass matrix, with the payload m_p in 0 .. 15 kg a side of the box."""
    data = PALLETIZER.read_bytes()
    plant = read_plant(parse_text(data.decode()).statements)
    towers = Towers(plant.states, plant.params, plant.f, plant.g, plant.h, graph=plant.graph)
    model, _ = read_model(data, "palletizer_arm.plant")
    sym = model.plant()
    box = [(Fraction(str(sym.state_box[s][0])), Fraction(str(sym.state_box[s][1]))) for s in sym.states]
    box += [(Fraction(str(sym.param_box[p][0])), Fraction(str(sym.param_box[p][1]))) for p in sym.params]
    return towers, box, sym


def test_row_factors_hold_det_a_as_the_factors_times_det_a_prime() -> None:
    """Each row of M^-1 shares 1/det M: RowFactors takes it out, and at random points of the
    box prod(factors) * det A' equals det A computed by sympy from the model's g columns (the
    shoulder and elbow velocity rows), another way."""
    towers, box, sym = _palletizer()
    rows = RowFactors.of(towers, [1, 1])
    assert rows is not None and rows.common == 2
    (q1, q2, w1, w2), (m_p,) = sym.states, sym.params
    A = sp.Matrix([[sym.g[j][2] for j in range(2)], [sym.g[j][3] for j in range(2)]])
    det_a = sp.lambdify((q1, q2, w1, w2, m_p), A.det(), "mpmath")
    rng = np.random.default_rng(2)
    for _ in range(20):
        point = [Fraction(float(rng.uniform(float(lo), float(hi)))) for lo, hi in box]
        factors, det_prime = rows.evaluate([ball(v, v) for v in point], ArbField(128))
        product = det_prime
        for f in factors:
            product = product * f
        assert float(product.mid()) == pytest.approx(float(det_a(*[float(v) for v in point])), rel=1e-10)


def test_the_palletizer_envelope_is_proven_with_a_true_lower_bound() -> None:
    """Proven within the second try's boxes; the margin is a lower bound of |det A| = 1/det M,
    held against numpy on a grid of (q2, m_p) (det A reads no other side)."""
    towers, box, sym = _palletizer()
    proof = prove_regular(towers, box, [1, 1], SECOND_TRY_BOXES)
    assert proof.proven and proof.margin is not None and proof.margin > 0
    (_, q2, _, _), (m_p,) = sym.states, sym.params
    A = sp.Matrix([[sym.g[j][2] for j in range(2)], [sym.g[j][3] for j in range(2)]])
    det_a = sp.lambdify((q2, m_p), A.det(), "numpy")
    Q, M = np.meshgrid(np.linspace(float(box[1][0]), float(box[1][1]), 301), np.linspace(0, 15, 301))
    assert proof.margin <= float(np.min(np.abs(det_a(Q, M))))


def test_a_shared_factor_that_vanishes_inside_is_never_proven() -> None:
    """Rows (1/d) [2, 1] and (1/d) [1, 2] with d = 1 + x1 (by hand: d = 0 at x1 = -1 inside
    the box, where the rates are not defined)."""
    towers = _towers("plant p\nstate x1 in -2 .. 2\nstate x2 in -1 .. 1\ninput u1\ninput u2\n"
                     "let d = 1 + x1\nrate x1 = (2*u1 + u2)/d\nrate x2 = (u1 + 2*u2)/d\n"
                     "output y1 = x1\noutput y2 = x2\n")
    assert RowFactors.of(towers, [0, 0]) is not None
    proof = prove_regular(towers, [(Fraction(-2), Fraction(2)), (Fraction(-1), Fraction(1))], [0, 0],
                          max_boxes=400)
    assert not proof.proven


def test_a_singular_reduced_matrix_is_never_proven() -> None:
    """Rows (1/d) [1, x2] and (1/d) [1, x2] with d = 2 + cos(x1) > 0: det A' = 0 everywhere
    (two equal rows, by hand)."""
    towers = _towers("plant p\nstate x1 in -2 .. 2\nstate x2 in 1 .. 2\ninput u1\ninput u2\n"
                     "let d = 2 + cos(x1)\nrate x1 = (u1 + x2*u2)/d\nrate x2 = (u1 + x2*u2)/d\n"
                     "output y1 = x1\noutput y2 = x2\n")
    assert RowFactors.of(towers, [0, 0]) is not None
    proof = prove_regular(towers, [(Fraction(-2), Fraction(2)), (Fraction(1), Fraction(2))], [0, 0],
                          max_boxes=300)
    assert not proof.proven and proof.boxes == 300


def test_rows_that_are_not_g_components_are_not_factored() -> None:
    """An output x1 + x2 is not a state: its row L_g h is a sum of g components."""
    towers = _towers("plant p\nstate x1 in -2 .. 2\nstate x2 in -1 .. 1\ninput u1\ninput u2\n"
                     "let d = 3 + x1\nrate x1 = (2*u1 + u2)/d\nrate x2 = (u1 + 2*u2)/d\n"
                     "output y1 = x1 + x2\noutput y2 = x2\n")
    assert RowFactors.of(towers, [0, 0]) is None


def test_a_proof_asked_to_stop_ends_unfinished() -> None:
    """``stop`` is asked before each box; True ends the proof, unproven and saying so (the
    light route's envelope proof, when the full analysis beside it has answered)."""
    towers = _towers("plant p\nstate x in -2 .. 2\ninput u\nrate x = -x + (1 + x)*u\noutput y = x\n")
    asked = []

    def stop() -> bool:
        asked.append(1)
        return len(asked) > 3

    proof = prove_regular(towers, [(Fraction(-2), Fraction(2))], [0], max_boxes=2000, stop=stop)
    assert not proof.proven and proof.stopped == "stopped" and proof.boxes == 3
