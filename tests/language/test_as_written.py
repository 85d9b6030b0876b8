"""A model is checked as it is written, not as sympy's automatic simplification leaves it.

For real x, sympy turns sqrt(x^2) into abs(x), x^(-1)*x into 1 and exp(log(x)) into x.
As written, the first has a kink at x = 0 and the others are undefined there; a gate
that passed them would pass a model its controller cannot rely on. Models are invented.
"""

from __future__ import annotations

import math

import numpy as np

from plantlint.run.pipeline import analyse_bytes

BASE = """
plant written
state x in -1 .. 1
state v in -1 .. 1
input u in -1 .. 1
rate x = v
rate v = u + {term}
output y = x
point rest: x = 0, v = 0
expect relative_degree(y) = 2
"""


def _findings(term: str) -> list:
    return analyse_bytes(BASE.format(term=term).encode()).findings


def test_a_square_root_of_a_square_is_reported_as_the_kink_it_is() -> None:
    # reference, numpy: sqrt(x^2) equals |x| at sample points, and its one-sided difference
    # quotients at 0 are -1 and +1 (no derivative there)
    xs = np.linspace(-1, 1, 9)
    assert np.allclose(np.sqrt(xs**2), np.abs(xs))
    h = 1e-6
    assert math.isclose((math.sqrt(h**2) - 0) / h, 1.0) and math.isclose((math.sqrt(h**2) - 0) / -h, -1.0)
    for term, written in (("sqrt(x^2)", "sqrt(x^2)"), ("(x^4)^(1/4)", "(x^4)^(1/4)")):
        (kink,) = [f for f in _findings(term) if f.rule == "non-smooth"]
        assert kink.message.startswith(f"{written} is abs(x) for real values, which is not smooth")
        assert (kink.span.line, kink.span.column) == (7, 14)


def test_a_division_or_a_log_simplified_away_is_still_checked_where_it_is_written() -> None:
    # reference, Python's own arithmetic: 1/x and log(x) have no value at x = 0
    for bad in (lambda: 1 / 0.0, lambda: math.log(0.0)):
        try:
            bad()
        except (ZeroDivisionError, ValueError):
            continue
        raise AssertionError("expected no value at 0")
    for term, what in (("x^(-1)*x", "the denominator x"), ("0*x/x", "the denominator x"),
                       ("exp(log(x))", "the log argument x")):
        found = [f for f in _findings(term) if f.rule == "singular-model"]
        assert any(f.message.startswith(f"{what} in rate v") for f in found), (term, [f.message for f in found])
        assert all(f.span.line == 7 for f in found)


def test_a_singular_part_inside_a_definition_reaches_the_rates_that_use_it() -> None:
    text = BASE.format(term="a").replace("rate x = v", "let a = x/x\nrate x = v")
    found = [f for f in analyse_bytes(text.encode()).findings if f.rule == "singular-model"]
    assert any(f.message.startswith("the denominator x in rate v") for f in found)


def test_what_sympy_keeps_is_not_reported_twice_and_smooth_models_stay_clean() -> None:
    found = [f for f in _findings("1/(x + 2) + sqrt(x^2 + 1)") if f.severity.value == "error"]
    assert found == []
    twice = [f for f in _findings("1/x") if f.rule == "singular-model"]
    assert len(twice) == 1


TANKS = """
# invented: two tanks in series; the flow between them needs h1 > h2, which the ranges allow to fail
plant tanks
const g = 9.81
const a1 = 2e-4
state h1 in 0.05 .. 0.6
state h2 in 0.05 .. 0.6
input q in 0 .. 1e-3
let q12 = a1*sqrt(2*g*(h1 - h2))
rate h1 = (q - q12)/0.05
rate h2 = (q12 - 1.5e-4*sqrt(2*g*h2))/0.05
output level = h2
"""


def test_a_root_sympy_rearranges_is_one_condition_not_two() -> None:
    """sympy writes sqrt(2 g (h1 - h2)) as sqrt(2) sqrt(g (h1 - h2)): the part as written and the
    part in the value differ by a positive constant and have the same zero set (h1 = h2, by
    hand, inside the ranges), so each rate gets one finding."""
    found = [f for f in analyse_bytes(TANKS.encode()).findings if f.rule == "singular-model"]
    assert sorted(f.span.line for f in found) == [10, 11]
    for f in found:
        assert "square-root argument" in f.message
        witness = dict(part.split(" = ") for part in f.message.split("e.g. at ")[1].split(", "))
        assert witness["h1"] == witness["h2"]
