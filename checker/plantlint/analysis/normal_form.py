"""Local normal form at an operating point: coordinates (xi, eta) and, when small
enough, the zero dynamics eta' = q(0, eta) written out.

xi stacks L_f^k h_i (k < r_i). The n - r remaining coordinates are picked among
the states, then among x_a + x_b and x_a - x_b, so that the Jacobian of the whole
map is invertible at x0 (exact rank). Coordinates with L_g eta = 0 identically are
preferred: then the input does not enter the internal dynamics directly, which is
the form textbooks write the zero dynamics in.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import combinations
from typing import Iterator, Sequence

import sympy as sp

from plantlint.core.deadline import LATE, bounded
from plantlint.kernel.exact import ZeroDecider, number_decider, rank as exact_rank
from plantlint.language.printer import show_expr
from plantlint.kernel.lie import Kernel
from plantlint.kernel.rational import cancel_together

#: Larger systems are not handed to sympy's solver (it has no time limit).
MAX_SOLVE_UNKNOWNS = 4
MAX_SOLVE_OPS = 120
MAX_NONLINEAR_UNKNOWNS = 2
MAX_RESULT_OPS = 100
#: Wall-clock bound of writing the zero dynamics out (display only: the verdict comes from
#: zero_dynamics.py); beyond it the step is dropped with a note.
DISPLAY_SECONDS = 1.0
#: The note of a normal form whose zero dynamics were not written out (``check``).
WRITTEN_BY_EXPLAIN = "the zero dynamics are written out by `plantlint explain` (display only)"


@dataclass(frozen=True)
class NormalForm:
    """Coordinates of the normal form at one point."""

    xi: tuple[str, ...]  # L_f^k h_i, k < r_i, output by output
    eta: tuple[str, ...]  # chosen internal coordinates
    jacobian_rank: int
    invertible: bool
    input_free: bool  # every eta has L_g eta = 0 identically (the preferred form)
    # "x1' = -x1", one per eta (after "eta1 = x1 - x2" for combinations), when solved
    zero_dynamics: tuple[str, ...] | None = None
    note: str = ""


def xi_name(expr: sp.Expr, output: str, k: int) -> str:
    """The coordinate as written when short, else by its name (L_f^k y)."""
    if len(expr.args) > 6:  # cheap test first: a long sum or product is never shown
        return output if k == 0 else (f"L_f {output}" if k == 1 else f"L_f^{k} {output}")
    text = show_expr(expr, limit=10**6)
    if len(text) <= 40:
        return text
    return output if k == 0 else (f"L_f {output}" if k == 1 else f"L_f^{k} {output}")


def normal_form_at(kernel: Kernel, degrees: Sequence[int], eq_values: dict[sp.Symbol, sp.Expr],
                   write_out: bool = True) -> NormalForm:
    """Normal-form coordinates at ``eq_values`` for the given relative degrees; with
    ``write_out``, the zero dynamics solved and written out symbolically as well
    (display only, for ``explain``: no verdict depends on it)."""
    plant = kernel.plant
    n = plant.n
    point = dict(plant.param_nominal)
    point.update({s: v for s, v in eq_values.items() if s in plant.states or s in plant.params})
    decide = number_decider(kernel)
    xi = [kernel.lf(i, k) for i in range(plant.p) for k in range(degrees[i])]
    names = [xi_name(kernel.lf(i, k), plant.outputs[i], k) for i in range(plant.p) for k in range(degrees[i])]
    rows = [_gradient_at(kernel, e, point) for e in xi]
    rank = exact_rank(rows, decide)[0] if rows else 0
    if rank < len(xi):
        return NormalForm(tuple(names), (), rank, False, False,
                          note="the output derivatives are dependent at the point")
    chosen: list[sp.Expr] = []
    for phi in _candidates(kernel, prefer_input_free=True):
        if rank == n:
            break
        rank = _try_add(kernel, phi, rows, rank, decide, chosen)
    input_free = True
    for phi in _candidates(kernel, prefer_input_free=False):
        if rank == n:
            break
        if phi.phi in chosen:
            continue
        before = rank
        rank = _try_add(kernel, phi, rows, rank, decide, chosen)
        input_free = input_free and rank == before
    eta = tuple(chosen)
    dynamics, note = None, ""
    if rank == n and not write_out:
        note = WRITTEN_BY_EXPLAIN
    elif rank == n:
        solved = bounded(DISPLAY_SECONDS, lambda: _symbolic_zero_dynamics(kernel, degrees, xi, eta, point, decide))
        dynamics, note = solved if solved is not LATE else (
            None, f"the zero dynamics were not written out: solving for them took longer than "
                  f"{DISPLAY_SECONDS:g} s (display only; the verdict does not depend on it)")
    return NormalForm(
        tuple(names), tuple(map(show_expr, eta)), rank, rank == n, input_free, dynamics, note
    )


def _gradient_at(kernel: Kernel, expr: sp.Expr, point: dict[sp.Symbol, sp.Expr]) -> list[sp.Expr]:
    return [d.xreplace(point) for d in kernel.gradient(expr)]


@dataclass(frozen=True)
class _Candidate:
    """An internal coordinate x_a or x_a +- x_b: its expression and its (constant) weights."""

    phi: sp.Expr
    weights: tuple[tuple[int, int], ...]  # (state index, +1 or -1)

    def gradient(self, n: int) -> list[sp.Expr]:
        row: list[sp.Expr] = [sp.Integer(0)] * n
        for a, w in self.weights:
            row[a] = sp.Integer(w)
        return row

    def along(self, field: Sequence[sp.Expr]) -> sp.Expr:
        """L_X phi = sum of w_a X_a: the derivative of a linear coordinate needs no differentiation."""
        total = sp.Integer(0)
        for a, w in self.weights:
            total += field[a] if w == 1 else -field[a]
        return total


def _input_free(kernel: Kernel, phi: _Candidate) -> bool:
    return all(kernel.is_zero(phi.along(g)).taken_zero for g in kernel.g)


def _candidates(kernel: Kernel, prefer_input_free: bool) -> Iterator[_Candidate]:
    """States, then sums and differences of two states (lazily)."""
    states = kernel.plant.states
    for a, s in enumerate(states):
        phi = _Candidate(s, ((a, 1),))
        if not prefer_input_free or _input_free(kernel, phi):
            yield phi
    for (a, sa), (b, sb) in combinations(enumerate(states), 2):
        for phi in (_Candidate(sa + sb, ((a, 1), (b, 1))), _Candidate(sa - sb, ((a, 1), (b, -1)))):
            if not prefer_input_free or _input_free(kernel, phi):
                yield phi


def _try_add(
    kernel: Kernel,
    phi: _Candidate,
    rows: list[list[sp.Expr]],
    rank: int,
    decide: ZeroDecider,
    chosen: list[sp.Expr],
) -> int:
    """Keep ``phi`` when its differential (constant) raises the exact rank at the point."""
    row = phi.gradient(kernel.plant.n)
    new_rank = exact_rank([*rows, row], decide)[0]
    if new_rank > rank:
        rows.append(row)
        chosen.append(phi.phi)
    return new_rank if new_rank > rank else rank


# -- the zero dynamics written out -----------------------------------------------
def _symbolic_zero_dynamics(
    kernel: Kernel,
    degrees: Sequence[int],
    xi: list[sp.Expr],
    eta: tuple[sp.Expr, ...],
    point: dict[sp.Symbol, sp.Expr],
    decide: ZeroDecider,
) -> tuple[tuple[str, ...] | None, str]:
    """Solve Z* for the non-eta states and restrict f* = f + g u* to it.

    Only for plain-state eta and small systems: sympy's solver has no time limit,
    so size is checked before it is called.
    """
    plant = kernel.plant
    # plain states name themselves; a combination x_a +- x_b gets a fresh name
    names: list[sp.Symbol] = []
    fresh = 0
    for phi in eta:
        if phi.is_Symbol:
            names.append(phi)  # type: ignore[arg-type]
        else:
            fresh += 1
            names.append(sp.Symbol(f"eta{fresh}"))
    unknowns = [s for s in plant.states if s not in eta]
    equations = [plant.nominal(e - e.xreplace(point)) for e in xi]
    for phi, name in zip(eta, names):
        if not phi.is_Symbol:
            unknowns += [s for s in phi.free_symbols if s in plant.states and s not in unknowns]
            equations.append(phi - name)
    unknowns.sort(key=plant.states.index)
    if len(unknowns) > MAX_SOLVE_UNKNOWNS:
        return None, "too many states to eliminate for a symbolic zero dynamics"
    if sum(sp.count_ops(e) for e in equations) > MAX_SOLVE_OPS:
        return None, "output derivatives too large for a symbolic zero dynamics"
    eta_point = {name: phi.xreplace(point) for phi, name in zip(eta, names)}
    solution = _solve_through(equations, unknowns, eta_point, point, decide)
    if solution is None:
        return None, "could not solve the output constraints for the remaining states"
    ustar = _ustar(kernel, degrees)
    if ustar is None:
        return None, "decoupling matrix too large to invert symbolically"
    closed = [
        plant.f[k] + sum((plant.g[j][k] * ustar[j] for j in range(plant.m)), sp.Integer(0))
        for k in range(plant.n)
    ]
    out = [f"{name} = {show_expr(phi)}" for phi, name in zip(eta, names) if not phi.is_Symbol]
    for phi, name in zip(eta, names):
        rate = kernel.lie(phi, tuple(closed))
        rate = _cancel_with_trig_identity(plant.nominal(rate).xreplace(solution))
        if sp.count_ops(rate) > MAX_RESULT_OPS:
            return None, "zero dynamics too large to write out"
        out.append(f"{name}' = {show_expr(rate, limit=400)}")
    return tuple(out), ""


def _solve_through(
    equations: list[sp.Expr],
    unknowns: list[sp.Symbol],
    eta_point: dict[sp.Symbol, sp.Expr],
    point: dict[sp.Symbol, sp.Expr],
    decide: ZeroDecider,
) -> dict[sp.Symbol, sp.Expr] | None:
    """The branch of Z* through x0: unknown states in terms of the eta names."""
    linear = all(
        e.is_polynomial(*unknowns) and sp.Poly(e, *unknowns).total_degree() <= 1 for e in equations
    )
    try:
        if linear:
            matrix, rhs = sp.linear_eq_to_matrix(equations, unknowns)
            if matrix.rows != len(unknowns) or matrix.det() == 0:
                return None
            candidates = [dict(zip(unknowns, matrix.LUsolve(rhs)))]
        elif len(unknowns) <= MAX_NONLINEAR_UNKNOWNS:
            candidates = sp.solve(equations, unknowns, dict=True)
        else:
            return None
    except (NotImplementedError, ValueError, TypeError, sp.PolynomialError):
        return None
    at_eta = eta_point
    for sol in candidates:
        if set(sol) != set(unknowns) or any(v.has(*unknowns) for v in sol.values()):
            continue
        if all(decide(sol[s].xreplace(at_eta) - point[s]).taken_zero for s in unknowns):
            return {s: _cancel_with_trig_identity(v) for s, v in sol.items()}
    return None


def _ustar(kernel: Kernel, degrees: Sequence[int]) -> list[sp.Expr] | None:
    """u* = -A^(-1) b symbolically (small decoupling matrices only)."""
    plant = kernel.plant
    if plant.p > 2:
        return None
    A = sp.Matrix([[kernel.lglf(j, i, degrees[i] - 1) for j in range(plant.m)] for i in range(plant.p)])
    b = sp.Matrix([kernel.lf(i, degrees[i]) for i in range(plant.p)])
    if plant.p == 1:
        return [-b[0] / A[0, 0]]
    det = A[0, 0] * A[1, 1] - A[0, 1] * A[1, 0]
    return [-(A[1, 1] * b[0] - A[0, 1] * b[1]) / det, -(A[0, 0] * b[1] - A[1, 0] * b[0]) / det]


def _cancel_with_trig_identity(expr: sp.Expr) -> sp.Expr:
    """Cancel small expressions, with sin and cos as generators tied by cos^2 = 1 - sin^2
    (an exact rewrite, not a heuristic simplification); large ones stay as they are."""
    if sp.count_ops(expr) > MAX_RESULT_OPS:
        return expr
    out = cancel_together(expr)
    angles = {c.args[0] for c in out.atoms(sp.cos)} & {s.args[0] for s in out.atoms(sp.sin)}
    if angles:
        out = sp.cancel(out.subs({sp.cos(a) ** 2: 1 - sp.sin(a) ** 2 for a in angles}))
    return out
