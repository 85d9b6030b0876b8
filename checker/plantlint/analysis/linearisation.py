"""The linearisation at each operating point: A, B, C, D, poles, ranks, zeros.

At an equilibrium (x0, u0) of dx/dt = f(x) + sum_j g_j(x) u_j, y = h(x):

    A = Df(x0) + sum_j Dg_j(x0) u0_j,   B = g(x0),   C = Dh(x0),   D = 0

(D is zero because the language forbids inputs in outputs). Parameters with a
range are taken at their nominal values.

When every entry is rational the whole analysis is exact (python-flint):
the characteristic polynomial, the Kalman ranks, the uncontrollable and
unobservable subspaces split by the irreducible factors of their modes, and the
invariant zeros of a square plant as the roots of det [[sI - A, -B], [C, 0]]
(interpolated exactly from n + 1 rational determinants). Otherwise the entries
are exact constants (sin(1/3), sqrt(2)) evaluated as rigorous balls: a rank is
proven by pivots whose balls exclude zero and a remainder of exact zeros (or
reported as a lower bound), and poles and zeros come from mpmath at ``DIGITS``
digits, with the tolerance stated.

At a regular point the invariant zeros must equal the eigenvalues of the
linearised zero dynamics (Isidori, Nonlinear Control Systems, 3rd ed., sec. 4.3
and Remark 5.1.4 for the multivariable case; for a linear plant with CA^(r-1)B
invertible both are the spectrum of the same restricted map). The two are
computed independently, so a disagreement is reported as an internal
inconsistency of the checker.
"""

from __future__ import annotations

import math

from dataclasses import dataclass, field, replace
from fractions import Fraction
from math import gcd, lcm
from typing import Any, Callable, Sequence

import flint
import mpmath
import sympy as sp
from flint import acb, acb_mat, acb_poly, arb, arb_mat, fmpq, fmpq_mat, fmpq_poly, fmpz_poly

from plantlint.analysis.equilibria import Equilibrium
from plantlint.analysis.zero_dynamics import ZeroDynamics, show_eigenvalues
from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding
from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.kernel.exact import ball_elimination, has_undefined
from plantlint.kernel.lie import FirstOrder, Kernel
from plantlint.kernel.rational import flint_matrix, polynomial_text
from plantlint.kernel.precision import precision
from plantlint.language.printer import show_number

#: Working precision (decimal digits) for the roots of a ball polynomial with multiple roots.
DIGITS = 50
#: Coefficients of the zero polynomial below this fraction of the largest are
#: taken as zero on the numeric route (the degree decision).
COEFFICIENT_TOLERANCE = 1e-30
#: Relative tolerance of the cross-check |z - w| <= tol * (1 + |z|).
CROSS_CHECK_TOLERANCE = 1e-8
_ROOT_BITS = 128

CROSS_CHECK_STATES = ("agrees", "disagrees", "not_applicable")


@dataclass(frozen=True)
class ModeGroup:
    """Part of an uncontrollable or unobservable subspace and its modes.

    ``directions`` are linear combinations of the states: for the uncontrollable
    part, quantities w.x the input cannot change (left null vectors of the Kalman
    matrix); for the unobservable part, directions v in state space (x0 + t v)
    the outputs cannot see (null vectors of the observability matrix).
    """

    eigenvalues: tuple[complex, ...]
    polynomial: str | None  # exact factor, in s, on the rational route
    directions: tuple[str, ...]


@dataclass(frozen=True)
class CrossCheck:
    status: str  # one of CROSS_CHECK_STATES
    detail: str


@dataclass(frozen=True)
class Linearisation:
    """The linearisation at one operating point."""

    point: str
    status: str  # "computed" or "undefined"
    reason: str = ""
    exact: bool = False  # every entry rational: everything below decided exactly
    A: tuple[tuple[sp.Expr, ...], ...] = ()
    B: tuple[tuple[sp.Expr, ...], ...] = ()
    C: tuple[tuple[sp.Expr, ...], ...] = ()
    poles: tuple[complex, ...] = ()
    characteristic_polynomial: str | None = None
    controllability_rank: int | None = None
    uncontrollable: tuple[ModeGroup, ...] = ()
    observability_rank: int | None = None
    unobservable: tuple[ModeGroup, ...] = ()
    zeros: tuple[complex, ...] | None = None  # None: not square, or no finite zero set
    zero_polynomial: str | None = None
    zeros_note: str = ""
    tolerance: float | None = None  # numeric route: coefficient tolerance of the zero polynomial
    cross_check: CrossCheck = CrossCheck("not_applicable", "")
    findings: tuple[Finding, ...] = field(default_factory=tuple)


