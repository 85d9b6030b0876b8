"""`plantlint explain`: the derivation report, checked against physics the reader knows."""

from __future__ import annotations

import io
import json
import math
import subprocess
import sys
import time
from pathlib import Path

from plantlint.cli import explain_file
from plantlint.report.explain import name_subexpressions
from conftest import FIXTURES, REPO

SAMPLE = FIXTURES / "models" / "contract_sample.plant"


def _explain(fmt: str, point: str | None = None) -> str:
    out = io.StringIO()
    assert explain_file(SAMPLE, point, fmt, out, color=False) == 0
    return out.getvalue()


def test_json_report_of_the_contract_sample() -> None:
    data = json.loads(_explain("json"))
    assert data["relative_degree"] == {"y": 2}
    # the first non-zero entry of the L_g L_f^k y table is at k = 1 (relative degree 2)
    assert [row["k"] for row in data["lie_derivatives"] if row["expr"] != "0"] == [1]
    (rest,) = data["points"]
    assert rest["equilibrium"] and rest["well_defined"]
    assert rest["normal_form"]["xi"] == ["x", "v"]
    zd = rest["zero_dynamics"]
    assert zd["verdict"] == "critical" and zd["dimension"] == 2
    # Holding the trolley still leaves a simple pendulum: omega = sqrt(g/L)
    # (any mechanics text; g = 9.81, L = 2.2 from the file).
    omega = math.sqrt(9.81 / 2.2)
    assert f"±{omega:.6g}i" in zd["eigenvalues"]
    # ... whose characteristic polynomial is s^2 + g/L, g/L = 9.81/2.2 = 981/220, written with ^ as
    # the linearisation's is
    assert zd["characteristic_polynomial"] == "s^2 + 981/220"
    assert "^" in rest["linearisation"]["characteristic_polynomial"]
    waived = [f for f in data["findings"] if f["waived"]]
    assert [f["rule"] for f in waived] == ["zero-dynamics-critical"]


def test_text_report_has_every_section_and_no_markup_loss() -> None:
    text = _explain("text")
    for section in ("Relative degree", "Envelope", "Distributions", "Point rest", "Findings"):
        assert section in text
    assert "[g, ad_f g]" in text  # brackets are data, never terminal markup
    assert "\x1b[" not in text
    assert "structure, not safety" in text


def test_point_filter_and_unknown_point() -> None:
    data = json.loads(_explain("json", "rest"))
    assert [p["name"] for p in data["points"]] == ["rest"]
    out, err = io.StringIO(), io.StringIO()
    assert explain_file(SAMPLE, "nowhere", "text", out, color=False, errors=err) == 2
    assert out.getvalue() == "" and "has no point 'nowhere' (its points: rest)" in err.getvalue()


def _cli(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "plantlint", "explain", *args], capture_output=True, text=True,
                          cwd=cwd, timeout=300)


def test_cli_explain_unknown_point_is_a_usage_error_on_standard_error() -> None:
    run = _cli(str(SAMPLE), "--point", "nope")
    assert run.returncode == 2 and run.stdout == ""
    assert run.stderr.startswith("plantlint: error: ") and "'nope'" in run.stderr


def test_cli_explain_of_a_folder_names_its_models(tmp_path: Path) -> None:
    (tmp_path / "line").mkdir()
    for name in ("line/a.plant", "b.plant"):
        (tmp_path / name).write_text(SAMPLE.read_text(encoding="utf-8"), encoding="utf-8")
    run = _cli(str(tmp_path))
    assert run.returncode == 2 and run.stdout == ""
    assert "is a folder; explain needs one model file (models here: b.plant, line/a.plant)" in run.stderr
    assert "no such file" not in run.stderr


def test_cli_explain_honours_only_and_skip() -> None:
    rules = lambda run: [f["rule"] for f in json.loads(run.stdout)["findings"]]  # noqa: E731
    everything = _cli(str(SAMPLE), "--format", "json")
    assert everything.returncode == 0 and "zero-dynamics-critical" in rules(everything)
    skipped = _cli(str(SAMPLE), "--format", "json", "--skip", "zero-dynamics-critical")
    assert skipped.returncode == 0 and "zero-dynamics-critical" not in rules(skipped)
    only = _cli(str(SAMPLE), "--format", "json", "--only", "zero-dynamics-critical")
    assert set(rules(only)) == {"zero-dynamics-critical"}
    bad = _cli(str(SAMPLE), "--skip", "no-such-rule")
    assert bad.returncode == 2 and "no-such-rule" in bad.stderr and bad.stdout == ""


