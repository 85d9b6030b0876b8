"""The light route: a clean model passed without sympy, or handed to the full analysis.

A pre-commit hook mostly sees models that are fine, and a check of one of them paid the
import of sympy (0.2-0.4 s on the 2-core host) for an answer of one line. This route
answers such a model from the parse tree, the expression graph
(:mod:`plantlint.language.written`) and the Taylor-mode towers (:mod:`plantlint.kernel.taylor`)
alone, and only when it *proves* that the full analysis would find nothing: every rule
silent and every claim holding. Anything else (a finding, a step it cannot prove, a model
outside the class below) returns ``None``, and the caller runs the full analysis, which
then decides and prints. So the light route can only ever say "no findings"; every
message, and every report that shows the analysis (JSON, ``explain``, ``--since``), comes
from the full route.

The class it answers (each condition is checked; none is assumed):

- the file parses, its names resolve, its units agree, and the graph reader takes it
  (smooth functions, input-affine as written, outputs free of the inputs);
- no waivers, no parameter with a range, no point tolerance, only the claims
  ``relative_degree``, ``regular``, ``state_linearizable`` and ``minimum_phase`` (with no
  zero dynamics it holds at every point, as in the full analysis, which needs a point); every constant and parameter
  an exact rational number; every state ranged by rational bounds lo < hi; every constant,
  parameter, definition and input mentioned by a rate, an output, a definition or a value;
- as many outputs as inputs, with a vector relative degree summing to n (the outputs are
  linearizing: no zero dynamics, the distributions follow without brackets, Isidori,
  Nonlinear Control Systems, 3rd ed., sec. 5.2);
- every point gives every state (and any inputs) as exact numbers, inside the ranges, and
  is an exact equilibrium, its missing inputs solved exactly and uniquely, inside theirs:
  rational numbers in exact arithmetic; anything else (a value pi/4, a rate sin(1/4)) in
  formal numbers (:mod:`plantlint.kernel.formal`: pi, the sines, the square roots are the
  unknowns of a polynomial ring, so a rate is proven 0 by an identity, and each number
  carries a ball that shows it inside a range or a pivot non-zero);
- at every point the decoupling matrix is proven nonsingular (exact rationals, or balls
  that exclude 0), with the rows below each relative degree zero by the dependency graph
  (L_g L_f^k h = 0 identically while no state the output's k-th derivative can read is
  driven by an input), which also proves the generic relative degrees;
- over the whole state box the rates, the input columns and the outputs are defined and the
  decoupling matrix is nonsingular: the towers run in ball arithmetic over sub-boxes
  (branch and bound, a fixed number of boxes), each box proven or the model handed over.

The equality of this route's answer with the full analysis is held in
``tests/analysis/test_light.py`` over every model of the repository and a set of mutants.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any, Callable, Sequence

from plantlint.core.settings import AnalysisSettings
from plantlint.kernel.regularity import MAX_STATES as REGULARITY_STATES
from plantlint.kernel.regularity import SECOND_TRY_BOXES, ball, nonsingular, prove_regular, rational_ball
from plantlint.kernel.taylor import Inexact, Towers, Undefined

#: Largest model the light route tries (states): the envelope proof splits boxes in every
#: state, and larger models are left to the full route with its budget and snapshots.
MAX_STATES = REGULARITY_STATES
#: Sub-boxes and seconds the envelope proof may spend before it hands the model over: the
#: route is for the quick answer; a model that needs a longer proof goes to the full
#: analysis. The boxes are at most those of the full analysis's second try with the same
#: prover (``kernel.regularity.SECOND_TRY_BOXES``), so a light pass is never "not decided"
#: in the full analysis (before that second try existed, a campaign found one: a range 10^9
#: wide that the mean-value form proved and the proof by factors left open).
MAX_BOXES = SECOND_TRY_BOXES
MAX_SECONDS = 0.3
#: Claims the light route can show to hold.
CLAIMS = ("relative_degree", "regular", "state_linearizable", "minimum_phase")


class HandOver(Exception):
    """The light route does not answer this model; the message says why (for tests and
    ``tools``; the user never sees it: the full analysis answers instead)."""


@dataclass(frozen=True)
class LightPass:
    """What the light route proved of a model: its name and relative degrees."""

    plant: str
    degrees: tuple[int, ...]


def light_check(data: bytes, settings: AnalysisSettings = AnalysisSettings(),
                seconds: float | None = None, stop: Callable[[], bool] | None = None) -> LightPass | None:
    """A model proven clean without sympy, or None (the full analysis must answer).
    ``seconds`` bounds the envelope proof (default ``MAX_SECONDS``); ``stop``, asked during
    it, ends it when the answer is no longer needed (the worker beside it has finished)."""
    try:
        return prove_clean(data, settings, seconds, stop)
    except HandOver:
        return None
    except (Exception, RecursionError):  # noqa: BLE001 - see below
        # A value the route cannot take (an overflow, a node the programs do not hold) or a
        # defect of the route: it runs in the parent process, where an error would end the
        # whole run, so the model goes to the full analysis, which reports whatever it is
        # (in its worker, with the crash handling of every analysis). The tests and the
        # campaigns call prove_clean, which lets such an error through.
        return None


def prove_clean(data: bytes, settings: AnalysisSettings = AnalysisSettings(),
                seconds: float | None = None, stop: Callable[[], bool] | None = None) -> LightPass:
    """:func:`light_check`, raising :class:`HandOver` with the reason instead of None."""
    if settings.point_tolerance != 0:
        raise HandOver("a point tolerance is configured")
    statements = _read(data)
    model = _Model(statements)
    plant = model.written
    towers = Towers(plant.states, plant.params, plant.f, plant.g, plant.h, graph=plant.graph)
    degrees = _structural_degrees(plant)
    _claims(model, degrees)  # cheap: before the points and the envelope, which are not
    try:
        points = [_equilibrium(model, towers, st) for st in model.by_kind.get("point", [])]
        for name, vector, formal in points:
            if not _nonsingular_at(towers, vector, degrees, formal):
                raise HandOver(f"the decoupling matrix is not proven nonsingular at point {name}")
    except (Undefined, Inexact) as why:  # a value at a point that does not exist or is not held
        raise HandOver(f"a value at a point: {why}") from None
    _envelope(model, towers, degrees, MAX_SECONDS if seconds is None else seconds, stop)
    return LightPass(model.name, tuple(d + 1 for d in degrees))


# -- reading ---------------------------------------------------------------------------

def _read(data: bytes) -> list[Any]:
    """The statements of a file that parses, whose names resolve and whose units agree."""
    from plantlint.language.names import name_problems
    from plantlint.language.syntax import decode, parse_text
    from plantlint.language.units import check_units

    text, problem = decode(data)
    if problem is not None or text is None:
        raise HandOver("the file is not read")
    parsed = parse_text(text)
    if parsed.findings or name_problems(parsed):
        raise HandOver("the file does not parse or its names do not resolve")
    if check_units(parsed.statements):
        raise HandOver("a unit finding")
    return list(parsed.statements)


class _Model:
    """The statements sorted by kind, checked against the class the route answers, and the
    plant read from them into the graph."""

    def __init__(self, statements: list[Any]):
        from plantlint.language.written import Refused, read_with_values

        self.statements = statements
        self.name = statements[0].name if statements and statements[0].kind == "plant" else None
        if self.name is None:
            raise HandOver("no plant header")
        self.by_kind: dict[str, list[Any]] = {}
        for st in statements[1:]:
            self.by_kind.setdefault(st.kind, []).append(st)
        unknown = set(self.by_kind) - {"const", "param", "state", "input", "let", "rate", "output", "point", "expect"}
        if unknown:
            raise HandOver(f"statements the route does not take: {', '.join(sorted(unknown))}")
        if any(st.tolerance is not None for st in self.by_kind.get("point", [])):
            raise HandOver("a point with a tolerance")
        try:
            self.written, self._values = read_with_values(statements)
        except Refused as why:
            raise HandOver(f"the graph reader refused the model: {why}") from None
        plant = self.written
        if not 1 <= len(plant.states) <= MAX_STATES:
            raise HandOver("no states, or more than the route tries")
        if not plant.outputs or len(plant.outputs) != len(plant.inputs):
            raise HandOver("not as many outputs as inputs")
        nominal = self._constants_rational()
        self.boxes = {st.name: self._range(st) for st in self.by_kind["state"]}
        #: the ranged parameters' intervals, in the order of the graph's variables after the states
        ranged = {st.name: (self._range(st), nominal[st.name])
                  for st in self.by_kind.get("param", []) if st.low is not None}
        if any(box is None or not box[0] <= value <= box[1] for box, value in ranged.values()):
            raise HandOver("a parameter's nominal value outside its range")  # the bad-range rule
        self.param_boxes = [ranged[name][0] for name in plant.params]
        self.input_boxes = {st.name: self._range(st) for st in self.by_kind.get("input", []) if st.low is not None}
        if any(b is None for b in self.boxes.values()):
            raise HandOver("a state without a range")
        self._all_used()

    def value(self, expr: Any) -> Fraction:
        """An expression's exact rational value (constants put in), or hand over."""
        from plantlint.language.written import Refused

        try:
            number = self._values.rational(expr)
        except Refused as why:
            raise HandOver(str(why)) from None
        if number is None:
            raise HandOver("a value that is not an exact rational number")
        return number

    def point_value(self, expr: Any, formal: Any) -> Any:
        """A point's value: an exact rational, or else (pi/4, m g l sin(pi/4) / k) a formal
        number of ``formal`` (:class:`~plantlint.kernel.formal.FormalField`): its pi, sines
        and square roots are unknowns shared with the rates evaluated at the point."""
        from plantlint.language.written import Refused

        try:
            node = self._values.node(expr)
        except Refused as why:
            raise HandOver(str(why)) from None
        graph = self._values.graph
        op, _, data = graph.nodes[node]
        if op == "const":
            return data
        names = graph.variables
        if any(names[v] not in self.written.params for v in graph.variables_of(node)):
            raise HandOver("a point value that depends on a state or an input")
        zero = formal.const(Fraction(0))
        point = [self.parameter(name, formal) if name in self.written.params else zero for name in names]
        try:
            return Towers((), names, (), (), (node,), graph=graph).values(point, formal)[2][0]
        except (Undefined, Inexact) as why:
            raise HandOver(f"a point value that is not read exactly: {why}") from None

    def parameter(self, name: str, formal: Any) -> Any:
        """A ranged parameter as a formal unknown whose ball holds its whole interval: an
        identity in it holds for every value, and a ball over it bounds every value."""
        lo, hi = self.param_boxes[self.written.params.index(name)]
        return formal.parameter(name, ball(lo, hi))

    def _constants_rational(self) -> dict[str, Fraction]:
        """Every constant's and parameter's (nominal) value, each an exact rational."""
        return {st.name: self.value(st.expr) for st in [*self.by_kind.get("const", []), *self.by_kind.get("param", [])]}

    def _range(self, st: Any) -> tuple[Fraction, Fraction] | None:
        if st.low is None or st.high is None:
            return None
        lo, hi = self.value(st.low), self.value(st.high)
        if not lo < hi:
            raise HandOver(f"the range of {st.name} is not lo < hi")
        return lo, hi

    def _all_used(self) -> None:
        """Every constant, parameter, definition and input is mentioned by an expression
        the model build also marks as used (so its unused-name rule stays silent)."""
        mentioned: set[str] = set()
        for st in self.statements:
            if st.kind in ("const", "param", "let", "rate", "output"):
                mentioned.update(ref.name for ref in (st.expr.names if st.expr is not None else ()))
        for kind in ("const", "param", "let", "input"):
            for st in self.by_kind.get(kind, []):
                if st.name not in mentioned:
                    raise HandOver(f"'{st.name}' may be unused")


