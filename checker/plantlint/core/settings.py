"""The settings an analysis reads: a small frozen record, all that a worker receives.

The run layer's :class:`plantlint.run.config.Config` holds everything the command line
and the configuration file set (selection, budgets, cache, output); the analysis needs
only these few values, and they are part of the cache key (:meth:`AnalysisSettings.key`).
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class AnalysisSettings:
    #: wall-clock seconds and boxes of the branch-and-bound proof over the envelope
    #: (the same bounds apply to the verdicts over a box of ranged parameters)
    envelope_seconds: float = 5.0
    envelope_boxes: int = 20000
    #: relative residual within which a declared point counts as a rounded equilibrium
    #: (0: only exact equilibria); a point's own `tolerance T` takes precedence
    point_tolerance: float = 0.0

    def key(self) -> str:
        """These settings as text, for the cache key (results differ when they differ)."""
        return f"env={self.envelope_seconds}/{self.envelope_boxes} tol={self.point_tolerance!r}"
