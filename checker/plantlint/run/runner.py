"""Running many models: discovery, cache, worker processes, time budgets, progress.

Each uncached model is analysed in its own worker process (forked from a parent
that has already imported the analysis code, so starting one is cheap). A worker
sends a snapshot as each analysis stage completes; when it exceeds the time budget
(or its memory, or fails internally) it is stopped, the last snapshot is kept, the
claims it cannot settle are "not decided", and the model gets an
``analysis-incomplete`` finding: it could not be checked.

Workers never outlive the run: each one enforces its own budget (a watchdog thread
and a CPU-time limit as a hard backstop), ends itself when its parent goes away
(parent-death signal on Linux, and the watchdog notices the new parent), ignores
Ctrl-C (the parent stops it), and the parent kills every running worker on any exit,
including SIGINT and SIGTERM. Output order never depends on scheduling: results
are kept in input order.
"""

from __future__ import annotations

import gc
import hashlib
import importlib
import json
import os
import signal
import sys
import threading
import time
import traceback
import re
from dataclasses import dataclass, field
from fnmatch import fnmatch
from functools import lru_cache
from pathlib import Path
from contextlib import contextmanager
from typing import TYPE_CHECKING, Any, Callable, Iterator

from plantlint import __version__
from plantlint.language import UNITS_VERSION  # the unit checker itself is not imported for the key
from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import FileReport, Finding, Severity, Span
from plantlint.core.resources import data_path
from plantlint.core.limits import MAX_BYTES  # one definition of the input limits; no sympy
from plantlint.analysis.stages import STAGES  # light: the stage names only
from plantlint.core.settings import AnalysisSettings
from plantlint.run.config import Config
from plantlint.run.pipeline import STOP_ANCHOR, RawResult, finish, stopped

if TYPE_CHECKING:  # multiprocessing itself only when a model is analysed (not for cached results)
    from multiprocessing.connection import Connection

CACHE_FORMAT = 3  # 2: the analysis has a linearisation per point; 3: results shaped by a
# wall-clock bound are no longer stored (entries of format 2 may hold such results)
MEMORY_LIMIT = 6 * 1024**3  # bytes of address space per worker
MAX_WAIT = 3600.0  # seconds; longest single wait for worker messages
BUDGET_ANCHOR = STOP_ANCHOR  # anchor of the runner's own stops (analysis-incomplete)
GRACE = 2.0  # seconds a worker's own watchdog waits beyond the budget before it ends itself
WATCH_EVERY = 0.25  # seconds between the watchdog's looks at the parent and the clock


class UsageError(Exception):
    """A problem with what was asked for (exit code 2)."""


@dataclass(frozen=True)
class Target:
    path: Path
    display: str  # as shown in reports (relative where possible, forward slashes)


# -- discovery -------------------------------------------------------------------

def discover(paths: list[str], root: Path, include: tuple[str, ...], exclude: tuple[str, ...]) -> list[Target]:
    """Files named on the command line, and ``*.plant`` files under folders.

    Folders are filtered by ``include``; ``exclude`` applies to everything
    (so a pre-commit run honours the configuration too). A path that cannot be
    read as a model (a broken or looping symbolic link, a pipe or device) is an
    I/O problem, never skipped in silence: all of them are named in one
    :class:`UsageError` and nothing is checked.
    """
    found: dict[Path, Target] = {}
    problems: list[str] = []
    cwd = Path.cwd()
    for raw in paths:
        p = Path(raw)
        problem = path_problem(p, raw, named=True)
        if problem is not None:
            problems.append(problem)
            continue
        if not p.exists():
            raise UsageError(f"{raw}: no such file or folder")
        if p.is_dir():
            every: list[Path] = []
            for q in sorted(p.rglob("*.plant")):
                if _hidden(q, p) or q.is_dir():
                    continue
                problem = path_problem(q, q.as_posix())  # the link's own name, not its target's
                if problem is None:
                    every.append(q)
                elif selected_in_folder(q, p, root, include, exclude):
                    problems.append(problem)
            hits = [q for q in every if selected_in_folder(q, p, root, include, exclude)]
            if not hits and not problems:
                filtered = f" ({len(every)} left out by include/exclude)" if every else ""
                raise UsageError(f"{raw}: no .plant files here{filtered}")
            for q in hits:
                found.setdefault(q.resolve(), Target(q, _display(q, cwd)))
        elif not _excluded(p, root, exclude):
            found.setdefault(p.resolve(), Target(p, _display(p, cwd)))
    if problems:
        if len(problems) == 1:
            raise UsageError(problems[0] + "; nothing was checked")
        raise UsageError(f"{len(problems)} paths cannot be read as models; nothing was checked:\n  "
                         + "\n  ".join(problems))
    return list(found.values())


