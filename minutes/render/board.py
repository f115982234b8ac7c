"""The board template: formal minutes, a record of what was done rather than what was said.

What goes in follows Robert's Rules of Order Revised (1915, public domain), section 60
"The Minutes": the kind of meeting, the name of the assembly, date and place, the
presence of the chairman and secretary, whether the previous minutes were approved, the
main motions, and the hours of meeting and adjournment; "generally the name is recorded
of the member who introduced a main motion, but not of the seconder". So the seconder is
named only where the body's rules ask for it (``Roster.record_seconder``). Section 60
leaves withdrawn main motions out; this draft keeps them, marked withdrawn, so the clerk
sees everything and strikes what the body's practice omits.
"""

from __future__ import annotations

import re

from ..model import Event, Minutes, Motion, Segment
from .blocks import Block, Bullets, Document, Heading, Span, bold, italic, line, lit, para
from .parts import (
    action_table,
    closing,
    created,
    fact,
    motion_table,
    names,
    owning_segment,
    plain_list,
    question_list,
    section,
    source_name,
    status_line,
)
from .text import (
    DASH,
    clean,
    clock,
    day,
    outcome_text,
    roll_call_text,
    span,
    vote_text,
    voted,
    wall,
)

_SAFE_NUMBER = re.compile(r"^[0-9A-Za-z]{1,6}(\.[0-9A-Za-z]{1,6})*$")


def _officer(minutes: Minutes, office: str) -> str:
    if minutes.roster:
        for role, name in minutes.roster.officers:
            if role == office:
                return name
    for a in minutes.attendees:
        if a.role == office:
            return a.name
    return ""


def _when(event: Event) -> str:
    """Return an event's clock time, or its recording offset when no clock was given."""
    if event.clock is not None:
        return wall(event.clock)
    return f"{clock(event.time)} into the recording"


def _events(minutes: Minutes, kind: str) -> list[Event]:
    return [e for e in minutes.ledger.events if e.kind == kind]


def title_of(minutes: Minutes) -> str:
    """Return the title: the meeting's own, else "Minutes of the <kind> of the <body>"."""
    m = minutes.meeting
    if m.title:
        return m.title
    kind = m.kind or "meeting"
    return f"Minutes of the {kind} of the {m.body}" if m.body else f"Minutes of the {kind}"


def _opening(minutes: Minutes) -> Block:
    m = minutes.meeting
    kind = m.kind or "meeting"
    article = "An" if kind[:1].lower() in "aeiou" else "A"
    spans: list[Span | str] = [lit(f"{article} "), kind, lit(" of the "),
                               m.body or "body (not named)"]
    spans += [lit(" was held on "), day(m.date) if m.date else "a date not given"]
    if m.place:
        spans += [lit(" at "), m.place]
    spans.append(lit(". "))
    calls = _events(minutes, "call_to_order")
    chair = _officer(minutes, "chair")
    presiding = chair + ", chair" if chair else "the presiding officer (clerk to name)"
    if calls:
        spans += [lit(f"The meeting was called to order at {_when(calls[0])} by "), presiding,
                  lit(".")]
    else:
        spans += [lit("The call to order was not found in the recording — clerk to complete. "
                      "The chair was "), presiding, lit(".")]
    secretary = _officer(minutes, "secretary")
    spans += [lit(" "), secretary or "The secretary (clerk to name)", lit(" was secretary.")]
    return para(*spans)


def _attendance(minutes: Minutes) -> list[Block]:
    people = minutes.attendees
    members_in = [a.name for a in people if a.kind == "member" and a.present]
    members_out = [a.name for a in people if a.kind == "member" and not a.present]
    staff = [f"{a.name} ({a.role})" if a.role and a.role != "staff" else a.name
             for a in people if a.kind == "staff" and a.present]
    guests = [a.name for a in people if a.kind == "guest" and a.present]
    # Public commenters count as public present even when no attendance list names them.
    public = list(dict.fromkeys(
        [a.name for a in people if a.kind == "public" and a.present]
        + [clean(e.detail) for e in _events(minutes, "public_comment") if clean(e.detail)]))
    facts = [fact("Members present", names(members_in)),
             fact("Members absent", names(members_out)),
             fact("Staff", names(staff))]
    if guests:
        facts.append(fact("Guests", names(guests)))
    facts.append(fact("Public", names(public)))
    if minutes.unknown_speakers:
        facts.append(fact("Speakers not identified", names(minutes.unknown_speakers)))
    out: list[Block] = [section("Attendance"), Bullets(tuple(facts))]
    for e in _events(minutes, "roll_call"):
        out.append(para(lit(f"The roll was called at {_when(e)}: "), e.detail or DASH, lit(".")))
    return out


