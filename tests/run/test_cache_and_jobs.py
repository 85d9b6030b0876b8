"""Cache, parallel workers, time budgets and progress, through the real CLI.

Every run is a real ``python -m plantlint`` process with real worker processes and
a real cache folder under ``tmp_path``. Findings themselves are not re-checked
here (the rule fixtures do that); what matters is that caching, the number of
workers and concurrency never change a byte of the report.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Callable

import pytest

from conftest import FIXTURES as FIXTURE_ROOT, MAGLEV, Run, run_on_terminal

FIXTURES = FIXTURE_ROOT / "rules"

# Copied fixtures (invented plants), two of them one folder down so that discovery
# order is exercised too.
MODELS = {
    "zero-dynamics-unstable.plant": "a_unstable.plant",
    "zero-dynamics-critical.plant": "b_critical.plant",
    "zero-dynamics-unstable.ok.plant": "c_clean.plant",
    "expectation-failed.plant": "d_expectation.plant",
    "unused-name.plant": "e_unused.plant",
    "syntax.plant": "f_syntax.plant",
    "decoupling-singular.plant": "line/g_decoupling.plant",
    "not-involutive.plant": "line/h_chain.plant",
}

# sin^2 + cos^2 - 1 times a polynomial too large for symbolic confirmation: the analysis
# itself reports analysis-budget (a deterministic outcome that must be cached).
_BIG = " + ".join(f"x1^{j}*x2^{k}" for j in range(10) for k in range(10))
UNCONFIRMED = f"""# Screening says zero; symbolic confirmation is beyond budget (invented).
plant trig
state x1 in -1 .. 1
state x2 in -1 .. 1
input u
rate x1 = x2 + (sin(x1)^2 + cos(x1)^2 - 1)*({_BIG})*u
rate x2 = u
output y = x1
"""


def plantlint(cwd: Path, *args: str) -> Run:
    out = subprocess.run([sys.executable, "-m", "plantlint", *args], cwd=cwd, capture_output=True, text=True,
                         timeout=300, env=_env())
    return Run(out.returncode, out.stdout, out.stderr)


def _env() -> dict[str, str]:
    env = dict(os.environ)
    env["NO_COLOR"] = "1"
    return env


def cache_entries(folder: Path) -> list[Path]:
    return sorted(folder.rglob("*.json")) if folder.exists() else []


@pytest.fixture(scope="module")
def workspace(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A folder with ``models/`` (8 copied fixtures) and ``unconfirmed/`` (one model)."""
    root = tmp_path_factory.mktemp("runs")
    for source, target in MODELS.items():
        path = root / "models" / target
        path.parent.mkdir(parents=True, exist_ok=True)
        shutil.copyfile(FIXTURES / source, path)
    (root / "unconfirmed").mkdir()
    (root / "unconfirmed" / "trig.plant").write_text(UNCONFIRMED, encoding="utf-8")
    return root


@pytest.fixture(scope="module")
def reference(workspace: Path) -> Run:
    """The json report of models/ with one worker and no cache."""
    run = plantlint(workspace, "check", "--format", "json", "--jobs", "1", "--no-cache", "models")
    assert run.code == 1 and "Traceback" not in run.stderr, run.stderr
    stopped = [(file["path"], f["message"]) for file in json.loads(run.stdout)["files"] for f in file["findings"]
               if f["rule"] == "analysis-incomplete"]
    assert stopped == [], f"the runner stopped an analysis (never cached, so cache counts would be off): {stopped}"
    return run


@dataclass
class ColdRun:
    run: Run  # models/ with four workers into an empty cache
    cache: Path  # then also holds unconfirmed/


@pytest.fixture(scope="module")
def cold(workspace: Path, tmp_path_factory: pytest.TempPathFactory) -> ColdRun:
    cache = tmp_path_factory.mktemp("cache") / "c"
    run = plantlint(workspace, "check", "--format", "json", "--jobs", "4", "--cache-dir", str(cache), "models")
    assert plantlint(workspace, "check", "--cache-dir", str(cache), "unconfirmed").code == 0
    return ColdRun(run, cache)


@pytest.fixture(scope="module")
def warm_cache(cold: ColdRun) -> Path:
    return cold.cache


