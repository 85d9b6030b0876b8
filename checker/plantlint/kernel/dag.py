"""Expression DAG and straight-line programs.

Every sub-expression of a model becomes one node of a hash-consed graph: equal
sub-expressions are the same node (common sub-expressions are shared for free),
constants are exact rationals (:class:`fractions.Fraction`), and nothing is ever
simplified. A :class:`Graph` is compiled once into a :class:`Program` — a flat
list of instructions in dependency order over registers — which the Taylor-mode
evaluator (:mod:`plantlint.kernel.taylor`) runs on numbers of any kind (arb balls,
exact fmpq rationals, dual numbers over either).

The graph is built from sympy expressions that the language layer made from the
parse tree (never from text). Operations:

``const`` (Fraction), ``pi``, ``var`` (index), ``add``, ``mul`` (n-ary),
``inv`` (1/a), ``powi`` (a**k, k >= 2), ``powq`` (a**(p/q), not an integer),
``sqrt``, ``exp``, ``log``, ``sin``, ``cos``, ``tan``, ``atan``, ``asin``,
``acos``, ``sinh``, ``cosh``, ``tanh``, ``atan2``, ``powx`` (a**b = exp(b log a)).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any, Sequence

UNARY = ("sqrt", "exp", "log", "sin", "cos", "tan", "atan", "asin", "acos", "sinh", "cosh", "tanh")


class UnsupportedNode(ValueError):
    """An expression the graph cannot represent (the caller falls back to the symbolic route)."""


@dataclass(frozen=True)
class Instruction:
    op: str
    args: tuple[int, ...]  # registers of the arguments
    data: Any = None  # Fraction for const/powq, int for var/powi


class Graph:
    """A hash-consed expression graph; node ids are indices into ``self.nodes``."""

    def __init__(self, variables: Sequence[str]):
        self.variables = tuple(variables)
        self.nodes: list[tuple[str, tuple[int, ...], Any]] = []
        self._table: dict[tuple[str, tuple[int, ...], Any], int] = {}
        self._from_sympy: dict[Any, int] = {}
        self.var_ids = [self.node("var", (), i) for i in range(len(self.variables))]

    # -- construction ------------------------------------------------------------------
    def node(self, op: str, args: tuple[int, ...] = (), data: Any = None) -> int:
        if op in ("add", "mul"):
            args = tuple(sorted(args))  # commutative: one node for every order
        key = (op, args, data)
        found = self._table.get(key)
        if found is not None:
            return found
        self.nodes.append(key)
        self._table[key] = len(self.nodes) - 1
        return len(self.nodes) - 1

    def const(self, value: Fraction | int) -> int:
        return self.node("const", (), Fraction(value))

    def is_const(self, node: int) -> bool:
        return self.nodes[node][0] == "const"

    def add(self, terms: Sequence[int]) -> int:
        terms = [t for t in terms if not (self.is_const(t) and self.nodes[t][2] == 0)]
        if not terms:
            return self.const(0)
        return terms[0] if len(terms) == 1 else self.node("add", tuple(terms))

    def mul(self, factors: Sequence[int]) -> int:
        if any(self.is_const(f) and self.nodes[f][2] == 0 for f in factors):
            return self.const(0)
        factors = [f for f in factors if not (self.is_const(f) and self.nodes[f][2] == 1)]
        if not factors:
            return self.const(1)
        return factors[0] if len(factors) == 1 else self.node("mul", tuple(factors))

    def power(self, base: int, q: Fraction) -> int:
        """base**q for a rational q: 1, base, an integer power, a square root's power, or
        ``powq``; a negative exponent as the inverse of the positive power."""
        if q == 0:
            return self.const(1)
        k = q.numerator
        if q.denominator == 1:
            pos = base if abs(k) == 1 else self.node("powi", (base,), abs(k))
        elif q.denominator == 2:
            root = self.node("sqrt", (base,))
            pos = root if abs(k) == 1 else self.node("powi", (root,), abs(k))
        else:
            return self.node("powq", (base,), q)
        return pos if k > 0 else self.node("inv", (pos,))

    def from_sympy(self, expr: Any) -> int:
        """The node of a sympy expression over ``self.variables`` (symbols by name)."""
        cached = self._from_sympy.get(expr)
        if cached is not None:
            return cached
        out = self._build(expr)
        self._from_sympy[expr] = out
        return out

    def _build(self, e: Any) -> int:
        import sympy as sp

        if isinstance(e, (int, Fraction)) and not isinstance(e, bool):
            return self.const(Fraction(e))
        if not isinstance(e, sp.Basic):
            raise UnsupportedNode(f"not an expression: {type(e).__name__}")
        if e.is_Symbol:
            try:
                return self.var_ids[self.variables.index(e.name)]
            except ValueError:
                raise UnsupportedNode(f"free symbol {e} has no value") from None
        if e.is_Rational:
            return self.const(Fraction(int(e.p), int(e.q)))
        if e.is_Float:
            r = sp.Rational(e)
            return self.const(Fraction(int(r.p), int(r.q)))
        if e is sp.pi:
            return self.node("pi")
        if e is sp.E:
            return self.node("exp", (self.const(1),))
        if e.is_Add:
            return self.add([self.from_sympy(a) for a in e.args])
        if e.is_Mul:
            return self.mul([self.from_sympy(a) for a in e.args])
        if e.is_Pow:
            b, x = e.args
            base = self.from_sympy(b)
            if x.is_Rational:
                return self.power(base, Fraction(int(x.p), int(x.q)))
            return self.node("powx", (base, self.from_sympy(x)))
        name = type(e).__name__
        if name in UNARY:
            return self.node(name, (self.from_sympy(e.args[0]),))
        if name == "atan2":
            return self.node("atan2", (self.from_sympy(e.args[0]), self.from_sympy(e.args[1])))
        raise UnsupportedNode(f"cannot represent {name}")

    # -- structure -----------------------------------------------------------------------
    def variables_of(self, node: int) -> frozenset[int]:
        """Indices of the variables a node depends on (structurally)."""
        memo: dict[int, frozenset[int]] = getattr(self, "_vars_memo", {})
        self._vars_memo = memo
        stack = [node]
        while stack:
            top = stack[-1]
            if top in memo:
                stack.pop()
                continue
            op, args, data = self.nodes[top]
            pending = [a for a in args if a not in memo]
            if pending:
                stack.extend(pending)
                continue
            stack.pop()
            if op == "var":
                memo[top] = frozenset((data,))
            else:
                memo[top] = frozenset().union(*(memo[a] for a in args)) if args else frozenset()
        return memo[node]

    def compile(self, outputs: Sequence[int]) -> "Program":
        """A straight-line program computing ``outputs`` (only the nodes they need)."""
        needed: set[int] = set()
        stack = list(outputs)
        while stack:
            k = stack.pop()
            if k in needed:
                continue
            needed.add(k)
            stack.extend(self.nodes[k][1])
        order = sorted(needed)  # node ids are created after their arguments
        register = {node: r for r, node in enumerate(order)}
        code = [Instruction(self.nodes[k][0], tuple(register[a] for a in self.nodes[k][1]), self.nodes[k][2])
                for k in order]
        return Program(tuple(code), tuple(register[o] for o in outputs), len(self.variables))


@dataclass(frozen=True)
class Program:
    """Straight-line code: ``code[r]`` computes register r from earlier registers."""

    code: tuple[Instruction, ...]
    outputs: tuple[int, ...]
    n_vars: int

    def __len__(self) -> int:
        return len(self.code)

    def run(self, values: Sequence[Any], field: Any) -> list[Any]:
        """Evaluate at a point: ``values`` per variable, numbers of ``field``'s kind."""
        regs: list[Any] = []
        for ins in self.code:
            regs.append(field.apply(ins, regs, values))
        return [regs[o] for o in self.outputs]


def graph_of(exprs: Sequence[Any], variables: Sequence[Any]) -> tuple[Graph, list[int]]:
    """A graph over ``variables`` (sympy symbols) and the nodes of ``exprs``."""
    g = Graph([str(v) for v in variables])
    return g, [g.from_sympy(e) for e in exprs]


__all__ = ["Graph", "Instruction", "Program", "UnsupportedNode", "graph_of", "UNARY"]
