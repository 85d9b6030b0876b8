"""Lie towers at a point without symbolic towers: Taylor mode through a straight-line program.

If x(t) solves dx/dt = f(x), x(0) = x0, then h(x(t)) = sum_k t^k/k! L_f^k h(x0)
(theory notes, "Towers without symbolic swell"). Truncated power series are
pushed through the compiled program of f (and of h, g) one order at a time with
the classical recurrences of automatic differentiation (product, quotient,
exp/log, sin/cos pairs, ...), so all of L_f^k h(x0), k <= K, cost O(K^2)
series operations per instruction.

Dual numbers (:class:`Jet`, first order, several directions) ride on top: the
flow started at x0 + e v gives the directional derivatives dL_f^k h(x0) . v —
with v = g_j(x0) that is L_gj L_f^k h(x0), with unit vectors the gradients. The
same directions give M(t) = D phi_t(x0) (the variational equation), and
w(t) = M(t)^-1 g(x(t)) = sum_k t^k/k! ad_f^k g(x0).

Numbers are either rigorous arb balls (:class:`ArbField`; a ball that excludes 0
*proves* a non-zero) or exact rationals (:class:`QField`, python-flint ``fmpq``),
which raise :class:`Inexact` as soon as a transcendental value is not rational
(sin(0) = 0 is fine, sin(1/3) is not); callers then use balls.
"""

from __future__ import annotations

from fractions import Fraction
from math import factorial
from typing import Any, Sequence

from flint import arb, fmpq

from plantlint.kernel import decision as zd
from plantlint.kernel.dag import Graph, Instruction, Program
from plantlint.kernel.precision import precision


class Inexact(ArithmeticError):
    """An exact field met a value that is not rational."""


class Undefined(ArithmeticError):
    """A value is undefined at the point (division by zero, log of a non-positive number)."""


# -- number fields -----------------------------------------------------------------------
def domain_error(name: str, a: arb) -> str | None:
    """Why ``name`` is not defined (or not differentiable) over all of the ball ``a``, or
    None: the domains every field of balls or forms over balls checks."""
    if name in ("log", "sqrt") and not a > 0:
        return name  # sqrt: not differentiable at 0, undefined below
    if name in ("asin", "acos") and not (a > -1 and a < 1):
        return name
    if name == "inv" and a.contains(0):
        return "division by a value that may be zero"
    return None


def _bits(field: Any) -> int | None:
    """The working precision a field's numbers want (None: exact, keep the context's)."""
    return None if getattr(field, "exact", False) else getattr(field, "prec", None)


class ArbField:
    """Rigorous balls at ``prec`` bits."""

    exact = False

    def __init__(self, prec: int = 128):
        self.prec = prec

    def const(self, q: Fraction) -> arb:
        return arb(q.numerator) / q.denominator if q.denominator != 1 else arb(q.numerator)

    def number(self, value: Any) -> arb:
        if isinstance(value, arb):
            return value
        if isinstance(value, Fraction):
            return self.const(value)
        if isinstance(value, fmpq):
            return arb(value)
        return arb(value)

    def pi(self) -> arb:
        return arb.pi()

    def base(self, name: str, a: arb) -> arb:
        why = domain_error(name, a)
        if why is not None:
            raise Undefined(why)
        if name == "inv":
            return 1 / a
        out = getattr(a, name)()
        if not out.is_finite():
            raise Undefined(name)
        return out

    def powq(self, a: arb, q: Fraction) -> arb:
        if not a > 0:
            raise Undefined("fractional power of a value that may be non-positive")
        return (a.log() * q.numerator / q.denominator).exp()

    def atan2(self, y: arb, x: arb) -> arb:
        if y.contains(0) and not x > 0:
            # both may vanish, or the ball meets the branch cut (y = 0, x < 0), where atan2
            # jumps from pi to -pi: no derivative there, and a mean-value form over a box
            # that crosses it would take the formula's finite slope across the jump
            raise Undefined("atan2 at or across its branch cut")
        return arb.atan2(y, x)

    def is_zero(self, a: arb) -> zd.ZeroDecision:
        """Zero: a zero-radius ball at 0; non-zero: a finite ball without 0; else undecided."""
        return zd.of_ball(a)


