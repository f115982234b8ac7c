"""Ingest: caption and transcript files in, one ``Transcript`` out.

Formats are plain registries: ``EXTENSIONS`` maps a file extension to a format name and
``READERS`` maps the name to its reader, ``reader(text, path) -> Transcript``. The format
comes from the extension and is confirmed by the content (a ``.txt`` that is really
WebVTT is read as WebVTT, with a warning). Speaker labels are kept exactly as given;
resolving them to people is ``minutes.speakers``' job. Audio and video are not read
here: they go through speech recognition, which yields the same ``Transcript``.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from pathlib import Path

from ..errors import InputError, UsageError
from ..model import Transcript
from .common import decode, replace_nul
from .jsonfile import read_json
from .merge import MAX_DURATION, MAX_GAP, merge_cues
from .plain import read_txt
from .srt import looks_like_srt, read_srt
from .vtt import is_webvtt, read_vtt

Reader = Callable[[str, str], Transcript]

READERS: dict[str, Reader] = {"vtt": read_vtt, "srt": read_srt, "txt": read_txt, "json": read_json}
EXTENSIONS: dict[str, str] = {".vtt": "vtt", ".srt": "srt", ".txt": "txt", ".json": "json"}
# recordings: the pipeline sends these to speech recognition instead
AUDIO_EXTENSIONS = frozenset({
    ".wav", ".mp3", ".m4a", ".aac", ".flac", ".ogg", ".oga", ".opus", ".wma", ".aiff",
    ".mp4", ".m4v", ".mkv", ".mov", ".webm", ".avi", ".wmv", ".mpg", ".mpeg", ".3gp",
})

__all__ = ["AUDIO_EXTENSIONS", "EXTENSIONS", "MAX_DURATION", "MAX_GAP", "READERS", "Reader",
           "decode", "merge_cues", "read_transcript"]


def read_transcript(path: Path, *, encoding: str | None = None,
                    format: str | None = None) -> Transcript:
    """Return the transcript of a caption or transcript file (format from its extension)."""
    path = Path(path)
    name = str(path)
    fmt = _format_of(path, format)
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        raise InputError("file not found; check the path", path=name) from None
    except IsADirectoryError:
        raise InputError("is a folder; give a caption or transcript file", path=name) from None
    except OSError as err:
        raise InputError(f"cannot be read: {err.strerror or err}", path=name) from None
    if not data:
        raise InputError("the file is empty; it holds no cues", path=name)
    text, nul_warning = replace_nul(decode(data, name, encoding))
    if not text.strip():
        raise InputError("holds only blank space; it holds no cues", path=name)
    fmt, sniff_warning = _confirm(fmt, text, name, explicit=format is not None)
    transcript = READERS[fmt](text, name)
    early = tuple(w for w in (sniff_warning, nul_warning) if w)
    return replace(transcript, warnings=early + transcript.warnings) if early else transcript


def _format_of(path: Path, format: str | None) -> str:
    if format is not None:
        if format in READERS:
            return format
        if format == "audio":
            raise InputError(_AUDIO, path=str(path))
        raise UsageError(f"unknown transcript format {format!r}; choose one of "
                         f"{', '.join(READERS)}")
    ext = path.suffix.lower()
    if ext in EXTENSIONS:
        return EXTENSIONS[ext]
    if ext in AUDIO_EXTENSIONS:
        raise InputError(_AUDIO, path=str(path))
    shown = f"extension {ext!r}" if ext else "no extension"
    raise InputError(f"has {shown}; caption and transcript files must end in "
                     f"{', '.join(EXTENSIONS)} (recordings: "
                     f"{', '.join(sorted(AUDIO_EXTENSIONS)[:6])}, ... go through speech "
                     "recognition)", path=str(path))


_AUDIO = ("is a recording (audio or video), not a caption file; recordings are read "
          "through speech recognition: use the audio path")


def _confirm(fmt: str, text: str, path: str, *, explicit: bool) -> tuple[str, str | None]:
    """Return the format the content confirms, and a warning when it differs."""
    if fmt == "vtt" or explicit:
        return fmt, None  # the WebVTT reader itself refuses a file without the header
    if is_webvtt(text):
        return "vtt", f"the file is named as {fmt} but holds WebVTT; read as WebVTT"
    if fmt == "txt" and looks_like_srt(text):
        return "srt", "the file is named as txt but holds SRT captions; read as SRT"
    return fmt, None
