"""Full-state (input-state) linearizability: controllability distributions.

Single input: D_k = span{g, ad_f g, ..., ad_f^k g}. Several inputs:
G_k = span{ad_f^j g_i : j <= k, every input i}. The plant is state linearizable
near x0 when G_(n-1) has rank n at x0, every G_k has constant rank near x0 and
G_k is involutive for k <= n-2 (theory notes, "Full-state linearization").

Why the analysis is split in two:

* :func:`analyse_distributions` works with functions (generic ranks and
  involutivity). For analytic data "constant rank near x0" means "rank at x0
  equals the generic rank", and a bracket that leaves the span somewhere leaves
  it near every point, so the expensive symbolic work is done once per plant.
* :func:`distributions_at` then only needs exact numbers at each point.

Generic ranks and span membership use bordered minors of the original
entries (no elimination swell): with a basis B and rows I whose minor is proved
non-zero, a column lies in span B exactly when every det M[I + i, B + c]
vanishes identically. A minor whose pattern of non-zero entries has no perfect
matching is zero by structure; balls at the kernel's samples prove "non-zero";
other zeros are proved by multiplying out or by Kernel.is_zero. A D_k spanned by
fields that live in as many coordinates as its rank is involutive by structure. At a point, exact numbers
are eliminated with pivots decided by Kernel.value_at.

Findings: the generic ``not-involutive`` (anchor "plant") sits in
``DistributionStructure.findings``; per point, ``not-controllable`` and a
``distribution-rank-drop`` for a distribution whose rank drops at the point (a
singular point: not of constant rank there, whether or not it is involutive) sit
in ``PointDistributions.findings``. Involutivity is a property near a point: a
failing bracket may vanish, or lie in D_k, at the point itself, so the reason
names a nearby point where it is proven to leave D_k.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass, field
from fractions import Fraction
from math import gcd, isfinite, lcm
from typing import Any

import sympy as sp
from flint import arb

from plantlint.core import anchors
from plantlint.core.deadline import LATE, bounded
from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding
from plantlint.kernel import decision as zd
from plantlint.kernel.decision import ZeroDecision
from plantlint.kernel import exact
from plantlint.kernel.exact import ball_rank
from plantlint.kernel.laurent import expanded, identically_zero
from plantlint.kernel.lie import Kernel, Vector, has_nested_arguments, has_symbolic_denominator, matrix_at
from plantlint.kernel.rational import flint_matrix, flint_rational, matrix_entries, sympy_rational
from plantlint.kernel.precision import precision
from plantlint.language.printer import listed, show_expr, show_point
from plantlint.analysis.linearizing_output import OutputSearch



@dataclass(frozen=True)
class SpanningField:
    """One spanner ad_f^order g_input of the distributions."""

    label: str  # "g", "ad_f g", "ad_f^2 g" (one input); "g1", "ad_f g2" (several)
    input_index: int
    order: int
    vector: Vector


@dataclass(frozen=True)
class BracketFailure:
    """A bracket of two spanners that leaves the distribution."""

    order: int  # k of D_k / G_k
    left: str
    right: str
    certain: bool
    #: the bracket itself and a basis of D_k (for a witness near a point; not compared)
    bracket: Vector = field(default=(), compare=False, repr=False)
    basis: tuple[Vector, ...] = field(default=(), compare=False, repr=False)

    @property
    def pair(self) -> str:
        return f"[{self.left}, {self.right}]"


@dataclass
class DistributionStructure:
    """Generic (function-level) facts about D_0 .. D_(n-1) of one plant."""

    n: int
    m: int
    fields: tuple[SpanningField, ...]
    #: generic rank of D_k, k = 0 .. n-1, or up to the first D_k that is not involutive
    #: (the analysis stops there: then the last entry is not the controllability rank)
    ranks: tuple[int, ...]
    bases: tuple[tuple[int, ...], ...]  # indices into ``fields`` of a basis of D_k
    involutive_by_order: tuple[bool, ...]  # D_k involutive, k = 0 .. n-2
    failures: tuple[BracketFailure, ...]  # first failing pair of each non-involutive D_k
    uncertain: tuple[str, ...]  # decisions taken as zero without symbolic proof
    findings: tuple[Finding, ...]
    outputs: "OutputSearch | None" = field(default=None, repr=False)  # single input only

    @property
    def involutive(self) -> bool:
        return all(self.involutive_by_order)

    @property
    def failure(self) -> BracketFailure | None:
        return self.failures[0] if self.failures else None

    def name(self, k: int) -> str:
        return distribution_name(self.m, k)

    def spanners(self, k: int) -> str:
        """``D_k = span{g, ad_f g, ...}``; past the third order the middle is elided
        (``span{g, ad_f g, ..., ad_f^15 g}``), as one writes it by hand."""
        orders = list(range(k + 1))
        shown = orders if k <= 3 else [0, 1, None, k]
        labels = ["..." if order is None else _labels(self.m, j, order)
                  for order in shown for j in (range(self.m) if order is not None else [0])]
        return f"{self.name(k)} = span{{{', '.join(labels)}}}"


@dataclass(frozen=True)
class PointDistributions:
    """The distributions at one operating point."""

    point: str
    ranks: tuple[int, ...]  # exact rank of D_k at the point, k = 0 .. n-1
    generic_ranks: tuple[int, ...]
    singular_orders: tuple[int, ...]  # k where the rank drops at the point only
    controllability_rank: int
    #: the combinations of the states no input moves at the point, as text (``5*X + 2*S``):
    #: covectors annihilating D_(n-1) there (a basis of the left null space of its columns)
    missing_directions: tuple[str, ...]
    missing_vectors: tuple[tuple[sp.Expr, ...], ...]  # their coefficients
    involutive: bool
    state_linearizable: bool
    failure: BracketFailure | None
    output_searched: bool
    linearizing_output: sp.Expr | None
    notes: tuple[str, ...]
    findings: tuple[Finding, ...]
    #: every D_k, k <= n-2, has at the point the rank it has around it (Frobenius needs it);
    #: ``involutive`` only says whether brackets stay in the distributions near the point
    constant_rank: bool = True
    #: when not involutive: whether the failing bracket lies in D_k at the point itself
    #: (involutivity is a property of a neighbourhood, so it can) and a nearby point where it
    #: is proven to leave D_k (state name -> value)
    bracket_inside_at_point: bool | None = None
    witness: dict[str, float] | None = None
    m: int = 1  # inputs (names D_k for one, G_k for several)
    #: some fields are undefined at the point (a derivative does not exist there): the ranks
    #: are lower bounds, so no rank deficit is reported and no verdict is drawn from them
    undefined: bool = False


def involutivity_reason(pd: PointDistributions, name: str) -> str:
    """Why the distributions are not involutive near a point, in words, with the witness."""
    failure = pd.failure
    if failure is None:
        return ""
    d = distribution_name(pd.m, failure.order)
    text = f"{d} is not involutive near '{name}': the bracket {failure.pair} leaves it"
    if pd.bracket_inside_at_point is False:
        return text + f" at '{name}' itself"
    where = show_point(pd.witness) if pd.witness else None
    text += f" at points arbitrarily close to '{name}'" + (f", e.g. at {where}" if where else "")
    if pd.bracket_inside_at_point:
        text += f" (at '{name}' itself it lies in {d}, but involutivity is a property of a neighbourhood)"
    return text


def rank_drop_reason(pd: PointDistributions, name: str) -> str:
    """The constant-rank condition, in words: which distributions lose rank at the point."""
    low = [k for k in pd.singular_orders if k <= len(pd.ranks) - 2]
    if not low:
        return ""
    parts = [f"{distribution_name(pd.m, k)} has rank {pd.ranks[k]} there but {pd.generic_ranks[k]} "
             "around it" for k in low]
    return f"the distributions lose rank at '{name}' ({'; '.join(parts)}): the constant-rank condition fails"


def distribution_name(m: int, k: int) -> str:
    return f"{'D' if m == 1 else 'G'}_{k}"


# -- elimination with rigorous pivots -------------------------------------------------
class _PointEchelon:
    """Column echelon form of exact numbers (a point), one column at a time;
    each pivot is proved non-zero by ``decide`` (exact / rigorous ball tests).

    Not built on :func:`plantlint.kernel.exact.gauss_jordan`, on purpose: the question
    here is incremental (is *this* new vector independent of the ones kept so far?), asked
    in the order of the spanners, and the answer picks the basis of every D_k and the
    Kalman rank. ``gauss_jordan`` reduces a whole matrix at once, so answering per vector
    with it would redo the elimination for each one (quadratic in the number of vectors,
    each step on exact, possibly transcendental numbers), and its pivot is the entry of
    largest magnitude (a 30-digit evaluation of every candidate), where this one takes the
    smallest expression that is proven non-zero (fewer and cheaper decisions). Both take
    an entry not proven non-zero as zero, so the ranks agree.
    """

    def __init__(self, decide: Callable[[sp.Expr], ZeroDecision], size: Callable[[sp.Expr], int] | None = None):
        self.decide = decide
        self.size = size or _size
        self.pivots: list[tuple[int, list[sp.Expr]]] = []

    def add(self, column: Sequence[sp.Expr]) -> bool:
        """Add a column; True when it is independent of the previous ones."""
        v = list(column)
        for row, w in self.pivots:
            if v[row] != 0:
                ratio = v[row] / w[row]
                v = [vi - ratio * wi if wi != 0 else vi for vi, wi in zip(v, w)]
                v[row] = sp.Integer(0) if isinstance(v[row], sp.Basic) else v[row] * 0  # exactly zero, in kind
        used = {row for row, _ in self.pivots}
        for i in sorted((i for i in range(len(v)) if i not in used and v[i] != 0), key=lambda i: self.size(v[i])):
            if self.decide(v[i]).proven_nonzero:
                self.pivots.append((i, v))
                return True
        return False


#: Entries at least this large (tree nodes) are left as they are by _normal.
NORMAL_SIZE = 2000
#: Wall-clock bound of working out the combinations the input does not move, named in a message.
MESSAGE_SECONDS = 1.0


class _BorderedMinors:
    """Generic rank and span membership from bordered minors.

    Keeps a basis B of columns and rows I with det M[I, B] not identically zero
    (proved). A column c lies in span B exactly when every bordered minor
    det M[I + i, B + c] vanishes identically (the bordered-minor theorem), so
    each decision is a kernel zero test on a determinant of the original
    entries (no elimination swell). Floating-point values at one sample only
    order the rows so that a non-zero minor is usually met first.
    """

    def __init__(self, kernel: Kernel):
        self.kernel = kernel
        self.n = kernel.plant.n
        self.columns: list[Vector] = []
        self.rows: list[int] = []
        self.uncertain = False
        self._dets: dict[tuple[tuple[int, ...], int], sp.Expr] = {}
        self._sample: dict[sp.Symbol, Fraction] | None = None
        self._floats: list[list[float]] = []
        self._ball_cache: dict[int, tuple[Vector, list[arb] | None]] = {}
        self._supports: dict[int, tuple[Vector, frozenset[int]]] = {}
        samples = kernel.samples()
        if samples:
            self._sample = samples[0]

    def _numeric(self, column: Vector) -> list[float]:
        if self._sample is None:
            return [0.0] * self.n
        symbols = self.kernel.free_symbols()
        try:
            balls = Program(list(column), symbols).run(
                [arb(self._sample[s].numerator) / self._sample[s].denominator for s in symbols], 64
            )
        except UnsupportedExpression:
            return [0.0] * self.n
        return [float(b.mid()) if b.is_finite() else 0.0 for b in balls]

    def _row_order(self, column: Vector, upto: int) -> list[int]:
        """Rows outside I, largest floating-point Schur residual first: the column less
        its combination of the basis that matches it on the rows I (a heuristic only;
        every decision is a proof on the exact minors)."""
        values = self._numeric(column)
        rows = self.rows[:upto]
        residual = values
        if rows:
            basis = self._floats[:upto]  # upto columns of n floats
            square = [[basis[j][i] for j in range(len(rows))] for i in rows]
            coefficients = _float_solve(square, [values[i] for i in rows])
            residual = [values[i] - sum(c * basis[j][i] for j, c in enumerate(coefficients)) for i in range(self.n)]
        free = [i for i in range(self.n) if i not in rows]
        return sorted(free, key=lambda i: -abs(residual[i]))

    def _det(self, rows: tuple[int, ...], columns: list[Vector], key_columns: int) -> sp.Expr:
        """Laplace expansion along the last column, memoised over the basis prefix."""
        k = len(rows)
        if k == 0:
            return sp.Integer(1)
        memo_key = (rows, key_columns) if key_columns == k else None
        if memo_key is not None and memo_key in self._dets:
            return self._dets[memo_key]
        last = columns[k - 1]
        total = sp.Integer(0)
        for position, i in enumerate(rows):
            entry = last[i]
            if entry == 0:
                continue
            sub = self._det(rows[:position] + rows[position + 1 :], columns, min(key_columns, k - 1))
            if sub != 0:
                total += (-1) ** (position + k - 1) * entry * sub
        if memo_key is not None:
            self._dets[memo_key] = total
        return total

    def _balls(self, column: Vector) -> list[arb] | None:
        """The column at the sample point as rigorous balls (cached per column)."""
        key = id(column)
        if key not in self._ball_cache:
            value: list[arb] | None = None
            if self._sample is not None:
                symbols = self.kernel.free_symbols()
                try:
                    value = Program(list(column), symbols).at(self._sample, BALL_PREC)
                except UnsupportedExpression:
                    value = None
            self._ball_cache[key] = (column, value)
        return self._ball_cache[key][1]

    def _support(self, column: Vector) -> frozenset[int]:
        """Rows where the column is not a literal 0 (cached per column)."""
        key = id(column)
        if key not in self._supports:
            self._supports[key] = (column, frozenset(i for i, e in enumerate(column) if e != 0))
        return self._supports[key][1]

    def _nonzero_at_sample(self, rows: tuple[int, ...], basis: list[Vector]) -> bool:
        """True when the minor is *proven* non-zero by its value at the sample point
        (ball Gaussian elimination): then no symbolic determinant is needed."""
        columns = [self._balls(c) for c in basis]
        if any(c is None for c in columns):
            return False
        M = [[columns[j][i] for j in range(len(basis))] for i in rows]  # type: ignore[index]
        return _ball_det_nonzero(M)

    def _bordered(self, column: Vector, upto: int) -> Iterator[tuple[int, ZeroDecision]]:
        basis = self.columns[:upto] + [column]
        for i in self._row_order(column, upto):
            rows = tuple(sorted(self.rows[:upto] + [i]))
            if not _structurally_nonsingular(rows, [self._support(c) for c in basis]):
                yield i, zd.proven_zero("structural")
                continue
            if self._nonzero_at_sample(rows, basis):
                yield i, zd.proven_nonzero("ball")
                continue
            minor = self._det(rows, basis, upto)
            yield i, _decide_generic(self.kernel, minor)

    def add(self, column: Vector) -> bool:
        """Add a column; True when it is independent of the basis so far."""
        certain = True
        for i, d in self._bordered(column, len(self.columns)):
            if d.proven_nonzero:
                self._floats.append(self._numeric(column))
                self.columns.append(column)
                self.rows.append(i)
                return True
            certain = certain and d.certain
        self.uncertain = self.uncertain or not certain
        return False

    def member(self, column: Vector, upto: int) -> tuple[bool, bool]:
        """(column in span of the first ``upto`` basis columns, decided with proof)."""
        certain = True
        for _, d in self._bordered(column, upto):
            if d.proven_nonzero:
                return False, True
            certain = certain and d.certain
        return True, certain


BALL_PREC = 128


def _structurally_nonsingular(rows: Sequence[int], columns: Sequence[frozenset[int]]) -> bool:
    """Can det M[rows, columns] be non-zero at all, judged from its literal zeros only?
    (``columns`` are given by their supports: the rows where an entry is not a literal 0.)

    A structural zero, not a numeric guess: by the Leibniz formula the determinant is a
    sum over bijections rows -> columns of products of entries, so when the bipartite
    graph of the entries that are not a literal 0 has no perfect matching, every term
    contains a literal 0 and the determinant is identically zero, with no symbolic work
    (Frobenius-Koenig theorem; a zero row or a zero bracket is the simplest case). When
    a matching exists nothing is concluded: the symbolic / ball tests decide as before.
    """
    size = len(rows)
    if len(columns) != size:
        return True
    adjacent = [[c for c in range(size) if r in columns[c]] for r in rows]
    owner: list[int] = [-1] * size  # column -> matched row position

    def augment(r: int, seen: list[bool]) -> bool:
        for c in adjacent[r]:
            if not seen[c]:
                seen[c] = True
                if owner[c] < 0 or augment(owner[c], seen):
                    owner[c] = r
                    return True
        return False

    return all(augment(r, [False] * size) for r in range(size))


def _float_solve(M: list[list[float]], b: list[float]) -> list[float]:
    """x with M x = b for a small square M (Gaussian elimination with partial pivoting);
    an unknown whose pivot vanishes in floating point is set to 0. Used only to order
    rows, so rounding can change an order, never a result."""
    k = len(b)
    A = [list(row) + [rhs] for row, rhs in zip(M, b)]
    pivots: list[int | None] = []
    r = 0
    for c in range(k):
        best = max(range(r, k), key=lambda i: abs(A[i][c]), default=None)
        if best is None or not isfinite(A[best][c]) or A[best][c] == 0.0:
            pivots.append(None)
            continue
        A[r], A[best] = A[best], A[r]
        for i in range(r + 1, k):
            factor = A[i][c] / A[r][c]
            if factor:
                A[i] = [a - factor * p for a, p in zip(A[i], A[r])]
        pivots.append(r)
        r += 1
    x = [0.0] * k
    for c in reversed(range(k)):
        row = pivots[c]
        if row is not None:
            x[c] = (A[row][k] - sum(A[row][j] * x[j] for j in range(c + 1, k))) / A[row][c]
    return x


def _ball_det_nonzero(M: list[list[arb]]) -> bool:
    """Is the determinant of a square ball matrix certainly non-zero? Full proven rank
    of the ball elimination (kernel/exact.py) at the stage's precision."""
    with precision(BALL_PREC):
        return ball_rank(M)[0] == len(M)


