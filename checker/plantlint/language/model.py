"""From parsed statements to an immutable :class:`Model`, with the model-family rules.

The model resolves names (constants substituted exactly, parameters without a
range replaced by their nominal value, ranged parameters kept as symbols, ``let``
definitions substituted), checks declarations, and extracts f(x) and g(x) of an
input-affine plant exactly. Everything it finds is a :class:`Finding` with the
span of the offending name, call or statement.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from types import MappingProxyType
from typing import Any, Mapping

import sympy as sp

from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding, Span, Waiver
from plantlint.core.limits import MAX_EXPONENT, MAX_POWER_BITS
from plantlint.kernel.exact import sign
from plantlint.kernel.lie import random_samples, screen_then_confirm
from plantlint.kernel.plant import Plant
from plantlint.language.expressions import symbol
from plantlint.language.names import CLAIMS, QUANTITY_KINDS, Names
from plantlint.language.source import NON_SMOOTH_FUNCTIONS, ParseProblem, near_miss
from plantlint.language.syntax import Claim, Expression, Parsed, Statement


@dataclass(frozen=True)
class Quantity:
    """A declared name: constant, parameter, state, input, definition or output."""

    name: str
    kind: str
    span: Span  # the whole statement
    name_span: Span
    unit: str | None = None
    doc: str | None = None
    value: sp.Expr | None = None  # const/param: exact nominal value; let/output: expression
    low: sp.Expr | None = None
    high: sp.Expr | None = None


@dataclass(frozen=True)
class OperatingPoint:
    name: str
    span: Span
    name_span: Span
    values: Mapping[str, sp.Expr]  # exact values by state/input name
    value_spans: Mapping[str, Span]
    # values as written, ranged parameters kept symbolic (only those that use one)
    parametric: Mapping[str, sp.Expr] = field(default_factory=lambda: MappingProxyType({}))
    #: `tolerance T` written at the end of the point: relative residual within which it counts
    #: as a rounded equilibrium (None: the configured `point-tolerance` applies)
    tolerance: sp.Expr | None = None
    tolerance_span: Span | None = None


@dataclass(frozen=True)
class ClaimDecl:
    kind: str
    span: Span  # the whole `expect` statement
    output: str | None = None
    value: int | None = None
    point: str | None = None

    @property
    def anchor(self) -> str:
        return anchors.claim(self.kind, self.output, self.point)


@dataclass(frozen=True)
class Model:
    """One plant file, resolved. Read-only by construction."""

    path: str
    name: str | None
    title: str | None
    quantities: Mapping[str, Quantity]
    states: tuple[str, ...]
    inputs: tuple[str, ...]
    outputs: tuple[str, ...]
    rates: Mapping[str, sp.Expr]  # F(x, u) per state, fully resolved
    output_exprs: Mapping[str, sp.Expr]
    points: tuple[OperatingPoint, ...]
    claims: tuple[ClaimDecl, ...]
    waivers: tuple[Waiver, ...]
    spans: Mapping[str, Span]  # anchor -> span
    ranged_params: tuple[str, ...] = ()
    input_affine: bool = True
    smooth: bool = True
    #: False when a rate or an output divides by zero for every state: the file states no
    #: plant at all, so nothing is analysed (any result would be of another model)
    defined: bool = True
    #: singular parts as written that the values no longer show, per rate and output anchor
    hidden: Mapping[str, tuple[sp.Expr, ...]] = field(default_factory=lambda: MappingProxyType({}))
    #: outputs that use an input (feedthrough): the analysis reads them with the inputs at
    #: zero, so a claim about them is not decided (output-uses-input says why)
    feedthrough: tuple[str, ...] = ()
    #: the parsed statements, for the plant as written (:mod:`plantlint.language.written`)
    statements: tuple[Statement, ...] = field(default=(), compare=False, repr=False)

    def symbol(self, name: str) -> sp.Symbol:
        return symbol(name)

    def point(self, name: str) -> OperatingPoint | None:
        return next((p for p in self.points if p.name == name), None)

    def box(self, names: tuple[str, ...]) -> dict[sp.Symbol, tuple[sp.Expr, sp.Expr]]:
        out = {}
        for n in names:
            q = self.quantities[n]
            if q.low is not None and q.high is not None:
                out[symbol(n)] = (q.low, q.high)
        return out

    def plant(self) -> Plant | None:
        """The input-affine plant, or None when the model cannot give one."""
        if not self.input_affine or self.name is None and not self.states:
            return None
        xs = tuple(symbol(s) for s in self.states)
        us = tuple(symbol(u) for u in self.inputs)
        zero_inputs = {u: sp.Integer(0) for u in us}
        f = tuple(self.rates[s].xreplace(zero_inputs) for s in self.states)
        g = tuple(tuple(sp.diff(self.rates[s], u) for s in self.states) for u in us)
        params = tuple(symbol(p) for p in self.ranged_params)
        h = tuple(self.output_exprs[o] for o in self.outputs)
        return Plant(
            name=self.name or "plant",
            states=xs,
            inputs=us,
            f=f,
            g=g,
            outputs=self.outputs,
            h=h,
            params=params,
            param_nominal={symbol(p): self.quantities[p].value for p in self.ranged_params},  # type: ignore[misc]
            param_box=self.box(self.ranged_params),
            state_box=self.box(self.states),
            input_box=self.box(self.inputs),
            hidden=tuple((anchor, part) for anchor in [*(anchors.rate(s) for s in self.states),
                                                       *(anchors.output(o) for o in self.outputs)]
                         for part in self.hidden.get(anchor, ()) if not part.free_symbols & set(us)),
            written=self._written(),
            written_for=(f, g, h),
        )

    def _written(self) -> Any:
        """f, g and h as written (a graph read from the parse tree), when the reader takes
        the model and reads the same states, parameters, inputs and outputs; else None."""
        if not self.statements:
            return None
        from plantlint.language.written import Refused, read_plant

        try:
            written = read_plant(self.statements)
        except Refused:
            return None
        same = (written.states == self.states and written.params == self.ranged_params
                and written.inputs == self.inputs and written.outputs == self.outputs)
        return written if same else None


@dataclass
class _Scope:
    """Bookkeeping while the model is being built: the passes below add to it in turn."""

    findings: list[Finding] = field(default_factory=list)
    declared: dict[str, Statement] = field(default_factory=dict)
    used: set[str] = field(default_factory=set)
    constants: dict[sp.Symbol, sp.Expr] = field(default_factory=dict)  # const + unranged params
    lets: dict[sp.Symbol, sp.Expr] = field(default_factory=dict)
    quantities: dict[str, Quantity] = field(default_factory=dict)
    spans: dict[str, Span] = field(default_factory=dict)  # anchor -> span
    undefined: list[str] = field(default_factory=list)  # anchors of expressions defined for no state
    #: per rate, output or definition: its singular parts as written that its value no longer
    #: shows, with those of the definitions it uses (see Expression.hidden)
    hidden: dict[str, tuple[sp.Expr, ...]] = field(default_factory=dict)
    names: Names = field(init=False)

    def __post_init__(self) -> None:
        self.names = Names(self.add, self.declared)

    def add(self, rule: str, message: str, span: Span | None, anchor: str, hint: str | None = None,
            point: str | None = None) -> None:
        self.findings.append(finding(rule, message, span, point=point, hint=hint, anchor=anchor))

    def owns(self, st: Statement) -> bool:
        """Is ``st`` the declaration its name resolves to (not a duplicate)?"""
        return self.names.owns(st)

    def allowed(self, dynamic: set[str]) -> set[str]:
        """Names an expression of the dynamics may use: states, inputs, ranged parameters
        and the definitions made so far."""
        return dynamic | set(_let_names(self))


def build_model(parsed: Parsed, path: str) -> tuple[Model | None, list[Finding]]:
    """Resolve a parsed file. Returns (model or None, findings).

    The passes run in this order, and the findings come out in it: declarations,
    constants and parameters, states and inputs, ranges, definitions, rates, outputs,
    smoothness, input-affinity, points, claims and waivers, unused names.
    """
    scope = _Scope(findings=list(parsed.findings))
    try:
        return _build(scope, parsed, path)
    except _PowerTooLarge as too_large:
        if too_large.exponent:
            scope.findings.append(finding(
                "syntax", "an exponent is beyond the supported range once the names in it are replaced by their "
                f"values (p/q with |p|, |q| <= {MAX_EXPONENT:,})", too_large.span,
                anchor=anchors.problem("exponent range"),
                hint="check the constants in the exponent (a tiny one such as 1e-9 squared gives 1/10^18)"))
        else:
            scope.findings.append(finding(
                "syntax", "this power of a number is too large to compute exactly (once the names in it are "
                "replaced by their values)", too_large.span, anchor=anchors.problem("power size"),
                hint=f"a power of numbers is limited to {MAX_POWER_BITS:,} bits; check the exponent"))
        return None, scope.findings


def _build(scope: "_Scope", parsed: Parsed, path: str) -> tuple[Model | None, list[Finding]]:
    header = scope.names.header(parsed)
    if header is None:
        return None, scope.findings
    problems = _value_problems(parsed.statements)
    if problems:
        return None, [*scope.findings, *problems]
    statements = parsed.statements
    body = statements[1:]
    by_kind: dict[str, list[Statement]] = {}
    for st in body:
        by_kind.setdefault(st.kind, []).append(st)
    scope.spans[anchors.PLANT] = header.name_span or header.span  # the first anchor

    for st in body:
        if st.kind in QUANTITY_KINDS and st.name:
            scope.names.declare(st)
    ranged = _constants_and_parameters(scope, body)
    _states_and_inputs(scope, body)
    ranged = _ranges(scope, body, ranged)
    states = _owned_names(scope, by_kind.get("state", []))
    inputs = _owned_names(scope, by_kind.get("input", []))
    if not by_kind.get("state"):
        scope.names.no_states(header)
    _envelope_span(scope, by_kind.get("state", []))
    dynamic = set(states) | set(inputs) | set(ranged)
    _definitions(scope, by_kind.get("let", []), dynamic)
    rates, rate_stmts = _rates(scope, by_kind, dynamic)
    outputs, output_exprs, feedthrough = _outputs(scope, by_kind.get("output", []), dynamic, inputs)

    smooth = _check_smooth(scope, statements)
    input_affine = _check_affine(scope, rates, rate_stmts, states, inputs, ranged)
    points = _points(scope, by_kind.get("point", []), states)
    points = _with_tolerances(scope, points, by_kind.get("point", []))
    claims = _claims(scope, by_kind.get("expect", []), outputs, points)
    waivers = _waivers(scope, by_kind.get("waive", []), points)
    _unused(scope)

    model = Model(
        path=path,
        name=header.name,
        title=header.doc,
        quantities=MappingProxyType(scope.quantities),
        states=tuple(s for s in states if s in rates),
        inputs=inputs,
        outputs=tuple(outputs),
        rates=MappingProxyType(rates),
        output_exprs=MappingProxyType(output_exprs),
        points=tuple(points),
        claims=tuple(claims),
        waivers=tuple(waivers),
        spans=MappingProxyType(scope.spans),
        ranged_params=tuple(ranged),
        input_affine=input_affine,
        smooth=smooth,
        hidden=MappingProxyType(scope.hidden),
        feedthrough=tuple(feedthrough),
        statements=tuple(statements),
        defined=not any(w in scope.undefined for w in [*(anchors.rate(s) for s in rates),
                                                              *(anchors.output(o) for o in outputs)]),
    )
    return model, scope.findings


# -- the passes, in the order build_model runs them ---------------------------------

def _value_problems(statements: list[Statement]) -> list[Finding]:
    """Build every expression's value, in statement order, and return the problems only a
    value shows (a power of numbers too large to compute, reached through a function: the
    parser refuses those it can see without values). As when the parser finds a problem,
    the file is then not read as a model; each statement gives its first problem."""
    problems: list[Finding] = []
    for st in statements:
        try:
            for expr in _expressions(st):
                expr.value  # noqa: B018 - built here, where its problem can be reported
        except ParseProblem as problem:
            problems.extend(problem.findings)
    return problems


def _expressions(st: Statement) -> list[Expression]:
    """The expressions of a statement, in the order the parser reads them."""
    exprs = [st.low, st.high, st.expr, *(e for _, e in st.assignments), st.tolerance,
             st.claim.value if st.claim is not None else None]
    return [e for e in exprs if e is not None]


def _constants_and_parameters(scope: _Scope, body: list[Statement]) -> list[str]:
    """Values of constants and parameters (each may use only earlier ones). Returns the
    parameters written with a range; the others become constants."""
    ranged: list[str] = []
    for st in body:
        if st.kind not in ("const", "param") or not scope.owns(st):
            continue
        value = _constant_value(scope, st, st.expr)
        q = Quantity(st.name or "", st.kind, st.span, st.name_span or st.span, st.unit, st.doc, value)
        if st.kind == "param" and st.low is not None:
            ranged.append(q.name)
        elif value is not None:
            scope.constants[symbol(q.name)] = value
        scope.quantities[q.name] = q
        scope.spans[anchors.declaration(st.kind, q.name)] = q.name_span
    return ranged


def _states_and_inputs(scope: _Scope, body: list[Statement]) -> None:
    for st in body:
        if st.kind in ("state", "input") and scope.owns(st):
            name = st.name or ""
            scope.quantities[name] = Quantity(name, st.kind, st.span, st.name_span or st.span, st.unit, st.doc)
            scope.spans[anchors.declaration(st.kind, name)] = st.name_span or st.span


def _ranges(scope: _Scope, body: list[Statement], ranged: list[str]) -> list[str]:
    """Check and attach every `in LO .. HI` (after all constants are known). Returns the
    ranged parameters whose range holds; a parameter whose range does not is used at its
    nominal value, as a constant."""
    for st in body:
        if st.low is None or st.high is None or not scope.owns(st):
            continue
        q = scope.quantities[st.name or ""]
        bounds = _range_bounds(scope, st, q)
        if bounds is not None:
            scope.quantities[q.name] = replace(q, low=bounds[0], high=bounds[1])
            if st.range_span is not None:
                scope.spans[anchors.range_of(q.name)] = st.range_span
        elif st.range_span is not None:  # written but refused (bad-range): later findings say so
            scope.spans[anchors.range_of(q.name, "refused")] = st.range_span
    for name, q in scope.quantities.items():
        if q.kind == "param" and q.low is None and q.value is not None:
            scope.constants[symbol(name)] = q.value
    return [p for p in ranged if scope.quantities[p].low is not None]


def _range_bounds(scope: _Scope, st: Statement, q: Quantity) -> tuple[sp.Expr, sp.Expr] | None:
    """(LO, HI) of a declaration's range when both are constant and LO < HI; a nominal
    value outside its range is reported but the range is kept."""
    assert st.low is not None and st.high is not None
    lo = _range_value(scope, st, st.low)
    hi = _range_value(scope, st, st.high)
    if lo is None or hi is None:
        return None
    if not _less(lo, hi):
        scope.add("bad-range", f"range of '{q.name}' is empty: {_show(lo)} .. {_show(hi)} needs LO < HI",
                  st.range_span, anchors.range_of(q.name))
        return None
    if q.kind == "param" and q.value is not None and not (_less_eq(lo, q.value) and _less_eq(q.value, hi)):
        scope.add("bad-range", f"nominal value {_show(q.value)} of '{q.name}' lies outside its range {_show(lo)} .. {_show(hi)}",
                  st.range_span, anchors.about("nominal", q.name))
    return lo, hi


def _owned_names(scope: _Scope, stmts: list[Statement]) -> tuple[str, ...]:
    return tuple(st.name or "" for st in stmts if scope.owns(st))


def _envelope_span(scope: _Scope, state_stmts: list[Statement]) -> None:
    """Findings about the operating envelope (anchor "envelope") point at the state ranges in
    every model, with or without `expect regular`: the first state without a range when the
    envelope is not a box, else the range of the first state."""
    declared = [st for st in state_stmts if scope.owns(st)]
    unranged = [st for st in declared if st.range_span is None]
    if unranged:
        scope.spans[anchors.ENVELOPE] = unranged[0].name_span or unranged[0].span
    elif declared and declared[0].range_span is not None:
        scope.spans[anchors.ENVELOPE] = declared[0].range_span


def _definitions(scope: _Scope, lets: list[Statement], dynamic: set[str]) -> None:
    """`let` definitions: may use states, inputs, ranged parameters and earlier definitions."""
    for st in lets:
        if not scope.owns(st) or st.expr is None:
            continue
        name = st.name or ""
        value = _resolve(scope, st.expr, allowed=scope.allowed(dynamic), where=anchors.let(st.name))
        scope.lets[symbol(name)] = value
        scope.quantities[name] = Quantity(name, "let", st.span, st.name_span or st.span, value=value)
        scope.spans[anchors.let(st.name)] = st.name_span or st.span


def _rates(scope: _Scope, by_kind: dict[str, list[Statement]], dynamic: set[str]
           ) -> tuple[dict[str, sp.Expr], dict[str, Statement]]:
    """F(x, u) per state, resolved: one rate per declared state (rates for anything else
    and second rates are reported), then the states left without one."""
    rates: dict[str, sp.Expr] = {}
    rate_stmts: dict[str, Statement] = {}
    for st in by_kind.get("rate", []):
        name = st.name or ""
        target = scope.declared.get(name)
        if target is None or target.kind != "state":
            _orphan_rate(scope, st, target, dynamic)
        elif name in rate_stmts:
            scope.names.second_rate(st, rate_stmts[name])
        else:
            rate_stmts[name] = st
            rates[name] = _resolve(scope, st.expr, allowed=scope.allowed(dynamic), where=anchors.rate(name))
            scope.spans[anchors.rate(name)] = st.expr.span if st.expr else st.span
    for st in by_kind.get("state", []):
        name = st.name or ""
        if scope.owns(st) and name not in rate_stmts:
            scope.names.missing_rate(st)
    return rates, rate_stmts


def _orphan_rate(scope: _Scope, st: Statement, target: Statement | None, dynamic: set[str]) -> None:
    """A rate for a name that is not a state: reported, and its expression still checked."""
    scope.names.orphan_rate(st, target)
    _resolve(scope, st.expr, allowed=scope.allowed(dynamic), where=anchors.rate(st.name))


def _outputs(scope: _Scope, stmts: list[Statement], dynamic: set[str], inputs: tuple[str, ...]
             ) -> tuple[list[str], dict[str, sp.Expr], list[str]]:
    """y = h(x) per output, resolved, and the outputs that use an input: those are reported
    and taken with the inputs at zero."""
    output_exprs: dict[str, sp.Expr] = {}
    outputs = []
    feedthrough = []
    input_syms = {symbol(u) for u in inputs}
    for st in stmts:
        name = st.name or ""
        if not scope.owns(st) or st.expr is None:
            continue
        value = _resolve(scope, st.expr, allowed=scope.allowed(dynamic), where=anchors.output(name))
        scope.spans[anchors.output(name)] = st.expr.span
        used_inputs = sorted(str(s) for s in value.free_symbols & input_syms)
        if used_inputs:
            ref = next((r for r in st.expr.names if r.name in used_inputs), None)
            scope.add("output-uses-input",
                      f"output '{name}' depends on input {', '.join(repr(u) for u in used_inputs)}; outputs must be y = h(x)",
                      ref.span if ref else st.expr.span, anchors.output(name),
                      hint="feedthrough gives relative degree 0, which the analyses do not cover")
            value = value.xreplace({s: sp.Integer(0) for s in input_syms})
            feedthrough.append(name)
        output_exprs[name] = value
        outputs.append(name)
    return outputs, output_exprs, feedthrough


# -- helpers ----------------------------------------------------------------------

def _let_names(scope: _Scope) -> list[str]:
    return [str(s) for s in scope.lets]


def _mark_used(scope: _Scope, expr: Expression | None) -> None:
    if expr is not None:
        scope.used.update(r.name for r in expr.names)


def _constant_value(scope: _Scope, st: Statement, expr: Expression | None) -> sp.Expr | None:
    """Value of a const/param: only earlier constants and parameters may appear."""
    if expr is None:
        return None
    _mark_used(scope, expr)
    if not scope.names.constant_refs(st, expr):
        return None
    value = _substituted(expr.value, expr.span, scope.constants)
    if value.free_symbols:
        # an earlier ranged parameter: use its nominal value
        value = _substituted(value, expr.span, _nominals(scope))
    if value.free_symbols or value.has(sp.zoo, sp.nan, sp.oo):
        scope.add("bad-range" if value.free_symbols else "singular-model", f"value of '{st.name}' is not a finite number",
                  expr.span, anchors.declaration(st.kind, st.name, "value"))
        return None
    if (complex_part := _not_real(value)) is not None:
        scope.add("singular-model", f"value of '{st.name}' is not a real number ({_show(complex_part)})",
                  expr.span, anchors.declaration(st.kind, st.name, "value"), hint=_DOMAIN_HINT)
        return None
    return value


class _PowerTooLarge(Exception):
    """A power that only becomes a power of numbers, or gets a number as exponent, once
    names are replaced by their values, beyond the limits the parser applies to what is
    written in numbers: a result too large to compute exactly (``48^2^(R*v)`` with R = 12,
    v = 24: sympy would try, and never finish), or (``exponent``) an exponent p/q with |p|
    or |q| above MAX_EXPONENT in a power of a quantity (``x^(l^2)`` with l = 1e-9 is
    x^(1/10^18): its value at a point would be a 10^18-th root)."""

    def __init__(self, span: Span | None, exponent: bool = False):
        super().__init__("exponent out of range" if exponent else "power too large")
        self.span = span
        self.exponent = exponent


def _substituted(value: sp.Expr, span: Span | None, *mappings: Mapping[sp.Symbol, sp.Expr]) -> sp.Expr:
    """``value.xreplace(m1).xreplace(m2)...``, refusing first (:class:`_PowerTooLarge`) a
    power beyond the limits the parser applies to powers written in numbers."""
    for mapping in mappings:
        if mapping:
            problem = _power_problem(value, mapping)
            if problem is not None:
                raise _PowerTooLarge(span, exponent=problem == "exponent")
        value = value.xreplace(mapping)
    return value


def _power_problem(expr: sp.Expr, mapping: Mapping[sp.Symbol, sp.Expr]) -> str | None:
    """"exponent" for a power of a quantity (its base keeps a state, input or ranged
    parameter) whose exponent becomes a rational p/q with |p| or |q| above MAX_EXPONENT;
    "size" for a power of numbers above MAX_POWER_BITS bits (a power of numbers is limited
    by its size alone: 2^2^k with k = 10 is 2^1024, exact and small); else None."""
    keys = set(mapping)
    for node in sp.postorder_traversal(expr):  # inner powers first: an outer one is sized only once they pass
        if not node.is_Pow:
            continue
        base, exponent = node.args
        if exponent.free_symbols and exponent.free_symbols <= keys and not base.free_symbols <= keys:
            e = exponent.xreplace(mapping)
            if e.is_Rational and max(abs(int(e.p)), int(e.q)) > MAX_EXPONENT:
                return "exponent"
        names = base.free_symbols | exponent.free_symbols
        if not names or not names <= keys:
            continue
        b, e = base.xreplace(mapping), exponent.xreplace(mapping)
        if b.is_Rational and e.is_Rational and b != 0:
            bits = max(abs(int(b.p)), abs(int(b.q)), 1).bit_length()
            if bits > 1 and bits * abs(int(e.p)) > MAX_POWER_BITS * int(e.q):
                return "size"
    return None


def _nominals(scope: _Scope) -> dict[sp.Symbol, sp.Expr]:
    out = {}
    for name, st in scope.declared.items():
        if st.kind == "param" and st.expr is not None:
            v = _substituted(st.expr.value, st.expr.span, scope.constants)
            if not v.free_symbols:
                out[symbol(name)] = v
    return out


def _range_value(scope: _Scope, st: Statement, expr: Expression) -> sp.Expr | None:
    _mark_used(scope, expr)
    if not scope.names.range_refs(st, expr):
        return None
    value = _substituted(expr.value, expr.span, scope.constants, _nominals(scope))
    if value.free_symbols or not value.is_finite:
        scope.add("bad-range", f"range bound of '{st.name}' is not a finite number", expr.span, anchors.range_of(st.name, "bound"))
        return None
    if (complex_part := _not_real(value)) is not None:
        scope.add("bad-range", f"range bound of '{st.name}' is not a real number ({_show(complex_part)})", expr.span,
                  anchors.range_of(st.name, "bound"), hint=_DOMAIN_HINT)
        return None
    return value


def _resolve(scope: _Scope, expr: Expression | None, allowed: set[str], where: str) -> sp.Expr:
    """Substitute constants and definitions; report names that are not allowed here."""
    if expr is None:
        return sp.Integer(0)
    _mark_used(scope, expr)
    scope.names.dynamic_refs(expr, allowed, lambda name: symbol(name) in scope.constants, where)
    value = _substituted(expr.value, expr.span, scope.lets, scope.constants)
    hidden = [_substituted(p, expr.span, scope.lets, scope.constants) for p in expr.hidden]
    for ref in expr.names:
        hidden += scope.hidden.get(anchors.let(ref.name), ())
    if hidden:
        scope.hidden[where] = tuple(dict.fromkeys(hidden))
    known = {symbol(a) for a in allowed}
    stray = value.free_symbols - known
    if stray:
        # already reported as unknown names; the model will not be analysed
        return value.xreplace({s: sp.Integer(1) for s in stray})
    # a definition defined for no state makes everything that uses it so: reported once, where
    # it is written, and marked everywhere (the analysis needs every rate and output defined)
    inherited = any(anchors.let(ref.name) in scope.undefined for ref in expr.names)
    if expr.undefined_calls and not inherited and (value.has(sp.zoo, sp.nan) or _not_real(value) is not None):
        for span, call in sorted(expr.undefined_calls, key=lambda c: (c[0].line, c[0].column)):
            scope.add("singular-model", f"{_show(call)} in {where} has no real value, so {where} is undefined for "
                      "every state", span, anchors.about(where, "undefined", "call", span.line, span.column),
                      hint=_DOMAIN_HINT)
        scope.undefined.append(where)
        value = value.xreplace({sp.zoo: sp.Integer(0), sp.nan: sp.Integer(0)})
    elif value.has(sp.zoo, sp.nan):
        scope.add("singular-model", f"{where} divides by zero for every state", expr.span,
                  anchors.about(where, "division", "by", "zero"),
                  hint="a denominator is zero once the constants and parameters are put in: check their values")
        scope.undefined.append(where)
        value = value.xreplace({sp.zoo: sp.Integer(0), sp.nan: sp.Integer(0)})
    elif (complex_part := _not_real(value)) is not None and not inherited:
        scope.add("singular-model", f"{where} is undefined for every state: {_show(complex_part)} is not a real number",
                  expr.span, anchors.about(where, "not", "real"),
                  hint=_DOMAIN_HINT)
        scope.undefined.append(where)
    if inherited:
        scope.undefined.append(where)
    return value


#: What to check when a constant expression leaves the real numbers.
_DOMAIN_HINT = ("a function's argument is outside its domain once the constants and parameters are put in "
                "(asin and acos need -1 .. 1, sqrt, log and fractional powers a positive number): check their values")


def _distinct_nodes(e: sp.Basic) -> list[sp.Basic]:
    """Every distinct sub-expression of ``e`` once, children before parents. Definitions that
    use each other twice share sub-expressions, and a walk of the tree would take time
    exponential in their nesting; this walk is linear in the distinct nodes (and iterative,
    so a deep nesting cannot exhaust the stack)."""
    seen: set[sp.Basic] = set()
    order: list[sp.Basic] = []
    stack: list[tuple[sp.Basic, bool]] = [(e, False)]
    while stack:
        node, expanded = stack.pop()
        if expanded:
            order.append(node)
        elif node not in seen:
            seen.add(node)
            stack.append((node, True))
            stack.extend((a, False) for a in node.args if a not in seen)
    return order


def _not_real(e: sp.Expr) -> sp.Expr | None:
    """A constant part of ``e`` that is not a real number, or None: the largest constant
    part that holds I (sympy writes log(-2) as log(2) + I*pi and sqrt(-2) as sqrt(2)*I), or
    else the innermost function value or power that leaves the reals (acos(7), (-8)^(1/3);
    sums and products of reals are real, so only they are asked)."""
    order = _distinct_nodes(e)
    constant: dict[sp.Basic, bool] = {}
    holds_i: dict[sp.Basic, bool] = {}
    for node in order:
        constant[node] = not node.is_Symbol and all(constant[a] for a in node.args)
        holds_i[node] = node is sp.I or any(holds_i[a] for a in node.args)
    if holds_i[e]:
        # parents come after their children in the order: the last such node is the largest
        return next(n for n in reversed(order) if constant[n] and holds_i[n])
    for node in order:
        if (node.is_Function or node.is_Pow) and constant[node] and node.is_extended_real is False:
            return node
    return None


def _check_smooth(scope: _Scope, statements: list[Statement]) -> bool:
    smooth = True
    for st in statements:
        exprs = [st.expr] + [e for _, e in st.assignments]
        for expr in exprs:
            if expr is None:
                continue
            for call in expr.calls:
                if call.function in NON_SMOOTH_FUNCTIONS and st.kind in ("let", "rate", "output"):
                    smooth = False
                    scope.add("non-smooth", f"{call.function}() is not smooth; Lie derivatives and brackets need smooth vector fields",
                              call.span, anchors.declaration(st.kind, st.name, call.function),
                              hint="replace it by a smooth approximation (e.g. tanh for sign) or model the switching separately")
            for span, written, value in expr.kinks:
                if st.kind in ("let", "rate", "output"):
                    smooth = False
                    scope.add("non-smooth", f"{_show(written)} is {_show(value)} for real values, which is not smooth; "
                              "Lie derivatives and brackets need smooth vector fields", span,
                              anchors.declaration(st.kind, st.name, f"kink {span.line}:{span.column}"),
                              hint="sqrt(x^2) is abs(x): write the smooth expression the model means, or model "
                                   "the switching separately")
    return smooth


def _check_affine(scope: _Scope, rates: dict[str, sp.Expr], rate_stmts: dict[str, Statement],
                  states: tuple[str, ...], inputs: tuple[str, ...], ranged: list[str]) -> bool:
    """F(x, u) must be affine in u: every second derivative in u vanishes identically."""
    us = [symbol(u) for u in inputs]
    if not us:
        return True
    symbols = tuple(symbol(s) for s in states) + tuple(us) + tuple(symbol(p) for p in ranged)
    samples = None
    affine = True
    for name, F in rates.items():
        if not (F.free_symbols & set(us)):
            continue
        if _input_degree(F, frozenset(us)) <= 1:
            continue  # affine by its form: no second derivative to build
        bad: list[str] = []
        for i, ui in enumerate(us):
            dFi = sp.diff(F, ui)
            for uj in us[i:]:
                second = _away_from_kinks(sp.diff(dFi, uj))
                if second == 0:
                    continue
                if samples is None:
                    samples = random_samples(symbols, {}, seed=len(states) * 7919 + len(inputs))
                if not screen_then_confirm(second, symbols, samples).taken_zero:
                    bad.append(str(ui) if ui == uj else f"{ui}*{uj}")
        if bad:
            affine = False
            st = rate_stmts[name]
            scope.add("not-input-affine",
                      f"rate of '{name}' is not affine in the inputs (nonlinear in {', '.join(bad)})",
                      st.expr.span if st.expr else st.span, anchors.rate(name),
                      hint="the analyses need dx/dt = f(x) + g(x) u; add an integrator (dynamic extension) or a new input")
    return affine


def _away_from_kinks(second: sp.Expr) -> sp.Expr:
    """A second derivative in the inputs where the rate is differentiable: its DiracDelta
    terms (``sat(k*u, lo, hi)`` and ``abs(u)`` give them) dropped. Affinity is judged between
    the kinks; the kinks themselves are reported as non-smooth. (A rate that is affine between
    its kinks used to cost a half-second symbolic confirmation of its DiracDelta terms.)"""
    deltas = second.atoms(sp.DiracDelta)
    return second.xreplace({d: sp.Integer(0) for d in deltas}) if deltas else second


def _input_degree(e: sp.Expr, inputs: frozenset[sp.Symbol]) -> float:
    """An upper bound of the total degree of ``e`` in the inputs, read off its form: an
    input counts 1, a sum the largest of its terms, a product the sum of its factors, a
    power to a whole exponent k >= 0 k times its base; anything else that contains an
    input (a quotient by one, a function of one) is unbounded (inf). A bound <= 1
    proves the expression affine in the inputs. Each distinct sub-expression is read once."""
    degree: dict[sp.Basic, float] = {}
    for node in _distinct_nodes(e):
        if node in inputs:
            d: float = 1
        elif node.is_Atom:
            d = 0
        elif node.is_Add:
            d = max(degree[a] for a in node.args)
        elif node.is_Mul:
            d = sum(degree[a] for a in node.args)
        elif node.is_Pow and node.exp.is_Integer and node.exp >= 0:
            d = int(node.exp) * degree[node.base]
        else:
            d = float("inf") if any(degree[a] for a in node.args) else 0
        degree[node] = d
    return degree[e]


def _points(scope: _Scope, stmts: list[Statement], states: tuple[str, ...]) -> list[OperatingPoint]:
    """Operating points: each sets every state (inputs may be left out to be solved for)."""
    points: list[OperatingPoint] = []
    seen: dict[str, Statement] = {}
    for st in stmts:
        name = st.name or ""
        if name in seen:
            scope.names.second_point(st, seen[name])
            continue
        seen[name] = st
        values, value_spans, given = _point_assignments(scope, st)
        # a state given with a bad value is reported once, at the value, not again as missing
        missing = [s for s in states if s not in given]
        if missing:
            scope.add("point-incomplete", f"point '{name}' does not give state{'s' if len(missing) > 1 else ''} "
                      + ", ".join(repr(m) for m in missing), st.name_span, anchors.point(name), point=name,
                      hint="every state must be given; inputs may be left out to be solved for")
        scope.spans[anchors.point(name)] = st.name_span or st.span
        points.append(OperatingPoint(name, st.span, st.name_span or st.span, MappingProxyType(values),
                                     MappingProxyType(value_spans), _parametric_values(scope, st, values)))
    return points


def _point_assignments(scope: _Scope, st: Statement) -> tuple[dict[str, sp.Expr], dict[str, Span], set[str]]:
    """A point's values by state/input name, their spans, and the names it sets (also
    those whose value was reported as not constant)."""
    name = st.name or ""
    values: dict[str, sp.Expr] = {}
    value_spans: dict[str, Span] = {}
    given: set[str] = set()
    for target, expr in st.assignments:
        if not scope.names.point_target(name, target):
            continue
        if target.name in values:
            scope.names.set_twice(name, target)
            continue
        given.add(target.name)
        value = _point_value(scope, name, target.name, expr)
        if value is not None:
            values[target.name] = value
            value_spans[target.name] = expr.span
    return values, value_spans, given


def _parametric_values(scope: _Scope, st: Statement, values: dict[str, sp.Expr]) -> MappingProxyType:
    """The point's values with ranged parameters kept as symbols (a point written in
    terms of parameters follows them over the parameter box)."""
    out: dict[str, sp.Expr] = {}
    for target, expr in st.assignments:
        if target.name in values:
            kept = _substituted(expr.value, expr.span, scope.lets, scope.constants)
            if kept.free_symbols and not kept.has(sp.zoo, sp.nan):
                out[target.name] = kept
    return MappingProxyType(out)


def _with_tolerances(scope: _Scope, points: list[OperatingPoint], stmts: list[Statement]) -> list[OperatingPoint]:
    """Each point's `tolerance T`: a constant with 0 <= T < 1 (a relative residual)."""
    written = {st.name: st.tolerance for st in stmts if st.tolerance is not None}
    out = []
    for p in points:
        expr = written.get(p.name)
        if expr is None:
            out.append(p)
            continue
        value = _point_value(scope, p.name, "tolerance", expr)
        if value is not None and not (value.is_number and value.is_finite and sign(value) >= 0
                                      and sign(1 - value) > 0):
            scope.add("bad-range", f"tolerance of point '{p.name}' is {_show(value)}; it must be a number with "
                      "0 <= T < 1 (a residual relative to the size of the rates' terms)", expr.span,
                      anchors.point(p.name, "tolerance"), point=p.name)
            value = None
        out.append(replace(p, tolerance=value, tolerance_span=expr.span) if value is not None else p)
    return out


