"""The light route (plantlint.analysis.light) never passes what the full analysis would not.

The reference is the full analysis of the same bytes (sympy, the symbolic and numeric
routes, every rule of the catalogue): wherever the light route answers, the full analysis
must find nothing, complete every stage and give the same relative degrees. Held over every
model of the repository, over mutants of the models the light route passes (the inputs where
a wrong pass would hide: a clean model with one edit), and over one model with one defect
per rule, where the light route must hand over and the full analysis must report the rule.
The models are invented test and demo data.
"""

from __future__ import annotations

import importlib.util
import json
import random
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import REPO
from plantlint.analysis.light import HandOver, prove_clean
from plantlint.run.pipeline import analyse_bytes

BENCHMARKS = REPO / "benchmarks" / "results" / "models"
#: Generated models small enough for a unit test (their full analysis under a second or so).
SMALL = ("spring_chain_1", "pendulum_arm_1", "pendulum_arm_2", "spring_chain_2", "spring_chain_3", "pendulum_chain_2", "pendulum_chain_3",
         "pendulum_chain_4", "pendulum_bank_4", "dense_chain_2", "dense_chain_4", "hovercraft", "quadrotor")
#: Models the light route is meant to answer (so that the comparison is not vacuous).
ANSWERED = ("spring_chain_1", "pendulum_arm_1", "pendulum_arm_2", "pendulum_chain_2", "pendulum_chain_3", "pendulum_bank_4",
            "dense_chain_2")

_SPEC = importlib.util.spec_from_file_location("mutate_models", REPO / "tools" / "mutate_models.py")
assert _SPEC is not None and _SPEC.loader is not None
mutate_models = importlib.util.module_from_spec(_SPEC)
_SPEC.loader.exec_module(mutate_models)


@pytest.fixture(autouse=True)
def _no_seconds_bound(monkeypatch: pytest.MonkeyPatch) -> None:
    """The route's 0.3 s bound on its envelope proof makes what it answers depend on the
    host's speed (a hand-over is always safe); these tests are about what it answers, so in
    this process it has time. The subprocess tests run the command as users do."""
    import plantlint.analysis.light as light

    monkeypatch.setattr(light, "MAX_SECONDS", 60.0)


def _corpus() -> list[Path]:
    return [*sorted((REPO / "tests").rglob("*.plant")), *sorted((REPO / "example_repo").rglob("*.plant")),
            *(BENCHMARKS / f"{name}.plant" for name in SMALL)]


def _agrees(data: bytes) -> bool | None:
    """None when the light route hands over; True when the full analysis gives its pass (no
    findings, every stage, the same plant and relative degrees: the campaign's comparison,
    tools/mutate_models.py ``compare_light``); an error of the light route fails the test."""
    passed, why = mutate_models.compare_light(data)
    assert not why, why
    return None if passed is None else True


@pytest.mark.parametrize("path", _corpus(), ids=lambda p: str(p.relative_to(REPO)))
def test_a_light_pass_is_a_pass_of_the_full_analysis(path: Path) -> None:
    _agrees(path.read_bytes())


@pytest.mark.parametrize("name", ANSWERED)
def test_the_light_route_answers_the_small_clean_models(name: str) -> None:
    assert _agrees((BENCHMARKS / f"{name}.plant").read_bytes()) is True


@pytest.mark.parametrize("path", sorted((REPO / "tests" / "fixtures" / "light").glob("*.plant")), ids=lambda p: p.stem)
def test_the_light_route_answers_the_models_written_for_it(path: Path) -> None:
    """Invented plants of its class (tests/fixtures/light): a gimbal (2 x 2, a rest point at
    pitch 1/2 whose input columns hold cos(1/2)), the same gimbal with its pitch inertia and
    cable coupling ranged (two outputs: the relative degrees hold for every value because the
    decoupling matrix is nonsingular over states and parameters), a voltage-driven maglev (1/x^2 over a gap
    range of 5 to 20 mm), a fully actuated two-link arm (the inverse of its mass matrix), a
    two-link boom under gravity whose points are written in fractions of pi (holding
    torques in sqrt(3)/2 and sqrt(2)/2, one given), a sprung hoist with a payload range
    (its sag m g / k and holding force follow the payload: identities in m, ranges shown by
    balls over 20 .. 120 kg), a servo with tanh friction, a chain with a rational
    damping term and a SCARA arm whose rates divide by det M written out over a payload
    range (its envelope proven through the rows' common factor 1/det M)."""
    assert _agrees(path.read_bytes()) is True


