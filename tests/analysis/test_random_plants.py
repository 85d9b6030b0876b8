"""Seeded random nonlinear plants against sympy done directly.

Each plant (2 to 4 states, one or two inputs, polynomial and trigonometric terms, input
fields that depend on the states) is written as a .plant file and analysed by plantlint.
The reference is computed here from the same sympy expressions, without plantlint's parser
or kernel:

- the generic relative degree: the first k with L_g L_f^(k-1) h not identically zero
  (``sympy.diff`` and ``sympy.simplify``), and whether it is defined at the point (that
  entry non-zero there);
- at an equilibrium (the origin), the linearisation A, B, C by ``Matrix.jacobian``, its poles
  by ``numpy.linalg.eigvals``, and the zero-dynamics eigenvalues as the invariant zeros of
  (A, B, C) by scipy's generalised eigenvalues of the Rosenbrock pencil (conftest). The
  linearisation of the zero dynamics is the zero dynamics of the linearisation where the
  relative degree is defined at an equilibrium (Isidori, Nonlinear Control Systems, 3rd ed.,
  section 4.3, recalled from memory);
- the rank of the controllability distribution at that equilibrium as the Kalman rank of
  (A, B) (numpy), since ad_f^k g(x0) = (-A)^k g(x0) where f(x0) = 0;
- for square plants with two inputs and two outputs, also the rank of the decoupling matrix
  at the origin (numpy's rank of the sympy rows), and the zero dynamics against the
  invariant zeros of the linearisation where that matrix is invertible;
- verdicts over a region: regularity over the state box against numpy sampling of the
  decoupling term (a sign change means a zero inside), and minimum phase over a parameter
  box against the invariant zeros at 25 parameter values across it.
"""

from __future__ import annotations

import random
from typing import Any

import numpy as np
import pytest
import sympy as sp

from conftest import kalman, rosenbrock_zeros
from plantlint.run.pipeline import analyse_bytes

PLANTS = 24
SEED = 20261203


def _term(rng: random.Random, X: tuple[sp.Symbol, ...]) -> sp.Expr:
    """One term that vanishes at the origin (so the origin is an equilibrium with u = 0)."""
    c = rng.choice([-3, -2, -1, 1, 2, 3])
    a, b = rng.choice(X), rng.choice(X)
    return {
        "linear": c * a,
        "square": c * a * b,
        "sine": c * sp.sin(a),
        "cosine": c * (sp.cos(a) - 1),
        "product": c * a * sp.sin(b),
    }[rng.choice(["linear", "linear", "square", "sine", "cosine", "product"])]


def _plant(rng: random.Random) -> tuple[tuple[sp.Symbol, ...], list[sp.Expr], list[list[sp.Expr]], list[sp.Expr],
                                        dict[sp.Symbol, sp.Rational], bool]:
    n = rng.randint(2, 4)
    m = rng.choice([1, 1, 1, 2]) if n >= 3 else 1
    X = sp.symbols(" ".join(f"x{i}" for i in range(n)))
    f = []
    for i in range(n):
        rate = sp.Integer(0) + sum(_term(rng, X) for _ in range(rng.randint(0, 2)))
        if i + 1 < n and rng.random() < 0.7:
            rate += X[i + 1]  # a chain, so that the relative degrees vary
        f.append(rate)
    G = [[sp.Integer(0)] * m for _ in range(n)]
    for j in range(m):
        for row in rng.sample(range(n), rng.choice([1, 1, 2])):
            G[row][j] = rng.choice([sp.Integer(1), sp.Integer(2), 1 + rng.choice(X) ** 2, 2 + sp.cos(rng.choice(X)),
                                    rng.choice(X)])
    h = [rng.choice(X) + rng.choice([0, 0, 1]) * rng.choice(X) for _ in range(m)]
    rest = rng.random() < 0.6
    point = {x: sp.Integer(0) if rest else sp.Rational(rng.randint(-4, 4), 8) for x in X}
    return X, f, G, h, point, rest


