"""Not decided is its own outcome: budget stops, internal errors and claims that could not
be decided fail the run by default, keep what completed, and show in every format;
workers never outlive the run; budgets per use (interactive or CI).

Runs that must stop in a given stage use a stand-in for a runaway symbolic step: a
script that replaces the envelope proof by an endless loop before the CLI starts, so
forked workers inherit it (the models themselves are invented demo data).
"""

from __future__ import annotations

import io
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import jsonschema
import pytest
import sympy as sp

from plantlint.analysis.normal_form import WRITTEN_BY_EXPLAIN
from plantlint.cli import explain_file
from plantlint.core.catalogue import load_catalogue
from plantlint.core.findings import Relaxation, Report
from plantlint.report.formats import get_formatter
from plantlint.report.formats.json_report import report_schema
from plantlint.run.config import Config, ConfigError, from_table
from plantlint.run.runner import Target, check_targets
from conftest import Run, STANDARDS

SARIF_SCHEMA = STANDARDS / "sarif-schema-2.1.0.json"  # OASIS SARIF 2.1.0

# Invented: a mass on a spring lifted by a force; y'' = F - p, relative degree 2 = n.
LIFT = """plant lift "invented: a mass on a spring lifted by a force"
state p in -1 .. 1
state v in -1 .. 1
input F
rate p = v
rate v = F - p
output y = p
point rest: p = 0, v = 0, F = 0
expect relative_degree(y) = {degree}
expect regular
expect minimum_phase
"""

SLOW_ENVELOPE = """
import sys
import plantlint.analysis.engine as engine

def endless(*args, **kwargs):
    while True:  # stands in for a runaway symbolic step in the envelope stage
        pass

engine.certify_envelope = endless
# every model goes to the analysis (and its runaway stage): the light route, which would
# pass the clean ones without it, is switched off
import plantlint.analysis.light as light
light.light_check = lambda *args, **kwargs: None
from plantlint.cli import main
sys.exit(main(sys.argv[1:]))
"""

# The reproducer of issue 10, point 4 (a generated model, invented).
SLOW_NF = """plant slow_nf
state x1 in -3 .. 1/2
state x2 in -1/2 .. 1
state x3 in -2 .. 1/2
input u
rate x1 = -x2
rate x2 = u - 2*x3 - 2
rate x3 = 2*x2/(x1^2 + 1) + 1/(2*(2*x2^2 + 1)) - 5*x2/(4*(x2^2 + 1)) - 1/2
output y = x3
point p0: x1 = -1, x2 = 0, x3 = -1, u = 0
expect minimum_phase
expect relative_degree(y) = 1
"""


def _env(**extra: str) -> dict[str, str]:
    env = {k: v for k, v in os.environ.items() if k != "CI"}
    env["NO_COLOR"] = "1"
    env.update(extra)
    return env


def slow_cli(cwd: Path, *args: str, **env: str) -> Run:
    out = subprocess.run([sys.executable, "-c", SLOW_ENVELOPE, *args], cwd=cwd, capture_output=True, text=True,
                         timeout=300, env=_env(**env))
    return Run(out.returncode, out.stdout, out.stderr)


def cli(cwd: Path, *args: str, **env: str) -> Run:
    out = subprocess.run([sys.executable, "-m", "plantlint", *args], cwd=cwd, capture_output=True, text=True,
                         timeout=300, env=_env(**env))
    return Run(out.returncode, out.stdout, out.stderr)


@pytest.fixture()
def lift(tmp_path: Path) -> Path:
    (tmp_path / "lift_wrong.plant").write_text(LIFT.format(degree=1), encoding="utf-8")
    (tmp_path / "lift.plant").write_text(LIFT.format(degree=2), encoding="utf-8")
    return tmp_path


# -- 1 and 4: a stop keeps the completed stages and fails as not decided -----------------