def test_the_light_route_answers_a_point_written_with_pi() -> None:
    """The example repository's labeller joint: its point `apply` sets the arm at pi/4 and
    the motor at pi/4 + m_a g d_a sin(pi/4) / k_j (the wind-up of the drive): the arm's rate
    is 0 as an identity of the formal numbers (sin(pi/4) = sqrt(2)/2 on both sides), and
    the motor torque is solved exactly."""
    path = REPO / "example_repo" / "models" / "handling" / "labeller_joint.plant"
    assert "q_a = pi/4" in path.read_text(encoding="utf-8")
    assert _agrees(path.read_bytes()) is True


def test_the_light_route_answers_an_inverted_mass_matrix_over_a_payload_range() -> None:
    """The example repository's palletizer arm: the decoupling matrix is M(q2, m_p)^-1 with
    the payload m_p in 0 .. 15 kg, and its entries share 1/det M, whose natural enclosure
    holds 0 over wide boxes. The envelope proof goes through the rows' common factor and
    second-order forms (kernel/regularity.py, RowFactors); the full analysis proves it by
    factors, symbolically, and must agree."""
    path = REPO / "example_repo" / "models" / "handling" / "palletizer_arm.plant"
    assert "param m_p = 8 in 0 .. 15" in path.read_text(encoding="utf-8")
    assert _agrees(path.read_bytes()) is True


def test_mutants_of_the_palletizer() -> None:
    """Mutants of the palletizer arm (a mass matrix made singular, a payload range through
    0, a dropped term, ...): every light pass must be a pass of the full analysis, and both
    outcomes occur. Campaigns behind it: DEVELOPERS.md."""
    answered, handed = _mutant_outcomes([REPO / "example_repo" / "models" / "handling" / "palletizer_arm.plant"],
                                        16, 4100)
    assert answered >= 3 and handed >= 3, (answered, handed)


def _mutant_outcomes(sources: list[Path], count: int, first_seed: int) -> tuple[int, int]:
    """(light passes, hand-overs) over ``count`` mutants of ``sources`` in turn (without
    units, one or two mutations each), every light pass held equal to the full analysis."""
    answered = handed = 0
    for seed in range(count):
        rng = random.Random(first_seed + seed)
        text = sources[seed % len(sources)].read_text(encoding="utf-8")
        if _agrees(mutate_models.mutate(text, rng, True, 1 + seed % 2).encode("utf-8")):
            answered += 1
        else:
            handed += 1
    return answered, handed


def test_the_route_gives_up_when_the_full_analysis_has_answered() -> None:
    """The runner's check that the worker beside it has ended reaches the envelope proof:
    asked there, it ends the question with a hand-over."""
    boom = (REPO / "tests" / "fixtures" / "light" / "boom2.plant").read_bytes()
    assert prove_clean(boom).plant  # answered when nothing stops it
    with pytest.raises(HandOver, match="answered first"):
        prove_clean(boom, stop=lambda: True)


def test_mutants_of_light_passed_models() -> None:
    """Mutants (tools/mutate_models.py: numbers swapped for 0, 1e-300, 1e300, ..., names
    wrapped in functions, lines deleted or repeated, operators swapped, ranges widened
    through 0) of the models the light route passes. The campaigns behind this test ran
    thousands (DEVELOPERS.md); here 60, with fixed seeds."""
    sources = [BENCHMARKS / f"{name}.plant" for name in ("spring_chain_1", "pendulum_chain_2", "pendulum_bank_4")]
    answered = handed = 0
    for seed in range(60):
        rng = random.Random(seed)
        text = sources[seed % len(sources)].read_text(encoding="utf-8")
        mutant = mutate_models.mutate(text, rng, seed % 2 == 0, 1 + seed % 3)
        if _agrees(mutant.encode("utf-8")):
            answered += 1
        else:
            handed += 1
    assert answered >= 10 and handed >= 10, (answered, handed)