def _text(X: tuple[sp.Symbol, ...], f: list[sp.Expr], G: list[list[sp.Expr]], h: list[sp.Expr],
          point: dict[sp.Symbol, sp.Rational]) -> str:
    m = len(G[0])
    written = lambda e: sp.sstr(e).replace("**", "^")  # noqa: E731
    lines = ["plant random_plant"]
    lines += [f"state {x} in -1 .. 1" for x in X]
    lines += [f"input u{j} in -10 .. 10" for j in range(m)]
    for i, x in enumerate(X):
        rate = f[i] + sum(G[i][j] * sp.Symbol(f"u{j}") for j in range(m))
        lines.append(f"rate {x} = {written(rate)}")
    lines += [f"output y{k} = {written(e)}" for k, e in enumerate(h)]
    lines.append("point p: " + ", ".join(f"{x} = {point[x]}" for x in X))
    return "\n".join(lines) + "\n"


def _reference_degree(X: tuple[sp.Symbol, ...], f: list[sp.Expr], G: list[list[sp.Expr]], h: sp.Expr,
                      point: dict[sp.Symbol, sp.Rational]) -> tuple[int | None, bool]:
    """(generic relative degree or None beyond n, whether it is defined at the point)."""
    n, m = len(X), len(G[0])
    lie = h
    for k in range(1, n + 1):
        row = [sp.simplify(sum(sp.diff(lie, X[i]) * G[i][j] for i in range(n))) for j in range(m)]
        if any(e != 0 for e in row):
            return k, any(e.subs(point) != 0 for e in row)
        lie = sp.expand(sum(sp.diff(lie, X[i]) * f[i] for i in range(n)))
    return None, False


def _seeded(offset: int, count: int) -> list[tuple[int, random.Random]]:
    """``count`` numbered generators, each seeded from one stream (SEED + offset), so that a
    set's cases stay the same when another set is added or changed."""
    rng = random.Random(SEED + offset)
    return [(i, random.Random(rng.random())) for i in range(count)]


def _cases() -> list[tuple[int, random.Random]]:
    return _seeded(0, PLANTS)


def _sorted(values: list[complex]) -> list[complex]:
    return sorted(values, key=lambda z: (round(z.real, 6), round(z.imag, 6)))


def _close(ours: list[complex], ref: list[complex]) -> bool:
    return len(ours) == len(ref) and all(abs(a - b) <= 1e-6 * (1 + abs(b)) for a, b in zip(_sorted(ours), _sorted(ref)))


@pytest.mark.parametrize("index,rng", _cases(), ids=lambda v: str(v) if isinstance(v, int) else "")
def test_a_random_plant_matches_sympy_done_directly(index: int, rng: random.Random) -> None:
    X, f, G, h, point, rest = _plant(rng)
    text = _text(X, f, G, h, point)
    raw = analyse_bytes(text.encode())
    assert raw.stop is None and raw.analysis is not None, text
    at = raw.analysis["points"]["p"]
    for k, output in enumerate(h):
        generic, defined = _reference_degree(X, f, G, output, point)
        assert raw.analysis["relative_degree"][f"y{k}"] == generic, text
        assert at["relative_degree"][f"y{k}"] == (generic if defined else None), text
    if not rest or len(h) != 1:
        return
    matrices = _linearisation_matches(raw, X, f, G, h, point, text)
    if matrices is None:
        return
    A, B, C = matrices
    zd = at["zero_dynamics"]
    if at["well_defined"] and zd is not None and zd["dimension"] > 0:
        assert _close([complex(*e) for e in zd["eigenvalues"]], rosenbrock_zeros(A, B, C)), text


def _linearisation_matches(raw: Any, X: tuple[sp.Symbol, ...], f: list[sp.Expr], G: list[list[sp.Expr]],
                           h: list[sp.Expr], point: dict[sp.Symbol, sp.Rational], text: str
                           ) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
    """At the equilibrium ``point`` (u = 0): A, B, C, the poles and the controllability
    rank of point p against sympy's Jacobians and numpy; (A, B, C), or None where g(x0) u = 0
    has other solutions than u = 0, so that the point must give the inputs."""
    at = raw.analysis["points"]["p"]
    A = np.array(sp.Matrix(f).jacobian(X).subs(point), dtype=float)
    B = np.array(sp.Matrix(G).subs(point), dtype=float)
    C = np.array(sp.Matrix(h).jacobian(X).subs(point), dtype=float)
    if np.linalg.matrix_rank(B) < B.shape[1]:
        assert "point-incomplete" in [f.rule for f in raw.findings], text
        return None
    lin = at["linearisation"]
    assert lin["status"] == "computed", text
    for name, ref in (("A", A), ("B", B), ("C", C)):
        assert np.allclose(np.array(lin[name], dtype=float), ref, atol=1e-12), (name, text)
    assert _close([complex(*p) for p in lin["poles"]], [complex(z) for z in np.linalg.eigvals(A)]), text
    # at an equilibrium ad_f^k g(x0) = (-A)^k g(x0) (every other term of the bracket carries
    # f(x0) = 0), so the rank of span{ad_f^k g, k < n} there is the Kalman rank of (A, B)
    assert at["controllability_rank"] == np.linalg.matrix_rank(kalman(A, B)), text
    return A, B, C


