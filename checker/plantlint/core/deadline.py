"""Small wall-clock bounds for single steps of an analysis (``bounded(seconds, step)``,
built on ``within(seconds)``).

Used for steps that only make display text (the symbolic zero dynamics, a direction
named in a message) and for symbolic confirmations whose fallback is already
defined; each caller says what happens when the time runs out (the step is dropped
with a note, or the decision falls back and is reported as unconfirmed). The per-model
budget of the runner stays the outer limit.

The bound is a real-time interval timer (SIGALRM) that raises :class:`TimeUp` in
the running code. It is available in the main thread of a POSIX process (a worker
runs its analysis there); elsewhere ``within`` runs the step unbounded in time and
callers rely on their size limits. Bounds nest: an inner step never extends an
outer one, and the timer and handler found on entry are restored on exit.

A result shaped by a bound that ran out depends on the machine's speed and load, so it
must not be cached: every wall-clock bound that runs out is counted (:func:`ran_out`;
``bounded`` does it, and so do the envelope proofs' own time checks), and the pipeline
compares :func:`times_run_out` before and after an analysis.
"""

from __future__ import annotations

import signal
import threading
import time
from contextlib import contextmanager
from typing import Any, Callable, Iterator, TypeVar

T = TypeVar("T")


class TimeUp(BaseException):
    """The step ran out of its time. A BaseException, so that library code that
    catches ``Exception`` cannot swallow it and carry on unbounded."""

    def __init__(self, token: object):
        super().__init__("step ran out of its time")
        self.token = token


_runs_out = 0  # wall-clock bounds that ran out in this process (see ran_out)


def ran_out() -> None:
    """Record that a wall-clock bound ran out: what the step would have given with more
    time is not in the result, so the result depends on the machine's speed."""
    global _runs_out
    _runs_out += 1


def times_run_out() -> int:
    """How many wall-clock bounds ran out in this process so far."""
    return _runs_out


_stack: list[tuple[object, float]] = []  # (token, absolute deadline), outermost first
_saved: list[Any] = []  # the handler and timer found when the outermost bound started


def available() -> bool:
    return hasattr(signal, "setitimer") and threading.current_thread() is threading.main_thread()


def _arm() -> None:
    left = min(d for _, d in _stack) - time.monotonic()
    signal.setitimer(signal.ITIMER_REAL, max(left, 1e-4))


def _on_alarm(_signum: int, _frame: object) -> None:
    now = time.monotonic()
    expired = [token for token, d in _stack if d <= now]
    if expired:
        raise TimeUp(expired[0])  # the outermost expired step unwinds everything inside it
    if _stack:
        _arm()


@contextmanager
def within(seconds: float) -> Iterator[object]:
    """Run the body with at most ``seconds`` of wall-clock time; ``TimeUp`` whose
    ``token`` is the yielded object is raised when they run out (catch it with
    :func:`expired`)."""
    token = object()
    if not available():
        yield token
        return
    outermost = not _stack
    if outermost:
        handler = signal.signal(signal.SIGALRM, _on_alarm)
        _saved[:] = [handler, signal.getitimer(signal.ITIMER_REAL), time.monotonic()]
    _stack.append((token, time.monotonic() + seconds))
    _arm()
    try:
        yield token
    finally:
        _stack.pop()
        if _stack:
            _arm()
        else:
            signal.setitimer(signal.ITIMER_REAL, 0)
            handler, (left, interval), started = _saved
            signal.signal(signal.SIGALRM, handler)
            if left > 0:  # somebody else's timer was running: give it back what is left
                signal.setitimer(signal.ITIMER_REAL, max(left - (time.monotonic() - started), 1e-4), interval)


def expired(exc: TimeUp, token: object) -> bool:
    """Is ``exc`` this step's own time running out (not an outer step's)?"""
    return exc.token is token


class _Late:
    """What :func:`bounded` returns when the step's own time ran out."""

    def __repr__(self) -> str:
        return "LATE"


LATE = _Late()


def bounded(seconds: float, step: Callable[[], T]) -> T | _Late:
    """``step()`` with at most ``seconds`` of wall-clock time, else :data:`LATE` (an outer
    bound running out still unwinds through it)."""
    try:
        with within(seconds) as token:
            return step()
    except TimeUp as exc:
        if not expired(exc, token):
            raise
        ran_out()
        return LATE
