"""Branch-and-bound certification over boxes, held against elementary geometry and
dense numpy sampling (an outside, non-rigorous but independent evaluation)."""

from __future__ import annotations

import math

import numpy as np
import pytest
import sympy as sp
from flint import arb
from hypothesis import given, settings
from hypothesis import strategies as st

from plantlint.kernel.balls import product
from plantlint.kernel.enclosures import int_power
from plantlint.kernel.intervals import BOX_PREC, Budget, certify_nonzero, certify_sign, outward_box

x1, x2, k = sp.symbols("x1 x2 k")
R = sp.Rational
CIRCLE = x1**2 + x2**2 - 1


def box_min_abs_circle(bx: tuple[float, float], by: tuple[float, float]) -> float:
    """min |x^2 + y^2 - 1| over a box, by geometry: the squared distance of the box's
    nearest and farthest points from the origin bracket the values."""
    def nearest(lo: float, hi: float) -> float:
        return 0.0 if lo <= 0 <= hi else min(abs(lo), abs(hi))
    near = nearest(*bx) ** 2 + nearest(*by) ** 2
    far = max(abs(bx[0]), abs(bx[1])) ** 2 + max(abs(by[0]), abs(by[1])) ** 2
    return 0.0 if near <= 1 <= far else min(abs(near - 1), abs(far - 1))


@pytest.mark.parametrize(
    "bx, by, expected",
    [
        ((-0.5, 0.5), (-0.5, 0.5), True),  # inside the circle
        ((-0.7, 0.6), (0.1, 0.65), True),  # inside, near it
        ((0.0, 2.0), (-0.3, 0.3), False),  # across
        ((0.3, 1.7), (0.1, 0.9), False),  # across, no simple rational on the arc
        ((-1.5, 1.5), (-1.5, 1.5), False),  # around the whole circle
        ((1.5, 3.0), (1.0, 2.0), True),  # outside
        ((-0.75, 0.75), (0.7, 1.2), False),
    ],
)
def test_unit_circle_boxes_are_classified_by_geometry(bx, by, expected) -> None:
    """Elementary geometry decides whether the box meets the circle (box_min_abs_circle)."""
    assert (box_min_abs_circle(bx, by) > 0) == expected
    v = certify_nonzero(CIRCLE, {x1: bx, x2: by}, Budget(5000, 5.0))
    assert v.regular is expected
    if expected:
        assert 0 < v.margin <= box_min_abs_circle(bx, by) + 1e-12
        assert v.witness is None
    else:
        w = v.witness
        assert bx[0] <= w["x1"] <= bx[1] and by[0] <= w["x2"] <= by[1]
        assert abs(w["x1"] ** 2 + w["x2"] ** 2 - 1) < 1e-9


def test_exhausted_budget_reports_undecided_boxes() -> None:
    """(x^2 - 2)^2 touches zero at the irrational sqrt(2) (math.sqrt) without changing sign."""
    v = certify_nonzero((x1**2 - 2) ** 2, {x1: (1, 2)}, Budget(max_boxes=150, max_seconds=5))
    assert v.regular is None and v.margin is None and v.witness is None
    assert v.undecided_count >= 1 and v.boxes_examined <= 150
    lo, hi = v.undecided[0]["x1"]
    assert lo <= math.sqrt(2) <= hi


def test_time_budget_is_respected_as_undecided() -> None:
    v = certify_nonzero((x1**2 - 2) ** 2, {x1: (1, 2)}, Budget(max_boxes=10**9, max_seconds=0.0))
    assert v.regular is None and v.undecided_count == 1


def test_ranged_parameter_is_a_box_dimension() -> None:
    """x - k with k in [1, 2]: zero exactly where x = k (elementary)."""
    v = certify_nonzero(x1 - k, {x1: (0, R(1, 2)), k: (1, 2)})
    assert v.regular is True and 0 < v.margin <= 0.5
    w = certify_nonzero(x1 - k, {x1: (0, 3), k: (1, 2)}).witness
    assert abs(w["x1"] - w["k"]) < 1e-9