def test_the_random_set_covers_what_it_checks() -> None:
    """The seeded set is not vacuous: it holds points where the relative degree is defined
    and where it is not, MIMO plants, equilibria with zero dynamics of dimension > 0, and
    linearisations with and without a controllability rank deficit."""
    seen = {"defined": 0, "ill-defined": 0, "mimo": 0, "zero dynamics": 0, "linearised": 0, "rank deficit": 0}
    for _, rng in _cases():
        X, f, G, h, point, rest = _plant(rng)
        seen["mimo"] += len(h) > 1
        B = np.array(sp.Matrix(G).subs(point), dtype=float)
        if rest and len(h) == 1 and B.any():
            seen["linearised"] += 1
            A = np.array(sp.Matrix(f).jacobian(X).subs(point), dtype=float)
            seen["rank deficit"] += np.linalg.matrix_rank(kalman(A, B)) < len(X)
        for output in h:
            generic, defined = _reference_degree(X, f, G, output, point)
            seen["defined" if defined else "ill-defined"] += generic is not None
            if rest and len(h) == 1 and defined and generic is not None and generic < len(X):
                seen["zero dynamics"] += 1
    assert all(count >= 2 for count in seen.values()), seen


# -- square plants with two inputs and two outputs ------------------------------------------
SQUARE = 16


def _square_plant(rng: random.Random) -> tuple[tuple[sp.Symbol, ...], list[sp.Expr], list[list[sp.Expr]],
                                               list[sp.Expr]]:
    n = rng.randint(3, 5)
    X = sp.symbols(" ".join(f"x{i}" for i in range(n)))
    f = []
    for i in range(n):
        rate = sp.Integer(0) + sum(_term(rng, X) for _ in range(rng.randint(0, 2)))
        if i + 1 < n and rng.random() < 0.6:
            rate += X[i + 1]
        f.append(rate)
    G = [[sp.Integer(0)] * 2 for _ in range(n)]
    for j in range(2):
        for row in rng.sample(range(n), rng.choice([1, 1, 2])):
            G[row][j] = rng.choice([sp.Integer(1), sp.Integer(-2), 1 + rng.choice(X) ** 2, 2 + sp.cos(rng.choice(X))])
    h = [rng.choice(X) + rng.choice([0, 0, 1]) * rng.choice(X) for _ in range(2)]
    return X, f, G, h


def _decoupling_row(X: tuple[sp.Symbol, ...], f: list[sp.Expr], G: list[list[sp.Expr]], h: sp.Expr
                    ) -> tuple[int | None, list[sp.Expr] | None]:
    """(relative degree, the row L_g L_f^(r-1) h) by sympy, or (None, None) beyond n."""
    n = len(X)
    lie = h
    for k in range(1, n + 1):
        row = [sp.simplify(sum(sp.diff(lie, X[i]) * G[i][j] for i in range(n))) for j in range(len(G[0]))]
        if any(e != 0 for e in row):
            return k, row
        lie = sp.expand(sum(sp.diff(lie, X[i]) * f[i] for i in range(n)))
    return None, None


def _square_cases() -> list[tuple[int, random.Random]]:
    return _seeded(1, SQUARE)


@pytest.mark.parametrize("index,rng", _square_cases(), ids=lambda v: str(v) if isinstance(v, int) else "")
def test_a_random_square_plant_matches_sympy_done_directly(index: int, rng: random.Random) -> None:
    """Vector relative degree, the decoupling matrix's rank at the origin (numpy's rank of the
    rows L_gj L_f^(r_i - 1) h_i there), the linearisation, and the zero dynamics as the
    invariant zeros of the linearisation when the decoupling matrix is invertible there."""
    X, f, G, h = _square_plant(rng)
    rest = {x: sp.Integer(0) for x in X}
    text = _text(X, f, G, h, rest)
    raw = analyse_bytes(text.encode())
    assert raw.stop is None and raw.analysis is not None, text
    at = raw.analysis["points"]["p"]
    rows = [_decoupling_row(X, f, G, output) for output in h]
    assert [raw.analysis["relative_degree"][f"y{k}"] for k in range(2)] == [r for r, _ in rows], text
    if all(row is not None for _, row in rows):
        D = np.array([[float(e.subs(rest)) for e in row] for _, row in rows])  # type: ignore[union-attr]
        assert at["decoupling_rank"] == np.linalg.matrix_rank(D), text
    matrices = _linearisation_matches(raw, X, f, G, h, rest, text)
    if matrices is None:
        return
    A, B, C = matrices
    zd = at["zero_dynamics"]
    if zd is not None and zd["dimension"] > 0 and zd["verdict"] != "undefined":
        assert _close([complex(*e) for e in zd["eigenvalues"]], rosenbrock_zeros(A, B, C)), text


def test_the_square_set_covers_what_it_checks() -> None:
    """Invertible and singular decoupling matrices at the origin, and zero dynamics of
    dimension > 0 where it is invertible."""
    seen = {"invertible": 0, "singular": 0, "zero dynamics": 0}
    for _, rng in _square_cases():
        X, f, G, h = _square_plant(rng)
        rows = [_decoupling_row(X, f, G, output) for output in h]
        if any(row is None for _, row in rows):
            continue
        rest = {x: 0 for x in X}
        D = np.array([[float(e.subs(rest)) for e in row] for _, row in rows])  # type: ignore[union-attr]
        invertible = np.linalg.matrix_rank(D) == 2
        seen["invertible" if invertible else "singular"] += 1
        seen["zero dynamics"] += invertible and sum(r for r, _ in rows) < len(X)  # type: ignore[misc]
    assert all(count >= 2 for count in seen.values()), seen


# -- verdicts over a region: the envelope, the parameter box, a neighbourhood ----------------
def _decoupling_term(X: tuple[sp.Symbol, ...], f: list[sp.Expr], G: list[list[sp.Expr]], h: sp.Expr
                     ) -> sp.Expr | None:
    """L_g L_f^(r-1) h (one input), None when the relative degree exceeds n."""
    _, row = _decoupling_row(X, f, G, h)
    return None if row is None else row[0]


def _envelope_cases() -> list[tuple[int, random.Random]]:
    return _seeded(2, 20)


def _envelope_plant(rng: random.Random) -> tuple[tuple[sp.Symbol, ...], list[sp.Expr], list[list[sp.Expr]],
                                                 list[sp.Expr], dict[sp.Symbol, sp.Rational]]:
    """A single-output plant whose input fields are sometimes kept away from zero
    (an added multiple of cos(x_j) of size 1/2 .. 5/2), sometimes not."""
    while True:
        X, f, G, h, point, _ = _plant(rng)
        if rng.random() < 0.5:
            j, c = rng.randrange(len(X)), sp.Rational(rng.choice([1, 3, 5]), 2)
            G = [[g + c * sp.cos(X[j]) if g != 0 else g for g in row] for row in G]
        if len(h) == 1:
            return X, f, G, h, point


def _samples(X: tuple[sp.Symbol, ...], expr: sp.Expr, rng: np.random.Generator) -> np.ndarray:
    """expr at 20,000 random points of the box [-1, 1]^n and at its corners and centre."""
    fn = sp.lambdify(X, expr, "numpy")
    points = np.hstack([rng.uniform(-1, 1, size=(len(X), 20000)),
                        np.array(np.meshgrid(*[[-1, 0, 1]] * len(X))).reshape(len(X), -1)])
    return np.broadcast_to(np.asarray(fn(*points), dtype=float), (points.shape[1],))