CLEAN = (BENCHMARKS / "spring_chain_1.plant").read_text(encoding="utf-8")

#: One defect each, in the 2-state model: (case, the rule the full analysis reports, edits).
DEFECTS = [
    ("unused", "unused-name", ("const mass = 1.5 [kg]", "const mass = 1.5 [kg]\nconst spare = 3 [kg]")),
    ("moving point", "point-not-equilibrium", ("point rest: p1 = 0, v1 = 0", "point rest: p1 = 0, v1 = 1/2")),
    ("input out of range", "point-outside-envelope", ("input F1 [N] in -100 .. 100\n", "input F1 [N] in -20 .. 20\n",
                                                       "point rest: p1 = 0, v1 = 0", "point rest: p1 = 1/10, v1 = 0")),
    ("wrong degree", "expectation-failed",
     ("expect relative_degree(far_end) = 2", "expect relative_degree(far_end) = 3")),
    ("gain through zero", "envelope-singular", ("rate v1 = (F1 - ", "rate v1 = (F1*cos(10*p1) - ")),
    ("pole in the box", "singular-model", ("rate v1 = (F1 - ", "rate v1 = (F1 - 1/(p1 + 1/10) + 10 - ")),
    ("repeated claim", "duplicate-claim", ("expect regular", "expect regular\nexpect regular")),
    ("unit", "unit-mismatch", ("const c = 2 [N*s/m]", "const c = 2 [N/m]")),
    ("state left out", "point-incomplete", ("point rest: p1 = 0, v1 = 0", "point rest: p1 = 0")),
    ("second output", "decoupling-singular",
     ("output far_end [m] = p1", "output far_end [m] = p1\noutput near_end [m] = v1")),
    # no zero dynamics, but no point to hold `minimum_phase` at either
    ("minimum phase without a point", "expectation-failed",
     ("point rest: p1 = 0, v1 = 0\n", "", "expect regular", "expect minimum_phase")),
]


def _handed_over_and_reported(text: str, rule: str, edits: tuple[str, ...]) -> None:
    """The model with ``edits`` (old, new, old, new, ...) is handed over by the light
    route, and the full analysis reports ``rule``."""
    for old, new in zip(edits[::2], edits[1::2]):
        assert old in text
        text = text.replace(old, new)
    data = text.encode("utf-8")
    with pytest.raises(HandOver):
        prove_clean(data)
    rules = {f.rule for f in analyse_bytes(data).findings}
    assert rule in rules, rules


@pytest.mark.parametrize("case, rule, edits", DEFECTS, ids=[d[0] for d in DEFECTS])
def test_one_defect_hands_the_model_over(case: str, rule: str, edits: tuple[str, ...]) -> None:
    _handed_over_and_reported(CLEAN, rule, edits)


BOOM = (REPO / "tests" / "fixtures" / "light" / "boom2.plant").read_text(encoding="utf-8")

#: Defects at points written in fractions of pi (formal numbers: kernel/formal.py), in the
#: two-link boom: (case, the rule the full analysis reports, edits).
PI_DEFECTS = [
    # sin(-pi/4) = -sqrt(2)/2 where the holding torque is cos(-pi/4) = +sqrt(2)/2
    ("torque given with the wrong sign", "point-not-equilibrium",
     ("tau2 = m2*lc2*g*cos(pi/4 - pi/2)", "tau2 = m2*lc2*g*sin(pi/4 - pi/2)")),
    # 3 pi / 4 = 2.356 > 2.2
    ("angle past its range", "point-outside-envelope", ("point upright: q1 = pi/2", "point upright: q1 = 3*pi/4")),
    # at reach, tau1 = (m1 lc1 + m2 l1) g cos(pi/6) + m2 lc2 g cos(pi/3) = 16.8 N m (by hand) > 10
    ("torque beyond its limit", "point-outside-envelope", ("input tau1 [N*m] in -40 .. 40", "input tau1 [N*m] in -10 .. 10")),
    # w2 = 1/10 at the point: the elbow moves
    ("moving elbow", "point-not-equilibrium", ("q2 = pi/6, w1 = 0, w2 = 0", "q2 = pi/6, w1 = 0, w2 = 1/10")),
]


