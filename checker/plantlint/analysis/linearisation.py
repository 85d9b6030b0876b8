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
stay exact constants (sin(1/3), sqrt(2)): ranks and directions come from
elimination with rigorous zero decisions by the kernel, and poles and zeros
from mpmath at ``DIGITS`` digits, with the tolerance stated.

At a regular point the invariant zeros must equal the eigenvalues of the
linearised zero dynamics (Isidori, Nonlinear Control Systems, 3rd ed., sec. 4.3
and Remark 5.1.4 for the multivariable case; for a linear plant with CA^(r-1)B
invertible both are the spectrum of the same restricted map). The two are
computed independently, so a disagreement is reported as an internal
inconsistency of the checker.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from math import gcd, lcm
from typing import Callable, Sequence

import flint
import mpmath
import sympy as sp
from flint import fmpq, fmpq_mat, fmpq_poly, fmpz_poly

from plantlint.analysis.equilibria import Equilibrium
from plantlint.analysis.zero_dynamics import ZeroDynamics, show_eigenvalues
from plantlint.core.findings import Finding, Severity
from plantlint.kernel.exact import number_decider, rank as exact_rank
from plantlint.kernel.lie import Kernel
from plantlint.language.printer import show_number

#: Working precision (decimal digits) of the numeric route.
DIGITS = 50
#: Coefficients of the zero polynomial below this fraction of the largest are
#: taken as zero on the numeric route (the degree decision).
COEFFICIENT_TOLERANCE = 1e-30
#: Relative tolerance of the cross-check |z - w| <= tol * (1 + |z|).
CROSS_CHECK_TOLERANCE = 1e-8
_ROOT_BITS = 128
#: Entries of a non-rational Kalman matrix beyond this size (operations) are not
#: built; the ranks are then not decided.
_SIZE_LIMIT = 4000

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
    if any(e.has(sp.zoo, sp.nan, sp.oo, -sp.oo) for e in entries):
        return Linearisation(name, "undefined", reason="a derivative of the rates or outputs is undefined at the point",
                             A=tuple(rows), B=tuple(b_rows), C=tuple(c_rows))
    if all(e.is_Rational for e in entries):
        lin = _exact(name, A, B, C, plant.states)
    else:
        lin = _numeric(name, A, B, C, plant.states, number_decider(kernel))
    lin = _with(lin, A=tuple(rows), B=tuple(b_rows), C=tuple(c_rows))
    check = cross_check(lin, zero_dynamics)
    findings = _inconsistency(name, check)
    return _with(lin, cross_check=check, findings=findings)


def _with(lin: Linearisation, **changes: object) -> Linearisation:
    from dataclasses import replace

    return replace(lin, **changes)  # type: ignore[arg-type]


def _tidy(e: sp.Expr) -> sp.Expr:
    """Small algebraic constants that are rational in disguise ((1+sqrt(2))*(1-sqrt(2)))."""
    if e.is_Rational or e.free_symbols or sp.count_ops(e) > 60:
        return e
    expanded = sp.expand(e)
    return expanded if expanded.is_Rational else e


# -- exact route -------------------------------------------------------------------------
def _q(M: sp.Matrix) -> fmpq_mat:
    return fmpq_mat(M.rows, M.cols, [fmpq(int(e.p), int(e.q)) for e in M])


