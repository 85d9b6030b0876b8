"""Timing of the structure analysis on a two-link planar arm (run as a script; not a test).

The arm is fully actuated (torques on both joints), outputs are the joint angles, and the
rates use an explicitly inverted 2 x 2 mass matrix, so the decoupling matrix is M(q)^-1
and det A = 1 / det M(q2). Demo numbers are invented.

    python benchmarks/bench_structure.py
"""

from __future__ import annotations

import time

import sympy as sp

from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant
from plantlint.analysis.structure import analyse_structure, certify_envelope, structure_at_point

R = sp.Rational


def two_link_arm(payload_range: tuple[sp.Expr, sp.Expr] | None = None) -> Plant:
    q1, q2, dq1, dq2, t1, t2 = sp.symbols("q1 q2 dq1 dq2 tau1 tau2")
    m2 = sp.Symbol("m2")
    m1, l1, r1, r2 = 1, 1, R(1, 2), R(1, 2)
    i1, i2, grav = R(1, 12), R(1, 12), R(981, 100)
    mass2 = m2 if payload_range else 1
    a = i1 + i2 + m1 * r1**2 + mass2 * (l1**2 + r2**2)
    b = mass2 * l1 * r2
    d = i2 + mass2 * r2**2
    c2 = sp.cos(q2)
    det_m = a * d - d**2 - b**2 * c2**2
    m_inv = sp.Matrix([[d, -(d + b * c2)], [-(d + b * c2), a + 2 * b * c2]]) / det_m
    h = -b * sp.sin(q2)
    coriolis = sp.Matrix([h * dq2 * dq1 + h * (dq1 + dq2) * dq2, -h * dq1**2])
    gravity = sp.Matrix([
        (m1 * r1 + mass2 * l1) * grav * sp.cos(q1) + mass2 * r2 * grav * sp.cos(q1 + q2),
        mass2 * r2 * grav * sp.cos(q1 + q2),
    ])
    acc = m_inv * (-coriolis - gravity)
    extra: dict = {}
    if payload_range:
        extra = dict(params=(m2,), param_nominal={m2: sp.Integer(1)}, param_box={m2: payload_range})
    return Plant.from_matrices(
        "two_link_arm", [q1, q2, dq1, dq2], [t1, t2],
        [dq1, dq2, acc[0], acc[1]],
        [[0, 0, m_inv[0, 0], m_inv[1, 0]], [0, 0, m_inv[0, 1], m_inv[1, 1]]],
        [q1, q2], ["y1", "y2"],
        state_box={q1: (-sp.pi, sp.pi), q2: (-sp.pi, sp.pi), dq1: (sp.Integer(-2), sp.Integer(2)), dq2: (sp.Integer(-2), sp.Integer(2))},
        **extra,
    )


def run(label: str, plant: Plant) -> None:
    t0 = time.perf_counter()
    kernel = Kernel(plant)
    structure = analyse_structure(kernel)
    t1 = time.perf_counter()
    rest = structure_at_point(kernel, structure, "rest", {s: sp.Integer(0) for s in plant.states})
    t2 = time.perf_counter()
    env = certify_envelope(kernel, structure, budget_seconds=30.0, max_boxes=200000)
    t3 = time.perf_counter()
    dims = len(plant.states) + len(plant.params)
    print(f"{label} ({dims}-dimensional box)")
    print(f"  relative degree {structure.relative_degree}, generic rank {structure.generic_rank}")
    print(f"  analysis            {1000 * (t1 - t0):8.1f} ms")
    print(f"  point 'rest'        {1000 * (t2 - t1):8.1f} ms  well defined: {rest.well_defined}")
    print(f"  envelope proof      {1000 * (t3 - t2):8.1f} ms  regular: {env.regular}, margin {env.margin}, "
          f"{env.boxes_examined} boxes, findings: {[f.rule for f in env.findings]}")


if __name__ == "__main__":
    run("two-link arm", two_link_arm())
    run("two-link arm, payload mass in [1/2, 2]", two_link_arm((R(1, 2), sp.Integer(2))))
