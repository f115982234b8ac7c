"""A meeting series: one SQLite file that carries open items from one meeting to the next.

``minutes draft week2.vtt --series team.sqlite`` runs in four steps:

1. ``load`` reads the items still open after the meetings that come *before* this one
   (open actions, and proposals left hanging at the end of their meeting) and builds the
   pipeline's initial ledger from them (``pipeline.draft(..., initial=carried.ledger)``);
2. the relay reads this meeting and may mark them done, re-dated, reassigned or dropped;
3. ``settle`` gives carried items back their series ids and numbers new items after the
   highest id of the series, so "A3" means the same action in every meeting's minutes;
4. after the minutes are written, ``save`` stores this meeting's outcome in ONE
   transaction: a crash half way leaves the file as it was.

**Meeting identity.** A meeting is known by its ISO date, start clock (when given) and
title, e.g. ``2026-11-11 18:30 Kestrel Road branch: weekly call``, so a rerun from
corrected captions or from the recording replaces the earlier record of that meeting.
A meeting without a date is known by the SHA-256 of its input file instead. Meetings are
ordered by date and start clock; undated ones come after dated ones, in the order they
were first saved. A meeting loads the state left by the meetings before it, never its
own earlier record, so a rerun of the latest meeting starts from the same state as the
first run did.

**Ids.** The relay's ledger numbers new items by count (``relay.ledger.next_id``) and the
final pass numbers actions again in time order, so carried items enter the ledger
renumbered A1..An (no id can collide) and each carries a ``Change("carried", "A3 from
<meeting>", <its first evidence>, source="series")`` in its history; ``settle`` finds them
by that change after the final pass and restores the series ids.

**Proposals.** A proposal still pending when its meeting ends is carried to the next
meeting; if nobody takes it up there, it lapses for good (common practice: unfinished
business goes to the next meeting, not on for ever).

**Schema.** ``PRAGMA user_version`` holds the schema version; ``MIGRATIONS[n]`` takes a
file from version n to n + 1, and files are migrated on open. ``PRAGMA application_id``
marks the file as a minutes series. Tables:

- ``meeting``: one row per meeting (identity unique; seq keeps the first save's order);
- ``item``: one row per (meeting, item id): the item as that meeting left it, ``raised``
  1 where the meeting raised it, 0 where it carried it; ``record`` is the whole item as
  JSON (history and evidence included), ``status`` the series status (open, done,
  dropped; pending, accepted, rejected, lapsed).
"""

from __future__ import annotations

import datetime as dt
import hashlib
import json
import os
import re
import sqlite3
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from .errors import InputError, OutputError
from .model import ActionItem, Change, Evidence, Ledger, MeetingInfo, Minutes, Proposal

APPLICATION_ID = 0x4D4E5453  # "MNTS": marks a minutes series file
SCHEMA_VERSION = 1
MIGRATIONS: tuple[tuple[str, ...], ...] = (
    # 0 -> 1
    (
        """CREATE TABLE meeting (
            seq INTEGER PRIMARY KEY,
            identity TEXT NOT NULL UNIQUE,
            date TEXT,
            clock TEXT,
            title TEXT NOT NULL,
            source TEXT NOT NULL,
            input_sha256 TEXT NOT NULL,
            saved_at TEXT NOT NULL
        )""",
        """CREATE TABLE item (
            meeting INTEGER NOT NULL REFERENCES meeting(seq) ON DELETE CASCADE,
            id TEXT NOT NULL,
            kind TEXT NOT NULL CHECK (kind IN ('action', 'proposal')),
            raised INTEGER NOT NULL,
            status TEXT NOT NULL,
            owner TEXT,
            due TEXT,
            text TEXT NOT NULL,
            origin TEXT NOT NULL,
            record TEXT NOT NULL,
            PRIMARY KEY (meeting, id)
        )""",
        "CREATE INDEX item_by_id ON item(id)",
    ),
)

# Test hook: the save calls os._exit after this many item rows, inside its transaction,
# so a test can show that a crash half way leaves the series file as it was.
CRASH_ENV = "MINUTES_TEST_SERIES_CRASH_AFTER"

