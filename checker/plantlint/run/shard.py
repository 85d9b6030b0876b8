"""Sharded runs: ``check --shard K/N`` and ``plantlint merge``.

Assignment (documented in docs/report-format.md, "Sharded runs"): every model has
a preference order over the N shards, from rendezvous (highest-random-weight)
hashing of its path relative to the configuration root; models are taken in path
order and each goes to the first shard on its list whose load (the sum of model
file sizes) stays within ``(1 + SLACK)`` times the average, so shards carry about
the same number of bytes of model text. This is consistent hashing with bounded
loads: a model moves only when its preferred shard fills up, so adding or removing
a model moves few others. The weight is the file size, not a cached run time,
because every shard job must compute the same assignment on its own, and sizes are
the same on every machine while caches are not.

Deleted models (under ``--since``) carry no analysis cost and go to their first
choice. Each shard's JSON report records ``shard`` (index, count, the number of
models of the whole run, the positions of its models in the unsharded order and
the fail level) so that :func:`merge_reports` can refuse an incomplete or
inconsistent set and rebuild the unsharded report exactly.
"""

from __future__ import annotations

import hashlib
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Sequence, TypeVar

from plantlint.core.findings import Report, Severity

SLACK = 0.10
MAX_SHARDS = 4096
T = TypeVar("T")


class ShardError(ValueError):
    """A bad --shard value or a set of shard reports that cannot be merged (exit code 2)."""


def parse_shard(text: str) -> tuple[int, int]:
    """``"K/N"`` -> (K, N) with 1 <= K <= N."""
    m = re.fullmatch(r"\s*(\d{1,6})\s*/\s*(\d{1,6})\s*", text or "")
    if not m:
        raise ShardError(f"--shard: expected K/N (for example 2/4), not '{text}'")
    k, n = int(m.group(1)), int(m.group(2))
    if not 1 <= n <= MAX_SHARDS:
        raise ShardError(f"--shard: the shard count must be between 1 and {MAX_SHARDS}")
    if not 1 <= k <= n:
        raise ShardError(f"--shard: shard {k} does not exist; shards are numbered 1 to {n}")
    return k, n


def shard_key(path: Path, root: Path) -> str:
    """The name a model is hashed by: its path relative to the configuration root."""
    try:
        return path.resolve().relative_to(root.resolve()).as_posix()
    except ValueError:
        return path.resolve().as_posix()


def preference(key: str, count: int) -> list[int]:
    """Shards 0..count-1 in the order this model prefers them (rendezvous hashing)."""
    scores = [(hashlib.sha256(f"{key}\0{j}".encode("utf-8", "surrogateescape")).digest(), j) for j in range(count)]
    return [j for _, j in sorted(scores, reverse=True)]


def assign(items: Sequence[tuple[str, int]], count: int, slack: float = SLACK) -> dict[str, int]:
    """Shard (0-based) of every ``(key, weight)``: bounded-load rendezvous hashing."""
    total = sum(max(w, 1) for _, w in items)
    capacity = (1.0 + slack) * total / count if count else 0.0
    loads = [0] * count
    out: dict[str, int] = {}
    for key, weight in sorted(items):
        w = max(weight, 1)
        order = preference(key, count)
        chosen = next((j for j in order if loads[j] + w <= capacity), None)
        if chosen is None:  # nothing has room: the least loaded, ties by preference
            chosen = min(order, key=lambda j: loads[j])
        loads[chosen] += w
        out[key] = chosen
    return out


@dataclass
class Shard:
    """One shard of a run; ``pick`` keeps its own models and remembers where they sat."""

    index: int  # 1-based
    count: int
    root: Path
    models: int = 0  # models of the whole run seen so far
    positions: list[int] = field(default_factory=list)

    def pick(self, targets: Sequence[T], weights: Sequence[int] | None = None) -> list[T]:
        """This shard's share of ``targets`` (objects with a ``path``), in their order."""
        keys = [shard_key(Path(getattr(t, "path", t)), self.root) for t in targets]
        if weights is None:
            weights = [_size(Path(getattr(t, "path", t))) for t in targets]
        owner = assign(list(zip(keys, weights)), self.count)
        mine = [i for i, k in enumerate(keys) if owner[k] == self.index - 1]
        self.positions += [self.models + i for i in mine]
        self.models += len(targets)
        return [targets[i] for i in mine]

    def pick_gone(self, paths: Sequence[Path]) -> list[int]:
        """Indices of the deleted models (no cost) this shard reports: first choice wins."""
        mine = [i for i, p in enumerate(paths) if preference(shard_key(p, self.root), self.count)[0] == self.index - 1]
        self.positions += [self.models + i for i in mine]
        self.models += len(paths)
        return mine

    def record(self, fail_on: Severity) -> dict[str, Any]:
        return {"index": self.index, "count": self.count, "models": self.models,
                "positions": list(self.positions), "fail_on": fail_on.value}


