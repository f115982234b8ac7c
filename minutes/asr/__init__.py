"""Speech recognition on the CPU: a recording in, a ``Transcript`` of timed cues out.

faster-whisper (CTranslate2, int8) runs the bundled Whisper base model, assembled once into
the user's cache from the ``audio`` extra's packages; any other CTranslate2 Whisper folder can
be named instead. Nothing is ever downloaded. ::

    from minutes.asr import AsrOptions, transcribe, write_vtt
    from minutes.asr.progress import ProgressLine

    with ProgressLine(quiet=False) as bar:
        transcript = transcribe(Path("board.m4a"), AsrOptions(beam_size=5), progress=bar)
    Path("board.vtt").write_text(write_vtt(transcript), encoding="utf-8")

Public interface:

- ``AsrOptions``: model folder, beam size, language (None detects), VAD, word timestamps,
  threads (0: all cores), chunk seconds, pause that ends an utterance, speaker mode.
- ``transcribe(path, options=None, progress=None, *, recognizer=None) -> Transcript``:
  raises ``InputError`` (missing, damaged, no audio stream), ``ModelError`` (model or extra
  missing), ``UsageError`` (bad option values). ``progress(done_s, total_s)``.
- ``load_recognizer(options) -> WhisperRecognizer``: load once, pass as ``recognizer=`` to
  transcribe many files; ``ScriptedRecognizer`` is the fake for tests.
- ``ensure_model(cache_dir=None) -> Path``: the assembled, verified bundled model's folder.
- ``write_vtt(transcript) -> str``, ``write_srt(transcript, speakers=True) -> str``.
- ``AUDIO_EXTENSIONS``, ``is_recording(path)``: the suffixes the CLI treats as recordings.
- ``minutes.asr.progress.ProgressLine(quiet=False)``: a ``\\r``-updated stderr line usable as
  ``progress`` (minutes done of total, x real time, time left), for callers without click.

Every utterance carries its ``Cue``s, ids "1", "2", ... in order, which are the cue ids of the
WebVTT that ``write_vtt`` writes, so evidence cited from the transcript points into that file.
"""

from __future__ import annotations

from .audio import AUDIO_EXTENSIONS, SAMPLE_RATE, AudioInfo, is_recording, probe
from .backend import (
    DecodeSettings,
    Recognition,
    Recognizer,
    ScriptedRecognizer,
    Span,
    WhisperRecognizer,
    Word,
)
from .bundle import default_cache_dir, ensure_model, is_assembled, verify
from .captions import timestamp, write_srt, write_vtt
from .recognize import AsrOptions, Progress, load_recognizer, transcribe

__all__ = [
    "AUDIO_EXTENSIONS",
    "SAMPLE_RATE",
    "AsrOptions",
    "AudioInfo",
    "DecodeSettings",
    "Progress",
    "Recognition",
    "Recognizer",
    "ScriptedRecognizer",
    "Span",
    "WhisperRecognizer",
    "Word",
    "default_cache_dir",
    "ensure_model",
    "is_assembled",
    "is_recording",
    "load_recognizer",
    "probe",
    "timestamp",
    "transcribe",
    "verify",
    "write_srt",
    "write_vtt",
]