def path_problem(p: Path, shown: str, named: bool = False) -> str | None:
    """Why ``p`` cannot be read as a model file or searched as a folder, or None
    (also None when it simply does not exist: the caller says so in its own words).
    A character device ``named`` on the command line is read (up to the size limit);
    a pipe or socket never is: reading one can wait for ever."""
    import errno
    import stat

    try:
        mode = p.stat().st_mode
    except OSError as exc:
        if exc.errno == errno.ELOOP:
            return f"{shown}: symbolic link loop (following the link leads back to itself)"
        if p.is_symlink():
            try:
                dest = os.readlink(p)
            except OSError:
                dest = "?"
            return f"{shown}: symbolic link to '{dest}', which does not exist"
        if exc.errno in (errno.ENOENT, errno.ENOTDIR):
            return None
        return f"{shown}: cannot read: {exc.strerror or exc}"
    except RuntimeError:  # pathlib's own loop detection
        return f"{shown}: symbolic link loop (following the link leads back to itself)"
    if stat.S_ISDIR(mode) or stat.S_ISREG(mode) or (named and stat.S_ISCHR(mode)):
        return None
    return f"{shown}: not a regular file ({_file_kind(mode)}); a model is read from a regular file"


def _file_kind(mode: int) -> str:
    import stat

    for test, word in ((stat.S_ISFIFO, "a named pipe"), (stat.S_ISSOCK, "a socket"),
                       (stat.S_ISCHR, "a character device"), (stat.S_ISBLK, "a block device")):
        if test(mode):
            return word
    return "a special file"


def selected_in_folder(q: Path, folder: Path, root: Path, include: tuple[str, ...], exclude: tuple[str, ...]) -> bool:
    """Would a model at ``q`` (it need not exist) be checked when ``folder`` is?"""
    if _hidden(q, folder):
        return False
    return (_matches(q, root, include) or _matches(q, folder, include)) and not _excluded(q, root, exclude)


def _hidden(q: Path, base: Path) -> bool:
    try:
        parts = q.relative_to(base).parts
    except ValueError:
        parts = q.parts
    return any(part.startswith(".") and part not in (".", "..") for part in parts[:-1])


def _relative(q: Path, base: Path) -> str | None:
    try:
        return _resolved(q).relative_to(_resolved(base)).as_posix()
    except ValueError:
        return None


def _resolved(q: Path) -> Path:
    """``q.resolve()``; a broken or looping link is taken where it lies (its folder
    resolved, its own name kept), so include/exclude match the name a user sees."""
    try:
        if not q.is_symlink() or q.exists():
            return q.resolve()
    except (RuntimeError, OSError):
        pass
    try:
        return q.parent.resolve() / q.name
    except (RuntimeError, OSError):
        return Path(os.path.abspath(q))


def _matches(q: Path, base: Path, patterns: tuple[str, ...]) -> bool:
    rel = _relative(q, base)
    if rel is None:
        return False
    return any(_glob_match(rel, pat) for pat in patterns)


def _excluded(q: Path, root: Path, patterns: tuple[str, ...]) -> bool:
    return bool(patterns) and _matches(q, root, patterns)


def excluded_by(paths: list[str], root: Path, exclude: tuple[str, ...]) -> list[tuple[str, str]]:
    """Files named explicitly that ``exclude`` leaves out, each with the pattern that
    matched it (``discover`` drops them; the command line says so instead of staying silent)."""
    out = []
    for raw in paths:
        p = Path(raw)
        if p.is_dir() or not p.exists():
            continue
        rel = _relative(p, root)
        pattern = next((pat for pat in exclude if rel is not None and _glob_match(rel, pat)), None)
        if pattern is not None:
            out.append((raw, pattern))
    return out


def _glob_match(rel: str, pattern: str) -> bool:
    """fnmatch where a whole ``**/`` may also match nothing, at the start or after a
    ``/`` (``**/*.plant`` matches ``a.plant``; ``models/**/*.plant`` matches ``models/a.plant``)."""
    if fnmatch(rel, pattern):
        return True
    at = pattern.find("**/")
    while at != -1:
        if (at == 0 or pattern[at - 1] == "/") and _glob_match(rel, pattern[:at] + pattern[at + 3:]):
            return True
        at = pattern.find("**/", at + 1)
    return False


def _display(p: Path, cwd: Path) -> str:
    rel = _relative(p, cwd)
    return rel if rel is not None else p.as_posix()