def _point_value(scope: _Scope, point: str, target: str, expr: Expression) -> sp.Expr | None:
    """A point value: a constant expression in numbers, constants, parameters and
    definitions (``let``) whose expansion uses only those."""
    _mark_used(scope, expr)

    def dynamic_of(let: str) -> list[str]:
        """The states and inputs the definition's value uses, by name."""
        value = scope.lets.get(symbol(let))
        if value is None:
            return []
        return sorted(str(s) for s in value.free_symbols
                      if (decl := scope.declared.get(str(s))) is not None and decl.kind in ("state", "input"))

    if not scope.names.point_value_refs(point, target, expr, dynamic_of):
        return None
    value = _substituted(expr.value, expr.span, scope.lets, scope.constants, _nominals(scope))
    if value.has(sp.zoo, sp.nan) or value.free_symbols:
        scope.add("singular-model", f"point '{point}' value of '{target}' is not a finite number", expr.span,
                  anchors.point(point, "value", target), point=point)
        return None
    if (complex_part := _not_real(value)) is not None:
        scope.add("singular-model", f"point '{point}' value of '{target}' is not a real number ({_show(complex_part)})",
                  expr.span, anchors.point(point, "value", target), point=point, hint=_DOMAIN_HINT)
        return None
    return value


def _claims(scope: _Scope, stmts: list[Statement], outputs: list[str],
            points: list[OperatingPoint]) -> list[ClaimDecl]:
    """The `expect` lines that name a known claim, output and point."""
    point_names = {p.name for p in points}
    claims: list[ClaimDecl] = []
    first: dict[str, ClaimDecl] = {}
    for st in stmts:
        decl = _claim(scope, st, outputs, point_names)
        if decl is None:
            continue
        earlier = first.get(decl.anchor)
        if earlier is not None:
            _repeated_claim(scope, decl, earlier)
            continue
        first[decl.anchor] = decl
        claims.append(decl)
        scope.spans[decl.anchor] = st.span
    return claims


