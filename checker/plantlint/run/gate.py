"""The regression gate: ``plantlint check --since REF``.

Each model is compared with its version at the git revision REF, read with
``git cat-file`` (no checkout, nothing written to the work tree). Findings are
matched by their stable fingerprint (rule, plant, what it is about, point), so
moving lines does not make old findings look new:

- *known*: present at REF and now;
- *introduced*: present now, not at REF (only these can fail the run);
- *fixed*: present at REF, gone now, and looked for (a model stopped by its own errors is
  checked only as far as it got: see :func:`checked_now`).

The structural summary (relative degrees, envelope verdict, verdicts per point)
is compared too, so a change such as minimum phase -> critical is reported even
when no rule fires (for example because the new finding is waived).
"""

from __future__ import annotations

import os
import subprocess
from collections import Counter
from dataclasses import replace
from pathlib import Path
from typing import Any, Callable

from plantlint import __version__
from plantlint.analysis.serialise import structural_facts
from plantlint.core import anchors
from plantlint.core.catalogue import STOPPING_RULES, load_catalogue
from plantlint.core.findings import FileReport, Finding, Report, Severity
from plantlint.run.config import Config
from plantlint.run.pipeline import RawResult, blocked, fails_the_run, finish
from plantlint.run.runner import (
    Source,
    UsageError,
    _display,
    discover,
    raw_results,
    read_source,
    selected_in_folder,
    source_text,
)


def _git(args: list[str], cwd: Path) -> subprocess.CompletedProcess[bytes]:
    try:
        return subprocess.run(["git", *args], cwd=cwd, capture_output=True, timeout=60, check=False)
    except FileNotFoundError:
        raise UsageError("--since needs git, which is not installed") from None
    except subprocess.TimeoutExpired:
        raise UsageError("git did not answer within 60 s") from None


def repo_top(cwd: Path) -> Path:
    out = _git(["rev-parse", "--show-toplevel"], cwd)
    if out.returncode != 0:
        raise UsageError("--since needs a git repository (none found here)")
    return Path(os.fsdecode(out.stdout).strip())


def resolve_ref(ref: str, top: Path) -> str:
    if ref.startswith("-"):
        raise UsageError(f"--since: '{ref}' is not a revision")
    out = _git(["rev-parse", "--verify", "--quiet", f"{ref}^{{commit}}"], top)
    if out.returncode != 0:
        raise UsageError(f"--since: unknown git revision '{ref}'")
    return out.stdout.decode().strip()


def renames(commit: str, top: Path) -> dict[str, str]:
    """New path -> old path, for files git sees as renamed between REF and the work tree.

    ``diff-index`` (plumbing) rather than ``diff``: ``diff`` refreshes and rewrites
    ``.git/index`` when file times changed; the gate writes nothing.
    """
    out = _git(["diff-index", "--name-status", "-M", "-z", commit, "--"], top)
    if out.returncode != 0:
        return {}
    fields = os.fsdecode(out.stdout).split("\0")
    mapping: dict[str, str] = {}
    i = 0
    while i < len(fields) and fields[i]:
        status = fields[i]
        if status.startswith(("R", "C")):
            old, new = fields[i + 1], fields[i + 2]
            if status.startswith("R"):
                mapping[new] = old
            i += 3
        else:
            i += 2
    return mapping


def old_version(commit: str, path: str, top: Path) -> bytes | None:
    """The file's bytes at ``commit``; None when the path held no file there.

    ``cat-file blob`` rather than ``show``: ``show`` also answers for a folder
    (a tree listing, coloured under ``color.ui = always``) and would be read as a model.
    """
    out = _git(["cat-file", "blob", f"{commit}:{path}"], top)
    return out.stdout if out.returncode == 0 else None