# -- cache -----------------------------------------------------------------------

class Cache:
    """Raw results keyed by model bytes + tool version + analysis settings.

    Writes are atomic (temp file + rename), so concurrent runs are safe; an
    entry that cannot be read is ignored and rebuilt.
    """

    def __init__(self, folder: Path | None, settings: str):
        self.folder = folder
        self.settings = settings

    def key(self, data: bytes) -> str:
        h = hashlib.sha256()
        h.update(f"plantlint {__version__} cache {CACHE_FORMAT} units {UNITS_VERSION} code {code_fingerprint()} "
                 f"libraries {library_versions()} {self.settings}\0".encode())
        h.update(data)
        return h.hexdigest()

    def _file(self, key: str) -> Path:
        assert self.folder is not None
        return self.folder / key[:2] / f"{key}.json"

    def get(self, key: str) -> RawResult | None:
        if self.folder is None:
            return None
        try:
            with self._file(key).open("r", encoding="utf-8") as fh:
                data = json.load(fh)
            if data.get("key") != key:
                return None
            return RawResult.from_data(data["result"])
        except (OSError, ValueError, KeyError, TypeError, AttributeError):
            return None

    def put(self, key: str, raw: RawResult) -> None:
        if self.folder is None:
            return
        target = self._file(key)
        try:
            target.parent.mkdir(parents=True, exist_ok=True)
            marker = ignore_marker(self.folder)
            if not marker.exists():
                marker.write_text("# plantlint's cache; safe to delete\n*\n", encoding="utf-8")
            tmp = target.with_suffix(f".{os.getpid()}.tmp")
            tmp.write_text(json.dumps({"key": key, "result": raw.to_data()}), encoding="utf-8")
            os.replace(tmp, target)
        except OSError:
            pass  # a read-only tree just runs uncached


@lru_cache(maxsize=1)
def code_fingerprint() -> str:
    """The installed code and data as they are now: the contents of every module, the
    grammar and the rule files. An upgrade or an edited source tree never reuses results of
    other code, even under the same version number; a fresh checkout or install of the same
    code (every CI run) does, so a cache kept between CI runs is used (file times would
    change with every checkout). About 5 ms for the 1.1 MB."""
    return fingerprint(code_files())


def code_files() -> list[Path]:
    package = Path(__file__).resolve().parents[1]
    return [*package.rglob("*.py"), *package.rglob("*.json"), *(data_path("grammar").glob("*.lark")),
            *(data_path("rules").glob("*.toml"))]


def fingerprint(files: list[Path]) -> str:
    """A hash of the names and contents of ``files`` (one that cannot be read counts as absent)."""
    h = hashlib.sha256()
    for f in sorted(files):
        try:
            data = f.read_bytes()
        except OSError:
            continue
        h.update(f"{f.name} {len(data)}\0".encode())
        h.update(data)
    return h.hexdigest()[:16]


#: The distributions whose results a cached analysis holds (python-flint is imported as flint).
LIBRARIES = ("sympy", "python_flint", "mpmath", "lark", "numpy", "scipy", "pint")


@lru_cache(maxsize=1)
def library_versions() -> str:
    """The Python version and the installed versions of the libraries the analysis uses,
    read from the names of their ``*.dist-info`` folders on ``sys.path`` (a listing of each
    folder: importing them, or importlib.metadata, would cost a tenth of a second): a
    cache kept across an upgrade of sympy, say, is not reused for results sympy computed."""
    wanted = {_normalised(d): d for d in LIBRARIES}
    found: dict[str, str] = {}
    for folder in sys.path:
        try:
            names = os.listdir(folder or ".")
        except OSError:
            continue
        for name in names:
            stem, dot, kind = name.rpartition(".")
            if not dot or kind not in ("dist-info", "egg-info"):
                continue
            dist, _, version = stem.partition("-")
            key = _normalised(dist)
            if key in wanted and key not in found:
                found[key] = version
    versions = " ".join(f"{d}={found.get(k, '?')}" for k, d in sorted(wanted.items()))
    return f"python={'.'.join(map(str, sys.version_info[:3]))} {versions}"


def _normalised(name: str) -> str:
    return re.sub(r"[-_.]+", "_", name).lower()


PROJECT_FOLDER = ".plantlint"  # everything plantlint writes lives under this one folder


def ignore_marker(folder: Path) -> Path:
    """Where the self-ignoring ``.gitignore`` goes: in the project folder ``.plantlint/``
    when the cache lives inside it (the default ``.plantlint/cache``), else in the cache folder."""
    return (folder.parent if folder.parent.name == PROJECT_FOLDER else folder) / ".gitignore"