def test_cli_explain_on_a_broken_model(tmp_path: Path) -> None:
    bad = tmp_path / "bad.plant"
    bad.write_text("plant p\nstate x\nrate x = y\n", encoding="utf-8")
    run = subprocess.run([sys.executable, "-m", "plantlint", "explain", str(bad)], capture_output=True, text=True)
    assert run.returncode == 1
    assert "unknown name 'y'" in run.stdout and "Traceback" not in run.stderr


def test_explain_never_passes_escape_sequences_from_the_file(tmp_path: Path) -> None:
    """The title, a waiver's reason and a broken model's message are file text: the terminal
    gets them with control characters made visible, with colour or without."""
    model = tmp_path / "esc.plant"
    model.write_text('plant esc "title \x1b[31mRED \x1b]0;renamed\x07 end"\nstate x\ninput u\nrate x = -x + u\n'
                     'output y = x\npoint rest: x = 0\nwaive zero-dynamics-critical "why \x1b[2J"\n', encoding="utf-8")
    for color in (False, True):
        out = io.StringIO()
        explain_file(model, None, "text", out, color=color)
        shown = out.getvalue()
        assert "\x1b[31mRED" not in shown and "\x1b]0;" not in shown and "\x07" not in shown
        assert "\x1b[2J" not in shown
        assert "?[31mRED" in shown
    broken = tmp_path / "broken.plant"
    broken.write_text('plant b "\x1b[31m"\nstate x\nrate x = \x1b[2J\n', encoding="utf-8")
    out = io.StringIO()
    explain_file(broken, None, "text", out, color=False)
    assert "\x1b" not in out.getvalue()


def test_common_subexpressions_are_named_only_when_shorter() -> None:
    import sympy as sp

    x, y = sp.symbols("x y")
    defs, shown = name_subexpressions([x + 1, y])
    assert defs == [] and shown == ["1 + x", "y"]
    big = sp.sin(x * y + sp.cos(x)) ** 2 * sp.exp(x - y**2) / (3 + sp.tanh(x * y))
    defs, shown = name_subexpressions([big / (1 + big), big * x, big + y])
    assert defs and any(name in s for name, _ in defs for s in shown)
    assert sum(map(len, shown)) < 3 * len(str(big))


STALLED_ENVELOPE = """
import sys
import plantlint.analysis.engine as engine

def endless(*args, **kwargs):
    while True:  # stands in for a runaway envelope proof
        pass

engine.certify_envelope = endless  # forked workers inherit it
from plantlint.cli import main
sys.exit(main(sys.argv[1:]))
"""


def test_explain_runs_under_the_budget_and_says_it_was_cut_short(tmp_path: Path) -> None:
    """explain goes through the worker and its budget: a stop keeps the completed stages,
    says that the report was cut short, lists the analysis-incomplete finding and fails."""
    model = tmp_path / "sample.plant"
    model.write_text(SAMPLE.read_text(encoding="utf-8"), encoding="utf-8")
    (tmp_path / "plantlint.toml").write_text("timeout = 6\n", encoding="utf-8")  # room for the structure stage on a busy machine
    script = tmp_path / "stalled.py"
    script.write_text(STALLED_ENVELOPE, encoding="utf-8")
    run = subprocess.run([sys.executable, str(script), "explain", str(model)], capture_output=True, text=True,
                         cwd=tmp_path, timeout=120)
    assert run.returncode == 1, run.stderr
    text = run.stdout
    assert "CUT SHORT: the analysis stopped at its 6 s budget in stage envelope" in text
    assert "completed: structure;" in text
    assert "y: relative degree 2" in text  # the structure stage completed and is shown
    assert "not computed: the analysis was cut short before the stage 'envelope' completed" in text
    assert "analysis-incomplete" in text and "Traceback" not in run.stderr
    data = subprocess.run([sys.executable, str(script), "explain", str(model), "--format", "json"],
                          capture_output=True, text=True, cwd=tmp_path, timeout=120)
    assert data.returncode == 1
    report = json.loads(data.stdout)
    assert report["stop"]["kind"] == "time" and report["completed"] == ["structure"]
    assert report["relative_degree"] == {"y": 2} and report["points"] == []
    assert "analysis-incomplete" in [f["rule"] for f in report["findings"]]


