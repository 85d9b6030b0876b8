"""The ``--since REF`` regression gate across real git commits, through the real CLI.

One module-scoped repository holds a base commit (tagged ``base``) and a second
commit with one edit per scenario, each in its own model file:

    tail.plant      minimum phase -> non-minimum phase      introduced, fails
    shaker.plant    finding at base, lines moved only       known, passes
    fixme.plant     finding at base, fixed                  fixed, passes
    added.plant     new since base                          everything introduced
    renamed.plant   ``git mv`` of hopper.plant              followed: known
    drift.plant     minimum phase -> critical, waived       structure change reported
    steady.plant    untouched clean model                   nothing

All models are invented. The mathematics behind the edits (where the zero of
each linear plant sits) is checked against scipy.signal in
``test_edits_move_the_invariant_zero_as_claimed``.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from conftest import Run, base_and_change, conveyor_tail, git, git_env

from plantlint.report.formats.base import change_text
from plantlint.run.gate import structure_changes

# the conveyor tail (conftest): stable, unstable and critical zero dynamics by the rate of z
STABLE, UNSTABLE, CRITICAL = "-z + x", "z + x", "x"


model = conveyor_tail


WAIVE_CRITICAL = 'waive zero-dynamics-critical at rest "settled by the downstream buffer (invented)"\n'

BASE: dict[str, str] = {
    "tail.plant": model("tail", STABLE),
    "shaker.plant": model("shaker", UNSTABLE),
    "fixme.plant": model("fixme", UNSTABLE),
    "hopper.plant": model("hopper", UNSTABLE),
    "drift.plant": model("drift", STABLE, WAIVE_CRITICAL),
    "steady.plant": model("steady", STABLE),
}

CHANGED: dict[str, str] = {
    "tail.plant": model("tail", UNSTABLE),
    "shaker.plant": "# moved down by a header comment\n\n\n# and blank lines\n\n" + model("shaker", UNSTABLE),
    "fixme.plant": model("fixme", STABLE),
    "added.plant": model("added", UNSTABLE),
    "drift.plant": model("drift", CRITICAL, WAIVE_CRITICAL),
}

PASSING = ["shaker.plant", "fixme.plant", "renamed.plant", "drift.plant", "steady.plant"]


def plantlint(cwd: Path, env: dict[str, str], *args: str) -> Run:
    out = subprocess.run([sys.executable, "-m", "plantlint", *args], cwd=cwd, env=env,
                         capture_output=True, text=True, timeout=300)
    return Run(out.returncode, out.stdout, out.stderr)


@dataclass
class Scenario:
    repo: Path
    env: dict[str, str]
    cache: Path
    run: Run  # the whole gate over plants/, json, cache folder outside the repository
    status_before: str
    status_after: str

    def file(self, name: str) -> dict[str, Any]:
        (found,) = [f for f in self.run.json()["files"] if f["path"] == f"plants/{name}"]
        return found


@pytest.fixture(scope="module")
def scenario(tmp_path_factory: pytest.TempPathFactory) -> Scenario:
    home = tmp_path_factory.mktemp("gate")
    repo, env = base_and_change(home, BASE, CHANGED, moves=[("hopper.plant", "renamed.plant")])
    before = git(repo, env, "status", "--porcelain", "--ignored")
    run = plantlint(repo, env, "check", "--since", "base", "--format", "json", "--cache-dir", str(home / "cache"),
                    "plants")
    after = git(repo, env, "status", "--porcelain", "--ignored")
    return Scenario(repo, env, home / "cache", run, before, after)


def rules_by_state(file: dict[str, Any]) -> list[tuple[str, str]]:
    return sorted((f["rule"], f["baseline"]) for f in file["findings"])


# -- the mathematics the scenarios rely on -----------------------------------------------

@pytest.mark.parametrize(("a", "zero"), [(-1.0, -1.0), (1.0, 1.0), (0.0, 0.0)])
def test_edits_move_the_invariant_zero_as_claimed(a: float, zero: float) -> None:
    """The state z is unobservable from y = x, so it is an invariant zero of (A, B, C) at
    s = a: the finite generalised eigenvalue of the Rosenbrock system matrix
    [[A, B], [C, D]] against [[I, 0], [0, 0]] (common practice; computed with scipy.linalg)."""
    from scipy.linalg import eigvals

    A = np.array([[a, 1.0], [0.0, 0.0]])
    B = np.array([[0.0], [1.0]])
    C = np.array([[0.0, 1.0]])
    rosenbrock = np.block([[A, B], [C, np.zeros((1, 1))]])
    descriptor = np.block([[np.eye(2), np.zeros((2, 1))], [np.zeros((1, 3))]])
    values = eigvals(rosenbrock, descriptor)
    finite = values[np.isfinite(values)]
    assert finite.shape == (1,) and finite[0].real == pytest.approx(zero, abs=1e-9)


# -- the gate ----------------------------------------------------------------------------

def test_whole_gate_fails_on_the_introduced_findings_only(scenario: Scenario) -> None:
    run = scenario.run
    assert run.code == 1, run.stderr
    assert "Traceback" not in run.stderr
    data = run.json()
    assert data["since"] == "base"
    introduced = sorted((file["path"], f["rule"]) for file in data["files"] for f in file["findings"]
                        if f["baseline"] == "introduced" and not f["waived"])
    assert introduced == [("plants/added.plant", "zero-dynamics-unstable"),
                          ("plants/tail.plant", "zero-dynamics-unstable")]
    summary = data["summary"]
    # fixed: fixme's finding, and drift's waiver that silenced nothing at base (unused-waiver)
    assert (summary["introduced"], summary["known"], summary["fixed"]) == (3, 2, 2)


def test_edit_to_non_minimum_phase_gives_exactly_the_introduced_finding(scenario: Scenario) -> None:
    tail = scenario.file("tail.plant")
    (finding,) = tail["findings"]
    assert (finding["rule"], finding["baseline"], finding["point"]) == ("zero-dynamics-unstable", "introduced", "rest")
    assert finding["severity"] == "error" and not finding["waived"]
    change = {c["what"]: (c["before"], c["after"]) for c in tail["structure_changes"]}
    assert change == {"point rest: zero dynamics": ("minimum phase", "non-minimum phase")}
    alone = plantlint(scenario.repo, scenario.env, "check", "--since", "base", "--format", "json",
                      "--cache-dir", str(scenario.cache), "plants/tail.plant")
    assert alone.code == 1 and "Traceback" not in alone.stderr
    assert [f["path"] for f in alone.json()["files"]] == ["plants/tail.plant"]


def test_gate_from_a_subfolder_of_the_repository(scenario: Scenario) -> None:
    run = plantlint(scenario.repo / "plants", scenario.env, "check", "--since", "base", "--format", "json",
                    "--cache-dir", str(scenario.cache), "tail.plant", "shaker.plant")
    assert run.code == 1, run.stderr
    assert [(f["path"], rules_by_state(f)) for f in run.json()["files"]] == [
        ("tail.plant", [("zero-dynamics-unstable", "introduced")]),
        ("shaker.plant", [("zero-dynamics-unstable", "known")]),
    ]


def test_moving_lines_keeps_the_old_finding_known(scenario: Scenario) -> None:
    shaker = scenario.file("shaker.plant")
    (finding,) = shaker["findings"]
    assert (finding["rule"], finding["baseline"]) == ("zero-dynamics-unstable", "known")
    # the finding really moved: its line now is 5 below where the base version has it
    base_line = BASE["shaker.plant"].splitlines().index("point rest: z = 0, x = 0") + 1
    assert finding["line"] == base_line + 5
    assert shaker["structure_changes"] == []


def test_fix_is_reported_as_fixed(scenario: Scenario) -> None:
    fixme = scenario.file("fixme.plant")
    assert rules_by_state(fixme) == [("zero-dynamics-unstable", "fixed")]
    change = {c["what"]: (c["before"], c["after"]) for c in fixme["structure_changes"]}
    assert change == {"point rest: zero dynamics": ("non-minimum phase", "minimum phase")}


def test_model_added_since_ref_has_everything_introduced(scenario: Scenario) -> None:
    added = scenario.file("added.plant")
    assert added["findings"] and all(f["baseline"] == "introduced" for f in added["findings"])
    assert rules_by_state(added) == [("zero-dynamics-unstable", "introduced")]
    alone = plantlint(scenario.repo, scenario.env, "check", "--since", "base", "--format", "json",
                      "--cache-dir", str(scenario.cache), "plants/added.plant")
    assert alone.code == 1


def test_renamed_model_is_followed(scenario: Scenario) -> None:
    renamed = scenario.file("renamed.plant")
    assert rules_by_state(renamed) == [("zero-dynamics-unstable", "known")]
    assert renamed["structure_changes"] == []


def test_rename_in_the_work_tree_is_followed(tmp_path: Path) -> None:
    """Renamed but not committed: ``git add -A`` lets git see the rename."""
    repo = tmp_path / "repo"
    repo.mkdir()
    env = git_env(tmp_path)
    git(repo, env, "init", "-q")
    (repo / "old.plant").write_text(model("hopper", UNSTABLE), encoding="utf-8")
    (repo / "README.md").write_text("Demo repository (invented).\n", encoding="utf-8")
    git(repo, env, "add", "old.plant", "README.md")
    git(repo, env, "commit", "-q", "-m", "one model")
    (repo / "old.plant").rename(repo / "new.plant")
    git(repo, env, "add", "-A")
    before = git(repo, env, "status", "--porcelain", "--ignored")
    # a new file time without new content: porcelain `git diff` would refresh and rewrite the index
    stamp = (repo / "README.md").stat().st_mtime_ns + 5_000_000_000
    os.utime(repo / "README.md", ns=(stamp, stamp))
    index = repo / ".git" / "index"
    index_before = (index.read_bytes(), index.stat().st_mtime_ns)
    run = plantlint(repo, env, "check", "--since", "HEAD", "--format", "json", "--no-cache", "new.plant")
    assert run.code == 0, run.stdout + run.stderr
    assert (index.read_bytes(), index.stat().st_mtime_ns) == index_before
    assert git(repo, env, "status", "--porcelain", "--ignored") == before == "R  old.plant -> new.plant\n"
    (file,) = run.json()["files"]
    assert rules_by_state(file) == [("zero-dynamics-unstable", "known")]


def test_path_that_was_a_folder_at_ref_counts_as_added(tmp_path: Path) -> None:
    """At REF ``cell.plant`` was a folder; its tree listing must not be read as a model
    (``git show`` would print one, coloured under ``color.ui = always``)."""
    repo = tmp_path / "repo"
    (repo / "cell.plant").mkdir(parents=True)
    env = git_env(tmp_path)
    (tmp_path / "gitconfig").write_text("[color]\n\tui = always\n", encoding="utf-8")
    git(repo, env, "init", "-q")
    (repo / "cell.plant" / "inner.plant").write_text(model("inner", STABLE), encoding="utf-8")
    git(repo, env, "add", "-A")
    git(repo, env, "commit", "-q", "-m", "a folder")
    git(repo, env, "rm", "-q", "-r", "cell.plant")
    (repo / "cell.plant").write_text(model("cell", UNSTABLE), encoding="utf-8")
    run = plantlint(repo, env, "check", "--since", "HEAD", "--format", "json", "--no-cache", "cell.plant")
    assert run.code == 1, run.stderr
    (file,) = run.json()["files"]
    assert rules_by_state(file) == [("zero-dynamics-unstable", "introduced")]
    assert file["structure_changes"] == []


def test_change_to_critical_is_reported_even_when_waived(scenario: Scenario) -> None:
    drift = scenario.file("drift.plant")
    # the waiver silenced nothing at base (unused-waiver), and now silences the new finding
    assert {f["rule"]: (f["baseline"], f["waived"]) for f in drift["findings"]} == {
        "zero-dynamics-critical": ("introduced", True), "unused-waiver": ("fixed", False)}
    change = {c["what"]: (c["before"], c["after"]) for c in drift["structure_changes"]}
    assert change["point rest: zero dynamics"] == ("minimum phase", "critical")


def test_unchanged_model_has_nothing(scenario: Scenario) -> None:
    steady = scenario.file("steady.plant")
    assert steady["findings"] == [] and steady["structure_changes"] == []


def test_only_the_passing_models_pass(scenario: Scenario) -> None:
    run = plantlint(scenario.repo, scenario.env, "check", "--since", "base", "--format", "json",
                    "--cache-dir", str(scenario.cache), *[f"plants/{n}" for n in PASSING])
    assert run.code == 0, run.stdout + run.stderr
    assert [f["path"] for f in run.json()["files"]] == [f"plants/{n}" for n in PASSING]


def test_every_format_says_which_is_which(scenario: Scenario) -> None:
    paths = ["plants/tail.plant", "plants/shaker.plant", "plants/fixme.plant"]
    text = plantlint(scenario.repo, scenario.env, "check", "--since", "base", "--cache-dir", str(scenario.cache), *paths)
    assert text.code == 1
    assert "(introduced)" in text.stdout and "(known)" in text.stdout and "fixed" in text.stdout
    assert "new since" not in text.stdout  # one term in every format: introduced
    lines = plantlint(scenario.repo, scenario.env, "check", "--since", "base", "--format", "lines",
                      "--cache-dir", str(scenario.cache), *paths)
    lines = lines.stdout.splitlines()
    assert any(line.startswith("plants/tail.plant:") and "(introduced)" in line for line in lines)
    assert any(line.startswith("plants/shaker.plant:") and "(known)" in line for line in lines)
    sarif = plantlint(scenario.repo, scenario.env, "check", "--since", "base", "--format", "sarif",
                      "--cache-dir", str(scenario.cache), *paths)
    states = sorted(r["baselineState"] for r in json.loads(sarif.stdout)["runs"][0]["results"])
    # SARIF 2.1.0 section 3.27.24: new / unchanged / absent
    assert states == ["absent", "new", "unchanged"]


def test_gate_leaves_the_work_tree_untouched(scenario: Scenario) -> None:
    assert scenario.status_before == scenario.status_after == ""
    assert not (scenario.repo / ".plantlint").exists()


# -- usage errors --------------------------------------------------------------------------

def test_unknown_revision_is_a_usage_error(scenario: Scenario) -> None:
    for ref in ("no-such-ref", "-x"):
        run = plantlint(scenario.repo, scenario.env, "check", f"--since={ref}", "--no-cache", "plants")
        assert run.code == 2, (ref, run.stderr)
        assert len(run.stderr.strip().splitlines()) == 1 and "Traceback" not in run.stderr
        assert ref in run.stderr and run.stdout == ""


def test_outside_a_git_repository_is_a_usage_error(tmp_path: Path) -> None:
    folder = tmp_path / "loose"
    folder.mkdir()
    (folder / "tail.plant").write_text(model("tail", STABLE), encoding="utf-8")
    run = plantlint(folder, git_env(tmp_path), "check", "--since", "HEAD", "--no-cache", "tail.plant")
    assert run.code == 2
    assert len(run.stderr.strip().splitlines()) == 1 and "Traceback" not in run.stderr
    assert "git" in run.stderr


def test_model_deleted_since_ref_reports_its_findings_as_fixed(tmp_path: Path) -> None:
    """A model removed since REF (not renamed) is listed: its findings are fixed and the
    structure change says it was deleted; the run passes."""
    repo = tmp_path / "repo"
    (repo / "models").mkdir(parents=True)
    env = git_env(tmp_path)
    git(repo, env, "init", "-q")
    (repo / "models" / "keep.plant").write_text(model("keep", STABLE), encoding="utf-8")
    (repo / "models" / "gone.plant").write_text(model("gone", UNSTABLE), encoding="utf-8")
    git(repo, env, "add", "-A")
    git(repo, env, "commit", "-q", "-m", "two models")
    git(repo, env, "rm", "-q", "models/gone.plant")
    run = plantlint(repo, env, "check", "--since", "HEAD", "--format", "json", "--no-cache", "models")
    assert run.code == 0, run.stderr
    files = {f["path"]: f for f in run.json()["files"]}
    gone = files["models/gone.plant"]
    assert rules_by_state(gone) == [("zero-dynamics-unstable", "fixed")]
    assert gone["structure_changes"] == [{"what": "model", "before": "present", "after": "deleted"}]
    assert run.json()["summary"]["fixed"] == 1
    lines = plantlint(repo, env, "check", "--since", "HEAD", "--format", "lines", "--no-cache", "models")
    assert "models/gone.plant: note: structure changed since HEAD: model: present -> deleted" in lines.stdout
    text = plantlint(repo, env, "check", "--since", "HEAD", "--no-cache", "models")
    assert "checked 1 file (1 deleted since HEAD, not counted): " in text.stdout


def test_a_waiver_added_since_ref_is_shown_with_its_reason(tmp_path: Path) -> None:
    repo = tmp_path / "repo"
    repo.mkdir()
    env = git_env(tmp_path)
    git(repo, env, "init", "-q")
    (repo / "tail.plant").write_text(model("tail", UNSTABLE), encoding="utf-8")
    git(repo, env, "add", "-A")
    git(repo, env, "commit", "-q", "-m", "base")
    reason = "the tail is driven through an outer loop on z (invented)"
    (repo / "tail.plant").write_text(model("tail", UNSTABLE, f'waive zero-dynamics-unstable at rest "{reason}"\n'),
                                     encoding="utf-8")
    text = plantlint(repo, env, "check", "--since", "HEAD", "--no-cache", "tail.plant")
    assert text.code == 0, text.stdout + text.stderr  # the known finding is now waived
    assert f'waiver added: zero-dynamics-unstable at rest: "{reason}"' in " ".join(text.stdout.split())
    lines = plantlint(repo, env, "check", "--since", "HEAD", "--format", "lines", "--no-cache", "tail.plant")
    assert (f'tail.plant: note: changed since HEAD: waiver added: zero-dynamics-unstable at rest: "{reason}"'
            in lines.stdout.splitlines())


def test_a_waiver_removed_since_ref_makes_its_finding_introduced(tmp_path: Path) -> None:
    """A defect accepted at REF (waived) and no longer accepted counts against the run
    again: the change that removed the waiver is what a reviewer must look at."""
    repo = tmp_path / "repo"
    repo.mkdir()
    env = git_env(tmp_path)
    git(repo, env, "init", "-q")
    waiver = 'waive zero-dynamics-unstable at rest "driven through an outer loop (invented)"\n'
    (repo / "tail.plant").write_text(model("tail", UNSTABLE, waiver), encoding="utf-8")
    git(repo, env, "add", "-A")
    git(repo, env, "commit", "-q", "-m", "base")
    (repo / "tail.plant").write_text(model("tail", UNSTABLE), encoding="utf-8")
    run = plantlint(repo, env, "check", "--since", "HEAD", "--format", "json", "--no-cache", "tail.plant")
    assert run.code == 1, run.stdout
    assert rules_by_state(run.json()["files"][0]) == [("zero-dynamics-unstable", "introduced")]


def test_a_model_whose_known_errors_stop_its_analysis_is_not_checked(tmp_path: Path) -> None:
    """A syntax error already there at REF is known, but it keeps the analysis from
    running: whatever else the change did (here it makes the zero dynamics unstable) was
    not checked, so the gate cannot pass the model."""
    broken = "rate = = (\n"
    repo, env = base_and_change(tmp_path, {"tail.plant": model("tail", STABLE) + broken},
                                {"tail.plant": model("tail", UNSTABLE) + broken})
    run = plantlint(repo, env, "check", "--since", "base", "--format", "json", "--no-cache", "plants")
    assert run.code == 1, run.stdout
    (file,) = run.json()["files"]
    assert rules_by_state(file) == [("syntax", "known")]
    assert file["stop"]["kind"] == "blocked" and file["outcome"] == "not-decided"
    assert "known at base: what changed since was not checked" in file["stop"]["detail"]
    lines = plantlint(repo, env, "check", "--since", "base", "--format", "lines", "--no-cache", "plants")
    assert "plants/tail.plant: error: could not be checked: the analysis did not run" in lines.stdout


def test_structure_changes_are_worded_for_readers_not_in_internal_names() -> None:
    before = {"relative_degree": {"y": 2}, "envelope": {"regular": True},
              "points": {"rest": {"equilibrium": True, "well_defined": True,
                                  "zero_dynamics": {"verdict": "non_minimum_phase"}, "state_linearizable": False}}}
    after = {"relative_degree": {"y": 2}, "envelope": {"regular": True},
             "points": {"rest": {"equilibrium": True, "well_defined": False,
                                 "zero_dynamics": {"verdict": "minimum_phase"}, "state_linearizable": True}}}
    shown = [change_text(c) for c in structure_changes(before, after)]
    assert shown == ["point rest: state linearizable: no -> yes", "point rest: well defined: yes -> no",
                     "point rest: zero dynamics: non-minimum phase -> minimum phase"]
    assert not any("_" in line for line in shown)
    # zero dynamics not computed at REF (not an equilibrium there), none now (relative degree n)
    before["points"]["rest"]["zero_dynamics"] = None
    after["points"]["rest"]["zero_dynamics"] = {"verdict": "not_applicable"}
    shown = [change_text(c) for c in structure_changes(before, after)]
    assert "point rest: zero dynamics: not computed -> none (total relative degree n)" in shown


def test_an_output_or_point_added_or_removed_is_said_so_not_shown_as_none() -> None:
    """A second output (a new sensor) and a renamed point: 'relative degree of z: none -> 2'
    read as if z had lost its relative degree. An analysis cut short before its points says
    nothing about them: no added/removed there."""
    before = {"relative_degree": {"y": 1}, "envelope": {"regular": True},
              "points": {"rest": {"equilibrium": True, "well_defined": True, "zero_dynamics": None}}}
    after = {"relative_degree": {"y": 1, "z": 2}, "envelope": {"regular": True},
             "points": {"idle": {"equilibrium": True, "well_defined": True, "zero_dynamics": None}}}
    shown = [change_text(c) for c in structure_changes(before, after)]
    assert "relative degree of z: 2 (added since the baseline)" in shown
    assert "point idle: equilibrium: yes (added since the baseline)" in shown
    assert "point rest: equilibrium: was yes (removed since the baseline)" in shown
    assert not any("none" in line for line in shown), shown
    cut_short = {"relative_degree": {"y": 1}}
    assert all("added" not in c and "removed" not in c for c in structure_changes(cut_short, after)
               if c["what"].startswith("point "))


def test_file_names_that_are_not_utf8_are_followed_through_renames_and_deletions(tmp_path: Path) -> None:
    """git prints such names as raw bytes: read as the file system reads them (not with
    replacement characters), a rename is followed (its findings stay known) and a deletion
    is listed."""
    repo = tmp_path / "repo"
    repo.mkdir()
    env = git_env(tmp_path)
    git(repo, env, "init", "-q")
    renamed, deleted = os.fsdecode(b"ren\xfa.plant"), os.fsdecode(b"gon\xe9.plant")
    (repo / renamed).write_text(model("ren", UNSTABLE), encoding="utf-8")
    (repo / deleted).write_text(model("gone", UNSTABLE), encoding="utf-8")
    git(repo, env, "add", "-A")
    git(repo, env, "commit", "-q", "-m", "base")
    git(repo, env, "mv", renamed, "plain.plant")
    git(repo, env, "rm", "-q", deleted)
    run = plantlint(repo, env, "check", "--since", "HEAD", "--format", "json", "--no-cache", ".")
    assert run.code == 0, run.stdout + run.stderr
    files = {f["path"]: f for f in run.json()["files"]}
    assert rules_by_state(files["plain.plant"]) == [("zero-dynamics-unstable", "known")]
    (gone,) = [f for p, f in files.items() if p.startswith("gon")]
    assert gone["structure_changes"] == [{"what": "model", "before": "present", "after": "deleted"}]


def test_a_new_syntax_error_worded_like_the_old_one_is_introduced(tmp_path: Path) -> None:
    """A syntax error's fingerprint holds the statement it is in: fixing one `x +* u` and
    writing another elsewhere is a new error (it fails the run even where not-decided
    results are let pass), while moving the old one down keeps it known."""
    relax = '[undecided]\nfail = false\nreason = "a test of the gate (invented)"\n'
    head = "plant typo\nstate x in -1 .. 1\nstate z in -1 .. 1\ninput u\n"
    base = head + "rate x = x +* u\nrate z = -z + u\noutput y = x\n"
    moved = "# a comment\n" + base
    other = head + "rate x = -x + u\nrate z = z +* u\noutput y = x\n"
    for changed, state, code in ((moved, "known", 0), (other, "introduced", 1)):
        home = tmp_path / state
        home.mkdir()
        repo, env = base_and_change(home, {"typo.plant": base}, {"typo.plant": changed})
        (repo / "plantlint.toml").write_text(relax, encoding="utf-8")
        run = plantlint(repo, env, "check", "--since", "base", "--format", "json", "--no-cache", "plants")
        assert run.code == code, run.stdout
        (file,) = run.json()["files"]
        assert [(f["rule"], f["baseline"]) for f in file["findings"] if f["baseline"] != "fixed"] == [("syntax", state)]


def test_what_a_stopped_model_did_not_check_is_not_called_fixed(tmp_path: Path) -> None:
    """A model that its own errors stop is checked only as far as it got: a typo in a
    name stops it at its names, a kink at its values. A finding of the baseline from a
    later step was not looked at, so it is left out, never reported as fixed; what the
    step reached did check is (the unused constant, removed, is fixed)."""
    spare = "const spare = 1\n"
    base = {"typo.plant": model("typo", UNSTABLE, spare), "kink.plant": model("kink", UNSTABLE, spare),
            "mended.plant": model("mended", UNSTABLE, spare)}
    changed = {"typo.plant": model("typo", "z + xx", spare), "kink.plant": model("kink", "z + abs(x)"),
               "mended.plant": model("mended", STABLE)}
    repo, env = base_and_change(tmp_path, base, changed)
    run = plantlint(repo, env, "check", "--since", "base", "--format", "json", "--no-cache", "plants")
    files = {f["path"].removeprefix("plants/"): rules_by_state(f) for f in run.json()["files"]}
    assert files["typo.plant"] == [("unknown-name", "introduced")]
    assert files["kink.plant"] == [("non-smooth", "introduced"), ("unused-name", "fixed")]
    assert files["mended.plant"] == [("unused-name", "fixed"), ("zero-dynamics-unstable", "fixed")]
    assert run.code == 1
