"""Writing results: atomically, never over an input, never over a file unless asked."""

from __future__ import annotations

import contextlib
import os
import tempfile
from collections.abc import Iterable
from pathlib import Path

from .errors import OutputError


def check_target(path: Path, *, force: bool, inputs: Iterable[Path] = ()) -> None:
    """Raise OutputError if ``path`` must not be written (an input, or exists without force)."""
    target = path.resolve()
    for source in inputs:
        if source.exists() and target == source.resolve():
            raise OutputError(f"{path}: this is an input file; choose another output name")
    if path.is_dir():
        raise OutputError(f"{path}: is a folder; give a file name")
    if path.exists() and not force:
        raise OutputError(f"{path}: already exists; use --force to replace it")
    if not path.parent.exists():
        raise OutputError(f"{path}: the folder {path.parent} does not exist")


def write_atomic(path: Path, data: bytes, *, force: bool = False,
                 inputs: Iterable[Path] = ()) -> None:
    """Write ``data`` to ``path`` via a temporary file and a rename: never a partial file."""
    check_target(path, force=force, inputs=inputs)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(tmp, 0o644)
        if not force and path.exists():  # appeared while we were writing
            raise OutputError(f"{path}: already exists; use --force to replace it")
        os.replace(tmp, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise
