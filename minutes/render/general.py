"""The general template: minutes of a working meeting (project call, committee, team)."""

from __future__ import annotations

from ..model import Minutes
from .blocks import Block, Bullets, Document, Heading, italic, line, lit, para
from .parts import (
    action_table,
    carried_table,
    closing,
    created,
    decision_table,
    fact,
    is_carried,
    meeting_time,
    motion_table,
    names,
    person,
    plain_list,
    question_list,
    section,
    source_name,
    status_line,
)
from .text import clock, day, or_dash, span


def title_of(minutes: Minutes) -> str:
    """Return the document title: the meeting's own, else one made from body and kind."""
    m = minutes.meeting
    if m.title:
        return m.title
    named = " — ".join(x for x in (m.body, m.kind) if x)
    return f"Minutes: {named}" if named else "Minutes of the meeting"


def _header(minutes: Minutes) -> list[Block]:
    m = minutes.meeting
    facts = []
    if m.body:
        facts.append(fact("Body", m.body))
    if m.kind:
        facts.append(fact("Meeting", m.kind))
    facts.append(fact("Date", day(m.date) if m.date else "not given"))
    facts.append(fact("Time", meeting_time(minutes)))
    if m.place:
        facts.append(fact("Place", m.place))
    facts.append(fact("Present", names([person(a) for a in minutes.attendees if a.present])))
    absent = [person(a) for a in minutes.attendees if not a.present]
    if absent:
        facts.append(fact("Absent", names(absent)))
    if minutes.unknown_speakers:
        facts.append(fact("Speakers not identified", names(minutes.unknown_speakers)))
    if minutes.source:
        facts.append(fact("Source", source_name(minutes.source)))
    return [Bullets(tuple(facts))]


def _segments(minutes: Minutes) -> list[Block]:
    out: list[Block] = [section("Discussion")]
    for n, seg in enumerate(minutes.segments, 1):
        out.append(Heading(2, f"{seg.title or 'Untitled part'} ({span(seg.start, seg.end)})",
                           number=f"{n}."))
        if seg.keywords:
            out.append(para(italic("Keywords: " + ", ".join(seg.keywords))))
        if seg.points:
            out.append(Bullets(tuple(
                line(lit(f"[{clock(p.start)}] "), *((p.speaker + ": ",) if p.speaker else ()),
                     p.text) for p in seg.points)))
        else:
            out.append(para("No key points were drawn from this part."))
    return out


def build_general(minutes: Minutes) -> Document:
    """Return the general template's document for ``minutes``."""
    ledger = minutes.ledger
    title = title_of(minutes)
    blocks: list[Block] = [Heading(0, title), para(italic(status_line(minutes)))]
    blocks += _header(minutes)
    if minutes.summary:
        blocks += [section("Summary"), Bullets(tuple(
            line(lit(f"[{clock(p.start)}] "), p.text) for p in minutes.summary))]
    if minutes.segments:
        blocks += _segments(minutes)
    if minutes.not_discussed:
        blocks += [section("Agenda items not discussed"), plain_list(minutes.not_discussed)]
    blocks += [section("Decisions"), decision_table(ledger.decisions)]
    carried = carried_table(minutes)
    if carried is not None:  # a meeting of a series: what became of earlier items
        blocks += [section("Carried from earlier meetings"), carried]
    blocks += [section("Action items"),
               action_table(tuple(a for a in ledger.actions if not is_carried(a)))]
    if ledger.motions:
        record = minutes.roster.record_seconder if minutes.roster else True
        blocks += [section("Motions"), motion_table(ledger.motions, record)]
    if ledger.pending_proposals:
        blocks += [section("Proposals still open"), Bullets(tuple(
            line(lit(f"{p.id} [{clock(p.time)}] "), p.text, f" — put by {or_dash(p.by)}")
            for p in ledger.pending_proposals))]
    if ledger.open_questions:
        blocks += [section("Open questions"), question_list(ledger.open_questions)]
    if minutes.notes:
        blocks += [section("Notes for the clerk"), plain_list(minutes.notes)]
    blocks += closing(minutes)
    return Document(title=title, blocks=tuple(blocks), footer=status_line(minutes),
                    subject=minutes.meeting.body, created=created(minutes))
