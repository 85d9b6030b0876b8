"""Input-output structure: relative degree, decoupling matrix, regularity.

Three questions, from cheap to expensive:

* generic (everywhere but a thin set): the first k with L_g L_f^(k-1) h_i not
  identically zero gives r_i; the rows L_gj L_f^(r_i-1) h_i form the decoupling
  matrix A, and b_i = L_f^(r_i) h_i;
* at an operating point: r_i is defined at x0 only when its row is non-zero at
  x0 (a generic non-zero that vanishes at x0 is a singular point, not a higher
  relative degree), and the vector relative degree needs rank A(x0) = p — both
  decided exactly;
* over the operating envelope (a box of states and ranged parameters): det A
  (square), the row (one output) or the p x p minors (wide) are certified
  non-zero by branch-and-bound (:mod:`plantlint.kernel.intervals`), after checking that
  the model itself is defined there (denominators, sqrt/log/asin arguments).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, replace
from fractions import Fraction
from itertools import combinations
from typing import Any, Mapping, Sequence

import sympy as sp

from plantlint.core.deadline import bounded, ran_out
from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding, Span
from plantlint.kernel.intervals import Budget, EnvelopeVerdict, certify_nonzero, certify_sign
from plantlint.language.printer import listed, show_expr, show_number, show_point
from plantlint.kernel import decision as zd, exact
from plantlint.kernel.decision import ZeroDecision
from plantlint.kernel.lie import Kernel, matrix_at
from plantlint.kernel.plant import Plant
from plantlint.kernel.regularity import MAX_STATES as REGULARITY_STATES
from plantlint.kernel.regularity import SECOND_TRY_BOXES, RegularityProof, prove_regular

#: Expressions up to this size are factored for messages; larger ones are cut.
READABLE_FACTOR_OPS = 40
#: ... within this many seconds (display only), else shown as they are.
READABLE_SECONDS = 1.0
MESSAGE_CHARS = 120
#: Generic rank confirmation tests at most this many minors symbolically.
MAX_MINORS_CONFIRMED = 60


@dataclass(frozen=True, eq=False)
class OutputStructure:
    """Relative degree of one output and the row it contributes to A."""

    name: str
    relative_degree: int | None
    row: tuple[sp.Expr, ...]  # L_gj L_f^(r-1) h for every input j; empty when r is None
    unconfirmed: tuple[str, ...] = ()  # L_gj L_f^k h taken as zero without symbolic proof


@dataclass(frozen=True, eq=False)
class Structure:
    """Generic structure of a plant."""

    outputs: tuple[OutputStructure, ...]
    decoupling: sp.Matrix | None  # p x m, only when every output has a relative degree
    generic_rank: int | None
    rank_certain: bool
    zero_columns: tuple[int, ...]  # inputs whose column of A is identically zero
    findings: tuple[Finding, ...]
    input_names: tuple[str, ...] = ()

    @property
    def relative_degree(self) -> dict[str, int | None]:
        return {o.name: o.relative_degree for o in self.outputs}

    @property
    def vector_relative_degree(self) -> tuple[int | None, ...]:
        return tuple(o.relative_degree for o in self.outputs)


@dataclass(frozen=True)
class PointStructure:
    """Structure at one operating point."""

    name: str
    relative_degree: dict[str, int | None]
    well_defined: bool
    decoupling_rank: int
    rank_certain: bool
    findings: tuple[Finding, ...]


@dataclass(frozen=True)
class Envelope:
    """Regularity over the operating envelope."""

    regular: bool | None
    margin: float | None
    witness: dict[str, float] | None
    findings: tuple[Finding, ...]
    boxes_examined: int = 0
    seconds: float = 0.0
    certified: str = ""  # what was certified, in words
    #: why regularity could not be decided when no budget was involved (no box to certify on)
    undecidable: str = ""
    #: where it is singular, in words (``th = 0, whatever w``); "" when not singular there
    where: str = ""


# -- naming and message helpers ------------------------------------------------------------
def lie_name(kernel: Kernel, j: int | None, i: int, k: int) -> str:
    """'L_g L_f^2 y' (one input) or 'L_g[F] L_f y' (several)."""
    plant = kernel.plant
    g = "L_g" if plant.m == 1 or j is None else f"L_g[{plant.inputs[j]}]"
    f = "" if k == 0 else (" L_f" if k == 1 else f" L_f^{k}")
    return f"{g}{f} {plant.outputs[i]}"


def readable(expr: sp.Expr) -> str:
    """A readable form of an expression for messages: factored when small, cut when large."""
    text = show_expr(expr, limit=10**6)
    if sp.count_ops(expr) <= READABLE_FACTOR_OPS and _small_degrees(expr):
        forms = [expr]
        if _pythagorean(expr):  # sin(a)^2 + cos(a)^2 = 1 (a crane's -(-3 + 5 cos^2 + 5 sin^2) sin/1000)
            from sympy.simplify.fu import TR5

            forms.append(sp.expand(TR5(expr)))
        for form in forms:
            try:  # display only: sympy's factor has no limit of its own
                shown = bounded(READABLE_SECONDS, lambda: show_expr(sp.factor(sp.cancel(form)), limit=10**6))
                factored = shown if isinstance(shown, str) else text
            except (sp.PolynomialError, TypeError, ValueError):
                factored = text
            text = min(text, factored, key=len)
    return text if len(text) <= MESSAGE_CHARS else text[: MESSAGE_CHARS - 3] + "..."


def _pythagorean(expr: sp.Expr) -> bool:
    """Both sin(a)^2 and cos(a)^2 of one argument a appear in expr."""
    squares = {(type(p.base), p.base.args[0]) for p in expr.atoms(sp.Pow)
               if p.exp == 2 and isinstance(p.base, (sp.sin, sp.cos))}
    return any((sp.sin, a) in squares and (sp.cos, a) in squares for _, a in squares)


#: Longest expression a message shows beside its name; a longer one is named only.
SHOWN_TERM_CHARS = 60


def row_terms(kernel: Kernel, row: tuple[sp.Expr, ...], output: int, r: int) -> tuple[str, bool]:
    """The terms L_gj L_f^(r-1) h_i of a row for a message, with their expressions when
    every one is short; else by name only (a long expression, cut, says less than its
    name). Also whether they were left out."""
    names = [lie_name(kernel, j, output, r - 1) for j in range(len(row))]
    texts = [readable(e) for e in row]
    if all(len(t) <= SHOWN_TERM_CHARS for t in texts):
        return "; ".join(f"{n} = {t}" for n, t in zip(names, texts)), False
    return listed(names), True


def _small_degrees(expr: sp.Expr) -> bool:
    """Whether factoring stays small: sympy's factor reads exp(-8000/T) as a power of
    exp(1/T), a polynomial of degree 8000, and factors it in C code that no time bound
    can interrupt. Exponents and exp coefficients up to 64 are fine."""
    for node in sp.preorder_traversal(expr):
        if isinstance(node, sp.exp) or (node.is_Pow and node.exp.is_Rational):
            c = node.args[0].as_coeff_Mul()[0] if isinstance(node, sp.exp) else node.exp
            if c.is_Rational and max(abs(int(c.p)), int(c.q)) > 64:
                return False
    return True


# -- generic structure --------------------------------------------------------------------
def analyse_structure(kernel: Kernel) -> Structure:
    """Generic relative degrees, decoupling matrix A and b, and their findings."""
    plant = kernel.plant
    outputs: list[OutputStructure] = []
    findings: list[Finding] = []
    for i, name in enumerate(plant.outputs):
        out = _output_structure(kernel, i)
        outputs.append(out)
        if out.relative_degree is None and out.unconfirmed:
            findings.append(finding(
                "relative-degree-undefined",
                f"output {name} seems never to see the inputs: L_g L_f^k {name} is zero at every "
                f"sampled point for k = 0..{plant.n - 1}, but {', '.join(out.unconfirmed)} could not be proven "
                "zero identically",
                anchor=anchors.output(name), undecided=True,
                hint="check the output equation and the input columns of the rates; a longer budget may "
                     "settle it",
            ))
        elif out.relative_degree is None:
            findings.append(finding(
                "relative-degree-undefined",
                f"output {name} never sees the inputs: L_g L_f^k {name} vanishes identically "
                f"for k = 0..{plant.n - 1}, so it has no relative degree",
                anchor=anchors.output(name),
                hint="check the output equation and the input columns of the rates",
            ))
        if out.unconfirmed:
            findings.append(finding(
                "analysis-budget",
                f"the relative degree of {name} assumes that {', '.join(out.unconfirmed)} "
                f"{'vanish' if len(out.unconfirmed) > 1 else 'vanishes'} identically: it is zero at every "
                "sampled point, but the symbolic proof did not finish within its bound; claims that rest on "
                "it are not decided",
                anchor=anchors.output(name),
            ))
    names = tuple(str(u) for u in plant.inputs)
    if any(o.relative_degree is None for o in outputs) or plant.m == 0:
        return Structure(tuple(outputs), None, None, False, (), tuple(findings), names)
    A = sp.Matrix([list(o.row) for o in outputs])
    rank, certain = _generic_rank(kernel, A)
    zero_cols = tuple(j for j in range(plant.m) if all(kernel.is_zero(A[i, j]).taken_zero for i in range(plant.p)))
    if rank < plant.p:
        findings.append(finding(
            "decoupling-singular",
            f"the decoupling matrix is singular everywhere: rank {rank} for {plant.p} outputs"
            + (f" ({plant.p} outputs but only {plant.m} input{'s' if plant.m != 1 else ''})" if plant.p > plant.m else "")
            + ("" if certain else " (rank decided numerically; the vanishing minors were not confirmed symbolically)"),
            anchor=anchors.PLANT,
            hint=_extension_hint(names, zero_cols),
        ))
    return Structure(tuple(outputs), A, rank, certain, zero_cols, tuple(findings), names)


def _output_structure(kernel: Kernel, i: int) -> OutputStructure:
    fast = numeric_output_structure(kernel, i) if kernel.route == "numeric" else None
    if fast is not None:
        return fast
    return _symbolic_output_structure(kernel, i)


#: Precisions (bits) of the Taylor-mode balls that prove a decoupling term non-zero.
TAYLOR_PRECISIONS = (128, 512)
#: How many of the kernel's samples the numeric route tries before giving up.
TAYLOR_SAMPLES = 3


def numeric_output_structure(kernel: Kernel, i: int) -> OutputStructure | None:
    """The default route: relative degree without symbolic towers.

    Below the structural index every L_gj L_f^k h_i is zero by the dependency
    graph (a proof). At the structural index the term is formed in layered
    form (products of first derivatives of f; no tower) and proven non-zero by
    Taylor-mode balls at a reproducible sample; the layered value must agree
    with the Taylor ball there (a self-check). None when that does not settle
    it (a cancellation at the structural index, an expression the programs do
    not evaluate): the symbolic route then decides.
    """
    plant = kernel.plant
    structural = kernel.structural()
    layers = structural.layers(i)
    degree = layers.structural_degree
    name = plant.outputs[i]
    if degree is None:  # no actuated state ever reaches the states h_i reads: zero for every k
        for j in range(plant.m):
            for k in range(plant.n):
                kernel._lglf[(j, i, k)] = sp.Integer(0)
        return OutputStructure(name, None, ())
    towers = kernel.towers()
    if towers is None:
        return None
    k = degree - 1
    row = tuple(structural.decoupling_entry(j, i)[1] if layers.index[j] == k else sp.Integer(0)
                for j in range(plant.m))
    if not _proven_by_taylor(kernel, towers, i, k, row):
        return None
    for j in range(plant.m):
        for q in range(k):
            kernel._lglf[(j, i, q)] = sp.Integer(0)
        kernel._lglf[(j, i, k)] = row[j]
    return OutputStructure(name, degree, row)


def _proven_by_taylor(kernel: Kernel, towers: Any, i: int, k: int, row: tuple[sp.Expr, ...]) -> bool:
    from flint import arb

    from plantlint.kernel.taylor import ArbField, Undefined

    symbols = kernel.free_symbols()
    try:
        layered = Program(list(row), symbols)
    except UnsupportedExpression:
        return False
    for sample in kernel.samples()[:TAYLOR_SAMPLES]:
        point = [sample[s] for s in symbols]
        for prec in TAYLOR_PRECISIONS:
            try:
                values = towers.lglf(point, k, ArbField(prec))[i][k]
            except (Undefined, ZeroDivisionError):
                break
            check = layered.at(sample, prec)
            if not all(isinstance(v, arb) and v.is_finite() for v in values):
                continue
            if any(c.is_finite() and not c.overlaps(v) for c, v in zip(check, values)):
                return False  # the layered form disagrees with the flow: never trust either
            if any(zd.of_ball(v).proven_nonzero for v in values):
                return True
    return False


def _symbolic_output_structure(kernel: Kernel, i: int) -> OutputStructure:
    plant = kernel.plant
    unconfirmed: list[str] = []
    for k in range(1, plant.n + 1):
        row = tuple(kernel.lglf(j, i, k - 1) for j in range(plant.m))
        tests = [kernel.is_zero(e) for e in row]
        if any(t.proven_nonzero for t in tests):
            return OutputStructure(plant.outputs[i], k, row, tuple(unconfirmed))
        unconfirmed += [lie_name(kernel, j, i, k - 1) for j, t in enumerate(tests) if not t.certain]
    return OutputStructure(plant.outputs[i], None, (), tuple(unconfirmed))


def _generic_rank(kernel: Kernel, A: sp.Matrix) -> tuple[int, bool]:
    """Rank of A as a matrix of functions.

    The largest exact rank at the kernel's sample points is a proven lower bound;
    it is confirmed as the rank when every larger minor vanishes identically.
    """
    full = min(A.rows, A.cols)
    best = 0
    decide = exact.number_decider(kernel)
    for sample in kernel.samples():
        # balls first: a full rank they prove is the rank (exact arithmetic with radicals
        # such as (981/100)^(37/64) can take sympy seconds)
        if _ball_rank_at(kernel, A, sample) == full:
            return full, True
        point = {s: sp.Rational(v.numerator, v.denominator) for s, v in sample.items()}
        rank, _ = exact.rank(matrix_at(kernel, A.tolist(), point).tolist(), decide)
        best = max(best, rank)
        if best == full:
            return best, True
    k = best + 1
    rows = list(combinations(range(A.rows), k))
    cols = list(combinations(range(A.cols), k))
    if len(rows) * len(cols) > MAX_MINORS_CONFIRMED:
        return best, False
    certain = True
    for r in rows:
        for c in cols:
            test = kernel.is_zero(exact.laplace_det(A.extract(list(r), list(c))))
            if test.proven_nonzero:
                return k, True  # cannot happen after screening, but a proof beats a guess
            certain = certain and test.certain
    return best, certain


def _ball_rank_at(kernel: Kernel, A: sp.Matrix, sample: Mapping[sp.Symbol, Any]) -> int:
    """A proven lower bound of the rank of A at a sample point, by ball arithmetic; 0 when
    an entry is beyond the evaluator."""
    symbols = kernel.free_symbols()
    try:
        balls = Program([e for row in A.tolist() for e in row], symbols).at(sample, BALL_RANK_PREC)
    except UnsupportedExpression:
        return 0
    return exact.ball_rank([balls[i * A.cols:(i + 1) * A.cols] for i in range(A.rows)])[0]


#: Precision (bits) of the ball screen of the generic rank.
BALL_RANK_PREC = 128


def _extension_hint(inputs: Sequence[str], zero_cols: Sequence[int]) -> str:
    if not zero_cols:
        return "the outputs' input rows are dependent: choose independent outputs, or try dynamic extension"
    idle = ", ".join(inputs[j] for j in zero_cols)
    busy = ", ".join(u for j, u in enumerate(inputs) if j not in zero_cols)
    return (
        f"input {idle} has a zero column (it reaches the outputs only at higher derivatives): "
        f"dynamic extension — integrators on {busy or 'the other inputs'} — may restore full rank"
    )




# -- at a point ----------------------------------------------------------------------------
def structure_at_point(kernel: Kernel, structure: Structure, name: str, values: dict[sp.Symbol, sp.Expr]) -> PointStructure:
    """Relative degrees and decoupling rank at an operating point, decided exactly."""
    plant = kernel.plant
    point = {s: v for s, v in values.items() if s in set(plant.states) | set(plant.params)}
    findings: list[Finding] = []
    degrees: dict[str, int | None] = {}
    defined_rows: list[tuple[sp.Expr, ...]] = []
    all_defined = True
    for i, out in enumerate(structure.outputs):
        r = out.relative_degree
        if r is None:
            degrees[out.name] = None
            all_defined = False
            continue
        states = [_point_state(kernel, e, point) for e in out.row]
        if any(s.proven_nonzero for s in states):
            degrees[out.name] = r
            defined_rows.append(out.row)
            continue
        degrees[out.name] = None
        all_defined = False
        undefined = [not s.taken_zero for s in states]
        state = "undefined" if all(undefined) else ("zero or undefined" if any(undefined) else "zero")
        shown, long = row_terms(kernel, out.row, i, r)
        verb = "is" if len(out.row) == 1 else "are both" if len(out.row) == 2 else "are all"
        findings.append(finding(
            "relative-degree-ill-defined",
            f"relative degree of {out.name} is not defined at point {name}: "
            + ("the model is undefined there: " if any(undefined) else "")
            + f"{shown} {verb} {state} there "
            f"(generic relative degree {r})",
            point=name, anchor=anchors.point(name),
            hint="move the operating point off the singular set, or choose another output"
            + (f" (`plantlint explain --point {name}` shows the {'terms' if len(out.row) > 1 else 'term'} "
               "in full)" if long else ""),
        ))
    if not defined_rows:
        return PointStructure(name, degrees, False, 0, True, tuple(findings))
    A0 = matrix_at(kernel, defined_rows, point)
    rank, certain = exact.rank(A0.tolist(), exact.number_decider(kernel))
    full_rank = rank == plant.p
    if all_defined and not full_rank and (structure.generic_rank or 0) >= plant.p:
        if certain:
            zero_cols = tuple(
                j for j in range(plant.m) if all(kernel.constant_is_zero(A0[i, j]).taken_zero for i in range(A0.rows))
            )
            findings.append(finding(
                "decoupling-singular",
                f"the decoupling matrix is singular at point {name}: rank {rank} for {plant.p} outputs",
                point=name, anchor=anchors.point(name),
                hint=_extension_hint(structure.input_names, zero_cols),
            ))
        else:
            findings.append(finding(
                "analysis-budget",
                f"the rank of the decoupling matrix at point {name} is at least {rank} of {plant.p}, "
                "but some entries could not be decided exactly (undefined or beyond the evaluator)",
                point=name, anchor=anchors.point(name),
            ))
    return PointStructure(name, degrees, all_defined and full_rank and certain, rank, certain, tuple(findings))


def _point_state(kernel: Kernel, e: sp.Expr, point: dict[sp.Symbol, sp.Expr]) -> ZeroDecision:
    """Is an entry zero at the point (undecided when beyond the evaluator)?"""
    if e == 0:
        return zd.proven_zero("structural")
    try:
        return kernel.value_at(e, point).decision
    except UnsupportedExpression:
        return zd.UNDECIDED


# -- over the envelope ----------------------------------------------------------------------
@dataclass(frozen=True)
class Described:
    """What a domain condition is about, in words: ``template`` with the readable
    form of ``parts`` (``{}`` each). Rendered only when a message shows it (str()),
    so a condition that is proven never pays for sympy's factoring."""

    template: str
    parts: tuple[sp.Expr, ...]

    def __str__(self) -> str:
        return self.template.format(*(readable(p) for p in self.parts))


