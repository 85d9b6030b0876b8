"""Operating points where a derivative of the model does not exist.

d/dw sqrt(w) = 1/(2 sqrt(w)) has no finite value at w = 0 (any calculus text; sympy,
differentiating on its own, gives complex infinity there, which the first test holds).
At such a point the linearisation, the zero dynamics and the brackets of the
distributions are undefined: plantlint must say so, never crash on the infinity, never
report a rank deficit or a direction computed from it, and never call a claim that
rests on it decided. The reproducer is the contract sample with the pendulum's angle
rate made a square root, found by mutating models at random (the crash it caused was
"cannot create mpf from zoo" in the zero dynamics).
"""

from __future__ import annotations

import sympy as sp

from plantlint.run.pipeline import analyse_bytes
from conftest import FIXTURES

SAMPLE = (FIXTURES / "models" / "contract_sample.plant").read_text(encoding="utf-8")
ROOT = SAMPLE.replace("rate th = w\n", "rate th = w^0.5\n") + (
    "expect minimum_phase at rest\nexpect state_linearizable at rest\n")


def test_the_derivative_of_the_square_root_does_not_exist_at_zero() -> None:
    w = sp.Symbol("w")
    assert sp.diff(sp.sqrt(w), w).subs(w, 0) is sp.zoo


def test_undefined_derivatives_are_reported_as_such_at_the_point() -> None:
    assert "rate th = w^0.5" in ROOT
    raw = analyse_bytes(ROOT.encode())
    assert raw.stop is None  # completed: no internal error
    rest = raw.analysis["points"]["rest"]
    assert rest["linearisation"]["status"] == "undefined"
    zd = rest["zero_dynamics"]
    assert zd is None or zd["verdict"] == "undefined"
    rules = [f.rule for f in raw.findings]
    # no rank deficit, and no direction with an infinity in it, drawn from undefined brackets
    assert "not-controllable" not in rules and "distribution-rank-drop" not in rules
    assert not any("zoo" in f.message for f in raw.findings)
    claims = {f.message.split("`")[1]: f for f in raw.findings if f.rule == "expectation-failed"}
    linearizable = claims["expect state_linearizable at rest"]
    assert linearizable.undecided and "undefined" in linearizable.message
    minimum = claims["expect minimum_phase at rest"]
    assert "could not be computed" in minimum.message


def test_an_entry_that_is_infinite_at_the_point_is_called_undefined_not_zero() -> None:
    # y = x, x' = sqrt(w), w' = -w + F: L_g L_f y = 1/(2 sqrt(w)), infinite at w = 0
    text = ("plant root_drive\nstate x in -1 .. 1\nstate w in 0 .. 4\ninput F in -1 .. 1\n"
            "rate x = w^0.5\nrate w = -w + F\noutput y = x\npoint rest: x = 0, w = 0\n")
    raw = analyse_bytes(text.encode())
    (ill,) = [f for f in raw.findings if f.rule == "relative-degree-ill-defined"]
    assert "1/(2*sqrt(w)) is undefined there" in ill.message and "is zero there" not in ill.message
