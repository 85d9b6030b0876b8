"""Sharded runs: ``check --shard K/N`` and ``plantlint merge``.

The end-to-end tests run the real CLI on a copy of example_repo (invented models):
sharded and merged must equal the unsharded run in every format, findings, counts
and exit code, with and without ``--since``. The assignment tests use invented paths
and sizes.
"""

from __future__ import annotations

import json
import os
import random
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest

from plantlint.core.findings import Adjustment, FileReport, Finding, Relaxation, Report, Severity, Span
from plantlint.report.formats.json_report import build_report, read_report
from plantlint.run.shard import SLACK, ShardError, assign, merge_reports, parse_shard
from conftest import REPO, Run, git, git_env

REPO_ROOT = REPO
EXAMPLE = REPO_ROOT / "example_repo"


def _paths(count: int, seed: int) -> list[tuple[str, int]]:
    rng = random.Random(seed)
    return [(f"models/area{rng.randrange(20)}/m{i:04d}.plant", rng.randrange(500, 20000)) for i in range(count)]


@pytest.mark.parametrize("text", ["", "3", "0/2", "3/2", "1/0", "a/b", "-1/2", "1/99999"])
def test_bad_shard_values(text: str) -> None:
    with pytest.raises(ShardError):
        parse_shard(text)


def test_assignment_is_a_balanced_partition() -> None:
    items = _paths(600, 1)
    for count in (1, 3, 8):
        owner = assign(items, count)
        assert set(owner) == {k for k, _ in items} and set(owner.values()) <= set(range(count))
        assert owner == assign(list(reversed(items)), count)  # input order does not matter
        loads = [0] * count
        for key, weight in items:
            loads[owner[key]] += weight
        average = sum(loads) / count
        assert max(loads) <= (1 + SLACK) * average + max(w for _, w in items)


def test_assignment_is_stable_under_additions_and_removals() -> None:
    items = _paths(600, 2)
    owner = assign(items, 6)
    moved_on_add = []
    for extra in _paths(10, 3):
        grown = assign(items + [(extra[0].replace("models/", "models/new/"), extra[1])], 6)
        moved_on_add.append(sum(owner[k] != grown[k] for k, _ in items))
    removed = [assign(items[:j] + items[j + 1:], 6) for j in range(0, 600, 60)]
    moved_on_remove = [sum(owner[k] != r[k] for k, _ in items if k in r) for r in removed]
    # consistent hashing with bounded loads: one more or one fewer model moves (almost) nothing else
    assert max(moved_on_add) <= 6 and max(moved_on_remove) <= 6, (moved_on_add, moved_on_remove)


def test_json_report_reads_back_exactly() -> None:
    findings = [
        Finding("non-smooth", Severity.ERROR, "abs is not smooth", Span(5, 10, 6, 10), hint="use sqrt", anchor="rate x"),
        Finding("zero-dynamics-critical", Severity.WARNING, "eigenvalue 0", None, point="rest", anchor="output y",
                waived=True, reason="reviewed"),
    ]
    for since in (None, "base"):
        marked = [f if since is None else f.__class__(**{**f.__dict__, "baseline": b})
                  for f, b in zip(findings, ("introduced", "known"))]
        files = [FileReport("a.plant", "a", marked, analysis={"relative_degree": {"y": 1}},
                            structure_changes=[{"what": "envelope", "before": "regular", "after": "singular"}]
                            if since else []),
                 FileReport("b.plant", None, [])]
        report = Report(files=files, tool_version="9.9", since=since)
        data = build_report(report)
        assert build_report(read_report(json.loads(json.dumps(data)))) == data


def test_merge_refuses_what_it_cannot_vouch_for(tmp_path: Path) -> None:
    report = Report(files=[FileReport("a.plant", "a", [])], tool_version="1")
    plain = build_report(report)
    with pytest.raises(ShardError, match="not a shard report"):
        merge_reports([("plain.json", plain)])
    one = dict(plain, shard={"index": 1, "count": 2, "models": 2, "positions": [0], "fail_on": "error"})
    with pytest.raises(ShardError, match="2/2 missing"):
        merge_reports([("one.json", one)])
    with pytest.raises(ShardError, match="given twice"):
        merge_reports([("one.json", one), ("again.json", json.loads(json.dumps(one)))])
    other = dict(plain, shard={"index": 2, "count": 2, "models": 3, "positions": [1], "fail_on": "error"})
    with pytest.raises(ShardError, match="not shards of one run"):
        merge_reports([("one.json", one), ("other.json", other)])
    with pytest.raises(ShardError, match="not a plantlint JSON report"):
        merge_reports([("x.json", {"runs": []})])


