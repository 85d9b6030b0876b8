"""Rigorous evaluation of sympy expressions with ball arithmetic (python-flint ``arb``).

A ball ``[m +/- r]`` is certain to contain the true value. Feeding a point gives
a tiny ball (so "the ball excludes 0" *proves* a value non-zero); feeding the
balls that cover a box gives an enclosure of the expression's range over the
box (the natural interval extension). One compiled :class:`Program` serves both.

Expressions are compiled once into a flat instruction list over their common
sub-expressions, then run many times; nothing is ever turned into Python code.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
import math
from fractions import Fraction
from typing import Any, Callable

import flint
import sympy as sp
from flint import arb

from plantlint.kernel.enclosures import int_power
from plantlint.kernel.precision import precision


_UNARY: dict[type, str] = {
    sp.sin: "sin",
    sp.cos: "cos",
    sp.tan: "tan",
    sp.asin: "asin",
    sp.acos: "acos",
    sp.atan: "atan",
    sp.sinh: "sinh",
    sp.cosh: "cosh",
    sp.tanh: "tanh",
    sp.exp: "exp",
    sp.log: "log",
}


class UnsupportedExpression(ValueError):
    """The expression uses something ball arithmetic cannot enclose here."""


#: Balls wider than this (radius) get endpoint enclosures for the elementary functions.
WIDE_RADIUS = 1e-6


def _endpoints(x: arb) -> tuple[arb, arb]:
    """Exact balls at the two ends of ``x`` (a wide ball seen as an interval)."""
    return x.lower(), x.upper()


def _hull(*parts: arb) -> arb:
    out = parts[0]
    for q in parts[1:]:
        out = out.union(q)
    return out


def tight_periodic(name: str, x: arb) -> arb:
    """sin/cos over a wide ball: the ends plus every extremum inside (period-aware).

    cos has its extrema at k*pi, sin at pi/2 + k*pi; between two consecutive
    extrema the function is monotone, so the range over [lo, hi] is the hull of
    the values at the ends and at the extrema inside (an extremum whose
    position cannot be separated from an end is included: never too narrow).
    """
    lo, hi = _endpoints(x)
    pi = arb.pi()
    if not _within_floats(lo, hi):
        return arb(0, 1)  # ends beyond a float (exp(exp(x))): far wider than a period, [-1, 1]
    values = [getattr(lo, name)(), getattr(hi, name)()]
    shift = arb(0) if name == "cos" else pi / 2
    # extremum positions c_k = shift + k pi with lo <= c_k <= hi
    k_lo = int(math.floor(float(((lo - shift) / pi).lower().mid()))) - 1
    k_hi = int(math.ceil(float(((hi - shift) / pi).upper().mid()))) + 1
    if k_hi - k_lo > 4:
        return arb(0, 1)  # at least a whole period: [-1, 1]
    for k in range(k_lo, k_hi + 1):
        c = shift + k * pi
        if (c < lo) or (c > hi):
            continue  # certainly outside
        values.append(getattr(c, name)())
    out = _hull(*values)
    return out.intersection(arb(0, 1)) if out.is_finite() else arb(0, 1)


#: Ends of a ball beyond this are not turned into floats to count periods (a float of
#: them would be infinite).
_FLOAT_RANGE = arb(2) ** 1000


def _within_floats(lo: arb, hi: arb) -> bool:
    return bool(lo > -_FLOAT_RANGE and hi < _FLOAT_RANGE)


def tight_monotone(name: str, x: arb) -> arb:
    """exp, log, sqrt, atan, tanh, sinh, asinh-like increasing functions: the ends."""
    lo, hi = _endpoints(x)
    return getattr(lo, name)().union(getattr(hi, name)())


def tight_tan(x: arb) -> arb:
    """tan over a ball that stays inside one branch (between two poles): the ends."""
    lo, hi = _endpoints(x)
    pi = arb.pi()
    if not _within_floats(lo, hi):
        return _nan()  # no branch can be told apart that far out
    k = int(math.floor(float(((lo + pi / 2) / pi).mid())))
    left, right = -pi / 2 + k * pi, pi / 2 + k * pi
    if lo > left and hi < right:
        return lo.tan().union(hi.tan())
    return _nan()


def unary(name: str, x: arb) -> arb:
    """The enclosure of the named elementary function over the ball ``x`` (tight on wide balls)."""
    if x.is_finite() and x.rad() > WIDE_RADIUS:
        if name in ("sin", "cos"):
            return tight_periodic(name, x)
        if name in ("exp", "atan", "tanh", "sinh"):
            return tight_monotone(name, x)
        if name == "log" and _positive(x):
            return tight_monotone(name, x)
        if name == "sqrt" and _nonnegative(x):
            return x.lower().nonnegative_part().sqrt().union(x.upper().sqrt())
        if name == "tan":
            return tight_tan(x)
        if name == "cosh":
            lo, hi = _endpoints(x)
            out = lo.cosh().union(hi.cosh())
            return out.union(arb(1)) if x.contains(0) else out
    if name == "asin":
        return x.asin() if _inside(x, -1, 1) else _nan()
    if name == "acos":
        return x.acos() if _inside(x, -1, 1) else _nan()
    if name == "log":
        return x.log() if _positive(x) else _nan()
    if name == "sqrt":
        return x.sqrt() if _nonnegative(x) else _nan()
    return getattr(x, name)()


def _nan() -> arb:
    return arb("nan")


def _positive(x: arb) -> bool:
    return bool(x > 0)


def _nonnegative(x: arb) -> bool:
    return bool(x >= 0)


def _inside(x: arb, lo: int, hi: int) -> bool:
    return bool(x >= lo) and bool(x <= hi)


def rational_power(x: arb, exponent: sp.Rational) -> arb:
    if exponent.q == 1:
        return int_power(x, int(exponent.p))
    if exponent.q == 2:
        root = x.sqrt() if _nonnegative(x) else _nan()
        return int_power(root, int(exponent.p))
    if _positive(x):
        return (x.log() * arb(int(exponent.p)) / int(exponent.q)).exp()
    return _nan()


Step = Callable[[list[arb], Sequence[arb]], arb]




def fold(name: str, args: Sequence[int]) -> Step:
    """The step that adds (``"add"``) or multiplies (``"mul"``) the registers ``args`` in
    order (one definition for every straight-line program of balls)."""
    if name == "add":
        def add(regs: list[arb], values: Sequence[arb]) -> arb:
            acc = regs[args[0]]
            for a in args[1:]:
                acc = acc + regs[a]
            return acc
        return add

    def mul(regs: list[arb], values: Sequence[arb]) -> arb:
        acc = regs[args[0]]
        for a in args[1:]:
            acc = product(acc, regs[a])
        return acc
    return mul


def product(a: arb, b: arb) -> arb:
    """a * b, with the sign of the product kept when the factors have one each.

    A ball product is not the interval product: (m1 +- r1)(m2 +- r2) has radius
    |m1| r2 + |m2| r1 + r1 r2, so its lower end is 2 r1 r2 below the interval's. Two
    wide positive factors ([2.2e9, 9.1e9] times [133, 2547]) then give a ball that
    holds 0, and an envelope proof of a product of positive factors stalls. When
    the ball product holds 0 but neither factor does, the product is formed from the
    endpoints instead (the interval product: the hull of the four endpoint products,
    R. E. Moore, Interval Analysis, 1966), which excludes 0. Otherwise the ball
    product stands: it is cheaper by a factor of about 20, and tight enough."""
    c = a * b
    if c.contains(0) and not a.contains(0) and not b.contains(0) and a.is_finite() and b.is_finite():
        lo_a, hi_a, lo_b, hi_b = a.lower(), a.upper(), b.lower(), b.upper()
        return (lo_a * lo_b).union(lo_a * hi_b).union(hi_a * lo_b).union(hi_a * hi_b)
    return c


def _step(name: str, args: tuple[int, ...], data: object) -> Step:
    """One compiled instruction as a closure (faster than dispatching on names per run)."""
    if name == "sym":
        return lambda regs, values: values[data]  # type: ignore[index]
    if name == "const":
        p, q = data  # type: ignore[misc]
        return lambda regs, values: arb(int(p)) / int(q) if q != 1 else arb(int(p))
    if name == "pi":
        return lambda regs, values: arb.pi()
    if name == "e":
        return lambda regs, values: arb(1).exp()
    if name in ("add", "mul"):
        return fold(name, args)
    if name == "pow":
        exponent = sp.Rational(data)  # type: ignore[arg-type]
        return lambda regs, values: rational_power(regs[args[0]], exponent)
    if name == "powx":
        def powx(regs: list[arb], values: Sequence[arb]) -> arb:
            b, x = regs[args[0]], regs[args[1]]
            return (b.log() * x).exp() if _positive(b) else _nan()
        return powx
    if name == "atan2":
        def atan2(regs: list[arb], values: Sequence[arb]) -> arb:
            y, x = regs[args[0]], regs[args[1]]
            return arb.atan2(y, x) if not (y.contains(0) and x.contains(0)) else _nan()
        return atan2
    return lambda regs, values: unary(name, regs[args[0]])


class Program:
    """Straight-line code for a list of expressions over named symbols."""

    def __init__(self, exprs: Sequence[sp.Expr], symbols: Sequence[sp.Symbol]):
        self.symbols = tuple(symbols)
        self._slots: dict[sp.Basic, int] = {}
        self._code: list[tuple[str, tuple[int, ...], object]] = []
        self._steps: list[Step] | None = None
        for i, s in enumerate(self.symbols):
            self._slots[s] = i
            self._code.append(("sym", (), i))
        self.outputs = [self._emit(e) for e in exprs]

    # -- compilation -------------------------------------------------------
    def _emit(self, e: sp.Basic) -> int:
        slot = self._slots.get(e)
        if slot is not None:
            return slot
        if e.is_Symbol:
            raise UnsupportedExpression(f"free symbol {e} has no value")
        if e.is_Integer or e.is_Rational:
            op = ("const", (), (int(e.p), int(e.q)))
        elif e is sp.pi:
            op = ("pi", (), None)
        elif e is sp.E:
            op = ("e", (), None)
        elif e.is_Float:
            op = ("const", (), sp.Rational(e).as_numer_denom())
        elif e.is_Add:
            op = ("add", tuple(self._emit(a) for a in e.args), None)
        elif e.is_Mul:
            op = ("mul", tuple(self._emit(a) for a in e.args), None)
        elif e.is_Pow:
            b, x = e.args
            if x.is_Rational:
                op = ("pow", (self._emit(b),), sp.Rational(x))
            else:
                op = ("powx", (self._emit(b), self._emit(x)), None)
        elif type(e) in _UNARY:
            op = (_UNARY[type(e)], (self._emit(e.args[0]),), None)
        elif isinstance(e, sp.atan2):
            op = ("atan2", (self._emit(e.args[0]), self._emit(e.args[1])), None)
        else:
            raise UnsupportedExpression(f"cannot enclose {type(e).__name__}")
        self._code.append(op)
        slot = len(self._code) - 1
        self._slots[e] = slot
        return slot

    # -- evaluation --------------------------------------------------------
    def run(self, values: Sequence[arb], prec: int = 128) -> list[arb]:
        """Evaluate every output; ``values`` follow ``self.symbols``.

        Constants are computed at ``prec`` on every run, so one program serves
        any precision.
        """
        regs = self._registers(values, prec)
        return [regs[o] for o in self.outputs]

    def _registers(self, values: Sequence[arb], prec: int) -> list[arb]:
        """Every register of the program (the outputs among them), compiled to steps once."""
        steps = self._steps
        if steps is None:
            steps = self._steps = [_step(name, args, data) for name, args, data in self._code]
        return run_steps(steps, values, prec)

    def at(self, point: Mapping[sp.Symbol, Fraction], prec: int = 128) -> list[arb]:
        """Every output at an exact rational point (a value per symbol), as balls of
        ``prec`` bits around it."""
        return self.run([rational_ball(point[s], prec) for s in self.symbols], prec)

    def proven_undefined(self, point: Mapping[sp.Symbol, Fraction], prec: int = 128) -> bool | None:
        """Is some output undefined at ``point`` *provably*? None when every output is a
        finite ball (defined); True when some step leaves its function's domain for
        certain (a division by an exact zero, the log of a number below zero, asin of a
        number above 1, ...); False when a value is not finite for another reason: it is
        too large for the balls (cosh of 10^298 is a real number, but at 128 bits arb's exp
        gives up on arguments between 2^200 and 2^256, as measured) or its ball straddles the
        edge of a domain. Only True justifies saying that a model is undefined there."""
        regs = self._registers([rational_ball(point[s], prec) for s in self.symbols], prec)
        if all(regs[o].is_finite() for o in self.outputs):
            return None
        for (name, args, data), value in zip(self._code, regs):
            if value.is_finite() or not all(regs[a].is_finite() for a in args):
                continue
            if _leaves_domain(name, [regs[a] for a in args], data):
                return True
        return False


def _leaves_domain(name: str, args: list[arb], data: object) -> bool:
    """Whether one step's finite arguments lie outside its function's real domain for
    certain (the balls prove it). Fractional powers and powers with a variable exponent
    need a positive base, as everywhere in the project (a square root is a power 1/2 here)."""
    def exact_zero(x: arb) -> bool:
        return bool(x.is_exact() and x.is_zero())

    if name == "pow":
        exponent = sp.Rational(data)  # type: ignore[arg-type]
        base = args[0]
        if exponent < 0 and exact_zero(base):
            return True
        return exponent.q != 1 and bool(base < 0)
    if name == "powx":
        return bool(args[0] < 0)
    if name == "atan2":
        return exact_zero(args[0]) and exact_zero(args[1])
    if name in ("asin", "acos"):
        return bool(args[0] > 1) or bool(args[0] < -1)
    if name == "log":
        return bool(args[0] < 0) or exact_zero(args[0])
    return False


def run_steps(steps: Sequence[Callable[[list[Any], Sequence[arb]], Any]], values: Sequence[arb],
              prec: int) -> list[Any]:
    """Every register of a straight-line program (a list of steps, each reading the
    registers before it and the input balls), run at ``prec`` bits."""
    with precision(prec):
        regs: list[Any] = []
        append = regs.append
        for step in steps:
            append(step(regs, values))
        return regs


def ball(lo: sp.Expr | float | int, hi: sp.Expr | float | int | None = None, prec: int = 128) -> arb:
    """A ball that certainly contains the real interval [lo, hi] (or the point lo)."""
    with precision(prec):
        a = to_arb(lo)
        if hi is None:
            return a
        b = to_arb(hi)
        return a.union(b)


def rational_ball(value: Fraction, prec: int) -> arb:
    """A rigorous ball around a rational, computed at ``prec`` bits."""
    with precision(prec):
        return arb(value.numerator) / value.denominator


def to_arb(value: object) -> arb:
    """An exact sympy number (rational, pi, sqrt(2), ...) as a rigorous ball."""
    if isinstance(value, arb):
        return value
    if isinstance(value, int):
        return arb(value)
    if isinstance(value, float):
        return arb(value)
    e = value if isinstance(value, sp.Basic) else None
    if e is None:
        raise UnsupportedExpression(f"not a number: {value!r}")
    if e.is_Rational:
        return arb(int(e.p)) / int(e.q)
    if e.free_symbols:
        raise UnsupportedExpression(f"not a constant: {e}")
    return Program([e], []).run([], prec=max(flint.ctx.prec, 128))[0]
