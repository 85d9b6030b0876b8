"""Pictures of one model (``plantlint plot``): an envelope slice and zero-dynamics traces.

Two figures per model:

- **envelope slice** -- two states over their declared ranges, every other state
  and parameter held at one point. Colour is the smallest singular value of the
  decoupling matrix A (|L_g L_f^(r-1) h| for one input and one output), sampled on
  a grid with the kernel's compiled evaluation (``kernel.balls.Program``); shaded
  where it is below ``SMALL_FRACTION`` of its largest value on the slice, with the
  line det A = 0 drawn where A is square, and the witness of the envelope proof
  marked. The samples are a picture, not a proof: the proof is the envelope
  certification, whose verdict the caption states.
- **zero-dynamics trace** -- the eigenvalues of the linearised zero dynamics at an
  operating point while one ranged parameter sweeps its declared range, with the
  imaginary axis and the parameter value where they cross it (found by bisection
  on the largest real part, with the zero-dynamics code of the analysis). The
  outputs stay at their values at the point; where the parameter moves the
  equilibrium, states and inputs are re-solved numerically (Newton, continued
  from the declared point) and the caption says so.

matplotlib is an optional extra (``pip install "plantlint[plot]"``) and is imported
only inside :func:`draw_slice` and :func:`draw_trace`, with the non-interactive
Agg canvas; nothing on the path of ``plantlint check`` imports this module.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any, Callable, Sequence

import numpy as np
import sympy as sp
from flint import arb

from plantlint.analysis.structure import Structure, analyse_structure, certify_envelope
from plantlint.analysis.zero_dynamics import approximate_eigenvalues, zero_dynamics_at
from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.kernel.lie import Kernel

FORMATS = ("png", "svg")
#: Shade where the smallest singular value of A is below this fraction of its largest value on the slice.
SMALL_FRACTION = 0.05
GRID = 121  # samples per axis of the slice
SWEEP = 61  # parameter values of a trace
BISECTION_STEPS = 60
INSTALL_HINT = ('plantlint plot needs matplotlib, which is an optional extra: pip install "plantlint[plot]" '
                '(in a source checkout: pip install -e ".[plot]")')


class PlotError(ValueError):
    """A request that cannot be drawn for this model (a bad state or parameter name, ...)."""


def matplotlib_missing() -> str | None:
    """None when matplotlib can be imported, else the message telling how to install it."""
    try:
        import matplotlib
    except ImportError:
        return INSTALL_HINT
    del matplotlib
    return None


# -- numbers ------------------------------------------------------------------------------

def _floats(program: Program, values: Sequence[float]) -> np.ndarray:
    """One run of a compiled program at a float point (53-bit balls, midpoints; NaN where undefined)."""
    try:
        balls = program.run([arb(v) for v in values], prec=53)
    except (ZeroDivisionError, ValueError, UnsupportedExpression):
        return np.full(len(program.outputs), np.nan)
    return np.array([float(b.mid()) if b.is_finite() else np.nan for b in balls])


def _number(value: sp.Expr) -> float:
    return float(value) if value.is_Rational else float(sp.N(value, 20))


def _show(value: float) -> str:
    return format(value, ".4g")


def _held_text(held: dict[str, float]) -> str:
    return ", ".join(f"{k} = {_show(v)}" for k, v in held.items()) or "nothing"


# -- envelope slice -------------------------------------------------------------------------

@dataclass
class Slice:
    """The sampled decoupling measure on a 2-D (or 1-D, for one state) slice of the envelope."""

    plant: str
    axes: tuple[str, ...]
    grids: tuple[np.ndarray, ...]
    sigma: np.ndarray  # smallest singular value of A, NaN where the model is undefined
    det: np.ndarray | None  # det A when A is square
    held: dict[str, float]  # every other state and parameter, by name
    held_how: str  # why these values
    small: float  # shading threshold
    verdict: str  # the envelope proof's verdict in words
    witness: dict[str, float] | None
    measure: str  # what sigma is, in words
    points: dict[str, tuple[float, ...]] = field(default_factory=dict)  # operating points on the axes


def envelope_slice(model: Any, kernel: Kernel, structure: Structure, axes: Sequence[str] | None = None,
                   point: str | None = None, grid: int = GRID, envelope_seconds: float = 5.0,
                   envelope_boxes: int = 20000) -> Slice:
    """Sample the decoupling matrix over a slice of the envelope (see the module text)."""
    plant = kernel.plant
    if structure.decoupling is None:
        raise PlotError("the decoupling matrix is not defined (an output has no relative degree)")
    names = [str(s) for s in plant.states]
    ranged = [str(s) for s in plant.states if s in plant.state_box]
    A = structure.decoupling.applyfunc(kernel.cancelled)
    depends = {str(s) for s in A.free_symbols}
    if axes:
        for a in axes:
            if a not in names:
                raise PlotError(f"'{a}' is not a state of {plant.name} (states: {', '.join(names)})")
            if a not in ranged:
                raise PlotError(f"state '{a}' has no range, so it cannot be an axis")
        if len(set(axes)) != len(axes):
            raise PlotError("--states needs two different states")
        chosen = list(axes)
    else:
        chosen = ([a for a in ranged if a in depends] + [a for a in ranged if a not in depends])[:2]
        if not chosen:
            raise PlotError("no state has a range: the envelope is not a box")
    envelope = certify_envelope(kernel, structure, envelope_seconds, envelope_boxes)
    if envelope.regular is True:
        margin = (f": |{envelope.certified}| >= {_show(envelope.margin)} proven" if envelope.margin is not None
                  and envelope.certified else "")
        verdict = f"envelope proof: regular on the whole envelope{margin}"
    elif envelope.regular is False:
        verdict = "envelope proof: singular, witness " + _held_text(envelope.witness or {})
    else:
        verdict = "envelope proof: not decided within its budget"
    held, how = _held_values(model, plant, chosen, point, envelope.witness)
    symbols = list(plant.states) + list(plant.params)
    program = Program(list(A), symbols)
    by_name = {str(s): s for s in plant.states}
    grids = tuple(np.linspace(_number(plant.state_box[by_name[a]][0]),
                              _number(plant.state_box[by_name[a]][1]), grid) for a in chosen)
    shape = tuple(len(g) for g in grids)
    sigma = np.full(shape, np.nan)
    det = np.full(shape, np.nan) if A.rows == A.cols else None
    base = [held.get(str(s), 0.0) for s in symbols]
    index = {str(s): i for i, s in enumerate(symbols)}
    for idx in np.ndindex(*shape):
        values = list(base)
        for k, a in enumerate(chosen):
            values[index[a]] = float(grids[k][idx[k]])
        entries = _floats(program, values)
        if not np.all(np.isfinite(entries)):
            continue
        M = entries.reshape(A.rows, A.cols)
        sigma[idx] = np.linalg.svd(M, compute_uv=False).min()
        if det is not None:
            det[idx] = np.linalg.det(M)
    finite = sigma[np.isfinite(sigma)]
    small = SMALL_FRACTION * float(finite.max()) if finite.size else 0.0
    measure = "|L_g L_f^(r-1) h|" if A.shape == (1, 1) else "smallest singular value of A"
    points = {}
    for op in getattr(model, "points", ()):
        try:
            points[op.name] = tuple(_number(op.values[a]) for a in chosen)
        except (KeyError, TypeError):
            continue
    shown_held = {k: v for k, v in held.items() if k not in chosen}
    return Slice(plant.name, tuple(chosen), grids, sigma, det, shown_held, how, small, verdict,
                 dict(envelope.witness) if envelope.witness else None, measure, points)


def _held_values(model: Any, plant: Any, axes: Sequence[str], point: str | None,
                 witness: dict[str, float] | None) -> tuple[dict[str, float], str]:
    """Values of every state and parameter off the slice, and how they were chosen."""
    values = {str(s): _number(v) for s, v in plant.param_nominal.items()}
    how = "parameters at their nominal values"
    if point is not None:
        op = next((p for p in getattr(model, "points", ()) if p.name == point), None)
        if op is None:
            raise PlotError(f"no operating point '{point}'")
        states = {str(s) for s in plant.states}
        values.update({k: _number(v) for k, v in op.values.items() if k in states})
        how = f"states at point {point}, " + how
    elif witness:
        values.update(witness)
        how = "held at the witness of the envelope proof"
    else:
        for s in plant.states:
            lo, hi = plant.state_box.get(s, (sp.Integer(0), sp.Integer(0)))
            values[str(s)] = (_number(lo) + _number(hi)) / 2
        how = "states at the centre of their ranges, " + how
    for s in plant.states:
        values.setdefault(str(s), 0.0)
    return values, how


# -- zero-dynamics trace ------------------------------------------------------------------

@dataclass
class Trace:
    """Zero-dynamics eigenvalues along a parameter's range at one operating point."""

    plant: str
    param: str
    point: str
    low: float
    high: float
    nominal: float
    values: list[float]
    eigenvalues: list[tuple[complex, ...] | None]  # None where not defined
    crossings: list[tuple[float, tuple[complex, ...]]]  # parameter value, eigenvalues there
    held: dict[str, float]  # outputs at the point and other parameters
    resolved: bool  # the equilibrium moved with the parameter and was re-solved numerically
    exact: bool  # every sample came from the exact route