# -- workers ---------------------------------------------------------------------

def guard_worker(parent: int, budget: float) -> None:
    """A worker's own limits, so that it never outlives the run even if the parent
    dies without cleaning up (SIGKILL, a crash):

    - Ctrl-C reaches the whole process group; the worker ignores it (no traceback,
      no stray lines) and the parent stops it; SIGTERM keeps its default (end);
    - Linux: the kernel sends SIGKILL to the worker when its parent dies
      (``prctl(PR_SET_PDEATHSIG)`` through ctypes);
    - a watchdog thread ends the process when the parent changes (it died and the
      worker was re-parented) or when the budget plus a grace period has passed;
    - a CPU-time limit (RLIMIT_CPU) a little beyond the budget is the hard backstop
      when a long call in C holds the interpreter and the watchdog cannot run.
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    try:
        import resource

        resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT, MEMORY_LIMIT))
        if budget < MAX_WAIT:
            cpu = int(budget + GRACE) + 2
            soft, hard = resource.getrlimit(resource.RLIMIT_CPU)
            if hard == resource.RLIM_INFINITY or hard > cpu:
                resource.setrlimit(resource.RLIMIT_CPU, (cpu, cpu + 3))
    except (ImportError, ValueError, OSError):
        pass
    _die_with_parent()
    if os.getppid() != parent:  # the parent died before the request above took effect
        os._exit(EXIT_ORPHANED)
    deadline = time.monotonic() + budget + GRACE

    def watch() -> None:
        while True:
            time.sleep(WATCH_EVERY)
            if os.getppid() != parent:
                os._exit(EXIT_ORPHANED)
            if time.monotonic() > deadline:
                os._exit(EXIT_OVER_BUDGET)

    threading.Thread(target=watch, name="plantlint-watchdog", daemon=True).start()


EXIT_ORPHANED, EXIT_OVER_BUDGET = 3, 4  # a worker's own exit codes (the parent never sees them as results)


def _die_with_parent() -> None:
    """Ask Linux to SIGKILL this process when its parent dies (no-op elsewhere)."""
    if not sys.platform.startswith("linux"):
        return
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        PR_SET_PDEATHSIG = 1
        libc.prctl(PR_SET_PDEATHSIG, signal.SIGKILL, 0, 0, 0)
    except (OSError, AttributeError):
        pass


def _worker(conn: Connection, data: bytes, settings: AnalysisSettings, parent: int, budget: float,
            explain: bool = False) -> None:
    """Child process: analyse one model, send a snapshot per stage, then the raw result.
    It receives the model's bytes and the analysis settings, nothing else of the run."""
    guard_worker(parent, budget)
    if _reaches_values(data):  # a model that stops at its syntax or names needs no sympy
        _import_analysis()
    from plantlint.run.pipeline import analyse_bytes

    try:
        try:
            raw = analyse_bytes(data, settings, progress=lambda s, snap: conn.send(("stage", (s, snap.to_data()))),
                                explain=explain)
            message: tuple[str, Any] = ("done", raw.to_data())
        except (BrokenPipeError, ConnectionResetError):
            raise
        except MemoryError:
            message = ("memory", None)
        except RecursionError:
            message = ("crash", "expressions nested too deep for the analysis")
        except Exception as exc:  # an internal error must not take the run down
            last = traceback.extract_tb(exc.__traceback__)[-1:]
            where = f" at {Path(last[0].filename).name}:{last[0].lineno}" if last else ""
            message = ("crash", f"{type(exc).__name__}: {exc}{where}")
        conn.send(message)
        conn.close()
    except OSError:  # the parent is gone or stopped listening: end quietly
        os._exit(EXIT_ORPHANED)


def _import_analysis() -> None:
    """Import the analysis (sympy, ~0.2 s, when it was not preloaded before the fork) with
    the cyclic garbage collector off, then freeze what it made: those objects live until the
    worker ends, and a collection that walks them during the import, or again during the
    analysis, finds nothing to free. The collector is on for the analysis itself (a long one
    may make cyclic garbage). Measured 2026-12-04, a worker's import of sympy and the engine:
    0.26 -> 0.22 s (median of 7, the same peak memory)."""
    with _collector_paused():
        importlib.import_module("plantlint.analysis.engine")


@contextmanager
def _collector_paused() -> Iterator[None]:
    """The cyclic collector off for the body, then what the body made frozen (imports:
    their objects live to the end of the process) and the collector on again. Freezing
    before enable() matters: else the first collection walks all of it at once (a 2-state
    json run was 8% slower, not faster)."""
    gc.disable()
    try:
        yield
    finally:
        gc.freeze()
        gc.enable()