def _decide_generic(kernel: Kernel, e: sp.Expr) -> ZeroDecision:
    """Is a minor identically zero? Balls at the kernel's samples prove "non-zero";
    a minor without symbolic denominators that multiplies out to 0 is proved
    zero (far cheaper than putting a large polynomial over a common
    denominator); everything else goes to the kernel's two-stage test."""
    if e == 0:
        return zd.proven_zero("structural")
    if _screened_nonzero(kernel, e):
        return zd.proven_nonzero("screened")
    # multiplied out in flint's ring (kernel/laurent.py): a zero there is a proof, and a
    # Laurent polynomial in symbols is decided either way (what expand, or the kernel's
    # screen and cancel, would conclude, without screening twice)
    quick = identically_zero(e)
    if quick is not None:
        return zd.proven_zero("expand") if quick else zd.proven_nonzero("expand")
    if not has_symbolic_denominator(e) and sp.expand(e) == 0:
        return zd.proven_zero("expand")
    return kernel.is_zero(e)


def _screened_nonzero(kernel: Kernel, e: sp.Expr) -> bool:
    symbols = kernel.free_symbols()
    try:
        program = Program([e], symbols)
    except UnsupportedExpression:
        return False
    for sample in kernel.samples():
        b = program.run([arb(sample[s].numerator) / sample[s].denominator for s in symbols], 128)[0]
        if zd.of_ball(b).proven_nonzero:
            return True
    return False