class QField:
    """Exact rationals (fmpq); transcendental values only where they are rational."""

    exact = True
    _AT_ZERO = {"sin": 0, "tan": 0, "atan": 0, "asin": 0, "sinh": 0, "tanh": 0,
                "cos": 1, "exp": 1, "cosh": 1}

    def const(self, q: Fraction) -> fmpq:
        return fmpq(q.numerator, q.denominator)

    def number(self, value: Any) -> fmpq:
        if isinstance(value, fmpq):
            return value
        if isinstance(value, Fraction):
            return self.const(value)
        if isinstance(value, int):
            return fmpq(value)
        raise Inexact(f"not an exact rational: {value!r}")

    def pi(self) -> fmpq:
        raise Inexact("pi")

    def base(self, name: str, a: fmpq) -> fmpq:
        if name == "inv":
            if a == 0:
                raise Undefined("division by zero")
            return 1 / a
        if a == 0 and name in self._AT_ZERO:
            return fmpq(self._AT_ZERO[name])
        if name == "log" and a == 1:
            return fmpq(0)
        if name == "log" and a <= 0:
            raise Undefined("log")
        if name == "sqrt" and a > 0:
            p, q = int(a.p), int(a.q)
            rp, rq = _isqrt_exact(p), _isqrt_exact(q)
            if rp is not None and rq is not None:
                return fmpq(rp, rq)
        if name == "sqrt" and a <= 0:
            raise Undefined("sqrt")
        if name == "acos" and a == 1:
            raise Undefined("acos")  # not differentiable there
        raise Inexact(f"{name}({a})")

    def powq(self, a: fmpq, q: Fraction) -> fmpq:
        if a <= 0:
            raise Undefined("fractional power")
        p, d = int(a.p), int(a.q)
        rp, rd = _iroot_exact(p, q.denominator), _iroot_exact(d, q.denominator)
        if rp is None or rd is None:
            raise Inexact("fractional power")
        return fmpq(rp, rd) ** q.numerator if q.numerator > 0 else 1 / fmpq(rp, rd) ** (-q.numerator)

    def atan2(self, y: fmpq, x: fmpq) -> fmpq:
        if y == 0 and x > 0:
            return fmpq(0)
        if y == 0 and x == 0:
            raise Undefined("atan2")
        raise Inexact("atan2")

    def is_zero(self, a: fmpq) -> zd.ZeroDecision:
        return zd.exactly(a == 0)


def _isqrt_exact(n: int) -> int | None:
    from math import isqrt

    r = isqrt(n)
    return r if r * r == n else None


def _iroot_exact(n: int, k: int) -> int | None:
    """The integer k-th root of n >= 0 when n is a k-th power, else None."""
    if n <= 1:
        return n
    if k > n.bit_length():  # 2^k > n: no root other than 0 and 1 (2**k itself would not finish)
        return None
    r = round(n ** (1.0 / k)) if n < 2**1000 else None
    if r is None:
        return None
    for c in (r - 1, r, r + 1):
        if c >= 0 and c**k == n:
            return c
    return None


# -- dual numbers --------------------------------------------------------------------------
class Jet:
    """v + sum_i d_i e_i with e_i e_j = 0: first derivatives along several directions."""

    __slots__ = ("v", "d")

    def __init__(self, v: Any, d: Sequence[Any]):
        self.v = v
        self.d = tuple(d)

    def chain(self, out: Any, der: Any) -> "Jet":
        return Jet(out, [der * t for t in self.d])

    def __add__(self, o: Any) -> "Jet":
        if isinstance(o, Jet):
            return Jet(self.v + o.v, [a + b for a, b in zip(self.d, o.d)])
        return Jet(self.v + o, self.d)

    __radd__ = __add__

    def __neg__(self) -> "Jet":
        return Jet(-self.v, [-a for a in self.d])

    def __sub__(self, o: Any) -> "Jet":
        if isinstance(o, Jet):
            return Jet(self.v - o.v, [a - b for a, b in zip(self.d, o.d)])
        return Jet(self.v - o, self.d)

    def __rsub__(self, o: Any) -> "Jet":
        return Jet(o - self.v, [-a for a in self.d])

    def __mul__(self, o: Any) -> "Jet":
        if isinstance(o, Jet):
            sv, ov = self.v, o.v
            return Jet(sv * ov, [a * ov + sv * b for a, b in zip(self.d, o.d)])
        return Jet(self.v * o, [a * o for a in self.d])

    __rmul__ = __mul__

    def __truediv__(self, o: Any) -> "Jet":
        if isinstance(o, Jet):
            q = self.v / o.v
            return Jet(q, [(a - q * b) / o.v for a, b in zip(self.d, o.d)])
        return Jet(self.v / o, [a / o for a in self.d])

    def __rtruediv__(self, o: Any) -> "Jet":
        q = o / self.v
        return Jet(q, [-(q * a) / self.v for a in self.d])


