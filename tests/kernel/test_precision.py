"""flint's working precision is set for a block and restored after it, also when the block
raises. python-flint keeps one global precision, ``flint.ctx.prec``, for every arb
operation (flintlib/python-flint issue #53: "arb etc ... use a global context ... prec sets
the precision used for arb"); the block works like the standard library's
``decimal.localcontext``."""

from __future__ import annotations

import flint
import pytest

from plantlint.kernel.precision import precision


def test_a_block_runs_at_its_precision_and_the_callers_comes_back_after_an_error() -> None:
    before = flint.ctx.prec
    try:
        flint.ctx.prec = 100
        with pytest.raises(ZeroDivisionError):
            with precision(300):
                assert flint.ctx.prec == 300
                # a third of 1 at 300 bits is exact to about 90 digits, at 100 bits to about 30
                third = flint.arb(1) / 3
                assert third.rad() < flint.arb(2) ** -290
                raise ZeroDivisionError
        assert flint.ctx.prec == 100
        with precision():  # only restores: a block that tries several precisions in turn
            for bits in (64, 128, 256):
                flint.ctx.prec = bits
        assert flint.ctx.prec == 100
        with precision(64):
            with precision(512):
                assert flint.ctx.prec == 512
            assert flint.ctx.prec == 64
        assert flint.ctx.prec == 100
    finally:
        flint.ctx.prec = before
