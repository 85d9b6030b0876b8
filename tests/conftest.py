"""Helpers shared by the tests: where things are, process results, a sealed git environment,
a pseudo-terminal reader and the linear plant builder used by the outside-reference tests.

Test modules import them with ``from conftest import ...`` (pytest puts this folder on the
path); fixtures that several modules use are defined here too.
"""

from __future__ import annotations

import json
import os
import pty
import subprocess
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
import sympy as sp
from hypothesis import settings

# Property tests draw their examples from a fixed seed, so a run in CI is repeatable
# (common practice for hypothesis in CI); the examples are still many and varied.
settings.register_profile("repeatable", derandomize=True, deadline=None)
settings.load_profile("repeatable")

REPO = Path(__file__).resolve().parent.parent
FIXTURES = REPO / "tests" / "fixtures"
STANDARDS = REPO / "tests" / "standards"


@dataclass
class Run:
    """What a command did: exit code and its two streams."""

    code: int
    stdout: str
    stderr: str

    def json(self) -> dict[str, Any]:
        data: dict[str, Any] = json.loads(self.stdout)
        return data


#: A script run as ``python -c PINT_PROBE MODEL REPORT [MORE ...]``: checks MODEL (and MORE)
#: through the CLI (JSON to REPORT), then analyses MODEL as a worker does, and prints whether
#: pint was imported by then in each, and the CLI's exit code (JSON). The parent imports
#: what workers share only for a run of several models.
# Magnetic levitation with the coil current as a state (demo numbers, invented):
# x' = v, v' = g - k i^2 / (m x^2), i' = (-R i + u) / L.
MAGLEV = b"""plant maglev
const grav = 9.81
param k = 0.0001
param m = 0.05
param R = 2
param L = 0.1
state x in 0.005 .. 0.02
state v in -1 .. 1
state i in 0.1 .. 2
input u in -20 .. 20
rate x = v
rate v = grav - k*i^2/(m*x^2)
rate i = (-R*i + u)/L
output y = x
point hover: x = 0.01, v = 0, i = 0.7004
"""


PINT_PROBE = """
import json, sys
from pathlib import Path
from plantlint.cli import main
from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes
path = Path(sys.argv[1])
code = main(["check", "--no-cache", "--jobs", "1", "--format", "json", "--output", sys.argv[2], str(path), *sys.argv[3:]])
parent = "pint" in sys.modules
raw = analyse_bytes(path.read_bytes(), Config(root=path.parent))  # what a worker runs
print(json.dumps({"parent": parent, "worker": "pint" in sys.modules, "code": code}))
"""


def git_env(home: Path, ceiling: Path | None = None, **extra: str) -> dict[str, str]:
    """An environment that keeps git away from the user's own configuration."""
    cfg = home / "gitconfig"
    if not cfg.exists():
        cfg.write_text("", encoding="utf-8")
    env = dict(os.environ)
    env.update({
        "GIT_CONFIG_GLOBAL": str(cfg), "GIT_CONFIG_NOSYSTEM": "1",
        "GIT_AUTHOR_NAME": "Test Author", "GIT_AUTHOR_EMAIL": "author@example.invalid",
        "GIT_COMMITTER_NAME": "Test Author", "GIT_COMMITTER_EMAIL": "author@example.invalid",
        "GIT_CEILING_DIRECTORIES": str(ceiling if ceiling is not None else home.parent), "NO_COLOR": "1",
    })
    env.update(extra)
    return env


