"""``plantlint plot``: envelope slices and zero-dynamics traces.

The crossings are held against closed forms of invented linear(ised) families whose
transmission zeros are computed independently with scipy.signal (the zeros of a
square linear plant are the eigenvalues of its zero dynamics); the slice samples
against numpy's own sine. The models are invented for these tests.
"""

from __future__ import annotations

import subprocess
import sys
import warnings
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest
from scipy import signal

from plantlint.cli import main
from plantlint.kernel.lie import Kernel
from plantlint.analysis.structure import analyse_structure
from plantlint.language.model import build_model
from plantlint.language.syntax import parse_text
from plantlint.report.plots import envelope_slice, plot_model, zero_dynamics_trace

# drawing needs the plot extra; the computations and the two import tests do not
needs_matplotlib = pytest.mark.skipif(__import__("importlib").util.find_spec("matplotlib") is None,
                                      reason='needs the plot extra: pip install -e ".[plot]"')

# Zero dynamics (y = x held at 0, u = -z1): z1' = z2, z2' = -4 z1 + (c - 3/10) z2,
# eigenvalues ((c - 3/10) +- sqrt((c - 3/10)^2 - 16)) / 2: the pair crosses the
# imaginary axis at c = 3/10, at +-2i. The declared point stays a rest point for every c.
SWING = """# Invented linear family for the plot tests.
plant swing
param c = 1/2 in -1 .. 2
state z1 in -2 .. 2
state z2 in -2 .. 2
state x in -1 .. 1
input u
rate z1 = z2
rate z2 = -4*z1 + (c - 3/10)*z2 + x
rate x = z1 + u
output y = x
point rest: z1 = 0, z2 = 0, x = 0
"""

# The rest point of the zero dynamics moves with a (z1 = a, z2 = 0): the trace must
# re-solve it. Linearised there: z1' = z2, z2' = -z1 + (a - 1/2) z2: crossing at a = 1/2, at +-i.
DRIFTER = """# Invented nonlinear family for the plot tests.
plant drifter
param a = 1/5 in 0 .. 1
state z1 in -2 .. 2
state z2 in -2 .. 2
state x in -1 .. 1
input u
rate z1 = z2
rate z2 = -(z1 - a) + (z1 - 1/2)*z2 + x
rate x = u + z1
output y = x
point rest: z1 = 1/5, z2 = 0, x = 0
"""

# L_g L_f y = sin(th): singular on the line th = 0 of the envelope.
HINGE = """# Invented pendulum-like model for the plot tests.
plant hinge
state th in -2 .. 2
state w in -1 .. 1
input u
rate th = w
rate w = -w + sin(th)*u
output y = th
point tilted: th = 1, w = 0
"""


def _zeros(A: np.ndarray) -> np.ndarray:
    """Transmission zeros of (A, B, C) with B = e3, C = e3^T, from scipy.signal."""
    B = np.array([[0.0], [0.0], [1.0]])
    C = np.array([[0.0, 0.0, 1.0]])
    with warnings.catch_warnings():  # the numerator's leading zero coefficients are expected here
        warnings.simplefilter("ignore", signal.BadCoefficients)
        z, _, _ = signal.ss2zpk(A, B, C, np.zeros((1, 1)))
    return np.asarray(z)


def _swing_matrix(c: float) -> np.ndarray:
    return np.array([[0.0, 1.0, 0.0], [-4.0, c - 0.3, 1.0], [1.0, 0.0, 0.0]])


def _drifter_matrix(a: float) -> np.ndarray:
    # Jacobian of the rates at the rest point z1 = a, z2 = 0, x = 0 (u enters through B)
    return np.array([[0.0, 1.0, 0.0], [-1.0, a - 0.5, 1.0], [1.0, 0.0, 0.0]])


def _parts(text: str):  # type: ignore[no-untyped-def]
    model, findings = build_model(parse_text(text), "")
    assert model is not None and not [f for f in findings if f.severity.value == "error"], findings
    kernel = Kernel(model.plant())
    return model, kernel, analyse_structure(kernel)


def test_closed_forms_agree_with_scipy() -> None:
    # scipy.signal: the zeros sit on the imaginary axis exactly at the closed-form values
    for matrix, at, omega in ((_swing_matrix, 0.3, 2.0), (_drifter_matrix, 0.5, 1.0)):
        z = _zeros(matrix(at))
        assert np.allclose(sorted(z.imag), [-omega, omega]) and np.allclose(z.real, 0.0, atol=1e-9)
        assert max(_zeros(matrix(at - 0.01)).real) < 0 < max(_zeros(matrix(at + 0.01)).real)


def test_crossing_of_a_linear_family_is_the_closed_form() -> None:
    model, kernel, structure = _parts(SWING)
    trace = zero_dynamics_trace(model, kernel, structure, "c", "rest", samples=31)
    assert not trace.resolved and trace.exact
    assert len(trace.crossings) == 1
    value, eigs = trace.crossings[0]
    assert value == pytest.approx(0.3, abs=1e-12)  # closed form above, checked with scipy.signal
    assert sorted(z.imag for z in eigs) == pytest.approx([-2.0, 2.0], abs=1e-9)
    # every sampled eigenvalue pair matches scipy.signal's transmission zeros
    for c, sampled in zip(trace.values[::6], trace.eigenvalues[::6]):
        expected = sorted(_zeros(_swing_matrix(c)), key=lambda z: (z.real, z.imag))
        assert sampled is not None
        assert np.allclose(sorted(sampled, key=lambda z: (z.real, z.imag)), expected, atol=1e-8)


