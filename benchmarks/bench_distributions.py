"""Time the full-state linearizability analysis of 6-state single-input plants.

Standalone script (not collected by pytest): ``python benchmarks/bench_distributions.py``.
Demo plants, numbers invented:

* ``chain``: three masses on a line joined by hardening springs (k d + k3 d^3), the
  first one also pulled by a pendulum-like term sin(q1), the force on the last one.
  State linearizable; the far mass position q1 has relative degree 6.
* ``chain_mixed``: the same kind of chain written in mixed coordinates (a polynomial
  change of coordinates that is not triangular), so the brackets only fall into the
  distributions after real cancellation.
* ``chain_twisted``: the chain with a velocity-squared coupling that breaks
  involutivity (the failing path).

Each run starts from a cold kernel and a cleared sympy cache. The time to build the
kernel's ad_f^k g tower (shared with the other analyses) is shown apart from the ranks
and involutivity work of plantlint.analysis.distributions. Target: about a second for the
involutivity analysis of a 6-state plant.
"""

from __future__ import annotations

import statistics
import time

import sympy as sp
from sympy.core.cache import clear_cache

from plantlint.analysis.distributions import analyse_distributions, distributions_at
from plantlint.analysis.serialise import distributions_json
from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant

R = sp.Rational
RUNS = 3


def spring(d: sp.Expr) -> sp.Expr:
    return 2 * d + R(1, 2) * d**3


def chain(twisted: bool = False) -> Plant:
    q1, v1, q2, v2, q3, v3, force = sp.symbols("q1 v1 q2 v2 q3 v3 F")
    f = [
        v1 + (v3**2 / 4 if twisted else 0),
        -spring(q1 - q2) - R(3, 2) * sp.sin(q1),
        v2,
        spring(q1 - q2) - spring(q2 - q3),
        v3,
        spring(q2 - q3) - R(1, 10) * v3,
    ]
    name = "chain_twisted" if twisted else "chain"
    return Plant.from_matrices(name, [q1, v1, q2, v2, q3, v3], [force], f, [[0, 0, 0, 0, 0, 1]], [q1])


def chain_mixed() -> Plant:
    """z = Phi(x) with Phi a composition of polynomial shears; the chain lives in z."""
    x = sp.symbols("x1:7")
    force = sp.Symbol("F")

    def phi(v: tuple[sp.Expr, ...]) -> list[sp.Expr]:
        y = list(v)
        y[0] = y[0] + y[5] ** 2 / 4
        y[5] = y[5] + y[1] ** 2 / 2
        y[2] = y[2] + y[4] * y[3] / 3
        return y

    z = phi(x)
    J_inv = sp.Matrix(z).jacobian(x).inv()
    drift_z = sp.Matrix([z[1] + z[0] ** 3 / 10, z[2], z[3] + z[0] * z[1] / 5, z[4], z[5], -z[0]])
    f = [sp.expand(e) for e in J_inv * drift_z]
    g = [sp.expand(e) for e in J_inv * sp.Matrix([0, 0, 0, 0, 0, 1])]
    return Plant.from_matrices("chain_mixed", list(x), [force], f, [g], [x[0]])


def time_one(plant: Plant) -> tuple[float, float, float, dict[str, object], tuple[bool, ...]]:
    """(tower, distributions, point) seconds from a cold kernel, the verdict, involutivity."""
    clear_cache()
    kernel = Kernel(plant)
    start = time.perf_counter()
    for k in range(plant.n):
        kernel.ad(0, k)  # the kernel's shared ad_f^k g tower, also used by other analyses
    tower = time.perf_counter() - start
    start = time.perf_counter()
    structure = analyse_distributions(kernel)
    generic = time.perf_counter() - start
    start = time.perf_counter()
    pd = distributions_at(kernel, structure, "rest", {s: 0 for s in plant.states})
    at_point = time.perf_counter() - start
    return tower, generic, at_point, distributions_json(pd), structure.involutive_by_order


def main() -> None:
    print(f"{'plant':15} {'ad tower [s]':>12} {'ranks+involutivity [s]':>23} {'at point [s]':>13}  verdict")
    for build in (chain, chain_mixed, lambda: chain(twisted=True)):
        plant = build()
        runs = [time_one(plant) for _ in range(RUNS)]
        tower, generic, at_point = (statistics.median(r[i] for r in runs) for i in range(3))
        verdict, involutive = runs[-1][3], runs[-1][4]
        print(f"{plant.name:15} {tower:12.3f} {generic:23.3f} {at_point:13.3f}  {verdict}")
        print(f"{'':15} involutive D_0..D_4: {involutive}")


if __name__ == "__main__":
    main()
