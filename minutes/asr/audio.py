"""Reading recordings: probe a file, then stream it as 16 kHz mono windows cut at quiet moments.

Whisper's own ``transcribe`` decodes the whole file and computes features for all of it at
once, so its memory grows with the length of the recording (about 0.86 MB per second of audio,
see ../shared/STACK.md). We decode with PyAV frame by frame and hand the recogniser one window
at a time. Each window ends at the quietest moment of its last few seconds, so a word is almost
never cut in two and windows need no overlap and no de-duplication: the text of window k is
simply followed by the text of window k + 1, shifted by the window's start time.
"""

from __future__ import annotations

import gc
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import InputError, missing_extra

SAMPLE_RATE = 16_000
AUDIO_EXTENSIONS = (".wav", ".mp3", ".m4a", ".flac", ".ogg", ".opus", ".mp4", ".webm", ".mkv",
                    ".mov")

_FRAME = 320  # 20 ms at 16 kHz: the unit of the loudness search
_SMOOTH = 15  # frames (300 ms) averaged, so a cut lands in a pause, not between two syllables


def is_recording(path: Path | str) -> bool:
    """Return True when the file's suffix is one minutes reads as a recording."""
    return Path(path).suffix.lower() in AUDIO_EXTENSIONS


@dataclass(frozen=True)
class AudioInfo:
    """What the container says about a recording before we decode it."""

    path: Path
    duration: float  # seconds; 0.0 when the container does not say
    codec: str
    sample_rate: int
    channels: int


@dataclass
class Window:
    """A stretch of audio for the recogniser: samples and where they start in the file."""

    start: float  # seconds from the start of the recording
    samples: np.ndarray  # float32, mono, 16 kHz

    @property
    def end(self) -> float:
        """Return the time just after the last sample."""
        return self.start + len(self.samples) / SAMPLE_RATE


@dataclass
class DecodeReport:
    """What went wrong quietly while decoding (filled in as the stream is read)."""

    skipped_packets: int = 0
    decoded_seconds: float = 0.0


def _av() -> Any:
    try:
        import av
    except ImportError as exc:
        raise missing_extra("faster-whisper", "audio") from exc
    return av


def probe(path: Path) -> AudioInfo:
    """Return the audio stream's description, or raise InputError when there is none to read."""
    path = Path(path)
    if not path.exists():
        raise InputError("the recording does not exist; check the path", path=str(path))
    if not path.is_file():
        raise InputError("is not a file; pass an audio or video file", path=str(path))
    if path.stat().st_size == 0:
        raise InputError("the file is empty", path=str(path))
    av = _av()
    try:
        with av.open(str(path), mode="r", metadata_errors="ignore") as container:
            if not container.streams.audio:
                kinds = ", ".join(sorted({s.type for s in container.streams})) or "nothing"
                raise InputError(f"has no audio stream (it holds {kinds}); pass a recording "
                                 "with sound", path=str(path))
            stream = container.streams.audio[0]
            duration = 0.0
            if stream.duration is not None and stream.time_base is not None:
                duration = float(stream.duration * stream.time_base)
            elif container.duration is not None:
                duration = container.duration / 1_000_000  # microseconds (AV_TIME_BASE)
            ctx = stream.codec_context
            return AudioInfo(path=path, duration=max(duration, 0.0), codec=ctx.name or "",
                             sample_rate=int(ctx.sample_rate or 0),
                             channels=int(getattr(ctx, "channels", 0) or 0))
    except av.FFmpegError as exc:
        raise InputError(f"cannot be read as audio or video ({_reason(exc)}); is it damaged, "
                         f"or not a recording? Readable kinds: {', '.join(AUDIO_EXTENSIONS)}",
                         path=str(path)) from exc


def samples(path: Path, report: DecodeReport | None = None) -> Iterator[np.ndarray]:
    """Yield the first audio stream as float32 mono 16 kHz blocks, in order."""
    av = _av()
    report = report if report is not None else DecodeReport()
    # The same conversion faster-whisper's decode_audio makes (s16, then / 32768), so a short
    # file reaches the model as exactly the same numbers by either road.
    resampler = av.AudioResampler(format="s16", layout="mono", rate=SAMPLE_RATE)
    total = 0
    try:
        with av.open(str(path), mode="r", metadata_errors="ignore") as container:
            stream = container.streams.audio[0]
            for packet in container.demux(stream):
                try:
                    frames = packet.decode()
                except av.error.InvalidDataError:
                    report.skipped_packets += 1  # a damaged packet: skip it, as ffmpeg does
                    continue
                for frame in frames:
                    frame.pts = None  # resample by sample count; gaps in timestamps are ignored
                    for out in resampler.resample(frame):
                        block = _to_float(out)
                        total += len(block)
                        yield block
            for out in resampler.resample(None):
                block = _to_float(out)
                total += len(block)
                yield block
    except av.FFmpegError as exc:
        raise InputError(f"decoding failed at {total / SAMPLE_RATE:.1f} s ({_reason(exc)}); "
                         "the file may be damaged", path=str(path)) from exc
    finally:
        report.decoded_seconds = total / SAMPLE_RATE
        # PyAV's resampler graph is only freed by the collector (faster-whisper issue 390).
        del resampler
        gc.collect()


def _to_float(frame: Any) -> np.ndarray:
    return frame.to_ndarray().reshape(-1).astype(np.float32) / 32768.0


def _reason(exc: Exception) -> str:
    return str(getattr(exc, "strerror", "") or exc).strip() or type(exc).__name__


def windows(blocks: Iterator[np.ndarray], seconds: float, search: float = 15.0
            ) -> Iterator[Window]:
    """Yield windows of about ``seconds`` each, cut at the quietest point of their last part."""
    target = int(seconds * SAMPLE_RATE)
    search_n = int(min(search, seconds / 4) * SAMPLE_RATE)
    pending: list[np.ndarray] = []
    have = 0
    start = 0  # in samples
    for block in blocks:
        pending.append(block)
        have += len(block)
        while have >= target:
            buf = np.concatenate(pending) if len(pending) > 1 else pending[0]
            cut = quietest_cut(buf[:target], target - search_n)
            yield Window(start=start / SAMPLE_RATE, samples=buf[:cut].copy())
            start += cut
            rest = buf[cut:].copy()
            pending, have = [rest], len(rest)
            del buf
    if have:
        buf = np.concatenate(pending) if len(pending) > 1 else pending[0]
        yield Window(start=start / SAMPLE_RATE, samples=buf)


def quietest_cut(audio: np.ndarray, earliest: int) -> int:
    """Return the sample index in ``audio[earliest:]`` at the middle of its quietest 300 ms."""
    earliest = max(0, min(earliest, len(audio) - 1))
    region = audio[earliest:]
    frames = len(region) // _FRAME
    if frames <= _SMOOTH:
        return len(audio)
    energy = np.square(region[: frames * _FRAME].astype(np.float64)).reshape(frames, _FRAME)
    energy = energy.mean(axis=1)
    smooth = np.convolve(energy, np.ones(_SMOOTH) / _SMOOTH, mode="valid")
    floor = float(smooth.min())
    # Ties (digital silence) resolve to the middle of the last quiet run, keeping windows near
    # full length and the cut away from the speech on either side.
    quiet = np.flatnonzero(smooth <= floor + 1e-12)
    last = len(quiet) - 1
    first = last
    while first > 0 and quiet[first - 1] == quiet[first] - 1:
        first -= 1
    best = int(quiet[first] + quiet[last]) // 2
    return earliest + (best + _SMOOTH // 2) * _FRAME + _FRAME // 2
