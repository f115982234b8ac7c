"""The data model: frozen records that flow one way through the pipeline.

ingest -> Transcript -> segment -> Segment* -> relay (Ledger) -> final -> Minutes -> render

Times are seconds from the start of the recording (floats); dates are
``datetime.date``; clock times are ``datetime.time``. Build variants with
``dataclasses.replace``. Nothing here does I/O.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field
from typing import Literal

ActionStatus = Literal["open", "done", "dropped"]
ProposalStatus = Literal["pending", "accepted", "rejected", "lapsed"]
MotionOutcome = Literal[
    "carried", "failed", "withdrawn", "tabled", "postponed", "referred", "pending"
]


# --------------------------------------------------------------------------- transcript


@dataclass(frozen=True)
class Cue:
    """One caption cue (or recognised speech span) inside an utterance."""

    id: str | None
    start: float
    end: float
    text: str
    line: int | None = None  # 1-based line of the cue's timing line in the source file


@dataclass(frozen=True)
class Utterance:
    """A speaker's turn: consecutive cues of one speaker, merged."""

    index: int
    start: float
    end: float
    speaker: str  # resolved display name, or the label as given when unknown
    text: str
    cues: tuple[Cue, ...] = ()
    label: str = ""  # the speaker label exactly as the source gave it

    def cue_for(self, quote: str) -> Cue | None:
        """Return the cue whose text holds most of ``quote`` (None when no cues)."""
        if not self.cues:
            return None
        if len(self.cues) == 1:
            return self.cues[0]
        needle = _norm(quote)
        for cue in self.cues:
            if needle and needle in _norm(cue.text):
                return cue
        words = set(needle.split())
        return max(self.cues, key=lambda c: len(words & set(_norm(c.text).split())))

    def time_of(self, quote: str) -> tuple[float, float]:
        """Return (start, end) of the cue holding ``quote``, else of the utterance."""
        cue = self.cue_for(quote)
        return (cue.start, cue.end) if cue else (self.start, self.end)


def _norm(text: str) -> str:
    return " ".join("".join(ch.lower() if ch.isalnum() else " " for ch in text).split())


@dataclass(frozen=True)
class AgendaItem:
    """One item of the meeting's agenda, as the meeting file lists it."""

    title: str
    number: str = ""
    notes: str = ""


@dataclass(frozen=True)
class MeetingInfo:
    """What the meeting file (or CLI options) say about the meeting."""

    title: str = ""
    body: str = ""  # the organisation or body meeting, e.g. "Board of Directors"
    kind: str = ""  # e.g. "regular meeting", "weekly project call", "interview"
    date: dt.date | None = None
    place: str = ""
    start_clock: dt.time | None = None  # clock time at 00:00:00 of the recording
    next_meeting: dt.date | None = None
    agenda: tuple[AgendaItem, ...] = ()
    present: tuple[str, ...] = ()  # listed present though they may not speak
    absent: tuple[str, ...] = ()
    template: str = ""  # "" (choose automatically), "general" or "board"


@dataclass(frozen=True)
class Transcript:
    """Ordered utterances of one meeting, with what is known about it."""

    utterances: tuple[Utterance, ...]
    source: str = ""
    format: str = ""  # "vtt", "srt", "txt", "json", "audio"
    meeting: MeetingInfo = field(default_factory=MeetingInfo)
    warnings: tuple[str, ...] = ()

    @property
    def duration(self) -> float:
        """Return the end time of the last utterance (0.0 when empty)."""
        return max((u.end for u in self.utterances), default=0.0)

    @property
    def speakers(self) -> tuple[str, ...]:
        """Return speaker names in order of first appearance."""
        return tuple(dict.fromkeys(u.speaker for u in self.utterances))


# --------------------------------------------------------------------------- people


@dataclass(frozen=True)
class Person:
    """A speaker profile: who a caption label refers to."""

    name: str
    role: str = ""  # chair, secretary, member, staff, participant, interviewer...
    aliases: tuple[str, ...] = ()
    organisation: str = ""
    votes: bool = False
    voice_sample: str = ""  # path to a short recording of this person, if any


@dataclass(frozen=True)
class Roster:
    """A body's membership and rules, for attendance, quorum and votes."""

    body: str = ""
    members: tuple[str, ...] = ()  # names of voting members
    officers: tuple[tuple[str, str], ...] = ()  # (office, name), e.g. ("chair", "Ada Voss")
    quorum: int | None = None  # members needed; None: a majority of the members
    two_thirds: tuple[str, ...] = ()  # kinds of motion that need two-thirds of votes cast
    record_seconder: bool = False


@dataclass(frozen=True)
class Attendee:
    """One line of attendance."""

    name: str
    role: str = ""
    present: bool = True
    kind: str = "member"  # member, staff, guest, public


# --------------------------------------------------------------------------- evidence and ledger


@dataclass(frozen=True)
class Evidence:
    """The moment that supports an item: which utterance, which cue, what was said."""

    utterance: int
    cue: str | None
    start: float
    end: float
    speaker: str
    quote: str


@dataclass(frozen=True)
class Change:
    """One entry of an item's history: what changed, to what, and why we think so."""

    kind: str  # created, owner, due, task, done, dropped, reopened, accepted, rejected,
    # lapsed, answered, seconded, amended, vote, outcome, withdrawn, tabled, referred, flag
    value: str | None
    evidence: Evidence
    source: str = "rules"  # which reader proposed it: "rules", "llm", "series"