def _context() -> Any:
    import multiprocessing

    if sys.platform.startswith("linux"):
        return multiprocessing.get_context("fork")
    return multiprocessing.get_context("spawn")


#: Modules every analysis needs, imported before forking.
_PRELOAD = ("plantlint.analysis.engine", "plantlint.analysis.refine", "plantlint.analysis.serialise",
            "plantlint.kernel.structural", "plantlint.kernel.taylor")

#: A small model read before forking (invented; it exercises sums, products, quotients,
#: powers, functions and units).
_WARM_UP = (b"plant warm\nconst k = 2 [1/s]\nconst L = 1 [m]\nconst v = 1 [m/s]\nstate x [m] in -1 .. 1\n"
            b"input u [m/s] in -1 .. 1\nrate x = -k*x + u/(1 + (x/L)^2) + v*sin(x/L)^2\noutput y [m] = x\n")


def _reaches_values(data: bytes) -> bool:
    """Will the model get as far as building values (decoded, parsed, its names resolved;
    a few milliseconds a model)? One that does not is answered without sympy."""
    from plantlint.run.pipeline import read_names

    return read_names(data)[0] is not None


def _preload(datas: list[bytes]) -> None:
    """Import before forking what every worker would import, so that workers start warm
    (the engine, and for several models what it loads on first use) and a model's time
    budget is spent on its analysis, not on imports. Skipped for a single file that does
    not parse or whose names do not resolve: it is reported without sympy."""
    with _collector_paused():  # as in a worker (_import_analysis)
        for module in _PRELOAD:
            importlib.import_module(module)
        if len(datas) > 1:
            # Read one small model before forking: the parser tables, the unit table and what
            # sympy imports only on first use (its tensor module on the first sum, ~50 ms) are
            # then loaded once, in the parent, not again in every worker. One model's worker
            # loads only what that model uses (a pre-commit hook on one file: ~40 ms saved).
            from plantlint.run.pipeline import read_model

            read_model(_WARM_UP)
        from plantlint.language import units

        if any(units.needs_pint(d) for d in datas):
            units.preload()  # pint's registry once (~0.7 s), not in every worker: only for unit names not in the table


def analyse_all(
    datas: list[bytes],
    settings: AnalysisSettings,
    jobs: int,
    timeout: float,
    on_done: Callable[[int], None] | None = None,
    explain: bool = False,
    early: Callable[[int, float, Callable[[], bool]], RawResult | None] | None = None,
) -> list[RawResult]:
    """Analyse every model in worker processes, at most ``jobs`` at a time (with
    ``explain``, each result also carries the derivation that explain shows).

    ``early(i, seconds, finished)``, when given, is asked in this process for each model
    while its worker runs (the light route), within the seconds left of the model's budget,
    so that the budget is enforced on time: a result it returns is the model's, and its
    worker is stopped. ``finished()`` says whether the worker has ended (its result waits
    in the pipe), so that the question is given up instead of holding up an answer that is
    already there.
    A single model is then not preloaded here, so that its worker imports the analysis
    while this process asks ``early``; with several, the import is shared as before."""
    if not datas:
        return []
    if not (early is not None and len(datas) == 1) and (len(datas) > 1 or _reaches_values(datas[0])):
        _preload(datas)

    from multiprocessing import connection

    # The objects this process holds now (the analysis imported, the light route's first
    # round) go to the collector's permanent generation while workers are forked: a
    # worker's collections then do not write to the pages it shares with this process, so
    # they are not copied one by one (Python's gc.freeze, documented for fork without exec).
    # 205 models in SARIF, after the light route's first round: 9.9 s against 11.4 s.
    ctx = _context()
    results: list[RawResult | None] = [None] * len(datas)
    queue = list(range(len(datas)))
    running: dict[Connection, _Running] = {}
    me = os.getpid()
    gc.freeze()
    try:
        while queue or running:
            while queue and len(running) < max(jobs, 1):
                i = queue.pop(0)
                parent, child = ctx.Pipe(duplex=False)
                proc = ctx.Process(target=_worker, args=(child, datas[i], settings, me, timeout, explain), daemon=True)
                proc.start()
                child.close()
                running[parent] = _Running(i, proc, time.monotonic())
            if early is not None:
                for conn, r in list(running.items()):
                    if r.asked:
                        continue
                    r.asked = True
                    left = r.start + timeout - time.monotonic()
                    answer = early(r.index, left, _ended(r.proc)) if left > 0 else None
                    if answer is not None:  # answered here: the worker's analysis is not needed
                        r.proc.kill()
                        r.proc.join()
                        del running[conn]
                        conn.close()
                        results[r.index] = answer
                        if on_done:
                            on_done(r.index)
                if not running:
                    continue
            now = time.monotonic()
            deadline = min(r.start + timeout for r in running.values())
            ready = connection.wait(list(running), timeout=_wait_seconds(deadline - now))
            for conn in ready:
                _receive(conn, running, results, timeout, datas, on_done)
            now = time.monotonic()
            for conn, r in list(running.items()):
                if now - r.start >= timeout:
                    while conn in running and conn.poll():  # what arrived just before the budget ran out
                        _receive(conn, running, results, timeout, datas, on_done)
                    if conn not in running:
                        continue
                    r.proc.kill()
                    r.proc.join()
                    del running[conn]
                    conn.close()
                    results[r.index] = _outcome("timeout", None, r, timeout, datas[r.index])
                    if on_done:
                        on_done(r.index)
    finally:  # an interrupt (SIGINT, SIGTERM) or any error: no worker outlives the run
        gc.unfreeze()
        for conn, r in running.items():
            if r.proc.is_alive():
                r.proc.kill()
            r.proc.join()
            conn.close()
    return [r if r is not None else RawResult() for r in results]


