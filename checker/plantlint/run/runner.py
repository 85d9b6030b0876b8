"""Running many models: discovery, cache, worker processes, time budgets, progress.

Each uncached model is analysed in its own worker process (forked from a parent
that has already imported the analysis code, so starting one is cheap). A worker
reports the analysis stages it completes; when it exceeds the time budget it is
stopped and the model gets an ``analysis-budget`` finding naming what completed.
Output order never depends on scheduling: results are kept in input order.
"""

from __future__ import annotations

import hashlib
import json
import multiprocessing
import os
import sys
import time
import traceback
from dataclasses import dataclass
from fnmatch import fnmatch
from multiprocessing.connection import Connection, wait
from pathlib import Path
from typing import Any, Callable

from plantlint import __version__
from plantlint.language.units import UNITS_VERSION  # light: pint is imported only to check units
from plantlint.core.findings import FileReport, Finding, Severity, Span
from plantlint.run.pipeline import RawResult, budget_finding, finish

STAGES = ("structure", "envelope", "points", "zero dynamics", "linearisation", "distributions", "claims")
CACHE_FORMAT = 2  # 2: the analysis has a linearisation per point
MAX_BYTES = 1 << 20  # same limit as plantlint.language.syntax.MAX_BYTES (not imported: it pulls in sympy)
MEMORY_LIMIT = 6 * 1024**3  # bytes of address space per worker
MAX_WAIT = 3600.0  # seconds; longest single wait for worker messages
BUDGET_ANCHOR = "analysis budget"  # anchor of pipeline.budget_finding (the runner's own stops)


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
        h.update(f"plantlint {__version__} cache {CACHE_FORMAT} units {UNITS_VERSION} {self.settings}\0".encode())
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


# -- workers ---------------------------------------------------------------------

def _worker(conn: Connection, data: bytes, config: Any) -> None:
    """Child process: analyse one model, report stages, send the raw result."""
    try:
        import resource

        resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT, MEMORY_LIMIT))
    except (ImportError, ValueError, OSError):
        pass
    from plantlint.run.pipeline import analyse_bytes

PROJECT_FOLDER = ".plantlint"  # everything plantlint writes lives under this one folder


def ignore_marker(folder: Path) -> Path:
    """Where the self-ignoring ``.gitignore`` goes: in the project folder ``.plantlint/``
    when the cache lives inside it (the default ``.plantlint/cache``), else in the cache folder."""
    return (folder.parent if folder.parent.name == PROJECT_FOLDER else folder) / ".gitignore"


    try:
        raw = analyse_bytes(data, config, progress=lambda s: conn.send(("stage", s)))
        conn.send(("done", raw.to_data()))
    except MemoryError:
        conn.send(("memory", None))
    except RecursionError:
        conn.send(("crash", "expression nesting too deep for the analysis"))
    except Exception as exc:  # an internal error must not take the run down
        last = traceback.extract_tb(exc.__traceback__)[-1:]
        where = f" at {Path(last[0].filename).name}:{last[0].lineno}" if last else ""
        conn.send(("crash", f"{type(exc).__name__}: {exc}{where}"))
    finally:
        conn.close()


def _context() -> Any:
    if sys.platform.startswith("linux"):
        return multiprocessing.get_context("fork")
    return multiprocessing.get_context("spawn")


def analyse_all(
    datas: list[bytes],
    config: Any,
    jobs: int,
    timeout: float,
    on_done: Callable[[int], None] | None = None,
) -> list[RawResult]:
    """Analyse every model in worker processes, at most ``jobs`` at a time."""
    if not datas:
        return []
    import plantlint.analysis.engine  # noqa: F401  (imported before forking: workers start warm)
    from plantlint.language.syntax import parser

    parser()  # build the LALR tables once, not in every worker
    from plantlint.language import units

    if any(units.declares_units(d) for d in datas):
        units.preload()  # pint's registry once (~0.5 s), not in every worker

    ctx = _context()
    results: list[RawResult | None] = [None] * len(datas)
    queue = list(range(len(datas)))
    running: dict[Connection, tuple[int, Any, float, list[str]]] = {}
    while queue or running:
        while queue and len(running) < max(jobs, 1):
            i = queue.pop(0)
            parent, child = ctx.Pipe(duplex=False)
            proc = ctx.Process(target=_worker, args=(child, datas[i], config), daemon=True)
            proc.start()
            child.close()
            running[parent] = (i, proc, time.monotonic(), [])
        now = time.monotonic()
        deadline = min(start + timeout for (_, _, start, _) in running.values())
        ready = wait(list(running), timeout=_wait_seconds(deadline - now))
        for conn in ready:
            i, proc, start, stages = running[conn]
            try:
                kind, payload = conn.recv()
            except (EOFError, OSError):
                kind, payload = "crash", f"worker ended unexpectedly (exit code {proc.exitcode})"
            if kind == "stage":
                stages.append(payload)
                continue
            del running[conn]
            conn.close()
            proc.join()
            results[i] = _outcome(kind, payload, stages, timeout, datas[i])
            if on_done:
                on_done(i)
        now = time.monotonic()
        for conn, (i, proc, start, stages) in list(running.items()):
            if now - start >= timeout:
                proc.kill()
                proc.join()
                del running[conn]
                conn.close()
                results[i] = _outcome("timeout", None, stages, timeout, datas[i])
                if on_done:
                    on_done(i)
    return [r if r is not None else RawResult() for r in results]