def test_row_needs_one_entry_nonzero_and_its_witness_is_exact() -> None:
    """The row (x1 - 1/3, x2) vanishes only at (1/3, 0) (elementary)."""
    v = certify_nonzero([x1 - R(1, 3), x2], {x1: (-1, 1), x2: (-1, 1)})
    assert v.regular is False and v.witness_exact
    assert v.witness == pytest.approx({"x1": 1 / 3, "x2": 0.0})
    clean = certify_nonzero([x1 - R(1, 3), x2], {x1: (-1, 1), x2: (R(1, 2), 1)})
    assert clean.regular is True and 0 < clean.margin <= 0.5


def test_sign_conditions_for_function_domains() -> None:
    """log needs a positive argument, sqrt a non-negative one (definitions)."""
    assert certify_sign(x1 + 1, {x1: (0, 1)}, strict=True).regular is True
    v = certify_sign(x1, {x1: (-1, 1)}, strict=True)
    assert v.regular is False and v.witness["x1"] <= 0
    assert certify_sign(x1**2, {x1: (-1, 1)}, strict=False).regular is True  # x^2 >= 0 with 0 inside
    assert certify_sign(1 - x1**2 / 4, {x1: (1, 3)}, strict=False).witness["x1"] > 2


def test_pole_is_not_taken_for_a_zero() -> None:
    """1/(x - 1/3) changes sign across x = 1/3 but never vanishes."""
    v = certify_nonzero(1 / (x1 - R(1, 3)), {x1: (0, 1)}, Budget(300, 2.0))
    assert v.regular is None


def test_outward_box_contains_irrational_bounds() -> None:
    """pi from the math module lies inside the rounded-outward interval."""
    (lo, hi), = outward_box({x1: (-sp.pi, sp.pi)}).values()
    assert lo <= -math.pi and hi >= math.pi and hi - lo < 2 * math.pi + 1e-12


@given(st.floats(-3, 3), st.floats(0.001, 2), st.integers(-4, 6))
@settings(max_examples=200, deadline=None)
def test_integer_power_encloses_every_sampled_value(mid: float, rad: float, e: int) -> None:
    """numpy powers of sampled points lie in the ball power, and even powers stay tight."""
    ball = arb(mid, rad)
    enc = int_power(ball, e)
    xs = np.linspace(mid - rad, mid + rad, 41)
    if e < 0 and ball.contains(0):
        assert not enc.is_finite()
        return
    lower, upper = float(enc.lower().mid()), float(enc.upper().mid())
    for x in xs:
        value = float(x) ** e
        tol = 1e-12 * (1 + abs(value))
        assert lower - tol <= value <= upper + tol
    if e > 0 and e % 2 == 0:
        assert lower >= -1e-12  # the dependency problem would give a negative lower end


@given(
    st.lists(st.integers(-3, 3), min_size=3, max_size=3),
    st.floats(-2, 1.5),
    st.floats(0.05, 1.0),
    st.floats(-2, 1.5),
    st.floats(0.05, 1.0),
)
@settings(max_examples=40, deadline=None)
def test_verdicts_agree_with_dense_sampling(c, lo1, w1, lo2, w2) -> None:
    """For random quadratics, a proven margin never exceeds the sampled minimum of |f|,
    and a witness is a sampled-looking zero inside the box (numpy evaluation)."""
    f = c[0] * x1**2 + c[1] * x1 * x2 + c[2] * x2 - 1
    box = {x1: (lo1, lo1 + w1), x2: (lo2, lo2 + w2)}
    v = certify_nonzero(f, box, Budget(4000, 3.0))
    fn = sp.lambdify((x1, x2), f, "numpy")
    g1, g2 = np.meshgrid(np.linspace(lo1, lo1 + w1, 60), np.linspace(lo2, lo2 + w2, 60))
    sampled = np.abs(fn(g1, g2))
    if v.regular is True:
        assert v.margin <= sampled.min() + 1e-12
    elif v.regular is False:
        wx, wy = v.witness["x1"], v.witness["x2"]
        assert lo1 <= wx <= lo1 + w1 and lo2 <= wy <= lo2 + w2
        assert abs(fn(wx, wy)) < 1e-8


