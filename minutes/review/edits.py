"""The review file: a clerk's verdicts and corrections, kept beside the draft, never in it.

A review is plain JSON (``MINUTES.review.json``)::

    {"format": "minutes-review", "version": 1,
     "minutes_file": "board.json", "minutes_sha256": "<hash of the draft's bytes>",
     "updated": "2026-10-15T09:12:03Z",
     "items":   {"A3": {"state": "accepted|rejected|pending", "fields": {"owner": "..."}}},
     "added":   [{"kind": "action", "item": {<an item in the JSON contract's shape>}}],
     "renames": [["Speaker 1", "Dana Whitcombe"]]}

Items are named by their ids in the draft (``A3``, ``M2``; notes for the clerk are ``N1``,
``N2``... in order). Edits come one at a time (``validate_edit`` checks one, ``record``
stores it); ``apply_review`` returns the draft's JSON dict with the review applied:
field edits first, then renames everywhere, rejected items left out. The draft's hash
ties a review to one draft, so a re-drafted file is never corrected by another's review.
"""

from __future__ import annotations

import copy
import datetime as dt
import hashlib
import json
import re
import unicodedata
from collections.abc import Callable, Iterable
from pathlib import Path
from typing import Any

from ..errors import InputError, UsageError
from .loader import ACTION_STATUSES, OUTCOMES

FORMAT = "minutes-review"
VERSION = 1
STATES = ("pending", "accepted", "rejected")
KINDS = {"A": "actions", "D": "decisions", "M": "motions", "Q": "questions"}
KIND_NAMES = {"action": "A", "decision": "D", "motion": "M", "question": "Q"}
VOTE_METHODS = ("none", "voice", "count", "roll_call", "consent")
MAX_TEXT = 2000
MAX_NAME = 200
MAX_COUNT = 100_000
MAX_SPANS = 50
EDITED_BY = "clerk"  # the ``source`` of items a reviewer adds

# Control characters never belong in minutes (tab and line feed are whitespace here).
_CONTROL = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u2028\u2029\ufffe\uffff]")
_ID = re.compile(r"^([ADMQN])([1-9][0-9]{0,5})$")
_DATE = re.compile(r"^[0-9]{4}-[0-9]{2}-[0-9]{2}$")

# Which fields each kind of item lets a reviewer change, and how each is checked.
FIELDS: dict[str, dict[str, str]] = {
    "actions": {"task": "text", "owner": "opt_name", "due": "opt_date",
                "status": "status"},
    "decisions": {"text": "text", "by": "name"},
    "motions": {"text": "text", "mover": "name", "seconder": "opt_name", "for": "count",
                "against": "count", "abstain": "count", "outcome": "outcome",
                "method": "method", "flags": "flags"},
    "questions": {"text": "text", "asked_by": "name", "answered": "bool"},
}
TEXT_FIELD = {"actions": "task", "decisions": "text", "motions": "text", "questions": "text"}
PERSON_FIELD = {"actions": "owner", "decisions": "by", "motions": "mover",
                "questions": "asked_by"}


def review_path(minutes_path: Path) -> Path:
    """Return where the review of ``minutes_path`` lives: ``NAME.review.json`` beside it."""
    return minutes_path.with_name(minutes_path.stem + ".review.json")


def digest(raw: bytes) -> str:
    """Return the SHA-256 of the draft's bytes, as hex."""
    return hashlib.sha256(raw).hexdigest()


def new_review(minutes_name: str, minutes_sha256: str) -> dict[str, Any]:
    """Return an empty review of the draft with this file name and hash."""
    return {"format": FORMAT, "version": VERSION, "minutes_file": minutes_name,
            "minutes_sha256": minutes_sha256, "updated": None,
            "items": {}, "added": [], "renames": []}


def dump_review(review: dict[str, Any]) -> bytes:
    """Return the review as UTF-8 JSON bytes (indented, LF), stamping ``updated`` now."""
    review["updated"] = dt.datetime.now(dt.UTC).replace(microsecond=0).isoformat()
    return (json.dumps(review, ensure_ascii=False, indent=2) + "\n").encode("utf-8")


