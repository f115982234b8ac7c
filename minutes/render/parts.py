"""Sections both templates use: attendance, item tables, questions, notes, the closing."""

from __future__ import annotations

import datetime as dt
import re

from ..model import (
    ActionItem,
    Attendee,
    Change,
    Decision,
    Minutes,
    Motion,
    Proposal,
    Question,
    Segment,
)
from .blocks import Block, Bullets, Heading, Inline, Rule, Table, bold, line, lit, para
from .text import (
    DASH,
    clock,
    cue_of,
    end_clock,
    or_dash,
    outcome_text,
    tally_text,
    voted,
    wall,
)

CAUTIONS = (
    "The person responsible for these minutes (the clerk, secretary or note-taker) must "
    "check them against the recording before they are sent round or approved; until then "
    "they are a draft.",
    "Recording a meeting or an interview can require the consent of everyone present "
    "under local law. Research interviews fall under the consent terms and ethics approval "
    "of their study.",
    "This draft was made offline: no transcript or recording was sent off the machine.",
)

APPROVED = ("The person responsible for these minutes (the clerk or secretary) remains "
            "responsible for their accuracy.")


def status_line(minutes: Minutes) -> str:
    """Return the page-footer line: DRAFT, or the date the body approved the minutes."""
    if minutes.approved_on:
        return f"Approved on {minutes.approved_on.isoformat()}"
    return "DRAFT — not yet approved"


def closing(minutes: Minutes) -> list[Block]:
    """Return the footer blocks: the status line and the cautions."""
    if minutes.approved_on:
        first = para(bold(f"Approved on {minutes.approved_on.isoformat()}."), lit(" "),
                     APPROVED)
    else:
        first = para(bold("DRAFT."), lit(" "), CAUTIONS[0])
    return [Rule(), first, para(CAUTIONS[1]), para(CAUTIONS[2])]


def created(minutes: Minutes) -> dt.datetime | None:
    """Return the meeting's date and start time, for the document's core properties."""
    if minutes.meeting.date is None:
        return None
    start = minutes.meeting.start_clock or dt.time(0, 0)
    return dt.datetime.combine(minutes.meeting.date, start.replace(tzinfo=None))


def source_name(source: str) -> str:
    """Return the file name of the source, never the folders above it."""
    # The draft is sent round; the clerk's folder layout is nobody else's business.
    return re.split(r"[\\/]", source)[-1] if source else ""


def person(a: Attendee) -> str:
    """Return an attendee as ``Name (role)``."""
    return f"{a.name} ({a.role})" if a.role else a.name


def names(people: list[str] | tuple[str, ...]) -> str:
    """Return names joined with commas, or a dash when there are none."""
    return ", ".join(people) if people else DASH


def meeting_time(minutes: Minutes) -> str:
    """Return the meeting's clock time range (when known) and its recorded length."""
    length = f"{clock(minutes.duration)} recorded"
    start = minutes.meeting.start_clock
    if start is None:
        return length
    return f"{wall(start)}–{wall(end_clock(start, minutes.duration))} ({length})"


def owning_segment(segments: tuple[Segment, ...], time: float) -> int:
    """Return the position of the segment a moment falls in (the last one starting before)."""
    # Gaps between segments and items timed before the first segment still land somewhere.
    pos = 0
    for i, seg in enumerate(segments):
        if seg.start <= time:
            pos = i
    return pos


# --------------------------------------------------------------------------- tables


def due_text(item: ActionItem) -> str:
    """Return the due date in ISO form, or the phrase as spoken when it did not resolve."""
    if item.due:
        return item.due.isoformat()
    if item.due_text:
        return f"“{item.due_text}” (date not resolved)"
    return DASH


def decision_table(decisions: tuple[Decision, ...]) -> Block:
    """Return the decisions table, or a sentence saying there were none."""
    if not decisions:
        return para("No decisions were recorded.")
    return Table(("No.", "Decision", "By", "Time", "Cue"),
                 tuple((d.id, d.text, or_dash(d.by), clock(d.time), cue_of(d.evidence))
                       for d in decisions))


def action_table(actions: tuple[ActionItem, ...]) -> Block:
    """Return the action table, or a sentence saying there were none."""
    if not actions:
        return para("No action items were recorded.")
    return Table(("No.", "Action", "Owner", "Due", "Status", "Time", "Cue"),
                 tuple((a.id, a.task, or_dash(a.owner), due_text(a), a.status, clock(a.time),
                        cue_of(a.evidence)) for a in actions))


