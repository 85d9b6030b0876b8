"""Interval forward mode on the straight-line programs of :mod:`plantlint.kernel.dag`.

Every register of a program carries a ball enclosing its value over a box and, on
request, balls enclosing its partial derivatives with respect to the box variables
(dual numbers over arb balls: v + sum_k d_k e_k, e_j e_k = 0). Over the balls that
cover a box, the value part is the natural interval extension and the derivative
part encloses the gradient over the whole box, which is what the centred
(mean-value) form f(c) + grad f(X) . (X - c) needs (theory notes, "Tight interval
enclosures"). No symbolic derivative is ever formed.

* Values use the tight enclosures of :mod:`plantlint.kernel.balls`: period-aware
  sin/cos, monotone pieces of exp/log/atan/sqrt/tanh/sinh, tan between two poles,
  integer powers from their monotone pieces (the lower end of an even power is 0).
* Derivatives are built from the same enclosures: d sin u = cos(U) du with the
  tight cos over the ball U, d u^k = k U^(k-1) du with the tight power, and so on.
* Gradients are sparse: a register holds the derivatives only for the variables it
  depends on structurally (a chain's link factor touches two or three of them).
* Where a derivative is unbounded or the function is not differentiable on the
  ball (a square root whose argument reaches 0, a pole, atan2 across its branch
  cut) the derivative is a non-finite ball; callers then keep the natural
  enclosure. Nothing raises: undefined values are non-finite balls, as in
  :class:`plantlint.kernel.balls.Program`.

Balls are rounded outward by arb, so every enclosure is rigorous at any precision.
"""

from __future__ import annotations

from typing import Any, Callable, Iterable, Sequence

from flint import arb

from plantlint.kernel.balls import UnsupportedExpression, fold, product, run_steps, unary
from plantlint.kernel.enclosures import int_power
from plantlint.kernel.dag import Program, UnsupportedNode, graph_of

#: A value with its sparse gradient: (ball, derivatives in the order of the register's variables).
Dual = tuple[arb, tuple[arb, ...]]


def _nan() -> arb:
    return arb("nan")


# -- values (one rule per operation, shared by both modes) ------------------------------------
def _inv(a: arb) -> arb:
    return _nan() if a.contains(0) else 1 / a


def _sqrt(a: arb) -> arb:
    return a.sqrt() if a >= 0 else _nan()


def _powq(a: arb, p: int, q: int) -> arb:
    return (a.log() * arb(p) / q).exp() if a > 0 else _nan()


def _powx(b: arb, x: arb) -> arb:
    return (b.log() * x).exp() if b > 0 else _nan()


def _atan2(y: arb, x: arb) -> arb:
    return arb.atan2(y, x) if not (y.contains(0) and x.contains(0)) else _nan()


def _value_step(op: str, args: tuple[int, ...], data: Any) -> Callable[[list[arb], Sequence[arb]], arb]:
    if op == "var":
        return lambda regs, values: values[data]
    if op == "const":
        p, q = data.numerator, data.denominator
        return lambda regs, values: arb(p) / q if q != 1 else arb(p)
    if op == "pi":
        return lambda regs, values: arb.pi()
    if op in ("add", "mul"):
        return fold(op, args)
    (a0,) = args[:1]
    if op == "inv":
        return lambda regs, values: _inv(regs[a0])
    if op == "powi":
        return lambda regs, values: int_power(regs[a0], data)
    if op == "sqrt":
        return lambda regs, values: _sqrt(regs[a0])
    if op == "powq":
        p, q = data.numerator, data.denominator
        return lambda regs, values: _powq(regs[a0], p, q)
    if op == "powx":
        a1 = args[1]
        return lambda regs, values: _powx(regs[a0], regs[a1])
    if op == "atan2":
        a1 = args[1]
        return lambda regs, values: _atan2(regs[a0], regs[a1])
    return lambda regs, values: unary(op, regs[a0])


