"""One answer to "is it zero?", used by every stage.

The kernel's identity test (:meth:`Kernel.is_zero`), its values at points
(:meth:`Kernel.value_at`, :meth:`Kernel.constant_is_zero`), the exact elimination's
pivot test (:data:`plantlint.kernel.exact.ZeroDecider`), the ball elimination, the
distributions, the point structure and the numeric route's fields all say it with
:class:`ZeroDecision`: an :class:`Outcome` and, where a stage needs it, how it was
decided. It carries no numbers: a value (a ball) travels beside it
(:class:`plantlint.kernel.lie.PointValue`).

Readers ask the helpers, never compare with booleans:

* ``proven_zero`` / ``proven_nonzero``: decided with proof;
* ``certain``: either of the two;
* ``taken_zero``: zero by every test, proven or not (an unconfirmed zero is taken as
  zero and the taker reports it: the kernel lists it in ``Kernel.uncertain``).

Undefined and undecided values are neither proven non-zero nor taken as zero; each
stage says what it does with them (a pivot search skips them and calls its rank a
lower bound).
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from flint import arb


class Outcome(Enum):
    ZERO = "zero"  # proven zero (exactly, or symbolically)
    NONZERO = "non-zero"  # proven non-zero (a rigorous ball without 0, or exactly)
    ZERO_UNCONFIRMED = "zero, unconfirmed"  # every test says zero, no proof within the bound
    UNDEFINED = "undefined"  # the expression is undefined there (a division by zero, a pole)
    UNDECIDED = "undecided"  # beyond the evaluator or the bound


@dataclass(frozen=True)
class ZeroDecision:
    """Is a value (or an expression, identically) zero? ``how``: the test that decided
    ("structural", "screened", "expand", "cancel", "simplify", "exact", "ball", ...)."""

    outcome: Outcome
    how: str = ""

    @property
    def proven_zero(self) -> bool:
        return self.outcome is Outcome.ZERO

    @property
    def proven_nonzero(self) -> bool:
        return self.outcome is Outcome.NONZERO

    @property
    def certain(self) -> bool:
        return self.outcome is Outcome.ZERO or self.outcome is Outcome.NONZERO

    @property
    def taken_zero(self) -> bool:
        """Zero by every test: proven, or unconfirmed (then reported by whoever took it)."""
        return self.outcome is Outcome.ZERO or self.outcome is Outcome.ZERO_UNCONFIRMED


ZERO = ZeroDecision(Outcome.ZERO)
NONZERO = ZeroDecision(Outcome.NONZERO)
ZERO_UNCONFIRMED = ZeroDecision(Outcome.ZERO_UNCONFIRMED)
UNDEFINED = ZeroDecision(Outcome.UNDEFINED)
UNDECIDED = ZeroDecision(Outcome.UNDECIDED)


def proven_zero(how: str = "") -> ZeroDecision:
    return ZeroDecision(Outcome.ZERO, how)


def proven_nonzero(how: str = "") -> ZeroDecision:
    return ZeroDecision(Outcome.NONZERO, how)


def unconfirmed_zero(how: str = "unconfirmed") -> ZeroDecision:
    return ZeroDecision(Outcome.ZERO_UNCONFIRMED, how)


def of_ball(ball: "arb", how: str = "ball") -> ZeroDecision:
    """A rigorous ball's answer: zero when it is exactly 0, non-zero when it is finite
    and excludes 0, else undecided (more precision, or an exact test, may decide)."""
    if ball.is_zero():
        return ZeroDecision(Outcome.ZERO, how)
    if ball.is_finite() and not ball.contains(0):
        return ZeroDecision(Outcome.NONZERO, how)
    return UNDECIDED


def exactly(is_zero: bool, how: str = "exact") -> ZeroDecision:
    """The decision of an exact comparison with zero."""
    return ZeroDecision(Outcome.ZERO if is_zero else Outcome.NONZERO, how)
