"""``minutes draft``: captions, transcript or recording in; draft minutes out."""

from __future__ import annotations

import datetime as dt
import sys
from pathlib import Path

import click

from ..batch import EXECUTORS
from . import Progress, date_option, guard, main
from .transcribe import asr_options, make_asr_options

FORMATS = ("md", "docx", "json")
SUFFIX_FORMAT = {".md": "md", ".markdown": "md", ".docx": "docx", ".json": "json"}


@main.command()
@click.argument("inputs", metavar="INPUT...", nargs=-1, required=True,
                type=click.Path(dir_okay=False, path_type=Path))
@click.option("-o", "--output", "outputs", multiple=True, type=click.Path(path_type=Path),
              help="Output file (.md, .docx, .json); repeat for several. "
                   "Without it, Markdown goes to standard output.")
@click.option("--out-dir", type=click.Path(file_okay=False, path_type=Path),
              help="Folder for the minutes of each INPUT, named after it (NAME.md, or the "
                   "--format given). Needed with several inputs.")
@click.option("--format", "fmt", type=click.Choice(FORMATS),
              help="Output format; by default taken from the output's extension.")
@click.option("--series", type=click.Path(dir_okay=False, path_type=Path),
              help="Series file (SQLite, created if missing): carry open items in from the "
                   "meetings before this one, and save this meeting's outcome into it.")
@click.option("--profiles", type=click.Path(exists=True, path_type=Path),
              help="Speaker profile file or folder (TOML). Default: as the meeting file says.")
@click.option("--pseudonymise", "--pseudonymize", "pseudonymise", is_flag=True,
              help="Replace people's names and places in the minutes with pseudonyms.")
@click.option("--key-out", type=click.Path(dir_okay=False, path_type=Path),
              help="With --pseudonymise: write the key linking pseudonyms to real names here.")
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
@click.option("--jobs", type=click.IntRange(1, 1024), default=None,
              help="With several inputs: files drafted at once (default: one per core).")
@click.option("--executor", type=click.Choice(EXECUTORS), default="local", show_default=True,
              help="With several inputs: this machine's cores, or a Dask cluster "
                   "(needs the dask extra and --scheduler).")
@click.option("--scheduler", metavar="ADDRESS",
              help="Address of the Dask scheduler for --executor dask, e.g. tcp://host:8786.")