def test_merge_refuses_shards_that_ran_with_different_rule_settings(tmp_path: Path,
                                                                    capsys: pytest.CaptureFixture[str]) -> None:
    from plantlint.cli import main

    def shard(index: int, *adjustments: Adjustment, relaxation: Relaxation | None = None,
              configuration: str | None = None) -> dict[str, Any]:
        report = Report(files=[FileReport(f"m{index}.plant", f"m{index}", [])], tool_version="1",
                        adjustments=adjustments, relaxation=relaxation, configuration=configuration)
        report.shard = {"index": index, "count": 2, "models": 2, "positions": [index - 1], "fail_on": "error"}
        return build_report(report)

    skip = Adjustment("skip", ("unused-name",), "", "--skip on the command line")
    only = Adjustment("only", ("unused-name",), "", "--only on the command line")
    graded = Adjustment("severity", ("unused-name",), "tidy-up", "plantlint.toml", Severity.NOTE)
    merged = merge_reports([("1.json", shard(1, skip)), ("2.json", shard(2, skip))])  # the same: fine
    assert merged.adjustments == (skip,) and [f.path for f in merged.files] == ["m1.plant", "m2.plant"]
    for first, second in [((skip,), ()), ((), (only,)), ((skip,), (only,)), ((graded,), (graded, skip)),
                          ((graded,), (Adjustment("severity", ("unused-name",), "tidy-up", "plantlint.toml",
                                                  Severity.ERROR),))]:
        with pytest.raises(ShardError, match="different rule settings"):
            merge_reports([("1.json", shard(1, *first)), ("2.json", shard(2, *second))])
    with pytest.raises(ShardError, match="different configuration files"):
        merge_reports([("1.json", shard(1)), ("2.json", shard(2, configuration="plantlint.toml"))])
    kept = merge_reports([("1.json", shard(1, configuration="a/plantlint.toml")),
                          ("2.json", shard(2, configuration="a/plantlint.toml"))])
    assert kept.configuration == "a/plantlint.toml"
    with pytest.raises(ShardError, match="undecided"):
        merge_reports([("1.json", shard(1)), ("2.json", shard(2, relaxation=Relaxation("known", "plantlint.toml")))])
    # through the command line: the usage exit code and one line naming both settings
    (tmp_path / "1.json").write_text(json.dumps(shard(1, skip)), encoding="utf-8")
    (tmp_path / "2.json").write_text(json.dumps(shard(2)), encoding="utf-8")
    code = main(["merge", str(tmp_path / "1.json"), str(tmp_path / "2.json")])
    out, err = capsys.readouterr()
    assert code == 2 and out == "" and err.count("\n") == 1, err
    assert "1.json: rule unused-name skipped by --skip on the command line; " in err
    assert "2.json: no rule settings)" in err


# -- end to end on example_repo -------------------------------------------------------------

def _plantlint(cwd: Path, env: dict[str, str], *args: str) -> Run:
    out = subprocess.run([sys.executable, "-m", "plantlint", *args], cwd=cwd, env=env,
                         capture_output=True, text=True, timeout=600)
    return Run(out.returncode, out.stdout, out.stderr)


@pytest.fixture(scope="module")
def demo(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, dict[str, str]]:
    home = tmp_path_factory.mktemp("shard")
    repo = home / "repo"
    shutil.copytree(EXAMPLE, repo, ignore=shutil.ignore_patterns(".plantlint*"))
    env = git_env(home)
    env.pop("CI", None)
    git(repo, env, "init", "-q", "-b", "main")
    git(repo, env, "add", "-A")
    git(repo, env, "commit", "-q", "-m", "demo")
    git(repo, env, "tag", "base")
    return repo, env


def _sharded(repo: Path, env: dict[str, str], count: int, *extra: str) -> tuple[list[int], list[str]]:
    codes, names = [], []
    for k in range(1, count + 1):
        name = f"shard-{k}.json"
        run = _plantlint(repo, env, "check", *extra, "--shard", f"{k}/{count}", "--format", "json", "--output",
                         str(repo.parent / name))
        assert run.code in (0, 1), run.stderr
        codes.append(run.code)
        names.append(str(repo.parent / name))
    return codes, names


@pytest.mark.parametrize("extra", [(), ("--since", "base")], ids=["plain", "since"])
def test_sharded_and_merged_equals_unsharded(demo: tuple[Path, dict[str, str]], extra: tuple[str, ...]) -> None:
    repo, env = demo
    if extra:  # a change since the baseline: one model edited, one deleted
        target = repo / "models" / "handling" / "case_lift.plant"
        target.write_text(target.read_text(encoding="utf-8").replace("expect minimum_phase", ""), encoding="utf-8")
        (repo / "models" / "process" / "syrup_reactor.plant").unlink()
    try:
        codes, names = _sharded(repo, env, 3, *extra)
        for fmt in ("json", "sarif", "text", "markdown", "lines") if not extra else ("json", "text", "markdown"):
            whole = _plantlint(repo, env, "check", *extra, "--format", fmt)
            assert whole.code in (0, 1), whole.stderr
            merged = _plantlint(repo, env, "merge", *names, "--format", fmt)
            assert merged.code == whole.code, merged.stderr
            if fmt in ("json", "sarif"):
                assert json.loads(merged.stdout) == json.loads(whole.stdout)
            else:
                assert merged.stdout == whole.stdout
            if fmt == "json":
                data = json.loads(whole.stdout)
        shards = [json.loads(Path(n).read_text(encoding="utf-8")) for n in names]
        assert sum(len(s["files"]) for s in shards) == len(data["files"]) >= 7
        assert all(s["shard"]["models"] == len(data["files"]) for s in shards)
        assert sorted(p for s in shards for p in s["shard"]["positions"]) == list(range(len(data["files"])))
        assert any(f["structure_changes"] for f in data["files"]) if extra else "since" not in data
        # each shard's exit code speaks for its share only; the merged one is the run's
        assert max(codes) == whole.code
    finally:
        if extra:
            git(repo, env, "checkout", "-q", "--", ".")


def test_merge_of_an_incomplete_set_fails_cleanly(demo: tuple[Path, dict[str, str]]) -> None:
    repo, env = demo
    _, names = _sharded(repo, env, 2)
    run = _plantlint(repo, env, "merge", names[0])
    assert run.code == 2 and "shard 2/2 missing" in run.stderr and "Traceback" not in run.stderr
    assert os.path.exists(names[1])