WARM_SCRIPT = """
import sys
from plantlint.cli import main
code = main(sys.argv[1:])
sys.stdout.flush()
if "sympy" in sys.modules:
    sys.stderr.write("sympy was imported\\n")
    sys.exit(99)
if "multiprocessing" in sys.modules:
    sys.stderr.write("multiprocessing was imported\\n")
    sys.exit(98)
sys.exit(code)
"""


def warm_run(cwd: Path, *args: str) -> Run:
    """The CLI's main() in a fresh interpreter that fails (99) if sympy got imported, or
    (98) multiprocessing: a run answered from the cache starts no worker."""
    out = subprocess.run([sys.executable, "-c", WARM_SCRIPT, *args], cwd=cwd, capture_output=True, text=True,
                         timeout=300, env=_env())
    return Run(out.returncode, out.stdout, out.stderr)


# -- cache ------------------------------------------------------------------------------

def test_reference_report_lists_every_model_in_path_order(reference: Run) -> None:
    paths = [f["path"] for f in json.loads(reference.stdout)["files"]]
    assert paths == sorted(f"models/{t}" for t in MODELS.values())


def test_warm_run_is_identical_and_imports_neither_sympy_nor_multiprocessing(workspace: Path, reference: Run, warm_cache: Path) -> None:
    assert len(cache_entries(warm_cache)) == len(MODELS) + 1
    warm = warm_run(workspace, "check", "--format", "json", "--cache-dir", str(warm_cache), "models")
    assert warm.code == reference.code, warm.stderr
    assert warm.stdout == reference.stdout


def _imported(stderr: str) -> set[str]:
    """Top-level packages that ``python -X importtime`` reports (the worker processes
    inherit the option, so their imports are listed too)."""
    return {line.rsplit("|", 1)[1].strip().split(".")[0] for line in stderr.splitlines()
            if line.startswith("import time:") and line.count("|") == 2}


def test_a_file_that_does_not_parse_is_reported_without_sympy(tmp_path: Path) -> None:
    """Nothing of it needs a symbolic step: a typo in a pre-commit run is answered without
    sympy's import (about half a second). The same model fixed, in a report that shows its
    analysis (json), does import it, in its worker, which shows that the probe sees the
    workers' imports (in the lines format the light route passes it without sympy:
    tests/analysis/test_light.py)."""
    bad = tmp_path / "typo.plant"
    bad.write_text("plant typo\nstate x in -1 .. 1\ninput u\nrate x = x +* u\n")
    good = tmp_path / "good.plant"
    good.write_text("plant good\nstate x in -1 .. 1\ninput u\nrate x = -x + u\noutput y = x\n")
    runs = {}
    for model, form in ((bad, "lines"), (good, "json")):
        out = subprocess.run([sys.executable, "-X", "importtime", "-m", "plantlint", "check", "--no-cache",
                              "--format", form, str(model)], cwd=tmp_path, capture_output=True, text=True,
                             timeout=300, env=_env())
        runs[model.stem] = out
    typo, fine = runs["typo"], runs["good"]
    assert typo.returncode == 1 and "unexpected '*'" in typo.stdout and "[syntax]" in typo.stdout
    assert "sympy" not in _imported(typo.stderr)
    assert fine.returncode == 0, fine.stdout
    assert "sympy" in _imported(fine.stderr)


def test_analysis_budget_found_by_the_analysis_is_cached(workspace: Path, warm_cache: Path) -> None:
    """Only the runner's own stops (time, memory, crash) stay out of the cache."""
    warm = warm_run(workspace, "check", "--format", "json", "--cache-dir", str(warm_cache), "unconfirmed")
    assert warm.code == 0, warm.stderr
    (file,) = json.loads(warm.stdout)["files"]
    assert [f["rule"] for f in file["findings"]] == ["analysis-budget"]


JUNK = [b"", b"\x00\xff\xfe junk", b"{\"key\": ", b"[]", b"{\"key\": \"not this key\", \"result\": {}}",
        b"{\"result\": 7}", b"null"]