# -- witnesses stay inside the declared box --------------------------------------------------
# The float box that the search splits is rounded outward from the exact ranges; its outer
# faces can lie just outside them. A reviewer's cases (invented numbers).

def test_no_witness_from_the_sliver_outside_an_exact_bound() -> None:
    """x - 1/3 - 1e-20 is at most -1e-20 on x in [-1, 1/3] (by hand): never zero there. The
    float just above 1/3 is outside the range; a witness there proves nothing. (At the
    search's 64-bit precision 1e-20 cannot be proven either: not decided is the honest
    answer, never singular.)"""
    x = sp.Symbol("x", real=True)
    v = certify_nonzero(x - sp.Rational(1, 3) - sp.Rational(1, 10**20), {x: (sp.Integer(-1), sp.Rational(1, 3))})
    assert v.regular is not False and v.witness is None


def test_a_decimal_bound_just_below_pi_over_2_is_proven_regular() -> None:
    """cos x on |x| <= 1.5707963267948966 (the double of pi/2 written as a decimal, which is
    1.9e-17 below pi/2; mpmath at 40 digits is the reference): positive on the whole
    range, although the float box rounded outward reaches past pi/2."""
    import mpmath

    from fractions import Fraction

    x = sp.Symbol("x", real=True)
    bound = Fraction("1.5707963267948966")
    with mpmath.workdps(40):
        least = mpmath.cos(mpmath.mpf(bound.numerator) / bound.denominator)
        assert 1.9e-17 < least < 2.0e-17
    v = certify_nonzero(sp.cos(x), {x: (-bound, bound)})
    assert v.regular is True and 0 < v.margin <= float(least)


def test_a_zero_exactly_on_an_irrational_bound_is_found_there() -> None:
    """cos x on [-pi/2, pi/2] vanishes at both ends (sympy: cos(pi/2) = 0): singular, with
    the exact end point as the witness rather than a float outside the range."""
    x = sp.Symbol("x", real=True)
    assert sp.cos(sp.pi / 2) == 0
    v = certify_nonzero(sp.cos(x), {x: (-sp.pi / 2, sp.pi / 2)})
    assert v.regular is False and v.witness_exact
    assert abs(abs(v.witness["x"]) - math.pi / 2) < 1e-15


def test_a_zero_between_the_last_float_and_an_exact_bound_is_found() -> None:
    """cos x on [-1, 1.5707963267948967]: the decimal bound lies 8e-18 past pi/2 (mpmath at
    40 digits: cos there is negative), and no double lies between pi/2 and it. The sign at
    the exact bound differs from the sign inside: the zero is in the range."""
    import mpmath

    from fractions import Fraction

    x = sp.Symbol("x", real=True)
    bound = Fraction("1.5707963267948967")
    with mpmath.workdps(40):
        assert mpmath.cos(mpmath.mpf(bound.numerator) / bound.denominator) < 0
    v = certify_nonzero(sp.cos(x), {x: (Fraction(-1), bound)})
    assert v.regular is False and not v.witness_exact
    assert abs(v.witness["x"] - math.pi / 2) < 1e-15


@settings(max_examples=300, deadline=None)
@given(st.fractions(min_value=-1000, max_value=1000), st.fractions(min_value=0, max_value=1000),
       st.fractions(min_value=-1000, max_value=1000), st.fractions(min_value=0, max_value=1000))
