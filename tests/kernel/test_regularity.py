"""Regularity over a box by the mean-value form on the towers (kernel/regularity.py).

References: the values are held against numpy on a fine grid (a proven margin is a lower
bound of |det A| over the box, so it cannot exceed the grid's minimum) and against zeros
found by hand. The models are invented.
"""

from __future__ import annotations

from fractions import Fraction

import numpy as np

from plantlint.kernel.regularity import SECOND_TRY_BOXES, prove_regular
from plantlint.kernel.taylor import Towers
from plantlint.language.syntax import parse_text
from plantlint.language.written import read_plant


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
