"""The robustness-campaign tool (tools/mutate_models.py): mutants are reproducible, differ
from their source, and are never written into the repository."""

from __future__ import annotations

import importlib.util
import random
import re
import subprocess
import sys

from conftest import REPO

_SPEC = importlib.util.spec_from_file_location("mutate_models", REPO / "tools" / "mutate_models.py")
assert _SPEC is not None and _SPEC.loader is not None
mutate_models = importlib.util.module_from_spec(_SPEC)
_SPEC.loader.exec_module(mutate_models)


def test_mutants_are_reproducible_and_differ_from_their_source() -> None:
    sources = mutate_models.sources()
    assert any(p.parts[-4:-2] == ("example_repo", "models") or "example_repo" in p.parts for p in sources)
    text = sources[0].read_text(encoding="utf-8")
    first = [mutate_models.mutate(text, random.Random(seed), True, 3) for seed in range(40)]
    again = [mutate_models.mutate(text, random.Random(seed), True, 3) for seed in range(40)]
    assert first == again
    unit_free = re.sub(r"\[[^\]\n]*\]", "", text)
    assert all("[" not in m for m in first) or "[" in unit_free
    changed = sum(m != unit_free for m in first)
    assert changed >= 20  # most seeds change something (a mutation can be a no-op on its line)


def test_mutants_are_never_written_into_the_repository() -> None:
    run = subprocess.run([sys.executable, str(REPO / "tools" / "mutate_models.py"), "--count", "1",
                          "--out", str(REPO / "mutants")], capture_output=True, text=True)
    assert run.returncode == 2 and "outside the repository" in run.stderr
    assert not (REPO / "mutants").exists()


def test_the_light_campaign_holds_light_passes_against_the_full_analysis(tmp_path) -> None:
    run = subprocess.run([sys.executable, str(REPO / "tools" / "mutate_models.py"), "--light", "--count", "6",
                          "--seed", "1", "--out", str(tmp_path)], capture_output=True, text=True, timeout=600)
    assert run.returncode == 0, run.stdout + run.stderr
    assert re.search(r"6 mutants of \d+ light-passed models: \d+ passed by the light route, 0 defects", run.stdout)
