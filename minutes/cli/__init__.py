"""The ``minutes`` command: a thin click layer over the library, one module per command.

Each command parses options, calls one library function, writes the result, and
turns library errors into messages: bad usage exits 2, failed work exits 1, and
no traceback reaches the user (set MINUTES_DEBUG=1 to see one).
"""

from __future__ import annotations

import datetime as dt
import functools
import os
import sys
import time
from collections.abc import Callable
from typing import Any, TypeVar

import click

from ..errors import MinutesError, UsageError

F = TypeVar("F", bound=Callable[..., Any])



def guard(func: F) -> F:
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
        except OSError as exc:  # disk full, permission denied...: not a bug, say what failed
            where = f"{exc.filename}: " if exc.filename else ""
            raise click.ClickException(f"{where}{exc.strerror or exc}") from exc
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
                    f"  {speed:4.1f}x real time  {hms(left)} left")
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


def hms(seconds: float) -> str:
    seconds = int(round(seconds))
    return f"{seconds // 3600:d}:{seconds // 60 % 60:02d}:{seconds % 60:02d}"


def date_option(ctx: click.Context, param: click.Parameter, value: str | None) -> dt.date | None:
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



# Each module registers its command on ``main`` when imported.
from . import digest as _digest  # noqa: E402,F401
from . import draft as _draft  # noqa: E402,F401
from . import review as _review  # noqa: E402,F401
from . import series as _series  # noqa: E402,F401
from . import transcribe as _transcribe  # noqa: E402,F401