# -- structure -------------------------------------------------------------------------

def _structural_degrees(plant: Any) -> list[int]:
    """For each output the first k at which a state its k-th Lie derivative along f can read
    is driven by an input: L_g L_f^j h = 0 identically for j < k, by the dependency graph
    alone (deps(L_f phi) lies in deps(phi) and the states the rates of deps(phi) read). The
    row at k is then shown not to vanish at a point (``_decoupling``), which makes k + 1 the
    relative degree: the rows below it vanish identically, that one does not."""
    graph, n = plant.graph, len(plant.states)

    def states(node: int) -> set[int]:  # the graph's variables: the states, then the ranged parameters
        return {v for v in graph.variables_of(node) if v < n}

    reads = [states(node) for node in plant.f]
    driven = {i for i in range(n) if any(not _zero(graph, col[i]) for col in plant.g)}
    if not driven:
        raise HandOver("no input enters a rate")
    degrees = []
    for node in plant.h:
        seen, k = states(node), 0
        while not seen & driven:
            grown = seen.union(*(reads[i] for i in seen))
            if grown == seen or k >= n:
                raise HandOver("an output the inputs never reach")
            seen, k = grown, k + 1
        degrees.append(k)
    if sum(d + 1 for d in degrees) != n:
        raise HandOver("the relative degrees (structural) do not sum to n")
    return degrees