def _repeated_claim(scope: _Scope, decl: ClaimDecl, earlier: ClaimDecl) -> None:
    """A second `expect` about the same thing: reported, and only the first is checked."""
    line = earlier.span.line
    if decl.value != earlier.value:
        message = (f"this claim contradicts line {line}, which expects relative degree {earlier.value}, "
                   f"not {decl.value}; only line {line} is checked")
    else:
        message = f"this claim repeats line {line}; it is checked once, there"
    scope.add("duplicate-claim", message, decl.span, anchors.about(decl.anchor, "again", "line", decl.span.line),
              hint="keep one `expect` line per claim, so that an edit cannot update one copy and miss the other")


def _claim(scope: _Scope, st: Statement, outputs: list[str], point_names: set[str]) -> ClaimDecl | None:
    claim = st.claim
    assert claim is not None
    if claim.kind not in CLAIMS:
        close = near_miss(claim.kind, CLAIMS)
        scope.add("unknown-reference", f"unknown claim '{claim.kind}'", claim.span, anchors.about("claim", claim.kind),
                  hint=f"did you mean `{close}`?" if close else "claims: " + ", ".join(CLAIMS))
        return None
    if not scope.names.claim_form(claim):
        return None
    ok, value = _claimed_degree(scope, claim, outputs) if claim.output is not None else (True, None)
    at = st.at_point
    if at is not None and at.name not in point_names:
        scope.add("unknown-reference", f"expect names point '{at.name}', which is not declared", at.span,
                  anchors.claim_reference("point", at.name), hint=_suggest(scope, at.name, point_names) or _choices("points", point_names))
        ok = False
    if not ok:
        return None
    return ClaimDecl(claim.kind, st.span, claim.output.name if claim.output else None, value, at.name if at else None)