@pytest.mark.parametrize("index,rng", _envelope_cases(), ids=lambda v: str(v) if isinstance(v, int) else "")
def test_envelope_regularity_matches_sampling(index: int, rng: random.Random) -> None:
    """`regular` over the state box [-1, 1]^n (interval arithmetic) against numpy sampling of
    L_g L_f^(r-1) h: a sign change between two samples means a zero inside, by continuity
    (intermediate value theorem), so a proof of regularity there would be false; a witness
    of singularity is a point where the term is zero (sympy, exactly)."""
    X, f, G, h, point = _envelope_plant(rng)
    term = _decoupling_term(X, f, G, h[0])
    if term is None:
        return
    raw = analyse_bytes(_text(X, f, G, h, point).encode())
    envelope = raw.analysis["envelope"]
    values = _samples(X, term, np.random.default_rng(index))
    crosses = values.min() < 0 < values.max() or bool(np.any(values == 0))
    if envelope["regular"] is True:
        assert not crosses, (term, values.min(), values.max())
    elif envelope["regular"] is False and envelope["witness"] and len(envelope["witness"]) == len(X):
        witness = {x: sp.nsimplify(envelope["witness"][str(x)]) for x in X}
        assert crosses or abs(float(term.subs(witness))) < 1e-9, (term, envelope)


def test_the_envelope_set_covers_both_verdicts() -> None:
    verdicts = []
    for _, rng in _envelope_cases():
        X, f, G, h, point = _envelope_plant(rng)
        if _decoupling_term(X, f, G, h[0]) is not None:
            verdicts.append(analyse_bytes(_text(X, f, G, h, point).encode()).analysis["envelope"]["regular"])
    assert verdicts.count(True) >= 3 and verdicts.count(False) >= 3, verdicts


P = sp.Symbol("p")


def _parametric_plant(rng: random.Random) -> tuple[str, tuple[sp.Symbol, ...], list[sp.Expr], list[sp.Expr], sp.Expr,
                                                   list[sp.Rational]]:
    """A chain of 2 to 4 states with coefficients affine in a parameter p over a range, the
    input on the last state, and an output whose zero dynamics are often stable."""
    n = rng.randint(2, 4)
    X = sp.symbols(" ".join(f"x{i}" for i in range(n)))
    lo = sp.Rational(rng.randint(-4, 2), 2)
    hi = lo + sp.Rational(rng.randint(1, 6), 2)

    def coefficient() -> sp.Expr:
        return rng.choice([sp.Integer(rng.randint(-3, 1)), -P, -P, P + rng.randint(-4, 0), -2 * P - 1, sp.Integer(-2)])

    f = [X[i + 1] + (coefficient() * X[i] if rng.random() < 0.5 else 0) for i in range(n - 1)]
    f.append(sum(coefficient() * x for x in X) + (X[0] ** 2 if rng.random() < 0.3 else 0))
    g = [sp.Integer(0)] * (n - 1) + [rng.choice([sp.Integer(1), 2 + sp.cos(X[0]), P + 3])]
    h = X[rng.randrange(n)] + (coefficient() * X[rng.randrange(n)] if rng.random() < 0.6 else 0)
    if rng.random() < 0.5:
        h = X[0] + (P / 2 + sp.Rational(rng.randint(3, 8), 2)) * X[1]
    written = lambda e: sp.sstr(e).replace("**", "^")  # noqa: E731
    lines = ["plant parametric", f"param p = {(lo + hi) / 2} in {lo} .. {hi}"]
    lines += [f"state {x} in -1 .. 1" for x in X] + ["input u in -10 .. 10"]
    lines += [f"rate {x} = {written(f[i] + g[i] * sp.Symbol('u'))}" for i, x in enumerate(X)]
    lines += [f"output y = {written(h)}", "point rest: " + ", ".join(f"{x} = 0" for x in X) + ", u = 0",
              "expect minimum_phase at rest"]
    return "\n".join(lines) + "\n", X, f, g, h, [lo + (hi - lo) * sp.Rational(j, 24) for j in range(25)]


def _zeros_at(X: tuple[sp.Symbol, ...], f: list[sp.Expr], g: list[sp.Expr], h: sp.Expr, p: sp.Rational
              ) -> list[complex] | None:
    """The invariant zeros of the linearisation at the origin for parameter value p (scipy),
    or None where its relative degree is n or undefined (no zero dynamics to compare)."""
    at = {P: p, **{x: 0 for x in X}}
    A, B, C = sp.Matrix(f).jacobian(X).subs(at), sp.Matrix(g).subs(at), sp.Matrix([h]).jacobian(X).subs(at)
    r = next((k for k in range(1, len(X) + 1) if (C * A ** (k - 1) * B)[0] != 0), None)
    if r is None or r == len(X):
        return None
    return rosenbrock_zeros(np.array(A, dtype=float), np.array(B, dtype=float), np.array(C, dtype=float))