def _quorum(minutes: Minutes) -> list[Block]:
    q = minutes.quorum
    if q is None:
        return [section("Quorum"), para("Quorum not determined — clerk to complete.")]
    verdict = "A quorum was present." if q.met else "A quorum was NOT present."
    return [section("Quorum"), para(
        lit(f"{q.present} of {q.members} voting members were present; {q.required} are "
            "required ("), q.rule, lit(f"). {verdict}"))]


def _previous_minutes(minutes: Minutes) -> list[Block]:
    events = _events(minutes, "minutes_approved")
    out: list[Block] = [section("Approval of the previous minutes")]
    if not events:
        out.append(para("No approval of the previous minutes was found in the recording."))
    for e in events:
        detail = clean(e.detail) or "(how: clerk to complete)"
        out.append(para(lit("The minutes of the previous meeting were approved "), detail,
                        lit(f". [{clock(e.time)}]")))
    return out


def _reports(minutes: Minutes) -> list[Block]:
    events = _events(minutes, "report")
    if not events:
        return []
    return [section("Reports received"), Bullets(tuple(
        line(lit(f"[{clock(e.time)}] "), e.detail or "Report (title not heard)")
        for e in events))]


def _public_comment(minutes: Minutes) -> list[Block]:
    events = _events(minutes, "public_comment")
    if not events:
        return []
    return [section("Public comment"),
            para("Members of the public addressed the body (speakers listed, not quoted):"),
            Bullets(tuple(line(lit(f"[{clock(e.time)}] "), e.detail or "name not heard")
                          for e in events))]


# --------------------------------------------------------------------------- motions


def _motion_blocks(m: Motion, minutes: Minutes, as_amended: bool) -> list[Block]:
    record = bool(minutes.roster and minutes.roster.record_seconder)
    if m.amends:
        label = f"Amendment {m.id} (to {m.amends})"
    elif as_amended:
        label = f"Motion {m.id}, as amended"
    else:
        label = f"Motion {m.id}"
    spans: list[Span | str] = [bold(label), lit(f" [{clock(m.time)}] — moved by "),
                               m.mover or "mover not heard"]
    if m.seconder is None:
        spans.append(lit(" (no second heard)"))
    elif record:
        spans += [lit(", seconded by "), m.seconder]
    spans += [lit(": "), m.text]
    out: list[Block] = [para(*spans)]
    result = []
    if voted(m):
        result.append(f"Vote: {vote_text(m.vote)}.")
    if m.vote.roll_call:
        result.append(f"Roll call — {roll_call_text(m.vote)}.")
    subject = "The amendment" if m.amends else ("The motion, as amended," if as_amended
                                                 else "The motion")
    result.append(f"{subject} {_outcome_phrase(m)}.")
    out.append(para(" ".join(result)))
    for flag in m.flags:
        out.append(para(italic(f"[Clerk: {clean(flag)}]")))
    return out


def _outcome_phrase(m: Motion) -> str:
    verb = {"carried": "", "failed": "", "pending": "is "}.get(m.outcome, "was ")
    return verb + outcome_text(m)


def _ordered(motions: list[Motion], all_motions: tuple[Motion, ...]) -> list[tuple[Motion, bool]]:
    """Return motions with their amendments first, each with whether it reads "as amended"."""
    children: dict[str, list[Motion]] = {}
    for m in all_motions:
        if m.amends:
            children.setdefault(m.amends, []).append(m)
    ids = {m.id for m in all_motions}
    out: list[tuple[Motion, bool]] = []
    seen: set[str] = set()

    def visit(m: Motion) -> None:
        if m.id in seen:
            return
        seen.add(m.id)
        kids = children.get(m.id, [])
        for kid in kids:
            visit(kid)
        out.append((m, any(k.outcome == "carried" for k in kids)))

    for m in motions:
        # An amendment is written with the motion it amends, wherever that one falls.
        if m.amends and m.amends in ids:
            continue
        visit(m)
    return out


