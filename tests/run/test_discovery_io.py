"""Files that cannot be read as models: symbolic link loops, dangling links, pipes,
unreadable files. Each is named with a clear message and the run exits 2 (an I/O
problem, not a finding about a model); nothing is skipped in silence and nothing
hangs. Models are invented."""

from __future__ import annotations

import errno
import os
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest

from plantlint.cli import main

MODEL = "plant lag\nstate x in -1 .. 1\ninput u\nrate x = -x + u\noutput y = x\n"


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str]:
    code = main(["check", "--no-cache", "--jobs", "1", *args])
    err = capsys.readouterr().err
    assert "Traceback" not in err
    return code, err


def test_symlink_loop_named_on_the_command_line(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                                monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    Path("loop.plant").symlink_to("loop.plant")
    code, err = run(capsys, "loop.plant")
    assert code == 2
    assert "loop.plant: symbolic link loop" in err


def test_broken_links_in_a_folder_are_named_not_skipped(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                                         monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    models = Path("models")
    models.mkdir()
    (models / "good.plant").write_text(MODEL, encoding="utf-8")
    (models / "dangling.plant").symlink_to("gone.plant")
    (models / "a.plant").symlink_to("b.plant")
    (models / "b.plant").symlink_to("a.plant")
    code, err = run(capsys, "models")
    assert code == 2
    assert "models/dangling.plant: symbolic link to 'gone.plant', which does not exist" in err
    assert "models/a.plant: symbolic link loop" in err and "models/b.plant: symbolic link loop" in err
    assert "3 paths cannot be read" in err and "nothing was checked" in err
    # a link the configuration excludes is not our business
    Path("plantlint.toml").write_text('exclude = ["models/a.plant", "models/b.plant", '
                                      '"models/dangling.plant"]\n', encoding="utf-8")
    code, err = run(capsys, "models")
    assert code == 0, err


def test_named_pipe_is_refused_without_waiting(tmp_path: Path) -> None:
    if not hasattr(os, "mkfifo"):
        pytest.skip("no named pipes here")
    os.mkfifo(tmp_path / "pipe.plant")
    # a separate process with a deadline: before the fix, opening the pipe waited for ever
    out = subprocess.run([sys.executable, "-m", "plantlint", "check", "--no-cache", "pipe.plant"], cwd=tmp_path,
                         capture_output=True, text=True, timeout=120)
    assert out.returncode == 2
    assert "pipe.plant: not a regular file (a named pipe)" in out.stderr


def test_unreadable_file_is_an_io_problem_not_a_syntax_finding(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                                                monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    Path("secret.plant").write_text(MODEL, encoding="utf-8")
    # tests run as root, for whom chmod 000 does not stop reading: refuse the open instead
    real_open = os.open

    def refuse(path, flags, *args, **kwargs):  # type: ignore[no-untyped-def]
        if str(path).endswith("secret.plant"):
            raise PermissionError(errno.EACCES, os.strerror(errno.EACCES), str(path))
        return real_open(path, flags, *args, **kwargs)

    monkeypatch.setattr(os, "open", refuse)
    code, err = run(capsys, "secret.plant")
    assert code == 2
    assert "secret.plant: cannot read: Permission denied" in err


# -- file names that are not UTF-8; writing the report ------------------------------------

def _strings(value: object) -> list[str]:
    if isinstance(value, str):
        return [value]
    if isinstance(value, dict):
        return [s for k, v in value.items() for s in (*_strings(k), *_strings(v))]
    if isinstance(value, list):
        return [s for v in value for s in _strings(v)]
    return []


def _latin1_named_model(tmp_path: Path) -> Path:
    """A folder ``my models`` holding a model whose name is the Latin-1 bytes ``caf\\xe9.plant``."""
    if sys.platform == "darwin" or sys.getfilesystemencoding().lower() not in ("utf-8", "utf8"):
        pytest.skip("needs a file system that takes any bytes as a name")
    folder = tmp_path / "my models"
    folder.mkdir()
    name = os.fsdecode(b"caf\xe9.plant")
    assert "\udce9" in name  # what discovery reads back: a lone surrogate for the byte 0xe9
    # an unused parameter: one warning, so every format names the file and the run passes
    (folder / name).write_text(MODEL.replace("state", "param k = 2\nstate"), encoding="utf-8")
    return folder


def test_a_file_name_that_is_not_utf8_in_every_format(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                                      monkeypatch: pytest.MonkeyPatch) -> None:
    import json

    import jsonschema

    from conftest import STANDARDS
    from plantlint.report.formats.json_report import report_schema

    monkeypatch.chdir(tmp_path)
    _latin1_named_model(tmp_path)
    sarif = tmp_path / "r.sarif"
    code, err = run(capsys, "--format", "sarif", "--output", str(sarif), "my models")
    assert code == 0, err
    raw = sarif.read_bytes()
    log = json.loads(raw.decode("utf-8"))  # strict UTF-8
    schema = json.loads((STANDARDS / "sarif-schema-2.1.0.json").read_text(encoding="utf-8"))
    jsonschema.Draft4Validator(schema).validate(log)
    assert not any(0xD800 <= ord(c) <= 0xDFFF for s in _strings(log) for c in s)
    # the URI percent-encodes the name's own bytes (0xe9), not a UTF-8 encoding of a character
    (result,) = log["runs"][0]["results"]
    assert result["ruleId"] == "unused-name"
    assert result["locations"][0]["physicalLocation"]["artifactLocation"] == {
        "uri": "my%20models/caf%E9.plant", "uriBaseId": "%SRCROOT%"}
    report = tmp_path / "r.json"
    code, err = run(capsys, "--format", "json", "--output", str(report), "my models")
    assert code == 0, err
    data = json.loads(report.read_bytes().decode("utf-8"))
    jsonschema.Draft202012Validator(report_schema()).validate(data)
    assert [f["path"] for f in data["files"]] == ["my models/caf\\xe9.plant"]
    assert not any(0xD800 <= ord(c) <= 0xDFFF for s in _strings(data) for c in s)
    for fmt in ("lines", "text", "markdown"):
        code = main(["check", "--no-cache", "--jobs", "1", "--format", fmt, "my models"])
        out, err = capsys.readouterr()
        assert code == 0 and "Traceback" not in err, err
        assert "my models/caf\\xe9.plant" in out, out  # the byte shown as in the JSON report
        assert "unused-name" in out or fmt == "markdown", out
    code = main(["check", "--no-cache", "--jobs", "1", "--shard", "1/1", "my models"])  # hashes the name
    assert code == 0 and "Traceback" not in capsys.readouterr().err


def test_a_report_that_cannot_be_written_keeps_the_earlier_one(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                                               monkeypatch: pytest.MonkeyPatch) -> None:
    from plantlint.report.formats.sarif import SarifFormatter

    monkeypatch.chdir(tmp_path)
    Path("lag.plant").write_text(MODEL.replace("state", "param k = 2\nstate"), encoding="utf-8")
    Path("out").mkdir()
    earlier = Path("out/r.sarif")
    code, err = run(capsys, "--format", "sarif", "--output", str(earlier), "lag.plant")
    assert code == 0, err
    before = earlier.read_bytes()
    earlier.chmod(0o640)

    def half_then_fail(self: object, report: object, stream: Any, *, color: bool = False) -> None:
        stream.write('{"version": "2.1.0", "runs": [')
        raise ValueError("broken\nin two lines")

    monkeypatch.setattr(SarifFormatter, "render", half_then_fail)
    code, err = run(capsys, "--format", "sarif", "--output", str(earlier), "lag.plant")
    # not 1 (1 means findings): a report that could not be written is an I/O problem, in one line
    assert code == 2
    assert err.count("\n") == 1 and "could not be written" in err and "ValueError" in err, err
    assert earlier.read_bytes() == before  # neither truncated nor half-written
    assert sorted(p.name for p in Path("out").iterdir()) == ["r.sarif"]  # no temporary file left
    monkeypatch.undo()
    monkeypatch.chdir(tmp_path)
    code, err = run(capsys, "--format", "json", "--output", str(earlier), "lag.plant")
    assert code == 0, err
    assert earlier.read_bytes().startswith(b'{\n  "format": "plantlint-report"')  # replaced in full
    assert earlier.stat().st_mode & 0o777 == 0o640  # with the permissions it had
    code, err = run(capsys, "--format", "json", "--output", "no/such/folder/r.json", "lag.plant")
    assert code == 2 and "no/such/folder/r.json: cannot write" in err and err.count("\n") == 1, err
