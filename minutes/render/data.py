"""The machine-readable outputs: the JSON contract of DESIGN.md, and the action table as CSV.

Contract fields (DESIGN.md, "The JSON output contract") are never renamed or dropped;
fields added beside them are documented in ``minutes/schema/minutes.schema.json``.
Dates are ISO 8601 strings, times are seconds (floats), clock times ``HH:MM:SS``.
"""

from __future__ import annotations

import csv
import datetime as dt
import io
import json
from typing import Any

from ..model import Change, Evidence, Minutes, Motion, Vote
from .text import clock, csv_safe

SCHEMA_VERSION = 1


def schema() -> dict[str, Any]:
    """Return the JSON Schema (draft 2020-12) of the JSON output."""
    from importlib.resources import files

    text = files("minutes").joinpath("schema/minutes.schema.json").read_text("utf-8")
    data: dict[str, Any] = json.loads(text)
    return data


def _date(value: dt.date | None) -> str | None:
    return value.isoformat() if value else None


def _clock(value: dt.time | None) -> str | None:
    return value.replace(microsecond=0).isoformat() if value else None


def _evidence(e: Evidence) -> dict[str, Any]:
    return {"utterance": e.utterance, "cue": e.cue, "start": float(e.start),
            "end": float(e.end), "speaker": e.speaker, "quote": e.quote}


def _history(history: tuple[Change, ...]) -> list[dict[str, Any]]:
    return [{"kind": c.kind, "value": c.value, "source": c.source,
             "evidence": _evidence(c.evidence)} for c in history]


def _vote(v: Vote) -> dict[str, Any]:
    # roll_call is an object name -> how they voted, as the contract shows; the ordered
    # list goes beside it because an object's key order is not guaranteed to readers.
    return {"for": v.for_, "against": v.against, "abstain": v.abstain,
            "roll_call": {name: how for name, how in v.roll_call},
            "method": v.method,
            "roll_call_order": [name for name, _ in v.roll_call]}


def _motion(m: Motion) -> dict[str, Any]:
    return {"id": m.id, "text": m.text, "mover": m.mover, "seconder": m.seconder,
            "vote": _vote(m.vote), "outcome": m.outcome,
            "evidence": [_evidence(e) for e in m.evidence],
            "time": float(m.time), "kind": m.kind, "amends": m.amends, "flags": list(m.flags),
            "source": m.source, "history": _history(m.history)}


def to_json_dict(minutes: Minutes) -> dict[str, Any]:
    """Return the minutes as the JSON contract's dict (plus documented extra fields)."""
    m = minutes.meeting
    ledger = minutes.ledger
    return {
        "meeting": {
            "title": m.title, "date": _date(m.date), "source": minutes.source,
            "duration_s": float(minutes.duration),
            "body": m.body, "kind": m.kind, "place": m.place,
            "start_clock": _clock(m.start_clock), "next_meeting": _date(m.next_meeting),
            "agenda": [{"number": a.number, "title": a.title, "notes": a.notes}
                       for a in m.agenda],
        },
        "template": minutes.template,
        "draft": minutes.approved_on is None,
        "approved_on": _date(minutes.approved_on),
        "attendees": [{"name": a.name, "role": a.role, "present": a.present, "kind": a.kind}
                      for a in minutes.attendees],
        "unknown_speakers": list(minutes.unknown_speakers),
        "roster": None if minutes.roster is None else {
            "body": minutes.roster.body, "members": list(minutes.roster.members),
            "officers": [{"office": o, "name": n} for o, n in minutes.roster.officers],
            "quorum": minutes.roster.quorum, "two_thirds": list(minutes.roster.two_thirds),
            "record_seconder": minutes.roster.record_seconder},
        "quorum": None if minutes.quorum is None else {
            "present": minutes.quorum.present, "members": minutes.quorum.members,
            "required": minutes.quorum.required, "met": minutes.quorum.met,
            "rule": minutes.quorum.rule},
        "summary": [{"text": p.text, "start": float(p.start), "speaker": p.speaker,
                     "utterance": p.utterance} for p in minutes.summary],
        "segments": [{
            "index": s.index, "start": float(s.start), "end": float(s.end),
            "first_utterance": s.first, "last_utterance": s.last,
            "title": s.title, "keywords": list(s.keywords),
            "points": [{"text": p.text, "start": float(p.start), "speaker": p.speaker,
                        "utterance": p.utterance} for p in s.points],
            "agenda_item": s.agenda_item,
        } for s in minutes.segments],
        "not_discussed": list(minutes.not_discussed),
        "decisions": [{
            "id": d.id, "text": d.text, "time": float(d.time), "by": d.by,
            "evidence": [_evidence(e) for e in d.evidence],
            "proposal": d.proposal, "source": d.source, "history": _history(d.history),
        } for d in ledger.decisions],
        "actions": [{
            "id": a.id, "task": a.task, "owner": a.owner, "due": _date(a.due),
            "status": a.status, "time": float(a.time),
            "evidence": [_evidence(e) for e in a.evidence],
            "due_text": a.due_text, "source": a.source, "history": _history(a.history),
        } for a in ledger.actions],
        "motions": [_motion(x) for x in ledger.motions],
        "questions": [{
            "id": q.id, "text": q.text, "asked_by": q.asked_by, "answered": q.answered,
            "evidence": [_evidence(e) for e in q.evidence],
            "time": float(q.time), "source": q.source, "history": _history(q.history),
        } for q in ledger.questions],
        "proposals": [{
            "id": p.id, "text": p.text, "by": p.by, "time": float(p.time), "status": p.status,
            "evidence": [_evidence(e) for e in p.evidence],
            "source": p.source, "history": _history(p.history),
        } for p in ledger.proposals],
        "events": [{
            "kind": e.kind, "time": float(e.time), "clock": _clock(e.clock), "detail": e.detail,
            "evidence": [_evidence(x) for x in e.evidence],
        } for e in ledger.events],
        "notes": list(minutes.notes),
        "utterances": [{
            "index": u.index, "cue": u.cues[0].id if u.cues else None,
            "start": float(u.start), "end": float(u.end), "speaker": u.speaker, "text": u.text,
            "cues": [c.id for c in u.cues], "label": u.label,
        } for u in minutes.utterances],
        "schema_version": SCHEMA_VERSION,
    }


def render_json(minutes: Minutes) -> bytes:
    """Return the JSON contract as UTF-8 bytes (indented, fixed key order, LF)."""
    text = json.dumps(to_json_dict(minutes), ensure_ascii=False, indent=2, allow_nan=False)
    return (text + "\n").encode("utf-8")


CSV_HEADER = ("No.", "Action", "Owner", "Due", "Status", "Time", "Cue")


def actions_csv(minutes: Minutes) -> bytes:
    """Return the action table as CSV (RFC 4180, UTF-8), every cell formula-safe."""
    out = io.StringIO()
    # RFC 4180 quoting and CRLF record ends; csv_safe applies the OWASP prefix rule.
    writer = csv.writer(out, quoting=csv.QUOTE_MINIMAL, lineterminator="\r\n")
    writer.writerow(CSV_HEADER)
    for a in minutes.ledger.actions:
        writer.writerow([csv_safe(x) for x in (
            a.id, a.task, a.owner or "", a.due.isoformat() if a.due else a.due_text, a.status,
            clock(a.time), (a.evidence[0].cue or "") if a.evidence else "")])
    return out.getvalue().encode("utf-8")
