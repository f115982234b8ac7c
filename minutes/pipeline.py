"""The whole job as one library call: input file in, ``Minutes`` out.

ingest -> speakers -> parse -> segment -> relay -> final. The CLI calls
``draft``; tests and other programs can call it too.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable
from dataclasses import dataclass, field, replace
from pathlib import Path

from .errors import InputError, UsageError
from .meeting import MeetingFile, beside, load_meeting
from .model import Minutes, Transcript
from .segment import SegmentOptions

# (stage, done, total): the CLI turns it into a progress line on stderr.
Progress = Callable[[str, int, int], None]

ENGINES = ("rules", "llm")


@dataclass(frozen=True)
class DraftOptions:
    """What a user can set for one draft; None means "from the meeting file, or default"."""

    profiles: Path | None = None
    meeting: Path | None = None
    date: dt.date | None = None
    title: str | None = None
    template: str | None = None
    encoding: str | None = None
    engine: str = "rules"
    segmentation: SegmentOptions = field(default_factory=SegmentOptions)
    asr: object | None = None  # minutes.asr.AsrOptions for recordings


def _quiet(stage: str, done: int, total: int) -> None:
    return None


def read_input(path: Path, options: DraftOptions, progress: Progress = _quiet) -> Transcript:
    """Return the transcript of a caption file or, through speech recognition, a recording."""
    from .ingest import read_transcript

    suffix = path.suffix.lower()
    try:
        from .asr import AUDIO_EXTENSIONS
    except ImportError:  # pragma: no cover - the asr package is part of minutes
        AUDIO_EXTENSIONS = ()
    if suffix in AUDIO_EXTENSIONS:
        from .asr import AsrOptions, transcribe

        asr_options = options.asr if options.asr is not None else AsrOptions()
        return transcribe(path, asr_options,  # type: ignore[arg-type]
                          progress=lambda done, total: progress("transcribe", int(done),
                                                                int(total)))
    return read_transcript(path, encoding=options.encoding)


def meeting_file(path: Path, options: DraftOptions) -> MeetingFile:
    """Return the meeting file given, or the one beside the input, or an empty one."""
    if options.meeting is not None:
        if not options.meeting.is_file():
            raise InputError("no such meeting file", path=str(options.meeting))
        return load_meeting(options.meeting)
    found = beside(path)
    return load_meeting(found) if found else MeetingFile()


def draft(path: Path, options: DraftOptions = DraftOptions(),
          progress: Progress = _quiet) -> Minutes:
    """Return draft minutes of the meeting in ``path``."""
    from . import nlp
    from .final import finish
    from .relay.context import Combined, ReadContext
    from .relay.ledger import relay
    from .relay.motions import MotionReader
    from .relay.rules import RulesReader
    from .segment import segment
    from .speakers import Directory, load_profiles, resolve_speakers

    if options.engine not in ENGINES:
        raise UsageError(f"unknown engine {options.engine!r}; choose one of {', '.join(ENGINES)}")
    if not path.is_file():
        raise InputError("no such file", path=str(path))
    mfile = meeting_file(path, options)
    info = mfile.info
    if options.date is not None:
        info = replace(info, date=options.date)
    if options.title is not None:
        info = replace(info, title=options.title)
    if not info.title:
        info = replace(info, title=path.stem.replace("_", " ").replace("-", " ").strip().title())
    profiles = options.profiles or mfile.profiles
    directory = load_profiles(profiles) if profiles else Directory()

    progress("read", 0, 1)
    transcript = read_input(path, options, progress)
    if not transcript.utterances:
        raise InputError("no speech or captions found in the file", path=str(path))
    transcript = replace(transcript, meeting=info)
    transcript, unknown = resolve_speakers(transcript, directory)
    progress("read", 1, 1)

    progress("parse", 0, len(transcript.utterances))
    parsed = nlp.parse(transcript.utterances)
    progress("parse", len(transcript.utterances), len(transcript.utterances))
    segments = segment(transcript, parsed, options.segmentation)

    ctx = ReadContext(transcript, parsed, directory)
    readers: list = [RulesReader(ctx), MotionReader(ctx)]
    if options.engine == "llm":  # pragma: no cover - wired by the llm reader
        raise UsageError("the llm engine is not available in this version; use --engine rules")
    reader = Combined(tuple(readers))
    progress("relay", 0, len(segments))
    result = relay(segments, reader)
    progress("relay", len(segments), len(segments))
    notes = list(mfile.warnings) + list(transcript.warnings[:20])
    if len(transcript.warnings) > 20:
        notes.append(f"... and {len(transcript.warnings) - 20} more reading warnings")
    return finish(transcript, segments, result, parsed, directory,
                  unknown_speakers=unknown, template=options.template or "", notes=notes)