# --------------------------------------------------------------------------- reading


def load_review(path: Path, data: dict[str, Any], minutes_sha256: str) -> dict[str, Any]:
    """Return the review stored in ``path``, checked against the draft it must belong to."""
    name = str(path)
    try:
        review = json.loads(path.read_bytes().decode("utf-8-sig"))
    except FileNotFoundError:
        raise InputError("no such review file", path=name) from None
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise InputError(f"cannot read the review file ({exc})", path=name) from None
    if not isinstance(review, dict) or review.get("format") != FORMAT:
        raise InputError(f"not a review file (no \"format\": \"{FORMAT}\")", path=name)
    if review.get("version") != VERSION:
        raise InputError(f"review file version {review.get('version')!r}; this minutes "
                         f"reads version {VERSION}", path=name)
    if review.get("minutes_sha256") != minutes_sha256:
        raise InputError(
            f"this review was made for another version of {review.get('minutes_file')!r} "
            "(the minutes JSON changed since, e.g. it was drafted again); its edits name "
            "items by number and could land on the wrong ones. Rename the review file to "
            "start a fresh review of this draft.", path=name)
    # Replay every stored edit through the same checks a live edit passes.
    fresh = new_review(str(review.get("minutes_file", "")), minutes_sha256)
    try:
        for edit in _as_edits(review):
            record(fresh, validate_edit(edit, data, fresh))
    except UsageError as exc:
        raise InputError(f"the review file holds an edit that does not fit the minutes: "
                         f"{exc}", path=name) from None
    fresh["updated"] = review.get("updated")
    return fresh


def _as_edits(review: dict[str, Any]) -> Iterable[dict[str, Any]]:
    """Return the stored review as the sequence of edits that would rebuild it."""
    items, added, renames = review.get("items"), review.get("added"), review.get("renames")
    if not isinstance(items, dict) or not isinstance(added, list) \
            or not isinstance(renames, list):
        raise UsageError("'items' must be an object, 'added' and 'renames' lists")
    for entry in added:
        if not isinstance(entry, dict) or not isinstance(entry.get("item"), dict):
            raise UsageError("each of 'added' must be {\"kind\": ..., \"item\": {...}}")
        yield {"op": "restore", "kind": entry.get("kind"), "item": entry["item"]}
    for item_id, entry in items.items():
        if not isinstance(entry, dict):
            raise UsageError(f"items.{item_id} must be an object")
        if entry.get("fields"):
            yield {"op": "set", "id": item_id, "fields": entry["fields"]}
        if entry.get("state", "pending") != "pending":
            yield {"op": "state", "id": item_id, "state": entry.get("state")}
    for pair in renames:
        if not isinstance(pair, list) or len(pair) != 2:
            raise UsageError("each rename must be [old name, new name]")
        yield {"op": "rename", "from": pair[0], "to": pair[1]}


# --------------------------------------------------------------------------- checking


def _clean_text(value: Any, what: str, limit: int, *, empty_ok: bool) -> str:
    if not isinstance(value, str):
        raise UsageError(f"{what}: expected text")
    if _CONTROL.search(value):
        raise UsageError(f"{what}: contains control characters")
    text = unicodedata.normalize("NFC", value).strip()
    if len(text) > limit:
        raise UsageError(f"{what}: longer than {limit} characters")
    if not text and not empty_ok:
        raise UsageError(f"{what}: must not be empty")
    return text


