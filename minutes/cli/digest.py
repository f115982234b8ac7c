"""``minutes digest``: a set of interviews in; per-interview records and themes across them out."""

from __future__ import annotations

from pathlib import Path

import click

from ..batch import EXECUTORS
from . import guard, main

SUFFIX_FORMAT = {".md": "md", ".markdown": "md", ".docx": "docx", ".json": "json"}
INPUT_SUFFIXES = (".vtt", ".srt", ".txt")


def _inputs(paths: tuple[Path, ...]) -> list[Path]:
    out: list[Path] = []
    for path in paths:
        if path.is_dir():
            out += sorted(p for p in path.iterdir() if p.suffix.lower() in INPUT_SUFFIXES
                          and p.is_file())
        else:
            out.append(path)
    return list(dict.fromkeys(out))


@main.command()
@click.argument("paths", metavar="FOLDER_OR_FILES...", nargs=-1, required=True,
                type=click.Path(exists=True, path_type=Path))
@click.option("-o", "--output", type=click.Path(dir_okay=False, path_type=Path), required=True,
              help="Digest file: .md, .docx or .json.")
@click.option("--profiles", type=click.Path(exists=True, path_type=Path),
              help="Speaker profile file or folder (TOML). Default: as each meeting file says.")
@click.option("--pseudonymise", "--pseudonymize", "pseudonymise", is_flag=True,
              help="Replace participants' and other people's names and places everywhere.")
@click.option("--key-out", type=click.Path(dir_okay=False, path_type=Path),
              help="With --pseudonymise: write the key linking pseudonyms to real names "
                   "here (keep it apart from the digest).")
@click.option("--themes", "max_themes", type=click.IntRange(2, 50), default=10,
              show_default=True, help="Most clusters to consider for themes.")
@click.option("--jobs", type=click.IntRange(1, 1024), default=None,
              help="Interviews read at once (default: one per core).")
@click.option("--executor", type=click.Choice(EXECUTORS), default="local", show_default=True,
              help="This machine's cores, or a Dask cluster (needs the dask extra).")
@click.option("--scheduler", metavar="ADDRESS", help="Dask scheduler for --executor dask.")
@click.option("--force", is_flag=True, help="Replace output files that already exist.")
@click.option("-q", "--quiet", is_flag=True, help="No progress on standard error.")
@guard
def digest(paths: tuple[Path, ...], output: Path, profiles: Path | None, pseudonymise: bool,
           key_out: Path | None, max_themes: int, jobs: int | None, executor: str,
           scheduler: str | None, force: bool, quiet: bool) -> None:
    """Digest the interviews in FOLDER (caption files): quotes per interview, shared themes."""
    from .. import digest as lib
    from ..batch import Plan, run
    from ..output import check_target, write_atomic

    kind = SUFFIX_FORMAT.get(output.suffix.lower())
    if kind is None:
        raise click.BadParameter(f"cannot tell the format of {output.name!r}; use .md, .docx "
                                 "or .json", param_hint="'-o'")
    if key_out is not None and not pseudonymise:
        raise click.UsageError("--key-out goes with --pseudonymise")
    if executor == "dask" and not scheduler:
        raise click.UsageError("--executor dask needs --scheduler ADDRESS")
    inputs = _inputs(paths)
    if not inputs:
        raise click.UsageError("no caption files (.vtt, .srt, .txt) in "
                               + ", ".join(str(p) for p in paths))
    check_target(output, force=force, inputs=inputs)
    if key_out is not None:
        check_target(key_out, force=force, inputs=inputs)
        if key_out.resolve() == output.resolve():
            raise click.UsageError("the key must go to another file than the digest")

    def progress(done: int, total: int, name: str) -> None:
        if not quiet:
            click.echo(f"\rread {done} of {total} interviews" + " " * 20, err=True,
                       nl=done >= total)

    outcomes = run(lib.read_job, [lib.InterviewJob(p, profiles) for p in inputs],
                   Plan(executor, jobs, scheduler), progress)
    failed = [o for o in outcomes if not o.ok]
    for o in failed:
        click.echo(f"{o.name}: {o.error}", err=True)
    interviews = [o.value for o in outcomes if o.ok]
    if not interviews:
        raise click.ClickException("no interview could be read (see the messages above)")
    result = lib.build(interviews, max_themes=max_themes)
    if pseudonymise:
        table = lib.pseudonyms_for(interviews)
        result = lib.pseudonymise(result, table)
        if key_out is not None:
            write_atomic(key_out, table.key_json(), force=force, inputs=inputs)
    write_atomic(output, lib.render_digest(result, kind), force=force, inputs=inputs)
    if not quiet:
        click.echo(f"wrote {output}: {len(interviews)} interviews, {len(result.themes)} themes"
                   + (", names pseudonymised" if pseudonymise else "")
                   + (f"; key in {key_out}" if key_out else "")
                   + ". This is a DRAFT: check the quotes against the recordings.", err=True)
    if failed:
        raise click.ClickException(f"{len(failed)} of {len(inputs)} files could not be read")
