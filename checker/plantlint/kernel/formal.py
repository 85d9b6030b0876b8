"""Numbers at a point as (rational function of formal unknowns, rigorous ball) pairs.

Taylor mode (:mod:`plantlint.kernel.taylor`) runs on any field. At a rational point of a
plant with sin, exp, sqrt, ... the values are not rational (sin(1/4)), so the exact field
of rationals stops there, and balls alone can prove a value non-zero but never zero.
This field carries both: every transcendental value met on the way (sin(1/4), a square
root, pi) becomes a *formal unknown*, and each number is a quotient N / D of polynomials
with rational coefficients in those unknowns (python-flint ``fmpq_mpoly``), next to a
rigorous ball of its value.

* N = 0 proves the number zero: an identity of the polynomial ring holds whatever the
  unknowns stand for, and D is not zero at their values (every divisor met was proven
  non-zero by its ball before dividing, and D divides their product).
* A ball away from 0 proves it non-zero.
* Anything else (an identity between unknowns, sin(a)^2 + cos(a)^2 = 1, or a value too
  small for the balls) is *unsettled*: the caller goes on with its own, slower, route.

Two identities are built in, because sympy applies them to the values a model is written
with and the Taylor programs see those: a square root of a rational c is an unknown t with
t^2 = c (reduced after every product), and sin, cos and tan of a rational multiple of pi
whose value is in Q(sqrt(2), sqrt(3)) (multiples of 30 and 45 degrees) take that value
(sin(pi/4) is sqrt(2)/2, as sympy writes cos(pi/4)).

A division by a number that is not proven non-zero stops the computation the same way
(:class:`Unsettled`); a division by a proven zero is :class:`~plantlint.kernel.taylor.Undefined`,
as in the other fields. Sizes are bounded (:data:`MAX_TERMS`, :data:`MAX_UNKNOWNS`): past
them the computation is unsettled, never slow.
"""

from __future__ import annotations

import itertools
from fractions import Fraction
from typing import TYPE_CHECKING, Any, Callable

from flint import arb, fmpq, fmpq_mpoly_ctx

from plantlint.kernel import decision as zd
from plantlint.kernel.precision import precision
from plantlint.kernel.enclosures import int_power, tighter
from plantlint.kernel.taylor import ArbField, Inexact, QField, Undefined

if TYPE_CHECKING:  # sympy only where a sympy number is read or written (the light route has none)
    import sympy as sp

#: Formal unknowns one computation may introduce.
MAX_UNKNOWNS = 64
#: Terms of a numerator or denominator beyond which the computation is unsettled.
MAX_TERMS = 4000
#: Ball precision (bits) of the values beside the formal numbers.
PREC = 256
#: Pieces, in all, that the intervals of the parameters in a number are cut into when its
#: ball must be tightened (:meth:`Formal.refined`).
REFINE_PIECES = 64


class Unsettled(Inexact):
    """Neither the formal zero test nor the balls settle a question: use another route."""


class _Space:
    """The unknowns of one computation: their polynomial ring, balls and meanings."""

    def __init__(self) -> None:
        self.ctx = fmpq_mpoly_ctx.get(("t", MAX_UNKNOWNS))
        self.gens = self.ctx.gens()
        self.index: dict[tuple, int] = {}
        self.balls: list[arb] = []
        #: per unknown: (function name, argument numbers) it stands for, for :meth:`Formal.build`
        self.meanings: list[tuple[str, tuple[Any, ...]]] = []
        self.one = self.ctx.constant(1)
        #: unknowns that are square roots of rationals: index -> the rational (t^2 = c)
        self.squares: dict[int, fmpq] = {}

    def unknown(self, key: tuple, ball: arb, meaning: tuple[str, tuple[Any, ...]]) -> "Formal":
        i = self.index.get(key)
        if i is None:
            if len(self.balls) == MAX_UNKNOWNS:
                raise Unsettled("too many transcendental values")
            i = self.index[key] = len(self.balls)
            self.balls.append(ball)
            self.meanings.append(meaning)
        return Formal(self, self.gens[i], self.one, self.balls[i])

    def constant(self, q: fmpq) -> "Formal":
        return Formal(self, self.ctx.constant(q), self.one, arb(q))