def _check_field(kind: str, field: str, value: Any, original: dict[str, Any]) -> Any:
    """Return ``value`` checked and normalised for ``field`` of an item of ``kind``."""
    rule = FIELDS[kind].get(field)
    what = f"{field!r}"
    if rule is None:
        raise UsageError(f"{what} cannot be edited on {kind}; editable: "
                         + ", ".join(FIELDS[kind]))
    if rule == "text":
        return _clean_text(value, what, MAX_TEXT, empty_ok=False)
    if rule == "name":
        return _clean_text(value, what, MAX_NAME, empty_ok=True)
    if rule == "opt_name":
        if value is None:
            return None
        return _clean_text(value, what, MAX_NAME, empty_ok=True) or None
    if rule == "opt_date":
        if value is None or value == "":
            return None
        try:
            if not isinstance(value, str) or not _DATE.match(value):
                raise ValueError(value)
            return dt.date.fromisoformat(value).isoformat()
        except ValueError:
            raise UsageError(f"{what}: expected a date like 2026-10-14, or empty") from None
    if rule in ("status", "outcome", "method"):
        choices = {"status": ACTION_STATUSES, "outcome": OUTCOMES, "method": VOTE_METHODS}[rule]
        if value not in choices:
            raise UsageError(f"{what}: choose one of {', '.join(choices)}")
        return value
    if rule == "count":
        if value is None or value == "":
            return None  # not heard: never zero
        if isinstance(value, bool) or not isinstance(value, int) or not 0 <= value <= MAX_COUNT:
            raise UsageError(f"{what}: expected a whole number from 0 to {MAX_COUNT}, or empty")
        return value
    if rule == "bool":
        if not isinstance(value, bool):
            raise UsageError(f"{what}: expected true or false")
        return value
    if rule == "flags":
        # A reviewer may settle a flag (drop it), never invent one: flags are the reader's.
        allowed = original.get("flags", [])
        if not isinstance(value, list) or any(f not in allowed for f in value):
            raise UsageError(f"{what}: may only keep flags the draft raised")
        return [f for f in allowed if f in value]
    raise AssertionError(rule)  # pragma: no cover - FIELDS and the rules above agree


def item_index(data: dict[str, Any], review: dict[str, Any]) -> dict[str, tuple[str, dict]]:
    """Return every reviewable item by id: (list name, item), the added ones included."""
    found: dict[str, tuple[str, dict]] = {}
    for key in KINDS.values():
        for item in data.get(key, []):
            found[item["id"]] = (key, item)
    for entry in review["added"]:
        found[entry["item"]["id"]] = (KINDS[entry["item"]["id"][0]], entry["item"])
    for n, note in enumerate(data.get("notes", []), 1):
        found[f"N{n}"] = ("notes", {"id": f"N{n}", "text": note})
    return found


def names_in(data: dict[str, Any]) -> set[str]:
    """Return every person's name the minutes mention (speakers, owners, movers...)."""
    names = {u["speaker"] for u in data["utterances"]}
    names |= {a["name"] for a in data.get("attendees", [])}
    for key, field in PERSON_FIELD.items():
        names |= {x.get(field) or "" for x in data.get(key, [])}
    names |= {m.get("seconder") or "" for m in data.get("motions", [])}
    names.discard("")
    return names