class Dual:
    """v + d e with e^2 = 0: one direction (the common case, without tuples)."""

    __slots__ = ("v", "d")

    def __init__(self, v: Any, d: Any):
        self.v = v
        self.d = d

    def chain(self, out: Any, der: Any) -> "Dual":
        return Dual(out, der * self.d)

    def __add__(self, o: Any) -> "Dual":
        if isinstance(o, Dual):
            return Dual(self.v + o.v, self.d + o.d)
        return Dual(self.v + o, self.d)

    __radd__ = __add__

    def __neg__(self) -> "Dual":
        return Dual(-self.v, -self.d)

    def __sub__(self, o: Any) -> "Dual":
        if isinstance(o, Dual):
            return Dual(self.v - o.v, self.d - o.d)
        return Dual(self.v - o, self.d)

    def __rsub__(self, o: Any) -> "Dual":
        return Dual(o - self.v, -self.d)

    def __mul__(self, o: Any) -> "Dual":
        if isinstance(o, Dual):
            return Dual(self.v * o.v, self.d * o.v + self.v * o.d)
        return Dual(self.v * o, self.d * o)

    __rmul__ = __mul__

    def __truediv__(self, o: Any) -> "Dual":
        if isinstance(o, Dual):
            q = self.v / o.v
            return Dual(q, (self.d - q * o.d) / o.v)
        return Dual(self.v / o, self.d / o)

    def __rtruediv__(self, o: Any) -> "Dual":
        q = o / self.v
        return Dual(q, -(q * self.d) / self.v)


_JETS = (Jet, Dual)


def _head(a: Any) -> Any:
    return a.v if isinstance(a, _JETS) else a


def _tangent(a: Any, q: int, field: Any) -> tuple[Any, ...]:
    """The tangents of a jet; zeros for a number (a value that does not depend on the start)."""
    if isinstance(a, Jet):
        return a.d
    if isinstance(a, Dual):
        return (a.d,)
    return tuple(field.const(Fraction(0)) for _ in range(q))


def _value(a: Any) -> Any:
    while isinstance(a, _JETS):
        a = a.v
    return a


def _fn(field: Any, name: str, a: Any) -> Any:
    """An elementary function of a number or a jet (chain rule on the tangents)."""
    if not isinstance(a, _JETS):
        return field.base(name, a)
    v = a.v
    out = _fn(field, name, v)
    if name == "sin":
        der = _fn(field, "cos", v)
    elif name == "cos":
        der = -_fn(field, "sin", v)
    elif name == "tan":
        der = 1 + out * out
    elif name in ("exp",):
        der = out
    elif name == "log":
        der = 1 / v
    elif name == "sqrt":
        der = 1 / (2 * out)
    elif name == "atan":
        der = 1 / (1 + v * v)
    elif name == "asin":
        der = 1 / _fn(field, "sqrt", 1 - v * v)
    elif name == "acos":
        der = -1 / _fn(field, "sqrt", 1 - v * v)
    elif name == "sinh":
        der = _fn(field, "cosh", v)
    elif name == "cosh":
        der = _fn(field, "sinh", v)
    elif name == "tanh":
        der = 1 - out * out
    elif name == "inv":
        der = -(out * out)
    else:  # pragma: no cover - every unary name is listed above
        raise Inexact(name)
    return a.chain(out, der)


def _powq(field: Any, a: Any, q: Fraction) -> Any:
    if not isinstance(a, _JETS):
        return field.powq(a, q)
    out = _powq(field, a.v, q)
    der = out * field.const(q) / a.v
    return a.chain(out, der)


def _atan2(field: Any, y: Any, x: Any) -> Any:
    if not isinstance(y, _JETS) and not isinstance(x, _JETS):
        return field.atan2(y, x)
    if isinstance(y, Dual) or isinstance(x, Dual):
        yd = y if isinstance(y, Dual) else Dual(y, 0)
        xd = x if isinstance(x, Dual) else Dual(x, 0)
        out = _atan2(field, yd.v, xd.v)
        den = xd.v * xd.v + yd.v * yd.v
        return Dual(out, (xd.v * yd.d - yd.v * xd.d) / den)
    yj = y if isinstance(y, Jet) else Jet(y, [0] * len(x.d))
    xj = x if isinstance(x, Jet) else Jet(x, [0] * len(y.d))
    out = _atan2(field, yj.v, xj.v)
    den = xj.v * xj.v + yj.v * yj.v
    return Jet(out, [(xj.v * dy - yj.v * dx) / den for dy, dx in zip(yj.d, xj.d)])


