"""Name resolution of a parsed model, before any value is built (no sympy here).

A compiler resolves names before it computes anything, and stops at a name that does
not resolve: every later finding would be about a model the file does not state. This
module holds the name checks of the model build (:mod:`plantlint.language.model` calls
them in its passes, so their wording lives here once), and :func:`name_problems`, which
runs them alone, in the order of those passes, on what the parser read: names, calls and
statements, no values. When it finds a problem, the file is answered with it and nothing
else, without importing sympy (a typo in a name is what a pre-commit hook meets most).

The pass reports only what needs no value. A check that depends on one (a constant whose
value is not a number, a definition whose value turns out not to use a state, a point
that sets a state twice after a refused value) is left to the model build, which reports
exactly what it reported before this pass existed: what this pass reports is a part of
what the build would report, in the same order (held in tests/language/test_names.py).
"""

from __future__ import annotations

from typing import Callable, Protocol

from plantlint.core import anchors
from plantlint.core.catalogue import STOPPING_RULES as STOPPING
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding, Span
from plantlint.language.source import NameRef, near_miss
from plantlint.language.syntax import Claim, Expression, Parsed, Statement

CLAIMS = ("relative_degree", "regular", "minimum_phase", "state_linearizable")
QUANTITY_KINDS = ("const", "param", "state", "input", "let", "output")
#: How many candidate names the "did you mean" hints of one file may compare in all. difflib
#: compares two similar names in about 10 microseconds, so a hostile file with thousands of
#: misspelt names among thousands of declared ones would otherwise spend minutes on hints
#: (2,000 of each: over 20 s; with the bound, about 0.2 s). Past it, problems are reported
#: without a hint; a real model's few misspellings among its few dozen names stay far below.
HINT_COMPARISONS = 20_000


class Add(Protocol):
    def __call__(self, rule: str, message: str, span: Span | None, anchor: str, hint: str | None = None,
                 point: str | None = None) -> None: ...


