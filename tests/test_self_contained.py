"""The repository stands on its own: tests read no file outside it, and the
documentation points only at the project's own files.

The SARIF schema the tests validate against is the published OASIS SARIF 2.1.0
schema, kept in ``tests/standards/`` (see the README there).
"""

from __future__ import annotations

import json
import re
from pathlib import Path
from conftest import REPO

SARIF_SCHEMA = REPO / "tests" / "standards" / "sarif-schema-2.1.0.json"
DOCS = [REPO / "README.md", REPO / "DEVELOPERS.md", *sorted((REPO / "docs").glob("*.md"))]
LINK = re.compile(r"\]\(([^)#\s]+)")


def test_published_sarif_schema_is_kept_in_the_repository() -> None:
    schema = json.loads(SARIF_SCHEMA.read_text(encoding="utf-8"))
    # the OASIS SARIF 2.1.0 (Errata 01) schema's own identifier
    assert schema["id"] == "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
    assert schema["$schema"] == "http://json-schema.org/draft-04/schema#"
    readme = (SARIF_SCHEMA.parent / "README.md").read_text(encoding="utf-8")
    assert "OASIS" in readme and schema["id"] in readme


def test_no_test_reads_outside_the_repository() -> None:
    outside = re.compile(r"\b(?:REPO|REPO_ROOT|ROOT)\.parent\b|\.parent\.parent\.parent|\.\./shared")
    for path in sorted((REPO / "tests").rglob("*.py")):
        if path.name == Path(__file__).name:
            continue
        assert not outside.search(path.read_text(encoding="utf-8")), f"{path.name} reads outside the repository"


def test_docs_reference_only_the_project() -> None:
    for doc in DOCS:
        text = doc.read_text(encoding="utf-8")
        assert "shared/" not in text, f"{doc.name} points outside the repository"
        for target in LINK.findall(text):
            if "://" in target or target.startswith("mailto:"):
                continue
            resolved = (doc.parent / target).resolve()
            assert resolved.is_relative_to(REPO), f"{doc.name} links outside the repository: {target}"
            assert resolved.exists(), f"{doc.name} links to a missing file: {target}"