def _normal(e: sp.Expr) -> sp.Expr:
    """Multiply out a reduced entry so that exact cancellations show up
    structurally (a zero becomes 0, a constant pivot a number). Not a zero
    test: the kernel still decides every remainder."""
    if e.is_number or e.is_Symbol or _size(e, NORMAL_SIZE) >= NORMAL_SIZE:
        return e  # expanding a large entry costs more than the zero test it might save
    quick = expanded(e)
    if quick is not None:
        return quick
    if has_nested_arguments(e):
        # expand works inside function arguments too, and as written the entries of ad_f g
        # of a tyre force keep the common factors that the zero tests of the brackets cancel
        # (a single-track vehicle: 21 s and a budget stop -> 1.8 s)
        return e
    return sp.expand(e)


def _size(e: sp.Expr, cap: int = 400) -> int:
    count = 0
    for _ in sp.preorder_traversal(e):
        count += 1
        if count >= cap:
            break
    return count


def _block(kernel: Kernel, m: int, k: int) -> list[SpanningField]:
    """The spanners ad_f^k g_j of order k (memoised in the kernel)."""
    return [SpanningField(_labels(m, j, k), j, k, _expanded(kernel.expanded_ad(j, k))
                          or tuple(_normal(e) for e in kernel.ad(j, k))) for j in range(m)]