class _Equilibria:
    """The point's equilibrium as a function of one parameter: exact where the declared
    states stay a rest point of the zero dynamics, else re-solved by Newton's method with
    the outputs held at their values at the point, continued from the nearest solved value."""

    def __init__(self, kernel: Kernel, degrees: list[int], param: sp.Symbol, states: dict[sp.Symbol, sp.Expr]):
        plant = kernel.plant
        self.kernel, self.degrees, self.param, self.states = kernel, degrees, param, states
        self.symbols = list(plant.states) + list(plant.inputs) + list(plant.params)
        n, m = plant.n, plant.m
        rates = plant.rates()
        exprs = list(rates) + list(plant.h)
        exprs += [sp.diff(F, v) for F in rates for v in list(plant.states) + list(plant.inputs)]
        exprs += [sp.diff(h, x) for h in plant.h for x in plant.states]
        self.program = Program(exprs, self.symbols)
        self.n, self.m, self.p = n, m, plant.p
        nominal = {**plant.param_nominal, **states}
        y0 = Program(list(plant.h), list(plant.states) + list(plant.params)).run(
            [_arb_exact(nominal[s]) for s in list(plant.states) + list(plant.params)], prec=128)
        self.y0 = np.array([float(b.mid()) for b in y0])
        self.solved: dict[float, np.ndarray] = {}
        self.resolved = False
        self.exact = True

    def eigenvalues(self, value: Fraction) -> tuple[complex, ...] | None:
        exact_point = {**self.states, self.param: sp.Rational(value.numerator, value.denominator)}
        zd = zero_dynamics_at(self.kernel, self.degrees, exact_point, "")
        if zd.verdict in ("minimum_phase", "non_minimum_phase", "critical"):
            self.exact = self.exact and zd.exact
            return zd.eigenvalues
        if zd.verdict != "undefined" or "rest point" not in zd.reason:
            return None
        x = self._newton(float(value))
        if x is None:
            return None
        self.resolved, self.exact = True, False
        point: dict[sp.Symbol, sp.Expr] = {s: sp.Float(float(v), 30) for s, v in zip(self.kernel.plant.states, x)}
        point[self.param] = sp.Rational(value.numerator, value.denominator)
        return approximate_eigenvalues(self.kernel, self.degrees, point)

    def _newton(self, value: float) -> np.ndarray | None:
        plant = self.kernel.plant
        n, m, p = self.n, self.m, self.p
        others = {s: _number(v) for s, v in plant.param_nominal.items()}
        others[self.param] = value
        if self.solved:
            start = self.solved[min(self.solved, key=lambda v: abs(v - value))]
        else:
            start = np.array([_number(self.states[s]) for s in plant.states] + [0.0] * m)
        z = start.copy()
        for _ in range(50):
            vals = list(z) + [others[s] for s in plant.params]
            out = _floats(self.program, vals)
            if not np.all(np.isfinite(out)):
                return None
            k = n + p
            residual = np.concatenate([out[:n], out[n:k] - self.y0])
            J_F = out[k:k + n * (n + m)].reshape(n, n + m)
            J_h = np.hstack([out[k + n * (n + m):].reshape(p, n), np.zeros((p, m))])
            J = np.vstack([J_F, J_h])
            scale = 1.0 + float(np.abs(z).max())
            if float(np.abs(residual).max()) <= 1e-11 * scale:
                self.solved[value] = z
                return z[:n]
            try:
                step = np.linalg.lstsq(J, -residual, rcond=None)[0]
            except np.linalg.LinAlgError:
                return None
            z = z + step
        return None


