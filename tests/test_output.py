"""Output files: atomic, never over an input, never over an existing file without force."""

from __future__ import annotations

from pathlib import Path

import pytest

from minutes.errors import OutputError
from minutes.output import write_atomic


def test_writes_the_bytes_and_leaves_no_temporary_file(tmp_path: Path) -> None:
    target = tmp_path / "m.md"
    write_atomic(target, b"# Minutes\n")
    assert target.read_bytes() == b"# Minutes\n"
    assert [p.name for p in tmp_path.iterdir()] == ["m.md"]


def test_an_existing_file_is_kept_unless_forced(tmp_path: Path) -> None:
    target = tmp_path / "m.md"
    target.write_bytes(b"keep me")
    with pytest.raises(OutputError, match="already exists; use --force"):
        write_atomic(target, b"new")
    assert target.read_bytes() == b"keep me"
    write_atomic(target, b"new", force=True)
    assert target.read_bytes() == b"new"


def test_the_input_is_never_overwritten_even_with_force(tmp_path: Path) -> None:
    source = tmp_path / "meeting.vtt"
    source.write_bytes(b"WEBVTT\n")
    with pytest.raises(OutputError, match="input file"):
        write_atomic(tmp_path / "." / "meeting.vtt", b"x", force=True, inputs=[source])
    assert source.read_bytes() == b"WEBVTT\n"


def test_a_failed_write_leaves_nothing_behind(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    target = tmp_path / "m.md"

    def broken_fsync(fd: int) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr("os.fsync", broken_fsync)
    with pytest.raises(OSError):
        write_atomic(target, b"x" * 10_000)
    assert list(tmp_path.iterdir()) == []


def test_missing_folder_is_reported(tmp_path: Path) -> None:
    with pytest.raises(OutputError, match="does not exist"):
        write_atomic(tmp_path / "no" / "m.md", b"x")