def test_a_product_of_balls_contains_the_interval_product_and_keeps_its_sign(a, wa, b, wb) -> None:
    """Moore's interval product (R. E. Moore, Interval Analysis, 1966: the hull of the four
    endpoint products), computed here in exact fractions, lies inside the enclosure; and
    when the interval product stays away from 0 (its nearest end above 1e-6 of its
    farthest: a ball keeps 30 bits of its radius), so does the enclosure, at the envelope
    search's precision. A ball product of two wide positive factors once held 0."""
    import flint

    lo_a, hi_a, lo_b, hi_b = a, a + wa, b, b + wb
    ends = [lo_a * lo_b, lo_a * hi_b, hi_a * lo_b, hi_a * hi_b]
    exact_lo, exact_hi = min(ends), max(ends)
    old = flint.ctx.prec
    flint.ctx.prec = BOX_PREC
    try:
        def ball(lo, hi):  # an enclosure of [lo, hi], the ends as exact binary fractions
            p, q = lo.as_integer_ratio()
            r, t = hi.as_integer_ratio()
            return (arb(p) / q).union(arb(r) / t)

        got = product(ball(lo_a, hi_a), ball(lo_b, hi_b))
        for end in (exact_lo, exact_hi):  # each exact end is in it (up to its own rounding)
            p, q = end.as_integer_ratio()
            assert got.overlaps(arb(p) / q)
        near, far = sorted((abs(exact_lo), abs(exact_hi)))
        if (exact_lo > 0 or exact_hi < 0) and near > far * 1e-6:
            assert not got.contains(0)
    finally:
        flint.ctx.prec = old


def test_positive_wide_factors_are_proven_in_one_box() -> None:
    """Invented, from a spring chain with a position range of hundreds of metres: the
    decoupling term (40000 (p2 - p1)^2 + 800/3)(20000 (p3 - p2)^2 + 400/3) is a product of
    factors that are each at least their constant. Over p1 in [234, 478] the first factor
    spans [2.2e9, 9.2e9] and the second [133, 2.5e3]; their ball product held 0 and the
    search split the box 166 times. The interval product proves it in the first box, with
    the true minimum as margin: 40000 (234 - 1/5)^2 + 800/3 times 400/3 (by hand, exact
    fractions below)."""
    p1, p2, p3 = sp.symbols("p1 p2 p3", real=True)
    e = (40000 * (p2 - p1) ** 2 + R(800, 3)) * (20000 * (p3 - p2) ** 2 + R(400, 3))
    box = {p1: (234, 478), p2: (R(-1, 5), R(1, 5)), p3: (R(-1, 5), R(1, 5))}
    v = certify_nonzero([e], box, Budget())
    from fractions import Fraction as F
    minimum = (40000 * (F(234) - F(1, 5)) ** 2 + F(800, 3)) * F(400, 3)
    assert v.regular is True and v.boxes_examined == 1
    # a lower bound, within the 30 bits that arb keeps of a radius
    assert v.margin is not None and float(minimum) * (1 - 1e-6) <= v.margin <= float(minimum)


def test_sin_and_tan_of_ends_beyond_a_float_are_enclosed_not_a_crash() -> None:
    """exp(exp(x)) over x in [-10, 10] reaches e^(e^10), about 10^9565: counting the periods
    of sin inside it once turned its ends into an infinite float and crashed the structure
    stage. sin and cos of such a ball are [-1, 1] (|sin| <= 1, math), tan has no enclosure;
    2 + sin(exp(exp(x))) is then proven non-zero over the box (at least 1, by hand)."""
    from plantlint.kernel.balls import tight_periodic, tight_tan

    x = sp.Symbol("x")
    huge = (arb(-10).exp().exp()).union(arb(10).exp().exp())
    for name in ("sin", "cos"):
        out = tight_periodic(name, huge)
        assert out.contains(arb(1)) and out.contains(arb(-1)) and not out.contains(arb(2))
    assert not tight_tan(huge).is_finite()
    v = certify_nonzero([2 + sp.sin(sp.exp(sp.exp(x)))], {x: (-10, 10)}, Budget())
    assert v.regular is True and v.margin is not None and 0 < v.margin <= 1