def _zero(graph: Any, node: int) -> bool:
    op, _, value = graph.nodes[node]
    return op == "const" and value == 0


def _nonsingular_at(towers: Any, vector: Sequence[Any], degrees: list[int], formal: Any) -> bool:
    """The decoupling matrix proven nonsingular at a point: of rational states, exactly or
    by balls (:func:`_decoupling`); of formal numbers (pi/4, a ranged parameter), in them:
    elimination on pivots proven non-zero (balls tightened over the parameters' intervals),
    so det A = +-(the pivots' product) is non-zero for every parameter value."""
    if formal is None:
        return nonsingular(_decoupling(towers, vector, degrees))
    rows = towers.lglf(vector, max(degrees), formal)
    matrix = [rows[i][d] for i, d in enumerate(degrees)]
    try:
        _eliminated([[*row, formal.const(Fraction(0))] for row in matrix], len(matrix), formal)
    except HandOver:
        return False
    return True


def _decoupling(towers: Any, vector: Sequence[Fraction], degrees: list[int]) -> list[list[Any]]:
    """A[i][j] = L_gj L_f^(r_i - 1) h_i at the point: exact rationals when they are, else
    balls at 256 bits."""
    from plantlint.kernel.taylor import ArbField, QField

    try:
        rows = towers.lglf(vector, max(degrees), QField())
    except Inexact:
        rows = towers.lglf(vector, max(degrees), ArbField(256))
    return [rows[i][d] for i, d in enumerate(degrees)]


