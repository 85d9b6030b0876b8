"""Robustness campaign: check randomly mutated copies of the project's own models.

    python tools/mutate_models.py --count 1000 --seed 5 --out /tmp/mutants [--strip-units]
                                  [--max-mutations 3] [--timeout 10] [--jobs 2] [--light]

Writes ``--count`` mutated models into ``--out`` (numbers replaced by 0, 1e-300, 1e300,
...; names wrapped in functions; lines deleted, duplicated or cut; operators swapped;
ranges widened through zero; poles and powers added), runs ``plantlint check`` on the
folder with a short budget and prints what a developer must look at:

* internal errors (``stop.kind == "internal-error"``): a defect, always;
* models stopped by the budget: usually a slow path worth a look (a mutant is small);
* messages with raw infinities, NaN or tracebacks in them.

With ``--light`` the campaign is about the light route (README, "Two routes to a pass"):
it mutates the models that route passes and, in this process, holds every light pass
against the full analysis; a light pass of a model with a finding, or a light route that
raises, is printed with its mutant (written to ``--out``) and fails the run.

The mutants are written outside the repository and are not kept: the campaign is a way
to find problems, each found problem gets a test of its own. Every model it starts from is
invented demo or test data of this repository.
"""

from __future__ import annotations

import argparse
import json
import random
import re
import subprocess
import sys
from collections import Counter
from pathlib import Path
from typing import Any

REPO = Path(__file__).resolve().parent.parent
SOURCES = ("example_repo/models/**/*.plant", "tests/fixtures/models/*.plant")
SMALL_BENCHMARKS = re.compile(r"_(1|2|3)\.plant$|hovercraft|quadrotor|arm_1")
FUNCTIONS = ("sin", "cos", "tan", "exp", "log", "sqrt", "atan", "tanh", "abs", "asin", "acos", "sinh", "cosh")
NUMBERS = ("0", "0.0", "-1", "1e-300", "1e300", "2", "1/3", "(0)", "1e-9", "-0.5")
SUSPICIOUS = re.compile(r"\bzoo\b|\bnan\b|\boo\b|~?-?\binf\b|ComplexInfinity|Traceback", re.IGNORECASE)


def sources() -> list[Path]:
    found = [p for pattern in SOURCES for p in REPO.glob(pattern)]
    found += [p for p in (REPO / "benchmarks" / "results" / "models").glob("*.plant") if SMALL_BENCHMARKS.search(p.name)]
    return sorted(found)


def mutate(text: str, rng: random.Random, strip_units: bool, most: int) -> str:
    if strip_units:
        text = re.sub(r"\[[^\]\n]*\]", "", text)
    lines = text.split("\n")
    for _ in range(rng.randint(1, most)):
        i = rng.randrange(len(lines))
        line: str | None = lines[i]
        assert line is not None
        kind = rng.randrange(9)
        if kind == 0:  # a number replaced
            numbers = list(re.finditer(r"(?<![A-Za-z_])\d+(\.\d+)?(e-?\d+)?", line))
            if numbers:
                m = rng.choice(numbers)
                line = line[:m.start()] + rng.choice(NUMBERS) + line[m.end():]
        elif kind == 1:  # a name wrapped in a function, right of '='
            names = list(re.finditer(r"\b[a-z_][A-Za-z0-9_]*\b", line))
            if names and line.startswith(("rate", "output", "let")):
                m = rng.choice(names)
                if m.start() > line.find("="):
                    line = line[:m.start()] + f"{rng.choice(FUNCTIONS)}({m.group()})" + line[m.end():]
        elif kind == 2:  # a line deleted
            line = None
        elif kind == 3:  # a line duplicated
            lines.insert(i, line)
        elif kind == 4:  # an operator swapped
            ops = [m.start() for m in re.finditer(r"[-+*/^]", line)]
            if ops:
                j = rng.choice(ops)
                line = line[:j] + rng.choice("-+*/^") + line[j + 1:]
        elif kind == 5:  # a range widened through zero
            line = re.sub(r"in\s+\S+\s*\.\.\s*\S+", f"in -{rng.choice(['1', '10', '0.001', '1e6'])} .. "
                          f"{rng.choice(['1', '10', '0.001', '1e6'])}", line)
        elif kind == 6:  # a line cut short
            line = line[:rng.randrange(len(line) + 1)]
        elif kind == 7:  # a pole added to a rate
            if line.startswith("rate") and "=" in line:
                names = re.findall(r"\b[a-z_][A-Za-z0-9_]*\b", line.split("=", 1)[1])
                if names:
                    line = f"{line}/({rng.choice(names)} - {rng.choice(NUMBERS)})"
        elif kind == 8:  # a power added
            if "=" in line and line.startswith(("rate", "output")):
                line = f"{line}^{rng.choice(['2', '0.5', '-1', '3/2', '0', '(1/3)'])}"
        if line is None:
            del lines[i]
        else:
            lines[i] = line
        if not lines:
            lines = [""]
    return "\n".join(lines)


#: Models the light route passes, whose mutants are where a wrong light pass would hide.
LIGHT_SOURCES = ("tests/fixtures/light/*.plant", "benchmarks/results/models/spring_chain_[12].plant",
                 "benchmarks/results/models/pendulum_arm_*.plant", "benchmarks/results/models/pendulum_bank_4.plant",
                 "benchmarks/results/models/pendulum_chain_[23].plant", "tests/fixtures/rules/envelope-singular.plant",
                 "example_repo/models/handling/labeller_joint.plant", "example_repo/models/handling/palletizer_arm.plant")