def _claimed_degree(scope: _Scope, claim: Claim, outputs: list[str]) -> tuple[bool, int | None]:
    """(the output is known and the degree is a whole number >= 1, the degree) of
    `expect relative_degree(OUTPUT) = N`."""
    assert claim.output is not None
    ok = True
    if claim.output.name not in outputs:
        scope.add("unknown-reference", f"expect names '{claim.output.name}', which is not an output",
                  claim.output.span, anchors.claim_reference("output", claim.output.name),
                  hint=_suggest(scope, claim.output.name, outputs) or (("outputs: " + ", ".join(outputs)) if outputs
                                                                else "the model declares no output"))
        ok = False
    v = claim.value.value if claim.value else None
    if v is None or not (v.is_Integer and v > 0):
        scope.add("syntax", "a relative degree is a whole number >= 1", claim.value.span if claim.value else claim.span,
                  anchors.about("claim", "value", claim.output.name))
        return False, None
    return ok, int(v)


def _waivers(scope: _Scope, stmts: list[Statement], points: list[OperatingPoint]) -> list[Waiver]:
    """The `waive` lines that name a rule that may be waived, a known point and a reason."""
    from plantlint.core.catalogue import load_catalogue

    catalogue = load_catalogue()
    point_names = {p.name for p in points}
    waivers: list[Waiver] = []
    seen: dict[tuple[str, str | None], Span] = {}
    for st in stmts:
        rule = st.rule_id
        assert rule is not None
        at = st.at_point
        if rule.name not in catalogue:
            scope.add("unknown-reference", f"waiver names unknown rule '{rule.name}'", rule.span, anchors.waive_reference(rule.name),
                      hint=_suggest(scope, rule.name, catalogue.ids()) or "`plantlint rules` lists the rule ids")
        elif not catalogue.get(rule.name).waivable:
            why = ("they judge the waivers themselves" if rule.name in ("unused-waiver", "waiver-refused") else
                   "they mean the file was not read as a model, so nothing about it was checked")
            scope.add("waiver-refused", f"findings of '{rule.name}' cannot be waived: {why}", rule.span,
                      anchors.waive_reference(rule.name), hint="remove this waiver and fix what the rule reports")
        elif at is not None and at.name not in point_names:
            scope.add("unknown-reference", f"waiver names point '{at.name}', which is not declared", at.span,
                      anchors.about("waive", "point", at.name), hint=_suggest(scope, at.name, point_names) or _choices("points", point_names))
        elif not (st.doc or "").strip():
            scope.names.waiver_without_reason(st)
        elif (first := seen.get((rule.name, at.name if at else None))) is not None:
            where = f" at {at.name}" if at else ""
            scope.add("unused-waiver", f"the waiver of '{rule.name}'{where} repeats the one on line {first.line}: it "
                      "silences nothing that one does not", st.span,
                      anchors.about("waive", rule.name, "again", "line", st.span.line),
                      hint="keep one waiver per rule and point, with the reason that holds")
        else:
            waivers.append(Waiver(rule.name, at.name if at else None, (st.doc or "").strip(), st.span))
            seen[(rule.name, at.name if at else None)] = st.span
    return waivers