class Formal:
    """N / D in the unknowns of a :class:`_Space`, with a ball of its value."""

    __slots__ = ("space", "num", "den", "ball")

    def __init__(self, space: _Space, num: Any, den: Any, ball: arb):
        if len(num) > MAX_TERMS or len(den) > MAX_TERMS:
            raise Unsettled("expression too large")
        if num.is_zero():
            den, ball = space.one, arb(0)
        elif den.is_constant() and den != space.one:
            c = den.coeffs()[0]
            num, den = num / c, space.one
        self.space, self.num, self.den, self.ball = space, num, den, ball

    # -- the field operations ------------------------------------------------------------
    def _lift(self, other: Any) -> "Formal":
        if isinstance(other, Formal):
            return other
        if isinstance(other, Fraction):
            return self.space.constant(fmpq(other.numerator, other.denominator))
        if isinstance(other, (int, fmpq)) and not isinstance(other, bool):
            return self.space.constant(fmpq(other))
        return NotImplemented  # type: ignore[return-value]

    def __add__(self, other: Any) -> "Formal":
        o = self._lift(other)
        if o is NotImplemented:
            return NotImplemented
        if self.den == o.den:
            return Formal(self.space, self.num + o.num, self.den, self.ball + o.ball)
        return _reduced(self.space, self.num * o.den + o.num * self.den, self.den * o.den, self.ball + o.ball)

    __radd__ = __add__

    def __neg__(self) -> "Formal":
        return Formal(self.space, -self.num, self.den, -self.ball)

    def __sub__(self, other: Any) -> "Formal":
        o = self._lift(other)
        return NotImplemented if o is NotImplemented else self + (-o)

    def __rsub__(self, other: Any) -> "Formal":
        o = self._lift(other)
        return NotImplemented if o is NotImplemented else o + (-self)

    def __mul__(self, other: Any) -> "Formal":
        o = self._lift(other)
        if o is NotImplemented:
            return NotImplemented
        return _reduced(self.space, self.num * o.num, self.den * o.den, self.ball * o.ball)

    __rmul__ = __mul__

    def __truediv__(self, other: Any) -> "Formal":
        o = self._lift(other)
        if o is NotImplemented:
            return NotImplemented
        return self * o.inverse()

    def __rtruediv__(self, other: Any) -> "Formal":
        o = self._lift(other)
        return NotImplemented if o is NotImplemented else o * self.inverse()

    def inverse(self) -> "Formal":
        if self.num.is_zero():
            raise Undefined("division by zero")
        bound = self.ball if not self.ball.contains(0) else self.refined()
        if bound.contains(0):
            raise Unsettled("division by a value not proven non-zero")
        return Formal(self.space, self.den, self.num, 1 / bound)

    def refined(self) -> arb:
        """The ball of the value, tightened where parameters (unknowns that stand for a
        whole interval, :meth:`FormalField.parameter`) occur: N / D evaluated term by term
        on pieces of their intervals (the overestimate shrinks with a piece's width; powers
        of a piece are taken from its ends, so x^2 stays >= 0), the pieces' balls
        united and intersected with the ball carried along. That ball itself when no
        parameter occurs, or when D is not proven non-zero on a piece."""
        space = self.space
        degrees = [max(a, b) for a, b in zip(self.num.degrees(), self.den.degrees())]
        params = [i for i, d in enumerate(degrees) if d and space.meanings[i][0] == "param"]
        if not params:
            return self.ball
        cuts = max(int(REFINE_PIECES ** (1 / len(params))), 1)
        with precision(PREC):
            pieces = {i: _pieces(space.balls[i], cuts) for i in params}
            total: arb | None = None
            for choice in itertools.product(*(pieces[i] for i in params)):
                values = list(space.balls)
                for i, piece in zip(params, choice):
                    values[i] = piece
                num, den = _evaluate(self.num, values), _evaluate(self.den, values)
                if not den.is_finite() or den.contains(0) or not num.is_finite():
                    return self.ball
                part = num / den
                total = part if total is None else total.union(part)
        assert total is not None
        return tighter(total, self.ball)

    # exact comparisons with 0 only where they are proofs (formal zero is zero)
    def __eq__(self, other: object) -> bool:
        if isinstance(other, int) and other == 0:
            return self.num.is_zero()
        if isinstance(other, Formal):
            return (self - other).num.is_zero()
        return NotImplemented

    def __ne__(self, other: object) -> bool:
        result = self.__eq__(other)
        return result if result is NotImplemented else not result

    __hash__ = None  # type: ignore[assignment]

    def is_constant(self) -> bool:
        return self.num.is_constant() and self.den.is_constant()

    def rational(self) -> fmpq:
        """The value of a constant (check :meth:`is_constant` first)."""
        c = self.num.coeffs()
        return (c[0] if c else fmpq(0)) / self.den.coeffs()[0]

    def key(self) -> tuple:
        return (str(self.num), str(self.den))

    def size(self) -> int:
        return len(self.num) + len(self.den)

    def decision(self) -> zd.ZeroDecision:
        if self.num.is_zero():
            return zd.proven_zero("formal")
        if _excludes_zero(self.ball) or _excludes_zero(self.refined()):  # tightened only when needed
            return zd.proven_nonzero("ball")
        return zd.UNDECIDED

    def to_sympy(self) -> "sp.Expr":
        """The exact sympy number this stands for (each unknown as the function value it is)."""
        import sympy as sp

        from plantlint.kernel.rational import sympy_rational

        cache: dict[int, sp.Expr] = {}

        def unknown(i: int) -> sp.Expr:
            if i not in cache:
                name, args = self.space.meanings[i]
                built = () if name == "param" else tuple(
                    a.to_sympy() if isinstance(a, Formal) else sympy_rational(a) for a in args)
                cache[i] = (sp.pi if name == "pi" else sp.Symbol(args[0]) if name == "param"
                            else built[0] ** sp.Rational(name.split()[1]) if name.startswith("pow ")
                            else getattr(sp, name)(*built))
            return cache[i]

        def poly(p: Any) -> sp.Expr:
            total = sp.Integer(0)
            for exps, coeff in p.terms():
                term = sympy_rational(coeff)
                for i, e in enumerate(exps):
                    if e:
                        term = term * unknown(i) ** e
                total = total + term
            return total

        return poly(self.num) / poly(self.den)