def _expanded(vector: Vector | None) -> Vector | None:
    """A field formed in the kernel's ring (every entry multiplied out, as _normal does with
    the tree-differentiated one), or None when it was not formed there or is so large
    that _normal would have left the tree-differentiated entry as it was."""
    if vector is None or any(_size(e, NORMAL_SIZE) >= NORMAL_SIZE for e in vector):
        return None
    return vector


def _labels(m: int, j: int, k: int) -> str:
    g = "g" if m == 1 else f"g{j + 1}"
    if k == 0:
        return g
    return f"ad_f {g}" if k == 1 else f"ad_f^{k} {g}"


# -- generic analysis -----------------------------------------------------------------
def analyse_distributions(kernel: Kernel) -> DistributionStructure:
    """Generic ranks and involutivity of D_0 .. D_(n-1) (G_k for several inputs)."""
    n, m = kernel.plant.n, kernel.plant.m
    echelon = _BorderedMinors(kernel)
    fields: list[SpanningField] = []
    basis: list[int] = []
    ranks: list[int] = []
    bases: list[tuple[int, ...]] = []
    uncertain: list[str] = []
    involutivity = _Involutivity(kernel, echelon, m)
    involutive: list[bool] = []
    failures: list[BracketFailure] = []
    for k in range(n if m else 0):
        if len(basis) == n:
            # D_(k-1) is already the whole tangent space, so every later D_k is too:
            # the higher brackets (where expressions swell most) are never built.
            ranks.append(n)
            bases.append(tuple(basis))
            if k <= n - 2:
                involutive.append(True)
            continue
        for spanner in _block(kernel, m, k):
            fields.append(spanner)
            if len(basis) < n and echelon.add(spanner.vector):
                basis.append(len(fields) - 1)
        if echelon.uncertain:
            uncertain.append(f"rank of {distribution_name(m, k)}: a remainder was taken as zero without proof")
            echelon.uncertain = False
        ranks.append(len(basis))
        bases.append(tuple(basis))
        if k <= n - 2:
            failure = involutivity.check(k, fields, tuple(basis))
            involutive.append(failure is None)
            if failure is not None:
                # the plant is not state linearizable: the higher distributions (the
                # costliest brackets) would not change the verdict; at equilibria the
                # controllability rank comes from the linearisation instead
                failures.append(failure)
                break
    if m == 0:  # no inputs: every distribution is {0}
        ranks, bases = [0] * n, [()] * n
        involutive = [True] * max(n - 1, 0)
    uncertain.extend(involutivity.uncertain)
    findings: list[Finding] = []
    if failures:
        first = failures[0]
        k = first.order
        labels = ", ".join(fields[i].label for i in bases[k])
        message = (
            f"{distribution_name(m, k)} = span{{{', '.join(f.label for f in fields if f.order <= k)}}} "
            f"is not involutive: the bracket {first.pair} leaves it (rank {ranks[k]}, basis {{{labels}}}); "
            "the plant is not state linearizable"
        )
        if not first.certain:
            message += " (some other remainders were taken as zero without symbolic proof)"
        findings.append(
            finding(
                "not-involutive",
                message,
                anchor=anchors.PLANT,
                hint="no output of relative degree n exists; consider input-output linearization "
                "with a chosen output instead",
            )
        )
    structure = DistributionStructure(
        n=n,
        m=m,
        fields=tuple(fields),
        ranks=tuple(ranks),
        bases=tuple(bases),
        involutive_by_order=tuple(involutive),
        failures=tuple(failures),
        uncertain=tuple(uncertain),
        findings=tuple(findings),
        outputs=OutputSearch(kernel, n, [f.vector for f in fields if f.order <= n - 2]) if m == 1 else None,
    )
    return structure


class _Involutivity:
    """Brackets every pair of basis fields of D_k and tests membership, order by order.

    Pairs of a basis suffice: brackets with a dependent spanner are
    combinations of these and of the spanners themselves. A pair found inside
    D_k is inside every later D_k too, so it is never tested twice.
    """

    def __init__(self, kernel: Kernel, echelon: _BorderedMinors, m: int):
        self.kernel = kernel
        self.echelon = echelon
        self.m = m
        self.member_from: dict[tuple[int, int], int] = {}
        self.uncertain: list[str] = []

    def check(self, k: int, fields: Sequence[SpanningField], basis: tuple[int, ...]) -> BracketFailure | None:
        n = self.kernel.plant.n
        rank = len(basis)
        if rank < n and len(frozenset().union(*(self.echelon._support(fields[i].vector) for i in basis))) == rank:
            # Structural proof, no bracket built: the basis fields are supported in a set S
            # of |S| = rank coordinates and have rank |S| generically, so D_k is the coordinate
            # distribution span{d/dx_i : i in S} (near generic points). A bracket
            # [a, b] = Db a - Da b has row i = sum_j (d b_i/dx_j) a_j - (d a_i/dx_j) b_j,
            # a literal 0 unless i lies in supp(a) or supp(b), so it is supported in S and
            # lies in D_k: the distribution is involutive (a coordinate distribution is).
            for a_pos in range(rank):
                for b_pos in range(a_pos + 1, rank):
                    self.member_from.setdefault((basis[a_pos], basis[b_pos]), k)
            return None
        for a_pos in range(rank):
            for b_pos in range(a_pos + 1, rank):
                pair = (basis[a_pos], basis[b_pos])
                if pair in self.member_from:
                    continue
                if rank == n:
                    self.member_from[pair] = k
                    continue
                X, Y = fields[pair[0]].vector, fields[pair[1]].vector
                expanded = _expanded(self.kernel.expanded_bracket(X, Y))
                if expanded is None:
                    bracket = self.kernel.bracket(X, Y)
                    expanded = tuple(_normal(e) for e in bracket)
                inside, certain = self.echelon.member(expanded, rank)
                if inside:
                    self.member_from[pair] = k
                    if not certain:
                        self.uncertain.append(
                            f"[{fields[pair[0]].label}, {fields[pair[1]].label}] taken to lie in "
                            f"{distribution_name(self.m, k)} without symbolic proof"
                        )
                    continue
                # the tree-differentiated bracket, as before, for the witness near a point
                bracket = self.kernel.bracket(X, Y)
                return BracketFailure(k, fields[pair[0]].label, fields[pair[1]].label, certain, bracket,
                                      tuple(fields[i].vector for i in basis))
        return None


# -- at a point ------------------------------------------------------------------------
def distributions_at(
    kernel: Kernel,
    structure: DistributionStructure,
    name: str,
    values: dict[sp.Symbol, sp.Expr],
) -> PointDistributions:
    """Exact ranks at the point, singular orders, the verdict and (one input) an output."""
    n, m = structure.n, structure.m
    decide = _PointDecider(kernel)
    ranks, basis, kalman = _ranks_at(kernel, structure, values, decide)
    control_rank = ranks[-1] if len(ranks) == n else 0
    if len(ranks) < n and kalman is not None:
        control_rank, basis = _kalman_rank(kalman, n, decide)
    notes: list[str] = list(structure.uncertain)
    undefined = bool(decide.undefined)
    # where fields are undefined the ranks are only lower bounds: no rank drop is read off them
    singular = () if undefined else tuple(k for k in range(min(len(structure.ranks), len(ranks)))
                                          if ranks[k] < structure.ranks[k])
    vectors = _missing_vectors(kernel, basis, notes) if control_rank < n and not undefined else []
    missing = tuple(_direction_text(v, kernel.plant.states) for v in vectors)
    if undefined:
        notes.append("some fields are undefined at the point (a derivative of the rates does not exist there): "
                     "ranks there are lower bounds, so no rank deficit is reported")
    for k in singular:
        notes.append(
            f"{structure.name(k)} has rank {ranks[k]} at {name} but {structure.ranks[k]} around it: "
            f"{name} is a singular point of the distribution"
        )
    # `involutive` keeps its meaning (brackets stay in the distributions near the point; a
    # one-dimensional distribution always is); a rank drop is the constant-rank condition
    linearizable = control_rank == n and not singular and structure.involutive and not undefined
    inside_at_point, witness = _witness_near(kernel, structure, name, values, notes)
    findings = [] if undefined else _point_findings(structure, name, ranks, control_rank, singular, missing)
    searched = m == 1 and linearizable and structure.outputs is not None
    output = _linearizing_output(structure, values, notes) if searched else None
    return PointDistributions(
        point=name,
        ranks=tuple(ranks),
        generic_ranks=structure.ranks,
        singular_orders=singular,
        controllability_rank=control_rank,
        missing_directions=missing,
        missing_vectors=tuple(tuple(v) for v in vectors),
        involutive=structure.involutive,
        state_linearizable=linearizable,
        failure=structure.failure,
        output_searched=searched,
        linearizing_output=output,
        notes=tuple(notes),
        findings=tuple(findings),
        constant_rank=not [k for k in singular if k <= n - 2],
        bracket_inside_at_point=inside_at_point,
        witness=witness,
        m=m,
        undefined=undefined,
    )


class _PointDecider:
    """Zero decisions of exact numbers at the point (the kernel's), remembering the
    entries that are undefined there (then the ranks are lower bounds)."""

    def __init__(self, kernel: Kernel):
        self.kernel = kernel
        self.undefined: list[str] = []

    def __call__(self, e: sp.Expr) -> ZeroDecision:
        d = self.kernel.value_at(e, {}).decision
        if d.outcome is zd.Outcome.UNDEFINED:
            self.undefined.append(str(e))
        return d


