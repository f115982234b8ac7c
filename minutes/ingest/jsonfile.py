"""The project's own minutes JSON, read back: its ``utterances`` and ``meeting``.

Each utterance there is already a turn, so it is kept as one utterance with one cue
(the cue id it names), not merged again. A bare list of utterance objects is read too.
"""

from __future__ import annotations

import datetime as dt
import json
import math
from typing import Any

from ..errors import InputError
from ..model import Cue, MeetingInfo, Transcript, Utterance
from .common import Notes, check_times
from .cuetext import clean_text


def read_json(text: str, path: str) -> Transcript:
    """Return the transcript held in a minutes JSON file."""
    try:
        data = json.loads(text)
    except json.JSONDecodeError as err:
        raise InputError(f"is not valid JSON: {err.msg} (column {err.colno})", path=path,
                         line=err.lineno) from None
    except (ValueError, RecursionError) as err:  # e.g. a number too long, nesting too deep
        raise InputError(f"is not JSON this tool can read: {err}", path=path) from None
    notes = Notes()
    meeting = MeetingInfo()
    if isinstance(data, dict):
        meeting = _meeting(data.get("meeting"), notes)
        items = data.get("utterances")
    else:
        items = data
    if not isinstance(items, list):
        raise InputError("has no 'utterances' list; a minutes JSON file holds "
                         "{\"meeting\": {...}, \"utterances\": [{index, cue, start, end, "
                         "speaker, text}, ...]}", path=path)
    rows: list[tuple[str, Cue]] = []
    for number, item in enumerate(items):
        row = _row(item, number, notes)
        if row is not None:
            rows.append(row)
    if not rows:
        first = f"; first problem: {notes.items[0]}" if notes.items else ""
        raise InputError(f"holds no readable utterance{first}", path=path)
    order = sorted(range(len(rows)), key=lambda i: rows[i][1].start)
    if order != list(range(len(rows))):
        notes.add("utterances are not in time order; sorted by start time")
    utterances = tuple(
        Utterance(index=i, start=cue.start, end=cue.end, speaker=label, text=cue.text,
                  cues=(cue,), label=label)
        for i, (label, cue) in enumerate(rows[j] for j in order)
    )
    return Transcript(utterances=utterances, source=path, format="json", meeting=meeting,
                      warnings=notes.result())


def _row(item: Any, number: int, notes: Notes) -> tuple[str, Cue] | None:
    where = f"utterances[{number}]"
    if not isinstance(item, dict):
        notes.add(f"{where} is not an object; skipped")
        return None
    cue_id = item.get("cue")
    if cue_id is not None and not isinstance(cue_id, str):
        cue_id = str(cue_id) if isinstance(cue_id, int) and not isinstance(cue_id, bool) else None
    start, end = _seconds(item.get("start")), _seconds(item.get("end", item.get("start")))
    text = item.get("text")
    if start is None or end is None:
        notes.add(f"{where} has no numeric start and end; skipped", cue=cue_id)
        return None
    if not isinstance(text, str) or not text.strip():
        notes.add(f"{where} has no text; skipped", cue=cue_id)
        return None
    speaker = item.get("speaker")
    label = speaker.strip() if isinstance(speaker, str) else ""
    times = check_times(start, end, notes, line=None, cue=cue_id or where)
    if times is None:
        return None
    return label, Cue(id=cue_id, start=times[0], end=times[1], text=clean_text(text))


def _seconds(value: Any) -> float | None:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return None
    try:
        seconds = float(value)
    except OverflowError:  # an integer too large for a float
        return None
    return seconds if math.isfinite(seconds) else None


def _meeting(data: Any, notes: Notes) -> MeetingInfo:
    if not isinstance(data, dict):
        return MeetingInfo()
    fields = {k: data[k].strip() for k in ("title", "body", "kind", "place")
              if isinstance(data.get(k), str)}
    date = None
    if isinstance(data.get("date"), str):
        try:
            date = dt.date.fromisoformat(data["date"])
        except ValueError:
            notes.add(f"meeting date {data['date']!r} is not an ISO 8601 date (YYYY-MM-DD); "
                      "left out")
    return MeetingInfo(date=date, **fields)