def _parametric_cases() -> list[tuple[int, random.Random]]:
    return _seeded(3, 16)


@pytest.mark.parametrize("index,rng", _parametric_cases(), ids=lambda v: str(v) if isinstance(v, int) else "")
def test_minimum_phase_over_the_parameter_box_matches_sampling(index: int, rng: random.Random) -> None:
    """Proven minimum phase over the parameter box: at 25 parameter values across it the
    linearisation's invariant zeros (scipy's Rosenbrock pencil) all lie in the open left
    half-plane. Violated at a witness (not for want of a definition there): a zero there
    lies in the closed right half-plane."""
    text, X, f, g, h, grid = _parametric_plant(rng)
    raw = analyse_bytes(text.encode())
    zd = ((raw.analysis["points"]["rest"].get("parameter_box") or {}).get("zero_dynamics") or {})
    if zd.get("outcome") == "proven":
        for p in grid:
            zeros = _zeros_at(X, f, g, h, p)
            assert zeros is None or all(z.real < 0 for z in zeros), (text, p, zeros)
    elif zd.get("outcome") == "violated" and zd.get("witness") and zd.get("witness_verdict") != "undefined":
        zeros = _zeros_at(X, f, g, h, sp.nsimplify(zd["witness"]["p"]))
        assert zeros is not None and any(z.real >= -1e-9 for z in zeros), (text, zd)


def test_the_parametric_set_covers_both_verdicts() -> None:
    outcomes = []
    for _, rng in _parametric_cases():
        text, *_ = _parametric_plant(rng)
        box = analyse_bytes(text.encode()).analysis["points"]["rest"].get("parameter_box") or {}
        outcomes.append((box.get("zero_dynamics") or {}).get("outcome"))
    assert outcomes.count("proven") >= 3 and outcomes.count("violated") >= 3, outcomes


def _bracket(X: tuple[sp.Symbol, ...], a: list[sp.Expr], b: list[sp.Expr]) -> list[sp.Expr]:
    """[a, b] = Db a - Da b (sympy's Jacobians)."""
    return list(sp.Matrix(b).jacobian(X) * sp.Matrix(a) - sp.Matrix(a).jacobian(X) * sp.Matrix(b))


def _three_state_plants() -> list[tuple[tuple[sp.Symbol, ...], list[sp.Expr], list[list[sp.Expr]], list[sp.Expr],
                                         dict[sp.Symbol, sp.Rational]]]:
    """The first 12 single-input plants with three states drawn from their own seed."""
    rng = random.Random(SEED + 4)
    out = []
    while len(out) < 12:
        X, f, G, h, point, _ = _plant(rng)
        if len(X) == 3 and len(G[0]) == 1:
            out.append((X, f, G, h, point))
    return out


_THREE_STATES = _three_state_plants()


@pytest.mark.parametrize("index", range(12))
def test_involutivity_near_the_point_matches_sampled_brackets(index: int) -> None:
    """Three states, one input: D_1 = span{g, ad_f g} is involutive near the point exactly
    when det[g, ad_f g, [g, ad_f g]] vanishes there (Frobenius; where D_1 has rank 2). The
    brackets by sympy, the determinant at 200 random points within 0.05 of the point by
    numpy: one clearly away from zero at most of them is not involutive; one that is zero to
    rounding at all of them is."""
    X, f, G, h, point = _THREE_STATES[index]
    g = [G[i][0] for i in range(3)]
    raw = analyse_bytes(_text(X, f, G, h, point).encode())
    involutive = (raw.analysis.get("distributions") or {}).get("involutive")
    adg = _bracket(X, f, g)
    det = sp.lambdify(X, sp.Matrix([g, adg, _bracket(X, g, adg)]).T.det(), "numpy")
    span = sp.lambdify(X, sp.Matrix([g, adg]).T, "numpy")
    near = np.array([float(point[x]) for x in X])[:, None] + np.random.default_rng(index).uniform(-0.05, 0.05, (3, 200))
    dets = np.abs([float(det(*near[:, k])) for k in range(200)])
    rank_two = max(np.linalg.matrix_rank(np.array(span(*near[:, k]), dtype=float), tol=1e-9) for k in range(20)) == 2
    if involutive is True and rank_two:
        assert np.sum(dets > 1e-6) <= 150, dets[:5]
    elif involutive is False:
        assert not np.all(dets < 1e-12), dets[:5]


