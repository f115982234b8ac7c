"""The whole job as one library call: input file in, ``Minutes`` out.

ingest -> speakers -> parse -> segment -> relay -> final. The CLI calls
``draft``; tests and other programs can call it too.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING

from .errors import InputError, UsageError
from .meeting import MeetingFile, beside, load_meeting
from .model import Ledger, Minutes, Person, Segment, Transcript
from .segment import SegmentOptions

if TYPE_CHECKING:
    from .asr import AsrOptions
    from .relay.ledger import Op, SegmentReader
    from .relay.llm import LlmReader

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
    asr: AsrOptions | None = None  # for recordings; None: the defaults
    model: Path | None = None  # GGUF file for the llm engine
    threads: int = 1  # llama.cpp threads; 1 degrades gracefully on a busy 2-core machine
    context: int = 4096  # llama.cpp context size in tokens


def _quiet(stage: str, done: int, total: int) -> None:
    return None


def read_input(path: Path, options: DraftOptions, progress: Progress = _quiet,
               voices: Sequence[Person] = ()) -> Transcript:
    """Return the transcript of a caption file or, through speech recognition, a recording.

    For a recording, speakers are told apart by voice when the optional speaker model is
    set up, and named after the people in ``voices`` whose voice samples match.
    """
    from .asr.audio import is_recording
    from .ingest import read_transcript

    if is_recording(path):
        from .asr import AsrOptions, transcribe

        asr_options = options.asr if isinstance(options.asr, AsrOptions) else AsrOptions()
        transcript = transcribe(path, asr_options,
                                progress=lambda done, total: progress("transcribe", int(done),
                                                                      int(total)))
        return label_voices(transcript, path, voices)
    return read_transcript(path, encoding=options.encoding)


def label_voices(transcript: Transcript, path: Path, voices: Sequence[Person] = ()) -> Transcript:
    """Return the transcript with speakers told apart by voice, when the speaker model is set up.

    Without it the transcript is returned as recognised (one speaker, with a warning that
    names the extra). Only people with a voice sample are offered for naming.
    """
    from .asr import speakers

    if not speakers.available():
        return transcript
    enrolled = [p for p in voices if p.voice_sample]
    return speakers.assign_speakers(transcript, path, enrolled)


def meeting_file(path: Path, options: DraftOptions) -> MeetingFile:
    """Return the meeting file given, or the one beside the input, or an empty one."""
    if options.meeting is not None:
        if not options.meeting.is_file():
            raise InputError("no such meeting file", path=str(options.meeting))
        return load_meeting(options.meeting)
    found = beside(path)
    return load_meeting(found) if found else MeetingFile()


def _say(line: str) -> None:
    return None


def draft(path: Path, options: DraftOptions = DraftOptions(),
          progress: Progress = _quiet, report: Callable[[str], None] = _say,
          initial: Ledger | None = None) -> Minutes:
    """Return draft minutes of the meeting in ``path``.

    ``initial`` is a ledger carried in from earlier meetings (a series): its open items
    are in the ledger before the first segment, so this meeting can update them.
    """
    from . import nlp
    from .final import finish
    from .procedure import ProcedureReader
    from .relay.context import Combined, ReadContext
    from .relay.ledger import relay
    from .relay.motions import MotionReader
    from .relay.rules import RulesReader
    from .segment import segment
    from .speakers import Directory, load_profiles, resolve_speakers

    if options.engine not in ENGINES:
        raise UsageError(f"unknown engine {options.engine!r}; choose one of {', '.join(ENGINES)}")
    if options.engine == "llm" and options.model is None:
        raise UsageError("--engine llm needs --model PATH.gguf (a model file on this machine)")
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
    transcript = read_input(path, options, progress, directory.people)
    if not transcript.utterances:
        raise InputError("no speech or captions found in the file", path=str(path))
    transcript = replace(transcript, meeting=info)
    transcript, unknown = resolve_speakers(transcript, directory)
    if not directory.people:
        unknown = ()  # with no profiles at all, every label is "unknown": not news
    progress("read", 1, 1)

    progress("parse", 0, len(transcript.utterances))
    parsed = nlp.parse(transcript.utterances)
    progress("parse", len(transcript.utterances), len(transcript.utterances))
    backend = None
    seg_options = options.segmentation
    if options.engine == "llm":
        from .relay.llm import LlamaBackend, words_budget

        assert options.model is not None  # checked above
        backend = LlamaBackend(options.model, threads=options.threads,
                               context_tokens=options.context)
        seg_options = replace(seg_options, max_words=min(seg_options.max_words,
                                                         words_budget(backend)))
    segments = segment(transcript, parsed, seg_options)

    ctx = ReadContext(transcript, parsed, directory)
    readers: list[SegmentReader] = [RulesReader(ctx), MotionReader(ctx), ProcedureReader(ctx)]
    llm_reader = None
    if backend is not None:
        from .relay.llm import LlmReader

        llm_reader = LlmReader(ctx, backend)
        readers.append(_Reporting(llm_reader, report))
    reader = Combined(tuple(readers))
    progress("relay", 0, len(segments))
    result = relay(segments, _Counting(reader, progress, len(segments)), initial)
    run_notes: list[str] = []
    if llm_reader is not None:
        from .relay.llm import describe

        run_notes.append(describe(llm_reader.summary()))
    notes = run_notes + list(mfile.warnings) + list(transcript.warnings[:20])
    if len(transcript.warnings) > 20:
        notes.append(f"... and {len(transcript.warnings) - 20} more reading warnings")
    return finish(transcript, segments, result, parsed, directory,
                  unknown_speakers=unknown, template=options.template or "", notes=notes)


@dataclass
class _Counting:
    """A reader wrapper that reports relay progress; it passes everything through."""

    reader: SegmentReader
    progress: Progress
    total: int
    done: int = 0

    @property
    def name(self) -> str:
        return self.reader.name

    def read(self, ledger: Ledger, segment: Segment) -> Sequence[Op]:
        ops = self.reader.read(ledger, segment)
        self.done += 1
        self.progress("relay", self.done, self.total)
        return ops


@dataclass
class _Reporting:
    """Wraps the llm reader to print tokens in/out and time after each step."""

    reader: LlmReader
    report: Callable[[str], None]

    @property
    def name(self) -> str:
        return self.reader.name

    def read(self, ledger: Ledger, segment: Segment) -> Sequence[Op]:
        ops = self.reader.read(ledger, segment)
        last = self.reader.log[-1]
        self.report(f"segment {segment.index + 1}: {last.tokens_in} tokens in, "
                    f"{last.tokens_out} out, {last.seconds:.1f} s, {last.accepted} kept, "
                    f"{sum(last.dropped.values())} dropped")
        return ops