@pytest.mark.parametrize("case, rule, edits", PI_DEFECTS, ids=[d[0] for d in PI_DEFECTS])
def test_one_defect_at_a_point_in_fractions_of_pi_hands_the_model_over(case: str, rule: str,
                                                                         edits: tuple[str, ...]) -> None:
    _handed_over_and_reported(BOOM, rule, edits)


HOIST = (REPO / "tests" / "fixtures" / "light" / "hoist.plant").read_text(encoding="utf-8")

#: Defects of the sprung hoist with a ranged payload m in 20 .. 120 kg: (case, the rule the
#: full analysis reports, edits).
PARAMETER_DEFECTS = [
    # z = +m g / k: dv/dt = -2 g there
    ("sag with the wrong sign", "point-not-equilibrium", ("point sag: z = -m*g/k", "point sag: z = m*g/k")),
    # F = k/2 + m g = 3088.6 N at the nominal 60 kg (by hand)
    ("force beyond its limit at the nominal payload", "point-outside-envelope",
     ("input F [N] in -5000 .. 5000", "input F [N] in -3000 .. 3000")),
    # 3677.2 N at 120 kg only (by hand): outside over the box, inside at the nominal payload
    ("force beyond its limit at the heavy end", "point-outside-envelope",
     ("input F [N] in -5000 .. 5000", "input F [N] in -3500 .. 3500")),
    # a payload range through 0: the rate divides by m
    ("payload range through zero", "singular-model", ("in 20 .. 120 [kg]", "in 0 .. 120 [kg]")),
    # the nominal payload outside its range (campaign seed 31 found the light route passing
    # such a palletizer: m_p = 8 in 0 .. 1/3)
    ("nominal outside its range", "bad-range", ("param m = 60 in 20 .. 120", "param m = 160 in 20 .. 120")),
]


@pytest.mark.parametrize("case, rule, edits", PARAMETER_DEFECTS, ids=[d[0] for d in PARAMETER_DEFECTS])
def test_one_defect_of_a_model_with_a_ranged_parameter_hands_it_over(case: str, rule: str,
                                                                    edits: tuple[str, ...]) -> None:
    _handed_over_and_reported(HOIST, rule, edits)


def test_an_identity_the_formal_numbers_do_not_know_is_handed_over() -> None:
    """sin(x)^2 + cos(x)^2 - 1 is 0 for every x, but at x = 1/3 the formal numbers hold
    s^2 + c^2 - 1 in two unknowns, and its ball cannot exclude 0: a rate that no input
    enters is not proven 0, so the model is handed over (the full analysis decides)."""
    model = b"""plant ident
state x in -1 .. 1
state y in -1 .. 1
input u in -5 .. 5
rate x = y + (sin(x)^2 + cos(x)^2 - 1)
rate y = -x + u
output out = x
point p: x = 1/3, y = 0
"""
    with pytest.raises(HandOver, match="not proven 0"):
        prove_clean(model)


def test_mutants_of_models_with_formal_points() -> None:
    """Mutants of the boom, of the example repository's labeller joint (pi/4 and
    m g d sin(pi/4) / k in its points) and of the hoist (a ranged payload); every light
    pass must be a pass of the full analysis. Campaigns behind it: DEVELOPERS.md."""
    sources = [REPO / "tests" / "fixtures" / "light" / "boom2.plant",
               REPO / "example_repo" / "models" / "handling" / "labeller_joint.plant",
               REPO / "tests" / "fixtures" / "light" / "hoist.plant"]
    answered, handed = _mutant_outcomes(sources, 30, 1000)
    assert answered >= 5 and handed >= 5, (answered, handed)