# -- points ----------------------------------------------------------------------------

def _equilibrium(model: _Model, towers: Any, st: Any) -> tuple[str, list[Any], Any]:
    """The point's vector (states, then ranged parameters), once it is proven an exact
    equilibrium inside the ranges (its missing inputs solved uniquely, inside theirs), and
    the formal field its numbers belong to (None: rational states, no ranged parameter)."""
    from plantlint.kernel.formal import FormalField
    from plantlint.kernel.taylor import QField

    plant = model.written
    formal = FormalField()  # one per point: its values and its rates share the unknowns (pi, sin(pi/4))
    given: dict[str, Any] = {}
    for target, expr in st.assignments:
        if target.name in given or target.name not in (*plant.states, *plant.inputs):
            raise HandOver(f"point {st.name} assigns {target.name} twice or assigns no state or input")
        given[target.name] = model.point_value(expr, formal)
    if any(s not in given for s in plant.states):
        raise HandOver(f"point {st.name} leaves out a state")
    vector = [given[s] for s in plant.states] + [model.parameter(p, formal) for p in plant.params]
    for s in plant.states:
        _inside(given[s], model.boxes[s], st.name)
    known = [j for j, u in enumerate(plant.inputs) if u in given]
    unknown = [j for j, u in enumerate(plant.inputs) if u not in given]
    if any(not isinstance(v, Fraction) for v in [*given.values(), *vector]):
        _solved_formally(model, towers, vector, given, known, unknown, st.name, formal)
        return st.name, [v if not isinstance(v, Fraction) else formal.const(v) for v in vector], formal
    try:
        f0, G0, _ = towers.values(vector, QField())
    except Undefined:
        raise HandOver(f"the rates are not defined at point {st.name}") from None
    except Inexact:  # a value is not rational there (sin(1/4)): solved with formal numbers
        _solved_formally(model, towers, vector, given, known, unknown, st.name, formal)
        return st.name, vector, None
    f = [_fraction(v) for v in f0]
    G = [[_fraction(v) for v in col] for col in G0]
    c = [f[i] + sum((G[j][i] * given[plant.inputs[j]] for j in known), Fraction(0)) for i in range(len(f))]
    solved = _solve([[G[j][i] for j in unknown] for i in range(len(f))], [-x for x in c])
    for j, u in zip(unknown, solved):
        given[plant.inputs[j]] = u
    for name, box in model.input_boxes.items():
        _inside(given[name], box, st.name)
    return st.name, vector, None


def _fraction(v: Any) -> Fraction:
    return Fraction(int(v.p), int(v.q))


def _solved_formally(model: _Model, towers: Any, vector: list[Any], given: dict[str, Any], known: list[int],
                     unknown: list[int], point: str, formal: Any) -> None:
    """A point whose values or rates are not rational (a link at pi/4, a holding torque
    g l m sin(1/4)), computed with formal numbers (:mod:`plantlint.kernel.formal`: pi, the
    sines, the square roots are unknowns of a polynomial ring, each number carries a
    rigorous ball). An equilibrium when every rate that no input enters is formally 0 (an
    identity, whatever the unknowns stand for) and the others, one per missing input,
    determine those inputs uniquely (elimination on pivots whose balls exclude 0); the
    inputs are then exact numbers, each shown inside its range by its ball. Anything the
    formal numbers do not settle (an identity such as sin^2 + cos^2 = 1) is handed over:
    the full analysis decides it with sympy."""
    plant = model.written
    graph, n = plant.graph, len(plant.states)
    driven = [i for i in range(n) if any(not _zero(graph, col[i]) for col in plant.g)]
    try:
        f0, G0, _ = towers.values(vector, formal)
        c = [f0[i] + sum((G0[j][i] * given[plant.inputs[j]] for j in known), formal.const(Fraction(0)))
             for i in range(n)]
        for i in range(n):
            if i not in driven and not formal.is_zero(c[i]).proven_zero:
                raise HandOver(f"the rate of {plant.states[i]}, which no input enters, is not proven 0 "
                               f"at point {point}")
        solved = _eliminated([[G0[j][i] for j in unknown] + [-c[i]] for i in driven], len(unknown), formal)
        for j, u in zip(unknown, solved):
            given[plant.inputs[j]] = u
    except Undefined:
        raise HandOver(f"the rates are not defined at point {point}") from None
    except Inexact as why:  # the formal numbers did not settle a step (kernel.formal.Unsettled)
        raise HandOver(f"a value at point {point}: {why}") from None
    for name in given:
        if name in model.input_boxes:
            _inside(given[name], model.input_boxes[name], point)


def _eliminated(rows: list[list[Any]], k: int, formal: Any) -> list[Any]:
    """The unique solution u of A u = b, [A | b] given as rows of formal numbers with k
    unknowns (at least k rows): Gauss-Jordan elimination, each pivot the first entry of
    its column proven non-zero (its ball excludes 0), and every row left over proven
    formally 0 (the equations agree). Hand over when a column has no such pivot (the
    inputs not determined, or not proven so) or a row left over is not proven 0."""
    rows = [list(r) for r in rows]
    if len(rows) < k:
        raise HandOver("the point does not determine its inputs")
    for col in range(k):
        pivot = next((r for r in range(col, len(rows)) if formal.is_zero(rows[r][col]).proven_nonzero), None)
        if pivot is None:
            raise HandOver("the point does not determine its inputs (not proven)")
        rows[col], rows[pivot] = rows[pivot], rows[col]
        inverse = rows[col][col].inverse()
        rows[col] = [x * inverse for x in rows[col]]
        for r in range(len(rows)):
            if r != col and not formal.is_zero(rows[r][col]).proven_zero:
                factor = rows[r][col]
                rows[r] = [a - factor * b for a, b in zip(rows[r], rows[col])]
    if any(not formal.is_zero(x).proven_zero for r in rows[k:] for x in r):
        raise HandOver("the point is not proven an equilibrium (equations left over)")
    return [r[k] for r in rows[:k]]


