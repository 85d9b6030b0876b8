"""Time the zero-dynamics analysis of a 6-state, 2-input, 2-output plant at one point.

Standalone script (not collected by pytest): ``python benchmarks/bench_zero_dynamics.py``.
The plant is invented: two carts on a spring, the first carrying a damped pendulum;
outputs are the cart positions (vector relative degree (2, 2), zero dynamics = the
pendulum). Target: well under a second per point, cold kernel included.
"""

from __future__ import annotations

import time

import sympy as sp

from plantlint.analysis.equilibria import solve_point
from plantlint.kernel.lie import Kernel
from plantlint.analysis.normal_form import normal_form_at
from plantlint.kernel.plant import Plant
from plantlint.analysis.serialise import zero_dynamics_json
from plantlint.analysis.zero_dynamics import zero_dynamics_at


def two_carts() -> Plant:
    p1, v1, p2, v2, th, w = sp.symbols("p1 v1 p2 v2 th w")
    F1, F2 = sp.symbols("F1 F2")
    k, c, d, g, L = sp.Integer(4), sp.Rational(1, 2), sp.Rational(1, 10), sp.Rational(981, 100), sp.Rational(3, 2)
    mass1 = 1 + sp.sin(th) ** 2 / 4
    f = [
        v1,
        -k * (p1 - p2) - c * v1 + sp.sin(th) * w**2 / (2 + sp.cos(th)),
        v2,
        k * (p1 - p2) - c * v2,
        w,
        -(g / L) * sp.sin(th) - d * w,
    ]
    g1 = [0, 1 / mass1, 0, 0, 0, sp.cos(th) / (2 * L)]
    g2 = [0, 0, 0, 1, 0, -sp.cos(th) / (2 * L)]
    return Plant.from_matrices("two_carts", [p1, v1, p2, v2, th, w], [F1, F2], f, [g1, g2], [p1, p2])


def tilted_point(plant: Plant) -> dict[sp.Symbol, sp.Expr]:
    """A rest point with the pendulum held at 1/5 rad by the spring force (exact)."""
    p1, v1, p2, v2, th, w = plant.states
    th0 = sp.Rational(1, 5)
    g, k = sp.Rational(981, 100), sp.Integer(4)
    delta = 2 * g * sp.tan(th0) / (k * (2 + sp.sin(th0) ** 2 / 4))
    return {p1: delta, v1: 0, p2: 0, v2: 0, th: th0, w: 0}


def timed(label: str, fn) -> object:  # type: ignore[no-untyped-def]
    start = time.perf_counter()
    out = fn()
    print(f"{label:<44} {1000 * (time.perf_counter() - start):8.1f} ms")
    return out


def main() -> None:
    plant = two_carts()
    rest = {s: sp.Integer(0) for s in plant.states}
    tilted = tilted_point(plant)
    for name, point in (("rest (rational route)", rest), ("tilted (numeric route)", tilted)):
        kernel = Kernel(plant)
        eq = timed(f"{name}: equilibrium", lambda: solve_point(plant, "p", point, kernel))
        zd = timed(f"{name}: zero dynamics, cold kernel", lambda: zero_dynamics_at(kernel, [2, 2], point, "p"))
        timed(f"{name}: zero dynamics, warm kernel", lambda: zero_dynamics_at(kernel, [2, 2], point, "p"))
        nf = timed(f"{name}: normal form", lambda: normal_form_at(kernel, [2, 2], point))
        print(f"    equilibrium={eq.equilibrium}  {zero_dynamics_json(zd)}  exact={zd.exact}")  # type: ignore[attr-defined]
        print(f"    eta={nf.eta}  zero dynamics={nf.zero_dynamics}")  # type: ignore[attr-defined]


if __name__ == "__main__":
    main()