@dataclass(frozen=True)
class ActionItem:
    """Somebody owes something, maybe by a date."""

    id: str
    task: str
    owner: str | None
    due: dt.date | None
    status: ActionStatus
    time: float
    evidence: tuple[Evidence, ...]
    history: tuple[Change, ...] = ()
    due_text: str = ""  # the phrase as spoken, e.g. "by Friday"
    source: str = "rules"


@dataclass(frozen=True)
class Proposal:
    """Something put to the group that is not yet agreed or rejected."""

    id: str
    text: str
    by: str
    time: float
    evidence: tuple[Evidence, ...]
    status: ProposalStatus = "pending"
    history: tuple[Change, ...] = ()
    source: str = "rules"


@dataclass(frozen=True)
class Decision:
    """Something the group settled."""

    id: str
    text: str
    time: float
    by: str
    evidence: tuple[Evidence, ...]
    history: tuple[Change, ...] = ()
    proposal: str | None = None  # id of the proposal it settled, if any
    source: str = "rules"


@dataclass(frozen=True)
class Vote:
    """How a motion was voted on. ``None`` counts mean "not heard", never zero."""

    method: str = "none"  # none, voice, count, roll_call, consent
    for_: int | None = None
    against: int | None = None
    abstain: int | None = None
    roll_call: tuple[tuple[str, str], ...] = ()  # (name, "aye" | "no" | "abstain" | "absent")


@dataclass(frozen=True)
class Motion:
    """A formal motion, with everything a clerk records about it."""

    id: str
    text: str
    mover: str
    seconder: str | None
    vote: Vote
    outcome: MotionOutcome
    time: float
    evidence: tuple[Evidence, ...]
    history: tuple[Change, ...] = ()
    amends: str | None = None  # id of the motion this amends
    kind: str = "main"  # main, amendment, postpone, table, refer, approve_minutes, adjourn
    flags: tuple[str, ...] = ()  # notes for the clerk, e.g. tally disagrees with announcement
    source: str = "rules"


@dataclass(frozen=True)
class Question:
    """A question put to the group, open until somebody answers it."""

    id: str
    text: str
    asked_by: str
    answered: bool
    time: float
    evidence: tuple[Evidence, ...]
    history: tuple[Change, ...] = ()
    source: str = "rules"


@dataclass(frozen=True)
class Event:
    """A procedural moment: call to order, roll call, adjournment, report, public comment."""

    kind: str
    time: float
    evidence: tuple[Evidence, ...]
    detail: str = ""
    clock: dt.time | None = None


@dataclass(frozen=True)
class Ledger:
    """The state carried from one segment to the next."""

    actions: tuple[ActionItem, ...] = ()
    decisions: tuple[Decision, ...] = ()
    proposals: tuple[Proposal, ...] = ()
    motions: tuple[Motion, ...] = ()
    questions: tuple[Question, ...] = ()
    events: tuple[Event, ...] = ()

    @property
    def open_actions(self) -> tuple[ActionItem, ...]:
        """Return actions still open."""
        return tuple(a for a in self.actions if a.status == "open")

    @property
    def pending_proposals(self) -> tuple[Proposal, ...]:
        """Return proposals neither agreed nor rejected yet."""
        return tuple(p for p in self.proposals if p.status == "pending")

    @property
    def open_questions(self) -> tuple[Question, ...]:
        """Return questions nobody has answered yet."""
        return tuple(q for q in self.questions if not q.answered)


# --------------------------------------------------------------------------- segments and minutes


@dataclass(frozen=True)
class Point:
    """A key point: a central statement, cleaned of fillers, with its moment."""

    text: str
    start: float
    speaker: str = ""
    utterance: int = 0


@dataclass(frozen=True)
class Segment:
    """A contiguous part of the transcript that one relay step reads."""

    index: int
    first: int  # index of the first utterance (inclusive)
    last: int  # index of the last utterance (inclusive)
    start: float
    end: float
    utterances: tuple[Utterance, ...]
    title: str = ""
    keywords: tuple[str, ...] = ()
    points: tuple[Point, ...] = ()
    agenda_item: int | None = None  # index into MeetingInfo.agenda

    @property
    def words(self) -> int:
        """Return the number of words in the segment."""
        return sum(len(u.text.split()) for u in self.utterances)


@dataclass(frozen=True)
class Quorum:
    """Whether enough voting members were present to do business."""

    present: int  # voting members present
    members: int  # voting members on the roster
    required: int
    met: bool
    rule: str  # where ``required`` comes from, in words


@dataclass(frozen=True)
class Minutes:
    """Everything a renderer needs, and nothing it has to compute."""

    meeting: MeetingInfo
    source: str
    duration: float
    attendees: tuple[Attendee, ...]
    segments: tuple[Segment, ...]
    summary: tuple[Point, ...]
    ledger: Ledger
    utterances: tuple[Utterance, ...]
    template: str = "general"  # "general" or "board"
    unknown_speakers: tuple[str, ...] = ()  # labels no profile resolved
    not_discussed: tuple[str, ...] = ()  # agenda items no segment matched
    notes: tuple[str, ...] = ()  # run notes for the reader of the draft (warnings, counts)
    roster: Roster | None = None
    quorum: Quorum | None = None
    approved_on: dt.date | None = None  # None: this is a DRAFT
