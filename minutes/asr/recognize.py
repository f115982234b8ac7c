"""Speech recognition of a whole recording: stream windows, recognise, stitch, cut into cues."""

from __future__ import annotations

import gc
import importlib.util
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Literal

from ..errors import InputError, UsageError, missing_extra
from ..model import Transcript
from .audio import DecodeReport, probe, samples, windows
from .backend import DecodeSettings, Recognizer, WhisperRecognizer, Word, supported_languages
from .bundle import check_model_dir, ensure_model
from .cues import CueRules, build, tidy

Progress = Callable[[float, float], None]
SpeakerMode = Literal["one", "pauses"]

# No window is prompted with the text before it: with the previous window's last words as
# initial_prompt, beam-1 Whisper dropped a whole sentence of a 12 s window in
# tests/test_asr_whisper.py (and recognised it unprompted); losing speech is worse than the
# small drift in casing or spelling a prompt would prevent at a cut every few minutes.


@dataclass(frozen=True)
class AsrOptions:
    """How to recognise speech; every default works offline with the bundled model."""

    model: Path | None = None  # a CTranslate2 Whisper folder; None: the bundled Whisper base
    beam_size: int = 5
    language: str | None = "en"  # a Whisper language code; None: detect from the first window
    vad: bool = True  # skip silence with Silero VAD (bundled with faster-whisper)
    word_timestamps: bool = True  # needed to end cues and utterances at pauses
    threads: int = 0  # 0: every core this process may use
    chunk_seconds: float = 300.0  # audio decoded and recognised at a time: bounds memory
    pause_seconds: float = 0.8  # a longer silence between words ends an utterance
    speakers: SpeakerMode = "one"  # "pauses": alternate two labels at long silences (a guess)
    turn_pause_seconds: float = 2.0  # the silence that "pauses" takes for a change of speaker
    cache_dir: Path | None = None  # where the bundled model is assembled; None: user cache

    def check(self) -> None:
        """Raise UsageError when a value cannot work."""
        if self.beam_size < 1:
            raise UsageError(f"beam size must be 1 or more, not {self.beam_size}")
        if self.threads < 0:
            raise UsageError(f"threads must be 0 (all cores) or more, not {self.threads}")
        if self.chunk_seconds < 5:
            raise UsageError(f"chunk seconds must be 5 or more (300 is a good choice), "
                             f"not {self.chunk_seconds}")
        if self.pause_seconds <= 0 or self.turn_pause_seconds <= 0:
            raise UsageError("pause lengths must be more than 0 seconds")
        if self.speakers not in ("one", "pauses"):
            raise UsageError(f"unknown speaker mode {self.speakers!r}; choose 'one' or 'pauses'")


def load_recognizer(options: AsrOptions | None = None) -> WhisperRecognizer:
    """Return faster-whisper loaded from ``options.model`` or the bundled model (no download)."""
    options = options or AsrOptions()
    options.check()
    if importlib.util.find_spec("faster_whisper") is None:
        raise missing_extra("faster-whisper", "audio")
    if options.language is not None:
        known = supported_languages()
        if options.language not in known:
            raise UsageError(f"unknown language {options.language!r}; use a Whisper code such "
                             f"as en, de, fr, es, nl (all: {', '.join(known)}), or none to "
                             "detect it")
    folder = check_model_dir(Path(options.model)) if options.model else ensure_model(
        options.cache_dir)
    return WhisperRecognizer(folder, options.threads)


def transcribe(path: Path | str, options: AsrOptions | None = None,
               progress: Progress | None = None, *,
               recognizer: Recognizer | None = None) -> Transcript:
    """Return the recording's transcript: utterances of cues with ids "1", "2", ...

    ``progress(done, total)`` is called with seconds of audio recognised and the recording's
    length (0.0 while unknown). Memory stays flat with length: the file is decoded and
    recognised ``options.chunk_seconds`` at a time.
    """
    options = options or AsrOptions()
    options.check()
    path = Path(path)
    info = probe(path)
    if recognizer is None:
        recognizer = load_recognizer(options)
    settings = DecodeSettings(beam_size=options.beam_size, vad=options.vad,
                              word_timestamps=options.word_timestamps)
    report = DecodeReport()
    language = options.language
    detected: tuple[str, float] | None = None
    words: list[Word] = []
    done = 0.0

    def tell(seconds: float) -> None:
        nonlocal done
        done = max(done, seconds)
        if progress is not None:
            progress(done, max(info.duration, done) if info.duration else 0.0)

    for window in windows(samples(path, report), options.chunk_seconds):
        result = recognizer.recognize(window.samples, language=language, prompt=None,
                                      settings=settings)
        if language is None:
            # Detect once, then hold it: a window of silence or music must not switch it.
            language, detected = result.language, (result.language,
                                                   result.language_probability)
        length = window.end - window.start
        for span in result.spans:
            units = span.words if options.word_timestamps and span.words else (
                (Word(span.start, span.end, span.text),) if span.text else ())
            for w in units:
                start = min(max(w.start, 0.0), length)
                end = min(max(w.end, start), length)
                words.append(Word(window.start + start, window.start + end, w.text,
                                  w.probability))
            tell(window.start + min(span.end, length))
        tell(window.end)
        # Drop this window's samples and the recogniser's buffers before the next is decoded:
        # otherwise two windows' worth of arrays are alive at the peak.
        del window, result
        gc.collect()

    if report.decoded_seconds == 0:
        raise InputError("no audio could be decoded from the audio stream; the file may be "
                         "damaged", path=str(path))
    if progress is not None:
        progress(report.decoded_seconds, report.decoded_seconds)

    turn_pause = options.turn_pause_seconds if options.speakers == "pauses" else None
    utterances = build(tidy(words), CueRules(pause=options.pause_seconds),
                       turn_pause=turn_pause)
    return Transcript(utterances=utterances, source=str(path), format="audio",
                      warnings=tuple(_warnings(options, info.duration, report, detected,
                                               bool(utterances))))


def _warnings(options: AsrOptions, header: float, report: DecodeReport,
              detected: tuple[str, float] | None, spoke: bool) -> list[str]:
    out = []
    if not spoke:
        out.append("no speech was recognised in the recording")
    elif options.speakers == "one":
        out.append("speakers are not told apart: every utterance is labelled 'Speaker 1'; "
                   "telling voices apart needs a speaker-embedding model, which minutes does "
                   "not bundle; rename the <v Speaker 1> voices in the WebVTT output, or map "
                   "them in speaker_profiles/")
    else:
        out.append(f"speakers are guessed from silences of {options.turn_pause_seconds:g} s or "
                   "more, alternating 'Speaker 1' and 'Speaker 2' (a guess for two-person "
                   "interviews, not voice identification); check them before relying on them")
    if report.skipped_packets:
        out.append(f"{report.skipped_packets} damaged audio packet(s) were skipped; the "
                   "recording may be damaged there")
    decoded = report.decoded_seconds
    if header and decoded < header - max(2.0, 0.02 * header):
        out.append(f"the file holds {decoded:.1f} s of audio but its header says {header:.1f} "
                   "s; it may be truncated")
    if detected and detected[1] < 0.5:
        out.append(f"language detected as {detected[0]!r} with low confidence "
                   f"({detected[1]:.2f}); pass the language if that is wrong")
    return out