def test_stop_keeps_completed_stages_decides_what_they_settle_and_fails(lift: Path) -> None:
    run = slow_cli(lift, "check", "--no-cache", "--timeout", "3", "--format", "json", "--output", "r.json",
                   "lift_wrong.plant")
    assert run.code == 1 and run.stderr == ""
    report = json.loads((lift / "r.json").read_text(encoding="utf-8"))
    jsonschema.validate(report, report_schema())
    (file,) = report["files"]
    assert file["plant"] == "lift"  # the header survives the stop
    assert file["analysis"]["relative_degree"] == {"y": 2}  # the completed stage is kept
    assert file["analysis"]["stages"]["completed"] == ["structure"]
    assert file["stop"]["kind"] == "time" and file["stop"]["stage"] == "envelope"
    assert file["stop"]["completed"] == ["structure"]
    by_message = {f["message"]: f for f in file["findings"]}
    wrong = by_message["`expect relative_degree(y) = 1` does not hold: the relative degree of 'y' is 2: the input 'F' "
                       "first enters its 2nd derivative, through L_g L_f y = 1"]
    assert wrong["decided"] is True  # settled by the structure stage although a later one stopped
    stopped = "the analysis stopped at its 3 s budget in stage envelope"
    for claim in ("expect regular", "expect minimum_phase"):
        f = by_message[f"`{claim}` not decided: {stopped}"]
        assert f["rule"] == "expectation-failed" and f["decided"] is False and f["severity"] == "error"
    (incomplete,) = [f for f in file["findings"] if f["rule"] == "analysis-incomplete"]
    assert incomplete["message"].startswith(f"could not be checked: {stopped}; completed: structure;")
    assert incomplete["line"] == 1 and incomplete["decided"] is False
    assert file["outcome"] == "defect"  # a defect found wins over not decided
    summary = report["summary"]
    assert (summary["not_checked"], summary["cut_short"], summary["not_decided"]) == (1, 1, 3)
    assert summary["errors"] == 1 and summary["outcome"] == "defect"
    # the one-line summary written beside a report file
    assert run.stdout.splitlines()[-1] == ("plantlint: error: not decided: 1 model could not be checked (1 cut short; "
                                           "budget 3 s per model, set explicitly), 2 claims not decided")


def _stopped_report(folder: Path, monkeypatch: pytest.MonkeyPatch, relaxation: Relaxation | None = None) -> Report:
    import plantlint.analysis.engine as engine

    def endless(*_a: object, **_k: object) -> None:
        while True:
            pass

    monkeypatch.setattr(engine, "certify_envelope", endless)  # forked workers inherit it
    config = Config(root=folder, timeout=2.0)
    defaults = {r.id: r.severity for r in load_catalogue()}
    files = check_targets([Target(folder / "lift.plant", "lift.plant")], config, defaults, jobs=1, use_cache=False,
                          cache_dir=None, show_progress=False)
    return Report(files=files, tool_version="0", relaxation=relaxation, budget=config.budget()[1])


def _render(report: Report, name: str) -> str:
    out = io.StringIO()
    get_formatter(name).render(report, out, color=False)
    return out.getvalue()