def _inside(value: Any, box: tuple[Fraction, Fraction], point: str) -> None:
    """An exact rational inside the closed range; a formal number strictly inside it by its
    ball (or exactly, when it is a rational constant)."""
    if not isinstance(value, Fraction):
        if value.is_constant():
            r = value.rational()
            value = Fraction(int(r.p), int(r.q))
        elif _strictly_inside(value.ball, box) or _strictly_inside(value.refined(), box):  # tightened only when needed
            return
        else:
            raise HandOver(f"a value of point {point} is not proven inside its range")
    if not box[0] <= value <= box[1]:
        raise HandOver(f"a value of point {point} lies outside its range")


def _strictly_inside(ball: Any, box: tuple[Fraction, Fraction]) -> bool:
    return bool(ball.is_finite() and ball > rational_ball(box[0]) and ball < rational_ball(box[1]))


def _solve(rows: list[list[Fraction]], rhs: list[Fraction]) -> list[Fraction]:
    """The unique exact solution of rows . u = rhs (n equations, k unknowns), or hand over
    (no solution: not an equilibrium; several: an input not determined). python-flint's
    reduced row echelon form of [rows | rhs]: a unique solution has rank k on both sides,
    and then the first k rows read I | u."""
    from flint import fmpq, fmpq_mat

    k = len(rows[0]) if rows else 0
    if k == 0:
        if any(b != 0 for b in rhs):
            raise HandOver("the point is not an equilibrium")
        return []
    exact = [[fmpq(x.numerator, x.denominator) for x in [*r, b]] for r, b in zip(rows, rhs)]
    if fmpq_mat([r[:k] for r in exact]).rank() < k:
        raise HandOver("the point does not determine its inputs")
    reduced, rank = fmpq_mat(exact).rref()
    if rank > k:
        raise HandOver("the point is not an equilibrium")
    return [_fraction(reduced[i, k]) for i in range(k)]


# -- the envelope ----------------------------------------------------------------------

def _envelope(model: _Model, towers: Any, degrees: list[int], seconds: float,
              stop: Callable[[], bool] | None = None) -> None:
    """Over the state box the model is defined and the decoupling matrix is nonsingular
    (:func:`plantlint.kernel.regularity.prove_regular`), within few boxes and seconds."""
    plant = model.written
    box = [model.boxes[s] for s in plant.states] + model.param_boxes
    proof = prove_regular(towers, box, degrees, MAX_BOXES, seconds, stop)
    if proof.stopped == "stopped":
        raise HandOver("the full analysis answered first")
    if not proof.proven:
        raise HandOver(f"the envelope proof did not finish within its {proof.stopped}")


# -- claims ----------------------------------------------------------------------------

def _claims(model: _Model, degrees: list[int]) -> None:
    """Every claim is one the route shows to hold, written once, naming what exists."""
    plant = model.written
    points = {st.name for st in model.by_kind.get("point", [])}
    seen: set[tuple[str, str | None, str | None]] = set()
    for st in model.by_kind.get("expect", []):
        claim = st.claim
        output = claim.output.name if claim.output is not None else None
        point = st.at_point.name if st.at_point is not None else None
        key = (claim.kind, output, point)
        if claim.kind not in CLAIMS or key in seen or (point is not None and point not in points):
            raise HandOver("a claim the route does not show")
        seen.add(key)
        if claim.kind == "relative_degree":
            if output not in plant.outputs or claim.value is None:
                raise HandOver("a relative degree claim the route does not show")
            if model.value(claim.value) != degrees[plant.outputs.index(output)] + 1:
                raise HandOver("a relative degree claim that does not hold")
        elif output is not None or claim.value is not None:
            raise HandOver("a claim in a form the route does not show")
        elif claim.kind == "minimum_phase" and not points:
            raise HandOver("minimum phase claimed without an operating point to hold it at")


__all__ = ["CLAIMS", "HandOver", "LightPass", "MAX_BOXES", "MAX_SECONDS", "MAX_STATES", "light_check", "prove_clean"]