# -- derivatives of the one-argument operations ---------------------------------------------
def _derivative(op: str, data: Any, a: arb, value: arb) -> arb:
    """d op(a) / da over the ball ``a`` (``value`` encloses op(a) there); non-finite where
    the operation is not differentiable on the whole ball."""
    if op == "inv":
        return -int_power(value, 2)
    if op == "powi":
        return data * int_power(a, data - 1)
    if op == "sqrt":
        return 1 / (2 * value) if value > 0 else _nan()
    if op == "powq":
        p, q = data.numerator, data.denominator
        return arb(p) / q * _powq(a, p - q, q)
    if op == "exp":
        return value
    if op == "log":
        return 1 / a if a > 0 else _nan()
    if op == "sin":
        return unary("cos", a)
    if op == "cos":
        return -unary("sin", a)
    if op == "tan":
        return 1 + int_power(value, 2)
    if op == "atan":
        return 1 / (1 + int_power(a, 2))
    if op in ("asin", "acos"):
        s = 1 - int_power(a, 2)
        d = 1 / s.sqrt() if s > 0 else _nan()
        return d if op == "asin" else -d
    if op == "sinh":
        return unary("cosh", a)
    if op == "cosh":
        return unary("sinh", a)
    if op == "tanh":
        return 1 - int_power(value, 2)
    raise UnsupportedExpression(f"no derivative rule for {op}")  # pragma: no cover - every UNARY has one