def _suggest(scope: _Scope, name: str, candidates: "list[str] | set[str] | tuple[str, ...]") -> str | None:
    close = scope.names.near(name, candidates)
    return f"did you mean `{close}`?" if close else None


#: How many names a hint lists ("points: a, b, ...") before it says how many there are in all.
LISTED_CHOICES = 12


def _choices(what: str, names: set[str]) -> str:
    if not names:
        return f"the model declares no {what}"
    shown = sorted(names)
    more = f", ... ({len(shown)} in all)" if len(shown) > LISTED_CHOICES else ""
    return f"{what}: " + ", ".join(shown[:LISTED_CHOICES]) + more


def _unused(scope: _Scope) -> None:
    """Constants, parameters, definitions and inputs that nothing uses (a warning)."""
    for name, st in scope.declared.items():
        if st.kind in ("const", "param", "let", "input") and name not in scope.used:
            what = {"const": "constant", "param": "parameter", "let": "definition", "input": "input"}[st.kind]
            message = f"{what} '{name}' is never used"
            if st.kind == "input":
                message = f"input '{name}' does not enter any rate: it cannot act on the plant"
            scope.add("unused-name", message, st.name_span, anchors.declaration(st.kind, name, "unused"))


def _less(a: sp.Expr, b: sp.Expr) -> bool:
    return sign(b - a) > 0


def _less_eq(a: sp.Expr, b: sp.Expr) -> bool:
    return sign(b - a) >= 0


def _show(e: sp.Expr) -> str:
    from plantlint.language.printer import show_expr

    return show_expr(e)