def _ranks_at(kernel: Kernel, structure: DistributionStructure, values: dict[sp.Symbol, sp.Expr],
              decide: _PointDecider) -> tuple[list[int], list[list[sp.Expr]], list[list[sp.Expr]] | None]:
    """The rank of each D_k at the point (k = 0 .. n-1), a basis of the last one, and the
    Kalman columns when they are needed.

    When the generic analysis stopped early (``structure.ranks`` shorter than n) and the
    point is an equilibrium of the drift, the ranks stop there and the Kalman columns give
    the controllability rank (:func:`_kalman_rank`)."""
    n, m = structure.n, structure.m
    known = len(structure.ranks)
    # the brackets' values at a rational point come from Taylor mode (exact, no symbolic
    # field evaluated); where a derivative does not exist there, no field does either.
    # Where the generic analysis stopped early, the Kalman columns decide past its last order
    # at an equilibrium of the drift: the brackets are formed to that order first, and to
    # n - 1 only when the point is not one (the quadrotor at hover: order 1, not 11; 16 ms
    # of brackets become 1 ms)
    undefined = "the brackets at the point (a derivative of the rates does not exist there)"
    top = known - 1 if m and 0 < known < n else n - 1
    taylor = _taylor_brackets(kernel, values, top) if m else None
    if taylor == "undefined":
        decide.undefined.append(undefined)
        return [0] * n, [], None
    if taylor is None and m and known and structure.ranks[-1] == n:
        # not rational at the point (sin(1/4)): balls prove lower bounds of the ranks, and a
        # point's rank never exceeds the generic one (n from where the generic analysis
        # reached it), so bounds equal to the generic ranks are the ranks (and the span is
        # full: no basis is needed for the combinations it misses)
        generic = list(structure.ranks) + [n] * (n - known)
        if _ball_ranks(kernel, values, n, m) == generic:
            return generic, [], None
    kalman = _kalman_columns(kernel, values, decide) if known < n else None
    if isinstance(taylor, list) and kalman is None and top < n - 1:
        taylor = _taylor_brackets(kernel, values, n - 1)
        if taylor == "undefined":
            decide.undefined.append(undefined)
            return [0] * n, [], None
    if taylor is None and m:
        # values that are not rational (sin(1/4)): Taylor mode on formal numbers proves the
        # zeros and the balls the non-zeros; only what neither settles takes the fields
        formal = _formal_ranks(kernel, values, n, m, known, kalman)
        if formal == "undefined":
            decide.undefined.append(undefined)
            return [0] * n, [], None
        if formal is not None:
            return formal[0], formal[1], kalman

    def rows(k: int) -> list[list[sp.Expr]]:
        if taylor:
            # ad_f^k g_j for every input: fields the generic analysis left out are dependent
            # identically, so at the point too, and the echelon skips them
            return [taylor[j][k] for j in range(m)]
        # the generic fields of order k; past where the generic analysis stopped, the kernel
        # builds the higher brackets
        block = [f for f in structure.fields if f.order == k] or _block(kernel, m, k)
        return [list(r) for r in matrix_at(kernel, [f.vector for f in block], values).tolist()]

    ranks, basis = _column_ranks(rows, n if m else 0, known, kalman, _PointEchelon(decide))
    return ranks or [0] * n, basis, kalman


def _column_ranks(rows: Callable[[int], list[list[Any]]], orders: int, known: int, kalman: object,
                  echelon: _PointEchelon) -> tuple[list[int], list[list[Any]]]:
    """The rank of each D_k (k < orders) at the point from its new columns, one order at a
    time, and the basis kept; past where the generic analysis stopped, the Kalman columns
    decide instead (the loop stops there)."""
    n = orders
    ranks: list[int] = []
    basis: list[list[Any]] = []
    for k in range(orders):
        if k >= known and kalman is not None:
            break
        if len(basis) == n:
            ranks.append(n)
            continue
        for row in rows(k):
            if len(basis) < n and echelon.add(row):
                basis.append(row)
        ranks.append(len(basis))
    return ranks, basis


def _formal_ranks(kernel: Kernel, values: dict[sp.Symbol, sp.Expr], n: int, m: int, known: int, kalman: object
                  ) -> tuple[list[int], list[list[sp.Expr]]] | str | None:
    """Ranks and basis at a rational point of a plant whose values there are not rational,
    from Taylor-mode brackets on formal numbers (:mod:`plantlint.kernel.formal`): every
    pivot proven non-zero by a ball, every entry left out proven zero formally. None when
    something is unsettled (the symbolic fields decide then); "undefined" as in
    :func:`_taylor_brackets`."""
    from plantlint.kernel.formal import PREC, Formal, FormalField, Unsettled
    from plantlint.kernel.taylor import Inexact, Undefined

    field = FormalField()
    at = kernel.towers_at(values)
    towers = at[0] if at is not None else kernel.towers() if kernel.route == "numeric" else None
    if towers is None:
        return None

    def settled(e: Formal) -> ZeroDecision:
        d = e.decision()
        if not d.certain:
            raise Unsettled("an entry neither formally zero nor away from 0 in its ball")
        return d

    with precision(PREC):
        if at is not None:
            vector = at[1]
        else:  # irrational values at the point (q = pi/4): formal numbers read from their sympy form
            full = dict(kernel.plant.param_nominal)
            full.update(values)
            try:
                vector = [field.number(full.get(s)) for s in kernel.free_symbols()]
            except (Inexact, Undefined, ValueError, TypeError):
                return None
        try:
            columns = towers.brackets(vector, n - 1, field)
            ranks, basis = _column_ranks(lambda k: [columns[j][k] for j in range(m)], n, known, kalman,
                                         _PointEchelon(settled, size=Formal.size))  # type: ignore[arg-type]
        except (Undefined, ZeroDivisionError):
            return "undefined"
        except Inexact:  # Unsettled among them
            return None
    return ranks or [0] * n, [[e.to_sympy() for e in row] for row in basis]


