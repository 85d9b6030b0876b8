"""Where the grammar and the rule catalogue live, installed or in the source tree."""

from __future__ import annotations

from pathlib import Path


def data_path(name: str) -> Path:
    """The folder ``name`` (``"grammar"`` or ``"rules"``).

    A built wheel carries them as ``plantlint/_data/NAME`` (see pyproject's
    force-include); an editable install reads them from the source tree. Both are
    folders on disk beside the package (plantlint is never imported from a zip file), so
    the package's own path finds them, without importlib.resources (which imports
    tempfile and shutil: a tenth of the start-up of a check answered from the cache).
    """
    here = Path(__file__).resolve()
    packaged = here.parents[1] / "_data" / name
    if packaged.is_dir():
        return packaged
    source = here.parents[3] / name
    if source.is_dir():
        return source
    raise FileNotFoundError(f"plantlint data folder {name!r} is missing from the installation")