def _arb_exact(value: sp.Expr) -> arb:
    from plantlint.kernel.balls import to_arb

    return to_arb(value)


def zero_dynamics_trace(model: Any, kernel: Kernel, structure: Structure, param: str, point: str,
                        samples: int = SWEEP) -> Trace:
    """Trace the zero-dynamics eigenvalues at ``point`` over ``param``'s range; bisect crossings."""
    plant = kernel.plant
    symbol = next((s for s in plant.params if str(s) == param), None)
    if symbol is None:
        ranged = ", ".join(str(s) for s in plant.params) or "none"
        raise PlotError(f"'{param}' is not a parameter with a range (ranged parameters: {ranged})")
    op = next((p for p in getattr(model, "points", ()) if p.name == point), None)
    if op is None:
        raise PlotError(f"no operating point '{point}'")
    degrees = _degrees(kernel, structure)
    states = {s: op.values[str(s)] for s in plant.states if str(s) in op.values}
    if len(states) != plant.n:
        raise PlotError(f"point '{point}' does not give every state")
    lo, hi = (Fraction(str(sp.Rational(b))) if b.is_Rational else Fraction(_number(b)) for b in plant.param_box[symbol])
    eq = _Equilibria(kernel, degrees, symbol, states)
    nominal = Fraction(str(plant.param_nominal[symbol])) if plant.param_nominal[symbol].is_Rational else \
        Fraction(_number(plant.param_nominal[symbol]))
    # sweep outwards from the nominal value so that Newton continues from solved neighbours
    grid = [lo + (hi - lo) * k / (samples - 1) for k in range(samples)]
    order = sorted(range(samples), key=lambda k: abs(grid[k] - nominal))
    eigs: list[tuple[complex, ...] | None] = [None] * samples
    for k in order:
        eigs[k] = eq.eigenvalues(grid[k])
    crossings = _crossings(grid, eigs, eq.eigenvalues)
    held = {f"{name} (output)": float(v) for name, v in zip(plant.outputs, eq.y0)}
    held.update({str(s): _number(v) for s, v in plant.param_nominal.items() if s != symbol})
    return Trace(plant.name, param, point, float(lo), float(hi), float(nominal), [float(v) for v in grid], eigs,
                 crossings, held, eq.resolved, eq.exact)


