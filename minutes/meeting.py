"""The meeting file: what the captions do not say (title, body, date, agenda...).

A TOML file beside the input (``NAME.meeting.toml`` for ``NAME.vtt``) or given
with ``--meeting``::

    title = "Regular Meeting of the Board"
    body = "Harbourview Library Board"
    kind = "regular meeting"
    date = 2026-10-14
    place = "Community Room, 12 Quay Street"
    start_clock = 18:30:00        # clock time at 00:00:00 of the recording
    next_meeting = 2026-11-11
    template = "board"            # or "general"; absent: chosen from the body
    profiles = "../speaker_profiles/harbourview.toml"   # relative to this file
    present = ["Iris Mendel"]     # listed present though they may not speak
    absent = ["Tom Aalto"]
    [[agenda]]
    title = "Approval of the minutes"

Every key is optional. Values are checked here, once, so later stages can trust them.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from .errors import InputError
from .model import AgendaItem, MeetingInfo
from .speakers import read_toml

TEMPLATES = ("general", "board")
BOARD_WORDS = ("board", "council", "committee", "commission", "trustees", "authority")
KNOWN_KEYS = frozenset(
    "title body kind date place start_clock next_meeting template profiles present absent agenda"
    .split()
)


@dataclass(frozen=True)
class MeetingFile:
    """A parsed meeting file: the meeting's facts and where its speaker profiles are."""

    info: MeetingInfo = field(default_factory=MeetingInfo)
    profiles: Path | None = None
    path: Path | None = None
    warnings: tuple[str, ...] = ()


def beside(input_path: Path) -> Path | None:
    """Return the meeting file that sits beside ``input_path``, if there is one."""
    candidate = input_path.with_name(input_path.stem + ".meeting.toml")
    return candidate if candidate.is_file() else None


def _date(value: Any, key: str, path: Path) -> dt.date | None:
    if value is None:
        return None
    if isinstance(value, dt.datetime):
        return value.date()
    if isinstance(value, dt.date):
        return value
    if isinstance(value, str):
        try:
            return dt.date.fromisoformat(value.strip())
        except ValueError:
            pass
    raise InputError(f"'{key}' must be a date like 2026-10-14, not {value!r}", path=str(path))


def _clock(value: Any, path: Path) -> dt.time | None:
    if value is None:
        return None
    if isinstance(value, dt.time):
        return value
    if isinstance(value, str):
        try:
            return dt.time.fromisoformat(value.strip())
        except ValueError:
            pass
    raise InputError(f"'start_clock' must be a clock time like 18:30:00, not {value!r}",
                     path=str(path))


def _strings(value: Any, key: str, path: Path) -> tuple[str, ...]:
    if value is None:
        return ()
    if isinstance(value, list) and all(isinstance(v, str) for v in value):
        return tuple(v.strip() for v in value if v.strip())
    raise InputError(f"'{key}' must be a list of names", path=str(path))


def _agenda(value: Any, path: Path) -> tuple[AgendaItem, ...]:
    if value is None:
        return ()
    if not isinstance(value, list):
        raise InputError("'agenda' must be an array of tables: [[agenda]]", path=str(path))
    items = []
    for n, entry in enumerate(value, 1):
        if isinstance(entry, str):
            entry = {"title": entry}
        if not isinstance(entry, dict) or not isinstance(entry.get("title"), str):
            raise InputError(f"agenda item #{n} needs a 'title'", path=str(path))
        items.append(AgendaItem(entry["title"].strip(), str(entry.get("number", "")),
                                str(entry.get("notes", ""))))
    return tuple(items)


def load_meeting(path: Path) -> MeetingFile:
    """Return the parsed meeting file, or raise InputError naming what is wrong."""
    data = read_toml(path)
    warnings = tuple(
        f"{path}: unknown key '{key}' ignored (known: {', '.join(sorted(KNOWN_KEYS))})"
        for key in data if key not in KNOWN_KEYS
    )

    def text(key: str) -> str:
        value = data.get(key, "")
        if not isinstance(value, str):
            raise InputError(f"'{key}' must be a string", path=str(path))
        return value.strip()

    template = text("template").lower()
    if template and template not in TEMPLATES:
        raise InputError(f"'template' must be one of {', '.join(TEMPLATES)}, not {template!r}",
                         path=str(path))
    profiles = text("profiles")
    info = MeetingInfo(
        title=text("title"),
        body=text("body"),
        kind=text("kind"),
        date=_date(data.get("date"), "date", path),
        place=text("place"),
        start_clock=_clock(data.get("start_clock"), path),
        next_meeting=_date(data.get("next_meeting"), "next_meeting", path),
        agenda=_agenda(data.get("agenda"), path),
        present=_strings(data.get("present"), "present", path),
        absent=_strings(data.get("absent"), "absent", path),
        template=template,
    )
    return MeetingFile(info, (path.parent / profiles) if profiles else None, path, warnings)


def choose_template(info: MeetingInfo) -> str:
    """Return the template to use: as set, else "board" for boards, councils and committees."""
    if info.template:
        return info.template
    words = f"{info.body} {info.kind}".lower()
    return "board" if any(w in words for w in BOARD_WORDS) else "general"