OPEN = {"action": ("open",), "proposal": ("pending",)}
_SID = re.compile(r"^([AP])(\d+)\b")


# --------------------------------------------------------------------------- identity


def meeting_of(path: Path, options: Any) -> MeetingInfo:
    """Return what ``pipeline.draft`` will know of the meeting in ``path`` (date, title...)."""
    from .pipeline import meeting_file

    info = meeting_file(path, options).info
    if options.date is not None:
        info = replace(info, date=options.date)
    if options.title is not None:
        info = replace(info, title=options.title)
    if not info.title:  # the pipeline's rule for a meeting without a title
        info = replace(info, title=path.stem.replace("_", " ").replace("-", " ").strip().title())
    return info


def file_digest(path: Path) -> str:
    """Return the SHA-256 of a file's bytes, in hex."""
    h = hashlib.sha256()
    with path.open("rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def identity(info: MeetingInfo, digest: str) -> str:
    """Return the name a meeting is known by in its series (see the module docstring)."""
    if info.date is None:
        return f"sha256:{digest}"
    clock = f" {info.start_clock.strftime('%H:%M')}" if info.start_clock else ""
    return f"{info.date.isoformat()}{clock} {info.title}".strip()


def label(info: MeetingInfo) -> str:
    """Return a meeting as people name it: date and title."""
    return " ".join(x for x in (info.date.isoformat() if info.date else "", info.title) if x)


def _order(date: str | None, clock: str | None, seq: int) -> tuple[int, str, str, int]:
    # undated meetings come after dated ones, in the order they were first saved
    return (0, date, clock or "", seq) if date else (1, "", "", seq)


# --------------------------------------------------------------------------- the file


def connect(path: Path, *, create: bool) -> sqlite3.Connection:
    """Return a connection to the series file, migrated to the current schema."""
    if not path.exists():
        if not create:
            raise InputError("no such series file; draft a meeting with --series FILE first",
                             path=str(path))
        if not path.parent.is_dir():
            raise OutputError(f"{path}: the folder {path.parent} does not exist")
    elif path.is_dir():
        raise InputError("is a folder; give the series file (e.g. team.sqlite)", path=str(path))
    try:
        conn = sqlite3.connect(path, isolation_level=None)
    except sqlite3.Error as exc:
        raise InputError(f"cannot open the series file ({exc})", path=str(path)) from exc
    try:
        conn.execute("PRAGMA foreign_keys = ON")
        _migrate(conn, path)
    except sqlite3.DatabaseError as exc:
        conn.close()
        raise InputError(f"not a series file ({exc})", path=str(path)) from exc
    except BaseException:
        conn.close()
        raise
    return conn


def _migrate(conn: sqlite3.Connection, path: Path) -> None:
    version = conn.execute("PRAGMA user_version").fetchone()[0]
    app = conn.execute("PRAGMA application_id").fetchone()[0]
    tables = conn.execute("SELECT count(*) FROM sqlite_master").fetchone()[0]
    if app != APPLICATION_ID and (app != 0 or version != 0 or tables):
        raise InputError("this SQLite file is not a minutes series file; give another name",
                         path=str(path))
    if version > SCHEMA_VERSION:
        raise InputError(f"the series file has schema version {version}, newer than this "
                         f"minutes understands ({SCHEMA_VERSION}); upgrade minutes",
                         path=str(path))
    if version == SCHEMA_VERSION:
        return
    conn.execute("BEGIN IMMEDIATE")
    try:
        for n in range(version, SCHEMA_VERSION):
            for statement in MIGRATIONS[n]:
                conn.execute(statement)
        conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
        conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
        conn.execute("COMMIT")
    except BaseException:
        conn.execute("ROLLBACK")
        raise


# --------------------------------------------------------------------------- records as JSON


def _ev_json(e: Evidence) -> dict[str, Any]:
    return {"utterance": e.utterance, "cue": e.cue, "start": e.start, "end": e.end,
            "speaker": e.speaker, "quote": e.quote}


def _ev(d: dict[str, Any]) -> Evidence:
    return Evidence(int(d["utterance"]), d["cue"], float(d["start"]), float(d["end"]),
                    str(d["speaker"]), str(d["quote"]))


def _ch_json(c: Change) -> dict[str, Any]:
    return {"kind": c.kind, "value": c.value, "source": c.source, "evidence": _ev_json(c.evidence)}


def _ch(d: dict[str, Any]) -> Change:
    return Change(d["kind"], d["value"], _ev(d["evidence"]), source=d["source"])


def to_record(item: ActionItem | Proposal) -> dict[str, Any]:
    """Return an action or proposal as a JSON-ready dict (everything it holds)."""
    common = {"id": item.id, "time": item.time, "source": item.source,
              "evidence": [_ev_json(e) for e in item.evidence],
              "history": [_ch_json(c) for c in item.history]}
    if isinstance(item, ActionItem):
        return {**common, "kind": "action", "task": item.task, "owner": item.owner,
                "due": item.due.isoformat() if item.due else None, "status": item.status,
                "due_text": item.due_text}
    return {**common, "kind": "proposal", "text": item.text, "by": item.by,
            "status": item.status}


def from_record(d: dict[str, Any]) -> ActionItem | Proposal:
    """Return the action or proposal a ``to_record`` dict describes."""
    evidence = tuple(_ev(e) for e in d["evidence"])
    history = tuple(_ch(c) for c in d["history"])
    if d["kind"] == "action":
        return ActionItem(d["id"], d["task"], d["owner"],
                          dt.date.fromisoformat(d["due"]) if d["due"] else None, d["status"],
                          float(d["time"]), evidence, history, d["due_text"], d["source"])
    return Proposal(d["id"], d["text"], d["by"], float(d["time"]), evidence, d["status"],
                    history, d["source"])


# --------------------------------------------------------------------------- loading


@dataclass(frozen=True)
class SeriesItem:
    """One item of a series as the latest meeting that touched it left it."""

    id: str
    kind: str  # action | proposal
    text: str
    owner: str | None
    due: dt.date | None
    status: str
    origin: str  # the meeting that raised it: date and title
    last: str  # the latest meeting that recorded it
    item: ActionItem | Proposal


@dataclass(frozen=True)
class Carried:
    """What a series carries into one meeting: the initial ledger and how to map ids back."""

    ledger: Ledger  # the pipeline's ``initial``: carried items under ids A1.., P1..
    items: dict[str, ActionItem | Proposal]  # series id -> the item as loaded into the ledger
    next_number: dict[str, int]  # "A" / "P" -> the first free series number
    digest: str  # SHA-256 of the input file
    identity: str
    later: int = 0  # meetings saved after this one (a rerun of an earlier meeting)


def _number(item_id: str) -> int:
    m = _SID.match(item_id)
    return int(m.group(2)) if m else 0


def _rows(conn: sqlite3.Connection, before: Iterable[int] | None) -> list[SeriesItem]:
    """Return the latest state of every item over the meetings ``before`` (all when None)."""
    meetings = conn.execute("SELECT seq, date, clock, title FROM meeting").fetchall()
    order = {seq: _order(date, clock, seq) for seq, date, clock, _ in meetings}
    names = {seq: " ".join(x for x in (date or "", title) if x)
             for seq, date, _, title in meetings}
    allowed = set(order) if before is None else set(before)
    latest: dict[str, tuple[tuple[int, str, str, int], SeriesItem]] = {}
    for seq, sid, kind, status, owner, due, text, origin, record in conn.execute(
            "SELECT meeting, id, kind, status, owner, due, text, origin, record FROM item"):
        if seq not in allowed:
            continue
        key = order[seq]
        if sid in latest and latest[sid][0] >= key:
            continue
        item = from_record(json.loads(record))
        latest[sid] = (key, SeriesItem(sid, kind, text, owner,
                                       dt.date.fromisoformat(due) if due else None, status,
                                       origin, names[seq], item))
    return sorted((v for _, v in latest.values()), key=lambda s: (s.kind, _number(s.id)))


def _before(conn: sqlite3.Connection, info: MeetingInfo, ident: str) -> tuple[list[int], int]:
    """Return the meetings that come before this one, and how many are saved after it."""
    rows = conn.execute("SELECT seq, identity, date, clock FROM meeting").fetchall()
    own = next((seq for seq, i, _, _ in rows if i == ident), None)
    date = info.date.isoformat() if info.date else None
    clock = info.start_clock.strftime("%H:%M") if info.start_clock else None
    me = _order(date, clock, own if own is not None else 1 << 62)
    before = [seq for seq, i, d, c in rows if i != ident and _order(d, c, seq) < me]
    return before, len(rows) - len(before) - (own is not None)


def _carried_change(sid: str, item: ActionItem | Proposal, origin: str) -> Change:
    evidence = item.evidence[0] if item.evidence else Evidence(0, None, item.time, item.time,
                                                               "", "")
    return Change("carried", f"{sid} from {origin}", evidence, source="series")


def load(path: Path, info: MeetingInfo, digest: str) -> Carried:
    """Return the items the meetings before this one leave open, as an initial ledger."""
    ident = identity(info, digest)
    if not path.exists():  # the first meeting of a series: ``save`` creates the file
        if not path.parent.is_dir():
            raise OutputError(f"{path}: the folder {path.parent} does not exist")
        return Carried(Ledger(), {}, {"A": 1, "P": 1}, digest, ident)
    conn = connect(path, create=False)
    try:
        before, later = _before(conn, info, ident)
        state = _rows(conn, before)
    finally:
        conn.close()
    items: dict[str, ActionItem | Proposal] = {}
    actions: list[ActionItem] = []
    proposals: list[Proposal] = []
    top = {"A": 0, "P": 0}
    for s in state:
        top[s.id[0]] = max(top[s.id[0]], _number(s.id))
        if s.status not in OPEN[s.kind]:
            continue
        history = s.item.history + (_carried_change(s.id, s.item, s.origin),)
        if isinstance(s.item, ActionItem):
            loaded: ActionItem | Proposal = replace(
                s.item, id=f"A{len(actions) + 1}", status="open", history=history,
                source="series")
            actions.append(loaded)  # type: ignore[arg-type]
        else:
            loaded = replace(s.item, id=f"P{len(proposals) + 1}", status="pending",
                             history=history, source="series")
            proposals.append(loaded)
        items[s.id] = loaded
    return Carried(Ledger(actions=tuple(actions), proposals=tuple(proposals)), items,
                   {"A": top["A"] + 1, "P": top["P"] + 1}, digest, ident, later)


def open_items(path: Path) -> list[SeriesItem]:
    """Return the items of a series still open after its latest meeting."""
    conn = connect(path, create=False)
    try:
        return [s for s in _rows(conn, None) if s.status in OPEN[s.kind]]
    finally:
        conn.close()


# --------------------------------------------------------------------------- after the draft


def series_id(item: ActionItem | Proposal) -> str | None:
    """Return the series id a carried item came in with, or None for a new item."""
    ids = [m.group(0) for c in item.history
           if c.kind == "carried" and c.source == "series" and (m := _SID.match(c.value or ""))]
    return min(ids, key=_number) if ids else None


def _canonical(final: ActionItem | Proposal, loaded: ActionItem | Proposal,
               sid: str) -> ActionItem | Proposal:
    """Return a carried item with its series id and its history in meeting order."""
    # The final pass sorts merged histories by time, which mixes two meetings' clocks:
    # put this meeting's changes after the ones the item came in with.
    here = sorted((c for c in final.history if c not in loaded.history),
                  key=lambda c: c.evidence.start)
    evidence = loaded.evidence + tuple(e for e in final.evidence if e not in loaded.evidence)
    return replace(final, id=sid, history=loaded.history + tuple(here), evidence=evidence,
                   source="series", time=loaded.time)


def settle(minutes: Minutes, carried: Carried) -> Minutes:
    """Return the minutes with series ids: carried items first, new ones numbered after."""
    ledger = minutes.ledger
    nxt = dict(carried.next_number)
    old_new: dict[str, str] = {}  # ledger proposal id -> series id, for Decision.proposal

    def renumber(items: Sequence[Any], prefix: str) -> tuple[Any, ...]:
        kept: dict[str, Any] = {}
        new: list[Any] = []
        for item in items:
            sid = series_id(item)
            if sid is not None and sid in carried.items and sid not in kept:
                kept[sid] = _canonical(item, carried.items[sid], sid)
                old_new[item.id] = sid
            else:
                new.append(item)
        out = [kept[s] for s in sorted(kept, key=_number)]
        for item in sorted(new, key=lambda i: i.time):
            sid = f"{prefix}{nxt[prefix]}"
            nxt[prefix] += 1
            old_new[item.id] = sid
            out.append(replace(item, id=sid))
        return tuple(out)

    actions = renumber(ledger.actions, "A")
    old_new.clear()
    proposals = renumber(ledger.proposals, "P")
    decisions = tuple(replace(d, proposal=old_new.get(d.proposal, d.proposal))
                      if d.proposal else d for d in ledger.decisions)
    return replace(minutes, ledger=replace(ledger, actions=actions, proposals=proposals,
                                           decisions=decisions))


def changes_here(item: ActionItem | Proposal) -> tuple[Change, ...]:
    """Return the changes a carried item took in this meeting (after its last carried mark)."""
    marks = [n for n, c in enumerate(item.history) if c.kind == "carried" and c.source == "series"]
    return item.history[marks[-1] + 1:] if marks else ()


def origin_of(item: ActionItem | Proposal) -> str:
    """Return the meeting a carried item was raised in, as its carried mark says."""
    for c in item.history:
        if c.kind == "carried" and c.source == "series" and c.value and " from " in c.value:
            return c.value.split(" from ", 1)[1]
    return ""


def _series_status(item: ActionItem | Proposal, carried_in: bool) -> str:
    if isinstance(item, ActionItem):
        return item.status
    if item.status == "lapsed" and all(c.kind == "lapsed" for c in (
            changes_here(item) if carried_in else item.history[-1:])):
        # the final pass lapses what is pending at the end: carried once, then it lapses
        return "lapsed" if carried_in else "pending"
    return item.status


# --------------------------------------------------------------------------- saving


def _crash_after() -> int | None:
    value = os.environ.get(CRASH_ENV)
    return int(value) if value else None


def save(path: Path, minutes: Minutes, carried: Carried) -> tuple[str, ...]:
    """Store this meeting's outcome in one transaction; return notes for the user."""
    info = minutes.meeting
    ident = identity(info, carried.digest)
    here = label(info) or Path(minutes.source).name
    rows: list[tuple[Any, ...]] = []
    seen: set[str] = set()
    everything: list[ActionItem | Proposal] = [*minutes.ledger.actions, *minutes.ledger.proposals]
    for item in everything:
        kind = "action" if isinstance(item, ActionItem) else "proposal"
        carried_in = item.id in carried.items and series_id(item) == item.id
        rows.append(_row(item, kind, carried_in, origin_of(item) if carried_in else here))
        seen.add(item.id)
    for sid, loaded in carried.items.items():  # carried items the final pass merged away
        if sid not in seen:
            back = replace(loaded, id=sid)
            kind = "action" if isinstance(back, ActionItem) else "proposal"
            rows.append(_row(back, kind, True, origin_of(back)))
    crash = _crash_after()
    conn = connect(path, create=True)
    try:
        conn.execute("BEGIN IMMEDIATE")
        try:
            conn.execute(
                "INSERT INTO meeting (identity, date, clock, title, source, input_sha256, "
                "saved_at) VALUES (?, ?, ?, ?, ?, ?, ?) ON CONFLICT(identity) DO UPDATE SET "
                "date = excluded.date, clock = excluded.clock, title = excluded.title, "
                "source = excluded.source, input_sha256 = excluded.input_sha256, "
                "saved_at = excluded.saved_at",
                (ident, info.date.isoformat() if info.date else None,
                 info.start_clock.strftime("%H:%M") if info.start_clock else None,
                 info.title, Path(minutes.source).name, carried.digest,
                 dt.datetime.now(dt.UTC).isoformat(timespec="seconds")))
            seq = conn.execute("SELECT seq FROM meeting WHERE identity = ?",
                               (ident,)).fetchone()[0]
            conn.execute("DELETE FROM item WHERE meeting = ?", (seq,))  # a rerun replaces
            for n, row in enumerate(rows):
                if crash is not None and n >= crash:
                    os._exit(70)
                conn.execute("INSERT INTO item (meeting, id, kind, raised, status, owner, due, "
                             "text, origin, record) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
                             (seq, *row))
            conn.execute("COMMIT")
        except BaseException:
            conn.execute("ROLLBACK")
            raise
    except sqlite3.Error as exc:
        raise OutputError(f"{path}: cannot save the meeting to the series ({exc})") from exc
    finally:
        conn.close()
    notes = []
    if carried.later:
        notes.append(f"{carried.later} meeting(s) saved after this one in {path.name} were "
                     "drafted from its earlier record; draft them again, in order, to bring "
                     "them up to date")
    return tuple(notes)


def _row(item: ActionItem | Proposal, kind: str, carried_in: bool,
         origin: str) -> tuple[Any, ...]:
    status = _series_status(item, carried_in)
    if isinstance(item, ActionItem):
        text, owner, due = item.task, item.owner, item.due.isoformat() if item.due else None
    else:
        text, owner, due = item.text, item.by, None
    return (item.id, kind, 0 if carried_in else 1, status, owner, due, text, origin,
            json.dumps(to_record(item), ensure_ascii=False))


# --------------------------------------------------------------------------- listing


def _by_owner(items: Sequence[SeriesItem]) -> list[tuple[str, list[SeriesItem]]]:
    groups: dict[str, list[SeriesItem]] = {}
    for s in items:
        groups.setdefault(s.owner or "", []).append(s)
    out = []
    for owner in sorted(groups, key=lambda o: (o == "", o.casefold())):
        rows = sorted(groups[owner], key=lambda s: (s.due is None, s.due or dt.date.max,
                                                    _number(s.id)))
        out.append((owner, rows))
    return out


def _last_change(s: SeriesItem) -> str:
    for c in reversed(s.item.history):
        if c.kind not in ("carried", "lapsed"):
            if c.kind == "created":
                return "raised"
            return c.kind + (f": {c.value}" if c.value else "")
    return ""


def items_markdown(items: Sequence[SeriesItem], title: str) -> bytes:
    """Return open actions grouped by owner (then by due date), and hanging proposals."""
    from .render.blocks import Document, Heading, Table, para
    from .render.markdown import write_markdown
    from .render.text import DASH

    actions = [s for s in items if s.kind == "action"]
    proposals = [s for s in items if s.kind == "proposal"]
    blocks: list[Any] = [Heading(0, f"Open items: {title}")]
    if not actions:
        blocks.append(para("No open action items."))
    for owner, rows in _by_owner(actions):
        blocks.append(Heading(1, owner or "No owner named"))
        blocks.append(Table(("No.", "Action", "Due", "Raised", "Last recorded", "Latest change"),
                            tuple((s.id, s.text, s.due.isoformat() if s.due else DASH,
                                   s.origin, s.last, _last_change(s) or DASH) for s in rows)))
    if proposals:
        blocks.append(Heading(1, "Proposals still open"))
        blocks.append(Table(("No.", "Proposal", "Put by", "Raised"),
                            tuple((s.id, s.text, s.owner or DASH, s.origin)
                                  for s in proposals)))
    return write_markdown(Document(title=title, blocks=tuple(blocks), footer=""))


ITEMS_CSV_HEADER = ("No.", "Owner", "Action", "Due", "Status", "Raised", "Last recorded")


def items_csv(items: Sequence[SeriesItem]) -> bytes:
    """Return open actions as CSV (RFC 4180, UTF-8), by owner and due date, formula-safe."""
    import csv
    import io

    from .render.text import csv_safe

    out = io.StringIO()
    writer = csv.writer(out, quoting=csv.QUOTE_MINIMAL, lineterminator="\r\n")
    writer.writerow(ITEMS_CSV_HEADER)
    for owner, rows in _by_owner([s for s in items if s.kind == "action"]):
        for s in rows:
            writer.writerow([csv_safe(x) for x in (
                s.id, owner, s.text, s.due.isoformat() if s.due else "", s.status, s.origin,
                s.last)])
    return out.getvalue().encode("utf-8")

