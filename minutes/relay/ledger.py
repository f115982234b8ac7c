"""The ledger fold: readers propose operations, ``apply`` carries them out.

A reader looks at (ledger, segment) and returns operations: ``Add`` a new item,
or ``Update`` a carried one with a ``Change`` that holds its evidence. ``apply``
is the only code that builds new ledgers, so every reader (rules, language
model, a series loaded from disk) changes items the same way, and a run can be
replayed from its recorded operations alone.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field, replace
from typing import Protocol, cast

from ..model import (
    ActionItem,
    ActionStatus,
    Change,
    Decision,
    Event,
    Ledger,
    Motion,
    Proposal,
    ProposalStatus,
    Question,
    Segment,
    Vote,
)

Tracked = ActionItem | Decision | Proposal | Motion | Question  # items with ids and history
Item = Tracked | Event

PREFIX: dict[type, str] = {
    ActionItem: "A", Decision: "D", Proposal: "P", Motion: "M", Question: "Q"
}
FIELD: dict[type, str] = {
    ActionItem: "actions",
    Decision: "decisions",
    Proposal: "proposals",
    Motion: "motions",
    Question: "questions",
    Event: "events",
}


@dataclass(frozen=True)
class Add:
    """Add a new item; an empty ``id`` is assigned by ``apply`` (A1, D1, P1, M1, Q1)."""

    item: Item


@dataclass(frozen=True)
class Update:
    """Change a carried item, named by id. ``vote`` goes with ``change.kind == "vote"``."""

    target: str
    change: Change
    vote: Vote | None = None


Op = Add | Update


class SegmentReader(Protocol):
    """A reader of one segment: proposes operations given the ledger so far."""

    @property
    def name(self) -> str:
        """Return the reader's name, recorded with each step (e.g. "rules", "llm")."""
        ...

    def read(self, ledger: Ledger, segment: Segment) -> Sequence[Op]:
        """Return the operations this segment supports."""
        ...


@dataclass(frozen=True)
class StepRecord:
    """What one relay step proposed and what ``apply`` refused."""

    segment: int
    reader: str
    ops: tuple[Op, ...]
    rejected: tuple[str, ...] = ()


@dataclass(frozen=True)
class RelayResult:
    """The final ledger and the record of every step that built it."""

    ledger: Ledger
    steps: tuple[StepRecord, ...] = field(default=())


def next_id(ledger: Ledger, kind: type) -> str:
    """Return the next free id for items of ``kind``: one past the highest number in use.

    Counting would do within one meeting, but items carried in from a series keep
    their own numbers, and a dropped item must never give its id to a new one.
    """
    prefix = PREFIX[kind]
    used = [int(item.id[len(prefix):]) for item in getattr(ledger, FIELD[kind])
            if item.id.startswith(prefix) and item.id[len(prefix):].isdigit()]
    return f"{prefix}{max(used, default=0) + 1}"


def find(ledger: Ledger, item_id: str) -> Tracked | None:
    """Return the item with ``item_id``, or None."""
    for name in ("actions", "decisions", "proposals", "motions", "questions"):
        for item in getattr(ledger, name):
            if item.id == item_id:
                return item
    return None


def _put(ledger: Ledger, item: Item) -> Ledger:
    name = FIELD[type(item)]
    items = getattr(ledger, name)
    if isinstance(item, Event):
        return replace(ledger, **{name: items + (item,)})
    for i, old in enumerate(items):
        if old.id == item.id:
            return replace(ledger, **{name: items[:i] + (item,) + items[i + 1 :]})
    return replace(ledger, **{name: items + (item,)})


def _add(ledger: Ledger, item: Item) -> Ledger:
    if not isinstance(item, Event):
        if not item.id:
            item = replace(item, id=next_id(ledger, type(item)))
        if not item.history and item.evidence:
            created = Change("created", None, item.evidence[0], source=item.source)
            item = replace(item, history=(created,))
    return _put(ledger, item)


def _with_evidence(item: Tracked, change: Change) -> Tracked:
    evidence = item.evidence
    if change.evidence not in evidence:
        evidence = evidence + (change.evidence,)
    return replace(item, history=item.history + (change,), evidence=evidence)


