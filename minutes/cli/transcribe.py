"""``minutes transcribe``: a recording in; WebVTT or SRT captions with cue ids and voices out."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

import click

from . import F, Progress, guard, main

if TYPE_CHECKING:
    from ..asr import AsrOptions

CAPTION_SUFFIXES = (".vtt", ".srt")


def asr_options(func: F) -> F:
    """Add the speech-recognition options shared by ``transcribe`` and ``draft``."""
    options = [
        click.option("--asr-model", type=click.Path(file_okay=False, exists=True, path_type=Path),
                     help="A CTranslate2 Whisper folder on this machine; default: the bundled "
                          "Whisper base (audio extra)."),
        click.option("--beam-size", type=click.IntRange(1, 20), default=5, show_default=True,
                     help="Beam width: 1 is fastest, 5 makes about half the word errors."),
        click.option("--language", default="en", show_default=True,
                     help="Spoken language code, or 'auto' to detect it."),
        click.option("--no-vad", is_flag=True, help="Do not skip silence."),
        click.option("--asr-threads", type=click.IntRange(0, 256), default=0,
                     help="CPU threads for recognition (0: all cores)."),
    ]
    for option in reversed(options):
        func = option(func)
    return func


def make_asr_options(asr_model: Path | None, beam_size: int, language: str, no_vad: bool,
                     asr_threads: int) -> AsrOptions:
    """Return ``minutes.asr.AsrOptions`` from the command-line values."""
    from ..asr import AsrOptions

    return AsrOptions(model=asr_model, beam_size=beam_size,
                      language=None if language == "auto" else language, vad=not no_vad,
                      threads=asr_threads)


@main.command()
@click.argument("input", type=click.Path(exists=True, dir_okay=False, path_type=Path))
@click.option("-o", "--output", type=click.Path(dir_okay=False, path_type=Path), required=True,
              help="Caption file to write: .vtt (WebVTT) or .srt.")
@asr_options
@click.option("--profiles", type=click.Path(exists=True, path_type=Path),
              help="Speaker profiles whose voice samples name the voices found "
                   "(with the speaker model set up).")
@click.option("--force", is_flag=True, help="Replace the output if it exists.")
@click.option("-q", "--quiet", is_flag=True, help="No progress on standard error.")
@guard
def transcribe(input: Path, output: Path, asr_model: Path | None, beam_size: int, language: str,
               no_vad: bool, asr_threads: int, profiles: Path | None, force: bool,
               quiet: bool) -> None:
    """Transcribe the recording INPUT on the CPU into captions you can correct by hand."""
    from ..asr import transcribe as run_asr
    from ..asr import write_srt, write_vtt
    from ..output import check_target, write_atomic

    suffix = output.suffix.lower()
    if suffix not in CAPTION_SUFFIXES:
        raise click.BadParameter("the output must end in .vtt or .srt", param_hint="'-o'")
    check_target(output, force=force, inputs=[input])
    options = make_asr_options(asr_model, beam_size, language, no_vad, asr_threads)
    progress = Progress(quiet)
    from ..pipeline import label_voices
    from ..speakers import load_profiles

    people = load_profiles(profiles).people if profiles else ()
    transcript = run_asr(input, options,
                         progress=lambda done, total: progress("transcribe", int(done), int(total)))
    transcript = label_voices(transcript, input, people)
    text = write_vtt(transcript) if suffix == ".vtt" else write_srt(transcript)
    write_atomic(output, text.encode("utf-8"), force=force, inputs=[input])
    for warning in transcript.warnings:
        click.echo(f"warning: {warning}", err=True)
    if not quiet:
        click.echo(f"wrote {output} ({len(transcript.utterances)} utterances). Check speaker "
                   "names and words before you rely on it.", err=True)