def validate_edit(edit: Any, data: dict[str, Any], review: dict[str, Any],
                  cue_of: Callable[[int, str], tuple[str | None, float, float]] | None = None
                  ) -> dict[str, Any]:
    """Return ``edit`` checked against the draft and the review so far, ready to ``record``.

    ``cue_of(utterance, quote)`` gives the cue and times of a quote for added items;
    without it an utterance of one cue gives that cue, and a longer one none.
    """
    if not isinstance(edit, dict):
        raise UsageError("an edit must be a JSON object")
    op = edit.get("op")
    items = item_index(data, review)
    if op == "state":
        item_id = _known(edit.get("id"), items)
        state = edit.get("state")
        if state not in STATES:
            raise UsageError(f"'state': choose one of {', '.join(STATES)}")
        return {"op": op, "id": item_id, "state": state}
    if op == "set":
        item_id = _known(edit.get("id"), items)
        kind, item = items[item_id]
        if kind == "notes":
            raise UsageError("notes for the clerk can be kept or rejected, not edited")
        fields = edit.get("fields")
        if not isinstance(fields, dict) or not fields or len(fields) > len(FIELDS[kind]):
            raise UsageError("'fields' must be an object of the fields to change")
        return {"op": op, "id": item_id,
                "fields": {k: _check_field(kind, k, v, item) for k, v in fields.items()}}
    if op == "add":
        return {"op": "restore", "kind": _kind(edit.get("kind")),
                "item": _new_item(edit, data, review, items, cue_of)}
    if op == "restore":  # an added item read back from a review file
        kind = _kind(edit.get("kind"))
        added = edit.get("item")
        if not isinstance(added, dict) or not isinstance(added.get("evidence"), list):
            raise UsageError("an added item must be an object with its evidence")
        stored = [e for e in added["evidence"] if isinstance(e, dict)]
        spans = [{"utterance": e.get("utterance"), "quote": e.get("quote")} for e in stored]
        if not spans or not all(isinstance(s["quote"], str) for s in spans):
            raise UsageError(f"added item {added.get('id')!r} has no evidence")
        new_id = added.get("id")
        if not isinstance(new_id, str) or not _ID.match(new_id) or new_id in items \
                or new_id[0] != KIND_NAMES[kind]:
            raise UsageError(f"added item id {new_id!r} is not a new {kind} id")
        rebuilt = _build(kind, new_id, _evidence_from_quotes(spans, data), data)
        for evidence, old in zip(rebuilt["evidence"], stored, strict=True):
            # Keep the cue and times found when it was added (from the caption file).
            if old.get("cue") is None or isinstance(old.get("cue"), str):
                evidence["cue"] = old.get("cue")
            for key in ("start", "end"):
                value = old.get(key)
                if isinstance(value, (int, float)) and not isinstance(value, bool) \
                        and value >= 0:
                    evidence[key] = float(value)
        rebuilt["time"] = rebuilt["evidence"][0]["start"]
        return {"op": "restore", "kind": kind, "item": rebuilt}
    if op == "rename":
        names = names_in(apply_review(data, review, drop_rejected=False))
        before = _clean_text(edit.get("from"), "'from'", MAX_NAME, empty_ok=False)
        after = _clean_text(edit.get("to"), "'to'", MAX_NAME, empty_ok=False)
        if before not in names:
            raise UsageError(f"nobody is called {before!r} in these minutes")
        if before == after:
            raise UsageError("the new name is the same as the old one")
        return {"op": op, "from": before, "to": after}
    if op == "unrename":
        index = edit.get("index")
        if isinstance(index, bool) or not isinstance(index, int) \
                or not 0 <= index < len(review["renames"]):
            raise UsageError("'index' must name one of the renames made")
        return {"op": op, "index": index}
    raise UsageError("'op' must be one of: state, set, add, rename, unrename")


def _known(item_id: Any, items: dict[str, tuple[str, dict]]) -> str:
    if not isinstance(item_id, str) or item_id not in items:
        raise UsageError(f"no item {item_id!r} in these minutes")
    return item_id


def _whole(value: Any, what: str) -> int:
    if isinstance(value, bool) or not isinstance(value, int):
        raise UsageError(f"{what}: expected a whole number")
    return value


def _kind(kind: Any) -> str:
    if kind not in KIND_NAMES:
        raise UsageError(f"'kind': choose one of {', '.join(KIND_NAMES)}")
    return str(kind)


def _new_item(edit: dict[str, Any], data: dict[str, Any], review: dict[str, Any],
              items: dict[str, tuple[str, dict]],
              cue_of: Callable[[int, str], tuple[str | None, float, float]] | None
              ) -> dict[str, Any]:
    kind = _kind(edit.get("kind"))
    spans = edit.get("span")
    if not isinstance(spans, list) or not 1 <= len(spans) <= MAX_SPANS:
        raise UsageError(f"'span' must list 1 to {MAX_SPANS} pieces of the transcript")
    utterances = data["utterances"]
    quotes = []
    last = -1
    for n, piece in enumerate(spans):
        if not isinstance(piece, dict):
            raise UsageError(f"span[{n}] must be an object")
        index, start, end = (_whole(piece.get(k), f"span[{n}].{k}")
                             for k in ("utterance", "from", "to"))
        if not last < index < len(utterances):
            raise UsageError(f"span[{n}]: utterance {index} is out of order or not in the "
                             "transcript")
        last = index
        text = utterances[index]["text"]
        if not 0 <= start < end <= len(text):
            raise UsageError(f"span[{n}]: characters {start}-{end} are not inside utterance "
                             f"{index}")
        quote = text[start:end].strip()
        if quote:
            quotes.append({"utterance": index, "quote": quote})
    if not quotes:
        raise UsageError("the selected span holds no words")
    prefix = KIND_NAMES[kind]
    taken = [int(i[1:]) for i in items if i[0] == prefix]
    item_id = f"{prefix}{max(taken, default=0) + 1}"
    return _build(kind, item_id, _evidence_from_quotes(quotes, data, cue_of), data)