DomainCondition = tuple[str, sp.Expr, Described]  # (kind: nonzero | positive, expr, what)


def domain_conditions(expr: sp.Expr, symbols: set[sp.Symbol]) -> list[DomainCondition]:
    """Where an expression stops being defined or smooth: denominators, and arguments
    of sqrt/log/asin/acos/tan and fractional powers (sqrt, asin, acos are not
    differentiable at the ends of their domains, so those ends count as outside)."""
    out: list[DomainCondition] = []
    for node in sp.preorder_traversal(expr):
        if not (node.free_symbols & symbols):
            continue
        if node.is_Pow:
            base, e = node.args
            if not (base.free_symbols & symbols):
                continue
            if e.is_Rational and not e.is_Integer:
                what = "square-root argument" if e.q == 2 else "fractional-power base"
                out.append(("positive", base, Described(what + " {}", (base,))))
            elif e.is_negative:
                out.append(("nonzero", base, Described("denominator {}", (base,))))
            elif not e.is_Rational:
                out.append(("positive", base, Described("power base {}", (base,))))
        elif isinstance(node, sp.log):
            out.append(("positive", node.args[0], Described("log argument {}", (node.args[0],))))
        elif isinstance(node, (sp.asin, sp.acos)):
            a = node.args[0]
            out.append(("positive", 1 - a, Described(f"{type(node).__name__} argument {{}} (1 or above)", (a,))))
            out.append(("positive", 1 + a, Described(f"{type(node).__name__} argument {{}} (-1 or below)", (a,))))
        elif isinstance(node, sp.tan):
            out.append(("nonzero", sp.cos(node.args[0]), Described("tan argument {} (at a pole)", (node.args[0],))))
        elif isinstance(node, sp.atan2):
            y, x = node.args
            out.append(("nonzero", x**2 + y**2, Described("atan2 arguments {}, {} (both zero)", (y, x))))
    return out


