"""``--format markdown``: the review summary, with and without ``--since``, on real git repositories.

The models are invented. The structural facts the edits rely on are checked against
outside sources beside each scenario: the relative degree as the pole-zero excess of
the transfer function (scipy.signal), the zero of the zero dynamics as an invariant
zero (scipy.signal), and the singular line of the envelope by hand (sin(th) = 0 at th = 0,
numpy).
"""

from __future__ import annotations

import subprocess
import sys
import warnings
from pathlib import Path

import numpy as np
import pytest
from scipy import signal

from conftest import Run, base_and_change, conveyor_tail

# rd: y = x1 with a chain of 2 (base) or 3 (changed) integrators -> relative degree 2 -> 3
RD_BASE = """# Invented chain for the markdown tests.
plant chain
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in -1 .. 1
input u
rate x1 = x2
rate x2 = -x3 + u
rate x3 = -x3
output y = x1
"""
RD_CHANGED = RD_BASE.replace("rate x2 = -x3 + u", "rate x2 = x3").replace("rate x3 = -x3", "rate x3 = -x3 + u")

# env: the input gain becomes sin(th): regular -> singular on th = 0
ENV_BASE = """# Invented hinge for the markdown tests.
plant hinge
state th in -1 .. 1
state w in -1 .. 1
input u
rate th = w
rate w = -w + 2*u
output y = th
"""
ENV_CHANGED = ENV_BASE.replace("2*u", "sin(th)*u")

# mp: z' = a z + x, x' = u, y = x; zero dynamics z' = a z: a = -1 minimum phase, a = 1 not
MP_BASE = conveyor_tail("tail", "-z + x", extra="")
MP_CHANGED = conveyor_tail("tail", "z + x", extra="")
# waiver: critical zero dynamics (a = 0), waived only in the changed version
WAIVE_BASE = conveyor_tail("tail", "x", extra="").replace("plant tail", "plant drift")
WAIVE_CHANGED = conveyor_tail("tail", "x", extra='waive zero-dynamics-critical at rest "held by the <b>buffer</b> | see ticket `42`"\n'
                          ).replace("plant tail", "plant drift")
# fixed: unstable -> stable
FIX_BASE = conveyor_tail("tail", "z + x", extra="").replace("plant tail", "plant fixme")
FIX_CHANGED = conveyor_tail("tail", "-z + x", extra="").replace("plant tail", "plant fixme")
STEADY = conveyor_tail("tail", "-z + x", extra="").replace("plant tail", "plant steady")


def _tf_excess(A: np.ndarray, B: np.ndarray, C: np.ndarray) -> int:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", signal.BadCoefficients)
        num, den = signal.ss2tf(A, B, C, np.zeros((1, 1)))
    num = np.trim_zeros(np.where(np.abs(num[0]) < 1e-12, 0.0, num[0]), "f")
    return (len(den) - 1) - (len(num) - 1)


def test_scenario_facts_from_scipy() -> None:
    # relative degree = pole-zero excess of the linear chain (scipy.signal)
    A_base = np.array([[0, 1, 0], [0, 0, -1], [0, 0, -1.0]])
    B_base = np.array([[0], [1], [0.0]])
    A_new = np.array([[0, 1, 0], [0, 0, 1], [0, 0, -1.0]])
    B_new = np.array([[0], [0], [1.0]])
    C = np.array([[1.0, 0, 0]])
    assert _tf_excess(A_base, B_base, C) == 2 and _tf_excess(A_new, B_new, C) == 3
    # the invariant zero of z' = a z + x, x' = u, y = x sits at s = a (scipy.signal)
    for a in (-1.0, 1.0):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", signal.BadCoefficients)
            z, _, _ = signal.ss2zpk(np.array([[a, 1.0], [0.0, 0.0]]), np.array([[0.0], [1.0]]),
                                    np.array([[0.0, 1.0]]), np.zeros((1, 1)))
        assert np.allclose(z, [a])
    assert np.sin(0.0) == 0.0 and np.sin(-0.1) < 0 < np.sin(0.1)  # the hinge's gain changes sign at th = 0