def _taylor_brackets(kernel: Kernel, values: dict[sp.Symbol, sp.Expr], order: int
                     ) -> list[list[list[sp.Expr]]] | str | None:
    """[j][k] = ad_f^k g_j(x0), k <= order, exactly, from the Taylor-mode flow
    (``Towers.brackets``, w(t) = M(t)^-1 g(x(t))): the numbers the symbolic brackets take
    at the point, without forming them. ``"undefined"`` when a value on the way is
    undefined there (a derivative of sqrt at 0); None when the point, or a value on the
    way, is not rational, or the plant is outside the straight-line programs."""
    from plantlint.kernel.taylor import Inexact, QField, Undefined

    at = kernel.towers_at(values)
    if at is None:
        return None
    towers, vector = at
    try:
        columns = towers.brackets(vector, order, QField())
    except (Undefined, ZeroDivisionError):
        return "undefined"
    except Inexact:
        return None
    return [[[sympy_rational(v) for v in column] for column in by_order] for by_order in columns]


def _ball_ranks(kernel: Kernel, values: dict[sp.Symbol, sp.Expr], n: int, m: int) -> list[int] | None:
    """Proven lower bounds of the ranks of D_0 .. D_(n-1) at a rational point, from
    Taylor-mode brackets in ball arithmetic; None when they cannot be formed there."""
    from plantlint.kernel.taylor import ArbField, Undefined

    at = kernel.towers_at(values)
    if at is None:
        return None
    towers, vector = at
    try:
        columns = towers.brackets(vector, n - 1, ArbField(BALL_PREC))
    except (Undefined, ZeroDivisionError):
        return None
    rows: list[list[arb]] = []
    bounds = []
    for k in range(n):
        rows += [list(columns[j][k]) for j in range(m)]
        bounds.append(ball_rank(rows)[0])
    return bounds


def _kalman_rank(kalman: list[list[sp.Expr]], n: int, decide: Callable[[sp.Expr], ZeroDecision]
                 ) -> tuple[int, list[list[sp.Expr]]]:
    """At an equilibrium of the drift, ad_f^k g(x0) = (-A)^k g(x0): the rank of G_(n-1)
    there is the rank of the Kalman matrix of the linearisation (and a basis of it)."""
    echelon = _PointEchelon(decide)
    basis: list[list[sp.Expr]] = []
    for column in kalman:
        if len(basis) < n and echelon.add(column):
            basis.append(column)
    return len(basis), basis


def _missing_vectors(kernel: Kernel, basis: list[list[sp.Expr]], notes: list[str]) -> list[list[sp.Expr]]:
    """The directions the controllability distribution misses: they only name what is
    wrong in a message, so they are bounded in time (a note when cut short)."""
    vectors = bounded(MESSAGE_SECONDS, lambda: _orthogonal_complement(kernel, basis))
    if vectors is LATE:
        notes.append(f"the combinations the input does not move were not worked out: it took longer than {MESSAGE_SECONDS:g} s "
                     "(they only name the problem; the rank does not depend on them)")
        return []
    return vectors


def _witness_near(kernel: Kernel, structure: DistributionStructure, name: str, values: dict[sp.Symbol, sp.Expr],
                  notes: list[str]) -> tuple[bool | None, dict[str, float] | None]:
    """When not involutive: whether the failing bracket lies in D_k at the point, and a
    nearby point where it leaves. Only illustrates the verdict (made generically):
    bounded, dropped with a note."""
    if structure.failure is None or not structure.failure.bracket:
        return None, None
    failure = structure.failure
    witness = bounded(MESSAGE_SECONDS, lambda: _involutivity_witness(kernel, failure, values))
    if witness is LATE:
        notes.append(f"no point near {name} where the bracket leaves the distribution was worked out "
                     f"within {MESSAGE_SECONDS:g} s")
        return None, None
    return witness


def _linearizing_output(structure: DistributionStructure, values: dict[sp.Symbol, sp.Expr],
                        notes: list[str]) -> sp.Expr | None:
    """(One input, state linearizable at the point) an output of relative degree n, or
    None with a note when none of the simple candidates is one."""
    if structure.outputs is None:
        return None
    output = structure.outputs.first_at(values)
    if output is None:
        notes.append(
            "an output of relative degree n exists near the point (state-linearization theorem) "
            "but was not found in closed form among the simple candidates tried"
        )
    return output


#: Steps tried for a witness, as fractions of each state's range (1 where it has none).
WITNESS_STEPS = (sp.Rational(1, 1000), sp.Rational(1, 100), sp.Rational(1, 10))


def _involutivity_witness(kernel: Kernel, failure: BracketFailure, values: dict[sp.Symbol, sp.Expr]
                          ) -> tuple[bool | None, dict[str, float] | None]:
    """Does the failing bracket lie in D_k at the point, and where near it is it proven to leave?

    At a point y the bracket c leaves D_k when [B(y) | c(y)] has rank r + 1 for a basis B of
    D_k (r its generic rank): every rank decision is rigorous (exact, or balls proven
    non-zero). The nearest of a few points x0 + t * step along each state axis is returned.
    """
    plant = kernel.plant
    r = len(failure.basis)

    def leaves(point: dict[sp.Symbol, sp.Expr]) -> bool | None:
        decided = True

        def decide(e: sp.Expr) -> ZeroDecision:
            nonlocal decided
            d = kernel.value_at(e, {}).decision
            if d.outcome is zd.Outcome.UNDEFINED:
                decided = False
            return d

        try:
            rows = matrix_at(kernel, [*failure.basis, failure.bracket], point)
            echelon = _PointEchelon(decide)
            rank = sum(1 for i in range(r) if echelon.add(list(rows.row(i))))
            out = echelon.add(list(rows.row(r)))
        except (UnsupportedExpression, ZeroDivisionError, TypeError, ValueError):
            return None
        if not decided or rank < r:
            return None  # undefined there, or D_k itself loses rank there: no verdict from this point
        return out

    at_point = leaves(values)
    if at_point:
        return False, None
    for step in WITNESS_STEPS:
        for s in plant.states:
            lo, hi = plant.state_box.get(s, (sp.Integer(-1), sp.Integer(1)))
            width = plant.nominal(hi) - plant.nominal(lo)
            x0 = values.get(s, sp.Integer(0))
            for sign in (1, -1):
                y = dict(values)
                y[s] = x0 + sign * step * width
                if leaves(y):
                    shown = {str(k): float(sp.N(y[k], 17)) for k in plant.states if k in y}
                    return (None if at_point is None else True), shown
    return (None if at_point is None else True), None