@dataclass
class _Clock:
    deadline: float
    max_boxes: int
    boxes: int = 0
    seconds: float = 0.0

    def budget(self) -> Budget:
        return Budget(self.max_boxes, max(self.deadline - time.perf_counter(), 0.0))

    def spent(self, verdict: EnvelopeVerdict) -> EnvelopeVerdict:
        self.boxes += verdict.boxes_examined
        self.seconds += verdict.seconds
        return verdict


def certify_envelope(
    kernel: Kernel, structure: Structure, budget_seconds: float = 5.0, max_boxes: int = 20000,
    spans: Mapping[str, Span] | None = None,
) -> Envelope:
    """Is the (vector) relative degree well defined on the whole operating envelope?

    The model must be proven defined on the box first (a singular model makes
    the plant irregular, and its poles would only exhaust the budget of the
    decoupling proof). Undecided boxes give ``regular=None``, never a guess.
    With the model's ``spans``, a singular envelope is shown at the range of the first
    state (or ranged parameter) that the vanishing factor depends on: the range to
    narrow, rather than the first range of the model.
    """
    plant = kernel.plant
    missing = [str(s) for s in plant.states if s not in plant.state_box]
    if missing:
        refused = [m for m in missing if spans is not None and anchors.range_of(m, "refused") in spans]
        lacking = [m for m in missing if m not in refused]
        parts = ([f"{', '.join(lacking)} {'have' if len(lacking) > 1 else 'has'} no range"] if lacking else []) + (
            [f"{', '.join(refused)} {'have' if len(refused) > 1 else 'has'} an unusable range (see bad-range)"]
            if refused else [])
        why = (f"the operating envelope is not a box: state{'s' if len(missing) > 1 else ''} "
               + "; ".join(parts))
        return Envelope(None, None, None, (finding(
            "envelope-unproven", f"{why}, so regularity over the envelope cannot be certified",
            anchor=anchors.ENVELOPE, hint="declare `in LO .. HI` for every state",
        ),), undecidable=why)
    if plant.p == 0:
        return Envelope(None, None, None, ())
    box = {**plant.state_box, **plant.param_box}
    clock = _Clock(time.perf_counter() + budget_seconds, max_boxes)
    findings: list[Finding] = []
    undecided_model: list[str] = []
    model_witness: dict[str, float] | None = None
    for anchor, cond, verdict in _model_checks(kernel, box, clock):
        kind, _, what = cond
        if verdict.regular is False:
            assert verdict.witness is not None
            model_witness = model_witness or verdict.witness
            findings.append(finding(
                "singular-model",
                f"the {what} in {anchor} {_violation(kind, plural=str(what).startswith('atan2 arguments'))} "
                "inside the envelope, "
                f"e.g. at {show_point(verdict.witness)}",
                anchor=anchor, hint="narrow the state ranges or reformulate the model",
            ))
        elif verdict.regular is None:
            undecided_model.append(f"{what} in {anchor}")
    if model_witness is not None:
        return Envelope(False, None, model_witness, tuple(findings), clock.boxes, clock.seconds, "model domain")
    if any(o.relative_degree is None for o in structure.outputs) or (structure.generic_rank or 0) < plant.p:
        centre = {str(s): float((lo + hi) / 2) for s, (lo, hi) in box.items()}
        return Envelope(False, None, centre, tuple(findings), clock.boxes, clock.seconds, "generic structure")
    exprs, certified = _regularity_expressions(kernel, structure)
    verdict, culprit = _certify_by_factors(kernel, exprs, box, clock)
    if verdict.regular is None or (verdict.regular and undecided_model):
        second = _mean_value_try(kernel, structure, budget_seconds)
        if second is not None and second.proven:  # the model defined and A nonsingular on every box
            verdict = replace(verdict, regular=True, margin=second.margin, undecided=[], undecided_count=0,
                              too_narrow=False, boxes_examined=verdict.boxes_examined + second.boxes)
            undecided_model = []
    if verdict.regular is False:
        assert verdict.witness is not None
        shown, whatever = _witness_parts(verdict.witness, culprit or exprs)
        how = "exactly" if verdict.witness_exact else "a zero proven by a sign change next to it"
        findings.append(finding(
            "envelope-singular",
            f"the relative degree is not well defined on the whole envelope: {certified} vanishes "
            f"at {shown} ({how}{whatever})" + _factor_phrase(culprit, exprs),
            _range_to_narrow(kernel, culprit, box, spans),
            anchor=anchors.ENVELOPE, hint="narrow the envelope, move it off the singular set, or choose other outputs",
        ))
        return Envelope(False, None, verdict.witness, tuple(findings), clock.boxes, clock.seconds, certified,
                        where=shown + whatever)
    if verdict.regular is None:
        shown = "; ".join(
            ", ".join(f"{k} in [{show_number(lo)}, {show_number(hi)}]" for k, (lo, hi) in b.items()) for b in verdict.undecided[:2]
        )
        findings.append(finding(
            "envelope-unproven",
            f"regularity over the envelope is unproven: {verdict.undecided_count} box"
            f"{'es' if verdict.undecided_count != 1 else ''} undecided for {certified} "
            + ("that cannot be split further at double precision (the term comes within rounding of zero there)"
               if verdict.too_narrow else
               f"after {clock.boxes} box{'es' if clock.boxes != 1 else ''} and {clock.seconds:.2f} s" if clock.boxes
               else f"(the budget ran out before a box was examined, {clock.seconds:.2f} s)")
            + f", e.g. {shown}",
            anchor=anchors.ENVELOPE,
            hint=("move the envelope's bound away from where the term nearly vanishes, or check whether it "
                  "vanishes there exactly" if verdict.too_narrow else
                  "raise the budget, or narrow the envelope near those boxes"),
        ))
    if undecided_model:
        findings.append(finding(
            "envelope-unproven",
            "the model could not be proven defined on the whole envelope: " + "; ".join(undecided_model[:3]),
            anchor=anchors.ENVELOPE, hint="raise the budget, or narrow the envelope",
        ))
    regular = verdict.regular if not undecided_model else None
    margin = verdict.margin if regular else None
    narrow = ("the boxes where the term comes within rounding of zero cannot be split further at double "
              "precision" if verdict.regular is None and verdict.too_narrow and not undecided_model else "")
    return Envelope(regular, margin, None, tuple(findings), clock.boxes, clock.seconds, certified,
                    undecidable=narrow)