def _update(ledger: Ledger, op: Update) -> tuple[Ledger, str | None]:
    """Return the new ledger, or the old one and the reason the update was refused."""
    item = find(ledger, op.target)
    kind, value = op.change.kind, op.change.value
    if item is None:
        return ledger, f"{op.target}: no such item"
    if isinstance(item, ActionItem):
        if kind == "owner":
            item = replace(item, owner=value or None)
        elif kind == "due":
            item = replace(item, due=dt.date.fromisoformat(value) if value else None)
        elif kind == "task" and value:
            item = replace(item, task=value)
        elif kind in ("done", "dropped"):
            item = replace(item, status=cast(ActionStatus, kind))
        elif kind == "reopened":
            item = replace(item, status="open")
        else:
            return ledger, f"{op.target}: an action cannot take {kind!r}"
    elif isinstance(item, Proposal):
        if kind not in ("accepted", "rejected", "lapsed"):
            return ledger, f"{op.target}: a proposal cannot take {kind!r}"
        if item.status != "pending":
            return ledger, f"{op.target}: proposal is already {item.status}"
        item = replace(item, status=cast(ProposalStatus, kind))
        if kind == "accepted":
            decision = Decision(
                id="",
                text=value or item.text,
                time=item.time,
                by=item.by,
                evidence=item.evidence + (op.change.evidence,),
                proposal=item.id,
                source=op.change.source,
            )
            ledger = _add(ledger, decision)
    elif isinstance(item, Question):
        if kind == "answered":
            item = replace(item, answered=True)
        elif kind == "reopened":
            item = replace(item, answered=False)
        else:
            return ledger, f"{op.target}: a question cannot take {kind!r}"
    elif isinstance(item, Motion):
        if kind == "seconded":
            item = replace(item, seconder=value or item.seconder)
        elif kind == "mover" and value:
            item = replace(item, mover=value)
        elif kind == "amended" and value:
            item = replace(item, text=value)
        elif kind == "vote":
            item = replace(item, vote=op.vote or item.vote)
        elif kind == "outcome" and value in OUTCOMES:
            item = replace(item, outcome=value)  # type: ignore[arg-type]
        elif kind in ("withdrawn", "tabled", "postponed", "referred"):
            item = replace(item, outcome=kind)  # type: ignore[arg-type]
        elif kind == "flag" and value:
            item = replace(item, flags=item.flags + (value,))
        else:
            return ledger, f"{op.target}: a motion cannot take {kind!r} = {value!r}"
    elif isinstance(item, Decision):
        if kind == "text" and value:
            item = replace(item, text=value)
        else:
            return ledger, f"{op.target}: a decision cannot take {kind!r}"
    return _put(ledger, _with_evidence(item, op.change)), None


OUTCOMES = ("carried", "failed", "withdrawn", "tabled", "postponed", "referred", "pending")


def apply(ledger: Ledger, ops: Iterable[Op]) -> tuple[Ledger, tuple[str, ...]]:
    """Return the ledger with ``ops`` carried out in order, and the reasons for any refused."""
    rejected: list[str] = []
    for op in ops:
        if isinstance(op, Add):
            ledger = _add(ledger, op.item)
        else:
            try:
                ledger, why = _update(ledger, op)
            except ValueError as exc:  # e.g. a due date that is not ISO
                why = f"{op.target}: {exc}"
            if why:
                rejected.append(why)
    return ledger, tuple(rejected)


def step(ledger: Ledger, segment: Segment, reader: SegmentReader) -> Ledger:
    """Return the ledger after ``reader`` has read ``segment``."""
    return apply(ledger, reader.read(ledger, segment))[0]


def relay(
    segments: Sequence[Segment], reader: SegmentReader, ledger: Ledger | None = None
) -> RelayResult:
    """Fold ``step`` over the segments in order, recording each step's operations."""
    ledger = ledger or Ledger()
    records = []
    for segment in segments:
        ops = tuple(reader.read(ledger, segment))
        ledger, rejected = apply(ledger, ops)
        records.append(StepRecord(segment.index, reader.name, ops, rejected))
    return RelayResult(ledger, tuple(records))


def replay(steps: Iterable[StepRecord], ledger: Ledger | None = None) -> Ledger:
    """Return the ledger rebuilt from recorded steps alone, without any reader."""
    ledger = ledger or Ledger()
    for record in steps:
        ledger = apply(ledger, record.ops)[0]
    return ledger
