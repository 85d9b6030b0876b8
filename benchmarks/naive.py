"""The structure analysis done the naive way, as an engineer would in a notebook.

Plain sympy on the generator's Python description (expressions built with sympy
operators, no text parsing): Lie derivatives by ``diff``, ``simplify`` on every
L_g L_f^k h, relative degree where ``simplify(expr) == 0`` first fails, the
decoupling matrix simplified entry by entry, ``simplify(det)`` when there are
several outputs, and the decoupling matrix at each declared point by ``subs``.

This is *less* than plantlint does (no envelope proof, zero dynamics or
distributions), so speed-ups measured against it are lower bounds.

    python benchmarks/naive.py MODEL_NAME        # prints one JSON line
"""

from __future__ import annotations

import json
import sys
import time
from pathlib import Path
from typing import Any

import sympy as sp

sys.path.insert(0, str(Path(__file__).resolve().parent))
from generate import ModelSpec, by_name, sym  # noqa: E402


def lie(expr: sp.Expr, field: list[sp.Expr], x: list[sp.Symbol]) -> sp.Expr:
    return sum((sp.diff(expr, xi) * fi for xi, fi in zip(x, field)), sp.Integer(0))


def naive_structure(spec: ModelSpec) -> dict[str, Any]:
    """Relative degrees, decoupling matrix and its determinant, the notebook way."""
    x, u, F, h = spec.resolved()
    zero = {ui: 0 for ui in u}
    f = [Fi.subs(zero) for Fi in F]
    g = [[sp.diff(Fi, uj) for Fi in F] for uj in u]
    n = len(x)
    degrees: list[int | None] = []
    rows: list[list[sp.Expr]] = []
    for hi in h:
        lf = hi
        found = None
        for k in range(n):
            lglf = [sp.simplify(lie(lf, gj, x)) for gj in g]
            if any(e != 0 for e in lglf):
                found = k + 1
                rows.append(lglf)
                break
            lf = lie(lf, f, x)
        degrees.append(found)
    out: dict[str, Any] = {"relative_degree": dict(zip((o for o, _, _ in spec.outputs), degrees))}
    if rows and len(rows) == len(h):
        A = sp.Matrix(rows).applyfunc(sp.simplify)
        det = sp.simplify(A.det()) if A.rows == A.cols else None
        out["decoupling_det_ops"] = int(sp.count_ops(det)) if det is not None else None
        out["decoupling_det_zero"] = bool(det == 0) if det is not None else None
        at_points = {}
        for name, values in spec.points:
            point = {sym(k): v for k, v in values.items() if sym(k) in x}
            if len(point) == n:
                at_points[name] = int(A.subs(point).rank())
        out["decoupling_rank_at"] = at_points
    return out


def main() -> None:
    name = sys.argv[1]
    t0 = time.perf_counter()
    result = naive_structure(by_name(name))
    result["seconds"] = time.perf_counter() - t0
    print(json.dumps(result))


if __name__ == "__main__":
    main()