def _degrees(kernel: Kernel, structure: Structure) -> list[int]:
    plant = kernel.plant
    degrees = structure.vector_relative_degree
    if any(d is None for d in degrees) or plant.m != plant.p:
        raise PlotError("zero dynamics need a square plant with a relative degree for every output")
    ints = [int(d) for d in degrees if d is not None]
    if sum(ints) >= plant.n:
        raise PlotError(f"no zero dynamics: the total relative degree {sum(ints)} equals the {plant.n} states")
    return ints


def _abscissa(eigs: tuple[complex, ...] | None) -> float | None:
    return max(z.real for z in eigs) if eigs else None


def _crossings(grid: list[Fraction], eigs: list[tuple[complex, ...] | None],
               evaluate: Callable[[Fraction], tuple[complex, ...] | None]) -> list[tuple[float, tuple[complex, ...]]]:
    """Parameter values where the largest real part changes sign, refined by bisection.

    A sign change through a pole (the decoupling matrix singular for some parameter
    value) is not a crossing: at the end of the bisection the real part must be
    small against the size of the eigenvalues."""
    sizes = [abs(z) for e in eigs if e for z in e]
    scale = 1.0 + (max(sizes) if sizes else 0.0)
    out: list[tuple[float, tuple[complex, ...]]] = []
    for k in range(len(grid) - 1):
        a, b = _abscissa(eigs[k]), _abscissa(eigs[k + 1])
        if a is None or b is None:
            continue
        if a == 0 and (k == 0 or eigs[k - 1] is None or (_abscissa(eigs[k - 1]) or 0) != 0):
            out.append((float(grid[k]), eigs[k] or ()))
            continue
        if a * b >= 0:
            continue
        lo, hi, sign_lo = grid[k], grid[k + 1], a > 0
        at: tuple[complex, ...] | None = eigs[k]
        for _ in range(BISECTION_STEPS):
            mid = (lo + hi) / 2
            e = evaluate(mid)
            c = _abscissa(e)
            if c is None:
                break
            at = e
            if c == 0:
                lo = hi = mid
                break
            if (c > 0) == sign_lo:
                lo = mid
            else:
                hi = mid
            if float(hi - lo) <= 1e-13 * (1.0 + abs(float(mid))):
                break
        c = _abscissa(at)
        if c is not None and abs(c) <= 1e-6 * scale:
            out.append((float((lo + hi) / 2), at or ()))
    return out


