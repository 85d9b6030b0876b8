"""The plant as written: f, g and h read from the parse tree into a graph, without sympy.

The reference is sympy, done another way: the model layer builds each rate with sympy from
the same parse tree, f as the rate with the inputs at zero and g as its derivative in each
input (sympy's ``diff``), and :meth:`Graph.from_sympy` compiles those. Both graphs are run
in ball arithmetic (python-flint's arb, 200 bits) at random rational points of the envelope;
wherever sympy's value is finite, the written one must equal it. Models whose rates sympy
simplifies at a point (x*u/x) differ exactly there, as the project means them to
(tests/language/test_as_written.py).
"""

from __future__ import annotations

import random
import subprocess
import sys
from dataclasses import replace
from fractions import Fraction
from pathlib import Path

import pytest
import sympy as sp
from flint import arb

from conftest import FIXTURES, REPO
from plantlint.kernel.lie import Kernel
from plantlint.kernel.taylor import ArbField, Towers, Undefined
from plantlint.language.written import Refused, read_plant
from plantlint.run.pipeline import read_model, read_names

TINY = arb(10) ** -40
BLOCKING = {"singular-model", "not-input-affine", "non-smooth", "output-uses-input", "bad-range", "syntax"}


def _models() -> list[Path]:
    found = [*sorted((FIXTURES).rglob("*.plant")), *sorted((REPO / "example_repo").rglob("*.plant"))]
    generated = REPO / "benchmarks" / "results" / "models"
    small = ("spring_chain_1", "spring_chain_3", "pendulum_chain_3", "pendulum_chain_6", "dense_chain_8",
             "pendulum_bank_6", "spring_bank_8_4", "quadrotor", "hovercraft", "pendulum_arm_2")
    return found + [generated / f"{name}.plant" for name in small]


def _read(path: Path):
    data = path.read_bytes()
    parsed, _, _ = read_names(data)
    if parsed is None:
        return None
    model, findings = read_model(data)
    if model is None or any(f.rule in BLOCKING for f in findings) or not model.defined or model.feedthrough:
        return None
    plant = model.plant()
    return (parsed, model, plant) if plant is not None else None


def _point(plant, rng: random.Random) -> list[Fraction]:
    boxes = {**plant.state_box, **plant.param_box}
    out = []
    for s in (*plant.states, *plant.params):
        lo, hi = boxes.get(s, (-2, 2))
        lo, hi = Fraction(str(float(lo))), Fraction(str(float(hi)))
        out.append(lo + (hi - lo) * Fraction(rng.randint(1, 999), 1000) + Fraction(1, 7919))
    return out


def _flat(values) -> list:
    f, g, h = values
    return [*f, *[v for column in g for v in column], *h]


@pytest.mark.parametrize("path", _models(), ids=lambda p: p.stem)
def test_the_written_plant_has_sympys_values(path: Path) -> None:
    read = _read(path)
    if read is None:
        pytest.skip("a model that the analysis does not take (its errors stop it)")
    parsed, model, plant = read
    written = read_plant(parsed.statements)  # every such model of the repository is read: no refusal
    assert plant.as_written() is not None  # the model hands it to the analysis
    assert (written.states, written.params, written.inputs, written.outputs) == (
        model.states, model.ranged_params, model.inputs, model.outputs)
    reference = Towers(plant.states, plant.params, plant.f, plant.g, plant.h)  # from sympy's trees
    ours = Towers(plant.states, plant.params, written.f, written.g, written.h, graph=written.graph)
    field = ArbField(200)
    rng = random.Random(path.stem)
    compared = 0
    for _ in range(4):
        point = _point(plant, rng)
        try:
            expected = _flat(reference.values(point, field))
        except (Undefined, ArithmeticError):
            continue
        if not all(v.is_finite() for v in expected):
            continue
        got = _flat(ours.values(point, field))
        for a, b in zip(expected, got):
            assert abs(a - b) <= TINY * (1 + abs(a)), (path.name, a, b)
        compared += 1
    assert compared >= 1


