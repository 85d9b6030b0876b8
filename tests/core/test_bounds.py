"""Small wall-clock bounds for single steps (core/deadline.py) and the bounded symbolic
zero decision on constants (kernel/lie.py)."""

from __future__ import annotations

import signal
import time

import pytest
import sympy as sp

from plantlint.core.deadline import LATE, TimeUp, bounded, expired, within


def test_a_bound_stops_a_runaway_step_and_restores_the_timer() -> None:
    previous = signal.getsignal(signal.SIGALRM)
    started = time.monotonic()
    with pytest.raises(TimeUp) as caught:
        with within(0.2) as step:
            while True:
                pass
    assert expired(caught.value, step)
    assert time.monotonic() - started < 30  # it did stop (the bound is 0.2 s)
    assert signal.getsignal(signal.SIGALRM) is previous and signal.getitimer(signal.ITIMER_REAL)[0] == 0
    # nested: the inner step finishing in time leaves the outer one in force
    with pytest.raises(TimeUp) as outer:
        with within(0.3) as out:
            with within(5.0):
                pass
            while True:
                pass
    assert expired(outer.value, out)


def test_bounded_returns_late_on_its_own_time_and_lets_an_outer_bound_unwind() -> None:
    def forever() -> int:
        while True:
            pass

    assert bounded(5.0, lambda: 7) == 7
    assert bounded(0.2, forever) is LATE
    with pytest.raises(TimeUp) as outer:
        with within(0.3) as out:
            bounded(5.0, forever)  # the outer step's time runs out first: not this step's LATE
    assert expired(outer.value, out)
    assert signal.getitimer(signal.ITIMER_REAL)[0] == 0


def test_equality_to_zero_of_a_huge_constant_is_bounded() -> None:
    from plantlint.kernel.decision import Outcome
    from plantlint.kernel.lie import bounded_equals_zero

    # sin^2 + cos^2 - 1 = 0 (Pythagorean identity) hidden in a long sum: beyond the size bound
    big = sum((sp.sin(sp.Rational(k, 7)) ** 2 + sp.cos(sp.Rational(k, 7)) ** 2 - 1) for k in range(1, 200))
    assert bounded_equals_zero(big).outcome is Outcome.UNDECIDED  # undecided (taken as zero, reported), not minutes of sympy
    assert bounded_equals_zero(sp.sin(sp.Rational(1, 3)) ** 2 + sp.cos(sp.Rational(1, 3)) ** 2 - 1).proven_zero
