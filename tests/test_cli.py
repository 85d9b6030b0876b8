"""The ``plantlint`` command line: exit codes, configuration, selection, output, bad inputs,
and the installed package.

Most runs call ``plantlint.cli.main`` in this process (real workers are still forked;
``capfd`` sees what they write to the file descriptors); runs that depend on the
interpreter or the terminal (``--version``, colour on a pseudo-terminal, the
installed console script, tracebacks) are real subprocesses. Models are copied
fixtures or small invented plants.
"""

from __future__ import annotations

import importlib.util
import json
import os
import re
import shutil
import subprocess
import sys
import sysconfig
import zipfile
from collections.abc import Callable
from typing import Any
from pathlib import Path

import pytest

from conftest import REPO, Run, run_on_terminal

from plantlint import __version__
from plantlint.core.catalogue import load_catalogue
from plantlint.cli import main

PROJECT = REPO
FIXTURES = PROJECT / "tests" / "fixtures" / "rules"
UNSTABLE = FIXTURES / "zero-dynamics-unstable.plant"  # one error
CRITICAL = FIXTURES / "zero-dynamics-critical.plant"  # one warning
CLEAN = FIXTURES / "zero-dynamics-unstable.ok.plant"  # nothing
ANSI = re.compile(r"\x1b\[")


CLI = Callable[..., Run]  # cli(cwd, *args, cached=True) -> Run