def is_carried(item: ActionItem | Proposal) -> bool:
    """Return whether an item came in from an earlier meeting of a series."""
    return item.source == "series"


def _here(item: ActionItem | Proposal) -> tuple[Change, ...]:
    # A series marks where an item entered this meeting with a "carried" change
    # (minutes/series.py); what follows the last mark happened in this meeting.
    from ..series import changes_here

    # the final pass lapses every proposal still pending at the end: not a change said here
    return tuple(c for c in changes_here(item) if c.kind != "lapsed")


_CHANGE_WORDS = {"created": "mentioned again", "done": "done", "dropped": "dropped",
                 "reopened": "reopened", "accepted": "agreed", "rejected": "rejected",
                 "task": "reworded"}


def _change_text(c: Change) -> str:
    if c.kind in ("owner", "due"):
        return f"{c.kind} → {c.value or DASH}"
    return _CHANGE_WORDS.get(c.kind, c.kind)


def carried_table(minutes: Minutes) -> Block | None:
    """Return the table of items carried from earlier meetings, or None when there are none."""
    from ..series import origin_of

    items: list[ActionItem | Proposal] = [
        *(a for a in minutes.ledger.actions if is_carried(a)),
        *(p for p in minutes.ledger.proposals if is_carried(p))]
    if not items:
        return None
    rows = []
    for item in items:
        here = _here(item)
        last = here[-1].evidence if here else None
        if isinstance(item, ActionItem):
            text, owner, due = item.task, or_dash(item.owner), due_text(item)
            status: str = item.status
        else:
            text, owner, due = item.text, or_dash(item.by), DASH
            # a carried proposal nobody took up lapses for good (minutes/series.py)
            status = "lapsed (not taken up)" if item.status == "lapsed" else item.status
        origin = origin_of(item)
        if re.match(r"\d{4}-\d\d-\d\d ", origin):  # "2026-11-04 Weekly call": the date says it
            origin = origin.split(" ", 1)[0]
        rows.append((item.id, text, or_dash(origin), owner, due, status,
                     "; ".join(_change_text(c) for c in here) or "not discussed",
                     f"“{last.quote}”" if last and last.quote else DASH,
                     clock(last.start) if last else DASH,
                     (last.cue or DASH) if last else DASH))
    return Table(("No.", "Item", "Raised", "Owner", "Due", "Status", "What changed here",
                  "Said", "Time", "Cue"), tuple(rows))


def seconder_text(motion: Motion, record_names: bool) -> str:
    """Return the seconder's name where the rules record it, else whether one was heard."""
    if motion.seconder is None:
        return "none heard"
    return motion.seconder if record_names else "seconded"


def motion_table(motions: tuple[Motion, ...], record_names: bool) -> Block:
    """Return the motion register: one row per motion with mover, vote and outcome."""
    rows = []
    for m in motions:
        label = m.text if m.amends is None else f"(amendment to {m.amends}) {m.text}"
        vote = tally_text(m.vote) if voted(m) else DASH
        rows.append((m.id, label, or_dash(m.mover), seconder_text(m, record_names), vote,
                     outcome_text(m, short=True), clock(m.time), cue_of(m.evidence)))
    return Table(("No.", "Motion", "Mover", "Seconder", "For / against / abstain", "Outcome",
                  "Time", "Cue"), tuple(rows))


def question_list(questions: tuple[Question, ...]) -> Block:
    """Return open questions as a list with who asked, when, and the cue."""
    return Bullets(tuple(
        line(lit(f"{q.id} [{clock(q.time)}] "), q.text,
             f" — asked by {or_dash(q.asked_by)}, cue {cue_of(q.evidence)}")
        for q in questions))


def plain_list(items: tuple[str, ...]) -> Block:
    """Return a bulleted list of raw strings."""
    return Bullets(tuple(line(item) for item in items))


def fact(label: str, value: str) -> Inline:
    """Return a ``Label: value`` bullet with the label in bold."""
    return line(bold(f"{label}:"), lit(" "), value)


def section(title: str) -> Heading:
    """Return a level-1 section heading."""
    return Heading(1, title)