# -- Taylor mode ---------------------------------------------------------------------------
def _conv(a: list[Any], b: list[Any], k: int, lo: int, hi: int) -> Any:
    """sum_{j=lo..hi} a_j b_(k-j)"""
    total = a[lo] * b[k - lo]
    for j in range(lo + 1, hi + 1):
        total = total + a[j] * b[k - j]
    return total


def _wconv(a: list[Any], b: list[Any], k: int, lo: int, hi: int) -> Any:
    """sum_{j=lo..hi} j a_j b_(k-j)"""
    total = a[lo] * b[k - lo] * lo
    for j in range(lo + 1, hi + 1):
        total = total + a[j] * b[k - j] * j
    return total


class _Runner:
    """Series of every register of one program, extended one order at a time."""

    def __init__(self, program: Program, field: Any):
        self.program = program
        self.field = field
        self.series: list[list[Any]] = [[] for _ in program.code]
        self.aux: list[list[list[Any]]] = [[] for _ in program.code]
        self._consts: dict[int, Any] = {}

    def step(self, k: int, var_coeff: Sequence[Sequence[Any]]) -> None:
        """Compute coefficient k of every register; ``var_coeff[i]`` holds 0..k of variable i."""
        S = self.series
        field = self.field
        zero = field.const(Fraction(0))
        for r, ins in enumerate(self.program.code):
            op, args = ins.op, ins.args
            s = S[r]
            if op == "var":
                s.append(var_coeff[ins.data][k])
            elif op == "const":
                s.append(field.const(ins.data) if k == 0 else zero)
            elif op == "pi":
                s.append(field.pi() if k == 0 else zero)
            elif op == "add":
                total = S[args[0]][k]
                for a in args[1:]:
                    total = total + S[a][k]
                s.append(total)
            elif op == "mul":
                s.append(self._mul(r, ins, k))
            elif op == "powi":
                s.append(self._powi(r, ins, k))
            elif op == "inv":
                a = S[args[0]]
                if k == 0:
                    s.append(_fn(field, "inv", a[0]))
                else:
                    s.append(-_conv(a, s, k, 1, k) * s[0])
            elif op == "sqrt":
                a = S[args[0]]
                if k == 0:
                    s.append(_fn(field, "sqrt", a[0]))
                    self.aux[r] = [[_fn(field, "inv", 2 * s[0])]]
                else:
                    rest = a[k] - _conv(s, s, k, 1, k - 1) if k > 1 else a[k]
                    s.append(rest * self.aux[r][0][0])
            elif op == "powq":
                a = S[args[0]]
                if k == 0:
                    s.append(_powq(field, a[0], ins.data))
                    self.aux[r] = [[_fn(field, "inv", a[0])]]
                else:
                    q = field.const(ins.data)
                    total = zero
                    for j in range(1, k + 1):
                        total = total + (q * j - (k - j)) * a[j] * s[k - j]
                    s.append(total * self.aux[r][0][0] / k)
            elif op == "exp":
                a = S[args[0]]
                s.append(_fn(field, "exp", a[0]) if k == 0 else _wconv(a, s, k, 1, k) / k)
            elif op == "log":
                a = S[args[0]]
                if k == 0:
                    s.append(_fn(field, "log", a[0]))
                    self.aux[r] = [[_fn(field, "inv", a[0])]]
                else:
                    rest = a[k] - _wconv(s, a, k, 1, k - 1) / k if k > 1 else a[k]
                    s.append(rest * self.aux[r][0][0])
            elif op in ("sin", "cos", "sinh", "cosh"):
                s.append(self._trig(r, ins, k))
            elif op in ("tan", "tanh"):
                a = S[args[0]]
                if k == 0:
                    t0 = _fn(field, op, a[0])
                    s.append(t0)
                    u0 = 1 + t0 * t0 if op == "tan" else 1 - t0 * t0
                    self.aux[r] = [[u0]]
                else:
                    u = self.aux[r][0]
                    s.append(_wconv(a, u, k, 1, k) / k)
                    sq = _conv(s, s, k, 0, k)
                    u.append(sq if op == "tan" else -sq)
            elif op in ("atan", "asin", "acos"):
                s.append(self._arc(r, ins, k))
            elif op == "atan2":
                s.append(self._atan2(r, ins, k))
            elif op == "powx":
                s.append(self._powx(r, ins, k))
            else:  # pragma: no cover
                raise Inexact(op)

    def _mul(self, r: int, ins: Instruction, k: int) -> Any:
        S = self.series
        if k == 0:
            scalar = self.field.const(Fraction(1))
            parts = []
            for a in ins.args:
                if self.program.code[a].op == "const":
                    scalar = scalar * self.field.const(self.program.code[a].data)
                else:
                    parts.append(a)
            self._consts[r] = (scalar, parts)
            # partial products of the series factors: aux[r][i] = prod(parts[:i+2])
            self.aux[r] = [[] for _ in range(max(len(parts) - 1, 0))]
        scalar, parts = self._consts[r]
        if not parts:
            return scalar if k == 0 else self.field.const(Fraction(0))
        acc = S[parts[0]]
        for i, a in enumerate(parts[1:]):
            store = self.aux[r][i]
            store.append(_conv(acc, S[a], k, 0, k))
            acc = store
        return acc[k] * scalar

    def _powi(self, r: int, ins: Instruction, k: int) -> Any:
        a = self.series[ins.args[0]]
        if k == 0:
            self.aux[r] = [[] for _ in range(ins.data - 1)]
        acc = a
        for store in self.aux[r]:
            store.append(_conv(acc, a, k, 0, k))
            acc = store
        return acc[k]

    def _trig(self, r: int, ins: Instruction, k: int) -> Any:
        """sin/cos (sinh/cosh) with the companion series in aux."""
        a = self.series[ins.args[0]]
        s = self.series[r]
        op = ins.op
        partner = {"sin": "cos", "cos": "sin", "sinh": "cosh", "cosh": "sinh"}[op]
        if k == 0:
            self.aux[r] = [[_fn(self.field, partner, a[0])], [a[0] * 0]]
            return _fn(self.field, op, a[0])
        c, ja = self.aux[r]
        ja.append(a[k] * k)  # j a_j, shared by both recurrences
        # d(sin) = cos da, d(cos) = -sin da, d(sinh) = cosh da, d(cosh) = sinh da
        new_s = _conv(ja, c, k, 1, k) / k
        new_c = _conv(ja, s, k, 1, k) / k
        if op == "cos":
            new_s = -new_s
        elif op == "sin":
            new_c = -new_c
        c.append(new_c)
        return new_s

    def _arc(self, r: int, ins: Instruction, k: int) -> Any:
        """atan: c' (1 + a^2) = a'; asin/acos: c' sqrt(1 - a^2) = +-a'."""
        a = self.series[ins.args[0]]
        s = self.series[r]
        op = ins.op
        field = self.field
        if k == 0:
            if op == "atan":
                q = [1 + a[0] * a[0]]
                self.aux[r] = [q, [_fn(field, "inv", q[0])]]
            else:
                w = [1 - a[0] * a[0]]
                root = [_fn(field, "sqrt", w[0])]
                self.aux[r] = [root, [_fn(field, "inv", root[0])], w, [_fn(field, "inv", 2 * root[0])]]
            return _fn(field, op, a[0])
        q, inv = self.aux[r][0], self.aux[r][1]
        if op == "atan":
            q.append(_conv(a, a, k, 0, k))
        else:
            w, half = self.aux[r][2], self.aux[r][3]
            w.append(-_conv(a, a, k, 0, k))
            rest = w[k] - _conv(q, q, k, 1, k - 1) if k > 1 else w[k]
            q.append(rest * half[0])
        sign = -1 if op == "acos" else 1
        rest = a[k] * sign
        if k > 1:
            rest = rest - _wconv(s, q, k, 1, k - 1) / k
        return rest * inv[0]

    def _atan2(self, r: int, ins: Instruction, k: int) -> Any:
        y, x = self.series[ins.args[0]], self.series[ins.args[1]]
        s = self.series[r]
        field = self.field
        if k == 0:
            den = [x[0] * x[0] + y[0] * y[0]]
            self.aux[r] = [den, [_fn(field, "inv", den[0])]]
            return _atan2(field, y[0], x[0])
        den, inv = self.aux[r]
        den.append(_conv(x, x, k, 0, k) + _conv(y, y, k, 0, k))
        # num_(k-1) of x y' - y x'
        num = None
        for j in range(0, k):
            term = (x[j] * y[k - j] - y[j] * x[k - j]) * (k - j)
            num = term if num is None else num + term
        rest = num / k
        if k > 1:
            rest = rest - _wconv(s, den, k, 1, k - 1) / k
        return rest * inv[0]

    def _powx(self, r: int, ins: Instruction, k: int) -> Any:
        """a**b = exp(b log a) with the log and the product kept in aux."""
        a, b = self.series[ins.args[0]], self.series[ins.args[1]]
        s = self.series[r]
        field = self.field
        if k == 0:
            lg = [_fn(field, "log", a[0])]
            self.aux[r] = [lg, [b[0] * lg[0]], [_fn(field, "inv", a[0])]]
            return _fn(field, "exp", self.aux[r][1][0])
        lg, prod, inv = self.aux[r]
        rest = a[k] - _wconv(lg, a, k, 1, k - 1) / k if k > 1 else a[k]
        lg.append(rest * inv[0])
        prod.append(_conv(b, lg, k, 0, k))
        return _wconv(prod, s, k, 1, k) / k