# -- drawing ----------------------------------------------------------------------------------

def _figure(width: float, height: float) -> Any:
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), dpi=110)
    FigureCanvasAgg(fig)
    return fig


def _save(fig: Any, fmt: str) -> bytes:
    import io

    buffer = io.BytesIO()
    metadata = {"Date": None} if fmt == "svg" else {}
    fig.savefig(buffer, format=fmt, metadata=metadata)
    return buffer.getvalue()


def draw_slice(s: Slice, fmt: str) -> bytes:
    """The envelope slice picture (PNG or SVG bytes)."""
    import matplotlib.colors as mcolors

    fig = _figure(7.6, 6.4)
    ax = fig.add_axes((0.10, 0.24, 0.66, 0.66))
    cax = fig.add_axes((0.79, 0.24, 0.03, 0.66))
    finite = s.sigma[np.isfinite(s.sigma)]
    positive = finite[finite > 0]
    shaded = bool(s.small > 0 and np.any(finite < s.small))
    sign_change = False
    if len(s.axes) == 2:
        X, Y = np.meshgrid(s.grids[0], s.grids[1], indexing="ij")
        floor = float(positive.min()) if positive.size else 1e-300
        shown = np.where(np.isfinite(s.sigma), np.maximum(s.sigma, floor), np.nan)
        if positive.size and finite.max() > 20 * floor:  # wide range: logarithmic colours
            norm = mcolors.LogNorm(vmin=floor, vmax=float(finite.max()))
        else:
            norm = mcolors.Normalize(vmin=float(finite.min()) if finite.size else 0.0,
                                     vmax=float(finite.max()) if finite.size else 1.0)
        mesh = ax.pcolormesh(X, Y, np.ma.masked_invalid(shown), shading="auto", cmap="viridis", norm=norm)
        fig.colorbar(mesh, cax=cax, label=s.measure)
        if np.any(~np.isfinite(s.sigma)):
            ax.contourf(X, Y, (~np.isfinite(s.sigma)).astype(float), levels=[0.5, 1.5], colors="none",
                        hatches=["xx"])
        if s.small > 0 and np.any(s.sigma < s.small):
            ax.contourf(X, Y, np.where(np.isfinite(s.sigma), s.sigma, np.inf), levels=[-1.0, s.small],
                        colors=["#d62728"], alpha=0.45)
        if s.det is not None and np.any(np.isfinite(s.det)):
            near = np.where(np.isfinite(s.sigma) & (s.sigma < max(s.small, 1e-300) * 4), s.det, np.nan)
            if np.nanmin(near, initial=np.inf) < 0 < np.nanmax(near, initial=-np.inf):
                ax.contour(X, Y, near, levels=[0.0], colors="black", linewidths=1.6)
                sign_change = True
        ax.set_xlabel(s.axes[0])
        ax.set_ylabel(s.axes[1])
        ax.set_xlim(s.grids[0][0], s.grids[0][-1])
        ax.set_ylim(s.grids[1][0], s.grids[1][-1])
        for name, (px, py) in s.points.items():
            ax.plot([px], [py], "o", color="white", markeredgecolor="black", markersize=7)
            ax.annotate(name, (px, py), textcoords="offset points", xytext=(6, 6), color="white", fontsize=9,
                        bbox={"boxstyle": "round,pad=0.15", "fc": "black", "alpha": 0.5, "lw": 0})
        if s.witness is not None and s.axes[0] in s.witness and s.axes[1] in s.witness:
            ax.plot([s.witness[s.axes[0]]], [s.witness[s.axes[1]]], "X", color="#ff7f0e", markeredgecolor="black",
                    markersize=13, label="witness of the envelope proof")
    else:
        cax.set_visible(False)
        ax.plot(s.grids[0], s.sigma, color="#1f77b4", label=s.measure)
        ax.axhspan(0, s.small, color="#d62728", alpha=0.3)
        ax.axhline(0, color="black", linewidth=0.8)
        ax.set_xlabel(s.axes[0])
        ax.set_ylabel(s.measure)
        if s.witness is not None and s.axes[0] in s.witness:
            ax.plot([s.witness[s.axes[0]]], [0.0], "X", color="#ff7f0e", markeredgecolor="black", markersize=13,
                    label="witness of the envelope proof")
    from matplotlib.patches import Patch
    from matplotlib.lines import Line2D

    handles = []
    if shaded:
        handles.append(Patch(facecolor="#d62728", alpha=0.45, label=f"below {SMALL_FRACTION:.0%} of the largest value"))
    if sign_change:
        handles.append(Line2D([], [], color="black", label="det A = 0 (sign change)"))
    if s.witness is not None:
        handles.append(Line2D([], [], marker="X", color="#ff7f0e", markeredgecolor="black", linestyle="",
                              markersize=10, label="witness of the envelope proof"))
    if np.any(~np.isfinite(s.sigma)):
        handles.append(Patch(facecolor="white", hatch="xx", edgecolor="grey", label="model undefined"))
    if handles:
        ax.legend(handles=handles, loc="upper right", fontsize=8, framealpha=0.85)
    ax.set_title(f"{s.plant}: decoupling matrix over the envelope", fontsize=12)
    held = (f"Held fixed ({s.held_how}): {_held_text(s.held)}" if s.held else
            "Nothing held fixed: the two axes are the whole envelope (no other state, no ranged parameter)")
    fig.text(0.03, 0.115, held, fontsize=8.5, wrap=True)
    fig.text(0.03, 0.07, s.verdict, fontsize=8.5, wrap=True)
    fig.text(0.03, 0.025, f"{'x'.join(str(len(g)) for g in s.grids)} grid samples (a picture, not a proof); shaded below {_show(s.small)}"
             + ("" if shaded else " (nowhere here)") + ("; points projected onto the slice." if s.points else "."),
             fontsize=8, color="#444444", wrap=True)
    return _save(fig, fmt)