def test_the_kernel_runs_the_written_graph_and_not_a_replaced_one() -> None:
    data = (REPO / "benchmarks" / "results" / "models" / "pendulum_chain_3.plant").read_bytes()
    model, _ = read_model(data)
    plant = model.plant()
    assert Kernel(plant).towers().graph is plant.written.graph
    shifted = replace(plant, f=tuple(e + 1 for e in plant.f))  # another drift: the written one is not its
    assert shifted.as_written() is None
    assert Kernel(shifted).towers().graph is not plant.written.graph


def _statements(text: str):
    parsed, stop, _ = read_names(text.encode())
    assert parsed is not None, stop
    return parsed.statements


TEMPLATE = """plant t
const k = 2
param m = 3 in 1 .. 4
state x in -1 .. 1
state v in -1 .. 1
input u in -1 .. 1
rate x = v
rate v = {rate}
output y = {output}
"""


@pytest.mark.parametrize("rate, why", [
    ("(x + u)^2 - u^2 - 2*x*u", "not affine in the inputs as written"),
    ("abs(x) + u", "the function abs"),
    ("sin(u)", "not affine in the inputs as written"),
    ("u/(1 + u^2)", "not affine in the inputs as written"),
])
def test_what_the_reader_refuses_it_says(rate: str, why: str) -> None:
    with pytest.raises(Refused, match=why):
        read_plant(_statements(TEMPLATE.format(rate=rate, output="x")))


def test_an_output_that_reads_an_input_is_refused() -> None:
    with pytest.raises(Refused, match="an output reads an input"):
        read_plant(_statements(TEMPLATE.format(rate="u", output="x + u/10")))


def test_constants_are_folded_exactly_and_a_ranged_parameter_is_a_variable() -> None:
    """k*m/k: sympy writes m; as written it is m times k/k folded to the rational 1."""
    written = read_plant(_statements(TEMPLATE.format(rate="k*m*u/k - 3/6*x + 0.1*v", output="x")))
    assert written.graph.variables == ("x", "v", "m")
    field = ArbField(128)
    f, g, h = Towers(sp.symbols("x v"), (sp.Symbol("m"),), written.f, written.g, written.h,
                     graph=written.graph).values([Fraction(1, 3), Fraction(2), Fraction(5, 2)], field)
    # by hand: f_v = -x/2 + v/10 = -1/6 + 1/5 = 1/30, g_v = m = 5/2
    assert abs(float(f[1].mid()) - 1 / 30) < 1e-15 and abs(float(g[0][1].mid()) - 5 / 2) < 1e-15
    constants = [data for op, _, data in written.graph.nodes if op == "const"]
    assert all(isinstance(c, Fraction) for c in constants)


def test_a_removable_singularity_stays_where_it_is_written() -> None:
    """x*u/x is u for sympy; as written the rate has no value at x = 0 (the project checks
    models as written, tests/language/test_as_written.py)."""
    written = read_plant(_statements(TEMPLATE.format(rate="x*u/x", output="x")))
    towers = Towers(sp.symbols("x v"), (sp.Symbol("m"),), written.f, written.g, written.h, graph=written.graph)
    field = ArbField(128)
    _, g, _ = towers.values([Fraction(1, 2), Fraction(0), Fraction(2)], field)
    assert abs(float(g[0][1].mid()) - 1) < 1e-15
    with pytest.raises(ArithmeticError):
        towers.values([Fraction(0), Fraction(0), Fraction(2)], field)
    x, u = sp.symbols("x u")
    assert x * u / x == u  # the reference: sympy simplifies it away


def test_reading_the_written_plant_does_not_import_sympy() -> None:
    code = (
        "import sys\n"
        "from plantlint.run.pipeline import read_names\n"
        "from plantlint.language.written import read_plant\n"
        f"data = open({str(REPO / 'benchmarks' / 'results' / 'models' / 'pendulum_chain_6.plant')!r}, 'rb').read()\n"
        "parsed, _, _ = read_names(data)\n"
        "w = read_plant(parsed.statements)\n"
        "print(len(w.graph.nodes), 'sympy' in sys.modules)\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    nodes, imported = out.stdout.split()
    assert int(nodes) > 20 and imported == "False"