def _evidence_from_quotes(quotes: list[dict[str, Any]], data: dict[str, Any],
                          cue_of: Callable[[int, str], tuple[str | None, float, float]]
                          | None = None) -> list[dict[str, Any]]:
    utterances = data["utterances"]
    evidence = []
    for q in quotes:
        index = q["utterance"]
        if isinstance(index, bool) or not isinstance(index, int) \
                or not 0 <= index < len(utterances):
            raise UsageError(f"evidence names utterance {index!r}, which is not in the "
                             "transcript")
        u = utterances[index]
        if q["quote"] not in u["text"]:
            raise UsageError(f"the quote {q['quote'][:40]!r} is not in utterance {index}")
        if cue_of is not None:
            cue, start, end = cue_of(index, q["quote"])
        else:
            cues = u.get("cues") or ([u["cue"]] if u.get("cue") is not None else [])
            # Which of several merged cues holds the words is not in the JSON: say none.
            cue, start, end = (cues[0] if len(cues) == 1 else None), u["start"], u["end"]
        evidence.append({"utterance": index, "cue": cue, "start": float(start),
                         "end": float(end), "speaker": u["speaker"], "quote": q["quote"]})
    return evidence


def _build(kind: str, item_id: str, evidence: list[dict[str, Any]],
           data: dict[str, Any]) -> dict[str, Any]:
    """Return a new item in the contract's shape, its text the quote, its person the speaker."""
    text = " … ".join(e["quote"] for e in evidence)
    if len(text) > MAX_TEXT:
        text = text[:MAX_TEXT - 1].rstrip() + "…"
    speaker = evidence[0]["speaker"]
    common = {"id": item_id, "time": evidence[0]["start"], "evidence": evidence,
              "source": EDITED_BY, "history": []}
    if kind == "action":
        return {**common, "task": text, "owner": speaker, "due": None, "status": "open",
                "due_text": ""}
    if kind == "decision":
        return {**common, "text": text, "by": speaker, "proposal": None}
    if kind == "motion":
        return {**common, "text": text, "mover": speaker, "seconder": None,
                "vote": {"for": None, "against": None, "abstain": None, "roll_call": {},
                         "method": "none", "roll_call_order": []},
                "outcome": "pending", "kind": "main", "amends": None, "flags": []}
    return {**common, "text": text, "asked_by": speaker, "answered": False}


# --------------------------------------------------------------------------- storing


def record(review: dict[str, Any], edit: dict[str, Any]) -> None:
    """Store a checked edit (from ``validate_edit``) in ``review``."""
    op = edit["op"]
    if op == "state":
        entry = review["items"].setdefault(edit["id"], {"state": "pending", "fields": {}})
        entry["state"] = edit["state"]
    elif op == "set":
        entry = review["items"].setdefault(edit["id"], {"state": "pending", "fields": {}})
        entry["fields"].update(edit["fields"])
    elif op == "restore":
        review["added"].append({"kind": edit["kind"], "item": edit["item"]})
    elif op == "rename":
        review["renames"].append([edit["from"], edit["to"]])
    elif op == "unrename":
        del review["renames"][edit["index"]]
    else:  # pragma: no cover - validate_edit returns only the ops above
        raise AssertionError(op)


# --------------------------------------------------------------------------- applying