def _kalman_columns(
    kernel: Kernel, values: dict[sp.Symbol, sp.Expr], decide: Callable[[sp.Expr], ZeroDecision]
) -> list[list[sp.Expr]] | None:
    """[B, AB, ..., A^(n-1) B] at the point, or None when the point is not an
    equilibrium of the drift (then the identity with the brackets does not hold)."""
    plant = kernel.plant
    first = kernel.first_order_at(values, outputs=False)  # exact numbers at a rational point, no symbolic Jacobian
    f0 = first.f if first is not None else list(matrix_at(kernel, [plant.f], values))
    if any(decide(e).proven_nonzero for e in f0):
        return None
    if first is not None:
        A, columns = sp.Matrix(first.Df), first.g
    else:
        A = matrix_at(kernel, [list(kernel.jacobian(plant.f).row(i)) for i in range(plant.n)], values)
        columns = [list(matrix_at(kernel, [g], values).row(0)) for g in plant.g]
    out: list[list[sp.Expr]] = []
    if all(isinstance(e, sp.Rational) for e in [*matrix_entries(A), *(e for c in columns for e in c)]):
        # exact rationals (a rational point): the products in flint's rational matrices
        from flint import fmpq_mat

        Aq = flint_matrix(A)
        block = fmpq_mat(plant.n, len(columns), [flint_rational(columns[j][i]) for i in range(plant.n)
                                                 for j in range(len(columns))])
        for _ in range(plant.n):
            out.extend([[sympy_rational(block[i, j]) for i in range(plant.n)] for j in range(block.ncols())])
            block = Aq * block
        return out
    for _ in range(plant.n):
        out.extend(columns)
        columns = [list(A * sp.Matrix(c)) for c in columns]
    return out


def _point_findings(
    structure: DistributionStructure,
    name: str,
    ranks: Sequence[int],
    control_rank: int,
    singular: Sequence[int],
    missing: Sequence[str],
) -> list[Finding]:
    n = structure.n
    out: list[Finding] = []
    top = n - 1
    if n and control_rank < n:
        message = (
            f"at {name} the controllability distribution {structure.spanners(top)} has rank "
            f"{control_rank} < {n}; " + (f"no input moves {listed(missing, 'or')} there, to first order" if missing
                                         else "the combinations of states it misses were not worked out")
        )
        if top in singular:
            message += (
                f" (around {name} the rank is {structure.ranks[top]}: {name} is a singular point "
                "of the distribution)"
            )
        out.append(
            finding(
                "not-controllable",
                message,
                point=name,
                anchor=anchors.point(name),
                hint="to first order such a combination moves as the drift makes it, whatever the input "
                "(often a conserved quantity, such as a mass balance or a quaternion's norm, or a mode no "
                "actuator reaches)" + (
                    "; brackets of the input fields with each other, such as [g1, g2], are not part of "
                    "this distribution: the plant may still be steered there by nonlinear input sequences, "
                    "but it cannot be feedback linearized around the point" if structure.m > 1 else ""),
            )
        )
    low = [k for k in singular if k <= n - 2]
    if low:
        parts = [
            f"{structure.name(k)} has rank {ranks[k]} at {name} but {structure.ranks[k]} around it"
            for k in low
        ]
        out.append(
            finding(
                "distribution-rank-drop",
                f"{'; '.join(parts)}: {name} is a singular point of the distribution, which "
                "must have constant rank near the point (it may well be involutive)",
                point=name,
                anchor=anchors.point(name),
                hint="an input field that vanishes at the point makes the rank drop there; choose "
                "another operating point or another input",
            )
        )
    return out


def _orthogonal_complement(kernel: Kernel, basis_rows: list[list[sp.Expr]]) -> list[list[sp.Expr]]:
    """A basis of the orthogonal complement of the span of exact vectors: the null space
    of the rows, read off their reduced form (:func:`plantlint.kernel.exact.gauss_jordan`,
    pivots decided rigorously at the point); one vector per free column."""
    n = kernel.plant.n
    if not basis_rows:
        return [[sp.Integer(int(i == j)) for j in range(n)] for i in range(n)]
    reduced, pivots, _ = exact.gauss_jordan([list(r) for r in basis_rows], n,
                                            lambda e: kernel.value_at(e, {}).decision)
    out = []
    for free in (j for j in range(n) if j not in pivots):
        v = [sp.Integer(0)] * n
        v[free] = sp.Integer(1)
        for row, col in enumerate(pivots):
            v[col] = -reduced[row][free]
        out.append(_scaled(v))
    return out


def _scaled(v: list[sp.Expr]) -> list[sp.Expr]:
    """Integer entries with no common factor, first non-zero positive (when rational)."""
    if all(e.is_Rational for e in v):
        fracs = [Fraction(int(e.p), int(e.q)) for e in v]
        den = lcm(*(f.denominator for f in fracs))
        ints = [int(f * den) for f in fracs]
        common = gcd(*ints) or 1
        ints = [i // common for i in ints]
        first = next((i for i in ints if i), 1)
        sign = -1 if first < 0 else 1
        return [sp.Integer(sign * i) for i in ints]
    return v


def _direction_text(v: Sequence[sp.Expr], states: Sequence[sp.Symbol]) -> str:
    """The combination of the states with coefficients ``v``, in the model's syntax
    (``5*X + 2*S``, ``x1``, ``-x1 + 3/2*x2``): what a covector of the annihilator measures."""
    parts: list[str] = []
    for coefficient, state in zip(v, states):
        if coefficient == 0:
            continue
        if coefficient in (1, -1):
            text = f"-{state}" if coefficient == -1 else str(state)
        else:
            c = show_expr(coefficient)
            text = f"{c}*{state}" if coefficient.is_Atom else f"({c})*{state}"
        if parts and text.startswith("-"):
            parts.append(f"- {text[1:]}")
        elif parts:
            parts.append(f"+ {text}")
        else:
            parts.append(text)
    return " ".join(parts)