def compare_light(data: bytes) -> tuple[Any, str]:
    """(the light route's pass, why the full analysis does not give it: "" when it does), or
    (None, "") when the light route hands the model over. An error of the light route is
    not caught: it is a defect."""
    import plantlint.analysis.light as light
    from plantlint.analysis.stages import STAGES
    from plantlint.run.pipeline import analyse_bytes

    try:
        answer = light.prove_clean(data)
    except light.HandOver:
        return None, ""
    raw = analyse_bytes(data)
    degrees = tuple((raw.analysis or {}).get("relative_degree", {}).values())
    why = [f"{f.rule}: {f.message[:120]}" for f in raw.findings]
    if raw.stop is not None or raw.stages != list(STAGES):
        why.append(f"stages {raw.stages}, stop {raw.stop}")
    if degrees != answer.degrees or raw.plant != answer.plant:
        why.append(f"plant {raw.plant}, relative degrees {degrees} against {answer.plant}, {answer.degrees}")
    return answer, "; ".join(why)


def light_campaign(out: Path, rng: random.Random, count: int, strip_units: bool, most: int) -> int:
    """Mutants of light-passed models: each one the light route passes must be passed by the
    full analysis (:func:`compare_light`). The light route's seconds bound is lifted, so
    what it answers does not depend on the host."""
    import plantlint.analysis.light as light

    light.MAX_SECONDS = 60.0
    models = sorted(p for pattern in LIGHT_SOURCES for p in REPO.glob(pattern))
    passed = bad = 0
    for n in range(count):
        source = rng.choice(models)
        text = mutate(source.read_text(encoding="utf-8"), rng, strip_units, most)
        path = out / f"m{n:05d}_{source.stem}.plant"
        try:
            answer, why = compare_light(text.encode("utf-8"))
        except Exception as exc:  # noqa: BLE001 - a defect to report, with its mutant
            bad += 1
            path.write_text(text, encoding="utf-8")
            print(f"LIGHT ROUTE RAISED  {path}: {type(exc).__name__}: {exc}")
            continue
        passed += answer is not None
        if why:
            bad += 1
            path.write_text(text, encoding="utf-8")
            print(f"LIGHT PASS THE FULL ANALYSIS DOES NOT GIVE  {path}: {why}")
    print(f"{count} mutants of {len(models)} light-passed models: {passed} passed by the light route, {bad} defects")
    return 1 if bad else 0


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--count", type=int, default=500)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--out", type=Path, required=True, help="a folder outside the repository")
    ap.add_argument("--strip-units", action="store_true", help="drop units first, so more mutants reach the analysis")
    ap.add_argument("--max-mutations", type=int, default=3)
    ap.add_argument("--timeout", type=float, default=10.0)
    ap.add_argument("--jobs", type=int, default=2)
    ap.add_argument("--light", action="store_true",
                    help="mutate the models the light route passes and hold every light pass against the full "
                         "analysis in this process (a light pass with a finding, or a light route that raises, "
                         "is a defect)")
    args = ap.parse_args()
    if args.out.resolve().is_relative_to(REPO):
        ap.error("--out must be outside the repository")
    rng = random.Random(args.seed)
    args.out.mkdir(parents=True, exist_ok=True)
    if args.light:
        return light_campaign(args.out, rng, args.count, args.strip_units, args.max_mutations)
    models = sources()
    for n in range(args.count):
        source = rng.choice(models)
        text = mutate(source.read_text(encoding="utf-8"), rng, args.strip_units, args.max_mutations)
        (args.out / f"m{n:05d}_{source.stem}.plant").write_text(text, encoding="utf-8")
    run = subprocess.run([sys.executable, "-m", "plantlint", "check", "--no-cache", "--format", "json",
                          "--jobs", str(args.jobs), "--timeout", f"{args.timeout:g}", str(args.out)],
                         capture_output=True, text=True)
    if run.returncode not in (0, 1) or "Traceback" in run.stderr:
        print(f"plantlint exited {run.returncode}:\n{run.stderr}")
        return 1
    report = json.loads(run.stdout)
    outcomes = Counter(f["outcome"] for f in report["files"])
    print(f"{len(report['files'])} mutants: " + ", ".join(f"{k} {v}" for k, v in sorted(outcomes.items())))
    bad = 0
    for f in report["files"]:
        stop = f.get("stop") or {}
        if stop.get("kind") == "internal-error":
            bad += 1
            print(f"INTERNAL ERROR  {f['path']}: {stop.get('detail')}")
        elif stop:
            print(f"stopped ({stop.get('kind')}, stage {stop.get('stage')})  {f['path']}")
        elif f["outcome"] == "not-decided":  # why, in one line: worth a look like a budget stop
            why = next((g["message"] for g in f["findings"] if not g.get("decided", True)), "")
            print(f"not decided  {f['path']}: {why[:200]}")
        for finding in f["findings"]:
            if SUSPICIOUS.search(finding["message"]):
                bad += 1
                print(f"SUSPICIOUS MESSAGE  {f['path']}: {finding['message'][:200]}")
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