def git(repo: Path, env: dict[str, str], *args: str) -> str:
    out = subprocess.run(["git", *args], cwd=repo, env=env, capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    return out.stdout


def base_and_change(home: Path, base: dict[str, str], changed: dict[str, str],
                    moves: Sequence[tuple[str, str]] = ()) -> tuple[Path, dict[str, str]]:
    """A git repository under ``home`` whose ``plants/`` folder holds ``base`` (committed
    and tagged ``base``), then a second commit that writes ``changed`` and makes ``moves``
    (``git mv`` pairs, paths inside ``plants/``). Returns the repository and its git
    environment."""
    repo = home / "repo"
    (repo / "plants").mkdir(parents=True)
    env = git_env(home)
    git(repo, env, "init", "-q", "-b", "main")
    for name, text in base.items():
        (repo / "plants" / name).write_text(text, encoding="utf-8")
    git(repo, env, "add", "plants")
    git(repo, env, "commit", "-q", "-m", "base models")
    git(repo, env, "tag", "base")
    for name, text in changed.items():
        (repo / "plants" / name).write_text(text, encoding="utf-8")
    for old, new in moves:
        git(repo, env, "mv", f"plants/{old}", f"plants/{new}")
    git(repo, env, "add", "plants")
    git(repo, env, "commit", "-q", "-m", "edit models")
    return repo, env


def run_on_terminal(argv: Sequence[str], cwd: Path, env: dict[str, str], *,
                    stream: str = "stdout") -> tuple[int, bytes, bytes]:
    """Run ``argv`` with ``stream`` ("stdout" or "stderr") on a pseudo-terminal.

    Returns the exit code, what the terminal received and what the other stream (a pipe)
    carried.
    """
    leader, follower = pty.openpty()
    other = subprocess.PIPE
    try:
        proc = subprocess.Popen(list(argv), cwd=cwd, env=env,
                                stdout=follower if stream == "stdout" else other,
                                stderr=follower if stream == "stderr" else other)
        os.close(follower)
        seen = bytearray()
        while True:
            try:
                chunk = os.read(leader, 4096)
            except OSError:  # the terminal closed with the process
                break
            if not chunk:
                break
            seen += chunk
        out, err = proc.communicate(timeout=300)
    finally:
        os.close(leader)
    piped = err if stream == "stdout" else out
    return proc.returncode, bytes(seen), piped or b""


def linear_plant(A: np.ndarray, B: np.ndarray, C: np.ndarray | None = None, *, scale: sp.Expr = sp.Integer(1),
                 states: str = "x", inputs: str = "u"):  # -> plantlint.kernel.plant.Plant
    """dx/dt = scale*A x + B u, y = C x (y = x1 when C is None), with integer entries,
    states ``x1..xn`` and inputs ``u1..um`` (prefixes adjustable): the linear plants the
    tests hold against scipy.signal and numpy."""
    from plantlint.kernel.plant import Plant

    n, m = B.shape
    xs = list(sp.symbols(f"{states}1:{n + 1}"))
    us = list(sp.symbols(f"{inputs}1:{m + 1}"))
    f = [sum((scale * int(A[i, k]) * xs[k] for k in range(n)), sp.Integer(0)) for i in range(n)]
    g = [[int(B[i, j]) for i in range(n)] for j in range(m)]
    if C is None:
        h = [xs[0]]
    else:
        h = [sum((int(C[r, k]) * xs[k] for k in range(n)), sp.Integer(0)) for r in range(C.shape[0])]
    return Plant.from_matrices("linear", xs, us, f, g, h)


def assert_same_set(ours: Sequence[complex], ref: Sequence[complex], tol: float = 1e-6) -> None:
    """Two multisets of complex numbers agree, each pair within ``tol`` relative."""
    assert len(ours) == len(ref), (ours, ref)
    rest = list(ref)
    for z in ours:
        k = min(range(len(rest)), key=lambda q: abs(rest[q] - z))
        assert abs(rest[k] - z) <= tol * (1 + abs(z)), (ours, ref)
        rest.pop(k)


def rosenbrock_zeros(A: np.ndarray, B: np.ndarray, C: np.ndarray) -> list[complex]:
    """Reference invariant zeros of a square (A, B, C): the finite generalised eigenvalues of
    the pencil [[A, B], [-C, 0]] - s diag(I, 0), by scipy.linalg.eig."""
    import scipy.linalg

    n, m = B.shape
    M = np.block([[A, B], [-C, np.zeros((C.shape[0], m))]]).astype(float)
    N = scipy.linalg.block_diag(np.eye(n), np.zeros((C.shape[0], m)))
    w = scipy.linalg.eig(M, N, right=False)
    return [complex(v) for v in w if np.isfinite(v) and abs(v) < 1e6]


def kalman(A: np.ndarray, B: np.ndarray, k: int | None = None) -> np.ndarray:
    """Reference Kalman matrix [B, AB, ..., A^k B] (k = n - 1 when not given), with numpy."""
    blocks = [B]
    for _ in range(A.shape[0] - 1 if k is None else k):
        blocks.append(A @ blocks[-1])
    return np.hstack(blocks)


def markov_degrees(A: np.ndarray, B: np.ndarray, C: np.ndarray) -> list[int] | None:
    """Reference relative degrees r_i of a linear plant from its Markov parameters
    C_i A^(k-1) B (exact integers): the first k with a non-zero row."""
    n = A.shape[0]
    Ao, Bo = A.astype(object), B.astype(object)
    out = []
    for row in C.astype(object):
        power = np.eye(n, dtype=int).astype(object)
        for k in range(1, n + 1):
            if any(row @ power @ Bo):
                out.append(k)
                break
            power = power @ Ao
        else:
            return None
    return out


# Linear two-state plant used by the version-control tests: z' = a*z + x, x' = u, y = x.
# With y held at zero the internal state obeys z' = a*z, so the zero dynamics are stable
# for a < 0, unstable for a > 0 and critical for a = 0 (invented demo numbers).
CONVEYOR_TAIL = """# Tail of a conveyor, demo numbers (invented).
plant {name}
state z in -1 .. 1
state x in -1 .. 1
input u
rate z = {rate_z}
rate x = u
output y = x
point rest: z = 0, x = 0
{extra}"""


def conveyor_tail(name: str, rate_z: str, extra: str = "") -> str:
    """The conveyor-tail model text with its name, its rate of z and extra lines."""
    return CONVEYOR_TAIL.format(name=name, rate_z=rate_z, extra=extra)


def integer_system(rng: np.random.Generator, n: int, m: int, p: int,
                   deficient: bool = False) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """A random integer (A, B, C): entries of A in -3..3, of B and C in -2..2. When
    ``deficient``, with a block the input cannot reach and a block the output cannot see,
    hidden by an integer change of coordinates."""
    A = rng.integers(-3, 4, (n, n))
    B = rng.integers(-2, 3, (n, m))
    C = rng.integers(-2, 3, (p, n))
    if deficient:
        k = int(rng.integers(1, n))
        A[k:, :k] = 0  # x[k:] evolve on their own ...
        B[k:, :] = 0  # ... and no input reaches them
        if rng.random() < 0.5:
            C[:, :k] = 0  # x[:k] is A-invariant (A[k:, :k] = 0): unseen by the outputs
        T = np.eye(n, dtype=int) + np.tril(rng.integers(-1, 2, (n, n)), -1)  # unimodular
        Ti = np.rint(np.linalg.inv(T)).astype(int)
        A, B, C = T @ A @ Ti, T @ B, C @ Ti
    return A, B, C


# The gantry crane of the plant-language contract (demo numbers, invented): rates written
# as quotients over den = m_c + m_p sin(th)^2; tests add their own points and claims.
CRANE_RATES = b"""plant gantry_crane
const g   = 9.81
param m_c = 12.0
param m_p = 3.5
param L   = 2.2
state x   in -4 .. 4
state v   in -2 .. 2
state th  in -0.5 .. 0.5
state w   in -3 .. 3
input F   in -400 .. 400
let den = m_c + m_p*sin(th)^2
rate x  = v
rate v  = (F + m_p*sin(th)*(L*w^2 + g*cos(th))) / den
rate th = w
rate w  = -(F*cos(th) + m_p*L*w^2*sin(th)*cos(th) + (m_c + m_p)*g*sin(th)) / (L*den)
output y = x
"""


#: A reviewer's four-state plant (invented numbers) with a rounded point: x2' = -x2 + x4^2 + u2
#: has every term zero at the equilibrium; changing x1 alone to (13/10 - e^(1/10))/2 makes
#: the point exact. Used by the refinement and the zero-dynamics tests.
ROUNDED = b"""plant rounded
param k = 2
param d = 1
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in -1 .. 1
state x4 in -1 .. 1
input u1
input u2
rate x1 = -x1 + x3 + u1
rate x2 = -x2 + x4^2 + u2
rate x3 = x4
rate x4 = -k*x3 - d*x4 + x1 + x2 + exp(x3) - 1 + u1 - u2
output y1 = x1
output y2 = x2
point rounded: x1 = 0.0974146, x2 = 0, x3 = 0.1, x4 = 0 tolerance 1e-5
expect minimum_phase at rounded
"""
