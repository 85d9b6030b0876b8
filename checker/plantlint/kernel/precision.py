"""flint's working precision, set for a block and restored after it.

python-flint keeps one global working precision (``flint.ctx.prec``) for every arb
operation. A computation that needs another one sets it for its own steps and must put the
caller's back, also when a step raises: ``with precision(bits):`` does both. ``precision()``
without bits only restores on exit, for a block that tries several precisions in turn.
"""

from __future__ import annotations

from types import TracebackType

import flint


class precision:  # noqa: N801 - used as a context, like a function
    """``with precision(256): ...`` runs the block at 256 bits and restores the precision
    in force before it."""

    __slots__ = ("bits", "saved")

    def __init__(self, bits: int | None = None):
        self.bits = bits
        self.saved = 0

    def __enter__(self) -> "precision":
        self.saved = flint.ctx.prec
        if self.bits is not None:
            flint.ctx.prec = self.bits
        return self

    def __exit__(self, kind: type[BaseException] | None, error: BaseException | None,
                 trace: TracebackType | None) -> None:
        flint.ctx.prec = self.saved


__all__ = ["precision"]
