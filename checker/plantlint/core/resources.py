"""Where the grammar and the rule catalogue live, installed or in the source tree."""

from __future__ import annotations

import importlib.resources
from pathlib import Path


def data_path(name: str) -> Path:
    """The folder ``name`` (``"grammar"`` or ``"rules"``).

    A built wheel carries them as ``plantlint/_data/NAME`` (see pyproject's
    force-include); an editable install reads them from the source tree.
    """
    packaged = importlib.resources.files("plantlint") / "_data" / name
    if packaged.is_dir():
        return Path(str(packaged))
    source = Path(__file__).resolve().parents[3] / name
    if source.is_dir():
        return source
    raise FileNotFoundError(f"plantlint data folder {name!r} is missing from the installation")