def test_corrupted_cache_entries_are_ignored_and_rebuilt(workspace: Path, reference: Run, warm_cache: Path,
                                                         tmp_path: Path) -> None:
    cache = tmp_path / "c"
    shutil.copytree(warm_cache, cache)
    entries = cache_entries(cache)
    assert len(entries) == len(MODELS) + 1
    for i, entry in enumerate(entries):
        entry.write_bytes(JUNK[i % len(JUNK)])
    again = plantlint(workspace, "check", "--format", "json", "--cache-dir", str(cache), "models")
    assert "Traceback" not in again.stderr
    assert (again.code, again.stdout) == (reference.code, reference.stdout)
    # rebuilt: every entry of models/ is a readable record again (the one of unconfirmed/ stays junk)
    readable = [e for e in cache_entries(cache) if _is_record(e)]
    assert len(readable) == len(MODELS)


def _is_record(entry: Path) -> bool:
    try:
        data = json.loads(entry.read_bytes())
    except ValueError:
        return False
    return isinstance(data, dict) and data.get("key") == entry.stem and "result" in data


def test_no_cache_writes_nothing(tmp_path: Path) -> None:
    project = tmp_path / "project"
    project.mkdir()
    (project / "plantlint.toml").write_text('fail-on = "error"\n', encoding="utf-8")
    shutil.copyfile(FIXTURES / "zero-dynamics-unstable.ok.plant", project / "tail.plant")
    elsewhere = tmp_path / "elsewhere"
    assert plantlint(project, "check", "--no-cache", "--cache-dir", str(elsewhere), "tail.plant").code == 0
    assert sorted(p.name for p in project.iterdir()) == ["plantlint.toml", "tail.plant"]
    assert not elsewhere.exists()
    # ... while a run with the cache writes into the folder beside the configuration
    sub = project / "sub"
    sub.mkdir()
    assert plantlint(sub, "check", "../tail.plant").code == 0
    assert sorted(p.name for p in project.iterdir()) == [".plantlint", "plantlint.toml", "sub", "tail.plant"]
    assert len(cache_entries(project / ".plantlint" / "cache")) == 1
    # one project folder, ignoring itself (everything beneath it, the .gitignore included)
    assert sorted(p.name for p in (project / ".plantlint").iterdir()) == [".gitignore", "cache"]
    assert (project / ".plantlint" / ".gitignore").read_text(encoding="utf-8").splitlines()[-1] == "*"


def test_cache_off_in_the_configuration_writes_nothing(tmp_path: Path) -> None:
    (tmp_path / "plantlint.toml").write_text("cache = false\n", encoding="utf-8")
    shutil.copyfile(FIXTURES / "zero-dynamics-unstable.ok.plant", tmp_path / "tail.plant")
    assert plantlint(tmp_path, "check", "tail.plant").code == 0
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plantlint.toml", "tail.plant"]


# -- parallel workers --------------------------------------------------------------------

def test_one_and_four_workers_give_byte_identical_json(reference: Run, cold: ColdRun) -> None:
    four = cold.run  # --jobs 4 into an empty cache: every model analysed by a worker
    assert four.code == reference.code
    assert four.stdout == reference.stdout
    # stderr is not a terminal: no progress display
    assert four.stderr == "" and reference.stderr == ""


def test_concurrent_runs_share_one_cache(workspace: Path, tmp_path: Path) -> None:
    cache = tmp_path / "shared"
    args = [sys.executable, "-m", "plantlint", "check", "--format", "json", "--jobs", "2", "--cache-dir", str(cache),
            "models/a_unstable.plant", "models/c_clean.plant", "models/line"]
    procs = [subprocess.Popen(args, cwd=workspace, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                              env=_env()) for _ in range(2)]
    outs = [p.communicate(timeout=300) for p in procs]
    codes = [p.returncode for p in procs]
    assert codes == [1, 1], outs
    assert outs[0][0] == outs[1][0] and all(err == "" for _, err in outs)
    assert len(cache_entries(cache)) == 4
    assert not list(cache.rglob("*.tmp"))
    warm = warm_run(workspace, *args[3:])
    assert (warm.code, warm.stdout) == (1, outs[0][0])


# -- time budget -------------------------------------------------------------------------

