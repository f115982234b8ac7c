"""A plain stderr progress line for speech recognition (no click, so the library can use it).

``ProgressLine`` is a ``progress(done, total)`` callback for ``transcribe``::

    with ProgressLine(quiet=False) as bar:
        transcript = transcribe(path, options, progress=bar)

It rewrites one line with ``\\r``: minutes of audio done of the total, the speed as a multiple
of real time, and the time left at that speed.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable
from types import TracebackType
from typing import TextIO


def clock(seconds: float) -> str:
    """Return ``seconds`` as M:SS, or H:MM:SS from an hour on."""
    s = max(0, int(round(seconds)))
    h, rem = divmod(s, 3600)
    m, sec = divmod(rem, 60)
    return f"{h}:{m:02d}:{sec:02d}" if h else f"{m}:{sec:02d}"


def describe(done: float, total: float, elapsed: float) -> str:
    """Return the progress line's text for ``done`` of ``total`` audio seconds after ``elapsed``."""
    speed = done / elapsed if elapsed > 0 and done > 0 else 0.0
    if total > 0:
        pct = min(100, int(100 * done / total))
        text = f"transcribing {clock(done)} / {clock(total)} ({pct:3d}%)"
    else:
        text = f"transcribing {clock(done)}"
    if speed > 0:
        text += f"  {speed:.1f}x real time"
        if total > done:
            text += f"  {clock((total - done) / speed)} left"
    return text


class ProgressLine:
    """A ``(done, total)`` callback that writes a ``\\r``-updated line to stderr."""

    def __init__(self, quiet: bool = False, stream: TextIO | None = None,
                 interval: float = 0.5, now: Callable[[], float] = time.monotonic) -> None:
        self.quiet = quiet
        self.stream = stream if stream is not None else sys.stderr
        self.interval = interval
        self.now = now
        self.started = now()
        self.last_write = float("-inf")
        self.width = 0
        self.done = 0.0
        self.total = 0.0

    def __call__(self, done: float, total: float) -> None:
        """Record progress; redraw at most every ``interval`` seconds, and always at the end."""
        self.done, self.total = done, total
        if self.quiet:
            return
        t = self.now()
        finished = total > 0 and done >= total
        if t - self.last_write < self.interval and not finished:
            return
        self.last_write = t
        text = describe(done, total, t - self.started)
        pad = " " * max(0, self.width - len(text))
        self.width = len(text)
        self.stream.write(f"\r{text}{pad}")
        self.stream.flush()

    def close(self) -> None:
        """End the line so the next output starts on a fresh one."""
        if not self.quiet and self.width:
            self.stream.write("\n")
            self.stream.flush()
            self.width = 0

    def __enter__(self) -> ProgressLine:
        return self

    def __exit__(self, kind: type[BaseException] | None, exc: BaseException | None,
                 tb: TracebackType | None) -> None:
        self.close()