def _mean_value_try(kernel: Kernel, structure: Structure, seconds: float) -> RegularityProof | None:
    """A second proof, when the proof by factors leaves the envelope open: the mean-value
    form on the towers, and second-order forms through the rows' common factors
    (:func:`plantlint.kernel.regularity.prove_regular`), with the boxes
    that the light route may use at most, so that a model it passes is never left open
    here, and the envelope's seconds (the light route has 0.3 s for the same proof; one
    that runs out here is recorded, so the result is not cached). Only for square plants
    of at most ``MAX_STATES`` states whose ranges (of the states, and of the ranged
    parameters, which are sides of the box like the states) are rational and whose towers
    compile; else None."""
    plant = kernel.plant
    towers = kernel.towers()
    if towers is None or plant.p != plant.m or plant.n > REGULARITY_STATES:
        return None
    box = []
    for s in (*plant.states, *plant.params):
        lo, hi = plant.state_box[s] if s in plant.state_box else plant.param_box[s]
        if not (isinstance(lo, sp.Rational) and isinstance(hi, sp.Rational)):
            return None
        box.append((Fraction(int(lo.p), int(lo.q)), Fraction(int(hi.p), int(hi.q))))
    orders = [int(r) - 1 for r in structure.vector_relative_degree if r is not None]
    if len(orders) != plant.p:
        return None
    proof = prove_regular(towers, box, orders, SECOND_TRY_BOXES, seconds)
    if proof.stopped == "seconds":
        ran_out()
    return proof


def _certify_by_factors(kernel: Kernel, exprs: list[sp.Expr], box: dict[sp.Symbol, Any],
                        clock: _Clock) -> tuple[EnvelopeVerdict, list[sp.Expr]]:
    """A single expression that factors is non-zero exactly when every factor is;
    each factor usually involves few variables and has far less dependency, so it
    is certified on its own (the margin is the product of the factors' margins).
    Also returns what a witness of singularity makes vanish: the factor, else ``exprs``."""
    factors = kernel.factors(exprs[0]) if len(exprs) == 1 else []
    if len(factors) >= 2:
        factors = _as_held(factors, exprs[0])
    if len(factors) < 2 and len(exprs) == 1:
        factors = product_factors(exprs[0])
    if len(factors) < 2:
        return clock.spent(certify_nonzero(exprs, box, clock.budget())), exprs
    (constant, _), parts = factors[0], factors[1:]
    margin: float | None = abs(float(constant))
    undecided: list[EnvelopeVerdict] = []
    boxes = 0
    for part, multiplicity in parts:
        verdict = clock.spent(certify_nonzero([part], box, clock.budget()))
        boxes += verdict.boxes_examined
        if verdict.regular is False:
            return verdict, [part] + _also_zero(kernel, parts, part, verdict)
        if verdict.regular is None:
            undecided.append(verdict)
        elif verdict.margin is not None and margin is not None and multiplicity > 0:
            margin *= verdict.margin ** multiplicity
        else:
            margin = None  # a denominator's lower bound needs an upper bound of its base
    if undecided:
        first = undecided[0]
        return EnvelopeVerdict(None, None, None, first.undecided, boxes,
                               sum(v.undecided_count for v in undecided),
                               too_narrow=all(v.too_narrow for v in undecided)), exprs
    return EnvelopeVerdict(True, margin, None, [], boxes), exprs


def _as_held(factors: list[tuple[sp.Expr, int]], expr: sp.Expr) -> list[tuple[sp.Expr, int]]:
    """The factorisation [(constant, 1), (factor, multiplicity), ...] with each factor in
    the form the term itself holds it, when one of the term's own factors is a constant
    multiple c of it (same zeros; the constant is divided by c^multiplicity, so that the
    product, and the margin read off it, stay the same). sympy's factor_list expands:
    40000 (p2 - p1)^2 + 800/3 becomes 150 p1^2 - 300 p1 p2 + 150 p2^2 + 1, whose enclosure
    over a wide box holds 0 (the dependency problem: p1 appears three times), while the
    square in the held form encloses as at least 800/3 on any box."""
    held = product_factors(expr)[1:]
    if not held:
        return factors
    (constant, _), parts = factors[0], factors[1:]
    out = []
    for part, multiplicity in parts:
        twin = None
        for h, m in held:
            if m == multiplicity and h.free_symbols == part.free_symbols:
                ratio = sp.cancel(h / part)
                if ratio.is_number and ratio != 0:
                    twin = h
                    constant = constant / ratio**multiplicity
                    break
        out.append((part if twin is None else twin, multiplicity))
    return [(constant, 1), *out]


#: A vanishing factor is named in the message when it is at most this long.
FACTOR_TEXT = 40