def draw_trace(t: Trace, fmt: str) -> bytes:
    """The zero-dynamics trace picture (PNG or SVG bytes)."""
    fig = _figure(11.0, 5.4)
    left = fig.add_axes((0.07, 0.25, 0.38, 0.63))
    right = fig.add_axes((0.55, 0.25, 0.30, 0.63))
    cax = fig.add_axes((0.88, 0.25, 0.018, 0.63))
    xs, ys, cs, ps, res = [], [], [], [], []
    for v, eigs in zip(t.values, t.eigenvalues):
        for z in eigs or ():
            xs.append(z.real)
            ys.append(z.imag)
            cs.append(v)
    sc = left.scatter(xs, ys, c=cs, cmap="plasma", s=16, vmin=t.low, vmax=t.high, zorder=3)
    fig.colorbar(sc, cax=cax, label=t.param)
    left.axvline(0.0, color="black", linewidth=1.2, label="imaginary axis")
    left.axhline(0.0, color="grey", linewidth=0.6)
    for value, eigs in t.crossings:
        left.plot([z.real for z in eigs], [z.imag for z in eigs], "*", color="#2ca02c", markeredgecolor="black",
                  markersize=16, zorder=4)
    left.set_xlabel("real part")
    left.set_ylabel("imaginary part")
    left.set_title("eigenvalues in the complex plane", fontsize=10)
    for v, eigs in zip(t.values, t.eigenvalues):
        for z in eigs or ():
            ps.append(v)
            res.append(z.real)
    right.scatter(ps, res, c=ps, cmap="plasma", s=12, vmin=t.low, vmax=t.high, zorder=3)
    right.axhline(0.0, color="black", linewidth=1.2)
    right.axvline(t.nominal, color="grey", linestyle=":", linewidth=1)
    for value, _ in t.crossings:
        right.axvline(value, color="#2ca02c", linestyle="--", linewidth=1.5)
        right.annotate(f"{t.param} = {value:.6g}", (value, 0.0), textcoords="offset points", xytext=(7, 10),
                       fontsize=9, color="#1a6e1a")
    right.set_xlabel(f"{t.param} (dotted: nominal {_show(t.nominal)})")
    right.set_ylabel("real part")
    right.set_xlim(t.low, t.high)
    right.set_title("real parts across the range", fontsize=10)
    from matplotlib.lines import Line2D

    handles = [Line2D([], [], color="black", label="imaginary axis")]
    if t.crossings:
        handles.append(Line2D([], [], marker="*", color="#2ca02c", markeredgecolor="black", linestyle="",
                              markersize=12, label="crossing"))
    left.legend(handles=handles, loc="best", fontsize=8)
    fig.suptitle(f"{t.plant}: zero dynamics at point {t.point} for {t.param} in "
                 f"[{_show(t.low)}, {_show(t.high)}]", fontsize=12)
    if t.crossings:
        said = "; ".join(f"{t.param} = {v:.6g} (eigenvalues {', '.join(_complex_text(z) for z in e)})"
                         for v, e in t.crossings)
        crossing = f"Crossing of the imaginary axis (bisection on the largest real part): {said}."
    else:
        crossing = "No crossing of the imaginary axis in the range."
    how = ("equilibrium re-solved numerically where the parameter moves it"
           if t.resolved else "the declared point stays an equilibrium across the range")
    fig.text(0.03, 0.12, f"Held fixed: {_held_text(t.held)}; {how}.", fontsize=8.5, wrap=True)
    fig.text(0.03, 0.06, crossing, fontsize=8.5, wrap=True)
    fig.text(0.03, 0.02, "Linearised zero dynamics: " + ("exact real-part signs at every sample."
             if t.exact else "numeric eigenvalues (no verdict is drawn from them here)."),
             fontsize=8, color="#444444")
    return _save(fig, fmt)