@dataclass
class _Running:
    index: int
    proc: Any
    start: float
    stages: list[str] = field(default_factory=list)
    asked: bool = False  # ``early`` was asked for this model
    snapshot: dict[str, Any] | None = None  # the last stage's snapshot (RawResult data)


def _receive(conn: Connection, running: dict[Connection, _Running], results: list[RawResult | None],
             timeout: float, datas: list[bytes], on_done: Callable[[int], None] | None) -> None:
    r = running[conn]
    try:
        kind, payload = conn.recv()
    except (EOFError, OSError):
        r.proc.join()
        code = r.proc.exitcode
        xcpu = getattr(signal, "SIGXCPU", None)
        why = {EXIT_OVER_BUDGET: "watchdog", **({-xcpu: "cpu limit"} if xcpu else {})}.get(code or 0)
        kind, payload = ("timeout", None) if why else (
            "crash", f"the worker ended unexpectedly (exit code {code})")
    if kind == "stage":
        name, snapshot = payload
        r.stages.append(name)
        r.snapshot = snapshot
        return
    del running[conn]
    conn.close()
    r.proc.join()
    results[r.index] = _outcome(kind, payload, r, timeout, datas[r.index])
    if on_done:
        on_done(r.index)


def _ended(proc: Any) -> Callable[[], bool]:
    """Has the worker process ended? Read from its sentinel, without reaping it or reading
    its pipe (the runner's loop reads the result as before). A worker whose messages fill
    the pipe waits for the parent to read them and does not end until then: the question
    then runs on to its own bound, as it did before this check existed."""
    from multiprocessing import connection

    def ended() -> bool:
        return bool(connection.wait([proc.sentinel], timeout=0))
    return ended


def _wait_seconds(left: float) -> float:
    """How long to block for worker messages: selectors reject huge, infinite and NaN
    timeouts, so a budget such as ``--timeout 1e12`` waits in bounded slices."""
    return max(left, 0.0) if left < MAX_WAIT else MAX_WAIT


def _outcome(kind: str, payload: Any, r: _Running, timeout: float, data: bytes) -> RawResult:
    if kind == "done":
        return RawResult.from_data(payload)
    snapshot = RawResult.from_data(r.snapshot) if r.snapshot is not None else None
    stop_kind = {"timeout": "time", "memory": "memory", "crash": "internal-error"}[kind]
    return stopped(snapshot, stop_kind, r.stages, STAGES, timeout, str(payload or ""), _header(data), data)


_HEADER = re.compile(rb"\s*plant\s+([A-Za-z_][A-Za-z0-9_]*)")


def _header(data: bytes) -> tuple[int, str | None]:
    """Line and name of the `plant` header, found without parsing (used when the
    worker stopped before it had read the model)."""
    for number, line in enumerate(data[:65536].splitlines(), start=1):
        m = _HEADER.match(line)
        if m:
            return number, m.group(1).decode("ascii")
    return 1, None


# -- the whole run ---------------------------------------------------------------

@dataclass(frozen=True)
class Source:
    """One model to check: its bytes, or the finding that says why there are none."""

    display: str
    data: bytes | None
    problem: Finding | None = None