def test_hand_over_reasons_name_what_the_route_does_not_take() -> None:
    waived = (REPO / "tests" / "fixtures" / "models" / "contract_sample.plant").read_bytes()
    with pytest.raises(HandOver, match="waive"):
        prove_clean(waived)
    with pytest.raises(HandOver, match="outputs"):
        prove_clean(CLEAN.replace("output far_end [m] = p1", "").encode("utf-8"))


_PROBE = """
import sys
from plantlint.cli import main
code = main(sys.argv[1:])
sys.stdout.flush()
sys.exit(99 if "sympy" in sys.modules else code)
"""


def _cli(cwd: Path, *args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-c", _PROBE, *args], cwd=cwd, capture_output=True, text=True,
                          timeout=300)


def test_a_clean_model_is_checked_without_sympy_and_json_still_shows_the_analysis(tmp_path: Path) -> None:
    """The pre-commit case: a text report of a clean model imports no sympy (exit 99 if it
    did). The light result is cached apart: a json run with the same cache shows the full
    analysis, and imports sympy for it (99)."""
    model = tmp_path / "spring.plant"
    model.write_text(CLEAN, encoding="utf-8")
    cache = tmp_path / "cache"
    text = _cli(tmp_path, "check", "--cache-dir", str(cache), "spring.plant")
    assert text.returncode == 0, text.stdout + text.stderr
    assert "no findings" in text.stdout and "PASSED" in text.stdout
    again = _cli(tmp_path, "check", "--cache-dir", str(cache), "--format", "sarif", "spring.plant")
    assert again.returncode == 0, again.stderr
    assert json.loads(again.stdout)["runs"][0]["results"] == []
    shown = _cli(tmp_path, "check", "--cache-dir", str(cache), "--format", "json", "spring.plant")
    assert shown.returncode == 99, shown.stderr
    report = json.loads(shown.stdout)["files"][0]
    assert report["analysis"]["relative_degree"] == {"far_end": 2} and report["outcome"] == "pass"


def test_a_defect_is_reported_by_the_full_analysis_in_every_format(tmp_path: Path) -> None:
    model = tmp_path / "spring.plant"
    model.write_text(CLEAN.replace("expect relative_degree(far_end) = 2", "expect relative_degree(far_end) = 3"),
                     encoding="utf-8")
    out = _cli(tmp_path, "check", "--no-cache", "--format", "lines", "spring.plant")
    # the full analysis ran, in the worker (which imported sympy there, not in this process,
    # while this process asked the light route): its message is the proof
    assert out.returncode == 1, out.stderr
    assert "expectation-failed" in out.stdout and "relative degree of 'far_end' is 2" in out.stdout


def test_decoupling_gradients_of_a_one_state_plant() -> None:
    """The envelope proof's mean-value form reads dA/dx from Towers.decoupling_gradients. With
    one state the flow carries dual numbers, not jets, and the gradient was read as zero
    (a light pass of the envelope-singular fixture, caught by the comparison above). Held
    against sympy's diff of L_g h = (1 + x^2) * (2 + sin x) by hand: h = x, g = that."""
    import sympy as sp
    from flint import fmpq

    from plantlint.kernel.taylor import ArbField
    from plantlint.language.syntax import parse_text
    from plantlint.language.written import read_plant
    from plantlint.kernel.taylor import Towers

    parsed = parse_text("plant one\nstate x in -1 .. 1\ninput u\nrate x = -x + (1 + x^2)*(2 + sin(x))*u\n"
                        "output y = x\n")
    plant = read_plant(parsed.statements)
    towers = Towers(plant.states, (), plant.f, plant.g, plant.h, graph=plant.graph)
    x = sp.Symbol("x")
    reference = sp.diff((1 + x ** 2) * (2 + sp.sin(x)), x).subs(x, sp.Rational(1, 3))
    ((value, grad),), = towers.decoupling_gradients([fmpq(1, 3)], 0, ArbField(128))[0]
    assert grad[0].overlaps(grad[0].__class__(str(sp.N(reference, 40)))) and abs(float(grad[0]) - float(reference)) < 1e-12