def _number(minutes: Minutes, seg: Segment, n: int) -> str:
    agenda = minutes.meeting.agenda
    if seg.agenda_item is not None and 0 <= seg.agenda_item < len(agenda):
        number = agenda[seg.agenda_item].number.strip().rstrip(".")
        if _SAFE_NUMBER.match(number):
            return f"Item {number}:"
    return f"{n}."


def _record(minutes: Minutes) -> list[Block]:
    ledger = minutes.ledger
    out: list[Block] = [section("Record of business")]
    if not minutes.segments:
        out.append(para("No business was found in the recording."))
        return out
    by_segment: dict[int, list[Motion]] = {}
    for m in ledger.motions:
        by_segment.setdefault(owning_segment(minutes.segments, m.time), []).append(m)
    decisions: dict[int, list] = {}
    for d in ledger.decisions:
        decisions.setdefault(owning_segment(minutes.segments, d.time), []).append(d)
    recesses: dict[int, list[Event]] = {}
    for e in _events(minutes, "recess"):
        recesses.setdefault(owning_segment(minutes.segments, e.time), []).append(e)
    written: set[str] = set()
    for pos, seg in enumerate(minutes.segments):
        out.append(Heading(2, f"{seg.title or 'Untitled item'} ({span(seg.start, seg.end)})",
                           number=_number(minutes, seg, pos + 1)))
        body: list[Block] = []
        for motion, amended in _ordered(by_segment.get(pos, []), ledger.motions):
            if motion.id not in written:
                written.add(motion.id)
                body += _motion_blocks(motion, minutes, amended)
        if decisions.get(pos):
            body.append(Bullets(tuple(
                line(lit(f"{d.id} [{clock(d.time)}] Agreed: "), d.text) for d in decisions[pos])))
        for e in recesses.get(pos, []):
            body.append(para(lit(f"The meeting recessed at {_when(e)}"),
                             *((lit(" ("), e.detail, lit(")")) if e.detail else ()), lit(".")))
        out += body or [para("Discussed; no motion or decision was recorded.")]
    return out


def _adjournment(minutes: Minutes) -> list[Block]:
    events = _events(minutes, "adjournment")
    if not events:
        return [section("Adjournment"),
                para("The adjournment was not found in the recording — clerk to complete.")]
    return [section("Adjournment"),
            para(f"The meeting was adjourned at {_when(events[-1])}.")]


def _signature(minutes: Minutes) -> list[Block]:
    secretary = _officer(minutes, "secretary")
    approved = minutes.approved_on.isoformat() if minutes.approved_on else "____________"
    return [para("Respectfully submitted,"),
            para(lit("Signed: ______________________________")),
            para(secretary, lit(", Secretary")) if secretary else para(lit("Secretary")),
            para(lit(f"Approved on {approved}"))]


def build_board(minutes: Minutes) -> Document:
    """Return the board template's document for ``minutes``."""
    ledger = minutes.ledger
    title = title_of(minutes)
    blocks: list[Block] = [Heading(0, title), para(italic(status_line(minutes))),
                           _opening(minutes)]
    if minutes.source:
        blocks.append(para(italic("Drafted from " + source_name(minutes.source))))
    blocks += _attendance(minutes)
    blocks += _quorum(minutes)
    blocks += _previous_minutes(minutes)
    blocks += _reports(minutes)
    blocks += _public_comment(minutes)
    blocks += _record(minutes)
    if minutes.not_discussed:
        blocks += [section("Agenda items not taken up"), plain_list(minutes.not_discussed)]
    if ledger.motions:
        record = bool(minutes.roster and minutes.roster.record_seconder)
        blocks += [section("Motion register"), motion_table(ledger.motions, record)]
    if ledger.actions:
        blocks += [section("Action items"), action_table(ledger.actions)]
    if ledger.open_questions:
        blocks += [section("Open questions"), question_list(ledger.open_questions)]
    blocks += _adjournment(minutes)
    blocks += _signature(minutes)
    if minutes.notes:
        blocks += [section("Notes for the clerk"), plain_list(minutes.notes)]
    blocks += closing(minutes)
    return Document(title=title, blocks=tuple(blocks), footer=status_line(minutes),
                    subject=minutes.meeting.body, created=created(minutes))