def _complex_text(z: complex) -> str:
    tiny = 1e-9 * (1 + abs(z))
    re = 0.0 if abs(z.real) <= tiny else z.real
    if abs(z.imag) <= tiny:
        return format(re, ".4g")
    return (f"{re:.4g}" if re else "") + f"{'+' if z.imag >= 0 else '-'}{abs(z.imag):.4g}i"


# -- one model --------------------------------------------------------------------------------

@dataclass
class PlotOutcome:
    """What was drawn for one model: pictures (file name, bytes), notes, and the crossings
    found (parameter values). Writing the files is the caller's business."""

    pictures: list[tuple[str, bytes]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    crossings: dict[str, list[float]] = field(default_factory=dict)  # "param@point" -> values
    error: str | None = None


def safe_name(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "_", text).strip("._") or "model"


def plot_model(data: bytes, fmt: str, *, states: Sequence[str] | None = None,
               point: str | None = None, param: str | None = None, grid: int = GRID, samples: int = SWEEP,
               envelope_seconds: float = 5.0, envelope_boxes: int = 20000) -> PlotOutcome:
    """Draw the pictures of one model held in ``data``; never raises on a bad model."""
    from plantlint.language.model import build_model
    from plantlint.language.syntax import decode, parse_text

    if fmt not in FORMATS:
        raise ValueError(f"unknown picture format {fmt!r}")
    outcome = PlotOutcome()
    text, problem = decode(data)
    model, findings = (None, [problem]) if text is None or problem is not None else build_model(parse_text(text), "")
    errors = [f for f in findings if f is not None and f.severity.value == "error"]
    plant = model.plant() if model is not None and not errors else None
    if plant is None:
        outcome.error = "the model has errors (see `plantlint check`), so there is nothing to draw"
        return outcome
    kernel = Kernel(plant)
    structure = analyse_structure(kernel)
    base = safe_name(plant.name)
    try:
        s = envelope_slice(model, kernel, structure, states, point, grid, envelope_seconds, envelope_boxes)
        outcome.pictures.append((f"{base}-envelope.{fmt}", draw_slice(s, fmt)))
    except PlotError as exc:
        if states:
            outcome.error = str(exc)
            return outcome
        outcome.notes.append(f"no envelope slice: {exc}")
    params = [str(s) for s in plant.params]
    if param is not None and param not in params:
        outcome.error = f"'{param}' is not a parameter with a range (ranged parameters: {', '.join(params) or 'none'})"
        return outcome
    if not params:
        outcome.notes.append("no zero-dynamics trace: no parameter has a range")
        return outcome
    try:
        _degrees(kernel, structure)
    except PlotError as exc:
        outcome.notes.append(f"no zero-dynamics trace: {exc}")
        return outcome
    names = [p.name for p in model.points]
    if point is not None and point not in names:
        outcome.error = f"no operating point '{point}'"
        return outcome
    chosen_points = [point] if point is not None else names[:1]
    if not chosen_points:
        outcome.notes.append("no zero-dynamics trace: the model declares no operating point")
        return outcome
    for name in [param] if param is not None else params:
        for pt in chosen_points:
            try:
                t = zero_dynamics_trace(model, kernel, structure, name, pt, samples)
            except PlotError as exc:
                outcome.notes.append(f"no zero-dynamics trace for {name} at {pt}: {exc}")
                continue
            if not any(e for e in t.eigenvalues):
                outcome.notes.append(f"no zero-dynamics trace for {name} at {pt}: not defined anywhere in the range")
                continue
            outcome.pictures.append((f"{base}-zero-dynamics-{safe_name(name)}-{safe_name(pt)}.{fmt}",
                                     draw_trace(t, fmt)))
            outcome.crossings[f"{name}@{pt}"] = [v for v, _ in t.crossings]
            if t.crossings:
                outcome.notes.append(f"{name} at {pt}: zero dynamics cross the imaginary axis at "
                                     + ", ".join(f"{name} = {v:.6g}" for v, _ in t.crossings))
            else:
                outcome.notes.append(f"{name} at {pt}: no crossing of the imaginary axis in "
                                     f"[{_show(t.low)}, {_show(t.high)}]")
    return outcome


__all__ = ["FORMATS", "INSTALL_HINT", "PlotError", "PlotOutcome", "Slice", "Trace", "draw_slice", "draw_trace",
           "envelope_slice", "matplotlib_missing", "plot_model", "zero_dynamics_trace"]