def apply_review(data: dict[str, Any], review: dict[str, Any], *,
                 drop_rejected: bool = True) -> dict[str, Any]:
    """Return a copy of the draft's JSON dict with the review applied.

    With ``drop_rejected=False`` rejected items stay, and every reviewable item gets
    ``review_state`` and ``edited`` (the fields changed), and motions ``draft_flags``:
    the view the review page shows.
    """
    out = copy.deepcopy(data)
    for entry in review["added"]:
        key = KINDS[entry["item"]["id"][0]]
        out[key].append(copy.deepcopy(entry["item"]))
        out[key].sort(key=lambda x: x.get("time", 0.0))  # stable: ties keep draft order
    rejected: set[str] = set()
    for key in KINDS.values():
        for item in out[key]:
            entry = review["items"].get(item["id"], {})
            fields = entry.get("fields", {})
            if not drop_rejected and key == "motions":
                item["draft_flags"] = list(item.get("flags", []))  # to tick back on
            for field, value in fields.items():
                _set(key, item, field, value)
            if entry.get("state") == "rejected":
                rejected.add(item["id"])
            if not drop_rejected:
                item["review_state"] = entry.get("state", "pending")
                item["edited"] = sorted(fields)
    notes = out.get("notes", [])
    note_ids = [f"N{n}" for n in range(1, len(notes) + 1)]
    if drop_rejected:
        for key in KINDS.values():
            out[key] = [x for x in out[key] if x["id"] not in rejected]
        for motion in out["motions"]:
            if motion.get("amends") in rejected:  # what it amended is gone from the record
                motion["amends"] = None
        out["notes"] = [n for n, i in zip(notes, note_ids, strict=True)
                        if review["items"].get(i, {}).get("state") != "rejected"]
    else:
        out["note_states"] = {i: review["items"].get(i, {}).get("state", "pending")
                              for i in note_ids}
    if review["renames"]:
        _rename(out, review["renames"])
    return out


def _set(key: str, item: dict[str, Any], field: str, value: Any) -> None:
    if key == "motions" and field in ("for", "against", "abstain", "method"):
        vote = item["vote"]
        vote[field] = value
        if field != "method" and value is not None and vote.get("method", "none") == "none":
            vote["method"] = "count"  # counts were taken, so a vote was held
        return
    item[field] = value


def _rename(out: dict[str, Any], renames: list[list[str]]) -> None:
    def name(value: str) -> str:
        for old, new in renames:
            if value == old:
                value = new
        return value

    def evidence(items: Iterable[dict[str, Any]]) -> None:
        for item in items:
            for e in item.get("evidence", []):
                e["speaker"] = name(e["speaker"])
            for change in item.get("history", []):
                change["evidence"]["speaker"] = name(change["evidence"]["speaker"])

    renamed = {old for old, _ in renames}
    for u in out["utterances"]:
        u["speaker"] = name(u["speaker"])
    for point in [*out.get("summary", []), *(p for s in out.get("segments", [])
                                           for p in s.get("points", []))]:
        point["speaker"] = name(point.get("speaker", ""))
    people: dict[str, dict[str, Any]] = {}
    for a in out.get("attendees", []):
        a["name"] = name(a["name"])
        if a["name"] in people:  # two labels named as one person: one line, present if either
            people[a["name"]]["present"] = people[a["name"]]["present"] or a["present"]
        else:
            people[a["name"]] = a
    out["attendees"] = list(people.values())
    out["unknown_speakers"] = [x for x in out.get("unknown_speakers", []) if x not in renamed]
    for key, field in PERSON_FIELD.items():
        for item in out.get(key, []):
            if item.get(field):
                item[field] = name(item[field])
    for p in out.get("proposals", []):
        p["by"] = name(p["by"])
    for m in out.get("motions", []):
        if m.get("seconder"):
            m["seconder"] = name(m["seconder"])
        vote = m["vote"]
        vote["roll_call"] = {name(k): v for k, v in vote.get("roll_call", {}).items()}
        vote["roll_call_order"] = [name(k) for k in vote.get("roll_call_order", [])]
    for event in out.get("events", []):
        event["detail"] = ", ".join(name(part) for part in event["detail"].split(", "))
    for key in (*KINDS.values(), "proposals", "events"):
        evidence(out.get(key, []))