def test_not_decided_alone_is_its_own_outcome_in_every_format(lift: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    report = _stopped_report(lift, monkeypatch)
    assert report.fails() and report.failing() == []  # fails, but no defect was found
    assert report.outcome() == "not-decided"
    text = _render(report, "text")
    assert "lift.plant  plant lift  could not be checked: the analysis stopped at its 2 s budget in stage envelope" in text
    assert "checked 1 file: 0 errors, 0 warnings, 0 notes, 0 waived, 3 not decided" in text
    assert ("NOT DECIDED: 1 model could not be checked (1 cut short; budget 2 s per model, set explicitly), "
            "2 claims not decided") in text
    assert text.count("1 model could not be checked (1 cut short") == 1  # said once, by the verdict
    assert "PASSED" not in text
    lines = _render(report, "lines").splitlines()
    assert lines[0] == ("lift.plant:1:1: error: could not be checked: the analysis stopped at its 2 s budget in stage "
                        "envelope; completed: structure; not completed: envelope, points, zero dynamics, "
                        "linearisation, distributions, claims [analysis-incomplete]")
    assert lines[-1].startswith("plantlint: error: not decided: 1 model could not be checked")
    data = json.loads(_render(report, "json"))
    jsonschema.validate(data, report_schema())
    assert data["files"][0]["outcome"] == "not-decided" and data["summary"]["outcome"] == "not-decided"
    assert data["undecided"] == {"fail": True, "reason": None, "source": None}
    sarif = json.loads(_render(report, "sarif"))
    jsonschema.validate(sarif, json.loads(SARIF_SCHEMA.read_text(encoding="utf-8")))
    run = sarif["runs"][0]
    (invocation,) = run["invocations"]
    # OASIS SARIF 2.1.0: 3.20.14 executionSuccessful, 3.20.21 toolExecutionNotifications,
    # 3.27.9 kind "open" (could not determine) with level "none"
    assert invocation["executionSuccessful"] is False
    assert {n["associatedRule"]["id"] for n in invocation["toolExecutionNotifications"]} == {
        "analysis-incomplete", "expectation-failed"}
    assert all(n["level"] == "error" for n in invocation["toolExecutionNotifications"])
    assert all((r["kind"], r["level"]) == ("open", "none") for r in run["results"])


def test_relaxing_is_explicit_and_shown_in_every_format(lift: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    relaxed = Relaxation("nightly job re-checks with a longer budget", "plantlint.toml")
    report = _stopped_report(lift, monkeypatch, relaxed)
    assert not report.fails() and report.outcome() == "not-decided"
    shown = ("not-decided results do not fail this run ([undecided] fail = false in plantlint.toml): "
             "nightly job re-checks with a longer budget")
    text = _render(report, "text")
    assert shown in text and "PASSED" in text and "not decided but allowed by the configuration" in text
    lines = _render(report, "lines")
    assert f"plantlint: note: {shown}\n" in lines and "plantlint: note: not decided: " in lines
    assert lines.startswith("lift.plant:1:1: undecided: could not be checked")
    data = json.loads(_render(report, "json"))
    jsonschema.validate(data, report_schema())
    assert data["undecided"] == {"fail": False, "reason": relaxed.reason, "source": "plantlint.toml"}
    sarif = json.loads(_render(report, "sarif"))
    (invocation,) = sarif["runs"][0]["invocations"]
    assert invocation["properties"]["undecided"]["reason"] == relaxed.reason
    assert all(n["level"] == "warning" for n in invocation["toolExecutionNotifications"])


def test_relaxing_needs_a_reason_and_passes_the_run(lift: Path) -> None:
    with pytest.raises(ConfigError, match="say why"):
        from_table({"undecided": {"fail": False}}, lift / "plantlint.toml")
    with pytest.raises(ConfigError, match="only applies"):
        from_table({"undecided": {"reason": "x"}}, lift / "plantlint.toml")
    (lift / "plantlint.toml").write_text('[undecided]\nfail = false\nreason = "reviewed by hand"\n', encoding="utf-8")
    run = slow_cli(lift, "check", "--no-cache", "--timeout", "2", "--format", "lines", "lift.plant")
    assert run.code == 0 and run.stderr == ""
    assert "plantlint: note: not-decided results do not fail this run" in run.stdout
    assert "reviewed by hand" in run.stdout


def test_internal_error_is_not_decided_not_a_pass(tmp_path: Path) -> None:
    """A 1,500-deep chain of definitions stops the model reader (recursion)."""
    chain = ["plant deep", "state x in -1 .. 1", "input u", "let a0 = x"]
    chain += [f"let a{i} = sin(a{i - 1})" for i in range(1, 1500)]
    chain += ["rate x = a1499 + u", "output y = x", "expect regular"]
    (tmp_path / "deep.plant").write_text("\n".join(chain) + "\n", encoding="utf-8")
    run = cli(tmp_path, "check", "--no-cache", "--format", "json", "deep.plant")
    assert run.code == 1 and "Traceback" not in run.stderr
    (file,) = run.json()["files"]
    assert file["outcome"] == "not-decided" and file["stop"]["kind"] == "internal-error"
    assert file["plant"] == "deep"
    incomplete, claim = file["findings"]
    assert incomplete["rule"] == "analysis-incomplete"
    assert "could not be checked: the analysis stopped by an internal error" in incomplete["message"]
    # the model was never read: its claim is still named, as not decided
    assert claim["rule"] == "expectation-failed" and claim["decided"] is False
    assert claim["message"].startswith("`expect regular` not decided: the analysis stopped by an internal error")


def test_values_too_large_for_the_balls_are_not_decided_in_every_format(tmp_path: Path) -> None:
    """cosh(1e300*v) is defined for every v (a huge real number), so the model has no
    error; the balls cannot hold its values, so nothing can be analysed: the run is not
    decided, in the JSON (a stop of kind "values", valid against the schema) and in SARIF."""
    (tmp_path / "big.plant").write_text(
        "plant big\nstate v in -1 .. 1\ninput u in -1 .. 1\nrate v = -v + u*cosh(1e300*v)\noutput y = v\n"
        "expect relative_degree(y) = 1\n", encoding="utf-8")
    run = cli(tmp_path, "check", "--no-cache", "--format", "json", "big.plant")
    assert run.code == 1 and "Traceback" not in run.stderr
    report = run.json()
    jsonschema.validate(report, report_schema())
    (file,) = report["files"]
    assert file["outcome"] == "not-decided" and file["stop"]["kind"] == "values"
    assert [f["rule"] for f in file["findings"]] == ["analysis-incomplete", "expectation-failed"]
    assert all(f["decided"] is False for f in file["findings"])
    assert "the balls cannot tell whether it is undefined there" in file["findings"][0]["message"]
    sarif = cli(tmp_path, "check", "--no-cache", "--format", "sarif", "big.plant")
    assert sarif.code == 1
    data = sarif.json()
    jsonschema.validate(data, json.loads(SARIF_SCHEMA.read_text(encoding="utf-8")))
    (run_,) = data["runs"]
    # OASIS SARIF 2.1.0: 3.20.14 executionSuccessful, 3.27.9 kind "open" with level "none"
    assert run_["invocations"][0]["executionSuccessful"] is False
    assert all((r["kind"], r["level"]) == ("open", "none") for r in run_["results"])


@pytest.mark.parametrize("settings", [("--only", "unused-name"), ("--skip", "syntax"), ("--skip", "syntax,unknown-name")])
def test_a_model_whose_errors_are_left_out_of_the_report_is_not_a_pass(tmp_path: Path, settings: tuple[str, ...]) -> None:
    """A syntax error keeps the analysis from running: a selection that leaves the error
    out of the report must not turn "nothing was checked" into a pass."""
    (tmp_path / "lift.plant").write_text(LIFT.format(degree=2) + "rate = = (\n", encoding="utf-8")
    run = cli(tmp_path, "check", "--no-cache", "--format", "json", *settings, "lift.plant")
    assert run.code == 1, run.stdout
    (file,) = run.json()["files"]
    assert file["findings"] == [] and file["outcome"] == "not-decided"
    assert file["stop"] == {"kind": "blocked", "stage": None, "completed": [], "detail": file["stop"]["detail"]}
    assert "has errors that stop it (syntax at line" in file["stop"]["detail"]
    jsonschema.validate(run.json(), report_schema())


def test_a_model_whose_errors_are_re_graded_is_not_a_pass(tmp_path: Path) -> None:
    (tmp_path / "lift.plant").write_text(LIFT.format(degree=2) + "rate = = (\n", encoding="utf-8")
    (tmp_path / "plantlint.toml").write_text(
        '[severity.syntax]\nlevel = "note"\nreason = "a test of re-grading (invented)"\n', encoding="utf-8")
    run = cli(tmp_path, "check", "--no-cache", "--format", "lines", "lift.plant")
    assert run.code == 1, run.stdout
    assert "note: unexpected '='" in run.stdout and "lift.plant: error: could not be checked" in run.stdout
    # re-graded, but still at or above the run's fail level: shown and failing, not a stop
    run = cli(tmp_path, "check", "--no-cache", "--format", "json", "--fail-on", "note", "lift.plant")
    assert run.code == 1
    (file,) = run.json()["files"]
    assert file["stop"] is None and file["outcome"] == "defect"
    # shown and failing as usual, the same model is a defect, not a stop
    (tmp_path / "plantlint.toml").unlink()
    plain = cli(tmp_path, "check", "--no-cache", "--format", "json", "lift.plant")
    assert plain.code == 1
    (file,) = plain.json()["files"]
    assert file["stop"] is None and file["outcome"] == "defect" and [f["rule"] for f in file["findings"]] == ["syntax"]


def test_a_claim_about_an_output_with_feedthrough_is_not_decided_even_when_waived(tmp_path: Path) -> None:
    """An output that uses an input is read with the input at zero (output-uses-input says
    so). With that error waived, a relative-degree claim about it once passed, held
    against y = x instead of y = x + u/10 (whose relative degree is 0: the input reaches it
    without integration). Claims about such an output are not decided; state
    linearizability, a property of f and g alone, is still decided. Invented lag."""
    (tmp_path / "feed.plant").write_text("""plant feed "invented: a lag whose sensor also sees the drive"
state x in -1 .. 1
input u in -1 .. 1
rate x = -2*x + u
output y = x + 0.1*u
point rest: x = 0
expect relative_degree(y) = 1
expect regular
expect state_linearizable
waive output-uses-input "sensor sees the drive; the observer handles it (test)"
""", encoding="utf-8")
    run = cli(tmp_path, "check", "--no-cache", "--format", "json", "feed.plant")
    assert run.code == 1, run.stdout
    (file,) = run.json()["files"]
    assert file["outcome"] == "not-decided"
    claims = {f["message"].split("`")[1]: f for f in file["findings"] if f["rule"] == "expectation-failed"}
    assert sorted(claims) == ["expect regular", "expect relative_degree(y) = 1"]
    assert all(c["decided"] is False and "output 'y' uses an input (feedthrough" in c["message"]
               for c in claims.values())
    jsonschema.validate(run.json(), report_schema())


def _unproven_zero_model() -> str:
    """Invented: the input enters the first rate through sin(2 x2) - 2 sin(x2) cos(x2), a
    zero written so that the symbolic proof exceeds its size bound (a 64-term factor over
    a symbolic denominator)."""
    factor = " + ".join(f"{i + j + 1}*x1^{i}*x2^{j}" for i in range(8) for j in range(8))
    return f"""plant unproven "invented: an input term that is zero by the double-angle identity"
state x1 in -1 .. 1
state x2 in -1 .. 1
input u in -1 .. 1
rate x1 = x2 + u*(sin(2*x2) - 2*sin(x2)*cos(x2))*({factor})/(2 + x2^2)
rate x2 = -x1 + u
output y = x1
point rest: x1 = 0, x2 = 0
expect relative_degree(y) = 2
expect regular
"""


def test_a_claim_resting_on_an_unproven_zero_is_not_decided(tmp_path: Path) -> None:
    """The relative degree 2 holds only if L_g y is identically zero; every numeric test
    says so, the symbolic proof does not finish within its bound: the claims that hold on
    it are not decided, and the run fails."""
    # the zero is real (double-angle identity, Abramowitz & Stegun 4.3.24, from memory),
    # checked here by sympy's trigonometric expansion, a route plantlint does not take
    x2 = sp.Symbol("x2", real=True)
    assert sp.expand_trig(sp.sin(2 * x2) - 2 * sp.sin(x2) * sp.cos(x2)) == 0
    (tmp_path / "unproven.plant").write_text(_unproven_zero_model(), encoding="utf-8")
    run = cli(tmp_path, "check", "--no-cache", "--format", "json", "unproven.plant")
    assert run.code == 1 and "Traceback" not in run.stderr
    (file,) = run.json()["files"]
    assert file["outcome"] == "not-decided" and file["stop"] is None
    assert file["analysis"]["unconfirmed_zero_tests"] == 1
    budget = [f for f in file["findings"] if f["rule"] == "analysis-budget"]
    assert len(budget) == 1 and "L_g y vanishes identically" in budget[0]["message"]
    claims = {f["message"].split("`")[1]: f for f in file["findings"] if f["rule"] == "expectation-failed"}
    assert set(claims) == {"expect relative_degree(y) = 2", "expect regular"}
    for claim in claims.values():
        assert claim["decided"] is False
        assert "holds only if an expression that is zero at every sampled point is zero identically" in claim["message"]


def test_a_failure_found_on_an_unproven_zero_is_not_decided_either() -> None:
    """The same unproven zero: a claim that fails on the structure built on it (relative
    degree 1 expected, 2 found only if L_g y is zero) is not a defect found, and an output
    that the inputs seem never to reach through it is not reported as a fact."""
    from plantlint.run.pipeline import analyse_bytes

    text = _unproven_zero_model().replace("expect relative_degree(y) = 2", "expect relative_degree(y) = 1")
    raw = analyse_bytes(text.encode())
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed" and "relative_degree" in f.message]
    assert claim.undecided
    assert claim.message.startswith("`expect relative_degree(y) = 1` not decided: the relative degree of 'y' is 2: the "
                                    "input 'u' first enters its 2nd derivative, through L_g L_f y")
    assert ", if an expression that is zero at every sampled point is zero identically" in claim.message
    # the input reaches x2 only through the unproven zero, and y = x1 sees x2 one step later
    unreached = (text.replace("rate x1 = x2 + u*", "rate x1 = x2\nlet z = ")
                 .replace("rate x2 = -x1 + u", "rate x2 = -x1 + u*z"))
    raw = analyse_bytes(unreached.encode())
    (undefined,) = [f for f in raw.findings if f.rule == "relative-degree-undefined"]
    assert undefined.undecided and "could not be proven zero identically" in undefined.message


# -- 4: display-only steps are bounded; the reproducer fails both claims -------------------

def test_slow_normal_form_reproducer_fails_both_claims(tmp_path: Path) -> None:
    (tmp_path / "slow_nf.plant").write_text(SLOW_NF, encoding="utf-8")
    run = cli(tmp_path, "check", "--no-cache", "--timeout", "120", "--format", "json", "slow_nf.plant")
    assert run.code == 1 and run.stderr == ""
    (file,) = run.json()["files"]
    assert file["stop"] is None and file["outcome"] == "defect"
    claims = sorted(f["message"] for f in file["findings"] if f["rule"] == "expectation-failed")
    assert claims == [
        "`expect minimum_phase` does not hold: at point 'p0' the linearised zero dynamics have eigenvalues on the "
        "imaginary axis (0); linearisation cannot show asymptotic stability",
        "`expect relative_degree(y) = 1` does not hold: the relative degree of 'y' is 2: the input 'u' first enters "
        "its 2nd derivative, through L_g L_f y",
    ]
    assert all(f["decided"] for f in file["findings"])
    nf = file["analysis"]["points"]["p0"]["normal_form"]
    # check never solves for the symbolic zero dynamics (display only): explain does, within its bound
    assert nf["zero_dynamics"] is None and nf["note"] == WRITTEN_BY_EXPLAIN
    out = io.StringIO()
    # the same budget as the check above (the default interactive 20 s is not what this tests)
    code = explain_file(tmp_path / "slow_nf.plant", None, "json", out, color=False, timeout=120)
    shown_report = json.loads(out.getvalue())
    assert code == 0, (shown_report.get("stop"), [(f["rule"], f["message"][:120]) for f in shown_report["findings"]])
    (p0,) = shown_report["points"]
    shown = p0["normal_form"]
    assert shown["zero_dynamics"] or shown["note"].startswith("the zero dynamics were not written out")

    # Independent reference, plain sympy (derivatives by hand rules, not plantlint's kernel):
    # y = x3, y' = L_f y (no u): relative degree > 1; L_g L_f y = d(L_f y)/dx2 * 1
    # = 2/(x1^2+1) - 8 x2/(2 x2^2+1)^2 - 5/4 (1 - x2^2)/(x2^2+1)^2, which at p0 is 1 - 5/4 = -1/4.
    x1, x2, x3, u = sp.symbols("x1 x2 x3 u")
    f3 = 2 * x2 / (x1**2 + 1) + 1 / (2 * (2 * x2**2 + 1)) - 5 * x2 / (4 * (x2**2 + 1)) - sp.Rational(1, 2)
    rates = [-x2, u - 2 * x3 - 2, f3]
    states = [x1, x2, x3]
    ydot = sum(sp.diff(x3, s) * r for s, r in zip(states, rates))
    assert sp.diff(ydot, u) == 0
    yddot = sum(sp.diff(ydot, s) * r for s, r in zip(states, rates))
    p0 = {x1: -1, x2: 0, x3: -1, u: 0}
    assert sp.simplify(sp.diff(yddot, u).subs(p0)) == sp.Rational(-1, 4)
    # zero dynamics, linearised: the transmission zero of C (sI - A)^-1 B at p0 (the zeros of
    # the linearisation are the eigenvalues of the linearised zero dynamics; Isidori,
    # Nonlinear Control Systems 3rd ed., Remark 4.3.2, from memory): a single zero at s = 0
    A = sp.Matrix(rates).jacobian(states).subs(p0)
    B = sp.Matrix(rates).jacobian([u]).subs(p0)
    C = sp.Matrix([[0, 0, 1]])
    s = sp.symbols("s")
    numerator = sp.numer(sp.together((C * (s * sp.eye(3) - A).adjugate() * B)[0]))
    assert sp.roots(sp.Poly(numerator, s)) == {0: 1}


# -- 2: workers never outlive the run ----------------------------------------------------

def _children(pid: int) -> list[int]:
    out = []
    for entry in Path("/proc").iterdir():
        if not entry.name.isdigit():
            continue
        try:
            stat = (entry / "stat").read_text()
        except OSError:
            continue
        fields = stat[stat.rindex(")") + 2:].split()
        if int(fields[1]) == pid:
            out.append(int(entry.name))
    return out


def _alive(pid: int) -> bool:
    try:
        stat = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return False
    return stat[stat.rindex(")") + 2:].split()[0] != "Z"


def _interruptible() -> None:
    """In the child before it starts: Ctrl-C as in a terminal. A test run started in the
    background of a shell without job control inherits SIGINT ignored (POSIX), and Python
    then leaves it ignored, so the run under test would never see the signal."""
    signal.signal(signal.SIGINT, signal.SIG_DFL)


def _start_slow_run(folder: Path) -> tuple[subprocess.Popen[str], list[int]]:
    proc = subprocess.Popen([sys.executable, "-c", SLOW_ENVELOPE, "check", "--no-cache", "--jobs", "2",
                             "--timeout", "600", "lift.plant", "lift_wrong.plant"], cwd=folder, env=_env(),
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, start_new_session=True,
                            preexec_fn=_interruptible)
    deadline = time.monotonic() + 120
    workers: list[int] = []
    while time.monotonic() < deadline and len(workers) < 2:
        time.sleep(0.2)
        workers = _children(proc.pid)
    assert len(workers) == 2, "the workers did not start"
    time.sleep(0.5)  # let them settle into the endless stage
    return proc, workers


def _gone_soon(pids: list[int], seconds: float = 5.0) -> bool:
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline:
        if not any(_alive(p) for p in pids):
            return True
        time.sleep(0.1)
    return False


@pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="needs /proc to find the workers")
@pytest.mark.parametrize("sig, code, word", [(signal.SIGTERM, 143, "terminated"), (signal.SIGINT, 130, "interrupted")])
def test_a_signal_to_the_parent_ends_the_run_and_every_worker(lift: Path, sig: int, code: int, word: str) -> None:
    proc, workers = _start_slow_run(lift)
    if sig == signal.SIGINT:
        os.killpg(proc.pid, sig)  # Ctrl-C in a terminal reaches the whole process group
    else:
        os.kill(proc.pid, sig)
    stdout, stderr = proc.communicate(timeout=60)
    assert proc.returncode == code
    assert stdout == "" and stderr == f"plantlint: {word}; workers stopped, no report written\n"
    assert _gone_soon(workers)


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="parent-death signal is Linux only")
def test_workers_end_when_the_parent_is_killed(lift: Path) -> None:
    proc, workers = _start_slow_run(lift)
    os.kill(proc.pid, signal.SIGKILL)  # no cleanup at all in the parent
    proc.communicate(timeout=60)
    assert _gone_soon(workers)