def read_source(target: Target) -> Source:
    """Read a model file (never written to); an oversize file becomes a finding, a file
    that cannot be read is an I/O problem (:class:`UsageError`, exit 2), never a finding
    about its content.

    At most ``MAX_BYTES + 1`` bytes are read, so a device or a file that grows
    while it is read (``/dev/zero``) cannot exhaust memory; the file is opened
    without blocking, so a pipe that took the place of a file cannot hang the run.
    """
    import stat

    try:
        fd = os.open(target.path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
        with os.fdopen(fd, "rb") as fh:
            mode = os.fstat(fh.fileno()).st_mode
            if not (stat.S_ISREG(mode) or stat.S_ISCHR(mode)):
                kind = "a folder" if stat.S_ISDIR(mode) else _file_kind(mode)
                raise UsageError(f"{target.display}: not a regular file ({kind}); nothing was checked")
            size = os.fstat(fh.fileno()).st_size
            data = b"" if size > MAX_BYTES else fh.read(MAX_BYTES + 1)
        if size > MAX_BYTES or len(data) > MAX_BYTES:
            shown = f"{size / 1e6:.1f} MB" if size > MAX_BYTES else f"over {MAX_BYTES // 1024} KiB"
            return Source(target.display, None, finding(
                "syntax",
                f"file is {shown}; plant models are limited to {MAX_BYTES // 1024} KiB",
                Span(1, 1, 1, 2), anchor=anchors.problem("file too large")))
        return Source(target.display, data)
    except OSError as exc:
        raise UsageError(f"{target.display}: cannot read: {exc.strerror or exc}; nothing was checked") from None


def check_targets(
    targets: list[Target],
    config: Config,
    defaults: dict[str, Severity],
    *,
    jobs: int,
    use_cache: bool,
    cache_dir: Path | None,
    show_progress: bool,
    light: bool = False,
) -> list[FileReport]:
    """Reports for every target, in the order given (``light``: see :func:`raw_results`)."""
    sources = [read_source(t) for t in targets]
    raws = raw_results(sources, config, jobs=jobs, use_cache=use_cache, cache_dir=cache_dir,
                       show_progress=show_progress, light=light)
    return [finish(src.display, raw, source_text(src.data), config, defaults) for src, raw in zip(sources, raws)]


def raw_results(
    sources: list[Source],
    config: Config,
    *,
    jobs: int,
    use_cache: bool,
    cache_dir: Path | None,
    show_progress: bool,
    explain: bool = False,
    light: bool = False,
) -> list[RawResult]:
    """Raw results (before policy) for every source, from the cache where possible
    (results with the explain derivation are cached apart from those without).

    With ``light`` (a report that shows no analysis: the text, lines, markdown and SARIF
    formats of ``check``) a model the light route proves clean is answered without the
    analysis and without sympy; its result is cached apart, so a report that shows the
    analysis never gets it."""
    cache = Cache(cache_dir if use_cache else None, config.analysis_key() + (" explain" if explain else ""))
    light_cache = Cache(cache_dir if use_cache and light else None, config.analysis_key() + " light")
    raws: list[RawResult | None] = []
    keys: list[str | None] = []
    for src in sources:
        if src.data is None:
            raws.append(RawResult(findings=[src.problem] if src.problem else []))
            keys.append(None)
            continue
        key = cache.key(src.data)
        keys.append(key)
        raws.append(cache.get(key) or (light_cache.get(light_cache.key(src.data)) if light else None))
    todo = [i for i, r in enumerate(raws) if r is None]
    # One model: the light route is asked in this process while the model's worker starts on
    # the full analysis (and imports it: a single model is not preloaded). A pass it proves
    # stops the worker; a model it hands over has lost no time where a second core runs the
    # worker. (With several, asking while workers run would hold up collecting the others'
    # results.)
    one_core = _cores() == 1
    beside = ((lambda _k, left, ended: _light(sources[todo[0]].data or b"", config, within=left, stop=ended))
              if light and len(todo) == 1 and not one_core else None)
    if light and (len(todo) > 1 or one_core):
        # (On one core a worker beside the light route would take the core from it, and a
        # model handed over late would pay for both: there the light route goes first for a
        # single model too. Measured pinned to one core: a clean hoist 0.12 s against 0.23 s
        # beside a worker, a ranged arm handed over late 0.79 s against 0.99 s.)
        # Several models: the light route first, one after another, for a short while, with
        # a short envelope proof each. Clean small models are answered in milliseconds each,
        # and if it answers them all, no worker starts and nothing imports sympy; the rest go
        # to the workers (forked afterwards, they share the parent's import, see _preload).
        until = time.monotonic() + LIGHT_SERIAL_SECONDS
        for i in todo:
            if time.monotonic() >= until:
                break
            # bounded by what is left of the round, so the round keeps to its 0.3 s even when a
            # model's points are slow to settle (formal numbers over a ranged parameter)
            raws[i] = _light(sources[i].data or b"", config, LIGHT_SERIAL_MODEL_SECONDS if len(todo) > 1 else None,
                             within=max(until - time.monotonic(), 0.001))
            if raws[i] is not None:
                light_cache.put(light_cache.key(sources[i].data or b""), raws[i])  # type: ignore[arg-type]
        todo = [i for i in todo if raws[i] is None]

    if todo:
        progress = _Progress(len(todo)) if show_progress and len(todo) > 3 else None
        try:
            fresh = analyse_all([sources[i].data or b"" for i in todo], config.analysis, jobs, config.seconds,
                                on_done=(lambda _i: progress.advance()) if progress else None, explain=explain,
                                early=beside)
        finally:
            if progress:
                progress.close()
        for i, raw in zip(todo, fresh):
            raws[i] = raw
            if raw.route == "light":
                light_cache.put(light_cache.key(sources[i].data or b""), raw)
            elif keys[i] is not None and cacheable(raw):
                cache.put(keys[i] or "", raw)
    return [r or RawResult() for r in raws]


#: Wall-clock bound of the light route on one model, in the parent process, while the
#: model's worker runs. The route bounds its own envelope proof (``analysis.light.MAX_SECONDS``);
#: this outer bound only keeps one pathological evaluation from holding the parent up: the
#: worker's full analysis then answers the model.
LIGHT_SECONDS = 2.0
#: The seconds the light route may take before any worker starts, when a run has several
#: models to analyse (a single model's worker starts at once, beside it).
LIGHT_SERIAL_SECONDS = 0.3
#: The envelope proof's seconds in that round (a model that needs more goes to its worker).
LIGHT_SERIAL_MODEL_SECONDS = 0.05


def _cores() -> int:
    """The processors this process may run on (the affinity mask where the system has one)."""
    try:
        return max(len(os.sched_getaffinity(0)), 1)
    except (AttributeError, OSError):
        return max(os.cpu_count() or 1, 1)


def _light(data: bytes, config: Config, seconds: float | None = None, within: float | None = None,
           stop: Callable[[], bool] | None = None) -> RawResult | None:
    """The light route's answer for one model, or None (the worker's analysis answers);
    ``seconds`` bounds its envelope proof (default: the route's own), and the whole call
    takes at most ``LIGHT_SECONDS``, the model's budget and ``within`` (what is left of a
    worker's budget, or of the first round), so that no answer comes later than the budget
    allows. ``stop`` ends its envelope proof early (the worker beside it has finished)."""
    from plantlint.core import deadline
    from plantlint.run.pipeline import light_result

    bound = min(LIGHT_SECONDS, config.seconds, config.seconds if within is None else within)
    raw = deadline.bounded(bound, lambda: light_result(data, config.analysis, seconds, stop))
    return None if raw is deadline.LATE else raw  # type: ignore[return-value]


def cacheable(raw: RawResult) -> bool:
    """False when the result depends on the machine and its load: the runner stopped the
    analysis (time, memory, internal error), or a step of it stopped at its own
    wall-clock bound (an envelope proof out of ``envelope-seconds``, a ``bounded`` step
    out of its seconds: ``RawResult.timed_out_step``). A later run on a faster or idler
    machine must compute such a result afresh, not replay it.

    What the analysis stops by a size bound (an envelope proof out of boxes, an expression
    too large for symbolic confirmation: an ``analysis-budget`` finding) is a
    deterministic outcome of the model and the settings and is cached like any other.
    """
    return raw.stop is None and not raw.timed_out_step


def source_text(data: bytes | None) -> str | None:
    """The model's text for showing spans (never written back)."""
    if data is None or len(data) > MAX_BYTES:
        return None
    return data.decode("utf-8", errors="replace").lstrip("\ufeff")


class _Progress:
    """A rich progress bar on stderr (only used when stderr is a terminal).

    Redrawn when a model completes rather than by rich's refresh thread: workers
    are forked, and forking while another thread holds a lock can hang the child.
    """

    def __init__(self, total: int):
        from rich.console import Console
        from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn

        self._progress = Progress(TextColumn("analysing models"), BarColumn(), MofNCompleteColumn(),
                                  TimeElapsedColumn(), console=Console(stderr=True), transient=True,
                                  auto_refresh=False)
        self._task = self._progress.add_task("models", total=total)
        self._progress.start()

    def advance(self) -> None:
        self._progress.advance(self._task)
        self._progress.refresh()

    def close(self) -> None:
        self._progress.stop()