# -- entry point ---------------------------------------------------------------------
def linearise_at(kernel: Kernel, eq: Equilibrium, zero_dynamics: ZeroDynamics | None = None) -> Linearisation:
    """The linearisation at the equilibrium ``eq`` and its cross-check against the
    zero dynamics computed at the same point (``None`` when there are none)."""
    plant = kernel.plant
    name = eq.name
    point = dict(plant.param_nominal)
    point.update({s: v for s, v in eq.values.items() if s in plant.states})
    u0 = [eq.values.get(u, sp.Integer(0)) for u in plant.inputs]

    def at(e: sp.Expr) -> sp.Expr:
        return _tidy(e.xreplace(point)) if e != 0 else sp.Integer(0)

    rational = _rational_matrices(kernel, point, u0) or _formal_matrices(kernel, point, u0)
    if rational is not None:
        A, B, C = rational
    else:
        A = kernel.jacobian(plant.f).applyfunc(at)
        for j in range(plant.m):
            if u0[j] != 0:
                A = A + kernel.jacobian(plant.g[j]).applyfunc(at) * u0[j]
        A = A.applyfunc(_tidy)
        B = sp.Matrix(plant.n, plant.m, lambda i, j: at(plant.g[j][i]))
        C = kernel.jacobian(plant.h).applyfunc(at) if plant.p else sp.zeros(0, plant.n)
    rows = [tuple(r) for r in A.tolist()]
    b_rows = [tuple(r) for r in B.tolist()]
    c_rows = [tuple(r) for r in C.tolist()]
    entries = [e for M in (A, B, C) for e in M]
    if has_undefined(entries):
        return Linearisation(name, "undefined", reason="a derivative of the rates or outputs is undefined at the point",
                             A=tuple(rows), B=tuple(b_rows), C=tuple(c_rows))
    try:
        if all(e.is_Rational for e in entries):
            lin = _exact(name, A, B, C, plant.states)
        else:
            lin = _numeric(name, A, B, C, plant.states)
    except OverflowError:  # decided exactly, but not writable as a double (a parameter of 1e300, say)
        return Linearisation(name, "undefined", reason="a pole or zero of the linearisation is beyond the range "
                             "of double-precision numbers (about 1.8e308), so it cannot be reported",
                             A=tuple(rows), B=tuple(b_rows), C=tuple(c_rows))
    lin = _with(lin, A=tuple(rows), B=tuple(b_rows), C=tuple(c_rows))
    check = cross_check(lin, zero_dynamics)
    findings = _inconsistency(name, check)
    return _with(lin, cross_check=check, findings=findings)


def _rational_matrices(kernel: Kernel, point: dict[sp.Symbol, sp.Expr], u0: Sequence[sp.Expr]
                       ) -> tuple[sp.Matrix, sp.Matrix, sp.Matrix] | None:
    """A, B, C at a rational point from the kernel's exact first-order values
    (:meth:`Kernel.first_order_at`); None when they are not rational there: the symbolic
    route then decides (and shows what is not rational)."""
    if not all(u.is_Rational for u in u0):
        return None
    first = kernel.first_order_at(point)
    if first is None:
        return None
    return _state_space(first, u0, u0, lambda e: e)


def _formal_matrices(kernel: Kernel, point: dict[sp.Symbol, sp.Expr], u0: Sequence[sp.Expr]
                     ) -> tuple[sp.Matrix, sp.Matrix, sp.Matrix] | None:
    """A, B, C at a point whose values are exact but not rational (q = pi/3), from dual
    numbers over formal numbers (:mod:`plantlint.kernel.formal`): the numbers of the symbolic
    Jacobians there, exact, without forming the Jacobians (on a two-link arm those cost more
    than the rest of the linearisation). None when a value on the way is unsettled or
    undefined, or the point is not read: the symbolic route then decides, as before."""
    from plantlint.kernel.formal import PREC, FormalField
    from plantlint.kernel.taylor import Inexact, Undefined

    towers = kernel.towers() if kernel.route == "numeric" else None
    if towers is None:
        return None
    plant = kernel.plant
    full: dict[sp.Symbol, sp.Expr] = dict(plant.param_nominal)
    full.update(point)
    field = FormalField()
    with precision(PREC):
        try:
            vector = [field.number(full[s]) for s in kernel.free_symbols()]
            inputs = [field.number(u) for u in u0]
            values, gradients = towers.first_order(vector, field)
            first = FirstOrder.of(plant.n, plant.m, values, gradients)  # type: ignore[arg-type]
            return _state_space(first, u0, inputs, lambda e: e.to_sympy())
        except (Inexact, Undefined, ArithmeticError, ValueError, TypeError, KeyError):
            return None  # Unsettled is an Inexact