def _plantlint(cwd: Path, env: dict[str, str], *args: str) -> Run:
    out = subprocess.run([sys.executable, "-m", "plantlint", *args], cwd=cwd, env=env,
                         capture_output=True, text=True, timeout=300)
    return Run(out.returncode, out.stdout, out.stderr)


@pytest.fixture(scope="module")
def repo(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, dict[str, str], Path]:
    home = tmp_path_factory.mktemp("markdown")
    base = {"rd.plant": RD_BASE, "env.plant": ENV_BASE, "mp.plant": MP_BASE, "waiver.plant": WAIVE_BASE,
            "fixme.plant": FIX_BASE, "steady.plant": STEADY}
    changed = {"rd.plant": RD_CHANGED, "env.plant": ENV_CHANGED, "mp.plant": MP_CHANGED,
               "waiver.plant": WAIVE_CHANGED, "fixme.plant": FIX_CHANGED}
    repo, env = base_and_change(home, base, changed)
    return repo, env, home / "cache"


def test_review_summary_under_since(repo: tuple[Path, dict[str, str], Path]) -> None:
    path, env, cache = repo
    run = _plantlint(path, env, "check", "--since", "base", "--format", "markdown", "--cache-dir", str(cache), "plants")
    out = run.stdout
    assert run.code == 1, run.stderr
    assert out.startswith("### plantlint review — FAILED\n")
    assert "Compared with `base`: 6 models checked, 5 changed" in out
    assert "relative degree of y: 2 → **3**" in out
    assert "envelope: regular → **singular at (th = 0" in out
    assert "point rest: zero dynamics: minimum phase → **non-minimum phase**" in out
    # the new waiver with its reason, escaped: no HTML, no broken table or code span
    assert "new waiver of zero-dynamics-critical at rest: “held by the &lt;b&gt;buffer&lt;/b&gt; \\| see ticket \\`42\\`”" in out
    assert "<b>" not in out
    # compact table: one row per changed model, the unchanged one only counted
    rows = [line for line in out.splitlines() if line.startswith("| `plants/")]
    assert len(rows) == 5 and not any("steady" in r for r in rows)
    # introduced and fixed findings listed per model; known ones collapsed
    mp = out[out.index("#### `plants/mp.plant`"):]
    mp = mp[: mp.index("####", 4)] if "####" in mp[4:] else mp
    assert "Introduced:" in mp and "`zero-dynamics-unstable` at `rest`" in mp
    fixme = out[out.index("#### `plants/fixme.plant`"):]
    assert "Fixed:" in fixme.split("####")[1]
    waiver = out[out.index("#### `plants/waiver.plant`"):].split("####")[1]
    assert "<details>" in waiver and "<summary>Known before (1)</summary>" in waiver


def test_summary_without_since_and_long_lists_collapse(tmp_path: Path) -> None:
    plants = tmp_path / "plants"
    plants.mkdir()
    many = "\n".join(f"param p{i} = {i}" for i in range(8))  # eight unused parameters
    (plants / "spare.plant").write_text(MP_BASE.replace("plant tail", "plant spare\n" + many), encoding="utf-8")
    (plants / "steady.plant").write_text(STEADY, encoding="utf-8")
    (tmp_path / "plantlint.toml").write_text('fail-on = "error"\n', encoding="utf-8")
    run = _plantlint(tmp_path, dict(__import__("os").environ, NO_COLOR="1"), "check", "--no-cache", "--format",
                     "markdown", "plants")
    out = run.stdout
    assert run.code == 0, run.stderr
    assert out.startswith("### plantlint — passed\n")
    assert "2 models checked: 0 errors, 8 warnings" in out or "2 models checked: 0 errors, 0 warnings, 8 notes" in out
    assert "| `plants/spare.plant` |" in out and "1 model without findings." in out
    assert "<summary>Findings (8)</summary>" in out
