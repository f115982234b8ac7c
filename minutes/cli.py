"""The ``minutes`` command: a thin click layer over ``minutes.pipeline`` and friends.

It parses options, calls one library function, writes the result, and turns
library errors into messages: bad usage exits 2, failed work exits 1, and no
traceback reaches the user (set MINUTES_DEBUG=1 to see one).
"""

from __future__ import annotations

import datetime as dt
import functools
import os
import sys
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any, TypeVar

import click

from .errors import MinutesError, UsageError

F = TypeVar("F", bound=Callable[..., Any])

FORMATS = ("md", "docx", "json")
SUFFIX_FORMAT = {".md": "md", ".markdown": "md", ".docx": "docx", ".json": "json"}


def _guard(func: F) -> F:
    """Turn library errors into click errors, and anything unexpected into a short message."""

    @functools.wraps(func)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        try:
            return func(*args, **kwargs)
        except UsageError as exc:
            raise click.UsageError(str(exc)) from exc
        except MinutesError as exc:
            raise click.ClickException(str(exc)) from exc
        except (click.ClickException, click.exceptions.Exit, click.Abort):
            raise
        except KeyboardInterrupt:
            raise click.Abort() from None
        except Exception as exc:  # a bug: say so plainly, without a traceback
            if os.environ.get("MINUTES_DEBUG"):
                raise
            raise click.ClickException(
                f"internal error ({type(exc).__name__}: {exc}). This is a bug in minutes; "
                "rerun with MINUTES_DEBUG=1 to see the traceback and please report it."
            ) from exc

    return wrapper  # type: ignore[return-value]


class Progress:
    """A one-line progress display on stderr: stage, counts, speed and time left."""

    def __init__(self, quiet: bool) -> None:
        self.quiet = quiet or not sys.stderr.isatty() and not os.environ.get("MINUTES_PROGRESS")
        self.started: dict[str, float] = {}
        self.last = 0.0

    def __call__(self, stage: str, done: int, total: int) -> None:
        if self.quiet:
            return
        now = time.monotonic()
        start = self.started.setdefault(stage, now)
        if done < total and now - self.last < 0.2:
            return
        self.last = now
        elapsed = now - start
        if stage == "transcribe" and total:
            speed = done / elapsed if elapsed > 0 else 0.0
            left = (total - done) / speed if speed > 0 else 0.0
            line = (f"transcribing {done / 60:5.1f} of {total / 60:.1f} min audio"
                    f"  {speed:4.1f}x real time  {_hms(left)} left")
        elif total:
            width = 24
            filled = int(width * done / total)
            line = f"{stage:<10} [{'#' * filled}{'.' * (width - filled)}] {done}/{total}"
        else:
            line = stage
        end = "\n" if done >= total else ""
        click.echo(f"\r{line:<78}", err=True, nl=False)
        if end:
            click.echo("", err=True)


def _hms(seconds: float) -> str:
    seconds = int(round(seconds))
    return f"{seconds // 3600:d}:{seconds // 60 % 60:02d}:{seconds % 60:02d}"


def _date(ctx: click.Context, param: click.Parameter, value: str | None) -> dt.date | None:
    if value is None:
        return None
    try:
        return dt.date.fromisoformat(value)
    except ValueError:
        raise click.BadParameter(f"{value!r} is not a date like 2026-10-14") from None


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(package_name="minutes")
def main() -> None:
    """Draft meeting minutes from captions or recordings, offline.

    Every draft must be checked by the person responsible for the minutes
    before it is shared. Nothing is sent off this machine.
    """


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
@click.option("--date", callback=_date,
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
@click.option("--force", is_flag=True, help="Replace output files that already exist.")
@click.option("-q", "--quiet", is_flag=True, help="No progress on standard error.")
@_guard
def draft(input: Path, outputs: tuple[Path, ...], fmt: str | None, profiles: Path | None,
          meeting: Path | None, date: dt.date | None, title: str | None, template: str | None,
          encoding: str | None, engine: str, model: Path | None, threads: int,
          context_tokens: int, max_words: int | None, force: bool, quiet: bool) -> None:
    """Write draft minutes of the meeting in INPUT (captions, transcript or recording)."""
    from dataclasses import replace

    from .output import check_target, write_atomic
    from .pipeline import DraftOptions
    from .pipeline import draft as make_draft
    from .render import render
    from .segment import SegmentOptions

    targets = [(path, fmt or _format_of(path)) for path in outputs]
    if not targets and fmt in ("docx",):
        raise click.UsageError("DOCX cannot go to standard output; give -o FILE.docx")
    for path, _ in targets:  # fail before the work, not after it
        check_target(path, force=force, inputs=[input])
    segmentation = SegmentOptions()
    if max_words is not None:
        segmentation = replace(segmentation, max_words=max_words)
    options = DraftOptions(profiles=profiles, meeting=meeting, date=date, title=title,
                           template=template, encoding=encoding, engine=engine,
                           segmentation=segmentation, model=model, threads=threads,
                           context=context_tokens)
    progress = Progress(quiet)

    def report(line: str) -> None:
        if not quiet:
            click.echo(line, err=True)

    minutes = make_draft(input, options, progress, report)
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


if __name__ == "__main__":  # pragma: no cover
    main()