def _state_space(first: FirstOrder, u0: Sequence[sp.Expr], weights: Sequence[Any],
                 exact: Callable[[Any], sp.Expr]) -> tuple[sp.Matrix, sp.Matrix, sp.Matrix]:
    """A = Df + sum_j u0_j Dg_j, B = g, C = Dh from the values and gradients at a point
    (``first``), computed in their own numbers (``weights``: u0 in those numbers; an input
    at 0 adds nothing), each entry then written as an exact sympy number by ``exact``."""
    n, m, p = len(first.f), len(first.g), len(first.h)

    def a_entry(i: int, a: int) -> sp.Expr:
        entry = first.Df[i][a]
        for j in range(m):
            if u0[j] != 0:
                entry = entry + weights[j] * first.Dg[j][i][a]
        return exact(entry)

    A = sp.Matrix(n, n, a_entry)
    B = sp.Matrix(n, m, lambda i, j: exact(first.g[j][i]))
    C = sp.Matrix(p, n, lambda i, a: exact(first.Dh[i][a])) if p else sp.zeros(0, n)
    return A, B, C


def _with(lin: Linearisation, **changes: object) -> Linearisation:
    return replace(lin, **changes)  # type: ignore[arg-type]


def _tidy(e: sp.Expr) -> sp.Expr:
    """Small algebraic constants that are rational in disguise ((1+sqrt(2))*(1-sqrt(2)))."""
    if e.is_Rational or e.free_symbols or sp.count_ops(e) > 60:
        return e
    expanded = sp.expand(e)
    return expanded if expanded.is_Rational else e


# -- exact route -------------------------------------------------------------------------
def _exact(name: str, A_: sp.Matrix, B_: sp.Matrix, C_: sp.Matrix, states: Sequence[sp.Symbol]) -> Linearisation:
    n, m, p = A_.rows, B_.cols, C_.rows
    A, B, C = flint_matrix(A_), flint_matrix(B_), flint_matrix(C_)
    chi = A.charpoly()
    ctrl_rank, uncontrollable = None, ()
    if m:
        K = _hstack(_krylov(A, B, n))
        ctrl_rank = K.rank()
        if ctrl_rank < n:
            uncontrollable = _uncontrollable(A, K, states)
    obs_rank, unobservable = None, ()
    if p:
        O = _vstack([block.transpose() for block in _krylov(A.transpose(), C.transpose(), n)])
        obs_rank = O.rank()
        if obs_rank < n:
            unobservable = _unobservable(A, O, states)
    zeros, zpoly, note = None, None, ""
    if p == m and m:
        det = _rosenbrock_polynomial(A, B, C)
        if det.is_zero():
            note = ("det [[sI - A, -B], [C, 0]] vanishes for every s (the pencil has normal rank < n + p): "
                    "no finite set of zeros")
        else:
            monic = det / det.coeffs()[-1]
            zeros = _roots(monic)
            zpoly = polynomial_text(monic)
    elif p != m:
        note = f"not square ({p} output(s), {m} input(s)): transmission zeros are computed for square plants"
    return Linearisation(name, "computed", exact=True, poles=_roots(chi), characteristic_polynomial=polynomial_text(chi),
                         controllability_rank=ctrl_rank, uncontrollable=uncontrollable, observability_rank=obs_rank,
                         unobservable=unobservable, zeros=zeros, zero_polynomial=zpoly, zeros_note=note)


def _krylov(A: fmpq_mat, B: fmpq_mat, count: int) -> list[fmpq_mat]:
    """[B, AB, ..., A^(count-1) B], one product per block."""
    blocks = [B]
    for _ in range(count - 1):
        blocks.append(A * blocks[-1])
    return blocks


def _hstack(blocks: Sequence[fmpq_mat]) -> fmpq_mat:
    rows = blocks[0].nrows()
    cols = sum(b.ncols() for b in blocks)
    out = fmpq_mat(rows, cols)
    at = 0
    for b in blocks:
        for i in range(rows):
            for j in range(b.ncols()):
                out[i, at + j] = b[i, j]
        at += b.ncols()
    return out


def _vstack(blocks: Sequence[fmpq_mat]) -> fmpq_mat:
    return _hstack([b.transpose() for b in blocks]).transpose()