def test_tiny_budget_stops_each_model_and_the_run_goes_on(workspace: Path, tmp_path: Path) -> None:
    cache = tmp_path / "c"
    paths = ["models/a_unstable.plant", "models/c_clean.plant", "models/line/h_chain.plant"]
    run = plantlint(workspace, "check", "--format", "json", "--jobs", "1", "--timeout", "0.001",
                    "--cache-dir", str(cache), *paths)
    # not decided is not a pass: every model could not be checked, so the run fails
    assert run.code == 1 and "Traceback" not in run.stderr
    report = json.loads(run.stdout)
    files = report["files"]
    assert [f["path"] for f in files] == paths
    from plantlint.analysis.stages import STAGES as stages  # every stage is named, in words

    for file in files:
        stop = [f for f in file["findings"] if f["rule"] == "analysis-incomplete"]
        assert len(stop) == 1 and stop[0]["severity"] == "error" and stop[0]["decided"] is False
        message = stop[0]["message"]
        assert message.startswith("could not be checked: the analysis stopped at its 0.001 s budget")
        assert "completed:" in message and "not completed:" in message
        assert all(stage in message for stage in stages)
        assert file["outcome"] == "not-decided" and file["stop"]["kind"] == "time"
    assert report["summary"]["not_checked"] == report["summary"]["cut_short"] == 3
    # a stop by the runner depends on the machine: it is never cached
    assert cache_entries(cache) == []
    full = plantlint(workspace, "check", "--format", "json", "--cache-dir", str(cache), paths[0])
    assert [f["rule"] for f in json.loads(full.stdout)["files"][0]["findings"]] == ["zero-dynamics-unstable"]


def _check_in_process(capsys: pytest.CaptureFixture[str], cache: Path) -> dict[str, Any]:
    """``check --format json maglev.plant`` through main() in this process: the worker is
    forked from it, so what a test patches here holds in the worker too."""
    from plantlint.cli import main

    code = main(["check", "--format", "json", "--jobs", "1", "--cache-dir", str(cache), "maglev.plant"])
    out, err = capsys.readouterr()
    assert code in (0, 1) and "Traceback" not in err, err
    (file,) = json.loads(out)["files"]
    return dict(file)


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the worker must be forked from the test")
def test_a_result_shaped_by_the_envelope_proofs_clock_is_not_cached(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                                                    capsys: pytest.CaptureFixture[str]) -> None:
    """A slow machine runs out of ``envelope-seconds``; a later run on a fast one must prove
    the envelope, not replay "undecided" from the cache."""
    import types

    from plantlint.kernel import intervals

    monkeypatch.chdir(tmp_path)
    Path("maglev.plant").write_bytes(MAGLEV)
    cache = tmp_path / "cache"
    ticks = iter(range(0, 10**9, 1000))  # a machine on which every box takes 1000 s
    monkeypatch.setattr(intervals, "time", types.SimpleNamespace(perf_counter=lambda: float(next(ticks))))
    # the proof by factors is the one the clock stops; its second try in mean-value form,
    # bounded by boxes only, would settle this model whatever the clock, so it is left out
    from plantlint.analysis import structure

    monkeypatch.setattr(structure, "_mean_value_try", lambda *args, **kwargs: None)
    slow = _check_in_process(capsys, cache)
    unproven = [f["message"] for f in slow["findings"] if f["rule"] == "envelope-unproven"]
    assert unproven and "undecided" in unproven[0], slow["findings"]
    assert cache_entries(cache) == []
    monkeypatch.undo()  # the fast machine, same model, same settings, same cache
    monkeypatch.chdir(tmp_path)
    fast = _check_in_process(capsys, cache)
    assert "envelope-unproven" not in [f["rule"] for f in fast["findings"]]
    assert fast["analysis"]["envelope"]["regular"] is True
    assert len(cache_entries(cache)) == 1  # a result no clock shaped is cached
    assert _check_in_process(capsys, cache) == fast


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the worker must be forked from the test")
def test_a_result_shaped_by_a_bounded_step_is_not_cached(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                                         capsys: pytest.CaptureFixture[str]) -> None:
    """The search for the equilibrium near a point (core.deadline.bounded, REFINE_SECONDS)
    runs out of its time: the finding says so, and that result is not cached."""
    from plantlint.analysis import equilibria, refine

    monkeypatch.chdir(tmp_path)
    Path("maglev.plant").write_bytes(MAGLEV)
    cache = tmp_path / "cache"
    real = refine.near_miss

    def slow_search(*args: object) -> object:  # a machine too slow for the search: the bound
        time.sleep(2.0)                          # runs out whatever the host's speed (a bound of
        return real(*args)                       # 1e-9 s alone raced a fast host's search)

    monkeypatch.setattr(refine, "near_miss", slow_search)
    monkeypatch.setattr(equilibria, "REFINE_SECONDS", 0.05)
    slow = _check_in_process(capsys, cache)
    (miss,) = [f["message"] for f in slow["findings"] if f["rule"] == "point-not-equilibrium"]
    assert "was not worked out within" in miss, miss
    assert cache_entries(cache) == []
    monkeypatch.undo()
    monkeypatch.chdir(tmp_path)
    fast = _check_in_process(capsys, cache)
    (miss,) = [f["message"] for f in fast["findings"] if f["rule"] == "point-not-equilibrium"]
    assert "it is an equilibrium with i = 0.70035" in miss, miss
    assert len(cache_entries(cache)) == 1