def test_a_derivation_too_long_to_write_out_is_left_out_with_a_note(tmp_path: Path, monkeypatch) -> None:
    """The symbolic Lie derivatives are display only: when they do not finish within their
    bound, explain shows the relative degree and every later section, with a note. A bound
    of a millisecond stands in for a chain whose tower is too long to print."""
    import plantlint.analysis.serialise as serialise

    real = serialise._symbolic_derivation

    def slow_derivation(a: object) -> object:  # the bound runs out whatever the host's speed
        time.sleep(2.0)
        return real(a)

    monkeypatch.setattr(serialise, "_symbolic_derivation", slow_derivation)
    monkeypatch.setattr(serialise, "DERIVATION_SECONDS", 0.001)
    model = REPO / "benchmarks" / "results" / "models" / "pendulum_chain_4.plant"
    out = io.StringIO()
    assert explain_file(model, None, "json", out, color=False) == 0
    data = json.loads(out.getvalue())
    assert data["lie_derivatives"] == [] and data["derivation_note"].startswith(
        "the Lie derivatives are not written out: their symbolic forms did not finish within 0.001 s")
    # the structure itself is the analysis': relative degree 2n = 8 (input at the base, tip
    # angle measured: two integrations per link; common practice for chains, from memory)
    assert data["relative_degree"] == {"tip": 8}
    assert data["completed"][-1] == "claims"
    # long spans are written as by hand
    assert data["distributions"]["spans"][7] == "D_7 = span{g, ad_f g, ..., ad_f^7 g}"
    assert data["distributions"]["spans"][2] == "D_2 = span{g, ad_f g, ad_f^2 g}"


def test_singular_envelope_line_reads_as_a_sentence() -> None:
    """The lid press's crank term vanishes at the bottom dead centre (th = 0); explain says
    what vanishes where in one sentence, and counts its boxes in good English."""
    out = io.StringIO()
    explain_file(REPO / "example_repo" / "models" / "forming" / "lid_press.plant", None, "text", out, color=False)
    (line,) = [ln for ln in out.getvalue().splitlines() if ln.strip().startswith("singular")]
    assert line.strip().startswith("singular: L_g L_f ram vanishes at th = 0")
    assert "1 boxes" not in line


def test_explain_takes_the_budget_and_configuration_as_check_does(tmp_path: Path) -> None:
    """--timeout and --config mean on explain what they mean on check: a 16-state chain
    with a 0.2 s budget is cut short (exit 1, said); a budget that is not a positive number
    and a configuration file that does not exist are usage errors (exit 2)."""
    chain = REPO / "benchmarks" / "results" / "models" / "dense_chain_16.plant"
    out, err = io.StringIO(), io.StringIO()
    assert explain_file(chain, None, "text", out, color=False, errors=err, timeout=0.2) == 1
    assert "0.2 s budget" in out.getvalue() and "cut short" in out.getvalue()
    assert explain_file(SAMPLE, None, "text", io.StringIO(), color=False, errors=err, timeout=-1) == 2
    assert "--timeout must be a positive" in err.getvalue()
    config = tmp_path / "plantlint.toml"
    config.write_text("timeout = 0.2\n", encoding="utf-8")
    out = io.StringIO()
    assert explain_file(chain, None, "text", out, color=False, errors=err, config_file=config) == 1
    assert "0.2 s budget" in out.getvalue()
    assert explain_file(SAMPLE, None, "text", io.StringIO(), color=False, errors=err,
                        config_file=tmp_path / "missing.toml") == 2


TRIG = """plant trig "an input gain that is zero by sin^2 + cos^2 = 1 (invented)"
state x1 in -1 .. 1
state x2 in -1 .. 1
input u in -1 .. 1
rate x1 = x2 + u*(sin(x2)^2 + cos(x2)^2 - 1)
rate x2 = -x1 + u
output y = x1
"""


def test_an_entry_taken_as_zero_is_shown_as_zero_with_the_form_it_was_formed_in(tmp_path: Path) -> None:
    import sympy as sp

    # reference, sympy's own simplification: the input gain of x1 is zero identically
    x2 = sp.Symbol("x2", real=True)
    assert sp.simplify(sp.sin(x2) ** 2 + sp.cos(x2) ** 2 - 1) == 0
    model = tmp_path / "trig.plant"
    model.write_text(TRIG, encoding="utf-8")
    out = io.StringIO()
    explain_file(model, None, "json", out, color=False)
    (row0,) = [r for r in json.loads(out.getvalue())["lie_derivatives"] if r["k"] == 0]
    assert row0["zero"] == "proven" and row0["expr"] != "0"
    out = io.StringIO()
    explain_file(model, None, "text", out, color=False)
    assert "L_g y             0  (identically; as formed: " in out.getvalue()