@pytest.fixture(scope="module")
def cache(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """One cache for the whole module: results depend only on model bytes and settings."""
    return tmp_path_factory.mktemp("cli-cache")


@pytest.fixture
def cli(monkeypatch: pytest.MonkeyPatch, capfd: pytest.CaptureFixture[str], cache: Path) -> CLI:
    """``cli(cwd, *args)`` runs main() in ``cwd`` and returns its exit code and output."""

    def run(cwd: Path, *args: str, cached: bool = True) -> Run:
        monkeypatch.chdir(cwd)
        argv = list(args)
        if cached and argv and argv[0] == "check" and "--no-cache" not in argv:
            argv[1:1] = ["--cache-dir", str(cache)]
        capfd.readouterr()
        try:
            code = main(argv)
        except SystemExit as stop:  # argparse's own exits (--help, usage errors)
            code = stop.code if isinstance(stop.code, int) else 2
        out, err = capfd.readouterr()
        return Run(code, out, err)

    return run


def one_line_error(run: Run) -> bool:
    lines = run.stderr.strip().splitlines()
    return len(lines) == 1 and "Traceback" not in run.stderr and lines[0].startswith("plantlint")


def copy(src: Path, dst: Path) -> Path:
    dst.parent.mkdir(parents=True, exist_ok=True)
    shutil.copyfile(src, dst)
    return dst


def rules_of(run: Run) -> list[tuple[str, str]]:
    return [(f["rule"], f["severity"]) for file in run.json()["files"] for f in file["findings"]]


# -- exit codes ---------------------------------------------------------------------------

def test_exit_codes_for_clean_and_failing_models(tmp_path: Path, cli: CLI) -> None:
    copy(CLEAN, tmp_path / "clean.plant")
    copy(UNSTABLE, tmp_path / "unstable.plant")
    clean = cli(tmp_path, "check", "clean.plant")
    assert clean.code == 0 and clean.stderr == ""
    failing = cli(tmp_path, "check", "clean.plant", "unstable.plant")
    assert failing.code == 1 and "zero-dynamics-unstable" in failing.stdout


@pytest.mark.parametrize("args", [
    ["check", "--bogus", "x.plant"],
    ["check", "--format", "concise", "x.plant"],  # the one-line format is `lines`; no alias
    ["check", "--only", "zero-dynamics-unstable,no-such-rule", "x.plant"],
    ["check", "--skip", "no-such-rule", "x.plant"],
    ["check", "--fail-on", "fatal", "x.plant"],
    ["check", "--timeout", "0", "x.plant"],
    ["check", "--jobs", "-1", "x.plant"],
    ["check", "missing.plant"],
    ["check", "empty-folder"],
    ["check", "folder.plant"],
    ["check", "--config", "no-such.toml", "x.plant"],
    ["check", "--since", "", "x.plant"],  # an empty value is no value, not "option not given"
    ["check", "--since", " ", "x.plant"],
    ["check", "--cache-dir", "", "x.plant"],
    ["check", "--config", "", "x.plant"],
    ["check", "--output", "", "x.plant"],
    ["check", "--shard", "", "x.plant"],
    ["check", "--only", "", "x.plant"],  # `--only "$RULES"` with nothing in it must not run every rule
    ["check", "--skip", "", "x.plant"],
    ["merge", "--output", "", "shard.json"],
    ["rules", "no-such-rule"],
    ["no-such-command"],
], ids=lambda a: " ".join(a))
def test_usage_errors_exit_2_with_one_line(tmp_path: Path, cli: CLI, args: list[str]) -> None:
    copy(CLEAN, tmp_path / "x.plant")
    (tmp_path / "empty-folder").mkdir()
    (tmp_path / "folder.plant").mkdir()  # a folder named like a model, with nothing in it
    run = cli(tmp_path, *args)
    assert run.code == 2
    assert one_line_error(run), run.stderr
    assert run.stdout == ""


def test_no_command_shows_help_and_exits_2(tmp_path: Path, cli: CLI) -> None:
    run = cli(tmp_path)
    assert run.code == 2 and "check" in run.stdout and "rules" in run.stdout


# -- configuration ------------------------------------------------------------------------

@pytest.mark.parametrize(("toml", "mentions"), [
    ('colour = "red"\n', "colour"),
    ('fail-on = "fatal"\n', "fail-on"),
    ("timeout = -1\n", "timeout"),
    ("jobs = 1.5\n", "jobs"),
    ('include = [""]\n', "include"),
    ('[severity.no-such-rule]\nlevel = "error"\nreason = "r"\n', "no-such-rule"),
    ('[severity.zero-dynamics-critical]\nlevel = "fatal"\nreason = "r"\n', "zero-dynamics-critical"),
    ("cache = 1\n", "cache"),
    ("fail-on = \n", "TOML"),
    # every skip, selection and severity override needs a reason; the older forms say how to migrate
    ('skip = ["unused-name"]\n', '[skip] and one line per rule (unused-name = "why it is left out")'),
    ('[skip]\nunused-name = ""\n', "skip.unused-name needs a reason"),
    ('[skip]\nunused-name = true\n', "skip.unused-name needs a reason"),
    ('only = ["unused-name"]\n', "'only' is a table now, with a reason"),
    ('[only]\nrules = ["unused-name"]\n', "only needs a reason"),
    ('[severity]\nunused-name = "note"\n',
     'by a table [severity.unused-name] with level = "note" and reason = "why"'),
    ('[severity.unused-name]\nlevel = "note"\n', '[severity.unused-name] needs reason = "why" as well'),
    ('[severity.unused-name]\nreason = "r"\n', '[severity.unused-name] needs level = "error|warning|note" as well'),
    # a top-level setting below a [table] header belongs to that table in TOML (TOML 1.0, "Table")
    ('[severity.unused-name]\nlevel = "note"\nreason = "r"\ntimeout = 30\n',
     "'timeout' is written inside the table [severity.unused-name]"),
    ('[skip]\nunused-name = "r"\nfail-on = "warning"\n', "'fail-on' is written inside the table [skip]"),
], ids=["unknown key", "fail-on", "timeout", "jobs", "include", "severity rule", "severity value", "cache",
        "not toml", "skip list", "skip empty reason", "skip not text", "only list", "only without reason",
        "severity without table", "severity without reason", "severity without level", "setting swallowed by severity",
        "setting swallowed by skip"])
def test_bad_configuration_exits_2(tmp_path: Path, cli: CLI, toml: str, mentions: str) -> None:
    (tmp_path / "plantlint.toml").write_text(toml, encoding="utf-8")
    copy(CLEAN, tmp_path / "x.plant")
    run = cli(tmp_path, "check", "x.plant")
    assert run.code == 2 and one_line_error(run), run.stderr
    assert mentions in run.stderr and "plantlint.toml" in run.stderr


@pytest.fixture
def project(tmp_path: Path) -> Path:
    """A repository-like folder with a configuration at its top."""
    root = tmp_path / "project"
    (root / "plantlint.toml").parent.mkdir(parents=True)
    (root / "plantlint.toml").write_text(
        'include = ["models/**/*.plant"]\n'
        'exclude = ["models/archive/**"]\n'
        "[severity.zero-dynamics-critical]\n"
        'level = "error"\n'
        'reason = "the drift controller needs strictly stable zero dynamics"\n', encoding="utf-8")
    copy(UNSTABLE, root / "models" / "tail.plant")
    copy(CRITICAL, root / "models" / "line" / "drift.plant")
    copy(UNSTABLE, root / "models" / "archive" / "old_tail.plant")
    (root / "scratch").mkdir()
    (root / "scratch" / "notes.plant").write_text("not a model at all\n", encoding="utf-8")
    (root / "models" / "line" / "deeper").mkdir()
    return root


def test_include_and_exclude_choose_the_models(project: Path, cli: CLI) -> None:
    run = cli(project, "check", "--format", "json")
    assert [f["path"] for f in run.json()["files"]] == ["models/line/drift.plant", "models/tail.plant"]
    # a folder on the command line is filtered the same way
    run = cli(project, "check", "--format", "json", "models")
    assert [f["path"] for f in run.json()["files"]] == ["models/line/drift.plant", "models/tail.plant"]
    excluded = cli(project, "check", "models/archive")
    assert excluded.code == 2 and "left out by include/exclude" in excluded.stderr


def test_an_explicitly_named_excluded_file_is_named_with_its_setting(project: Path, cli: CLI) -> None:
    run = cli(project, "check", "models/archive/old_tail.plant")
    assert run.code == 0  # nothing checked, nothing failed; a hook passing staged files must not break
    assert run.stderr.splitlines() == [
        'plantlint: note: models/archive/old_tail.plant is not checked: it is excluded by exclude pattern '
        '"models/archive/**" in plantlint.toml']
    both = cli(project, "check", "--format", "json", "models/archive/old_tail.plant", "models/tail.plant")
    assert [f["path"] for f in both.json()["files"]] == ["models/tail.plant"]
    assert "old_tail.plant is not checked" in both.stderr


def test_severity_override_from_plantlint_toml(project: Path, tmp_path: Path, cli: CLI) -> None:
    plain = tmp_path / "plain.toml"
    plain.write_text("", encoding="utf-8")
    default = cli(project, "check", "--format", "json", "--config", str(plain), "models/line/drift.plant")
    assert default.code == 0 and rules_of(default) == [("zero-dynamics-critical", "warning")]
    raised = cli(project, "check", "--format", "json", "models/line/drift.plant")
    assert raised.code == 1 and rules_of(raised) == [("zero-dynamics-critical", "error")]


def test_every_suppression_is_shown_with_its_reason(project: Path, cli: CLI) -> None:
    (project / "plantlint.toml").write_text(
        'include = ["models/**/*.plant"]\n'
        "[skip]\n"
        'zero-dynamics-unstable = "the tail loop is closed on another output"\n'
        "[severity.zero-dynamics-critical]\n"
        'level = "error"\n'
        'reason = "the drift controller needs strictly stable zero dynamics"\n', encoding="utf-8")
    text = cli(project, "check", "models/tail.plant")
    assert text.code == 0 and "zero-dynamics-unstable" in text.stdout  # silenced, but not without a trace
    assert ("rule zero-dynamics-unstable skipped by plantlint.toml: the tail loop is closed on another output"
            in " ".join(text.stdout.split()))
    lines = cli(project, "check", "--format", "lines", "models/tail.plant")
    assert ("plantlint.toml: note: rule zero-dynamics-critical reported as error: the drift controller needs "
            "strictly stable zero dynamics") in lines.stdout.splitlines()
    data = cli(project, "check", "--format", "json", "--skip", "unused-name", "models/tail.plant").json()
    # --skip on the command line replaces the configured skips, and says so
    assert [(a["kind"], a["rules"], a["source"]) for a in data["adjustments"]] == [
        ("skip", ["unused-name"], "--skip on the command line"),
        ("severity", ["zero-dynamics-critical"], "plantlint.toml")]
    sarif = json.loads(cli(project, "check", "--format", "sarif", "models/tail.plant").stdout)
    overrides = sarif["runs"][0]["invocations"][0]["ruleConfigurationOverrides"]
    assert {o["descriptor"]["id"]: o["configuration"].get("enabled", True) for o in overrides} == {
        "zero-dynamics-unstable": False, "zero-dynamics-critical": True}


def test_configuration_is_found_from_a_subfolder(project: Path, cli: CLI) -> None:
    run = cli(project / "models" / "line" / "deeper", "check", "--format", "json", "../drift.plant")
    assert run.code == 1 and rules_of(run) == [("zero-dynamics-critical", "error")]
    assert [f["path"] for f in run.json()["files"]] == ["../drift.plant"]


def test_paths_under_two_configurations_are_a_usage_error(tmp_path: Path, cli: CLI) -> None:
    """a/ re-grades the unstable zero dynamics to a note, b/ skips them: one run cannot
    follow both, and neither may be dropped in silence."""
    for name, table in (("a", '[severity.zero-dynamics-unstable]\nlevel = "note"\nreason = "a: not inverted"\n'),
                        ("b", '[skip]\nzero-dynamics-unstable = "b: reviewed"\n')):
        (tmp_path / name).mkdir()
        (tmp_path / name / "plantlint.toml").write_text(table, encoding="utf-8")
        copy(UNSTABLE, tmp_path / name / "tail.plant")
    for args in (["a", "b"], ["a/tail.plant", "b/tail.plant"]):
        run = cli(tmp_path, "check", "--format", "json", *args)
        assert run.code == 2 and one_line_error(run) and run.stdout == "", run.stderr
        assert "a/plantlint.toml (for a" in run.stderr and "b/plantlint.toml (for b" in run.stderr
        assert "check each project separately" in run.stderr and "--config" in run.stderr
    # each project alone, several paths in one project, and --config for both: as before
    assert rules_of(cli(tmp_path, "check", "--format", "json", "a")) == [("zero-dynamics-unstable", "note")]
    assert cli(tmp_path, "check", "--format", "json", "a/tail.plant", "a").code == 0
    run = cli(tmp_path, "check", "--format", "json", "--config", "a/plantlint.toml", "a", "b")
    assert run.code == 0 and rules_of(run) == [("zero-dynamics-unstable", "note")] * 2
    # a project's file and a folder under none: a/ would lose its re-grading in silence
    (tmp_path / "c").mkdir()
    copy(UNSTABLE, tmp_path / "c" / "tail.plant")
    run = cli(tmp_path, "check", "--format", "json", "a", "c")
    assert run.code == 2 and one_line_error(run), run.stderr
    assert "this run would use no configuration file, but a/plantlint.toml (for a/tail.plant)" in run.stderr
    # a project nested in a checked folder: its own file, not the outer one, judges its models
    (tmp_path / "a" / "sub").mkdir()
    (tmp_path / "a" / "sub" / "plantlint.toml").write_text('fail-on = "warning"\n', encoding="utf-8")
    copy(UNSTABLE, tmp_path / "a" / "sub" / "tail.plant")
    for cwd, args in ((tmp_path, ["a"]), (tmp_path / "a", [])):
        run = cli(cwd, "check", "--format", "json", *args)
        assert run.code == 2 and one_line_error(run), run.stderr
        assert "sub/plantlint.toml (for " in run.stderr and "sub/tail.plant)" in run.stderr


def test_severity_override_from_pyproject(tmp_path: Path, cli: CLI) -> None:
    root = tmp_path / "repo"
    root.mkdir()
    (root / "pyproject.toml").write_text(
        '[project]\nname = "demo"\n\n[tool.plantlint.severity.zero-dynamics-unstable]\nlevel = "note"\n'
        'reason = "the output is not inverted"\n', encoding="utf-8")
    copy(UNSTABLE, root / "tail.plant")
    # a pyproject.toml without [tool.plantlint] on the way up is passed over
    sub = root / "sub"
    sub.mkdir()
    (sub / "pyproject.toml").write_text('[project]\nname = "inner"\n', encoding="utf-8")
    for cwd, path in ((root, "tail.plant"), (sub, "../tail.plant")):
        run = cli(cwd, "check", "--format", "json", path)
        assert run.code == 0 and rules_of(run) == [("zero-dynamics-unstable", "note")]


def test_fail_on_warning_fails_a_warning_only_model(tmp_path: Path, cli: CLI) -> None:
    copy(CRITICAL, tmp_path / "drift.plant")
    assert cli(tmp_path, "check", "drift.plant").code == 0
    assert cli(tmp_path, "check", "--fail-on", "warning", "drift.plant").code == 1
    assert cli(tmp_path, "check", "--fail-on", "note", "drift.plant").code == 1
    (tmp_path / "plantlint.toml").write_text('fail-on = "warning"\n', encoding="utf-8")
    assert cli(tmp_path, "check", "drift.plant").code == 1
    assert cli(tmp_path, "check", "--fail-on", "error", "drift.plant").code == 0


def test_only_and_skip_select_rules(tmp_path: Path, cli: CLI) -> None:
    copy(UNSTABLE, tmp_path / "a.plant")
    copy(CRITICAL, tmp_path / "b.plant")
    everything = cli(tmp_path, "check", "--format", "json", "a.plant", "b.plant")
    assert sorted(rules_of(everything)) == [("zero-dynamics-critical", "warning"), ("zero-dynamics-unstable", "error")]
    only = cli(tmp_path, "check", "--format", "json", "--only", "zero-dynamics-critical", "a.plant", "b.plant")
    assert only.code == 0 and rules_of(only) == [("zero-dynamics-critical", "warning")]
    skip = cli(tmp_path, "check", "--format", "json", "--skip", "zero-dynamics-unstable", "a.plant", "b.plant")
    assert skip.code == 0 and rules_of(skip) == [("zero-dynamics-critical", "warning")]
    both = cli(tmp_path, "check", "--format", "json", "--only", "zero-dynamics-unstable, zero-dynamics-critical",
               "--skip", "zero-dynamics-critical", "a.plant", "b.plant")
    assert both.code == 1 and rules_of(both) == [("zero-dynamics-unstable", "error")]


# -- output -------------------------------------------------------------------------------

@pytest.mark.parametrize("fmt", ["json", "text"])
def test_output_file_gets_the_report_and_models_are_untouched(tmp_path: Path, cli: CLI, fmt: str) -> None:
    models = [copy(UNSTABLE, tmp_path / "a.plant"), copy(CRITICAL, tmp_path / "b.plant")]
    before = [(m.read_bytes(), m.stat().st_mtime_ns) for m in models]
    report = tmp_path / "out" / f"report.{fmt}"
    report.parent.mkdir()
    run = cli(tmp_path, "check", "--format", fmt, "--color", "always", "--output", str(report), "a.plant", "b.plant")
    assert run.code == 1 and run.stderr == ""
    written = report.read_text(encoding="utf-8")
    assert not ANSI.search(written)  # a file never gets colour
    if fmt == "json":
        assert [f["path"] for f in json.loads(written)["files"]] == ["a.plant", "b.plant"]
        assert "a.plant:9:7: error:" in run.stdout  # a short summary stays on the terminal
    else:
        assert "zero-dynamics-unstable" in written and run.stdout == ""
    assert [(m.read_bytes(), m.stat().st_mtime_ns) for m in models] == before


def test_unwritable_output_is_a_usage_error(tmp_path: Path, cli: CLI) -> None:
    copy(CLEAN, tmp_path / "a.plant")
    run = cli(tmp_path, "check", "--output", str(tmp_path / "no-such-folder" / "r.json"), "a.plant")
    assert run.code == 2 and one_line_error(run)


def test_text_to_a_pipe_has_no_colour_unless_asked(tmp_path: Path, cli: CLI) -> None:
    copy(UNSTABLE, tmp_path / "a.plant")
    plain = cli(tmp_path, "check", "a.plant")
    assert plain.code == 1 and "zero-dynamics-unstable" in plain.stdout and not ANSI.search(plain.stdout)
    forced = cli(tmp_path, "check", "--color", "always", "a.plant")
    assert forced.code == 1 and ANSI.search(forced.stdout)


def _on_terminal(cwd: Path, args: list[str], extra_env: dict[str, str]) -> tuple[int, str]:
    """Run plantlint with stdout on a pseudo-terminal; what the terminal received."""
    env = {k: v for k, v in os.environ.items() if k not in ("NO_COLOR", "FORCE_COLOR")}
    env.update({"TERM": "xterm-256color", "COLUMNS": "100", **extra_env})
    code, seen, err = run_on_terminal([sys.executable, "-m", "plantlint", *args], cwd, env)
    assert b"Traceback" not in err
    return code, seen.decode("utf-8", errors="replace")


def test_colour_on_a_terminal_and_no_color(tmp_path: Path, cache: Path) -> None:
    copy(UNSTABLE, tmp_path / "a.plant")
    args = ["check", "--cache-dir", str(cache), "a.plant"]
    code, shown = _on_terminal(tmp_path, args, {})
    assert code == 1 and ANSI.search(shown)
    code, shown = _on_terminal(tmp_path, args, {"NO_COLOR": "1"})
    assert code == 1 and "zero-dynamics-unstable" in shown and not ANSI.search(shown)


# -- rules, version, help -------------------------------------------------------------------

def test_rules_lists_the_whole_catalogue(tmp_path: Path, cli: CLI) -> None:
    ids = sorted(load_catalogue().ids())
    in_files = sum(p.read_text(encoding="utf-8").count("\nid = ") for p in (PROJECT / "rules").glob("*.toml"))
    assert len(ids) == in_files
    as_json = cli(tmp_path, "rules", "--format", "json")
    assert as_json.code == 0 and sorted(r["id"] for r in json.loads(as_json.stdout)) == ids
    text = cli(tmp_path, "rules")
    assert text.code == 0 and not ANSI.search(text.stdout)
    listed = set(re.findall(r"[a-z]+(?:-[a-z]+)*", text.stdout))
    assert set(ids) <= listed


def test_rules_shows_one_rule(tmp_path: Path, cli: CLI) -> None:
    catalogue = load_catalogue()
    one = cli(tmp_path, "rules", "syntax")
    assert one.code == 0 and one.stdout.lstrip().startswith("syntax")
    assert " ".join(catalogue.get("syntax").title.split()) in " ".join(one.stdout.split())
    # not the listing: the titles of other rules do not appear
    others = [catalogue.get(r).title for r in catalogue.ids() if r != "syntax"]
    assert not any(" ".join(t.split()) in " ".join(one.stdout.split()) for t in others)
    (record,) = json.loads(cli(tmp_path, "rules", "--format", "json", "syntax").stdout)
    assert record["id"] == "syntax"


def test_version_from_the_module_and_the_console_script(tmp_path: Path) -> None:
    module = subprocess.run([sys.executable, "-m", "plantlint", "--version"], cwd=tmp_path, capture_output=True,
                            text=True, timeout=120)
    assert (module.returncode, module.stdout.strip()) == (0, f"plantlint {__version__}")
    script = shutil.which("plantlint")
    if script is None:
        pytest.skip("the plantlint console script is not on PATH (package not installed)")
    installed = subprocess.run([script, "--version"], cwd=tmp_path, capture_output=True, text=True, timeout=120)
    assert (installed.returncode, installed.stdout.strip()) == (0, f"plantlint {__version__}")


# -- the program's way out -----------------------------------------------------------------
# The `plantlint` program (cli.run) ends the process with os._exit once its output is flushed,
# skipping the interpreter's teardown. These tests run the real program, so that what it
# writes is seen as a reader of its output sees it.


def _program(cwd: Path, *args: str, stdout: Any = subprocess.PIPE) -> subprocess.Popen[str]:
    """The program, its output buffered as it is by default (PYTHONUNBUFFERED would hide a
    report left in the buffer)."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONUNBUFFERED"}
    return subprocess.Popen([sys.executable, "-m", "plantlint", *args], cwd=cwd, stdout=stdout,
                            stderr=subprocess.PIPE, text=True, env=env)


def test_the_program_writes_its_whole_report_and_keeps_the_exit_code(tmp_path: Path) -> None:
    """The JSON of the example repository (larger than a pipe's buffer) arrives whole, and
    the exit code is main()'s: 1, for the demo's findings (its configuration leaves the
    archive out)."""
    models = [m for m in (PROJECT / "example_repo" / "models").rglob("*.plant") if m.parent.name != "archive"]
    proc = _program(PROJECT / "example_repo", "check", "--format", "json", "--cache-dir", str(tmp_path), ".")
    out, err = proc.communicate(timeout=600)
    assert proc.returncode == 1, err
    report = json.loads(out)
    assert sorted(Path(f["path"]).name for f in report["files"]) == sorted(m.name for m in models)
    assert report["summary"]["files"] == len(models)
    assert "Traceback" not in err


@pytest.mark.parametrize("args", [["check", "--no-cache", str(CLEAN)], ["rules"], ["explain", str(CLEAN)]])
def test_output_that_cannot_be_written_exits_2(tmp_path: Path, args: list[str]) -> None:
    """A full disk under the output: a short text report fails only when it is flushed,
    the rules table as rich writes it. Either way one line and exit 2, never a pass, a
    traceback or Python's "Exception ignored" with exit 120."""
    if not os.path.exists("/dev/full"):
        pytest.skip("no /dev/full on this system")
    with open("/dev/full", "w") as full:
        proc = _program(tmp_path, *args, stdout=full)
        _, err = proc.communicate(timeout=300)
    assert proc.returncode == 2
    assert err.strip() == "plantlint: error: standard output: cannot write: No space left on device"


def test_a_check_started_with_standard_output_closed_exits_2(tmp_path: Path) -> None:
    """`plantlint check model >&-`: Python starts with sys.stdout None. The report cannot be
    written anywhere, so the run says so and exits 2, without a traceback; with --output
    the report goes to the file and the run ends as usual."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONUNBUFFERED"}
    closed = subprocess.run([sys.executable, "-m", "plantlint", "check", "--no-cache", str(CLEAN)], cwd=tmp_path,
                            stderr=subprocess.PIPE, text=True, env=env, timeout=300, preexec_fn=lambda: os.close(1))
    assert closed.returncode == 2
    assert closed.stderr.strip() == "plantlint: error: standard output is closed; no report written (give --output FILE)"
    report = tmp_path / "report.json"
    written = subprocess.run([sys.executable, "-m", "plantlint", "check", "--no-cache", "--format", "json", "--output",
                              str(report), str(CLEAN)], cwd=tmp_path, stderr=subprocess.PIPE, text=True, env=env,
                             timeout=300, preexec_fn=lambda: os.close(1))
    assert written.returncode == 0 and "Traceback" not in written.stderr
    assert json.loads(report.read_text(encoding="utf-8"))["summary"]["files"] == 1


def test_a_reader_that_goes_away_ends_the_run_quietly(tmp_path: Path) -> None:
    """`plantlint check ... | head -1`: the reader closes the pipe before the report is
    written. No traceback and no "Exception ignored" on the way out."""
    proc = _program(tmp_path, "check", "--no-cache", "--format", "json", str(UNSTABLE))
    assert proc.stdout is not None
    proc.stdout.close()
    _, err = proc.communicate(timeout=300)
    assert proc.returncode == 0
    assert err == ""


@pytest.mark.parametrize("args", [["--help"], ["check", "--help"]])
def test_help_carries_the_safety_caution(tmp_path: Path, cli: CLI, args: list[str]) -> None:
    run = cli(tmp_path, *args)
    assert run.code == 0
    words = " ".join(run.stdout.split())
    assert "structure of a plant model" in words and "does not check safety" in words
    assert "licensed engineering judgement" in words


# -- bad inputs ---------------------------------------------------------------------------

#: bad file -> what its one `syntax` finding must mention
BAD_INPUTS = {
    "empty.plant": "empty", "junk.plant": "UTF-8", "latin1.plant": "UTF-8", "huge.plant": "MB",
    "nested.plant": "nested", "unterminated.plant": "unterminated", "power.plant": "exponent",
    "tower.plant": "exponent",
}


def _write_bad_inputs(folder: Path) -> dict[str, str]:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "empty.plant").write_bytes(b"")
    (folder / "junk.plant").write_bytes(bytes(range(256)) * 8)
    (folder / "latin1.plant").write_bytes("plant caf\u00e9\nstate x in -1 .. 1\n".encode("latin-1"))
    with (folder / "huge.plant").open("wb") as fh:
        fh.write(b"plant huge\n")
        fh.write(b"# padding\n" * 1_000_000)  # about 10 MB
    head = "plant deep\nstate x in -1 .. 1\ninput u\n"
    tail = "output y = x\npoint rest: x = 0\n"
    (folder / "nested.plant").write_text(head + "rate x = " + "(" * 5000 + "x" + ")" * 5000 + " + u\n" + tail,
                                         encoding="utf-8")
    (folder / "unterminated.plant").write_text('plant s "no closing quote\n' + head[11:] + "rate x = u\n" + tail,
                                               encoding="utf-8")
    (folder / "power.plant").write_text(head + "rate x = x^1000000000 + u\n" + tail, encoding="utf-8")
    (folder / "tower.plant").write_text(head + "rate x = 10^10^10*x + u\n" + tail, encoding="utf-8")
    assert sorted(p.name for p in folder.iterdir()) == sorted(BAD_INPUTS)
    return BAD_INPUTS


@pytest.fixture(scope="module")
def bad_inputs(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, dict[str, str]]:
    folder = tmp_path_factory.mktemp("bad")
    return folder, _write_bad_inputs(folder)


@pytest.mark.parametrize("name", sorted(BAD_INPUTS))
def test_bad_input_gives_one_syntax_finding(bad_inputs: tuple[Path, dict[str, str]], cli: CLI, name: str) -> None:
    folder, says = bad_inputs
    run = cli(folder, "check", "--format", "json", "--no-cache", name)
    assert run.code == 1 and run.stderr == ""
    (finding,) = run.json()["files"][0]["findings"]
    assert finding["rule"] == "syntax" and finding["severity"] == "error"
    assert says[name] in finding["message"]
    assert finding["line"] >= 1 and finding["column"] >= 1


def test_endless_device_is_read_only_up_to_the_limit(tmp_path: Path, cli: CLI) -> None:
    if not Path("/dev/zero").exists():
        pytest.skip("no /dev/zero on this system")
    run = cli(tmp_path, "check", "--format", "json", "--no-cache", "/dev/zero")
    assert run.code == 1
    (finding,) = run.json()["files"][0]["findings"]
    assert finding["rule"] == "syntax" and "KiB" in finding["message"]


def test_bad_inputs_in_one_real_process(bad_inputs: tuple[Path, dict[str, str]]) -> None:
    """The same files through a real interpreter: stderr stays empty, one finding each."""
    folder, says = bad_inputs
    out = subprocess.run([sys.executable, "-m", "plantlint", "check", "--format", "lines", "--no-cache", "."],
                         cwd=folder, capture_output=True, text=True, timeout=300)
    assert out.returncode == 1 and out.stderr == ""
    lines = out.stdout.splitlines()
    assert sorted(line.split(":", 1)[0] for line in lines) == sorted(says)
    assert all(line.endswith("[syntax]") for line in lines)


# -- the built and installed package ------------------------------------------------------

def test_wheel_installs_and_finds_its_grammar_and_rules(tmp_path: Path) -> None:
    """Build the wheel offline, install it into a fresh venv that borrows the current
    environment's dependencies, and run the console script from elsewhere."""
    if importlib.util.find_spec("hatchling") is None:
        pytest.skip("hatchling is not importable, so the wheel cannot be built without network access")
    dist = tmp_path / "dist"
    built = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation", "--no-index",
                            "-q", "-w", str(dist), str(PROJECT)], capture_output=True, text=True, timeout=300)
    assert built.returncode == 0, built.stdout + built.stderr
    (wheel,) = dist.glob("plantlint-*.whl")
    with zipfile.ZipFile(wheel) as built_wheel:  # the unit table ships (units are read without pint)
        assert "plantlint/language/unit_table.json" in built_wheel.namelist()
    venv = tmp_path / "venv"
    subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True, timeout=300)  # ensurepip: offline
    python = venv / "bin" / "python"
    # Borrow the dependencies of the environment running this test (not of its base
    # interpreter, which may have none) with a plain path entry: the editable install's own
    # .pth hook in that folder is not processed, so it cannot shadow the wheel.
    own = subprocess.run([str(python), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
                         capture_output=True, text=True, check=True, timeout=120).stdout.strip()
    borrowed = sorted({sysconfig.get_paths()["purelib"], sysconfig.get_paths()["platlib"]})
    (Path(own) / "_borrowed_dependencies.pth").write_text("\n".join(borrowed) + "\n")
    installed = subprocess.run([str(python), "-m", "pip", "install", "--no-deps", "--no-index", "-q", str(wheel)],
                               capture_output=True, text=True, timeout=300)
    assert installed.returncode == 0, installed.stdout + installed.stderr
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    locate = ("import plantlint, plantlint.core.resources as r; "
              "print(plantlint.__file__); print(r.data_path('grammar')); print(r.data_path('rules'))")
    where = subprocess.run([str(python), "-c", locate], cwd=elsewhere, capture_output=True, text=True, timeout=120)
    assert where.returncode == 0, where.stderr
    assert all(Path(line).resolve().is_relative_to(venv.resolve()) for line in where.stdout.split())
    script = venv / "bin" / "plantlint"
    version = subprocess.run([str(script), "--version"], cwd=elsewhere, capture_output=True, text=True, timeout=120)
    assert version.stdout.strip() == f"plantlint {__version__}"
    copy(UNSTABLE, elsewhere / "unstable.plant")
    copy(CLEAN, elsewhere / "clean.plant")
    check = subprocess.run([str(script), "check", "--no-cache", "--format", "lines", "unstable.plant", "clean.plant"],
                           cwd=elsewhere, capture_output=True, text=True, timeout=300)
    assert check.returncode == 1 and check.stderr == ""
    assert check.stdout.strip().endswith("[zero-dynamics-unstable] (point rest)")
    listed = subprocess.run([str(script), "rules", "--format", "json"], cwd=elsewhere, capture_output=True,
                            text=True, timeout=120)
    assert listed.returncode == 0 and len(json.loads(listed.stdout)) == len(load_catalogue())


def test_every_report_names_the_configuration_file_it_ran_under(tmp_path: Path, cli: CLI) -> None:
    """A CI log must say which settings made a run pass: the text summary, the JSON report
    (validated against the shipped schema with jsonschema) and SARIF's invocation
    properties name the configuration file, or say that the defaults applied (common
    practice for build tools' logs)."""
    import jsonschema

    from plantlint.report.formats.json_report import report_schema

    copy(CLEAN, tmp_path / "x.plant")
    bare = cli(tmp_path, "check", "x.plant", "--format", "json")
    data = json.loads(bare.stdout)
    jsonschema.Draft202012Validator(report_schema()).validate(data)
    assert data["configuration"] is None
    assert "configuration: none found (the defaults)" in cli(tmp_path, "check", "x.plant").stdout
    (tmp_path / "plantlint.toml").write_text('timeout = 30\n', encoding="utf-8")
    data = json.loads(cli(tmp_path, "check", "x.plant", "--format", "json").stdout)
    jsonschema.Draft202012Validator(report_schema()).validate(data)
    assert data["configuration"] == "plantlint.toml"
    assert "configuration: plantlint.toml" in cli(tmp_path, "check", "x.plant").stdout
    sarif = json.loads(cli(tmp_path, "check", "x.plant", "--format", "sarif").stdout)
    assert sarif["runs"][0]["invocations"][0]["properties"]["configuration"] == "plantlint.toml"