def test_budget_beyond_any_wait_is_accepted(workspace: Path) -> None:
    """Selectors reject waits this long; the runner must wait in slices instead."""
    run = plantlint(workspace, "check", "--format", "lines", "--no-cache", "--timeout", "1e12",
                    "models/a_unstable.plant")
    assert run.code == 1 and run.stderr == ""
    assert "[zero-dynamics-unstable]" in run.stdout
    for value in ("inf", "nan"):  # not a budget at all: a usage error
        bad = plantlint(workspace, "check", "--no-cache", "--timeout", value, "models/a_unstable.plant")
        assert bad.code == 2 and bad.stderr.count("\n") == 1


# -- progress ----------------------------------------------------------------------------

def test_progress_goes_to_a_terminal_only(workspace: Path, reference: Run) -> None:
    """With stderr on a pseudo-terminal the progress bar is drawn there (more than three
    models to analyse); stdout (a pipe) still carries exactly the report."""
    paths = ["models/a_unstable.plant", "models/b_critical.plant", "models/c_clean.plant", "models/e_unused.plant"]
    code, drawn, stdout = run_on_terminal(
        [sys.executable, "-m", "plantlint", "check", "--format", "json", "--jobs", "2", "--no-cache", *paths],
        workspace, {**_env(), "TERM": "xterm", "COLUMNS": "100"}, stream="stderr")
    assert code == 1
    expected = [f for f in json.loads(reference.stdout)["files"] if f["path"] in paths]
    assert json.loads(stdout)["files"] == expected
    assert b"analysing models" in drawn and b"Traceback" not in drawn


def test_workers_get_the_analysis_settings_and_the_cache_key_follows_them() -> None:
    """What a worker receives is the frozen AnalysisSettings (the run's Config stays in the
    parent), and every analysis setting is part of the cache key, exactly as before."""
    from dataclasses import FrozenInstanceError, replace

    from plantlint.core.settings import AnalysisSettings
    from plantlint.run.config import Config
    from plantlint.run.runner import Cache, analyse_all

    settings = Config(envelope_seconds=2.0, envelope_boxes=50, point_tolerance=1e-3).analysis
    assert settings == AnalysisSettings(2.0, 50, 1e-3)
    with pytest.raises(FrozenInstanceError):
        settings.envelope_boxes = 1  # type: ignore[misc]
    model = b"plant p\nstate x in -1 .. 1\ninput u\nrate x = -x + u\noutput y = x\npoint o: x = 0\n"
    (raw,) = analyse_all([model], settings, jobs=1, timeout=60.0)
    assert raw.plant == "p" and raw.stop is None and raw.analysis is not None
    # y' = -x + u: the input appears in the first derivative, relative degree 1 (definition in
    # Khalil, Nonlinear Systems, 3rd ed., sec. 13.2; from memory)
    assert raw.analysis["relative_degree"] == {"y": 1}
    keys = {Cache(None, replace(Config(), **change).analysis_key()).key(model)
            for change in ({}, {"envelope_seconds": 4.0}, {"envelope_boxes": 7}, {"point_tolerance": 1e-6})}
    assert len(keys) == 4
    assert Config().analysis_key() == "env=5.0/20000 tol=0.0"  # the key text of earlier versions: old entries stay valid