class Names:
    """The declared names of one model and the checks that read only names."""

    def __init__(self, add: Add, declared: dict[str, Statement] | None = None):
        self.add = add
        self.declared: dict[str, Statement] = {} if declared is None else declared
        self.compared = 0  # candidate names compared for hints so far (HINT_COMPARISONS)

    def owns(self, st: Statement) -> bool:
        """Is ``st`` the declaration its name resolves to (not a duplicate)?"""
        return self.declared.get(st.name or "") is st

    # declarations -------------------------------------------------------------
    def header(self, parsed: Parsed) -> Statement | None:
        """The `plant NAME` header, or None when the file cannot be read as a model (a syntax
        problem, no statement, no header first). A second header is reported and ignored."""
        if parsed.findings:
            return None
        statements = parsed.statements
        if not statements:
            self.add("syntax", "empty model: a file starts with `plant NAME`", Span(1, 1, 1, 2), "empty")
            return None
        header = statements[0]
        if header.kind != "plant":
            self.add("syntax", "a model file must start with `plant NAME`", header.span, "no header")
            return None
        for extra in (s for s in statements[1:] if s.kind == "plant"):
            self.add("syntax", "a file holds one plant: a second `plant` header", extra.span, "second header")
        return header

    def declare(self, st: Statement) -> None:
        name = st.name or ""
        first = self.declared.get(name)
        if first is not None:
            self.add("duplicate-name", f"'{name}' is already declared as a {first.kind} on line {first.span.line}",
                     st.name_span, anchors.declaration(st.kind, name, "twice"))
            return
        self.declared[name] = st

    def no_states(self, header: Statement) -> None:
        self.add("syntax", "the model declares no states: there is no dynamics to analyse",
                 header.name_span or header.span, anchors.problem("no states"),
                 hint="declare the plant's states (`state x in LO .. HI`) and their rates (`rate x = ...`)")

    # expressions ----------------------------------------------------------------
    def constant_refs(self, st: Statement, expr: Expression) -> bool:
        """Does a const/param value use only earlier constants and parameters? (each name
        that does not is reported)"""
        ok = True
        for ref in expr.names:
            target = self.declared.get(ref.name)
            if target is None:
                self.add("unknown-name", f"unknown name '{ref.name}'", ref.span,
                         anchors.about("name", ref.name, "in", st.kind, st.name),
                         hint=self.did_you_mean(ref.name, ("const", "param")))
                ok = False
            elif target.kind not in ("const", "param") or target.span.line > st.span.line or target is st:
                why = "is declared later" if target.kind in ("const", "param") else f"is a {target.kind}"
                self.add("unknown-name", f"'{ref.name}' {why}; a {st.kind} value may use only earlier constants and "
                         "parameters", ref.span, anchors.about("name", ref.name, "in", st.kind, st.name))
                ok = False
        return ok

    def range_refs(self, st: Statement, expr: Expression) -> bool:
        """Does a range bound use only constants and parameters? (the first name that does
        not is reported)"""
        for ref in expr.names:
            target = self.declared.get(ref.name)
            if target is None:
                self.add("unknown-name", f"unknown name '{ref.name}'", ref.span,
                         anchors.about("name", ref.name, "in", "range", st.name),
                         hint=self.did_you_mean(ref.name, ("const", "param")))
                return False
            if target.kind not in ("const", "param"):
                self.add("bad-range", f"range of '{st.name}' uses the {target.kind} '{ref.name}'; ranges must be constant",
                         ref.span, anchors.range_of(st.name, "not", "constant"))
                return False
        return True

    def dynamic_refs(self, expr: Expression, allowed: set[str], constant: Callable[[str], bool], where: str) -> None:
        """Report the names an expression of the dynamics may not use here: ``allowed``
        (states, inputs, ranged parameters, the definitions made so far) and the names for
        which ``constant`` holds may appear."""
        for ref in expr.names:
            if ref.name in allowed or constant(ref.name):
                continue
            target = self.declared.get(ref.name)
            hint = None
            if target is None:
                message = f"unknown name '{ref.name}'"
                hint = self.did_you_mean(ref.name, ("const", "param", "state", "input", "let"))
            elif target.kind == "let" and where == anchors.let(ref.name):
                message = f"'{ref.name}' is used in its own definition; a definition cannot use itself"
                hint = "give the value it builds on a name of its own, defined before this line"
            elif target.kind == "let":
                message = f"'{ref.name}' is defined later (line {target.span.line}); define it before use"
            else:
                message = (f"'{ref.name}' is an {target.kind}" if target.kind[0] in "aeiou"
                           else f"'{ref.name}' is a {target.kind}") + " and cannot be used here"
                hint = "outputs are named by expect/waive, not used in expressions" if target.kind == "output" else None
            self.add("unknown-name", message, ref.span, anchors.about("name", ref.name, "in", where), hint=hint)

    # rates ------------------------------------------------------------------------
    def orphan_rate(self, st: Statement, target: Statement | None) -> None:
        """A rate for a name that is not a state (the caller checks its expression)."""
        name = st.name or ""
        what = f"the {target.kind} '{name}'" if target is not None else f"'{name}', which is not declared"
        close = self.did_you_mean(name, ("state",)) if target is None else None
        self.add("orphan-rate", f"rate for {what}; rates belong to states", st.name_span, anchors.rate(name),
                 hint=close or f"declare `state {name}` or remove this rate")

    def second_rate(self, st: Statement, first: Statement) -> None:
        name = st.name or ""
        self.add("duplicate-name", f"second rate for state '{name}' (the first is on line {first.span.line})",
                 st.name_span, anchors.rate(name, "twice"))

    def missing_rate(self, st: Statement) -> None:
        name = st.name or ""
        self.add("missing-rate", f"state '{name}' has no rate", st.name_span, anchors.declaration("state", name),
                 hint=f"add `rate {name} = ...`")

    # points -----------------------------------------------------------------------
    def second_point(self, st: Statement, first: Statement) -> None:
        name = st.name or ""
        self.add("duplicate-name", f"point '{name}' is already declared on line {first.span.line}",
                 st.name_span, anchors.point(name, "twice"))

    def point_target(self, point: str, target: NameRef) -> bool:
        """Is what a point sets a state or an input? (reported when not)"""
        decl = self.declared.get(target.name)
        if decl is not None and decl.kind in ("state", "input"):
            return True
        what = f"a {decl.kind}" if decl is not None else "not declared"
        self.add("unknown-name", f"point '{point}' sets '{target.name}', which is {what}; points set states and inputs",
                 target.span, anchors.point(point, "sets", target.name), point=point,
                 hint=self.did_you_mean(target.name, ("state", "input")))
        return False

    def set_twice(self, point: str, target: NameRef) -> None:
        self.add("duplicate-name", f"point '{point}' sets '{target.name}' twice", target.span,
                 anchors.point(point, "sets", target.name, "twice"), point=point)

    def point_value_refs(self, point: str, target: str, expr: Expression,
                         dynamic_of: Callable[[str], list[str] | None]) -> bool | None:
        """Is a point value (or tolerance) constant by its names? True, False (the first
        name that is not was reported), or None when that rests on a definition's value:
        ``dynamic_of(let)`` gives the states and inputs a definition's value uses, or None
        when it is not known (the name pass has no values)."""
        for ref in expr.names:
            decl = self.declared.get(ref.name)
            if decl is not None and decl.kind in ("const", "param"):
                continue
            if decl is not None and decl.kind == "let":
                dynamic = dynamic_of(ref.name)
                if dynamic is None:
                    return None
                if not dynamic:
                    continue
                kind = self.declared[dynamic[0]].kind
                what = f"the definition '{ref.name}', which depends on the {kind} '{dynamic[0]}'"
            else:
                what = f"the {decl.kind} '{ref.name}'" if decl is not None else f"unknown name '{ref.name}'"
            self.add("unknown-name", f"point '{point}' value uses {what}; point values must be constant",
                     ref.span, anchors.point(point, "value", target), point=point,
                     hint=(self.did_you_mean(ref.name, ("const", "param", "let")) if decl is None else None)
                     or "a point value may use numbers, constants, parameters and definitions built from them")
            return False
        return True

    # claims and waivers -------------------------------------------------------------
    def claim_form(self, claim: Claim) -> bool:
        """Is a known claim written in its form? (reported when not)"""
        if (claim.output is not None) != (claim.kind == "relative_degree"):
            form = "relative_degree(OUTPUT) = N" if claim.kind == "relative_degree" else claim.kind
            self.add("syntax", f"write this claim as `expect {form}`", claim.span, anchors.about("claim", "form", claim.kind))
            return False
        return True

    def waiver_without_reason(self, st: Statement) -> None:
        assert st.rule_id is not None
        self.add("syntax", "a waiver needs a reason", st.span, anchors.about("waive", st.rule_id.name, "reason"))

    # hints --------------------------------------------------------------------------
    def near(self, name: str, candidates: "set[str] | list[str] | tuple[str, ...]") -> str | None:
        """The candidate a misspelt ``name`` most likely means (:func:`near_miss`), within
        the file's budget of comparisons (None once it is spent)."""
        self.compared += len(candidates)
        return near_miss(name, set(candidates)) if self.compared <= HINT_COMPARISONS else None

    def did_you_mean(self, name: str, kinds: tuple[str, ...]) -> str | None:
        """``did you mean `z` (the state)?`` for a near-miss of a declared name of these kinds."""
        if self.compared > HINT_COMPARISONS:
            return None  # the budget is spent: not even the pool is gathered
        pool = {n: st.kind for n, st in self.declared.items() if st.kind in kinds}
        close = self.near(name, set(pool))
        if close is None:
            return None
        kind = {"const": "constant", "param": "parameter", "let": "definition"}.get(pool[close], pool[close])
        return f"did you mean `{close}` (the {kind})?"