def test_the_three_state_set_covers_both_verdicts() -> None:
    verdicts = [(analyse_bytes(_text(X, f, G, h, point).encode()).analysis.get("distributions") or {}).get("involutive")
                for X, f, G, h, point in _THREE_STATES]
    assert verdicts.count(True) >= 3 and verdicts.count(False) >= 2, verdicts


# -- the coordinates and the output plantlint writes -----------------------------------------
def _read_back(text: str, X: tuple[sp.Symbol, ...]) -> sp.Expr:
    """An expression plantlint wrote (its own output, in the language's notation), read back
    by sympy's parser in this test only; the tool itself never parses text with sympy."""
    return sp.parse_expr(text.replace("^", "**"), local_dict={str(x): x for x in X}, evaluate=True)


def _lie(X: tuple[sp.Symbol, ...], field: list[sp.Expr], e: sp.Expr) -> sp.Expr:
    return sum(sp.diff(e, x) * v for x, v in zip(X, field))


@pytest.mark.parametrize("index,rng", _cases(), ids=lambda v: str(v) if isinstance(v, int) else "")
def test_written_coordinates_and_linearizing_outputs_hold(index: int, rng: random.Random) -> None:
    """What plantlint writes out, checked by sympy: the normal-form coordinates xi are
    h, L_f h, ..., L_f^(r-1) h; the coordinate change (xi, eta) has the stated Jacobian rank
    at the point; `input_free` says whether L_g eta vanishes identically; and a linearizing
    output has relative degree n (L_g L_f^k y = 0 identically for k < n - 1, and
    L_g L_f^(n-1) y non-zero at the point), which is what makes it one (Isidori, Nonlinear
    Control Systems, 3rd ed., section 4.2, recalled from memory)."""
    X, f, G, h, point, _ = _plant(rng)
    raw = analyse_bytes(_text(X, f, G, h, point).encode())
    at = raw.analysis["points"]["p"]
    nf = at.get("normal_form")
    if nf and nf.get("xi") and len(G[0]) == 1:
        lie, named = h[0], False
        for k, written in enumerate(nf["xi"]):
            if written.startswith("L_f"):  # too long to write out: named instead
                assert written == ("L_f y0" if k == 1 else f"L_f^{k} y0"), written
                named = True
            else:
                assert sp.simplify(_read_back(written, X) - lie) == 0, (written, lie)
            lie = _lie(X, f, lie)
        eta = [_read_back(e, X) for e in nf["eta"]]
        if not named:
            phi = sp.Matrix([_read_back(e, X) for e in nf["xi"]] + eta)
            assert phi.jacobian(X).subs(point).rank() == nf["jacobian_rank"]
        g = [G[i][0] for i in range(len(X))]
        assert nf["input_free"] == all(sp.simplify(_lie(X, g, e)) == 0 for e in eta)
    written_output = at.get("linearizing_output")
    if written_output:
        y, n = _read_back(written_output, X), len(X)
        g = [G[i][0] for i in range(n)]
        for _ in range(n - 1):
            assert sp.simplify(_lie(X, g, y)) == 0, written_output
            y = _lie(X, f, y)
        assert sp.simplify(_lie(X, g, y)).subs(point) != 0, written_output


def test_the_random_set_writes_coordinates_and_outputs_to_check() -> None:
    written = {"normal form": 0, "linearizing output": 0}
    for _, rng in _cases():
        X, f, G, h, point, _ = _plant(rng)
        at = analyse_bytes(_text(X, f, G, h, point).encode()).analysis["points"]["p"]
        written["normal form"] += bool((at.get("normal_form") or {}).get("xi")) and len(G[0]) == 1
        written["linearizing output"] += bool(at.get("linearizing_output"))
    assert all(count >= 3 for count in written.values()), written
