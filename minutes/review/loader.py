"""Reading minutes JSON back into a ``Minutes``: the inverse of ``render.data.to_json_dict``.

The JSON is the draft the clerk reviews, so the exporter rebuilds the very object the
renderers take. What the JSON does not carry comes back empty: the body's ``Roster``
(pass it in, see ``roster_for``), the meeting file's present/absent lists, and each
cue's own times and text (only cue ids are written; a cue gets its utterance's times).
Every field is checked on the way in; a miss names its place, e.g. ``actions[3].due``.
"""

from __future__ import annotations

import datetime as dt
import json
from collections.abc import Callable
from pathlib import Path
from typing import Any, TypeVar, cast

from ..errors import InputError
from ..model import (
    ActionItem,
    AgendaItem,
    Attendee,
    Change,
    Cue,
    Decision,
    Event,
    Evidence,
    Ledger,
    MeetingInfo,
    Minutes,
    Motion,
    Point,
    Proposal,
    Question,
    Quorum,
    Roster,
    Segment,
    Utterance,
    Vote,
)

T = TypeVar("T")

ACTION_STATUSES = ("open", "done", "dropped")
PROPOSAL_STATUSES = ("pending", "accepted", "rejected", "lapsed")
OUTCOMES = ("carried", "failed", "withdrawn", "tabled", "postponed", "referred", "pending")


class _Fields:
    """Typed access to one JSON object; errors name the path of the bad field."""

    def __init__(self, data: Any, where: str, source: str) -> None:
        if not isinstance(data, dict):
            raise InputError(f"{where or 'the top level'}: expected an object", path=source)
        self.data = data
        self.where = where
        self.source = source

    def _fail(self, key: str, wanted: str) -> InputError:
        place = f"{self.where}.{key}" if self.where else key
        return InputError(f"{place}: expected {wanted}; is this minutes JSON written by "
                          "`minutes draft`?", path=self.source)

    def _get(self, key: str, default: Any, required: bool) -> Any:
        if key not in self.data:
            if required:
                raise self._fail(key, "a value (the field is missing)")
            return default
        return self.data[key]

    def text(self, key: str, *, required: bool = False, default: str = "") -> str:
        value = self._get(key, default, required)
        if not isinstance(value, str):
            raise self._fail(key, "a string")
        return value

    def opt_text(self, key: str, *, required: bool = False) -> str | None:
        value = self._get(key, None, required)
        if value is not None and not isinstance(value, str):
            raise self._fail(key, "a string or null")
        return cast("str | None", value)

    def number(self, key: str, *, required: bool = False, default: float = 0.0) -> float:
        value = self._get(key, default, required)
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise self._fail(key, "a number")
        return float(value)

    def whole(self, key: str, *, required: bool = False, default: int = 0) -> int:
        value = self._get(key, default, required)
        if isinstance(value, bool) or not isinstance(value, int):
            raise self._fail(key, "a whole number")
        return value

    def opt_whole(self, key: str, *, required: bool = False) -> int | None:
        value = self._get(key, None, required)
        if value is not None and (isinstance(value, bool) or not isinstance(value, int)):
            raise self._fail(key, "a whole number or null")
        return cast("int | None", value)

    def flag(self, key: str, *, required: bool = False, default: bool = False) -> bool:
        value = self._get(key, default, required)
        if not isinstance(value, bool):
            raise self._fail(key, "true or false")
        return value

    def choice(self, key: str, choices: tuple[str, ...], *, required: bool = False) -> str:
        value = self._get(key, choices[0], required)
        if value not in choices:
            raise self._fail(key, "one of " + ", ".join(choices))
        return cast(str, value)

    def date(self, key: str, *, required: bool = False) -> dt.date | None:
        value = self._get(key, None, required)
        if value is None:
            return None
        try:
            return dt.date.fromisoformat(value)
        except (TypeError, ValueError):
            raise self._fail(key, "a date like 2026-10-14 or null") from None

    def clock(self, key: str) -> dt.time | None:
        value = self._get(key, None, False)
        if value is None:
            return None
        try:
            return dt.time.fromisoformat(value)
        except (TypeError, ValueError):
            raise self._fail(key, "a clock time like 18:30:00 or null") from None

    def texts(self, key: str) -> tuple[str, ...]:
        value = self._get(key, [], False)
        if not isinstance(value, list) or not all(isinstance(x, str) for x in value):
            raise self._fail(key, "a list of strings")
        return tuple(value)

    def obj(self, key: str, *, required: bool = False) -> _Fields:
        place = f"{self.where}.{key}" if self.where else key
        return _Fields(self._get(key, {}, required), place, self.source)

    def objs(self, key: str, read: Callable[[_Fields], T], *,
             required: bool = False) -> tuple[T, ...]:
        value = self._get(key, [], required)
        if not isinstance(value, list):
            raise self._fail(key, "a list")
        base = f"{self.where}.{key}" if self.where else key
        return tuple(read(_Fields(x, f"{base}[{n}]", self.source)) for n, x in enumerate(value))