def _excludes_zero(ball: arb) -> bool:
    return bool(ball.is_finite() and not ball.contains(0))


def _pieces(interval: arb, cuts: int) -> list[arb]:
    """``interval`` cut into ``cuts`` pieces whose union holds it."""
    lo, hi = arb(interval.lower()), arb(interval.upper())
    step = (hi - lo) / cuts
    ends = [lo + step * k for k in range(cuts)] + [hi]
    return [a.union(b) for a, b in zip(ends, ends[1:])]


def _evaluate(p: Any, values: list[arb]) -> arb:
    """The polynomial ``p`` over the balls ``values`` (one per unknown), term by term."""
    total = arb(0)
    for exps, coeff in p.terms():
        term = arb(coeff)
        for i, e in enumerate(exps):
            if e:
                term *= int_power(values[i], e)
        total += term
    return total


def _squares_reduced(space: _Space, p: Any) -> Any:
    """``p`` with every square of a square-root unknown replaced by its rational (t^2 = c)."""
    if not space.squares or p.is_constant():
        return p
    out: dict[tuple[int, ...], fmpq] = {}
    changed = False
    for exps, coeff in p.terms():
        e = list(exps)
        for i, c in space.squares.items():
            if e[i] >= 2:
                k = e[i] // 2
                coeff, e[i], changed = coeff * c ** k, e[i] - 2 * k, True
        key = tuple(e)
        out[key] = out.get(key, fmpq(0)) + coeff
    if not changed:
        return p
    return space.ctx.from_dict({k: v for k, v in out.items() if v != 0})


def _reduced(space: _Space, num: Any, den: Any, ball: arb) -> Formal:
    """N / D with squares of square roots reduced and the common factor taken out when D
    is not a constant."""
    num, den = _squares_reduced(space, num), _squares_reduced(space, den)
    if den.is_zero():
        raise Undefined("division by zero")
    if not den.is_constant() and not num.is_zero():
        g = num.gcd(den)
        if not g.is_constant():
            num, den = num / g, den / g
    return Formal(space, num, den, ball)


