"""``minutes items``: the open action items of a meeting series, by owner and due date."""

from __future__ import annotations

import sys
from pathlib import Path

import click

from . import guard, main


@main.command()
@click.argument("series", type=click.Path(dir_okay=False, path_type=Path))
@click.option("--format", "fmt", type=click.Choice(["md", "csv"]), default="md",
              show_default=True, help="Markdown tables by owner, or one CSV table.")
@click.option("-o", "--output", type=click.Path(dir_okay=False, path_type=Path),
              help="File to write; default: standard output.")
@click.option("--force", is_flag=True, help="Replace the output if it exists.")
@guard
def items(series: Path, fmt: str, output: Path | None, force: bool) -> None:
    """List the items still open in the series file SERIES (see draft --series)."""
    from ..output import write_atomic
    from ..series import items_csv, items_markdown, open_items

    found = open_items(series)
    data = items_csv(found) if fmt == "csv" else items_markdown(found, series.stem)
    if output is None:
        sys.stdout.buffer.write(data)
        sys.stdout.flush()
    else:
        write_atomic(output, data, force=force, inputs=[series])
