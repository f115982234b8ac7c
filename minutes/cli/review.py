"""``minutes review`` (a local page to check the draft) and ``minutes export`` (final minutes)."""

from __future__ import annotations

import datetime as dt
import os
import sys
from pathlib import Path

import click

from . import date_option, guard, main
from .draft import FORMATS, _format_of


def _can_open_browser() -> bool:
    # Without a desktop, Python's webbrowser falls back to text browsers that would take
    # over this terminal; print the address instead.
    if sys.platform in ("darwin", "win32"):
        return True
    return bool(os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY"))


@main.command()
@click.argument("minutes_json", metavar="MINUTES.json",
                type=click.Path(dir_okay=False, path_type=Path))
@click.option("--recording", type=click.Path(dir_okay=False, path_type=Path),
              help="The meeting's recording (audio or video), to play from each item's moment.")
@click.option("--port", type=click.IntRange(0, 65535), default=0,
              help="Port on 127.0.0.1 (default: any free one).")
@click.option("--profiles", type=click.Path(exists=True, path_type=Path),
              help="Speaker profiles with the body's roster. Default: those the meeting "
                   "file beside the draft's source names.")
@click.option("--open/--no-open", "open_browser", default=True, show_default=True,
              help="Open the page in the web browser (only where there is a desktop).")
@guard
def review(minutes_json: Path, recording: Path | None, port: int, profiles: Path | None,
           open_browser: bool) -> None:
    """Check the draft in MINUTES.json in the browser: accept, reject, edit, add, rename.

    Edits are saved as they are made to NAME.review.json beside the draft (the draft itself
    is never changed). The page runs on this machine only; press Ctrl+C to stop it.
    """
    from ..review.server import ReviewSession, serve

    session = ReviewSession.open(minutes_json, recording=recording, profiles=profiles)
    try:
        server = serve(session, port)
    except OSError as exc:
        raise click.ClickException(
            f"cannot listen on 127.0.0.1:{port} ({exc.strerror}); choose another --port, "
            "or leave it out to take any free one") from exc
    click.echo(f"Review page: {server.url}")
    click.echo(f"Edits are saved to {session.review_file}", err=True)
    for note in session.notes:
        click.echo(f"Using {note}", err=True)
    click.echo("Press Ctrl+C to stop.", err=True)
    if open_browser and _can_open_browser():
        import webbrowser

        webbrowser.open(server.url)
    try:
        server.serve_forever()
    except KeyboardInterrupt:
        click.echo("\nStopped. Your edits are in " + str(session.review_file), err=True)
    finally:
        server.server_close()


@main.command("export")
@click.argument("minutes_json", metavar="MINUTES.json",
                type=click.Path(dir_okay=False, path_type=Path))
@click.option("--review", "review_file", type=click.Path(dir_okay=False, path_type=Path),
              help="The review file. Default: NAME.review.json beside MINUTES.json.")
@click.option("-o", "--output", "outputs", multiple=True, required=True,
              type=click.Path(path_type=Path),
              help="Output file (.md, .docx, .json); repeat for several.")
@click.option("--format", "fmt", type=click.Choice(FORMATS),
              help="Output format; by default taken from the output's extension.")
@click.option("--approved-on", callback=date_option,
              help="Date the body approved the minutes, YYYY-MM-DD; without it they stay "
                   "marked DRAFT.")
@click.option("--profiles", type=click.Path(exists=True, path_type=Path),
              help="Speaker profiles with the body's roster. Default: those the meeting "
                   "file beside the draft's source names.")
@click.option("--force", is_flag=True, help="Replace output files that already exist.")
@click.option("-q", "--quiet", is_flag=True, help="No messages on standard error.")
@guard
def export_command(minutes_json: Path, review_file: Path | None, outputs: tuple[Path, ...],
                   fmt: str | None, approved_on: dt.date | None, profiles: Path | None,
                   force: bool, quiet: bool) -> None:
    """Write final minutes from MINUTES.json with its review applied (rejected items left out)."""
    from ..errors import InputError
    from ..output import check_target, write_atomic
    from ..review.edits import digest, load_review, new_review, review_path
    from ..review.export import export, unreviewed
    from ..review.loader import read_minutes_json
    from ..review.sources import roster_for

    data = read_minutes_json(minutes_json)
    sha = digest(minutes_json.read_bytes())
    given = review_file is not None
    review_file = review_file or review_path(minutes_json)
    inputs = [minutes_json, review_file]
    targets = [(path, fmt or _format_of(path)) for path in outputs]
    for path, _ in targets:  # fail before the work, not after it
        check_target(path, force=force, inputs=inputs)
    if review_file.exists():
        review = load_review(review_file, data, sha)
    elif given:
        raise InputError("no such review file", path=str(review_file))
    else:
        review = new_review(minutes_json.name, sha)
        if not quiet:
            click.echo(f"no review file ({review_file.name}); exporting the draft as it is",
                       err=True)
    roster, _ = roster_for(minutes_json, data, profiles)
    for path, kind in targets:
        body = export(data, review, kind, approved_on=approved_on, roster=roster,
                      source=str(minutes_json))
        write_atomic(path, body, force=force, inputs=inputs)
        if not quiet:
            click.echo(f"wrote {path}", err=True)
    if not quiet:
        left = unreviewed(data, review)
        if left:
            click.echo(f"{len(left)} items were neither accepted nor rejected: "
                       + ", ".join(left[:12]) + (" ..." if len(left) > 12 else ""), err=True)
        if approved_on is None:
            click.echo("The minutes stay marked DRAFT; give --approved-on DATE once the body "
                       "has approved them.", err=True)