def _size(path: Path) -> int:
    try:
        return max(path.stat().st_size, 1)
    except OSError:
        return 1


# -- merging ---------------------------------------------------------------------------------

def _settings(report: Report) -> str:
    """The run's --only/--skip/severity settings in words, for a refusal."""
    return "; ".join(f"{a.describe()} by {a.source}" for a in report.adjustments) or "no rule settings"


def merge_reports(named: Sequence[tuple[str, dict[str, Any]]], fail_on: Severity | None = None) -> Report:
    """One report from the JSON reports of every shard of a run, as the unsharded run
    would have written it. Refuses (``ShardError``) a missing, repeated or foreign
    shard, reports of different runs (shard count, fail level, --since, version, rule
    settings: --only, --skip, severity; [undecided] fail), and a set that does not cover
    every model."""
    from plantlint.report.formats.json_report import ReportReadError, read_report

    if not named:
        raise ShardError("merge needs the JSON reports of every shard")
    parts: list[tuple[str, Report, dict[str, Any]]] = []
    for name, data in named:
        try:
            report = read_report(data)
        except ReportReadError as exc:
            raise ShardError(f"{name}: {exc}") from None
        info = report.shard
        if info is None:
            raise ShardError(f"{name}: not a shard report (written without --shard)")
        parts.append((name, report, info))
    first_name, first, info0 = parts[0]
    count, models = info0["count"], info0["models"]
    seen: dict[int, str] = {}
    for name, report, info in parts:
        for key, what in (("count", "shard count"), ("models", "number of models"), ("fail_on", "fail level")):
            if info[key] != info0[key]:
                raise ShardError(f"{name} and {first_name} differ in their {what} ({info[key]} vs {info0[key]}): "
                                 "not shards of one run")
        if report.since != first.since or report.tool_version != first.tool_version:
            raise ShardError(f"{name} and {first_name} come from different runs (--since or plantlint version)")
        if report.adjustments != first.adjustments:
            raise ShardError(f"{first_name} and {name} ran with different rule settings ({first_name}: "
                             f"{_settings(first)}; {name}: {_settings(report)}): not shards of one run; run "
                             "every shard with the same --only, --skip and configuration")
        if report.configuration != first.configuration:
            raise ShardError(f"{name} and {first_name} ran under different configuration files "
                             f"({report.configuration or 'none'} vs {first.configuration or 'none'}): not shards of one run")
        if report.relaxation != first.relaxation:
            raise ShardError(f"{name} and {first_name} differ in whether not-decided results fail "
                             "([undecided] fail): not shards of one run")
        if info["index"] in seen:
            raise ShardError(f"shard {info['index']}/{count} given twice ({seen[info['index']]} and {name})")
        seen[info["index"]] = name
        if len(info["positions"]) != len(report.files):
            raise ShardError(f"{name}: the shard record does not match its files")
    missing = [k for k in range(1, count + 1) if k not in seen]
    if missing:
        raise ShardError(f"shard{'s' if len(missing) > 1 else ''} {', '.join(f'{k}/{count}' for k in missing)} "
                         "missing: a merged report must cover every model")
    placed: dict[int, Any] = {}
    for name, report, info in parts:
        for position, file_report in zip(info["positions"], report.files):
            if position in placed or not 0 <= position < models:
                raise ShardError(f"{name}: model position {position} is repeated or out of range")
            placed[position] = file_report
    if len(placed) != models:
        raise ShardError(f"the shards hold {len(placed)} of the run's {models} models")
    paths = [placed[i].path for i in range(models)]
    if len(set(paths)) != len(paths):
        raise ShardError("a model appears in more than one shard")
    merged = first
    merged.files = [placed[i] for i in range(models)]
    merged.shard = None
    merged.fail_on = fail_on if fail_on is not None else Severity.parse(info0["fail_on"])
    return merged


__all__ = ["SLACK", "Shard", "ShardError", "assign", "merge_reports", "parse_shard", "preference", "shard_key"]