def test_a_regular_envelope_without_a_margin_says_why(tmp_path: Path) -> None:
    """L_g L_f y = (x + 2)/(1 + x^2) (by hand) is proven non-zero factor by factor; its
    margin needs a bound of 1 + x^2 from above, which is not computed: say so, not nothing."""
    model = tmp_path / "q.plant"
    model.write_text("plant q\nstate x in -1 .. 1\nstate v in -1 .. 1\ninput u in -1 .. 1\nrate x = v\n"
                     "rate v = u*(x + 2)/(1 + x^2)\noutput y = x\n", encoding="utf-8")
    out = io.StringIO()
    explain_file(model, None, "text", out, color=False)
    (line,) = [ln for ln in out.getvalue().splitlines() if "proven regular" in ln]
    assert "no margin stated (the term is proven non-zero factor by factor; a lower bound of its size would also need an upper bound of its denominator" in line


def test_explain_says_singular_everywhere_rather_than_at_a_point(tmp_path: Path) -> None:
    """Invented: three outputs, two inputs. The 3 x 2 decoupling matrix has rank at most 2
    (linear algebra), so no vector relative degree exists at any state: the envelope line
    says so, not "vanishes at" the envelope's centre."""
    model = tmp_path / "wide.plant"
    model.write_text("plant wide\nstate x1 in -1 .. 1\nstate x2 in -1 .. 1\nstate x3 in -1 .. 1\ninput u1\n"
                     "input u2\nrate x1 = u1\nrate x2 = u2\nrate x3 = u1 + u2\noutput y1 = x1\noutput y2 = x2\n"
                     "output y3 = x3\n", encoding="utf-8")
    out = io.StringIO()
    explain_file(model, None, "text", out, color=False)
    text = out.getvalue()
    assert "singular everywhere: the decoupling matrix is singular for every state" in text
    assert "generic structure vanishes" not in text



def test_explain_says_which_null_vectors_are_quantities_and_which_are_directions() -> None:
    """An invented linear plant: two integrators driven by u1, u2 and a decaying x3 that no
    input reaches, seen through y = x1 + x2. The quantity x3 cannot be changed by the inputs
    (a left null vector of [B, AB, A^2 B]); the state can move along x1 - x2 or x3 unseen
    (null vectors of [C; CA; CA^2]). The two are written alike, so the labels say which is
    which. Reference: numpy's null spaces of the same matrices."""
    import tempfile

    import numpy as np

    text = b"""plant pair
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in -1 .. 1
input u1
input u2
rate x1 = u1
rate x2 = u2
rate x3 = -x3
output y = x1 + x2
point rest: x1 = 0, x2 = 0, x3 = 0
"""
    A = np.diag([0.0, 0.0, -1.0])
    B = np.array([[1.0, 0.0], [0.0, 1.0], [0.0, 0.0]])
    C = np.array([[1.0, 1.0, 0.0]])
    kalman = np.hstack([B, A @ B, A @ A @ B])
    observability = np.vstack([C, C @ A, C @ A @ A])
    assert np.allclose(np.array([0.0, 0.0, 1.0]) @ kalman, 0)  # x3: a quantity no input changes
    for v in ([1.0, -1.0, 0.0], [0.0, 0.0, 1.0]):  # directions the output cannot see
        assert np.allclose(observability @ np.array(v), 0)
    out = io.StringIO()
    with tempfile.TemporaryDirectory() as folder:
        model = Path(folder) / "pair.plant"
        model.write_bytes(text)
        explain_file(model, None, "text", out, color=False)
    shown = out.getvalue()
    assert "uncontrollable (quantities the inputs cannot change): x3" in shown
    unseen = [ln.split("cannot see): ")[1].split("  (")[0] for ln in shown.splitlines()
              if "unobservable (state directions the outputs cannot see)" in ln]
    assert sorted(unseen) == ["x1 - x2", "x3"], shown  # one line per mode (s = 0, s = -1)