def test_decoupling_gradients_along_the_ranged_parameters() -> None:
    """With ``params=True`` the gradient of A is also taken along the ranged parameters (the
    envelope proof's boxes have them as sides). Held against sympy's diff of the hoist-like
    L_g L_f z = 1/m (by hand: z' = v, v' = (F - k z)/m - g) and of a two-state plant whose
    input gain is c x^2 + sin(c) (L_g h = c x^2 + sin(c), h = x, in both x and c)."""
    import sympy as sp
    from flint import arb, fmpq

    from plantlint.kernel.taylor import ArbField, Towers
    from plantlint.language.syntax import parse_text
    from plantlint.language.written import read_plant

    for text, order, symbols, gain in (
        ("plant h\nparam m = 60 in 20 .. 120\nstate z in -1 .. 1\nstate v in -1 .. 1\ninput F\n"
         "rate z = v\nrate v = (F - 5000*z)/m - 10\noutput y = z\n", 1, ("z", "v", "m"), lambda s: 1 / s["m"]),
        ("plant g\nparam c = 2 in 1 .. 3\nstate x in -1 .. 1\ninput u\n"
         "rate x = -x + (c*x^2 + sin(c))*u\noutput y = x\n", 0, ("x", "c"), lambda s: s["c"] * s["x"] ** 2 + sp.sin(s["c"])),
    ):
        plant = read_plant(parse_text(text).statements)
        towers = Towers(plant.states, plant.params, plant.f, plant.g, plant.h, graph=plant.graph)
        point = [fmpq(1, 3)] * len(plant.states) + [fmpq(5, 2)]
        ((value, grad),), = [[e[order]] for e in towers.decoupling_gradients(point, order, ArbField(128),
                                                                               params=True)[0]]
        names = [*plant.states, *plant.params]
        assert names == list(symbols)
        sym = {n: sp.Symbol(n) for n in names}
        at = {sym[n]: sp.Rational(int(p.p), int(p.q)) for n, p in zip(names, point)}
        reference = gain(sym)
        assert value.overlaps(arb(str(sp.N(reference.subs(at), 40))))
        for a, n in enumerate(names):
            expected = sp.N(sp.diff(reference, sym[n]).subs(at), 40)
            assert grad[a].overlaps(arb(str(expected))) and abs(float(grad[a]) - float(expected)) < 1e-12, (n, grad)


def test_a_regularity_only_the_mean_value_form_proves_passes_in_both_routes() -> None:
    """A mutant (campaign seed 7) with a range 10^9 wide: L_g L_f^3 far_end =
    k (1 + 3 eps (p2 - p1)^2) / mass^2 > 0 everywhere (by hand). The mean-value form proves it
    in 243 boxes; the full analysis's proof by factors ran out of its 20000 boxes and said
    envelope-unproven, `expect regular` not decided, while the light route passed it. The
    full analysis now tries the same prover with at least the light route's boxes before it
    says unproven, so both pass it."""
    text = (BENCHMARKS / "spring_chain_2.plant").read_text(encoding="utf-8")
    text = text.replace("state p2 [m] in -1/5 .. 1/5", "state p2 [m] in -1/5 .. 1/1e-9")
    text = text.replace("expect regular", "expect regular\nexpect minimum_phase")  # none: it holds
    assert "1/1e-9" in text
    assert _agrees(text.encode("utf-8")) is True


def test_the_runner_asks_the_light_route_only_within_its_first_round(monkeypatch: pytest.MonkeyPatch) -> None:
    """A repository of models the route hands over late must not lose the workers'
    parallelism: after LIGHT_SERIAL_SECONDS the rest go to the full analysis directly."""
    from plantlint.run import runner
    from plantlint.run.config import Config

    sources = [runner.Source(f"m{i}.plant", CLEAN.encode("utf-8")) for i in range(2)]
    routes = [r.route for r in runner.raw_results(sources, Config(), jobs=1, use_cache=False, cache_dir=None,
                                                  show_progress=False, light=True)]
    assert routes == ["light", "light"]
    monkeypatch.setattr(runner, "LIGHT_SERIAL_SECONDS", 0.0)
    raws = runner.raw_results(sources, Config(), jobs=1, use_cache=False, cache_dir=None, show_progress=False,
                              light=True)
    assert [r.route for r in raws] == ["full", "full"] and all(r.analysis is not None for r in raws)