@click.option("--force", is_flag=True, help="Replace output files that already exist.")
@click.option("-q", "--quiet", is_flag=True, help="No progress on standard error.")
@guard
def draft(inputs: tuple[Path, ...], outputs: tuple[Path, ...], out_dir: Path | None,
          fmt: str | None, series: Path | None, profiles: Path | None,
          pseudonymise: bool, key_out: Path | None, meeting: Path | None,
          date: dt.date | None, title: str | None, template: str | None,
          encoding: str | None, engine: str, model: Path | None, threads: int,
          context_tokens: int, max_words: int | None, asr_model: Path | None, beam_size: int,
          language: str, no_vad: bool, asr_threads: int, jobs: int | None, executor: str,
          scheduler: str | None, force: bool, quiet: bool) -> None:
    """Write draft minutes of the meeting in INPUT (captions, transcript or recording).

    Several INPUTs are drafted at once, on this machine's cores (or a Dask cluster), into
    --out-dir; with --series they are drafted one after another in meeting order, each
    carrying the items the earlier ones left open.
    """
    from dataclasses import replace

    from ..pipeline import DraftOptions
    from ..segment import SegmentOptions

    if executor == "dask" and not scheduler:
        raise click.UsageError("--executor dask needs --scheduler ADDRESS")
    if key_out is not None and not pseudonymise:
        raise click.UsageError("--key-out goes with --pseudonymise")
    if pseudonymise and (len(inputs) > 1 or series is not None):
        raise click.UsageError("--pseudonymise drafts one meeting at a time, without "
                               "--series (use 'minutes digest --pseudonymise' for a set)")
    if len(inputs) > 1 and outputs:
        raise click.UsageError("-o names the output of one input; with several inputs "
                               "give --out-dir DIR")
    if len(inputs) > 1 and out_dir is None:
        raise click.UsageError("several inputs need --out-dir DIR for their minutes")
    if out_dir is not None and outputs:
        raise click.UsageError("give either -o FILE or --out-dir DIR, not both")
    if meeting is not None and len(inputs) > 1:
        raise click.UsageError("--meeting names the file of one meeting; with several "
                               "inputs put NAME.meeting.toml beside each input")
    if out_dir is not None and not out_dir.is_dir():
        raise click.BadParameter(f"{out_dir} is not a folder", param_hint="'--out-dir'")
    segmentation = SegmentOptions()
    if max_words is not None:
        segmentation = replace(segmentation, max_words=max_words)
    options = DraftOptions(profiles=profiles, meeting=meeting, date=date, title=title,
                           template=template, encoding=encoding, engine=engine,
                           segmentation=segmentation, model=model, threads=threads,
                           context=context_tokens,
                           asr=make_asr_options(asr_model, beam_size, language, no_vad,
                                                asr_threads))
    if out_dir is None:
        targets = [(path, fmt or _format_of(path)) for path in outputs]
        if not targets and fmt in ("docx",):
            raise click.UsageError("DOCX cannot go to standard output; give -o FILE.docx")
        _draft_one(inputs[0], targets, options, series, force=force, quiet=quiet,
                   stdout_format=fmt or "md", pseudonymise=pseudonymise, key_out=key_out)
        return
    plan = _plan_outputs(inputs, out_dir, fmt or "md", force=force)
    if series is not None:  # each meeting needs the state the one before it left
        from ..series import meeting_of

        dated = sorted(inputs, key=lambda p: (meeting_of(p, options).date or dt.date.max,
                                              inputs.index(p)))
        for n, path in enumerate(dated, 1):
            if not quiet:
                click.echo(f"[{n}/{len(dated)}] {path.name}", err=True)
            _draft_one(path, [plan[path]], options, series, force=force, quiet=quiet)
        return
    _draft_many(inputs, plan, options, executor, jobs, scheduler, force=force, quiet=quiet)


def _plan_outputs(inputs: tuple[Path, ...], out_dir: Path, kind: str,
                  force: bool) -> dict[Path, tuple[Path, str]]:
    """Return each input's output in ``out_dir``; fail before any work if one cannot be written."""
    from ..output import check_target

    plan: dict[Path, tuple[Path, str]] = {}
    seen: dict[str, Path] = {}
    for path in inputs:
        if path.name in seen or path in plan:
            raise click.UsageError(f"{path} and {seen.get(path.name, path)} would write the same "
                                   f"minutes file in {out_dir}; rename one of them")
        seen[path.name] = path
        target = out_dir / f"{path.stem}.{kind}"
        if any(t == target for t, _ in plan.values()):
            raise click.UsageError(f"two inputs named {path.stem!r} would both write {target}")
        check_target(target, force=force, inputs=inputs)
        plan[path] = (target, kind)
    return plan


