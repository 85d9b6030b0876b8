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