def name_problems(parsed: Parsed) -> list[Finding]:
    """The problems that stop the model before its analysis and need no value, in the order
    the model build reports them (empty when the build must decide). See the module text."""
    found: list[Finding] = []

    def add(rule: str, message: str, span: Span | None, anchor: str, hint: str | None = None,
            point: str | None = None) -> None:
        if rule in STOPPING:
            found.append(finding(rule, message, span, point=point, hint=hint, anchor=anchor))

    names = Names(add)
    header = names.header(parsed)
    if header is None:
        return found
    body = parsed.statements[1:]
    for st in body:
        if st.kind in QUANTITY_KINDS and st.name:
            names.declare(st)
    owned = [st for st in body if names.owns(st)]
    for st in owned:
        if st.kind in ("const", "param") and st.expr is not None:
            names.constant_refs(st, st.expr)
    for st in owned:
        if st.low is not None and st.high is not None:
            names.range_refs(st, st.low)  # both bounds are looked at, as the build does
            names.range_refs(st, st.high)
    if not any(st.kind == "state" for st in body):
        names.no_states(header)
    # ranged or not, a parameter with a value may appear in the dynamics; one whose value
    # is refused is the build's to report (its wording depends on the value)
    dynamic = {st.name or "" for st in owned if st.kind in ("state", "input", "const", "param")}
    lets: set[str] = set()
    for st in (s for s in owned if s.kind == "let" and s.expr is not None):
        names.dynamic_refs(st.expr, dynamic | lets, lambda _: False, anchors.let(st.name))
        lets.add(st.name or "")
    allowed = dynamic | lets
    rated: dict[str, Statement] = {}
    for st in (s for s in body if s.kind == "rate"):
        name = st.name or ""
        target = names.declared.get(name)
        if target is None or target.kind != "state":
            names.orphan_rate(st, target)
            if st.expr is not None:
                names.dynamic_refs(st.expr, allowed, lambda _: False, anchors.rate(name))
        elif name in rated:
            names.second_rate(st, rated[name])
        else:
            rated[name] = st
            if st.expr is not None:
                names.dynamic_refs(st.expr, allowed, lambda _: False, anchors.rate(name))
    for st in owned:
        if st.kind == "state" and (st.name or "") not in rated:
            names.missing_rate(st)
    for st in owned:
        if st.kind == "output" and st.expr is not None:
            names.dynamic_refs(st.expr, allowed, lambda _: False, anchors.output(st.name))
    point_stmts = [s for s in body if s.kind == "point"]
    points = _points(names, point_stmts)
    written = {st.name: st.tolerance for st in point_stmts if st.tolerance is not None}  # the last one written
    for st in points:
        tolerance = written.get(st.name)
        if tolerance is not None:
            names.point_value_refs(st.name or "", "tolerance", tolerance, lambda _: None)
    for st in (s for s in body if s.kind == "expect"):
        assert st.claim is not None
        if st.claim.kind in CLAIMS:
            names.claim_form(st.claim)
    _waivers(names, [s for s in body if s.kind == "waive"], {st.name or "" for st in points})
    return found


def _points(names: Names, stmts: list[Statement]) -> list[Statement]:
    """The points declared once, their targets and the names of their values checked."""
    seen: dict[str, Statement] = {}
    for st in stmts:
        name = st.name or ""
        if name in seen:
            names.second_point(st, seen[name])
            continue
        seen[name] = st
        set_before: set[str] = set()
        for target, expr in st.assignments:
            # a second value for one target is reported by the build when the first value was
            # accepted, which needs that value: neither it nor its names are looked at here
            if names.point_target(name, target) and target.name not in set_before:
                names.point_value_refs(name, target.name, expr, lambda _: None)
                set_before.add(target.name)
    return list(seen.values())


def _waivers(names: Names, stmts: list[Statement], points: set[str]) -> None:
    """A waiver without a reason (the build's first checks, on the rule and the point,
    report nothing that stops the model but decide whether the reason is looked at)."""
    from plantlint.core.catalogue import load_catalogue

    catalogue = load_catalogue()
    for st in stmts:
        rule = st.rule_id
        assert rule is not None
        at = st.at_point
        if rule.name not in catalogue or not catalogue.get(rule.name).waivable:
            continue
        if at is not None and at.name not in points:
            continue
        if not (st.doc or "").strip():
            names.waiver_without_reason(st)
