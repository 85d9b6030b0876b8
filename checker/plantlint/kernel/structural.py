"""Structural zeros and the layered (chain-rule) form of the decoupling terms.

Draw the graph state a -> state b when f_b depends on x_a (a sympy free symbol,
so an edge may be spurious but a missing edge is a proof of independence).
Let dist_i(s) be the length of the shortest path from s to a state read by h_i
and D_k the states at distance exactly k. Then (theory notes, "Towers without
symbolic swell"):

* L_f^k h_i depends only on states with dist_i <= k, so L_gj L_f^k h_i == 0
  identically for every k below d_ij = min{dist_i(s) : g_j[s] != 0}: these are
  *proven* zeros, no algebra involved;
* for s in D_k, by induction on k (the terms that differentiate anything else
  only reach states nearer to the output),

      dL_f^k h_i / dx_s = sum_{b in D_(k-1), s -> b} df_b/dx_s * dL_f^(k-1) h_i / dx_b,

  with dL_f^0 h_i / dx_s = dh_i/dx_s on D_0, so at k = d_ij

      L_gj L_f^k h_i = sum_{s in D_k} g_j[s] * P_k[s]        (exactly),

  a sum over paths of products of first derivatives of f: along a chain, one
  product of per-link factors. It is an identity, not an approximation, and it
  never forms L_f^k h_i.
* Brackets: ad_f^k g_j can be non-zero only on the states reachable from the
  actuated states of g_j in at most k steps (the forward closure).
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass
from typing import Any, Sequence

import sympy as sp

INFINITE = 10**9


@dataclass(frozen=True)
class OutputLayers:
    """Distances of the states to the states one output reads."""

    distance: tuple[int, ...]  # per state; INFINITE when it never reaches the output
    index: tuple[int, ...]  # d_ij per input (INFINITE when input j never reaches it)

    @property
    def structural_degree(self) -> int | None:
        """1 + min_j d_ij: the relative degree unless the top term cancels."""
        d = min(self.index, default=INFINITE)
        return None if d >= INFINITE else d + 1


class StructuralPlant:
    """The dependency graph of a plant and the layered decoupling terms."""

    def __init__(self, states: Sequence[sp.Symbol], f: Sequence[sp.Expr], g: Sequence[Sequence[sp.Expr]],
                 h: Sequence[sp.Expr]):
        self.states = tuple(states)
        self.n = len(states)
        self.f, self.g, self.h = tuple(f), tuple(tuple(c) for c in g), tuple(h)
        position = {s: i for i, s in enumerate(self.states)}
        # parents[b] = states a with f_b depending on x_a
        self.parents = [sorted(position[s] for s in _symbols(e) if s in position) for e in self.f]
        self.children: list[list[int]] = [[] for _ in range(self.n)]
        for b, ps in enumerate(self.parents):
            for a in ps:
                self.children[a].append(b)
        self.actuated = [[s for s in range(self.n) if c[s] != 0] for c in self.g]
        self._reads = [sorted(position[s] for s in _symbols(e) if s in position) for e in self.h]
        self._layers: dict[int, OutputLayers] = {}
        self._partials: dict[tuple[int, int], dict[int, sp.Expr]] = {}

    # -- distances -------------------------------------------------------------------------
    def layers(self, i: int) -> OutputLayers:
        if i not in self._layers:
            dist = [INFINITE] * self.n
            queue: deque[int] = deque()
            for s in self._reads[i]:
                dist[s] = 0
                queue.append(s)
            while queue:  # backwards: a parent of b is one step further from the output
                b = queue.popleft()
                for a in self.parents[b]:
                    if dist[a] > dist[b] + 1:
                        dist[a] = dist[b] + 1
                        queue.append(a)
            index = tuple(min((dist[s] for s in act), default=INFINITE) for act in self.actuated)
            self._layers[i] = OutputLayers(tuple(dist), index)
        return self._layers[i]

    def proven_zero(self, j: int, i: int, k: int) -> bool:
        """L_gj L_f^k h_i == 0 identically, by structure alone."""
        return k < self.layers(i).index[j]

    # -- the layered form ----------------------------------------------------------------------
    def partials(self, i: int, k: int) -> dict[int, sp.Expr]:
        """dL_f^k h_i / dx_s for the states s at distance exactly k (the layered sums)."""
        key = (i, k)
        if key in self._partials:
            return self._partials[key]
        dist = self.layers(i).distance
        if k == 0:
            out = {s: sp.diff(self.h[i], self.states[s]) for s in range(self.n) if dist[s] == 0}
        else:
            previous = self.partials(i, k - 1)
            out = {}
            for s in range(self.n):
                if dist[s] != k:
                    continue
                total = sp.Integer(0)
                for b in self.children[s]:
                    if dist[b] == k - 1 and previous.get(b, 0) != 0:
                        link = sp.diff(self.f[b], self.states[s])
                        if link != 0:
                            total += link * previous[b]
                out[s] = total
        self._partials[key] = out
        return out

    def decoupling_entry(self, j: int, i: int) -> tuple[int, sp.Expr]:
        """(d_ij, L_gj L_f^(d_ij) h_i) in layered form; (INFINITE, 0) when j never reaches h_i."""
        d = self.layers(i).index[j]
        if d >= INFINITE:
            return d, sp.Integer(0)
        partial = self.partials(i, d)
        total = sp.Integer(0)
        for s in self.actuated[j]:
            if s in partial and partial[s] != 0:
                total += self.g[j][s] * partial[s]
        return d, total

    def links(self, i: int, k: int) -> list[tuple[int, int]] | None:
        """The path (state, next state) pairs when every layer 0..k holds one state
        (a chain): then the top term is one product of per-link factors."""
        dist = self.layers(i).distance
        layer = [[s for s in range(self.n) if dist[s] == q] for q in range(k + 1)]
        if any(len(L) != 1 for L in layer):
            return None
        return [(layer[q][0], layer[q - 1][0]) for q in range(1, k + 1)]

    # -- brackets ----------------------------------------------------------------------------
    def bracket_support(self, j: int, k: int) -> frozenset[int]:
        """States where ad_f^k g_j may be non-zero (forward closure of its support);
        the other components are proven zero."""
        support = set(self.actuated[j])
        for _ in range(k):
            support |= {b for a in support for b in self.children[a]}
        return frozenset(support)


def _symbols(e: Any) -> set[sp.Symbol]:
    return e.free_symbols if isinstance(e, sp.Basic) else set()


__all__ = ["INFINITE", "OutputLayers", "StructuralPlant"]