def gate(ref: str, paths: list[str], config: Config, defaults: dict[str, Severity], *, jobs: int, use_cache: bool,
         cache_dir: Path | None, show_progress: bool, shard: Any = None, every: list[Any] | None = None) -> Report:
    """The gate over ``paths``; with ``shard`` (run.shard.Shard) only that shard's models;
    ``every``: the models under ``paths`` when the caller has discovered them already."""
    top = repo_top(Path.cwd())
    commit = resolve_ref(ref, top)
    if every is None:
        every = discover(paths, config.root, config.include, config.exclude)
    targets = shard.pick(every) if shard is not None else every
    moved = renames(commit, top)
    now_sources = [read_source(t) for t in targets]
    old_sources: list[Source | None] = []
    for t in targets:
        try:
            rel = t.path.resolve().relative_to(top.resolve()).as_posix()
        except ValueError:
            old_sources.append(None)
            continue
        data = old_version(commit, moved.get(rel, rel), top)
        old_sources.append(Source(t.display, data) if data is not None else None)
    present_old = [s for s in old_sources if s is not None]
    raws = raw_results(now_sources + present_old, config, jobs=jobs, use_cache=use_cache, cache_dir=cache_dir,
                       show_progress=show_progress)
    now_raws, old_iter = raws[: len(now_sources)], iter(raws[len(now_sources):])
    files = []
    for src, raw, old_src in zip(now_sources, now_raws, old_sources):
        report = finish(src.display, raw, source_text(src.data), config, defaults)
        old_raw = next(old_iter) if old_src is not None else None
        files.append(compare(report, old_raw, config, defaults, ref))
        if old_raw is not None:
            files[-1].structure_changes.extend(waiver_changes(old_raw.waivers, raw.waivers))
    files.extend(_deleted(commit, top, paths, config, defaults, every, moved, jobs=jobs, use_cache=use_cache,
                          cache_dir=cache_dir, shard=shard))
    return Report(files=files, tool_version=__version__, fail_on=config.fail_on, since=ref)


def _deleted(commit: str, top: Path, paths: list[str], config: Config, defaults: dict[str, Severity],
             targets: list[Any], moved: dict[str, str], shard: Any = None, **run: Any) -> list[FileReport]:
    """Models under the checked folders at REF that are gone now (and were not
    renamed): every finding they had is fixed, and the report says they were deleted."""
    current = {t.path.resolve() for t in targets}
    renamed_from = set(moved.values())
    cwd = Path.cwd()
    gone: list[tuple[str, Path]] = []
    for raw in paths:
        folder = Path(raw)
        if not folder.is_dir():
            continue
        try:
            rel_dir = folder.resolve().relative_to(top.resolve()).as_posix()
        except ValueError:
            continue
        listed = _git(["ls-tree", "-r", "-z", "--name-only", commit, "--", rel_dir if rel_dir != "." else "."], top)
        if listed.returncode != 0:
            continue
        for name in sorted(n for n in os.fsdecode(listed.stdout).split("\0") if n.endswith(".plant")):
            path = top / name
            if (path.resolve() in current or name in renamed_from or path.exists()
                    or not selected_in_folder(path, folder, config.root, config.include, config.exclude)):
                continue
            if name not in {g for g, _ in gone}:
                gone.append((name, path))
    if shard is not None:
        gone = [gone[i] for i in shard.pick_gone([path for _, path in gone])]
    if not gone:
        return []
    sources = [Source(name, old_version(commit, name, top)) for name, _ in gone]
    raws = raw_results([s for s in sources if s.data is not None], config, show_progress=False, **run)
    reports = []
    for (name, path), raw in zip([g for g, s in zip(gone, sources) if s.data is not None], raws):
        old = finish(_display(path, cwd), raw, None, config, defaults)
        old.findings = [replace(f, baseline="fixed", span=None) for f in old.sorted_findings()]
        old.analysis = None
        old.structure_changes = [{"what": "model", "before": "present", "after": "deleted"}]
        old.deleted = True  # listed with its findings fixed, but not counted as checked
        reports.append(old)
    return reports


def compare(report: FileReport, old_raw: RawResult | None, config: Config, defaults: dict[str, Severity],
            ref: str = "the baseline") -> FileReport:
    """Mark each finding known/introduced, add the fixed ones, and diff the structure. A
    finding waived at ``ref`` and not now is introduced (it counts again); a model whose
    errors keep its analysis from running, all known at ``ref``, is not checked."""
    if old_raw is None:
        report.findings = [replace(f, baseline="introduced") for f in report.findings]
        return report
    old = finish(report.path, old_raw, None, config, defaults)
    before = Counter(f.fingerprint(old.plant) for f in old.findings)
    waived_before = Counter(f.fingerprint(old.plant) for f in old.findings if f.waived)
    marked: list[Finding] = []
    for f in report.sorted_findings():
        key = f.fingerprint(report.plant)
        if before[key] > 0:
            before[key] -= 1
            # accepted (waived) at REF and not now: it counts against the run again
            unwaived = not f.waived and waived_before[key] > 0
            waived_before[key] -= int(waived_before[key] > 0)
            marked.append(replace(f, baseline="introduced" if unwaived else "known"))
        else:
            marked.append(replace(f, baseline="introduced"))
    now = Counter(f.fingerprint(report.plant) for f in report.findings)
    checked = checked_now(report)
    for f in old.sorted_findings():
        key = f.fingerprint(old.plant)
        if now[key] > 0:
            now[key] -= 1
        elif checked(f):
            marked.append(replace(f, baseline="fixed", span=None))
    report.findings = marked
    report.structure_changes = structure_changes(old_raw.analysis, report.analysis)
    if report.stop is None and report.analysis is None and not any(
            f.baseline == "introduced" and fails_the_run(f, config.fail_on) for f in marked):
        # its errors keep the analysis from running and were there at REF: what the
        # change did to the model was not checked
        report.stop = blocked([f for f in marked if f.baseline != "fixed"],
                              f"known at {ref}: what changed since was not checked")
    return report