def test_crossing_with_a_moving_equilibrium_is_resolved() -> None:
    model, kernel, structure = _parts(DRIFTER)
    trace = zero_dynamics_trace(model, kernel, structure, "a", "rest", samples=21)
    assert trace.resolved
    assert [v for v, _ in trace.crossings] == [pytest.approx(0.5, abs=1e-7)]  # closed form, scipy-checked
    for a, sampled in zip(trace.values[::5], trace.eigenvalues[::5]):
        assert sampled is not None
        expected = sorted(_zeros(_drifter_matrix(a)), key=lambda z: (z.real, z.imag))
        assert np.allclose(sorted(sampled, key=lambda z: (z.real, z.imag)), expected, atol=1e-7)


@needs_matplotlib
def test_the_crossing_drawn_is_the_crossing_returned() -> None:
    outcome = plot_model(SWING.encode(), "svg", samples=21)
    assert outcome.crossings == {"c@rest": [pytest.approx(0.3, abs=1e-12)]}
    trace_svg = dict(outcome.pictures)["swing-zero-dynamics-c-rest.svg"].decode()
    assert "<!-- c = 0.3 -->" in trace_svg  # matplotlib keeps each text as a comment beside its glyphs


def test_envelope_slice_samples_and_witness() -> None:
    model, kernel, structure = _parts(HINGE)
    s = envelope_slice(model, kernel, structure, grid=41)
    assert s.axes == ("th", "w")
    assert s.witness is not None and s.witness["th"] == pytest.approx(0.0)
    th = np.repeat(s.grids[0][:, None], len(s.grids[1]), axis=1)
    assert np.allclose(s.sigma, np.abs(np.sin(th)), rtol=1e-12, atol=1e-15)  # numpy's sine
    assert np.allclose(s.det, np.sin(th), rtol=1e-12, atol=1e-15)
    assert "tilted" in s.points


@needs_matplotlib
def test_cli_writes_png_and_svg(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    model = tmp_path / "hinge.plant"
    model.write_text(HINGE, encoding="utf-8")
    (tmp_path / "plantlint.toml").write_text('fail-on = "error"\n', encoding="utf-8")
    for fmt in ("png", "svg"):
        code = main(["plot", str(model), "--out", str(tmp_path / "pics"), "--format", fmt])
        assert code == 0, capsys.readouterr()
    png = (tmp_path / "pics" / "hinge-envelope.png").read_bytes()
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    root = ET.parse(tmp_path / "pics" / "hinge-envelope.svg").getroot()
    assert root.tag.endswith("svg")
    before = model.read_bytes()
    assert main(["plot", str(model), "--states", "th,nope", "--out", str(tmp_path / "pics")]) == 1
    assert "not a state" in capsys.readouterr().err
    assert model.read_bytes() == before


@needs_matplotlib
def test_plot_keeps_to_the_budget_per_model(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                            monkeypatch: pytest.MonkeyPatch) -> None:
    """A model whose drawing does not end (a stand-in endless step) is stopped at the
    per-model budget: said on stderr, nothing drawn, exit 1; the next model is drawn."""
    import plantlint.report.plots as plots

    slow, quick = tmp_path / "slow.plant", tmp_path / "hinge.plant"
    slow.write_text(HINGE.replace("plant hinge", "plant slow"), encoding="utf-8")
    quick.write_text(HINGE, encoding="utf-8")
    real = plots.plot_model

    def endless_for_slow(data: bytes, *args: object, **kwargs: object) -> object:
        while b"plant slow" in data:  # stands in for a runaway symbolic step
            pass
        return real(data, *args, **kwargs)

    monkeypatch.setattr(plots, "plot_model", endless_for_slow)
    code = main(["plot", str(quick), str(slow), "--timeout", "4", "--out", str(tmp_path / "pics")])
    err = capsys.readouterr().err
    assert code == 1
    assert "slow.plant: cannot plot: stopped at the budget of 4 s per model, set explicitly" in err
    assert sorted(p.name for p in (tmp_path / "pics").iterdir()) == ["hinge-envelope.png"]
    assert main(["plot", str(quick), "--timeout", "-1"]) == 2


BLOCKER = """
import sys
class _NoMatplotlib:
    def find_spec(self, name, path=None, target=None):
        if name == "matplotlib" or name.startswith("matplotlib."):
            raise ModuleNotFoundError("No module named 'matplotlib'", name=name)
        return None
sys.meta_path.insert(0, _NoMatplotlib())
from plantlint.cli import main
sys.exit(main(sys.argv[1:]))
"""


def test_without_matplotlib_the_command_says_how_to_install(tmp_path: Path) -> None:
    model = tmp_path / "hinge.plant"
    model.write_text(HINGE, encoding="utf-8")
    out = subprocess.run([sys.executable, "-c", BLOCKER, "plot", str(model), "--out", str(tmp_path / "p")],
                         capture_output=True, text=True, timeout=120)
    assert out.returncode == 2
    assert 'pip install "plantlint[plot]"' in out.stderr and "Traceback" not in out.stderr
    assert not (tmp_path / "p").exists()


def test_check_never_imports_matplotlib(tmp_path: Path) -> None:
    model = tmp_path / "hinge.plant"
    model.write_text(HINGE, encoding="utf-8")
    probe = ("import sys\nfrom plantlint.cli import main\n"
             f"main(['check', {str(model)!r}, '--no-cache', '--format', 'markdown'])\n"
             "print(sorted(m for m in sys.modules if m.startswith(('matplotlib', 'plantlint.report.plots'))))")
    out = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, timeout=300, cwd=tmp_path)
    assert out.stdout.strip().splitlines()[-1] == "[]", out.stdout + out.stderr