def test_the_cache_key_follows_the_installed_code(tmp_path: Path) -> None:
    """An edited module, grammar or rule file (an upgrade, or a developer's source tree
    under the same version number) never reuses results of the code before it; the same
    code checked out or installed again (new file times: every CI run) does, so a cache
    kept between CI runs is used."""
    from plantlint.core.resources import data_path
    from plantlint.run import runner

    files = runner.code_files()
    for needed in (data_path("rules") / "model.toml", data_path("grammar") / "plant.lark", Path(runner.__file__)):
        assert needed.resolve() in {f.resolve() for f in files}, needed.name
    copies = []
    for i, original in enumerate(files[:3]):
        copy = tmp_path / f"{i}_{original.name}"
        copy.write_bytes(original.read_bytes())
        copies.append(copy)
    before = runner.fingerprint(copies)
    st = copies[0].stat()
    os.utime(copies[0], ns=(st.st_atime_ns, st.st_mtime_ns + 10**9))  # checked out again
    assert runner.fingerprint(copies) == before
    copies[0].write_bytes(copies[0].read_bytes() + b"\n# edited\n")  # the same size would do too
    assert runner.fingerprint(copies) != before
    copies[0].write_bytes(files[0].read_bytes())
    assert runner.fingerprint(copies) == before


def test_the_cache_key_follows_the_libraries_and_python(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    """Results computed by one sympy (or flint, mpmath, numpy, ...) are not reused under
    another: the versions come from the installed distributions' folder names. Reference:
    importlib.metadata, the standard library's reading of the same installation."""
    from importlib.metadata import version

    from plantlint.run import runner

    runner.library_versions.cache_clear()
    text = runner.library_versions()
    assert f"sympy={version('sympy')}" in text and f"python_flint={version('python-flint')}" in text
    assert f"mpmath={version('mpmath')}" in text and f"lark={version('lark')}" in text
    assert text.startswith(f"python={sys.version_info[0]}.{sys.version_info[1]}.")
    model = b"plant p\nstate x in -1 .. 1\ninput u\nrate x = -x + u\noutput y = x\n"
    before = runner.Cache(None, "s").key(model)
    # another sympy first on the path: a different key
    (tmp_path / "sympy-0.0.1.dist-info").mkdir()
    monkeypatch.setattr(sys, "path", [str(tmp_path), *sys.path])
    runner.library_versions.cache_clear()
    try:
        assert "sympy=0.0.1" in runner.library_versions()
        assert runner.Cache(None, "s").key(model) != before
    finally:
        monkeypatch.undo()
        runner.library_versions.cache_clear()
    assert runner.Cache(None, "s").key(model) == before


def test_the_small_model_is_read_before_forking_only_for_several_workers(monkeypatch: pytest.MonkeyPatch) -> None:
    """Reading one small model in the parent loads the parser tables and sympy's first-use
    imports once for every worker; a run of one model has one worker, which loads what its
    own model uses (the warm-up would be paid on top)."""
    from plantlint.run import pipeline, runner

    read: list[bytes] = []
    monkeypatch.setattr(pipeline, "read_model", lambda data, path="": read.append(data) or (None, []))
    runner._preload([MAGLEV])
    assert read == []
    runner._preload([MAGLEV, MAGLEV])
    assert read == [runner._WARM_UP]


def test_the_question_beside_a_worker_is_told_when_the_worker_has_ended() -> None:
    """``early`` gets a check of whether the model's worker has ended: a question that waits
    for it (as the light route's envelope proof does, box by box) sees it end, gives up, and
    the worker's own result is the model's. Before, a slow question held up an answer that
    was already in the pipe (a pendulum chain's text run waited 0.07 s on it)."""
    from plantlint.core.settings import AnalysisSettings
    from plantlint.run.runner import analyse_all

    seen: list[bool] = []

    def early(_i: int, left: float, ended: Callable[[], bool]) -> None:
        seen.append(ended())  # at once: the worker has just started
        until = time.monotonic() + min(left, 30.0)
        while not ended() and time.monotonic() < until:
            time.sleep(0.01)
        seen.append(ended())
        return None

    model = b"plant p\nstate x in -1 .. 1\ninput u\nrate x = -x + u\noutput y = x\n"
    (raw,) = analyse_all([model], AnalysisSettings(), jobs=1, timeout=60.0, early=early)
    assert seen == [False, True]
    assert raw.plant == "p" and raw.stop is None and raw.analysis is not None