def _evidence(f: _Fields) -> Evidence:
    return Evidence(utterance=f.whole("utterance", required=True), cue=f.opt_text("cue"),
                    start=f.number("start"), end=f.number("end"), speaker=f.text("speaker"),
                    quote=f.text("quote"))


def _history(f: _Fields) -> tuple[Change, ...]:
    return f.objs("history", lambda c: Change(
        kind=c.text("kind", required=True), value=c.opt_text("value"),
        evidence=_evidence(c.obj("evidence", required=True)),
        source=c.text("source", default="rules")))


def _point(f: _Fields) -> Point:
    return Point(text=f.text("text", required=True), start=f.number("start", required=True),
                 speaker=f.text("speaker"), utterance=f.whole("utterance"))


def _utterance(f: _Fields) -> Utterance:
    start, end = f.number("start", required=True), f.number("end", required=True)
    cue_ids: list[str | None]
    if "cues" in f.data:
        raw = f.data["cues"]
        if not isinstance(raw, list) or not all(x is None or isinstance(x, str) for x in raw):
            raise f._fail("cues", "a list of cue ids")
        cue_ids = list(raw)
    else:
        first = f.opt_text("cue")
        cue_ids = [first] if first is not None else []
    text = f.text("text", required=True)
    # Only cue ids are in the JSON; each cue gets the utterance's times (and its text when
    # it is the only cue), which is all the renderers and evidence links need.
    cues = tuple(Cue(id=c, start=start, end=end, text=text if len(cue_ids) == 1 else "")
                 for c in cue_ids)
    return Utterance(index=f.whole("index", required=True), start=start, end=end,
                     speaker=f.text("speaker", required=True), text=text, cues=cues,
                     label=f.text("label"))


def _vote(f: _Fields) -> Vote:
    calls = f.obj("roll_call")
    if not all(isinstance(v, str) for v in calls.data.values()):
        raise calls._fail("*", "names mapped to aye, no, abstain or absent")
    order = [n for n in f.texts("roll_call_order") if n in calls.data]
    order += [n for n in calls.data if n not in order]
    return Vote(method=f.text("method", default="none"), for_=f.opt_whole("for"),
                against=f.opt_whole("against"), abstain=f.opt_whole("abstain"),
                roll_call=tuple((n, calls.data[n]) for n in order))


def _motion(f: _Fields) -> Motion:
    return Motion(
        id=f.text("id", required=True), text=f.text("text", required=True),
        mover=f.text("mover", required=True), seconder=f.opt_text("seconder", required=True),
        vote=_vote(f.obj("vote", required=True)),
        outcome=f.choice("outcome", OUTCOMES, required=True),  # type: ignore[arg-type]
        time=f.number("time"), evidence=f.objs("evidence", _evidence, required=True),
        history=_history(f), amends=f.opt_text("amends"), kind=f.text("kind", default="main"),
        flags=f.texts("flags"), source=f.text("source", default="rules"))


def _action(f: _Fields) -> ActionItem:
    return ActionItem(
        id=f.text("id", required=True), task=f.text("task", required=True),
        owner=f.opt_text("owner", required=True), due=f.date("due", required=True),
        status=f.choice("status", ACTION_STATUSES, required=True),  # type: ignore[arg-type]
        time=f.number("time", required=True), evidence=f.objs("evidence", _evidence,
                                                           required=True),
        history=_history(f), due_text=f.text("due_text"), source=f.text("source",
                                                                       default="rules"))


def _decision(f: _Fields) -> Decision:
    return Decision(
        id=f.text("id", required=True), text=f.text("text", required=True),
        time=f.number("time", required=True), by=f.text("by", required=True),
        evidence=f.objs("evidence", _evidence, required=True), history=_history(f),
        proposal=f.opt_text("proposal"), source=f.text("source", default="rules"))


def _question(f: _Fields) -> Question:
    return Question(
        id=f.text("id", required=True), text=f.text("text", required=True),
        asked_by=f.text("asked_by", required=True), answered=f.flag("answered", required=True),
        time=f.number("time"), evidence=f.objs("evidence", _evidence, required=True),
        history=_history(f), source=f.text("source", default="rules"))


def _proposal(f: _Fields) -> Proposal:
    return Proposal(
        id=f.text("id", required=True), text=f.text("text", required=True),
        by=f.text("by", required=True), time=f.number("time", required=True),
        evidence=f.objs("evidence", _evidence, required=True),
        status=f.choice("status", PROPOSAL_STATUSES),  # type: ignore[arg-type]
        history=_history(f), source=f.text("source", default="rules"))