GUARDED = """
import os, sys
from plantlint.run import runner
runner.guard_worker(os.getppid(), float(sys.argv[1]))
if sys.argv[2] == "python":
    while True:
        pass
sum(range(10**13))  # one long call in C: the watchdog thread cannot run
"""


@pytest.mark.skipif(sys.platform == "win32", reason="POSIX limits")
def test_a_worker_enforces_its_own_budget_without_the_parent() -> None:
    from plantlint.run.runner import EXIT_OVER_BUDGET

    watchdog = subprocess.run([sys.executable, "-c", GUARDED, "0.5", "python"], timeout=120, env=_env())
    assert watchdog.returncode == EXIT_OVER_BUDGET
    backstop = subprocess.run([sys.executable, "-c", GUARDED, "0.5", "c"], timeout=120, env=_env())
    assert backstop.returncode == -signal.SIGXCPU  # RLIMIT_CPU: budget + grace + 2 s of CPU


# -- 3: budgets per use --------------------------------------------------------------------

def test_budget_defaults_per_use_and_overrides() -> None:
    config = Config()
    assert config.budget({}) == (20.0, "20 s per model, interactive profile (CI runs get 120 s)")
    assert config.budget({"CI": "true"}) == (120.0, "120 s per model, CI profile, the CI variable is set")
    assert config.budget({"CI": "false"})[0] == 20.0
    ci = from_table({"profile": "ci", "timeout-ci": 300}, Path("plantlint.toml"))
    assert ci.budget({}) == (300.0, "300 s per model, CI profile")
    fixed = from_table({"timeout": 7, "profile": "ci"}, Path("plantlint.toml"))
    assert fixed.budget({"CI": "1"}) == (7.0, "7 s per model, set explicitly")
    with pytest.raises(ConfigError, match="profile"):
        from_table({"profile": "nightly"}, Path("plantlint.toml"))