def _also_zero(kernel: Kernel, parts: list[tuple[sp.Expr, int]], found: sp.Expr,
               verdict: EnvelopeVerdict) -> list[sp.Expr]:
    """The other factors that are exactly zero at an exact witness too (r and thd both vanish
    at r = thd = 0): display only, so that the finding does not name one of them alone."""
    if not verdict.witness_exact or not verdict.witness:
        return []
    at = {s: sp.Rational(verdict.witness[str(s)]) for s in kernel.free_symbols() if str(s) in verdict.witness}
    out = []
    for part, multiplicity in parts:
        if part != found and multiplicity > 0 and sp.count_ops(part) <= FACTOR_TEXT // 2:
            try:
                if part.xreplace(at) == 0:
                    out.append(part)
            except (ArithmeticError, ValueError, TypeError):
                continue
    return out


def _witness_parts(witness: dict[str, float], exprs: list[sp.Expr]) -> tuple[str, str]:
    """(``q1 = 0, q2 = 0``, ``, whatever w1 and w2``): the quantities the vanishing terms do
    not contain are not values of the witness (they stood at the box's centre), and the
    terms vanish for every value of them."""
    named = {str(s) for e in exprs for s in e.free_symbols}
    shown = {k: v for k, v in witness.items() if k in named} or witness
    free = [k for k in witness if k not in shown]
    return show_point(shown), (", whatever " + listed(free) if free else "")