def _null_space(M: fmpq_mat) -> list[list[fmpq]]:
    """A basis of {v : M v = 0}, exactly (from the reduced row echelon form)."""
    R, rank = M.rref()
    cols = M.ncols()
    pivots: list[int] = []
    row = 0
    for col in range(cols):
        if row < rank and R[row, col] != 0:
            pivots.append(col)
            row += 1
    basis = []
    for free in (c for c in range(cols) if c not in pivots):
        v = [fmpq(0)] * cols
        v[free] = fmpq(1)
        for i, pc in enumerate(pivots):
            v[pc] = -R[i, free]
        basis.append(v)
    return basis


def _rows(vectors: list[list[fmpq]]) -> fmpq_mat:
    return fmpq_mat(len(vectors), len(vectors[0]), [e for v in vectors for e in v])


def _restricted(W: fmpq_mat, WA: fmpq_mat) -> fmpq_mat:
    """M with W A = M W for W of full row rank whose rows span a left-invariant subspace."""
    _, rank = W.rref()
    R, _ = W.rref()
    pivots: list[int] = []
    row = 0
    for col in range(W.ncols()):
        if row < rank and R[row, col] != 0:
            pivots.append(col)
            row += 1
    Wp = fmpq_mat(W.nrows(), len(pivots), [W[i, c] for i in range(W.nrows()) for c in pivots])
    WAp = fmpq_mat(WA.nrows(), len(pivots), [WA[i, c] for i in range(WA.nrows()) for c in pivots])
    return WAp * Wp.inv()


def _poly_at(q: fmpz_poly, A: fmpq_mat) -> fmpq_mat:
    coeffs = [int(c) for c in q.coeffs()]
    out = fmpq_mat(A.nrows(), A.ncols())
    for c in reversed(coeffs):  # Horner
        out = out * A
        for i in range(A.nrows()):
            out[i, i] += c
    return out


def _factor(poly: fmpq_poly) -> list[tuple[fmpz_poly, int]]:
    if poly.degree() < 1:
        return []
    _, factors = poly.numer().factor()
    return [(q, int(e)) for q, e in factors]


def _uncontrollable(A: fmpq_mat, K: fmpq_mat, states: Sequence[sp.Symbol]) -> tuple[ModeGroup, ...]:
    left = _null_space(K.transpose())  # rows w with w K = 0
    W = _rows(left)
    modes = _restricted(W, W * A).charpoly()
    groups = []
    for q, mult in _factor(modes):
        Q = _power_poly(q, mult, A)
        vectors = _null_space(_vstack([Q.transpose(), K.transpose()]))  # w Q = 0 and w K = 0
        groups.append(_group(q, mult, vectors, states))
    return tuple(groups)


def _unobservable(A: fmpq_mat, O: fmpq_mat, states: Sequence[sp.Symbol]) -> tuple[ModeGroup, ...]:
    right = _null_space(O)  # columns v with O v = 0
    V = _rows(right)  # rows are the v's: A V^T = V^T M  <=>  V A^T = M^T V
    modes = _restricted(V, V * A.transpose()).charpoly()
    groups = []
    for q, mult in _factor(modes):
        Q = _power_poly(q, mult, A)
        vectors = _null_space(_vstack([Q, O]))
        groups.append(_group(q, mult, vectors, states))
    return tuple(groups)


def _group(q: fmpz_poly, mult: int, vectors: list[list[fmpq]], states: Sequence[sp.Symbol]) -> ModeGroup:
    factor = fmpq_poly(q) ** mult
    factor = factor / factor.coeffs()[-1]  # monic: the modes read off directly
    return ModeGroup(_roots(factor), polynomial_text(factor), tuple(_combination(v, states) for v in vectors))


def _power_poly(q: fmpz_poly, mult: int, A: fmpq_mat) -> fmpq_mat:
    """q(A)^mult: its kernel is the generalized eigenspace of the roots of q."""
    Q = _poly_at(q, A)
    out = Q
    for _ in range(mult - 1):
        out = out * Q
    return out


def _rosenbrock_polynomial(A: fmpq_mat, B: fmpq_mat, C: fmpq_mat) -> fmpq_poly:
    """det [[sI - A, -B], [C, 0]] exactly: n + 1 rational determinants, then the
    interpolating polynomial (its degree is at most n)."""
    n, m = A.nrows(), B.ncols()
    size = n + m
    values = []
    for s in range(n + 1):
        M = fmpq_mat(size, size)
        for i in range(n):
            for j in range(n):
                M[i, j] = (s if i == j else 0) - A[i, j]
            for j in range(m):
                M[i, n + j] = -B[i, j]
        for i in range(m):
            for j in range(n):
                M[n + i, j] = C[i, j]
        values.append(M.det())
    V = fmpq_mat(n + 1, n + 1, [fmpq(s) ** k for s in range(n + 1) for k in range(n + 1)])
    coeffs = V.solve(fmpq_mat(n + 1, 1, values))
    return fmpq_poly([coeffs[k, 0] for k in range(n + 1)])


