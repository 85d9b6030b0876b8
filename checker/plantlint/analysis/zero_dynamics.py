"""Zero dynamics at an operating point: are the internal dynamics stable?

With vector relative degree (r_1..r_p) and total r < n, holding the outputs at
their values at x0 leaves n - r internal states moving under f* = f + g u*,
u* = -A(x)^(-1) b(x). Their linearisation decides minimum phase: J = Df*(x0) maps
T = ker dXi(x0) into itself and spec(J) = {0 (r times)} union spec(J restricted to T).

J is assembled from exact numbers at x0 by the product rule (f* is never built
symbolically). When J and dXi(x0) are rational the restriction is computed exactly
and the signs of the eigenvalues' real parts are decided exactly (rigorous root
isolation plus an exact test for roots on the imaginary axis). Otherwise (irrational
numbers) det(sI - J) = s^r p(s) is formed in rigorous ball arithmetic and the roots of p
are isolated in complex balls: a real part whose ball excludes 0 has a proven sign, one
that holds 0 is reported with its bound. Only when the roots cannot be isolated (a
repeated root) do the numbers go to mpmath at 40+ digits with a tolerance that is stated
in the result.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Sequence

import flint
import mpmath
import sympy as sp
from flint import acb, acb_poly, arb, arb_mat, fmpq_mat, fmpz_poly

from plantlint.core.deadline import bounded
from plantlint.kernel.exact import number_decider, rank as exact_rank, has_undefined
from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding
from plantlint.analysis.refine import REFINED_RESIDUAL
from plantlint.kernel.balls import UnsupportedExpression, to_arb
from plantlint.kernel.lie import Kernel
from plantlint.kernel.precision import precision
from plantlint.kernel.rational import coefficients_text, flint_matrix, matrix_entries, polynomial_text, sympy_rational
from plantlint.language.printer import show_number

VERDICTS = ("minimum_phase", "non_minimum_phase", "critical", "not_applicable", "undefined")
#: Relative tolerance (times the Frobenius norm of Df*(x0)) for "on the imaginary axis"
#: on the numeric route; the exact route needs none.
CRITICAL_TOLERANCE = 1e-9
_NUMERIC_DIGITS = (40, 80)
_ISOLATION_BITS = (128, 512, 2048)


@dataclass(frozen=True)
class ZeroDynamics:
    """Linearised zero dynamics at one point, with how the verdict was reached."""

    point: str
    dimension: int
    verdict: str  # one of VERDICTS
    eigenvalues: tuple[complex, ...] = ()  # sorted by real, then imaginary part
    exact: bool = False  # real-part signs decided exactly (no tolerance involved)
    characteristic_polynomial: str | None = None  # exact, in s, when the data are rational
    tolerance: float | None = None  # absolute |Re| bound for "critical" on the numeric route
    consistent: bool = True  # spec(J) = {0 x r} union spec(zero-dynamics matrix) held
    reason: str = ""
    findings: tuple[Finding, ...] = field(default_factory=tuple)
    #: on the numeric route, when the eigenvalues are only near the axis: why the exact
    #: characteristic polynomial cannot be Hurwitz (a coefficient that is exactly zero)
    not_hurwitz: str | None = None
    #: "undefined" because of what this analysis covers (a plant that is not square), not
    #: because of the plant: a claim about it is not decided rather than failed
    beyond_scope: bool = False


@dataclass
class _PointData:
    """Exact numbers at x0 from which J and dXi(x0) are assembled."""

    f0: sp.Matrix
    G0: sp.Matrix  # n x m
    Df0: sp.Matrix
    DG0: list[sp.Matrix]  # one n x n per input
    A0: sp.Matrix  # p x m decoupling matrix
    b0: sp.Matrix
    dA: list[sp.Matrix]  # dA/dx_k at x0
    db: list[sp.Matrix]
    dXi: sp.Matrix  # r x n

    def entries(self) -> list[sp.Expr]:
        mats = [self.f0, self.G0, self.Df0, self.A0, self.b0, self.dXi, *self.DG0, *self.dA, *self.db]
        return [e for m in mats for e in matrix_entries(m)]

    def rational(self) -> bool:
        return all(e.is_Rational for e in self.entries())


def zero_dynamics_at(
    kernel: Kernel, degrees: Sequence[int], eq_values: dict[sp.Symbol, sp.Expr], name: str,
    approximate: bool = False,
) -> ZeroDynamics:
    """Zero dynamics of the plant at the point ``eq_values`` (states at least);
    ``approximate``: the point is a refined equilibrium (a rest point to ~40 digits, not
    exactly), so the rest test has a tolerance and the exact routes are not taken."""
    plant = kernel.plant
    n, r = plant.n, sum(degrees)
    if len(degrees) != plant.p or plant.m != plant.p or any(d < 1 for d in degrees):
        return ZeroDynamics(name, 0, "undefined", reason="the zero dynamics are computed for square plants (as many "
                            "outputs as inputs) with one relative degree >= 1 per output", beyond_scope=True)
    if r > n:
        return ZeroDynamics(name, 0, "undefined", reason=f"total relative degree {r} exceeds the {n} states")
    if r == n:
        return ZeroDynamics(name, 0, "not_applicable", exact=True, reason="total relative degree equals the state dimension")
    point = dict(plant.param_nominal)
    point.update({s: v for s, v in eq_values.items() if s in plant.states or s in plant.params})
    missing = [s for s in plant.states if s not in point]
    if missing:
        return ZeroDynamics(name, n - r, "undefined", reason="point lacks " + ", ".join(map(str, missing)))
    data = _point_data(kernel, degrees, point)
    if has_undefined(data.entries()):
        return ZeroDynamics(name, n - r, "undefined",
                            reason="a derivative of the rates or outputs is undefined at the point")
    decide = number_decider(kernel)
    if _singular(data.A0, decide):
        return ZeroDynamics(name, n - r, "undefined", reason="decoupling matrix is singular at the point")
    if data.rational() and not approximate:
        return _exact_route(name, n, r, data)
    return _numeric_route(name, n, r, degrees, data, decide, approximate)


# -- exact numbers at the point --------------------------------------------------
def _point_data(kernel: Kernel, degrees: Sequence[int], point: dict[sp.Symbol, sp.Expr]) -> _PointData:
    fast = _taylor_point_data(kernel, degrees, point)
    if fast is not None:
        return fast
    return _symbolic_point_data(kernel, degrees, point)


def _taylor_point_data(kernel: Kernel, degrees: Sequence[int], point: dict[sp.Symbol, sp.Expr]) -> _PointData | None:
    """The same numbers from Taylor-mode towers in exact rationals (no symbolic tower):
    b, dXi and db from the flow with unit-vector dual numbers, A and dA from nested
    duals. None when a value at the point is not rational (sin(1/3)), undefined, or
    the numeric route is switched off: the symbolic route then computes them."""
    from plantlint.kernel.taylor import Inexact, QField, Undefined

    at = kernel.towers_at(point)
    if at is None:
        return None
    towers, vector = at
    plant = kernel.plant
    n, m, p = plant.n, plant.m, plant.p
    top = max(degrees)
    field = QField()
    try:
        values, grads = towers.gradients(vector, top, field)
        decoupling = towers.decoupling_gradients(vector, top - 1, field)
        f0, G0, _ = towers.values(vector, field, outputs=False)
    except (Inexact, Undefined, ZeroDivisionError):
        return None

    A0 = sp.Matrix([[sympy_rational(decoupling[j][i][degrees[i] - 1][0]) for j in range(m)] for i in range(p)])
    dA = [sp.Matrix([[sympy_rational(decoupling[j][i][degrees[i] - 1][1][k]) for j in range(m)] for i in range(p)])
          for k in range(n)]
    first = kernel.first_order_at(point, outputs=False)  # Df(x0), Dg_j(x0) by dual numbers, exactly
    if first is None:
        return None
    Df0 = sp.Matrix(first.Df)
    DG0 = [sp.Matrix(d) for d in first.Dg]
    return _PointData(
        f0=sp.Matrix([sympy_rational(v) for v in f0]),
        G0=sp.Matrix([[sympy_rational(G0[j][i]) for j in range(m)] for i in range(n)]),
        Df0=Df0,
        DG0=DG0,
        A0=A0,
        b0=sp.Matrix([sympy_rational(values[i][degrees[i]]) for i in range(p)]),
        dA=dA,
        db=[sp.Matrix([sympy_rational(grads[i][degrees[i]][k]) for i in range(p)]) for k in range(n)],
        dXi=sp.Matrix([[sympy_rational(v) for v in grads[i][k]] for i in range(p) for k in range(degrees[i])]),
    )


def _symbolic_point_data(kernel: Kernel, degrees: Sequence[int], point: dict[sp.Symbol, sp.Expr]) -> _PointData:
    plant = kernel.plant
    n, m = plant.n, plant.m

    def at(e: sp.Expr) -> sp.Expr:
        return e.xreplace(point) if e != 0 else sp.Integer(0)

    def grad_at(e: sp.Expr) -> list[sp.Expr]:
        return [at(d) for d in kernel.gradient(e)]

    A = [[kernel.lglf(j, i, degrees[i] - 1) for j in range(m)] for i in range(plant.p)]
    b = [kernel.lf(i, degrees[i]) for i in range(plant.p)]
    gradA = [[grad_at(e) for e in row] for row in A]
    gradb = [grad_at(e) for e in b]
    xi = [kernel.lf(i, k) for i in range(plant.p) for k in range(degrees[i])]
    return _PointData(
        f0=sp.Matrix([at(e) for e in plant.f]),
        G0=sp.Matrix([[at(plant.g[j][i]) for j in range(m)] for i in range(n)]),
        Df0=kernel.jacobian(plant.f).xreplace(point),
        DG0=[kernel.jacobian(plant.g[j]).xreplace(point) for j in range(m)],
        A0=sp.Matrix([[at(e) for e in row] for row in A]),
        b0=sp.Matrix([at(e) for e in b]),
        dA=[sp.Matrix([[gradA[i][j][k] for j in range(m)] for i in range(plant.p)]) for k in range(n)],
        db=[sp.Matrix([gradb[i][k] for i in range(plant.p)]) for k in range(n)],
        dXi=sp.Matrix([grad_at(e) for e in xi]),
    )


def _singular(A0: sp.Matrix, decide: "object") -> bool:
    """Exact (rigorous) singularity of the decoupling matrix at the point."""

    return exact_rank(A0.tolist(), decide)[0] < A0.rows  # type: ignore[arg-type]


def _assemble(data: _PointData, to: "object", inverse: "object", zeros: "object") -> tuple[object, object, object]:
    """J = Df + G Du* + sum_j Dg_j u*_j and f*(x0), in the number field given."""
    A0 = to(data.A0)
    Ainv = inverse(A0)
    u0 = -(Ainv * to(data.b0))
    n = data.f0.rows
    m = data.G0.cols
    G0 = to(data.G0)
    J = to(data.Df0)
    for k in range(n):
        du_k = -(Ainv * (to(data.dA[k]) * u0 + to(data.db[k])))
        col = G0 * du_k
        for i in range(n):
            J[i, k] += col[i, 0]
    for j in range(m):
        J = J + to(data.DG0[j]) * u0[j, 0]
    rest = to(data.f0) + G0 * u0
    return J, rest, u0


# -- exact route -------------------------------------------------------------------
def _exact_route(name: str, n: int, r: int, data: _PointData) -> ZeroDynamics:
    J, rest, _ = _assemble(data, flint_matrix, lambda A: A.inv(), None)
    d = n - r
    if any(rest[i, 0] != 0 for i in range(n)):
        return ZeroDynamics(name, d, "undefined", reason="the point is not a rest point of the zero dynamics")
    dXi = flint_matrix(data.dXi)
    reduced, rank = dXi.rref()
    if rank != r:
        return ZeroDynamics(name, d, "undefined", reason=f"output derivatives have rank {rank}, not {r}, at the point")
    pivots = []
    row = 0
    for col in range(n):
        if row < rank and reduced[row, col] != 0:
            pivots.append(col)
            row += 1
    free = [c for c in range(n) if c not in pivots]
    N = fmpq_mat(n, d)
    for a, fc in enumerate(free):
        N[fc, a] = 1
        for i, pc in enumerate(pivots):
            N[pc, a] = -reduced[i, fc]
    JN = J * N
    M = fmpq_mat(d, d, [JN[fc, a] for fc in free for a in range(d)])
    invariant = N * M == JN
    poly = M.charpoly()
    consistent = invariant and J.charpoly() == poly * flint.fmpq_poly([0, 1]) ** r
    if not invariant:
        return ZeroDynamics(name, d, "undefined", consistent=False,
                            reason="ker dXi is not invariant under Df* (relative degrees do not fit the plant)")
    roots = _classify_roots(poly.numer())
    eigs = [(z, sign) for z, sign, mult in roots for _ in range(mult)]
    eigs.sort(key=lambda e: (e[0].real, e[0].imag))
    return _verdict(name, d, eigs, exact=all(s is not None for _, s, _ in roots), tolerance=None,
                    consistent=consistent, polynomial=polynomial_text(poly))


def _classify_roots(P: fmpz_poly) -> list[tuple[complex, int | None, int]]:
    """Roots of P with the exact sign of each real part (None if undecided)."""
    axis = _axis_polynomial(P)
    with precision():  # each precision tried is set below; the caller's comes back
        for bits in _ISOLATION_BITS:
            flint.ctx.prec = bits
            balls = P.complex_roots()
            omegas = [c.real for c, _ in axis.complex_roots() if c.imag == 0] if axis.degree() > 0 else []
            signs = _signs(balls, omegas)
            if all(s is not None for s in signs) or bits == _ISOLATION_BITS[-1]:
                return [(_complex(c, s), s, mult) for (c, mult), s in zip(balls, signs)]
    return []


def _axis_polynomial(P: fmpz_poly) -> fmpz_poly:
    """gcd of Re P(i w) and Im P(i w): its real roots w are exactly P's roots i w."""
    coeffs = [int(c) for c in P.coeffs()]
    re = [0] * len(coeffs)
    im = [0] * len(coeffs)
    for k, c in enumerate(coeffs):
        sign = -1 if (k // 2) % 2 else 1  # i^k = (+1, +i, -1, -i)
        if k % 2 == 0:
            re[k] = sign * c
        else:
            im[k] = sign * c
    return fmpz_poly(re).gcd(fmpz_poly(im))


def _signs(balls: list[tuple[acb, int]], omegas: list[object]) -> list[int | None]:
    out: list[int | None] = []
    near = [k for k, (c, _) in enumerate(balls) if not (c.real > 0 or c.real < 0)]
    for k, (c, _) in enumerate(balls):
        if c.real > 0:
            out.append(1)
        elif c.real < 0:
            out.append(-1)
        else:
            hits = [w for w in omegas if c.imag.overlaps(w)]
            unique = len(hits) == 1 and sum(1 for q in near if balls[q][0].imag.overlaps(hits[0])) == 1
            out.append(0 if unique else None)
    return out


def _complex(c: acb, sign: int | None) -> complex:
    re = 0.0 if sign == 0 else float(c.real.mid())
    return complex(re, float(c.imag.mid()))


# -- numeric route --------------------------------------------------------------------
def _numeric_route(
    name: str, n: int, r: int, degrees: Sequence[int], data: _PointData, decide: "object", approximate: bool = False
) -> ZeroDynamics:
    """Irrational numbers at the point (or, ``approximate``, a refined equilibrium known to
    ~40 digits): balls first, then mpmath with a stated tolerance."""
    d = n - r
    drive = data.G0 * (-(data.A0.LUsolve(data.b0)))  # G(x0) u*
    rest_exact = data.f0 + drive
    if approximate:
        if not _rests_within(data.f0, drive):
            return ZeroDynamics(name, d, "undefined", reason="the point is not a rest point of the zero dynamics "
                                "(not even within the refinement of the equilibrium)")
    elif any(not decide(e).taken_zero for e in rest_exact):  # type: ignore[operator]
        return ZeroDynamics(name, d, "undefined", reason="the point is not a rest point of the zero dynamics")
    # at a refined equilibrium ker dXi is invariant under Df* only to the refinement's
    # accuracy: the compression onto it (mpmath, with its tolerance) is the honest route
    balls = None if approximate else _ball_route(name, n, r, data)
    result, roots = balls if balls is not None else (None, None)
    for digits in _NUMERIC_DIGITS if result is None else ():
        with mpmath.workdps(digits):
            result = _numeric_once(name, n, r, data, digits)
        if result.consistent:
            break
    assert result is not None
    if result.verdict == "critical" and n <= STODOLA_STATES:
        look = bounded(STODOLA_SECONDS, lambda: _exact_look(data, n, r, decide))
        if isinstance(look, _ExactLook):
            if look.mirrored and roots is not None:
                why = (f"the characteristic polynomial of the zero dynamics is {look.mirrored} in s, so its roots "
                       "mirror across the axis, and each of these is the only root near its mirror image")
                result = _on_axis(name, n - r, roots, None, result, why)
            elif roots is not None:
                common = bounded(STODOLA_SECONDS, lambda: _mirrored_factor(look.p, decide))
                if isinstance(common, list):
                    why = ("they are roots of both p(s) and p(-s), where p is the characteristic polynomial of the "
                           f"zero dynamics (common factor {_factor_text(common)}, exact), so their mirror images "
                           "across the axis are roots too, and each is the only root near its mirror image")
                    result = _on_axis(name, n - r, roots, common, result, why)
            if look.missing is not None:  # said already when the roots are shown on the axis
                findings = tuple(replace(f, message=f"{f.message}; {look.missing}")
                                 if f.rule == "zero-dynamics-critical" and not result.exact else f
                                 for f in result.findings)
                return replace(result, not_hurwitz=look.missing, findings=findings)
    return result


def _rests_within(f0: sp.Matrix, drive: sp.Matrix) -> bool:
    """|f(x0) + G(x0) u*| within a refined equilibrium's accuracy (REFINED_RESIDUAL) of the
    size of its two parts (balls, 128 bits)."""
    from plantlint.kernel.balls import ball

    for i in range(f0.rows):
        size = ball(f0[i]).abs_upper() + ball(drive[i]).abs_upper() + 1
        if not bool(ball(f0[i] + drive[i]).abs_upper() <= size * REFINED_RESIDUAL):
            return False
    return True


def _ball_route(name: str, n: int, r: int, data: _PointData) -> tuple[ZeroDynamics, list[acb]] | None:
    """The zero dynamics from rigorous balls of the exact numbers at the point: det(sI - J)
    = s^r p(s) in ball arithmetic (arb), the roots of p isolated in complex balls (acb), and
    the sign of each real part read off its ball: a ball that excludes 0 is a proof. A real
    part whose ball holds 0 at the highest precision tried is reported with its bound (not
    on the axis, not off it). None when the roots cannot be isolated (a repeated root) or
    the numbers do not fit s^r p(s): the mpmath route then decides with its tolerance.
    The roots' balls come with the verdict, for :func:`_on_axis`."""
    with precision():  # each precision tried is set below; the caller's comes back
        for bits in _BALL_BITS:
            flint.ctx.prec = bits
            try:
                J, _, _ = _assemble(data, _to_arb_mat, lambda A: A.inv(), None)
                coeffs = J.charpoly().coeffs()  # lowest power first
            except (ZeroDivisionError, ValueError):  # a ball of A(x0) holding 0; a number without a ball
                continue
            if not all(c.contains(0) for c in coeffs[:r]):
                return None  # not s^r p(s): the relative degrees do not fit the plant
            try:
                roots = acb_poly(coeffs[r:]).roots(tol=arb(2) ** (-bits // 2))
            except ValueError:  # not isolated at this precision (or a repeated root)
                continue
            signs = [1 if z.real > 0 else (-1 if z.real < 0 else None) for z in roots]
            if any(sg is None for sg in signs) and bits != _BALL_BITS[-1]:
                continue
            # a real part whose ball holds 0 is shown as 0 (its bound is stated beside it), not
            # as the ball's midpoint (1.5e-153, noise)
            eigs = sorted(((complex(float(z.real.mid()) if sg is not None else 0.0, float(z.imag.mid())), sg)
                           for z, sg in zip(roots, signs)),
                          key=lambda e: (e[0].real, e[0].imag))
            near = [abs(z.real).upper() for z, sg in zip(roots, signs) if sg is None]
            bound = float(max(near)) if near else None
            return (_verdict(name, n - r, eigs, exact=bound is None, tolerance=bound, consistent=True, polynomial=None),
                    list(roots))
    return None


#: Precisions of the ball route; its bound for a real part it cannot sign is about 2^(-bits/2).
_BALL_BITS = (128, 256, 512)


def _to_arb_mat(M: sp.Matrix) -> arb_mat:
    return arb_mat(M.rows, M.cols, [to_arb(e) for e in M])


#: Bounds of the exact look at the characteristic polynomial when the numeric route leaves
#: eigenvalues near the imaginary axis (sympy's charpoly of Df*(x0) with exact constants).
STODOLA_STATES = 8
STODOLA_SECONDS = 3.0


@dataclass(frozen=True)
class _ExactLook:
    """What the exact characteristic polynomial p of the zero dynamics shows when the
    numeric routes leave eigenvalues near the imaginary axis."""

    missing: str | None  # why p is not Hurwitz: a coefficient that is exactly zero
    mirrored: str | None  # "even" or "odd": p(-s) = +-p(s) exactly, its roots mirror across the axis
    p: list[sp.Expr]  # the exact coefficients of p, highest power first


def _exact_look(data: _PointData, n: int, r: int, decide: "object") -> _ExactLook | None:
    """det(sI - Df*(x0)) = s^r p(s), p the zero dynamics' characteristic polynomial, from
    the exact constants at the point. A Hurwitz polynomial has every coefficient non-zero
    and of one sign (Stodola's necessary condition; any control text, e.g. Ogata, Modern
    Control Engineering, Routh's criterion): a coefficient of p proven exactly zero proves
    that the zero dynamics are not asymptotically stable in their linearisation. When
    every other coefficient is exactly zero (p has powers of one parity only), p(-s) =
    +-p(s), which :func:`_on_axis` uses to place roots on the axis. None when s^r is not
    shown to divide the determinant exactly."""
    J, _, _ = _assemble(data, lambda M: sp.Matrix(M), lambda A: A.inv(), None)
    s = sp.Symbol("s")
    coeffs = [sp.expand(c) for c in J.charpoly(s).all_coeffs()]  # highest power first
    lowest, p = coeffs[len(coeffs) - r:], coeffs[: len(coeffs) - r]
    if not all(decide(c).proven_zero for c in lowest):  # type: ignore[operator]
        return None  # s^r does not divide it exactly (as far as can be shown): say nothing
    degree = len(p) - 1
    zero = [bool(k) and decide(c).proven_zero for k, c in enumerate(p)]  # type: ignore[operator]
    missing = None
    if any(zero):
        power = degree - zero.index(True)
        term = "constant term" if power == 0 else ("s term" if power == 1 else f"s^{power} term")
        missing = (f"the characteristic polynomial of the zero dynamics has no {term} (its coefficient is "
                   "exactly zero), so it is not Hurwitz")
    mirrored = degree >= 1 and all(zero[k] for k in range(1, degree + 1, 2))
    return _ExactLook(missing, ("even" if degree % 2 == 0 else "odd") if mirrored else None, p)


def _mirrored_factor(p: list[sp.Expr], decide: "object") -> list[sp.Expr] | None:
    """The exact coefficients (highest power first) of a common factor of p(s) and p(-s) of
    degree >= 1, or None. sympy's gcd over its expression domain finds a candidate; it is
    kept only when it divides both with every remainder coefficient proven zero (the
    kernel's zero test), so a wrong candidate costs the proof, never its soundness."""
    s = sp.Symbol("s")
    try:
        P = sp.Poly(p, s)
        Q = sp.Poly(P.as_expr().subs(s, -s), s)
        G = sp.gcd(P, Q)
        if G.degree() < 1:
            return None
        for F in (P, Q):
            remainder = F.rem(G)
            if not all(decide(sp.expand(c)).proven_zero for c in remainder.all_coeffs()):  # type: ignore[operator]
                return None
        lead = G.LC()
        coeffs = [sp.expand(c / lead) for c in G.all_coeffs()]
    except (sp.PolynomialError, ValueError, TypeError, ZeroDivisionError, ArithmeticError):
        return None
    return coeffs


def _factor_text(coeffs: list[sp.Expr]) -> str:
    """``s^2 + sqrt(3)/2`` (powers of s first, as sympy writes a polynomial), or its degree
    when it would be long."""
    text = coefficients_text(coeffs)
    return text if len(text) <= FACTOR_TEXT else f"of degree {len(coeffs) - 1}"


#: A common factor is written out in a message when it is at most this long.
FACTOR_TEXT = 60


def _on_axis(name: str, d: int, roots: list[acb], common: list[sp.Expr] | None, result: ZeroDynamics,
             why: str) -> ZeroDynamics:
    """The ball route's verdict with the real parts it could not sign proven zero.

    ``common`` is an exact common factor G of p(s) and p(-s) (None: G = p, which is even or
    odd). A root z of G has -z, hence -conj(z) (p has real coefficients), among the roots of
    p. The balls of p's roots are disjoint and each holds exactly one root (flint's
    validated isolation); so do G's. A ball B of p whose root is shown to be a root of G
    (a ball of G meets B and no other ball of p) and whose mirror image meets no other
    ball of p holds -conj(z) as well as z: -conj(z) = z, Re z = 0. The verdict is unchanged
    unless every root the balls left unsigned is shown so."""
    unsigned = [k for k, z in enumerate(roots) if not (z.real > 0 or z.real < 0)]
    shared = _roots_of(common, roots) if common is not None else [True] * len(roots)
    if shared is None:
        return result
    for k in unsigned:
        mirror = acb(-roots[k].real, roots[k].imag)
        if not shared[k] or any(mirror.overlaps(w) for j, w in enumerate(roots) if j != k):
            return result
    eigs = sorted(((complex(float(z.real.mid()) if k not in unsigned else 0.0, float(z.imag.mid())),
                    0 if k in unsigned else (1 if z.real > 0 else -1)) for k, z in enumerate(roots)),
                  key=lambda e: (e[0].real, e[0].imag))
    return _verdict(name, d, eigs, exact=True, tolerance=None, consistent=True, polynomial=None, proof=why)


def _roots_of(common: list[sp.Expr], roots: list[acb]) -> list[bool] | None:
    """For each of p's root balls, whether its root is shown to be a root of the factor
    G (coefficients highest power first): one of G's isolated root balls meets it and no
    other ball of p. None when G's roots cannot be isolated (a repeated root) or a
    coefficient has no ball."""
    with precision():  # each precision tried is set below; the caller's comes back
        for bits in _BALL_BITS:
            flint.ctx.prec = bits
            try:
                g_roots = acb_poly([to_arb(c) for c in reversed(common)]).roots(tol=arb(2) ** (-bits // 2))
            except (ValueError, TypeError, UnsupportedExpression):
                continue
            shared = [False] * len(roots)
            for c in g_roots:
                met = [k for k, z in enumerate(roots) if c.overlaps(z)]
                if len(met) == 1:
                    shared[met[0]] = True
            return shared
    return None


def _to_mp(M: sp.Matrix) -> mpmath.matrix:
    out = mpmath.matrix(M.rows, M.cols)
    for i in range(M.rows):
        for j in range(M.cols):
            e = M[i, j]
            out[i, j] = mpmath.mpf(int(e.p)) / int(e.q) if e.is_Rational else mpmath.mpf(e.evalf(mpmath.mp.dps + 10))
    return out


def _numeric_once(name: str, n: int, r: int, data: _PointData, digits: int) -> ZeroDynamics:
    d = n - r
    J, _, _ = _assemble(data, _to_mp, lambda A: mpmath.inverse(A), None)
    _, sigma, V = mpmath.svd_r(_to_mp(data.dXi), full_matrices=True)
    N = mpmath.matrix(n, d)
    for a in range(d):
        for i in range(n):
            N[i, a] = V[r + a, i]
    M = N.T * J * N
    eig_m = _eigenvalues(M)
    eig_j = _eigenvalues(J)
    scale = 1.0 + float(mpmath.mnorm(J, 1))
    match_tol = 10.0 * scale * 10.0 ** (-digits / (n + 1))
    consistent = _same_multiset(eig_j, [0j] * r + eig_m, match_tol) and float(min(sigma)) > 1e-20 * scale
    # A simple eigenvalue, well apart from the others, is computed to about the working
    # precision times |Df*|: its sign is read with a tolerance of half the digits. One in a
    # cluster (a repeated root splits by the square root of the error, or worse) gets the
    # wide tolerance, relative to |Df*| (M is a compression of it). A wide tolerance for
    # every eigenvalue once called an unstable mode of a stiff refined point "critical".
    size = float(mpmath.mnorm(J, "F"))
    tight = 10.0 ** (-digits / 2) * (1.0 + size)
    wide = max(CRITICAL_TOLERANCE * size, 10.0 ** (-digits / 2))
    eigs: list[tuple[complex, int | None]] = []
    used: list[float] = []
    ordered = sorted(eig_m, key=lambda z: (z.real, z.imag))
    for k, z in enumerate(ordered):
        apart = min((abs(z - w) for q, w in enumerate(ordered) if q != k), default=math.inf)
        tol = tight if apart > 1e-6 * (1.0 + size) else wide
        sign = 0 if abs(z.real) <= tol else (1 if z.real > 0 else -1)
        if sign == 0:
            used.append(tol)
        eigs.append((z, sign))
    tolerance = max(used) if used else tight
    return _verdict(name, d, eigs, exact=False, tolerance=tolerance, consistent=consistent, polynomial=None)


def _eigenvalues(M: mpmath.matrix) -> list[complex]:
    if M.rows == 1:  # mpmath.eig returns a tuple for 1 x 1 whatever the flags
        return [complex(M[0, 0])]
    return [complex(z) for z in mpmath.eig(M, left=False, right=False)]


def _same_multiset(a: list[complex], b: list[complex], tol: float) -> bool:
    if len(a) != len(b):
        return False
    rest = list(b)
    for z in a:
        k = min(range(len(rest)), key=lambda q: abs(rest[q] - z))
        if abs(rest[k] - z) > tol:
            return False
        rest.pop(k)
    return True


# -- verdict and findings -----------------------------------------------------------------
def _verdict(
    name: str,
    d: int,
    eigs: list[tuple[complex, int | None]],
    exact: bool,
    tolerance: float | None,
    consistent: bool,
    polynomial: str | None,
    proof: str | None = None,
) -> ZeroDynamics:
    anchor = anchors.point(name)
    values = tuple(z for z, _ in eigs)
    unstable = [z for z, s in eigs if s == 1]
    on_axis = [z for z, s in eigs if s == 0]
    undecided = [z for z, s in eigs if s is None]
    findings: list[Finding] = []
    if unstable:
        verdict = "non_minimum_phase"
        findings.append(finding(
            "zero-dynamics-unstable",
            f"the zero dynamics at point {name} are unstable (non-minimum phase): "
            f"eigenvalue(s) with positive real part {show_eigenvalues(unstable)}",
            point=name, anchor=anchor,
            hint="output tracking by inversion would excite these internal modes",
        ))
    elif on_axis or undecided:
        verdict = "critical"
        how = ("exactly on the imaginary axis" + (f": {proof}" if proof else "")) if exact else (
            f"within {tolerance:.3g} of the imaginary axis" if tolerance is not None else "not separated from the imaginary axis")
        shown = show_eigenvalues(on_axis + undecided)
        findings.append(finding(
            "zero-dynamics-critical",
            f"linearisation cannot decide the stability of the zero dynamics at point {name}: "
            f"eigenvalue(s) {shown} lie {how}",
            point=name, anchor=anchor,
            hint="a centre-manifold (nonlinear) analysis of the zero dynamics is needed",
        ))
    else:
        verdict = "minimum_phase"
    return ZeroDynamics(name, d, verdict, values, exact, polynomial, tolerance, consistent, findings=tuple(findings))


def show_eigenvalues(values: Sequence[complex]) -> str:
    """Eigenvalues for a message, conjugate pairs written with +-."""
    parts: list[str] = []
    # a real root computed as a pair with an imaginary part at rounding level (a double root
    # -2.50663 +- 9.6e-21i) is shown as the real number it is
    pending = [complex(z.real, 0.0) if abs(z.imag) <= 1e-15 * abs(z) else z for z in values]
    while pending:
        z = pending.pop(0)
        if z.imag == 0:
            parts.append(show_number(z.real))
            continue
        partner = next((w for w in pending if abs(w - z.conjugate()) <= 1e-12 * (1 + abs(z))), None)
        if partner is not None:
            pending.remove(partner)
            re = "" if z.real == 0 else show_number(z.real) + " "
            parts.append(f"{re}\u00b1 {show_number(abs(z.imag))}i" if re else f"\u00b1{show_number(abs(z.imag))}i")
        else:
            parts.append(f"{show_number(z.real)}{'+' if z.imag > 0 else '-'}{show_number(abs(z.imag))}i")
    return ", ".join(parts)



def approximate_eigenvalues(
    kernel: Kernel, degrees: Sequence[int], point: dict[sp.Symbol, sp.Expr], digits: int = 30
) -> tuple[complex, ...] | None:
    """Eigenvalues of the linearised zero dynamics at a point known only approximately
    (an equilibrium solved numerically, for pictures): the numeric route of
    :func:`zero_dynamics_at` without its exact rest-point test, so never a verdict.
    None when the zero dynamics are not defined there."""
    plant = kernel.plant
    n, r = plant.n, sum(degrees)
    if len(degrees) != plant.p or plant.m != plant.p or any(d < 1 for d in degrees) or r >= n:
        return None
    full = dict(plant.param_nominal)
    full.update(point)
    if any(s not in full for s in plant.states):
        return None
    data = _point_data(kernel, degrees, full)
    try:
        with mpmath.workdps(digits):
            if mpmath.fabs(mpmath.det(_to_mp(data.A0))) == 0:
                return None
            return _numeric_once("", n, r, data, digits).eigenvalues
    except (ZeroDivisionError, ValueError, TypeError):
        return None