def evaluate(program: Program, values: Sequence[Any], field: Any) -> list[Any]:
    """The outputs of ``program`` at ``values``: numbers of ``field``, or forms over a box
    (:class:`plantlint.kernel.taylor_forms.FormField`)."""
    with precision(_bits(field)):
        runner = _Runner(program, field)
        runner.step(0, [[v] for v in values])
    return [runner.series[o][0] for o in program.outputs]


# -- the towers of a plant --------------------------------------------------------------------
class Towers:
    """Compiled f, g, h of one plant for Taylor-mode towers at points.

    ``variables`` are the states followed by the ranged parameters (constants
    of the flow); ``f``, ``g`` (columns), ``h`` are sympy expressions over them,
    or graph nodes when ``graph`` is given.
    """

    def __init__(self, states: Sequence[Any], params: Sequence[Any], f: Sequence[Any],
                 g: Sequence[Sequence[Any]], h: Sequence[Any], graph: Graph | None = None):
        self.n = len(states)
        self.n_params = len(params)
        if graph is None:
            graph = Graph([str(v) for v in (*states, *params)])
            f = [graph.from_sympy(e) for e in f]
            g = [[graph.from_sympy(e) for e in col] for col in g]
            h = [graph.from_sympy(e) for e in h]
        self.graph = graph
        self.m = len(g)
        self.p = len(h)
        outputs = list(f) + [e for col in g for e in col] + list(h)
        self.program = graph.compile(outputs)
        self.f_nodes, self.g_nodes, self.h_nodes = list(f), [list(c) for c in g], list(h)
        self._fields: Program | None = None

    @property
    def fields(self) -> Program:
        """The program of f and the g columns alone: what the flow and the brackets need.
        An output that is undefined or not rational at a point (asin(h) at h = 27, sin(1/2))
        must not make f and g so there."""
        if self._fields is None:
            self._fields = self.graph.compile(list(self.f_nodes) + [e for col in self.g_nodes for e in col])
        return self._fields

    # -- one flow ------------------------------------------------------------------------
    def flow(self, point: Sequence[Any], order: int, field: Any, directions: Sequence[Sequence[Any]] | None = None,
             start: Sequence[Any] | None = None, outputs: bool = True, moves_params: bool = False
             ) -> list[list[Any]]:
        """Series (coefficients 0..order) of every program output along the flow of f
        from ``point`` (states then parameters), optionally moved by e * direction (in the
        states only, unless ``moves_params``); ``start`` gives the starting numbers (jets
        of any kind) directly. Without ``outputs`` only f and g are run (:attr:`fields`),
        and the series end after g."""
        program = self.program if outputs else self.fields
        with precision(_bits(field)):
            if start is None:
                start = [field.number(v) for v in point]
            else:
                start = list(start)
            if directions is not None:
                zero = field.const(Fraction(0))
                q = len(directions)
                moved = len(start) if moves_params else self.n
                if q == 1:
                    start = [Dual(v, field.number(directions[0][i]) if i < moved else zero)
                             for i, v in enumerate(start)]
                else:
                    start = [Jet(v, [field.number(directions[a][i]) if i < moved else zero for a in range(q)])
                             for i, v in enumerate(start)]
            coeff: list[list[Any]] = [[v] for v in start]
            runner = _Runner(program, field)
            n, zero = self.n, field.const(Fraction(0))
            for k in range(order + 1):
                runner.step(k, coeff)
                if k < order:
                    for i in range(n):
                        coeff[i].append(runner.series[program.outputs[i]][k] / (k + 1))
                    for i in range(n, len(coeff)):
                        coeff[i].append(zero)
            return [runner.series[o] for o in program.outputs]

    def _out(self, series: list[list[Any]], kind: str, i: int, j: int = 0) -> list[Any]:
        n, m = self.n, self.m
        if kind == "f":
            return series[i]
        if kind == "g":
            return series[n + j * n + i]
        return series[n + m * n + i]

    # -- questions -------------------------------------------------------------------------
    def values(self, point: Sequence[Any], field: Any, outputs: bool = True, start: Sequence[Any] | None = None
               ) -> tuple[list[Any], list[list[Any]], list[Any]]:
        """f(x0), g_j(x0) (columns), h(x0) (empty without ``outputs``); ``start`` gives the
        starting numbers directly (balls over a box: enclosures over the box)."""
        s = self.flow(point, 0, field, outputs=outputs, start=start)
        n, m = self.n, self.m
        return ([s[i][0] for i in range(n)], [[s[n + j * n + i][0] for i in range(n)] for j in range(m)],
                [s[n + m * n + i][0] for i in range(self.p)] if outputs else [])

    def first_order(self, point: Sequence[Any], field: Any, outputs: bool = True
                    ) -> tuple[list[Any], list[tuple[Any, ...]]]:
        """The value and the gradient (along the states) of every program output at
        ``point``: f_i, then g_j columns, then h_i (without ``outputs``: not h), in
        :meth:`_out` order (dual numbers, one direction per state). Df(x0), Dg_j(x0), Dh(x0)
        without symbolic Jacobians."""
        unit = [[1 if a == b else 0 for b in range(self.n)] for a in range(self.n)]
        s = self.flow(point, 0, field, unit, outputs=outputs)
        return [_head(out[0]) for out in s], [_tangent(out[0], self.n, field) for out in s]

    def lie_values(self, point: Sequence[Any], order: int, field: Any) -> list[list[Any]]:
        """[i][k] = L_f^k h_i(x0) for k <= order."""
        s = self.flow(point, order, field)
        return [[c * factorial(k) for k, c in enumerate(self._out(s, "h", i))] for i in range(self.p)]

    def directional(self, point: Sequence[Any], order: int, field: Any, directions: Sequence[Sequence[Any]],
                    start: Sequence[Any] | None = None) -> tuple[list[list[Any]], list[list[list[Any]]]]:
        """(L_f^k h_i(x0), [dL_f^k h_i(x0) . v_a for every direction a]) for k <= order."""
        s = self.flow(point, order, field, directions, start=start)
        values, tangents = [], []
        for i in range(self.p):
            ser = self._out(s, "h", i)
            values.append([_head(c) * factorial(k) for k, c in enumerate(ser)])
            tangents.append([[d * factorial(k) for d in _tangent(c, len(directions), field)]
                             for k, c in enumerate(ser)])
        return values, tangents

    def lglf(self, point: Sequence[Any], order: int, field: Any, start: Sequence[Any] | None = None
             ) -> list[list[list[Any]]]:
        """[i][k][j] = L_gj L_f^k h_i(x0) for k <= order. With ``start`` (balls over a box)
        each is an enclosure over the box: the directions g_j are balls over it too."""
        _, G, _ = self.values(point, field, outputs=False, start=start)
        _, tangents = self.directional(point, order, field, G, start=start)
        return tangents

    def gradients(self, point: Sequence[Any], order: int, field: Any
                  ) -> tuple[list[list[Any]], list[list[list[Any]]]]:
        """(L_f^k h_i(x0), dL_f^k h_i(x0) as n-vectors) for k <= order."""
        unit = [[1 if a == b else 0 for b in range(self.n)] for a in range(self.n)]
        return self.directional(point, order, field, unit)

    def decoupling_gradients(self, point: Sequence[Any], order: int, field: Any, params: bool = False
                             ) -> list[list[list[tuple[Any, list[Any]]]]]:
        """[j][i][k] = (L_gj L_f^k h_i(x0), its gradient) for k <= order, by nested
        dual numbers: the flow from x0 + e.a + d g_j(x0 + e.a) (d^2 = e_a e_b = 0)
        carries d(dL_f^k h . g_j)/dx_a in its d e_a parts. Second-order information
        without a symbolic tower (the zero-dynamics Jacobian needs it). With ``params``
        the gradient is also taken along the ranged parameters (after the states): they
        move with e like the states and stay constant along the flow."""
        n = self.n
        q = n + (self.n_params if params else 0)  # directions: the states, then the parameters if asked
        unit = [[1 if a == b else 0 for b in range(len(point))] for a in range(q)]
        at_jets = self.flow(point, 0, field, unit, outputs=False, moves_params=params)  # g_j(x0 + e.a) as jets
        zero = field.const(Fraction(0))
        out = []
        for j in range(self.m):
            start: list[Any] = []
            for i, v in enumerate(point):
                if i < q:
                    x = Jet(field.number(v), [field.number(unit[a][i]) for a in range(q)])
                    if i >= n:  # a parameter: no g component
                        start.append(Dual(x, Jet(zero, [zero] * q)))
                        continue
                    gj = at_jets[n + j * n + i][0]
                    if isinstance(gj, Dual):  # one direction: the flow used dual numbers, not jets
                        gj = Jet(gj.v, [gj.d])
                    elif not isinstance(gj, Jet):
                        gj = Jet(gj, [zero] * q)
                    start.append(Dual(x, gj))
                else:
                    start.append(field.number(v))
            s = self.flow(point, order, field, start=start)
            rows = []
            for i in range(self.p):
                ser = self._out(s, "h", i)
                entries = []
                for k, c in enumerate(ser):
                    d = c.d if isinstance(c, Dual) else None
                    if isinstance(d, Jet):
                        entries.append((d.v * factorial(k), [t * factorial(k) for t in d.d]))
                    else:
                        value = d * factorial(k) if d is not None else zero
                        entries.append((value, [zero] * q))
                rows.append(entries)
            out.append(rows)
        return out

    def brackets(self, point: Sequence[Any], order: int, field: Any) -> list[list[list[Any]]]:
        """[j][k] = ad_f^k g_j(x0) (n-vectors) for k <= order, from w(t) = M(t)^-1 g(x(t))."""
        n = self.n
        unit = [[1 if a == b else 0 for b in range(n)] for a in range(n)]
        s = self.flow(point, order, field, unit, outputs=False)
        zero, one = field.const(Fraction(0)), field.const(Fraction(1))
        # M_k[i][a] = tangent a of coefficient k of x_i = [t^k] f-series shifted: x_k = f_(k-1)/k
        M = [[[one if i == a else zero for a in range(n)] for i in range(n)]]
        for k in range(1, order + 1):
            M.append([[d / k for d in _tangent(s[i][k - 1], n, field)] for i in range(n)])
        # N = M^-1 as a series: N_0 = I, N_k = -sum_{j=1..k} M_j N_(k-j)
        N = [M[0]]
        for k in range(1, order + 1):
            Nk = [[zero] * n for _ in range(n)]
            for j in range(1, k + 1):
                Mj, Nr = M[j], N[k - j]
                for i in range(n):
                    row = Mj[i]
                    for c in range(n):
                        if row[c] != 0 if field.exact else True:
                            for b in range(n):
                                Nk[i][b] = Nk[i][b] - row[c] * Nr[c][b]
            N.append(Nk)
        # exact numbers: skip the zero entries of N (a sparse plant's are mostly zero)
        nonzero_n = [[[b for b in range(n) if not field.exact or Nk[i][b] != 0] for i in range(n)] for Nk in N]
        out = []
        for j in range(self.m):
            gser = [[_value(c) for c in self._out(s, "g", i, j)] for i in range(n)]
            cols = []
            for k in range(order + 1):
                w = []
                for i in range(n):
                    total = zero
                    for a in range(k + 1):
                        Na = N[a][i]
                        for b in nonzero_n[a][i]:
                            total = total + Na[b] * gser[b][k - a]
                    w.append(total * factorial(k))
                cols.append(w)
            out.append(cols)
        return out


def exact_or_balls(run: Any, precisions: Sequence[int] = (128, 512, 2048),
                   decisive: Any = None) -> tuple[Any, Any]:
    """Run ``run(field)`` exactly when possible, else with balls at growing precision
    until ``decisive(result)`` (default: always) holds. Returns (result, field)."""
    try:
        field: Any = QField()
        return run(field), field
    except Inexact:
        pass
    result = None
    for prec in precisions:
        field = ArbField(prec)
        result = run(field)
        if decisive is None or decisive(result):
            break
    return result, field


__all__ = ["ArbField", "Inexact", "Jet", "QField", "Towers", "Undefined", "domain_error", "evaluate",
           "exact_or_balls"]