def _wait_seconds(left: float) -> float:
    """How long to block for worker messages: selectors reject huge, infinite and NaN
    timeouts, so a budget such as ``--timeout 1e12`` waits in bounded slices."""
    return max(left, 0.0) if left < MAX_WAIT else MAX_WAIT


def _outcome(kind: str, payload: Any, stages: list[str], timeout: float, data: bytes) -> RawResult:
    if kind == "done":
        return RawResult.from_data(payload)
    pending = [s for s in STAGES if s not in stages]
    reason = {
        "timeout": "time",
        "memory": "ran out of its memory budget",
        "crash": f"stopped by an internal error ({payload}); please report it",
    }[kind]
    raw = RawResult(stages=stages)
    raw.findings.append(budget_finding(stages, pending, timeout, reason, _header_line(data)))
    return raw


def _header_line(data: bytes) -> int:
    """Line of the `plant` header (found without parsing: the worker did not finish)."""
    for number, line in enumerate(data[:65536].splitlines(), start=1):
        if line.lstrip().startswith(b"plant"):
            return number
    return 1


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
            return Source(target.display, None, Finding(
                "syntax", Severity.ERROR,
                f"file is {shown}; plant models are limited to {MAX_BYTES // 1024} KiB",
                Span(1, 1, 1, 2), anchor="file too large"))
        return Source(target.display, data)
    except OSError as exc:
        raise UsageError(f"{target.display}: cannot read: {exc.strerror or exc}; nothing was checked") from None


def check_targets(
    targets: list[Target],
    config: Any,
    defaults: dict[str, Severity],
    *,
    jobs: int,
    use_cache: bool,
    cache_dir: Path | None,
    show_progress: bool,
) -> list[FileReport]:
    """Reports for every target, in the order given."""
    sources = [read_source(t) for t in targets]
    raws = raw_results(sources, config, jobs=jobs, use_cache=use_cache, cache_dir=cache_dir,
                       show_progress=show_progress)
    return [finish(src.display, raw, source_text(src.data), config, defaults) for src, raw in zip(sources, raws)]


def raw_results(
    sources: list[Source],
    config: Any,
    *,
    jobs: int,
    use_cache: bool,
    cache_dir: Path | None,
    show_progress: bool,
) -> list[RawResult]:
    """Raw results (before policy) for every source, from the cache where possible."""
    cache = Cache(cache_dir if use_cache else None, config.analysis_key())
    raws: list[RawResult | None] = []
    keys: list[str | None] = []
    for src in sources:
        if src.data is None:
            raws.append(RawResult(findings=[src.problem] if src.problem else []))
            keys.append(None)
            continue
        key = cache.key(src.data)
        keys.append(key)
        raws.append(cache.get(key))
    todo = [i for i, r in enumerate(raws) if r is None]
    if todo:
        progress = _Progress(len(todo)) if show_progress and len(todo) > 3 else None
        try:
            fresh = analyse_all([sources[i].data or b"" for i in todo], config, jobs, config.timeout,
                                on_done=(lambda _i: progress.advance()) if progress else None)
        finally:
            if progress:
                progress.close()
        for i, raw in zip(todo, fresh):
            raws[i] = raw
            if keys[i] is not None and not cut_short(raw):
                cache.put(keys[i] or "", raw)
    return [r or RawResult() for r in raws]


def cut_short(raw: RawResult) -> bool:
    """True when the runner stopped the analysis (time, memory, internal error).

    Such results depend on the machine and its load, so they are not cached. The
    analysis' own budget findings (for example an unconfirmed zero decision) are a
    deterministic outcome of the model and the settings and are cached like any other.
    """
    return any(f.rule == "analysis-budget" and f.anchor == BUDGET_ANCHOR for f in raw.findings)


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