def test_the_first_round_bounds_each_model_by_what_is_left_of_it(monkeypatch: pytest.MonkeyPatch) -> None:
    """Each model of the first round is asked within what is left of the round, so a model
    whose points are slow to settle (formal numbers over a ranged parameter) cannot stretch
    the round past LIGHT_SERIAL_SECONDS."""
    from plantlint.run import runner
    from plantlint.run.config import Config
    from plantlint.run.pipeline import RawResult

    from plantlint.core import deadline

    asked: list[float | None] = []  # the wall-clock bound each model's light question ran under

    def bounded(seconds, step):  # type: ignore[no-untyped-def]
        asked.append(seconds)
        return deadline.LATE

    monkeypatch.setattr(deadline, "bounded", bounded)
    monkeypatch.setattr(runner, "analyse_all", lambda datas, *args, **kwargs: [RawResult() for _ in datas])
    sources = [runner.Source(f"m{i}.plant", CLEAN.encode("utf-8")) for i in range(3)]
    runner.raw_results(sources, Config(), jobs=1, use_cache=False, cache_dir=None, show_progress=False, light=True)
    assert len(asked) == 3
    assert all(w is not None and 0 < w <= runner.LIGHT_SERIAL_SECONDS for w in asked), asked
    asked.clear()  # and by the model's budget when that is shorter
    runner.raw_results(sources, Config(timeout=0.05), jobs=1, use_cache=False, cache_dir=None, show_progress=False,
                       light=True)
    assert asked and all(w is not None and 0 < w <= 0.05 for w in asked), asked


def test_on_one_core_the_light_route_goes_before_a_single_model_s_worker(monkeypatch: pytest.MonkeyPatch) -> None:
    """With one processor a worker beside the light route takes the core from it: a single
    model is asked first (as several are), and only a model it hands over goes to a worker,
    without the light route beside it. With two, the worker starts at once, beside it."""
    from plantlint.run import runner
    from plantlint.run.config import Config
    from plantlint.run.pipeline import RawResult

    calls: list[tuple[int, bool]] = []

    def analyse_all(datas, *args, early=None, **kwargs):  # type: ignore[no-untyped-def]
        calls.append((len(datas), early is not None))
        return [RawResult() for _ in datas]

    monkeypatch.setattr(runner, "analyse_all", analyse_all)
    clean = [runner.Source("clean.plant", CLEAN.encode("utf-8"))]
    defect = [runner.Source("defect.plant", CLEAN.replace("point rest: p1 = 0, v1 = 0",
                                                          "point rest: p1 = 0, v1 = 1/2").encode("utf-8"))]
    run = dict(jobs=1, use_cache=False, cache_dir=None, show_progress=False, light=True)
    monkeypatch.setattr(runner, "_cores", lambda: 1)
    assert [r.route for r in runner.raw_results(clean, Config(), **run)] == ["light"] and calls == []
    runner.raw_results(defect, Config(), **run)
    assert calls == [(1, False)]
    monkeypatch.setattr(runner, "_cores", lambda: 2)
    calls.clear()
    runner.raw_results(clean, Config(), **run)
    assert calls == [(1, True)]


def test_a_decoupling_term_beyond_the_floats_is_proven_exactly() -> None:
    """A mutant (campaign seed 11): the inertia 1e-300 makes L_g L_f^3 tip about 1e600 at
    the point, an exact rational beyond the floats; its lower bound overflowed a float
    conversion. Both routes pass the model (1/J^2 times positive factors, by hand)."""
    text = (BENCHMARKS / "pendulum_chain_2.plant").read_text(encoding="utf-8")
    assert "const J = " in text
    text = "\n".join("const J = 1e-300 [kg*m^2]" if line.startswith("const J = ") else line
                     for line in text.splitlines()) + "\n"
    assert _agrees(text.encode("utf-8")) is True