def _exact(name: str, A_: sp.Matrix, B_: sp.Matrix, C_: sp.Matrix, states: Sequence[sp.Symbol]) -> Linearisation:
    n, m, p = A_.rows, B_.cols, C_.rows
    A, B, C = _q(A_), _q(B_), _q(C_)
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
            zpoly = _poly_text(monic)
    elif p != m:
        note = f"not square ({p} output(s), {m} input(s)): transmission zeros are computed for square plants"
    return Linearisation(name, "computed", exact=True, poles=_roots(chi), characteristic_polynomial=_poly_text(chi),
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
    return ModeGroup(_roots(factor), _poly_text(factor), tuple(_combination(v, states) for v in vectors))


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
    old = flint.ctx.prec
    flint.ctx.prec = _ROOT_BITS
    try:
        for q, mult in _factor(poly):
            coeffs = q.coeffs()
            if q.degree() == 1:
                out.extend([complex(float(Fraction(-int(coeffs[0]), int(coeffs[1]))), 0.0)] * mult)
                continue
            for c, k in q.complex_roots():
                re = 0.0 if c.real.is_zero() else float(c.real.mid())
                im = 0.0 if c.imag.is_zero() else float(c.imag.mid())
                out.extend([complex(re, im)] * (k * mult))
    finally:
        flint.ctx.prec = old
    return tuple(sorted(out, key=lambda z: (z.real, z.imag)))


def _poly_text(poly: fmpq_poly) -> str:
    s = sp.Symbol("s")
    coeffs = [sp.Rational(int(c.p), int(c.q)) for c in reversed(poly.coeffs())]
    return str(sp.Poly(coeffs, s).as_expr()).replace("**", "^") if coeffs else "0"


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
Decide = Callable[[sp.Expr], "bool | None"]


def _numeric(name: str, A: sp.Matrix, B: sp.Matrix, C: sp.Matrix, states: Sequence[sp.Symbol],
             decide: Decide) -> Linearisation:
    """Entries with exact irrational constants: ranks and directions by elimination with
    rigorous zero decisions; poles and zeros at ``DIGITS`` digits."""
    n, m, p = A.rows, B.cols, C.rows
    with mpmath.workdps(DIGITS):
        An = _mp(A)
        poles = _eig(An) if n else []
        ctrl_rank: int | None = None
        unctrl: tuple[ModeGroup, ...] = ()
        reason = ""
        if m:
            K = _kalman(A, B)
            if K is None:
                reason = "the Kalman matrix grew too large to decide its rank exactly"
            else:
                ctrl_rank, certain = exact_rank(K.T.tolist(), decide)
                if not certain:
                    reason = "some entries of the Kalman matrix could not be decided zero or not: its rank is a lower bound"
                if ctrl_rank < n:
                    unctrl = _numeric_group(K.T, A, states, decide, left=True)
        obs_rank: int | None = None
        unobs: tuple[ModeGroup, ...] = ()
        if p:
            O = _kalman(A.T, C.T)
            if O is None:
                reason = reason or "the observability matrix grew too large to decide its rank exactly"
            else:
                obs_rank, certain = exact_rank(O.T.tolist(), decide)
                if not certain:
                    reason = reason or ("some entries of the observability matrix could not be decided zero or not: "
                                        "its rank is a lower bound")
                if obs_rank < n:
                    unobs = _numeric_group(O.T, A, states, decide, left=False)  # O.T: [C; CA; ...]
        zeros: tuple[complex, ...] | None = None
        note, tol = "", None
        if p == m and m:
            coeffs = _pencil_coefficients(An, _mp(B), _mp(C))
            tol = COEFFICIENT_TOLERANCE
            top = max((abs(c) for c in coeffs), default=mpmath.mpf(0))
            kept = list(coeffs)
            while kept and abs(kept[-1]) <= tol * top:
                kept.pop()
            if not kept:
                note = ("det [[sI - A, -B], [C, 0]] vanishes for every s (numerically, relative coefficient "
                        f"tolerance {tol:g}): no finite set of zeros")
            else:
                zeros = tuple(sorted(_polyroots(kept), key=lambda z: (z.real, z.imag)))
        elif p != m:
            note = f"not square ({p} output(s), {m} input(s)): transmission zeros are computed for square plants"
    return Linearisation(name, "computed", reason=reason, exact=False,
                         poles=tuple(sorted(poles, key=lambda z: (z.real, z.imag))),
                         controllability_rank=ctrl_rank, uncontrollable=unctrl, observability_rank=obs_rank,
                         unobservable=unobs, zeros=zeros, zeros_note=note, tolerance=tol)


def _mp(M: sp.Matrix) -> mpmath.matrix:
    out = mpmath.matrix(M.rows, M.cols)
    for i in range(M.rows):
        for j in range(M.cols):
            e = M[i, j]
            out[i, j] = mpmath.mpf(int(e.p)) / int(e.q) if e.is_Rational else mpmath.mpf(
                sp.N(e, mpmath.mp.dps + 10))
    return out


def _eig(M: mpmath.matrix) -> list[complex]:
    if M.rows == 1:  # mpmath.eig returns a tuple for 1 x 1 whatever the flags
        return [complex(M[0, 0])]
    return [_clean(complex(z)) for z in mpmath.eig(M, left=False, right=False)]


def _clean(z: complex) -> complex:
    """Drop a rounding-level imaginary part of a real eigenvalue (display only)."""
    return complex(z.real, 0.0) if abs(z.imag) <= 1e-30 * (1 + abs(z)) else z


def _kalman(A: sp.Matrix, B: sp.Matrix) -> sp.Matrix | None:
    """[B, AB, ..., A^(n-1) B] with exact constant entries, or None beyond the size limit."""
    blocks = [B]
    for _ in range(A.rows - 1):
        nxt = (A * blocks[-1]).applyfunc(_tidy)
        if any(sp.count_ops(e) > _SIZE_LIMIT for e in nxt):
            return None
        blocks.append(nxt)
    return sp.Matrix.hstack(*blocks)


def _numeric_group(M: sp.Matrix, A: sp.Matrix, states: Sequence[sp.Symbol], decide: Decide,
                   left: bool) -> tuple[ModeGroup, ...]:
    """The null space of ``M`` (K^T for the uncontrollable quantities w, w K = 0; the
    observability matrix for the unobservable directions) as one group, with the
    eigenvalues of A restricted to it (numerically)."""

    def is_zero(e: sp.Expr) -> bool:
        return decide(e) is not False

    vectors = [list(v) for v in M.nullspace(simplify=False, iszerofunc=is_zero)]
    if not vectors:
        return ()
    V = _mp(sp.Matrix([v for v in vectors]).applyfunc(_tidy))  # d x n, rows span the subspace
    An = _mp(A)
    image = V * An if left else V * An.T  # left: W A = M W; right: V A^T = M^T V
    d = V.rows
    # least-squares restriction: M = image V^T (V V^T)^(-1)
    restricted = image * V.T * mpmath.inverse(V * V.T)
    modes = _eig(restricted) if d else []
    return (ModeGroup(tuple(sorted(modes, key=lambda z: (z.real, z.imag))), None,
                      tuple(_scaled_terms(v, states, decide) for v in vectors)),)


def _scaled_terms(v: list[sp.Expr], states: Sequence[sp.Symbol], decide: Decide) -> str:
    lead = next((e for e in v if e != 0 and decide(e) is False), None)
    if lead is None:
        return "0"
    scaled = [sp.Integer(0) if decide(e) is not False else _tidy(e / lead) for e in v]
    shown = [sp.Float(sp.N(e, 15), 6) if not e.is_Rational else e for e in scaled]
    return _terms(list(zip(shown, states)))


def _pencil_coefficients(A: mpmath.matrix, B: mpmath.matrix, C: mpmath.matrix) -> list[mpmath.mpf]:
    """Coefficients (constant first) of det [[sI - A, -B], [C, 0]], from its values at the
    (n + 1)-th roots of unity (an exact inverse transform for a degree <= n polynomial)."""
    n, m = A.rows, B.cols
    k = n + 1
    values = []
    for t in range(k):
        s = mpmath.expjpi(mpmath.mpf(2 * t) / k)
        M = mpmath.matrix(n + m, n + m)
        for i in range(n):
            for j in range(n):
                M[i, j] = (s if i == j else 0) - A[i, j]
            for j in range(m):
                M[i, n + j] = -B[i, j]
        for i in range(m):
            for j in range(n):
                M[n + i, j] = C[i, j]
        values.append(mpmath.det(M))
    coeffs = []
    for q in range(k):
        total = mpmath.mpc(0)
        for t in range(k):
            total += values[t] * mpmath.expjpi(-mpmath.mpf(2 * t * q) / k)
        coeffs.append((total / k).real)  # real data: the imaginary parts are rounding
    return coeffs


def _polyroots(coeffs: list[mpmath.mpf]) -> list[complex]:
    if len(coeffs) <= 1:
        return []
    try:
        roots = mpmath.polyroots(list(reversed(coeffs)), maxsteps=400, extraprec=8 * DIGITS)
    except mpmath.libmp.NoConvergence:
        import numpy as np

        roots = list(np.roots([float(c) for c in reversed(coeffs)]))
    return [_clean(complex(z)) for z in (roots if isinstance(roots, list) else [roots])]


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
    return CrossCheck("agrees", f"the {len(ours)} transmission zero(s) equal the zero-dynamics eigenvalues "
                                f"(relative tolerance {CROSS_CHECK_TOLERANCE:g})")


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
    return (Finding(
        "internal-inconsistency", Severity.ERROR,
        f"internal inconsistency at point {name}: the linearisation and the zero dynamics, computed "
        f"independently, disagree ({check.detail})",
        point=name, anchor=f"point {name}",
        hint="a defect of plantlint, not of the model: please report it with the model file; "
             "neither result can be trusted at this point",
    ),)


# -- report -------------------------------------------------------------------------------------
def _pairs(values: Sequence[complex]) -> list[list[float]]:
    return [[z.real, z.imag] for z in values]


def _floats(rows: Sequence[Sequence[sp.Expr]]) -> list[list[float]]:
    return [[float(e) if e.is_Rational else float(sp.N(e, 20)) for e in row] for row in rows]


def _groups_json(groups: Sequence[ModeGroup]) -> list[dict[str, object]]:
    return [{"eigenvalues": _pairs(g.eigenvalues), "polynomial": g.polynomial, "directions": list(g.directions)}
            for g in groups]


def linearisation_json(lin: Linearisation, outputs: int, inputs: int) -> dict[str, object]:
    """The analysis record for one point (floats; exact values are in ``plantlint explain``)."""
    computed = lin.status == "computed"
    return {
        "status": lin.status,
        "reason": lin.reason or None,
        "parameters": "nominal",
        "exact": lin.exact,
        "A": _floats(lin.A) if computed else None,
        "B": _floats(lin.B) if computed else None,
        "C": _floats(lin.C) if computed else None,
        "D": [[0.0] * inputs for _ in range(outputs)],
        "poles": _pairs(lin.poles),
        "characteristic_polynomial": lin.characteristic_polynomial,
        "controllability_rank": lin.controllability_rank,
        "uncontrollable": _groups_json(lin.uncontrollable),
        "observability_rank": lin.observability_rank,
        "unobservable": _groups_json(lin.unobservable),
        "transmission_zeros": _pairs(lin.zeros) if lin.zeros is not None else None,
        "zero_polynomial": lin.zero_polynomial,
        "zeros_note": lin.zeros_note or None,
        "tolerance": lin.tolerance,
        "cross_check": {"status": lin.cross_check.status, "detail": lin.cross_check.detail},
    }


__all__ = ["CrossCheck", "Linearisation", "ModeGroup", "cross_check", "linearisation_json", "linearise_at"]
