"""``minutes draft``: captions, transcript or recording in; draft minutes out."""

from __future__ import annotations

import datetime as dt
import sys
from pathlib import Path

import click

from . import Progress, date_option, guard, main
from .transcribe import asr_options, make_asr_options

FORMATS = ("md", "docx", "json")
SUFFIX_FORMAT = {".md": "md", ".markdown": "md", ".docx": "docx", ".json": "json"}


@main.command()
@click.argument("input", type=click.Path(dir_okay=False, path_type=Path))
@click.option("-o", "--output", "outputs", multiple=True, type=click.Path(path_type=Path),
              help="Output file (.md, .docx, .json); repeat for several. "
                   "Without it, Markdown goes to standard output.")
@click.option("--format", "fmt", type=click.Choice(FORMATS),
              help="Output format; by default taken from the output's extension.")
@click.option("--profiles", type=click.Path(exists=True, path_type=Path),
              help="Speaker profile file or folder (TOML). Default: as the meeting file says.")
@click.option("--meeting", type=click.Path(path_type=Path),
              help="Meeting file (TOML). Default: NAME.meeting.toml beside the input.")
@click.option("--date", callback=date_option,
              help="Meeting date, YYYY-MM-DD (overrides the meeting file).")
@click.option("--title", help="Meeting title (overrides the meeting file).")
@click.option("--template", type=click.Choice(["general", "board"]),
              help="Layout of the minutes; default: board for boards, councils and committees.")
@click.option("--encoding", help="Text encoding of the input when it is not UTF-8 or UTF-16.")
@click.option("--engine", type=click.Choice(["rules", "llm"]), default="rules", show_default=True,
              help="Who reads each segment.")
@click.option("--model", type=click.Path(dir_okay=False, path_type=Path),
              help="GGUF model file for --engine llm (a file on this machine; never downloaded).")
@click.option("--threads", type=click.IntRange(1, 256), default=1, show_default=True,
              help="CPU threads for the language model.")
@click.option("--context", "context_tokens", type=click.IntRange(1024, 131_072), default=4096,
              show_default=True, help="Context size of the language model, in tokens.")
@click.option("--max-words", type=click.IntRange(200, 50_000), default=None,
              help="Word budget of one segment (what one relay step reads).")
@asr_options
@click.option("--force", is_flag=True, help="Replace output files that already exist.")
@click.option("-q", "--quiet", is_flag=True, help="No progress on standard error.")
@guard
def draft(input: Path, outputs: tuple[Path, ...], fmt: str | None, profiles: Path | None,
          meeting: Path | None, date: dt.date | None, title: str | None, template: str | None,
          encoding: str | None, engine: str, model: Path | None, threads: int,
          context_tokens: int, max_words: int | None, asr_model: Path | None, beam_size: int,
          language: str, no_vad: bool, asr_threads: int, force: bool, quiet: bool) -> None:
    """Write draft minutes of the meeting in INPUT (captions, transcript or recording)."""
    from dataclasses import replace

    from ..output import check_target, write_atomic
    from ..pipeline import DraftOptions
    from ..pipeline import draft as make_draft
    from ..render import render
    from ..segment import SegmentOptions

    targets = [(path, fmt or _format_of(path)) for path in outputs]
    if not targets and fmt in ("docx",):
        raise click.UsageError("DOCX cannot go to standard output; give -o FILE.docx")
    for path, _ in targets:  # fail before the work, not after it
        check_target(path, force=force, inputs=[input])
    from ..asr.audio import is_recording

    transcript_out = None
    if is_recording(input):  # the transcript we make is written beside the minutes
        base = targets[0][0] if targets else input
        transcript_out = base.with_name(base.stem + ".transcript.vtt")
        check_target(transcript_out, force=force, inputs=[input])
    segmentation = SegmentOptions()
    if max_words is not None:
        segmentation = replace(segmentation, max_words=max_words)
    options = DraftOptions(profiles=profiles, meeting=meeting, date=date, title=title,
                           template=template, encoding=encoding, engine=engine,
                           segmentation=segmentation, model=model, threads=threads,
                           context=context_tokens,
                           asr=make_asr_options(asr_model, beam_size, language, no_vad,
                                                asr_threads))
    progress = Progress(quiet)

    def report(line: str) -> None:
        if not quiet:
            click.echo(line, err=True)

    minutes = make_draft(input, options, progress, report)
    if transcript_out is not None:
        from ..asr import write_vtt
        from ..model import Transcript

        vtt = write_vtt(Transcript(minutes.utterances, source=str(input)))
        write_atomic(transcript_out, vtt.encode("utf-8"), force=force, inputs=[input])
        if not quiet:
            click.echo(f"wrote {transcript_out} (the transcript the minutes cite)", err=True)
    if not targets:
        sys.stdout.buffer.write(render(minutes, fmt or "md"))
        sys.stdout.flush()
    for path, kind in targets:
        write_atomic(path, render(minutes, kind), force=force, inputs=[input])
        if not quiet:
            click.echo(f"wrote {path}", err=True)
    if not quiet:
        ledger = minutes.ledger
        click.echo(
            f"{len(minutes.segments)} sections, {len(ledger.decisions)} decisions, "
            f"{len(ledger.actions)} action items, {len(ledger.motions)} motions, "
            f"{len(ledger.open_questions)} open questions. This is a DRAFT: check it against "
            "the recording before you share it.",
            err=True,
        )
        for note in minutes.notes:
            if note.startswith("language model:"):
                click.echo(note, err=True)


def _format_of(path: Path) -> str:
    kind = SUFFIX_FORMAT.get(path.suffix.lower())
    if kind is None:
        raise click.BadParameter(
            f"cannot tell the format of {path.name!r}; use .md, .docx or .json, or --format",
            param_hint="'-o'",
        )
    return kind