def _factor_phrase(culprit: list[sp.Expr], exprs: list[sp.Expr]) -> str:
    """": its factor F is zero there" (or "its factors F and G are zero there") when the
    witness was found on factors of the term (what to keep away from zero); "" when the
    whole term vanished or a factor is long."""
    if not culprit or culprit == exprs or any(sp.count_ops(c) > FACTOR_TEXT // 2 for c in culprit):
        return ""
    texts = [show_expr(c, limit=10 * FACTOR_TEXT) for c in culprit]
    if any(len(t) > FACTOR_TEXT for t in texts):
        return ""
    if len(texts) == 1:
        return f": its factor {texts[0]} is zero there"
    return f": its factors {listed(texts)} are zero there"


def _range_to_narrow(kernel: Kernel, culprit: list[sp.Expr], box: dict[sp.Symbol, Any],
                     spans: Mapping[str, Span] | None) -> Span | None:
    """The span of the range of the first quantity of the box (states, then ranged
    parameters, in declaration order) that ``culprit`` depends on; None without spans.

    A quantity the expression names but does not depend on (q1 in l1 l2 (sin(q1 + q2)
    cos q1 - cos(q1 + q2) sin q1) = l1 l2 sin q2, a trigonometric identity) is passed
    over when its partial derivative is exactly 0 in balls at the kernel's samples. That
    only chooses where the finding points, never a verdict; with no other candidate the
    first named quantity is kept."""
    if spans is None:
        return None
    used = set().union(*(e.free_symbols for e in culprit)) if culprit else set()
    named = [s for s in box if s in used and anchors.range_of(str(s)) in spans]
    for s in named:
        if len(named) == 1 or not _flat_along(kernel, culprit, s):
            return spans[anchors.range_of(str(s))]
    return spans[anchors.range_of(str(named[0]))] if named else None


#: Bounds of the display-only test of which variables a vanishing term depends on.
FLAT_OPS = 400
FLAT_SECONDS = 1.0


def _flat_along(kernel: Kernel, exprs: list[sp.Expr], s: sp.Symbol) -> bool:
    """Is every d e / d s zero (balls within 2^-100 of 0) at the first samples? False when
    the terms are large or the test runs out of its own second (the first named variable
    is then shown)."""
    if sum(sp.count_ops(e) for e in exprs) > FLAT_OPS:
        return False
    symbols = kernel.free_symbols()

    def flat() -> bool:
        program = Program([sp.diff(e, s) for e in exprs], symbols)
        tiny = 2.0 ** -100  # an exact zero is a ball of radius 0 around 0, so it passes too
        return all(all(b.rad() < tiny and abs(b.mid()) < tiny for b in program.at(sample, 256))
                   for sample in kernel.samples()[:3])

    try:
        answer = bounded(FLAT_SECONDS, flat)
    except (UnsupportedExpression, ArithmeticError, ValueError, TypeError):
        return False
    return answer is True


def product_factors(expr: sp.Expr) -> list[tuple[sp.Expr, int]]:
    """[(constant, 1), (factor, exponent), ...] of a product (a chain's decoupling
    term in layered form is one product of per-link factors, by the chain rule);
    [] when ``expr`` is not a product of at least two non-constant factors.
    A product (with integer exponents) is non-zero exactly where every factor is
    non-zero and finite, so each factor is certified on its own."""
    if not expr.is_Mul:
        return []
    constant = sp.Integer(1)
    parts: list[tuple[sp.Expr, int]] = []
    for arg in expr.args:
        if not arg.free_symbols:
            constant *= arg
        elif arg.is_Pow and arg.exp.is_Integer:
            parts.append((arg.base, int(arg.exp)))
        else:
            parts.append((arg, 1))
    if len(parts) < 2 or not constant.is_number:
        return []
    return [(constant, 1), *parts]


def _violation(kind: str, plural: bool = False) -> str:
    if plural:
        return {"nonzero": "vanish together", "positive": "leave the open domain where the model is smooth"}[kind]
    return {"nonzero": "vanishes", "positive": "leaves the open domain where the model is smooth"}[kind]


def rates_and_outputs(plant: Plant) -> list[tuple[str, str, list[sp.Expr]]]:
    """Each rate and each output once: its anchor, its name for a message (``rate v``) and its
    expressions (f_i and the g_ij of the rate; h_i of the output)."""
    out = [(anchors.rate(s), f"rate {s}", [plant.f[i], *(col[i] for col in plant.g)])
           for i, s in enumerate(plant.states)]
    out += [(anchors.output(name), f"output {name}", [h]) for name, h in zip(plant.outputs, plant.h)]
    return out


def _model_checks(kernel: Kernel, box: dict[sp.Symbol, Any], clock: _Clock) -> list[tuple[str, DomainCondition, EnvelopeVerdict]]:
    """Certify every domain condition of f, g and h once; report it per place it occurs."""
    plant = kernel.plant
    symbols = set(kernel.free_symbols())
    places = [(anchor, e) for anchor, _, exprs in rates_and_outputs(plant) for e in exprs]
    places += list(plant.hidden)  # undefined as written, though the exact value no longer shows it
    verdicts: dict[tuple[str, sp.Expr], EnvelopeVerdict] = {}
    out: list[tuple[str, DomainCondition, EnvelopeVerdict]] = []
    seen: set[tuple[str, str, sp.Expr]] = set()
    for anchor, expr in places:
        for cond in domain_conditions(expr, symbols):
            kind, e, _ = cond
            # one condition per zero set: 981*(h1 - h2)/50 > 0 is h1 - h2 > 0 (a part kept as
            # written and the same part as sympy rearranged it differ by a positive constant)
            content, primitive = e.as_content_primitive()
            shape = primitive if content.is_positive else e
            if (anchor, kind, shape) in seen:
                continue
            seen.add((anchor, kind, shape))
            key = (kind, shape)
            if key not in verdicts:
                try:
                    if kind == "nonzero":
                        verdicts[key] = clock.spent(certify_nonzero(e, box, clock.budget()))
                    else:
                        verdicts[key] = clock.spent(certify_sign(e, box, True, clock.budget()))
                except UnsupportedExpression:
                    verdicts[key] = EnvelopeVerdict(None, None, None, [], 0)
            out.append((anchor, cond, verdicts[key]))
    return out


def _regularity_expressions(kernel: Kernel, structure: Structure) -> tuple[list[sp.Expr], str]:
    """What must stay away from zero: det A (square), the row (one output), the p x p minors (wide)."""
    A = structure.decoupling
    assert A is not None
    A = A.applyfunc(kernel.cancelled)
    p, m = A.rows, A.cols
    if p == 1:
        r = structure.outputs[0].relative_degree or 1
        entries = [(lie_name(kernel, j, 0, r - 1), e) for j, e in enumerate(A.row(0)) if e != 0]
        if len(entries) == 1:
            return [entries[0][1]], entries[0][0]
        return [e for _, e in entries], "every entry of the row " + ", ".join(n for n, _ in entries)
    if p == m:
        return [kernel.cancelled(exact.laplace_det(A))], "det A (the decoupling matrix)"
    minors = [kernel.cancelled(exact.laplace_det(A.extract(list(range(p)), list(c)))) for c in combinations(range(m), p)]
    return [e for e in minors if e != 0] or [sp.Integer(0)], f"every {p} x {p} minor of the decoupling matrix"


__all__ = [
    "Envelope", "OutputStructure", "PointStructure", "Structure", "analyse_structure",
    "certify_envelope", "domain_conditions", "structure_at_point",
]
