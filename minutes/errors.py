"""The exceptions the library raises; the CLI turns each into a message and an exit code.

MinutesError            base; never raised itself
├── InputError          the input (captions, transcript, profiles, meeting file) is unreadable
│                       or malformed; carries the file and, where known, the line or cue
├── OutputError         an output cannot be written (exists without --force, same as input...)
├── ModelError          a model or optional dependency is missing or broken; says how to get it
└── UsageError          a library call was given values that make no sense together

The CLI maps UsageError to exit 2 (bad usage) and everything else to exit 1.
Messages are full sentences that say what went wrong, where, and what to do.
"""

from __future__ import annotations


class MinutesError(Exception):
    """Base of every error this package raises on purpose."""


class InputError(MinutesError):
    """An input file cannot be read or has malformed content."""

    def __init__(self, message: str, *, path: str = "", line: int | None = None,
                 cue: str | None = None) -> None:
        where = path
        if line is not None:
            where += f", line {line}"
        if cue:
            where += f", cue {cue!r}"
        super().__init__(f"{where}: {message}" if where else message)
        self.path = path
        self.line = line
        self.cue = cue


class OutputError(MinutesError):
    """An output file cannot or must not be written."""


class ModelError(MinutesError):
    """A model file or optional dependency is missing or unusable."""


class UsageError(MinutesError):
    """Options or arguments that cannot work together."""


def missing_extra(package: str, extra: str) -> ModelError:
    """Return the error for an optional dependency that is not installed."""
    return ModelError(
        f"{package} is not installed; it comes with the '{extra}' extra: "
        f"pip install 'minutes[{extra}]'"
    )