def test_help_documents_budgets_and_exit_codes(tmp_path: Path) -> None:
    run = cli(tmp_path, "check", "--help")
    text = " ".join(run.stdout.split())
    assert "--profile" in text and "20 s in an interactive or pre-commit run, 120 s in CI" in text
    assert "130 interrupted" in text and "143 terminated" in text and "not decided" in text


def test_claims_of_a_model_not_read_are_found_as_the_parser_finds_them() -> None:
    """A stop before the model was read still names every claim not decided, at the same
    place and with the same identity as the claims of the parsed model."""
    from plantlint.run.pipeline import claims_in_text, read_model

    text = LIFT.format(degree=2) + "point high: p = 1/2, v = 0, F = 1/2\n  expect relative_degree(y) = 2 at high  # ok\n"
    model, _ = read_model(text.encode())
    found = claims_in_text(text.encode())
    assert [(f.anchor, f.span, f.point) for f in found] == [(c.anchor, c.span, c.point) for c in model.claims]
    assert [f.message for f in found] == ["`expect relative_degree(y) = 2` not decided", "`expect regular` not decided",
                                          "`expect minimum_phase` not decided",
                                          "`expect relative_degree(y) = 2 at high` not decided"]


def test_markdown_summary_counts_models_and_claims_not_decided(lift: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    report = _stopped_report(lift, monkeypatch)
    text = _render(report, "markdown")
    assert "### plantlint — FAILED" in text
    assert ("**Not decided: 1 model could not be checked (1 cut short; budget 2 s per model, set explicitly), "
            "2 claims not decided.**") in text


def test_a_stop_after_the_last_stage_says_so() -> None:
    """A budget that runs out once every stage has finished (while the results are put
    together) is still a stop, worded as what happened rather than 'in stage None'."""
    from plantlint.analysis.stages import STAGES
    from plantlint.run.pipeline import RawResult, stopped

    snapshot = RawResult(plant="lift", stages=list(STAGES))
    raw = stopped(snapshot, "time", list(STAGES), tuple(STAGES), 0.3)
    (incomplete,) = [f for f in raw.findings if f.rule == "analysis-incomplete"]
    assert "stopped at its 0.3 s budget after its last stage, while its results were put together" in incomplete.message
    assert "not completed: none" in incomplete.message and raw.stop is not None


def test_claims_at_a_point_that_misses_a_state_say_so_even_when_it_is_waived(tmp_path: Path) -> None:
    """Invented: a point without the speed, its point-incomplete error waived. The claims at
    it still fail (nothing is known there), and they say why instead of calling the point
    'not an equilibrium' or its structure 'not computed'."""
    (tmp_path / "inc.plant").write_text("""plant inc "invented: a point missing a state"
state x in -1 .. 1
state v in -1 .. 1
input u in -1 .. 1
rate x = v
rate v = -x + u*(1 + v^2)
output y = x
point rest: x = 0
expect regular at rest
expect minimum_phase at rest
waive point-incomplete "testing the claims' wording (invented)"
""", encoding="utf-8")
    run = cli(tmp_path, "check", "--no-cache", "--format", "json", "inc.plant")
    assert run.code == 1, run.stdout
    (file,) = run.json()["files"]
    claims = [f["message"] for f in file["findings"] if f["rule"] == "expectation-failed"]
    assert claims == [
        "`expect regular at rest` does not hold: at point 'rest' not every state is given (see the point-incomplete "
        "finding)",
        "`expect minimum_phase at rest` does not hold: 'rest' does not give every state, so the zero dynamics are "
        "not defined there (see the point-incomplete finding)"]