def checked_now(report: FileReport) -> Callable[[Finding], bool]:
    """Could this run have found a finding again? (A predicate on findings.)

    A model that its own errors stop is checked only as far as it got, and a finding at
    the baseline of a later step is not fixed, only not looked at: a file that does not
    parse is checked for syntax alone; one whose names do not resolve for its names (the
    stopping problems of :mod:`plantlint.language.names`); one read as a model but not
    analysed for the model and its units. Such findings are left out of the comparison
    (the run fails on the errors that stop it, or, when those were known at the baseline,
    is not decided: what changed was not checked)."""
    if report.analysis is not None or report.stop is not None:
        return lambda f: True  # analysed, or stopped on the way (the stop says what is not decided)
    rules = {f.rule for f in report.findings}
    if rules <= {"syntax"}:
        return lambda f: f.rule == "syntax"
    if rules <= STOPPING_RULES:
        return lambda f: f.rule in STOPPING_RULES
    catalogue = load_catalogue()
    return lambda f: f.rule in catalogue and catalogue.get(f.rule).family in ("model", "units")


#: Zero-dynamics verdicts in the words the reports use (the analysis' own identifiers stay internal).
VERDICT_WORDS = {
    "minimum_phase": "minimum phase",
    "non_minimum_phase": "non-minimum phase",
    "critical": "critical",
    "not_applicable": "none (total relative degree n)",
    "undefined": "not defined",
}


def _words(value: Any) -> Any:
    """A summary value as a reader sees it: yes/no for booleans, verdicts in words."""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, str):
        return VERDICT_WORDS.get(value, value.replace("_", " "))
    return value


def waiver_changes(before: list[Any], after: list[Any]) -> list[dict[str, Any]]:
    """Waivers added, removed or given another reason: ``what`` is 'waiver RULE [at POINT]',
    ``before``/``after`` the reasons (None where there was no such waiver)."""
    def keyed(waivers: list[Any]) -> dict[str, str]:
        return {anchors.waiver(w.rule, w.point): w.reason for w in waivers}

    old, new = keyed(before), keyed(after)
    return [{"what": k, "before": old.get(k), "after": new.get(k)}
            for k in sorted(set(old) | set(new)) if old.get(k) != new.get(k)]


def summary(analysis: dict[str, Any] | None) -> dict[str, Any]:
    """The structural facts a reviewer cares about, flattened to comparable values in words
    (read from the one serialisation by :func:`plantlint.analysis.serialise.structural_facts`)."""
    return {what: _words(value) for what, value in structural_facts(analysis).items()}


def _section(analysis: dict[str, Any] | None, key: str) -> bool:
    """Whether a serialised analysis holds the section a structural fact comes from."""
    section = "points" if key.startswith("point ") else "relative_degree" if key.startswith("relative degree") else None
    return bool(analysis) and section is not None and isinstance(analysis.get(section), dict)


def structure_changes(before: dict[str, Any] | None, after: dict[str, Any] | None) -> list[dict[str, Any]]:
    old, new = summary(before), summary(after)
    changes = []
    for key in sorted(set(old) | set(new)):
        if old.get(key) != new.get(key) or (key in old) != (key in new):
            change = {"what": key, "before": old.get(key), "after": new.get(key)}
            # an output or point added or removed since the baseline: null alone would read as
            # "no relative degree" or "not an equilibrium". Only when both versions have the
            # section (an analysis cut short before its points has none: nothing is known)
            if (key in old) != (key in new) and _section(before, key) and _section(after, key):
                change["added" if key in new else "removed"] = True
            changes.append(change)
    return changes