def test_a_holding_torque_outside_its_range_is_handed_over() -> None:
    """pendulum_arm_1 at q1 = 1/4 needs tau1 = g lc1 m1 sin(1/4) = 13.59 N m (by hand), an
    irrational number the light route solves in balls. With the torque limited to 10 N m the
    point needs an input outside its range: the route hands over, and the full analysis
    reports it."""
    text = (BENCHMARKS / "pendulum_arm_1.plant").read_text(encoding="utf-8")
    assert "input tau1 [N*m] in -400 .. 400" in text
    limited = text.replace("input tau1 [N*m] in -400 .. 400", "input tau1 [N*m] in -10 .. 10").encode("utf-8")
    with pytest.raises(HandOver, match="range"):
        prove_clean(limited)
    found = [f for f in analyse_bytes(limited).findings if f.rule == "point-outside-envelope"]
    assert found and "13.59" in found[0].message, [f.message for f in found]


def test_a_value_undefined_at_a_point_is_handed_over_not_raised() -> None:
    """A mutant (campaign seed 13) of the two-link arm whose rate holds (w1^2)^(f2*w2): at
    w1 = 0 that is a log of 0. The route must hand over (in the parent an error would end the
    run; light_check also catches it, prove_clean must say why)."""
    import re

    text = (REPO / "tests" / "fixtures" / "light" / "arm2.plant").read_text(encoding="utf-8")
    text = re.sub(r" *\[[^\]]*\]", "", text)  # without units, as the mutant was (else: a unit finding)
    text = text.replace("bb*sin(q2)*w1^2 - f2*w2", "bb*sin(q2)*w1^2 ^ f2*w2")
    assert "^ f2*w2" in text and "[" not in text
    with pytest.raises(HandOver, match="not defined at point home"):
        prove_clean(text.encode("utf-8"))


_WITHOUT_LIGHT = """
import sys
import plantlint.analysis.light as light
light.light_check = lambda *args, **kwargs: None
from plantlint.cli import main
sys.exit(main(sys.argv[1:]))
"""


@pytest.mark.parametrize("form", ["text", "lines", "markdown", "sarif"])
def test_a_light_report_is_the_full_analysis_report_byte_for_byte(tmp_path: Path, form: str) -> None:
    """What a user or a CI log sees does not tell the routes apart: the same bytes, the same
    exit code, with the light route and with it switched off."""
    (tmp_path / "spring.plant").write_text(CLEAN, encoding="utf-8")
    args = ["check", "--no-cache", "--format", form, "spring.plant"]
    light_run = subprocess.run([sys.executable, "-m", "plantlint", *args], cwd=tmp_path, capture_output=True,
                               text=True, timeout=300)
    full_run = subprocess.run([sys.executable, "-c", _WITHOUT_LIGHT, *args], cwd=tmp_path, capture_output=True,
                              text=True, timeout=300)
    assert light_run.returncode == full_run.returncode == 0
    assert light_run.stdout == full_run.stdout
    assert light_run.stdout or form == "lines"  # one line per finding: none here


_SLOW_LIGHT = """
import sys, time
import plantlint.analysis.light as light

def slow(*args, **kwargs):
    time.sleep(3)  # a light route slower than the model's budget, handing over at the end
    return None

light.light_check = slow
from plantlint.cli import main
sys.exit(main(sys.argv[1:]))
"""


def test_the_light_route_beside_a_worker_does_not_stretch_the_budget(tmp_path: Path) -> None:
    """While the parent asks the light route, the model's worker runs on its budget. The
    question is bounded by what is left of that budget, so the budget stops the worker on
    time: a worker that finishes after it is not decided, as without the light route,
    never passed because the parent was busy (it was, for 3 s, before the bound)."""
    (tmp_path / "spring.plant").write_text(CLEAN, encoding="utf-8")
    run = subprocess.run([sys.executable, "-c", _SLOW_LIGHT, "check", "--no-cache", "--timeout", "0.05",
                          "spring.plant"], cwd=tmp_path, capture_output=True, text=True, timeout=300)
    assert run.returncode == 1, run.stdout + run.stderr
    assert "NOT DECIDED" in run.stdout and "budget 0.05 s per model" in run.stdout
