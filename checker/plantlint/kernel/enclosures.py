"""Small operations on arb enclosures that several kernel modules share, without sympy
(the light route imports them): a tight integer power of a ball, and the intersection of
two enclosures of one value."""

from __future__ import annotations

from typing import Any

from flint import arb


def _power_by_squaring(x: arb, e: int) -> arb:
    result = arb(1)
    base = x
    while e:
        if e & 1:
            result = result * base
        e >>= 1
        if e:
            base = base * base
    return result


def int_power(x: arb, e: int) -> arb:
    """x**e over a ball, tight: monotone pieces are evaluated at the endpoints.

    (flint's ``arb ** int`` gives nan when the ball contains 0 and is loose
    otherwise: [2, 4]**2 comes out as +/- 16.)
    """
    if e == 0:
        return arb(1)
    if e < 0:
        if x.contains(0):
            return arb("nan")  # a pole inside: no finite enclosure
        return int_power(arb(1) / x, -e)  # invert first: 1/x of a ball off zero is finite
    if e == 1 or not x.is_finite():
        return x if e == 1 else arb("nan")
    if x.rad() == 0:
        return _power_by_squaring(x, e)
    out = _power_by_squaring(x.lower(), e).union(_power_by_squaring(x.upper(), e))
    if e % 2 == 0 and x.contains(0):
        out = out.union(arb(0)).nonnegative_part()  # [0, max]: the lower end is exactly 0
    elif e % 2 == 0:
        out = out.nonnegative_part()
    return out


def tighter(a: Any, b: Any) -> Any:
    """The intersection of two enclosures of one value (the finite one when only one is)."""
    if not b.is_finite():
        return a
    if not a.is_finite():
        return b
    return a.intersection(b) if a.overlaps(b) else a  # disjoint enclosures of one value: never


__all__ = ["int_power", "tighter"]
