"""The final pass: reconcile the ledger, write key points and the summary, build ``Minutes``."""

from __future__ import annotations

import re
from collections import Counter
from collections.abc import Sequence
from dataclasses import replace

from .keypoints import key_points, summarise
from .meeting import choose_template
from .model import ActionItem, Decision, Event, Ledger, Minutes, Question, Segment, Transcript
from .nlp import Parsed
from .procedure import quorum
from .relay.context import ReadContext
from .relay.ledger import RelayResult
from .relay.motions import settle
from .relay.reconcile import reconcile, renumber
from .segment import not_discussed
from .speakers import Directory, attendance


def finish(
    transcript: Transcript,
    segments: Sequence[Segment],
    result: RelayResult,
    parsed: Parsed,
    directory: Directory,
    *,
    unknown_speakers: Sequence[str] = (),
    template: str = "",
    notes: Sequence[str] = (),
) -> Minutes:
    """Return the minutes of a meeting from its transcript, segments and relay result."""
    ctx = ReadContext(transcript, parsed, directory)
    ledger = _without_procedure(settle(reconcile(result.ledger, ctx), ctx))
    segments = tuple(replace(s, points=key_points(s, parsed)) for s in segments)
    people = attendance(transcript, directory, transcript.meeting)
    meeting = transcript.meeting
    run_notes = list(notes)
    rejected = Counter(why.split(":", 1)[1].strip() for r in result.steps for why in r.rejected)
    for why, n in sorted(rejected.items()):
        run_notes.append(f"{n} proposed update(s) not applied: {why}")
    if unknown_speakers:
        run_notes.append(
            "speaker labels not found in the profiles (shown as given): "
            + ", ".join(unknown_speakers)
        )
    for motion in ledger.motions:
        run_notes.extend(f"{motion.id}: {flag}" for flag in motion.flags)
    return Minutes(
        meeting=meeting,
        source=transcript.source,
        duration=transcript.duration,
        attendees=people,
        segments=segments,
        summary=summarise(segments, parsed),
        ledger=ledger,
        utterances=transcript.utterances,
        template=template or choose_template(meeting),
        unknown_speakers=tuple(unknown_speakers),
        not_discussed=tuple(t for t in not_discussed(segments, meeting.agenda)
                            if not _taken_up(t, ledger.events)),
        notes=tuple(run_notes),
        roster=directory.roster,
        quorum=quorum(people, directory.roster),
    )


# Words that name each procedural event, as agenda titles tend to put them.
EVENT_WORDS = {
    "call_to_order": {"call", "order", "roll"},
    "roll_call": {"roll", "call", "attendance"},
    "public_comment": {"public", "comment", "comments"},
    "minutes_approved": {"minutes", "approval", "approve"},
    "adjournment": {"adjourn", "adjournment"},
    "report": {"report", "reports"},
    "recess": {"recess", "break"},
}
SMALL = frozenset("a an and the of to for on in by with from".split())


def _words(text: str) -> set[str]:
    return {w.removesuffix("'s") for w in re.findall(r"[a-z']+", text.lower())} - SMALL


def _taken_up(title: str, events: Sequence[Event]) -> bool:
    """Return whether a procedural event shows the agenda item was taken up.

    Short items (call to order, a report, public comment) are often too short for
    topic segmentation to give them a part of their own; the event says they happened.
    """
    wanted = _words(title)
    for event in events:
        said = EVENT_WORDS.get(event.kind, set()) | _words(event.detail)
        if len(wanted & said) >= min(2, len(wanted)):
            return True
    return False


def _without_procedure(ledger: Ledger) -> Ledger:
    """Return the ledger without actions, decisions and questions that are motion procedure.

    "I'll second that", "I abstain on this one", "is there a motion to approve?" read
    like commitments and questions, but the motion or the procedural event already
    records them, with the same evidence. An item first said in an utterance that a
    motion or event cites is dropped; so is an informal decision that restates a
    motion's wording.
    """
    cited = {e.utterance for m in ledger.motions for e in m.evidence}
    cited |= {e.utterance for ev in ledger.events for e in ev.evidence}
    if not cited:
        return ledger
    motion_words = [_words(m.text) for m in ledger.motions]

    def procedural(item: ActionItem | Decision | Question) -> bool:
        if item.evidence and item.evidence[0].utterance in cited:
            return True
        if isinstance(item, Decision):
            words = _words(item.text)
            return any(len(words & mw) >= 0.6 * max(len(words), 1) for mw in motion_words)
        return False

    # numbered again, so the minutes run A1, A2... with no gap where a "second" was; items
    # carried from an earlier meeting keep their series ids
    return replace(
        ledger,
        actions=renumber([a for a in ledger.actions if not procedural(a)], "A"),
        decisions=renumber([d for d in ledger.decisions if not procedural(d)], "D"),
        questions=renumber([q for q in ledger.questions if not procedural(q)], "Q"),
    )