def _roots(poly: fmpq_poly) -> tuple[complex, ...]:
    """Roots with multiplicity (rational ones exact), sorted by real then imaginary part."""
    out: list[complex] = []
    with precision(_ROOT_BITS):
        for q, mult in _factor(poly):
            coeffs = q.coeffs()
            if q.degree() == 1:
                out.extend([complex(float(Fraction(-int(coeffs[0]), int(coeffs[1]))), 0.0)] * mult)
                continue
            for c, k in q.complex_roots():
                re = 0.0 if c.real.is_zero() else float(c.real.mid())
                im = 0.0 if c.imag.is_zero() else float(c.imag.mid())
                out.extend([complex(re, im)] * (k * mult))
    return tuple(sorted(out, key=lambda z: (z.real, z.imag)))


def _combination(v: Sequence[fmpq], states: Sequence[sp.Symbol]) -> str:
    """An exact vector as a combination of the states, integers without common factor."""
    fracs = [Fraction(int(e.p), int(e.q)) for e in v]
    den = lcm(*(f.denominator for f in fracs))
    ints = [int(f * den) for f in fracs]
    common = gcd(*ints) or 1
    ints = [i // common for i in ints]
    if next((i for i in ints if i), 1) < 0:
        ints = [-i for i in ints]
    return _terms([(sp.Integer(i), s) for i, s in zip(ints, states)])


def _terms(pairs: Sequence[tuple[sp.Expr, sp.Symbol]]) -> str:
    parts: list[str] = []
    for c, s in pairs:
        if c == 0:
            continue
        negative = bool(c < 0) if c.is_real else False
        size = -c if negative else c
        text = str(s) if size == 1 else f"{show_number(size)}*{s}"
        if parts:
            parts.append(("- " if negative else "+ ") + text)
        else:
            parts.append(("-" if negative else "") + text)
    return " ".join(parts) or "0"


# -- numeric route -------------------------------------------------------------------------
#: Working precisions (bits) of the ball route; the second is tried when the first
#: leaves a rank undecided.
BALL_BITS = (256, 1024)


def _numeric(name: str, A: sp.Matrix, B: sp.Matrix, C: sp.Matrix, states: Sequence[sp.Symbol]) -> Linearisation:
    """Entries with exact irrational constants (cos(1/5), sqrt(2)).

    Ranks come from Gaussian elimination in ball arithmetic: a pivot whose ball excludes
    zero is proven non-zero (a rank lower bound), and a remainder of balls that are
    exactly zero (radius 0: structural zeros stay exact) proves the rank. A remainder
    that is only tiny leaves the rank a lower bound, said in ``reason``. Poles and
    zeros come from mpmath at ``DIGITS`` digits.
    """
    n, m, p = A.rows, B.cols, C.rows
    reason = ""
    ctrl: tuple[int, bool, list[list[float]], tuple[complex, ...]] | None = None
    obs: tuple[int, bool, list[list[float]], tuple[complex, ...]] | None = None
    for bits in BALL_BITS:
        balls = _balls([*A, *B, *C], bits)
        if balls is None:
            return Linearisation(name, "undefined", reason="an entry of A, B or C cannot be evaluated at the point")
        Ab = [balls[i * n:(i + 1) * n] for i in range(n)]
        Bb = [balls[n * n + i * m: n * n + (i + 1) * m] for i in range(n)]
        Cb = [balls[n * n + n * m + i * n: n * n + n * m + (i + 1) * n] for i in range(p)]
        with precision(bits):
            if m:
                K = _ball_krylov(Ab, Bb, n)  # n x nm
                ctrl = _ball_subspace([list(col) for col in zip(*K)], Ab, left=True)  # w K = 0
            if p:
                O = _ball_krylov([list(col) for col in zip(*Ab)], [list(col) for col in zip(*Cb)], n)  # O^T
                obs = _ball_subspace([list(col) for col in zip(*O)], Ab, left=False)  # O v = 0
        if (ctrl is None or ctrl[1]) and (obs is None or obs[1]):
            break
    with precision(bits):
        poles = _ball_eigenvalues(Ab)
        zeros: tuple[complex, ...] | None = None
        note, tol = "", None
        if p == m and m:
            tol = COEFFICIENT_TOLERANCE
            coeffs = _ball_pencil_coefficients(Ab, Bb, Cb, tol)
            if not coeffs:
                note = ("det [[sI - A, -B], [C, 0]] vanishes for every s (to the working precision, relative "
                        f"coefficient tolerance {tol:g}): no finite set of zeros")
            else:
                zeros = tuple(sorted(_ball_roots(coeffs), key=lambda z: (z.real, z.imag)))
        elif p != m:
            note = f"not square ({p} output(s), {m} input(s)): transmission zeros are computed for square plants"
    undecided = [what for what, r in (("controllability", ctrl), ("observability", obs)) if r is not None and not r[1]]
    if undecided:
        reason = (f"the {' and '.join(undecided)} rank{'s are' if len(undecided) > 1 else ' is'} a proven lower bound: "
                  f"the rest of the elimination vanishes to about {int(BALL_BITS[-1] * 0.30103)} digits but is not "
                  "proven zero")
    chi = None
    if all(e.is_Rational for e in A):
        # A alone is rational (the irrational entries are in B or C): its poles are exact, so a
        # double integrator reads 0 (4 times), not +-1e-51 from a ball eigenvalue solver
        chi = flint_matrix(A).charpoly()
        poles = list(_roots(chi))
    return Linearisation(name, "computed", reason=reason, exact=False,
                         characteristic_polynomial=polynomial_text(chi) if chi is not None else None,
                         poles=tuple(sorted(poles, key=lambda z: (z.real, z.imag))),
                         controllability_rank=ctrl[0] if ctrl else None,
                         uncontrollable=_ball_groups(ctrl, states),
                         observability_rank=obs[0] if obs else None,
                         unobservable=_ball_groups(obs, states), zeros=zeros, zeros_note=note, tolerance=tol)


def _balls(entries: Sequence[sp.Expr], bits: int) -> list[arb] | None:
    """Rigorous balls for exact constants; exact zeros stay exact."""
    try:
        program = Program(list(entries), [])
    except UnsupportedExpression:
        return None
    out = program.run([], prec=bits)
    if not all(b.is_finite() for b in out):
        return None
    return out


def _ball_krylov(A: list[list[arb]], B: list[list[arb]], count: int) -> list[list[arb]]:
    """[B, AB, ..., A^(count-1) B] as rows of balls; exact zeros are skipped so that
    structural zeros stay exact."""
    n = len(A)
    block = [list(row) for row in B]
    columns = [list(col) for col in zip(*block)]
    for _ in range(count - 1):
        nxt = []
        for i in range(n):
            row = []
            for j in range(len(block[0])):
                acc = arb(0)
                for k in range(n):
                    a, b = A[i][k], block[k][j]
                    if not (a.is_zero() or b.is_zero()):
                        acc += a * b
                row.append(acc)
            nxt.append(row)
        block = nxt
        columns.extend(list(col) for col in zip(*block))
    return [list(row) for row in zip(*columns)]


def _ball_subspace(rows: list[list[arb]], A: list[list[arb]], left: bool
                   ) -> tuple[int, bool, list[list[float]], tuple[complex, ...]]:
    """Rank of ``rows`` (proven lower bound; ``certain`` when the remainder is exactly
    zero), a basis of its null space (floats, for display) and the eigenvalues of A
    restricted to that subspace (``left``: the null vectors are left vectors w, w A = M w)."""
    n = len(rows[0])
    work, pivots, certain = ball_elimination(rows)
    top = len(pivots)
    free = [c for c in range(n) if c not in pivots]
    vectors = []
    for fc in free:
        v = [0.0] * n
        v[fc] = 1.0
        for i, pc in enumerate(pivots):
            v[pc] = -float(work[i][fc].mid())
        vectors.append(v)
    modes: tuple[complex, ...] = ()
    if vectors:
        with mpmath.workdps(30):
            V = mpmath.matrix(vectors)
            Am = mpmath.matrix([[float(a.mid()) for a in row] for row in A])
            image = V * Am if left else V * Am.T  # left: W A = M W; right: V A^T = M^T V
            restricted = image * V.T * mpmath.inverse(V * V.T)
            modes = tuple(sorted(_eig(restricted, noise=1e-10), key=lambda z: (z.real, z.imag)))  # from doubles
    return top, certain, vectors, modes


def _ball_groups(result: tuple[int, bool, list[list[float]], tuple[complex, ...]] | None,
                 states: Sequence[sp.Symbol]) -> tuple[ModeGroup, ...]:
    if result is None or not result[2]:
        return ()
    return (ModeGroup(result[3], None, tuple(_float_terms(v, states) for v in result[2])),)


def _float_terms(v: list[float], states: Sequence[sp.Symbol]) -> str:
    """A numeric direction, scaled so that its first entry is 1 (display only)."""
    lead = next((x for x in v if abs(x) > 1e-12 * max(abs(y) for y in v)), 1.0)
    scaled = [x / lead for x in v]
    top = max(abs(x) for x in scaled)

    def shown(x: float) -> sp.Expr:
        if abs(x) <= 1e-12 * top:
            return sp.Integer(0)
        if abs(x - round(x)) <= 1e-9 * max(1.0, abs(x)):
            return sp.Integer(round(x))
        return sp.Float(x, 6)

    return _terms([(shown(x), s) for x, s in zip(scaled, states)])


def _ball_eigenvalues(A: list[list[arb]]) -> list[complex]:
    """Eigenvalues of a ball matrix: flint's rigorous solver (clusters allowed), else the
    roots of the (rigorous) characteristic polynomial found numerically."""
    n = len(A)
    if not n:
        return []
    found = acb_mat(n, n, [e for row in A for e in row]).eig(multiple=True, nonstop=True)
    if all(z.is_finite() for z in found):
        return [_mid(z) for z in found]
    chi = arb_mat(n, n, [e for row in A for e in row]).charpoly()
    return _ball_roots([acb(c) for c in chi.coeffs()])


def _mid(z: acb) -> complex:
    re = 0.0 if z.real.contains(0) else float(z.real.mid())  # zero to the working precision
    im = 0.0 if z.imag.contains(0) and z.imag.rad() < 1e-20 * (1 + abs(re)) else float(z.imag.mid())
    return complex(re, im)


def _ball_pencil_coefficients(A: list[list[arb]], B: list[list[arb]], C: list[list[arb]], tol: float) -> list[acb]:
    """Coefficients (constant first) of det [[sI - A, -B], [C, 0]] from its values at
    s_t = c w^t, w the (n + 1)-th root of unity and c = (13/10) e^(i pi / (7 (n + 1))) (the
    inverse transform is exact for degree <= n); leading coefficients that are zero to the
    precision (ball contains 0, or below ``tol`` times the largest) are dropped.

    The circle is scaled and turned off the roots of unity themselves: a model's zeros
    are often there (+-1, +-i), and a ball determinant at a zero of the pencil, where
    sI - A is singular too, loses every digit (a reviewer's model: zeros +-i read as a
    pencil that vanishes for every s)."""
    n, m = len(A), len(B[0])
    k = n + 1
    roots = [acb(arb(2 * t) / k).exp_pi_i() for t in range(k)]
    # the circle's radius follows the size of A (a power of two times 13/10): zeros at 1e6
    # sampled on |s| = 1.3 left coefficients 1e32 apart, and the leading one was dropped
    size = max((sum(float(abs(e).upper()) for e in row) for row in A), default=0.0)
    radius = arb(2) ** max(0, math.ceil(math.log2(size))) if size > 1 else arb(1)
    shift = acb(arb(1) / (7 * k)).exp_pi_i() * arb(13) / 10 * radius
    values = []
    for w in roots:
        s = shift * w
        M = acb_mat(n + m, n + m)
        for i in range(n):
            for j in range(n):
                M[i, j] = (s if i == j else 0) - A[i][j]
            for j in range(m):
                M[i, n + j] = -B[i][j]
        for i in range(m):
            for j in range(n):
                M[n + i, j] = C[i][j]
        values.append(M.det())
    scaled = []  # coefficients of the polynomial in s / radius: comparable in size
    turn = shift / radius
    for q in range(k):
        total = acb(0)
        for t in range(k):
            total += values[t] * roots[(-t * q) % k]
        scaled.append(acb((total / (k * turn ** q)).real))  # real data: the imaginary part is rounding
    top = max((float(abs(c).mid()) for c in scaled), default=0.0)
    while scaled and (scaled[-1].contains(0) or float(abs(scaled[-1]).mid()) <= tol * top):
        scaled.pop()
    return [c / radius ** q for q, c in enumerate(scaled)]


def _ball_roots(coeffs: list[acb]) -> list[complex]:
    """Roots of a ball polynomial (constant first): isolated rigorously when squarefree,
    else found by mpmath from the midpoints (multiple roots)."""
    if len(coeffs) <= 1:
        return []
    try:  # refined to half the working precision: isolation alone can leave radii of 1e-9
        return [_mid(z) for z in acb_poly(coeffs).roots(tol=arb(2) ** (-flint.ctx.prec // 2))]
    except ValueError:
        with mpmath.workdps(DIGITS):
            mids = [mpmath.mpf(c.real.mid().str(DIGITS + 10, radius=False)) for c in coeffs]
            return _polyroots(mids)


def _eig(M: mpmath.matrix, noise: float = 1e-30) -> list[complex]:
    if M.rows == 1:  # mpmath.eig returns a tuple for 1 x 1 whatever the flags
        return [complex(M[0, 0])]
    return [_clean(complex(z), noise) for z in mpmath.eig(M, left=False, right=False)]


def _clean(z: complex, noise: float = 1e-30) -> complex:
    """Drop a rounding-level imaginary part of a real eigenvalue (display only)."""
    return complex(z.real, 0.0) if abs(z.imag) <= noise * (1 + abs(z)) else z


def _polyroots(coeffs: list[mpmath.mpf]) -> list[complex]:
    if len(coeffs) <= 1:
        return []
    try:
        roots = mpmath.polyroots(list(reversed(coeffs)), maxsteps=400, extraprec=8 * DIGITS)
    except mpmath.libmp.NoConvergence:
        # the eigenvalues of the companion matrix, in mpmath's arbitrary exponent range
        # (numpy's floats overflow on coefficients like 1e300^2: a mutant reproducer)
        lead, *rest = list(reversed(coeffs))
        n = len(rest)
        companion = mpmath.matrix(n, n)
        for i in range(1, n):
            companion[i, i - 1] = 1
        for i in range(n):
            companion[i, n - 1] = -coeffs[i] / lead
        roots = list(mpmath.eig(companion, left=False, right=False))
    # complex() of a root beyond double range raises OverflowError: the caller reports it so
    return [_clean(_finite_complex(z)) for z in (roots if isinstance(roots, list) else [roots])]


def _finite_complex(z: object) -> complex:
    c = complex(z)  # type: ignore[arg-type]
    if not (math.isfinite(c.real) and math.isfinite(c.imag)):
        raise OverflowError("a root beyond double range")
    return c


# -- the cross-check --------------------------------------------------------------------------
def cross_check(lin: Linearisation, zd: ZeroDynamics | None) -> CrossCheck:
    """Transmission zeros of the linearisation against the zero-dynamics eigenvalues."""
    if zd is None or zd.verdict == "undefined":
        why = zd.reason if zd is not None and zd.reason else "no zero dynamics at this point (not a regular point)"
        return CrossCheck("not_applicable", why)
    if lin.status != "computed":
        return CrossCheck("not_applicable", lin.reason)
    if lin.zeros is None:
        return CrossCheck("disagrees", "the zero dynamics are defined here, but the linearisation has no finite set "
                                       f"of transmission zeros ({lin.zeros_note})")
    ours = list(lin.zeros)
    theirs = list(zd.eigenvalues)
    if len(ours) != len(theirs) or not _same_multiset(ours, theirs, CROSS_CHECK_TOLERANCE):
        return CrossCheck("disagrees", f"transmission zeros {show_eigenvalues(ours) or 'none'}; zero-dynamics "
                                       f"eigenvalues {show_eigenvalues(theirs) or 'none'}")
    if not ours:
        return CrossCheck("agrees", "no transmission zeros and no zero dynamics (total relative degree n)")
    plural = "s" if len(ours) > 1 else ""
    return CrossCheck("agrees", f"transmission zero{plural} {show_eigenvalues(ours)} = zero-dynamics "
                                f"eigenvalue{plural} {show_eigenvalues(theirs)} (relative tolerance "
                                f"{CROSS_CHECK_TOLERANCE:g})")


def _same_multiset(a: list[complex], b: list[complex], tol: float) -> bool:
    rest = list(b)
    for z in a:
        k = min(range(len(rest)), key=lambda q: abs(rest[q] - z))
        if abs(rest[k] - z) > tol * (1 + abs(z)):
            return False
        rest.pop(k)
    return True


def _inconsistency(name: str, check: CrossCheck) -> tuple[Finding, ...]:
    if check.status != "disagrees":
        return ()
    return (finding(
        "internal-inconsistency",
        f"internal inconsistency at point {name}: the linearisation and the zero dynamics, computed "
        f"independently, disagree ({check.detail})",
        point=name, anchor=anchors.point(name),
        hint="a defect of plantlint, not of the model: please report it with the model file; "
             "neither result can be trusted at this point",
    ),)


__all__ = ["CrossCheck", "Linearisation", "ModeGroup", "cross_check", "linearise_at"]