def _draft_one(input: Path, targets: list[tuple[Path, str]], options: object,
               series: Path | None, *, force: bool, quiet: bool,
               stdout_format: str = "md", pseudonymise: bool = False,
               key_out: Path | None = None) -> None:
    """Draft one meeting, write its outputs, and save it to the series when one is given."""
    from ..output import check_target, write_atomic
    from ..pipeline import draft as make_draft
    from ..render import render

    for path, _ in targets:  # fail before the work, not after it
        check_target(path, force=force, inputs=[input])
    from ..asr.audio import is_recording

    transcript_out = None
    if is_recording(input):  # the transcript we make is written beside the minutes
        base = targets[0][0] if targets else input
        transcript_out = base.with_name(base.stem + ".transcript.vtt")
        check_target(transcript_out, force=force, inputs=[input])
    carried = None
    if series is not None:
        from .. import series as series_file

        if not input.is_file():
            raise click.ClickException(f"{input}: no such file")
        carried = series_file.load(series, series_file.meeting_of(input, options),
                                   series_file.file_digest(input))
    progress = Progress(quiet)

    def report(line: str) -> None:
        if not quiet:
            click.echo(line, err=True)

    minutes = make_draft(input, options, progress, report,  # type: ignore[arg-type]
                         initial=carried.ledger if carried else None)
    if carried is not None:
        minutes = series_file.settle(minutes, carried)
    if pseudonymise:
        from ..pipeline import meeting_file
        from ..pseudonym import for_minutes, pseudonymise_minutes
        from ..speakers import load_profiles

        chosen = (options.profiles  # type: ignore[attr-defined]
                  or meeting_file(input, options).profiles)  # type: ignore[arg-type]
        table = for_minutes(minutes, load_profiles(chosen).people if chosen else ())
        minutes = pseudonymise_minutes(minutes, table)
        transcript_out = None  # the real transcript would undo the pseudonyms
        if key_out is not None:
            check_target(key_out, force=force, inputs=[input])
            write_atomic(key_out, table.key_json(), force=force, inputs=[input])
    # Render everything before writing anything: a failure leaves no output behind.
    rendered = [(path, render(minutes, kind)) for path, kind in targets]
    if transcript_out is not None:
        from ..asr import write_vtt
        from ..model import Transcript

        vtt = write_vtt(Transcript(minutes.utterances, source=str(input)))
        write_atomic(transcript_out, vtt.encode("utf-8"), force=force, inputs=[input])
        if not quiet:
            click.echo(f"wrote {transcript_out} (the transcript the minutes cite)", err=True)
    if not targets:
        sys.stdout.buffer.write(render(minutes, stdout_format))
        sys.stdout.flush()
    for path, data in rendered:
        write_atomic(path, data, force=force, inputs=[input])
        if not quiet:
            click.echo(f"wrote {path}", err=True)
    if carried is not None and series is not None:  # after the minutes: one transaction
        notes = series_file.save(series, minutes, carried)
        if not quiet:
            click.echo(f"series {series}: {len(carried.items)} item(s) carried in; "
                       "this meeting's outcome saved", err=True)
        for note in notes:
            click.echo(f"note: {note}", err=True)
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


def _draft_many(inputs: tuple[Path, ...], plan: dict[Path, tuple[Path, str]], options: object,
                executor: str, jobs: int | None, scheduler: str | None, *, force: bool,
                quiet: bool) -> None:
    """Draft several inputs at once and write each one's minutes as its result comes back."""
    from ..batch import DraftJob, Plan, draft_job, run
    from ..output import write_atomic

    work = [DraftJob(path, options, (plan[path][1],)) for path in inputs]

    def progress(done: int, total: int, name: str) -> None:
        if not quiet:
            click.echo(f"\rdrafted {done} of {total} files" + (f" (last: {name})" if name else "")
                       + " " * 8, err=True, nl=done >= total)

    outcomes = run(draft_job, work, Plan(executor, jobs, scheduler), progress)
    failed = 0
    for path, outcome in zip(inputs, outcomes, strict=True):
        if not outcome.ok:
            failed += 1
            click.echo(f"{path}: {outcome.error}", err=True)
            continue
        target, kind = plan[path]
        write_atomic(target, outcome.value.outputs[kind], force=force, inputs=inputs)
        if outcome.value.transcript_vtt is not None:
            write_atomic(target.with_name(target.stem + ".transcript.vtt"),
                         outcome.value.transcript_vtt, force=force, inputs=inputs)
        if not quiet:
            click.echo(f"wrote {target}: {outcome.value.summary}", err=True)
    if not quiet:
        click.echo(f"{len(inputs) - failed} of {len(inputs)} drafted. These are DRAFTS: check "
                   "each against its recording before you share it.", err=True)
    if failed:
        raise click.ClickException(f"{failed} of {len(inputs)} files could not be drafted "
                                   "(see the messages above)")


def _format_of(path: Path) -> str:
    kind = SUFFIX_FORMAT.get(path.suffix.lower())
    if kind is None:
        raise click.BadParameter(
            f"cannot tell the format of {path.name!r}; use .md, .docx or .json, or --format",
            param_hint="'-o'",
        )
    return kind