class ForwardProgram:
    """One straight-line program over a list of expressions, run on balls.

    ``values(balls)`` gives the enclosures of the outputs; ``with_gradients(balls)``
    gives them together with enclosures of their gradients (dense, one ball per
    variable, in the order of ``symbols``).
    """

    def __init__(self, exprs: Sequence[Any], symbols: Sequence[Any]):
        self.symbols = tuple(symbols)
        try:
            graph, nodes = graph_of(exprs, self.symbols)
        except UnsupportedNode as e:
            raise UnsupportedExpression(str(e)) from None
        self.program: Program = graph.compile(nodes)
        code = self.program.code
        self._values = [_value_step(ins.op, ins.args, ins.data) for ins in code]
        deps: list[tuple[int, ...]] = []
        for ins in code:
            if ins.op == "var":
                deps.append((ins.data,))
            else:
                deps.append(tuple(sorted(set().union(*(deps[a] for a in ins.args)))) if ins.args else ())
        self._deps = deps
        self._duals = [self._dual_step(r, ins.op, ins.args, ins.data) for r, ins in enumerate(code)]

    def __len__(self) -> int:
        return len(self.program)

    # -- value mode ------------------------------------------------------------------------
    def values(self, balls: Sequence[arb], prec: int) -> list[arb]:
        regs = run_steps(self._values, balls, prec)
        return [regs[o] for o in self.program.outputs]

    # -- forward mode ----------------------------------------------------------------------
    def _spread(self, r: int, a: int) -> tuple[int, ...]:
        """Where the derivatives of register ``a`` go in register ``r``'s layout."""
        where = {v: k for k, v in enumerate(self._deps[r])}
        return tuple(where[v] for v in self._deps[a])

    def _dual_step(self, r: int, op: str, args: tuple[int, ...], data: Any) -> Callable[[list[Dual], Sequence[arb]], Dual]:
        value = self._values[r]
        width = len(self._deps[r])
        spreads = [self._spread(r, a) for a in args]

        if op == "var":
            one = (arb(1),)
            return lambda regs, balls: (balls[data], one)
        if not args:  # const, pi: read no register, have no derivatives
            return lambda regs, balls: (value([], balls), ())
        if op == "add":
            def add(regs: list[Dual], balls: Sequence[arb]) -> Dual:
                v0, d0 = regs[args[0]]
                acc_v = v0
                acc = [arb(0)] * width
                for p, d in zip(spreads[0], d0):
                    acc[p] = d
                for a, spread in zip(args[1:], spreads[1:]):
                    va, da = regs[a]
                    acc_v = acc_v + va
                    for p, d in zip(spread, da):
                        acc[p] = acc[p] + d
                return acc_v, tuple(acc)
            return add
        if op == "mul":
            n = len(args)

            def mul(regs: list[Dual], balls: Sequence[arb]) -> Dual:
                vs = [regs[a][0] for a in args]
                prefix = [vs[0]]
                for v in vs[1:]:
                    prefix.append(product(prefix[-1], v))
                suffix = [arb(1)] * n  # suffix[i] = product of vs[i+1:]
                for i in range(n - 2, -1, -1):
                    suffix[i] = suffix[i + 1] * vs[i + 1]
                return prefix[-1], _chain(width, (
                    (suffix[i] if i == 0 else prefix[i - 1] * suffix[i], spread, regs[a][1])
                    for i, (a, spread) in enumerate(zip(args, spreads)) if regs[a][1]))
            return mul
        if op == "powx":
            (sa, sx), (b_, x_) = spreads, args

            def powx(regs: list[Dual], balls: Sequence[arb]) -> Dual:
                (vb, db), (vx, dx) = regs[b_], regs[x_]
                out = _powx(vb, vx)
                cb = out * vx / vb if vb > 0 else _nan()
                cx = out * vb.log() if vb > 0 else _nan()
                return out, _chain(width, ((cb, sa, db), (cx, sx, dx)))
            return powx
        if op == "atan2":
            (sy, sx), (y_, x_) = spreads, args

            def atan2(regs: list[Dual], balls: Sequence[arb]) -> Dual:
                (vy, dy), (vx, dx) = regs[y_], regs[x_]
                out = _atan2(vy, vx)
                if vy.contains(0) and not vx > 0:
                    # the ball meets the branch cut (y = 0, x < 0): atan2 jumps there
                    cy = cx = _nan()
                else:
                    r2 = int_power(vx, 2) + int_power(vy, 2)
                    cy, cx = vx / r2, -vy / r2
                return out, _chain(width, ((cy, sy, dy), (cx, sx, dx)))
            return atan2
        (a0,) = args
        (spread,) = spreads
        # one argument: the value rule on the argument's ball, then the chain rule
        def unary_step(regs: list[Dual], balls: Sequence[arb]) -> Dual:
            va, da = regs[a0]
            out = _apply_one(op, data, va)
            return out, _chain(width, ((_derivative(op, data, va, out), spread, da),))
        return unary_step

    def with_gradients(self, balls: Sequence[arb], prec: int) -> list[tuple[arb, list[arb]]]:
        """(enclosure, gradient enclosure) of every output over the balls ``balls``."""
        regs: list[Dual] = run_steps(self._duals, balls, prec)
        d = len(self.symbols)
        out = []
        for o in self.program.outputs:
            v, grad = regs[o]
            dense = [arb(0)] * d
            for k, g in zip(self._deps[o], grad):
                dense[k] = g
            out.append((v, dense))
        return out


def _chain(width: int, parts: Iterable[tuple[arb, tuple[int, ...], Sequence[arb]]]) -> tuple[arb, ...]:
    """A register's derivatives by the chain rule: the sum over its arguments of the partial
    derivative times the argument's derivatives, each moved to this register's layout by
    its spread."""
    acc = [arb(0)] * width
    for c, spread, derivatives in parts:
        for p, d in zip(spread, derivatives):
            acc[p] = acc[p] + c * d
    return tuple(acc)


def _apply_one(op: str, data: Any, a: arb) -> arb:
    if op == "inv":
        return _inv(a)
    if op == "powi":
        return int_power(a, data)
    if op == "sqrt":
        return _sqrt(a)
    if op == "powq":
        return _powq(a, data.numerator, data.denominator)
    return unary(op, a)


__all__ = ["ForwardProgram"]