class FormalField:
    """Taylor mode's field interface (see :class:`~plantlint.kernel.taylor.QField`) on
    :class:`Formal` numbers. Rationals stay exact constants; a function value that is not
    rational becomes an unknown (one per function and argument)."""

    exact = True  # zero tests are proofs (the brackets skip formal zeros)

    def __init__(self) -> None:
        self.space = _Space()
        self._q = QField()
        self._balls = ArbField(PREC)

    def const(self, q: Fraction) -> Formal:
        return self.space.constant(fmpq(q.numerator, q.denominator))

    def number(self, value: Any) -> Formal:
        """A number of the point: a Formal, an exact rational, or an exact sympy number
        (pi/4, sqrt(2), exp(-160/7)) read from its tree; ValueError for what it does not take."""
        if isinstance(value, Formal):
            return value
        if type(value).__module__.startswith("sympy."):  # checked by name: sympy is not imported for the rest
            return self._from_sympy(value)
        return self.space.constant(self._q.number(value))

    #: sympy's functions that a point value may hold (those Taylor mode knows), by name.
    _FUNCTIONS = ("sin", "cos", "tan", "exp", "log", "atan", "asin", "acos", "sinh", "cosh", "tanh")

    def _from_sympy(self, value: "sp.Basic") -> Formal:
        import sympy as sp

        if value.free_symbols:
            raise ValueError("not an exact number")
        if value.is_Rational:
            return self.const(Fraction(int(value.p), int(value.q)))
        if value is sp.pi:
            return self.pi()
        if value.is_Add or value.is_Mul:
            parts = [self._from_sympy(a) for a in value.args]
            total = parts[0]
            for part in parts[1:]:
                total = total + part if value.is_Add else total * part
            return total
        if value.is_Pow:
            base, exp = value.args
            if exp.is_Integer:
                b = self._from_sympy(base)
                k = int(exp)
                if abs(k) > 64:
                    raise ValueError("power too large")
                out = self.const(Fraction(1))
                for _ in range(abs(k)):
                    out = out * b
                return out if k >= 0 else out.inverse()
            if exp.is_Rational:
                return self.powq(self._from_sympy(base), Fraction(int(exp.p), int(exp.q)))
            raise ValueError("power")
        name = type(value).__name__
        if name in self._FUNCTIONS and type(value) is getattr(sp, name) and len(value.args) == 1:
            return self.base(name, self._from_sympy(value.args[0]))
        raise ValueError(f"{type(value).__name__} in a point value")

    def pi(self) -> Formal:
        return self.space.unknown(("pi",), arb.pi(), ("pi", ()))

    def parameter(self, name: str, interval: arb) -> Formal:
        """A parameter that takes every value of ``interval``, as an unknown whose ball is
        that interval: an identity in it holds for every value, and every ball computed
        from it holds the number's values over the whole interval."""
        return self.space.unknown(("param", name), interval, ("param", (name,)))

    def base(self, name: str, a: Formal) -> Formal:
        if name == "inv":
            return a.inverse()
        if name in ("sin", "cos", "tan"):
            special = self._at_pi_multiple(name, a)
            if special is not None:
                return special
        out = self._of(name, (a,), lambda: self._q.base(name, a.rational()),
                       lambda: self._balls.base(name, a.ball))
        if name == "sqrt" and a.is_constant() and not out.is_constant():
            self.space.squares[self.space.index[("sqrt", a.key())]] = a.rational()
        return out

    def _at_pi_multiple(self, name: str, a: Formal) -> Formal | None:
        """sin, cos or tan of r pi (r rational) at a multiple of 30 or 45 degrees, exactly."""
        pi = self.space.index.get(("pi",))
        if pi is None or not a.den.is_constant() or len(a.num) != 1:
            return None
        ((exps, coeff),) = a.num.terms()
        if any(e != (1 if i == pi else 0) for i, e in enumerate(exps)):
            return None
        r = coeff / a.den.coeffs()[0]
        degrees = r * 180
        if degrees.q != 1 or (int(degrees.p) % 30 and int(degrees.p) % 45):
            return None
        d = int(degrees.p)

        def sine(deg: int) -> Formal:
            deg %= 360
            sign = 1
            if deg >= 180:
                deg, sign = deg - 180, -1
            if deg > 90:
                deg = 180 - deg
            value = {0: self.const(Fraction(0)), 30: self.const(Fraction(1, 2)), 90: self.const(Fraction(1)),
                     45: self.base("sqrt", self.const(Fraction(2))) * Fraction(1, 2),
                     60: self.base("sqrt", self.const(Fraction(3))) * Fraction(1, 2)}[deg]
            return value * sign

        if name == "sin":
            return sine(d)
        if name == "cos":
            return sine(d + 90)
        return sine(d) / sine(d + 90)  # tan: Undefined where the cosine is 0

    def powq(self, a: Formal, q: Fraction) -> Formal:
        if q.denominator == 2 and a.is_constant():  # sqrt(c)^p: the square root reduces (t^2 = c)
            root, out = self.base("sqrt", a), self.const(Fraction(1))
            for _ in range(abs(q.numerator)):
                out = out * root
            return out if q.numerator > 0 else out.inverse()
        return self._of(f"pow {q}", (a,), lambda: self._q.powq(a.rational(), q),
                        lambda: self._balls.powq(a.ball, q))

    def atan2(self, y: Formal, x: Formal) -> Formal:
        return self._of("atan2", (y, x), lambda: self._q.atan2(y.rational(), x.rational()),
                        lambda: self._balls.atan2(y.ball, x.ball))

    def is_zero(self, a: Formal) -> zd.ZeroDecision:
        return a.decision()

    def _of(self, name: str, args: tuple[Formal, ...], exact: Callable[[], fmpq], ball: Callable[[], arb]) -> Formal:
        """A function value: exact when the arguments are rational and so is the value
        (sin(0) = 0); else an unknown, with its ball. A domain error proven on exact
        arguments is Undefined; on a ball of an unknown's value it is only unsettled."""
        constant = all(a.is_constant() for a in args)
        if constant:
            try:
                return self.space.constant(exact())
            except Undefined:
                raise
            except Inexact:
                pass
        with precision(PREC):
            try:
                value = ball()
            except Undefined:
                if constant:
                    raise
                raise Unsettled(f"{name} of a value near its domain's edge") from None
        key = (name, *(a.key() for a in args))
        return self.space.unknown(key, value, (name, args))


__all__ = ["MAX_TERMS", "MAX_UNKNOWNS", "Formal", "FormalField", "Unsettled"]