def _event(f: _Fields) -> Event:
    return Event(kind=f.text("kind", required=True), time=f.number("time", required=True),
                 evidence=f.objs("evidence", _evidence), detail=f.text("detail"),
                 clock=f.clock("clock"))


def _quorum(f: _Fields) -> Quorum | None:
    if f.data.get("quorum") is None:
        return None
    q = f.obj("quorum")
    return Quorum(present=q.whole("present", required=True), members=q.whole("members",
                                                                       required=True),
                  required=q.whole("required", required=True), met=q.flag("met", required=True),
                  rule=q.text("rule"))


def _roster(f: _Fields) -> Roster | None:
    # Written by to_json_dict since the roster was added; older files have none.
    if f.data.get("roster") is None:
        return None
    r = f.obj("roster")
    officers = r.objs("officers", lambda o: (o.text("office", required=True),
                                             o.text("name", required=True)))
    quorum = r.opt_whole("quorum")
    return Roster(body=r.text("body"), members=r.texts("members"), officers=officers,
                  quorum=quorum, two_thirds=r.texts("two_thirds"),
                  record_seconder=r.flag("record_seconder"))


def minutes_from_json(data: dict[str, Any], *, roster: Roster | None = None,
                      source: str = "") -> Minutes:
    """Return the ``Minutes`` that ``to_json_dict`` turned into ``data``.

    ``roster`` stands in for the body's rules, which the JSON does not carry; ``source``
    names the file in error messages.
    """
    top = _Fields(data, "", source)
    m = top.obj("meeting", required=True)
    info = MeetingInfo(
        title=m.text("title", required=True), body=m.text("body"), kind=m.text("kind"),
        date=m.date("date", required=True), place=m.text("place"),
        start_clock=m.clock("start_clock"), next_meeting=m.date("next_meeting"),
        agenda=m.objs("agenda", lambda a: AgendaItem(title=a.text("title", required=True),
                                                      number=a.text("number"),
                                                      notes=a.text("notes"))))
    utterances = top.objs("utterances", _utterance, required=True)
    for n, u in enumerate(utterances):
        if u.index != n:  # evidence and segments index this list; a gap breaks every link
            raise InputError(f"utterances[{n}].index: is {u.index}, expected {n} (utterances "
                             "must be numbered from 0 in order)", path=source)

    def segment(f: _Fields) -> Segment:
        first, last = f.whole("first_utterance", required=True), f.whole("last_utterance",
                                                                      required=True)
        agenda_item = f.opt_whole("agenda_item")
        return Segment(index=f.whole("index", required=True), first=first, last=last,
                       start=f.number("start", required=True), end=f.number("end", required=True),
                       utterances=utterances[first:last + 1], title=f.text("title"),
                       keywords=f.texts("keywords"), points=f.objs("points", _point),
                       agenda_item=agenda_item)

    ledger = Ledger(actions=top.objs("actions", _action, required=True),
                    decisions=top.objs("decisions", _decision, required=True),
                    proposals=top.objs("proposals", _proposal),
                    motions=top.objs("motions", _motion, required=True),
                    questions=top.objs("questions", _question, required=True),
                    events=top.objs("events", _event))
    return Minutes(
        meeting=info, source=m.text("source", required=True),
        duration=m.number("duration_s", required=True),
        attendees=top.objs("attendees", lambda a: Attendee(
            name=a.text("name", required=True), role=a.text("role"),
            present=a.flag("present", default=True), kind=a.text("kind", default="member")),
            required=True),
        segments=top.objs("segments", segment, required=True),
        summary=top.objs("summary", _point), ledger=ledger, utterances=utterances,
        template=top.text("template", default="general"),
        unknown_speakers=top.texts("unknown_speakers"), not_discussed=top.texts("not_discussed"),
        notes=top.texts("notes"), roster=roster if roster is not None else _roster(top),
        quorum=_quorum(top), approved_on=top.date("approved_on"))


def read_minutes_json(path: Path) -> dict[str, Any]:
    """Return the parsed minutes JSON in ``path`` (checked to be a JSON object)."""
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise InputError("no such file; give the .json that `minutes draft` wrote",
                         path=str(path)) from None
    except OSError as exc:
        raise InputError(f"cannot read the file ({exc.strerror})", path=str(path)) from None
    try:
        data = json.loads(raw.decode("utf-8-sig"))
    except UnicodeDecodeError:
        raise InputError("minutes JSON must be UTF-8", path=str(path)) from None
    except json.JSONDecodeError as exc:
        raise InputError(f"not valid JSON ({exc.msg})", path=str(path), line=exc.lineno) from None
    if not isinstance(data, dict) or "utterances" not in data or "meeting" not in data:
        raise InputError("this is not minutes JSON (no 'meeting' and 'utterances'); give the "
                         ".json that `minutes draft -o NAME.json` wrote", path=str(path))
    return data
