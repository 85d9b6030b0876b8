"""A model's plant as an expression graph, read from the parse tree without sympy.

This is the first part of the route that is to check a model without importing sympy
(DEVELOPERS.md, "A check without sympy"). It reads the statements that
:func:`plantlint.language.syntax.parse_text` produced, after their names resolved, into a
hash-consed :class:`~plantlint.kernel.dag.Graph` over the states and the ranged parameters:
the drift f, the input columns g and the outputs h of dx/dt = f(x) + g(x) u, y = h(x),
exactly as written. Constants and parameters without a range are put in; sums, products and
powers of rational numbers are folded into exact :class:`~fractions.Fraction` constants;
nothing else is simplified.

As written means: ``x*u/x`` stays a quotient by x (sympy, evaluating, writes u), ``sin(pi/6)``
stays a sine (sympy writes 1/2). The values agree with the sympy model's wherever the written
form is defined (tests/language/test_written.py holds them equal on every model of the
repository); where it is not, the written form is the model the engineer wrote.

The split into f and g is structural: a rate is a sum of terms, each free of the inputs or a
product with exactly one factor that is affine in them. A rate affine in the inputs only after
algebra (``(x + u)^2 - u^2 - 2*x*u``) is refused, like anything else this reader does not
take (a function outside the smooth set, an output that reads an input, a model whose names
do not resolve): :class:`Refused` says why, and the caller takes the sympy route. The reader
never reports a finding; deciding what is wrong with a model stays with
:mod:`plantlint.language.model`.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any, Callable, Sequence

from lark import Token, Tree

from plantlint.core.limits import MAX_EXPONENT, MAX_POWER_BITS
from plantlint.kernel.dag import UNARY, Graph
from plantlint.language.source import SMOOTH_FUNCTIONS, number, operands_first
from plantlint.language.syntax import Expression, Statement


class Refused(ValueError):
    """The reader does not take this model; the message says why."""


@dataclass(frozen=True)
class WrittenPlant:
    """f, g and h as nodes of one graph whose variables are the states, then the ranged
    parameters (``graph.variables``)."""

    graph: Graph
    states: tuple[str, ...]
    params: tuple[str, ...]  # parameters with a range: variables of the graph
    inputs: tuple[str, ...]
    outputs: tuple[str, ...]
    f: tuple[int, ...]  # one node per state
    g: tuple[tuple[int, ...], ...]  # g[j][i]: input j's coefficient in the rate of state i
    h: tuple[int, ...]  # one node per output


def read_plant(statements: Sequence[Statement]) -> WrittenPlant:
    """The plant of a parsed model whose names resolve (:func:`plantlint.run.pipeline.read_names`)."""
    return _Reader(statements).plant()


class Values:
    """A reader of other expressions of a model (a point's values, a range's bounds, a
    claim's number), with the constants and definitions put in."""

    def __init__(self, reader: "_Reader"):
        self._reader = reader
        #: the graph their nodes are in (its variables: states, ranged parameters, inputs)
        self.graph = reader.graph

    def node(self, expr: Expression) -> int:
        """The expression as a node of :attr:`graph` (:class:`Refused` if it cannot be read)."""
        return self._reader._value(expr)

    def rational(self, expr: Expression) -> Fraction | None:
        """Its exact rational value, or None when it is not one (a state, pi, sin(1/3) in it)."""
        return _rational(self.graph, self.node(expr))


def read_with_values(statements: Sequence[Statement]) -> tuple[WrittenPlant, Values]:
    """:func:`read_plant`, and a reader of the model's other expressions (:class:`Values`)."""
    reader = _Reader(statements)
    return reader.plant(), Values(reader)


class _Reader:
    def __init__(self, statements: Sequence[Statement]):
        self.by_kind: dict[str, list[Statement]] = {}
        for st in statements:
            self.by_kind.setdefault(st.kind, []).append(st)
        self.states = tuple(st.name or "" for st in self.by_kind.get("state", []))
        ranged = [st for st in self.by_kind.get("param", []) if st.low is not None]
        self.params = tuple(st.name or "" for st in ranged)
        self.inputs = tuple(st.name or "" for st in self.by_kind.get("input", []))
        # the inputs are variables while the rates are read, and only then: the plant's graph
        # is built afterwards from the split parts, over the states and parameters alone
        self.graph = Graph([*self.states, *self.params, *self.inputs])
        self.names: dict[str, int] = {}
        for i, name in enumerate(self.graph.variables):
            self.names[name] = self.graph.var_ids[i]

    # -- the model, statement by statement ---------------------------------------------
    def plant(self) -> WrittenPlant:
        # a constant may use earlier constants and parameters, a ranged one at its nominal value
        constants: dict[str, int] = {}
        for st in sorted([*self.by_kind.get("const", []), *self.by_kind.get("param", [])],
                         key=lambda s: (s.span.line, s.span.column)):
            constants[st.name or ""] = self._constant(st, constants)
            if not (st.kind == "param" and st.low is not None):  # a ranged one is a variable
                self.names[st.name or ""] = constants[st.name or ""]
        for st in self.by_kind.get("let", []):
            self.names[st.name or ""] = self._value(st.expr)
        rates: dict[str, int] = {}
        for st in self.by_kind.get("rate", []):
            if st.name not in self.states or st.name in rates:
                raise Refused(f"a rate for '{st.name}' that is not the one rate of a state")
            rates[st.name or ""] = self._value(st.expr)
        if set(rates) != set(self.states):
            raise Refused("a state without a rate")
        outputs = self.by_kind.get("output", [])
        h_full = [self._value(st.expr) for st in outputs]
        inputs = frozenset(range(len(self.states) + len(self.params), len(self.graph.variables)))
        if any(self.graph.variables_of(node) & inputs for node in h_full):
            raise Refused("an output reads an input")
        split = _Split(self.graph, inputs)
        parts = [split.parts(rates[s]) for s in self.states]
        target = Graph([*self.states, *self.params])
        copy = _Copy(self.graph, target)
        f = tuple(copy.node(p.get(None, self.graph.const(0))) for p in parts)
        input_ids = sorted(inputs)
        g = tuple(tuple(copy.node(p.get(j, self.graph.const(0))) for p in parts) for j in input_ids)
        h = tuple(copy.node(node) for node in h_full)
        return WrittenPlant(target, self.states, self.params, self.inputs,
                            tuple(st.name or "" for st in outputs), f, g, h)

    def _constant(self, st: Statement, constants: dict[str, int]) -> int:
        node = self._value(st.expr, constants)
        if self.graph.variables_of(node):
            raise Refused(f"the value of '{st.name}' is not a constant")
        return node

    def _value(self, expr: Expression | None, names: dict[str, int] | None = None) -> int:
        if expr is None or expr.tree is None:
            raise Refused("an expression without a parse tree")
        return _ExpressionReader(self.graph, self.names if names is None else names).read(expr.tree)


class _ExpressionReader:
    """One expression's node, built from its parse tree operands first (no recursion)."""

    def __init__(self, graph: Graph, names: dict[str, int]):
        self.graph = graph
        self.names = names
        self.values: dict[int, int | list[int]] = {}  # id(parse node) -> graph node or open chain

    def read(self, root: Tree | Token) -> int:
        for node in operands_first(root):
            if isinstance(node, Token):
                self.values[id(node)] = self.graph.const(number(node))
            else:
                self.values[id(node)] = getattr(self, "_" + node.data)(node)
        return self._done(root)

    def _done(self, node: Tree | Token) -> int:
        value = self.values[id(node)]
        if isinstance(value, _Terms):
            return _sum(self.graph, value)
        if isinstance(value, _Factors):
            return _product(self.graph, value)
        return value  # type: ignore[return-value]

    # one method per kind of node of the grammar
    def _number(self, node: Tree) -> int:
        return self._done(node.children[0])

    def _name(self, node: Tree) -> int:
        name = str(node.children[0])
        if name in self.names:
            return self.names[name]
        if name == "pi":
            return self.graph.node("pi")
        raise Refused(f"'{name}' has no value here")

    def _call(self, node: Tree) -> int:
        fname, *arg_nodes = node.children
        args = [self._done(a) for a in arg_nodes if a is not None]
        name = str(fname)
        if name not in SMOOTH_FUNCTIONS or len(args) != SMOOTH_FUNCTIONS[name]:
            raise Refused(f"the function {name}")
        if name == "atan2":
            return self.graph.node("atan2", (args[0], args[1]))
        assert name in UNARY
        return self.graph.node(name, (args[0],))

    def _neg(self, node: Tree) -> int:
        return _product(self.graph, [self.graph.const(-1), self._done(node.children[0])])

    def _pos(self, node: Tree) -> int:
        return self._done(node.children[0])

    # a chain a + b - c (or a * b / c) is one sum (product): its left operand is one already
    def _add(self, node: Tree) -> "_Terms":
        return self._extend(node, _Terms, lambda right: right)

    def _sub(self, node: Tree) -> "_Terms":
        return self._extend(node, _Terms, lambda right: _product(self.graph, [self.graph.const(-1), right]))

    def _mul(self, node: Tree) -> "_Factors":
        return self._extend(node, _Factors, lambda right: right)

    def _div(self, node: Tree) -> "_Factors":
        return self._extend(node, _Factors, lambda right: _inverse(self.graph, right))

    def _extend(self, node: Tree, kind: type, part: Callable[[int], int]) -> list[int]:
        left, right = node.children
        value = self.values[id(left)]
        chain = value if isinstance(value, kind) else kind([self._done(left)])
        chain.append(part(self._done(right)))
        return chain

    def _pow(self, node: Tree) -> int:
        base, exponent = (self._done(c) for c in node.children)
        return _power(self.graph, base, exponent)


class _Terms(list):  # type: ignore[type-arg]
    """Terms of a sum still being collected (a chain a + b - c is one sum)."""


class _Factors(list):  # type: ignore[type-arg]
    """Factors of a product still being collected."""


# -- building with rational constants folded ----------------------------------------------
def _rational(graph: Graph, node: int) -> Fraction | None:
    op, _, data = graph.nodes[node]
    return data if op == "const" else None


def _sum(graph: Graph, terms: Sequence[int]) -> int:
    constant = sum((c for t in terms if (c := _rational(graph, t)) is not None), Fraction(0))
    rest = [t for t in terms if _rational(graph, t) is None]
    return graph.add([*rest, graph.const(constant)]) if rest else graph.const(constant)


def _product(graph: Graph, factors: Sequence[int]) -> int:
    constant = Fraction(1)
    rest = []
    for f in factors:
        c = _rational(graph, f)
        if c is None:
            rest.append(f)
        else:
            constant *= c
    if constant == 0 and not rest:
        return graph.const(0)
    if not rest:
        return graph.const(constant)
    # a zero factor is kept beside a non-constant one: 0*log(x) is undefined where log(x) is
    return graph.node("mul", tuple([*rest, graph.const(constant)])) if constant == 0 else graph.mul(
        [*rest, graph.const(constant)])


def _inverse(graph: Graph, node: int) -> int:
    c = _rational(graph, node)
    if c is not None and c != 0:
        return graph.const(1 / c)
    return graph.node("inv", (node,))


def _power(graph: Graph, base: int, exponent: int) -> int:
    q = _rational(graph, exponent)
    if q is None:
        return graph.node("powx", (base, exponent))
    if max(abs(q.numerator), q.denominator) > MAX_EXPONENT:
        raise Refused("an exponent beyond the supported range")
    b = _rational(graph, base)
    if b is not None and q.denominator == 1 and (b != 0 or q > 0):
        bits = max(abs(b.numerator), b.denominator, 1).bit_length()
        if bits > 1 and bits * abs(q.numerator) > MAX_POWER_BITS:
            raise Refused("a power of a number too large to compute exactly")
        return graph.const(b ** q.numerator)
    return graph.power(base, q)


# -- the split f + g u ----------------------------------------------------------------------
class _Split:
    """Each node as {None: the part free of the inputs, j: the coefficient of input j}."""

    def __init__(self, graph: Graph, inputs: frozenset[int]):
        self.graph = graph
        self.inputs = inputs
        self.memo: dict[int, dict[int | None, int]] = {}

    def parts(self, root: int) -> dict[int | None, int]:
        return _bottom_up(self.graph, root, self.memo, self._leaf, self._build)

    def _leaf(self, node: int) -> bool:
        """Settle a node without its arguments when it can be: free of the inputs, or an input."""
        op, _, data = self.graph.nodes[node]
        if not self.graph.variables_of(node) & self.inputs:
            self.memo[node] = {None: node}
        elif op == "var":
            self.memo[node] = {data: self.graph.const(1)}
        elif op not in ("add", "mul"):
            raise Refused("a rate is not affine in the inputs as written")
        else:
            return False
        return True

    def _build(self, node: int) -> dict[int | None, int]:
        op, args, _ = self.graph.nodes[node]
        return self._add(args) if op == "add" else self._mul(args)

    def _add(self, args: tuple[int, ...]) -> dict[int | None, int]:
        collected: dict[int | None, list[int]] = {}
        for a in args:
            for key, part in self.memo[a].items():
                collected.setdefault(key, []).append(part)
        return {key: _sum(self.graph, parts) for key, parts in collected.items()}

    def _mul(self, args: tuple[int, ...]) -> dict[int | None, int]:
        moving = [a for a in args if self.graph.variables_of(a) & self.inputs]
        if len(moving) != 1:
            raise Refused("a rate is not affine in the inputs as written")
        rest = [a for a in args if a != moving[0]]
        return {key: _product(self.graph, [*rest, part]) for key, part in self.memo[moving[0]].items()}


class _Copy:
    """Nodes of one graph rebuilt in another with the same leading variables."""

    def __init__(self, source: Graph, target: Graph):
        self.source, self.target = source, target
        self.memo: dict[int, int] = {}

    def node(self, root: int) -> int:
        return _bottom_up(self.source, root, self.memo, lambda node: False, self._build)

    def _build(self, node: int) -> int:
        op, args, data = self.source.nodes[node]
        if op == "var":
            if data >= len(self.target.variables):
                raise Refused("an input where none may be")
            return self.target.var_ids[data]
        return self.target.node(op, tuple(self.memo[a] for a in args), data)


def _bottom_up(graph: Graph, root: int, memo: dict, leaf: Callable[[int], bool], build: Callable[[int], object]) -> Any:
    """``memo[root]``, every node after its arguments and once, without recursion (deep
    graphs cannot exhaust the stack): ``leaf(node)`` may settle a node (filling ``memo``)
    without visiting its arguments; otherwise ``build(node)`` makes it from theirs."""
    stack = [root]
    while stack:
        node = stack[-1]
        if node in memo or leaf(node):
            stack.pop()
            continue
        pending = [a for a in graph.nodes[node][1] if a not in memo]
        if pending:
            stack.extend(pending)
            continue
        stack.pop()
        memo[node] = build(node)
    return memo[root]


__all__ = ["Refused", "Values", "WrittenPlant", "read_plant", "read_with_values"]
