"""End of the meeting: merge duplicates, lapse pending proposals, order items by time."""

from __future__ import annotations

import re
from collections import Counter
from dataclasses import replace

from ..model import ActionItem, Change, Decision, Ledger, Question, Transcript
from .actions import procedural
from .clauses import content_stems, overlap, similar, stem
from .context import ReadContext


def _same_action(a: ActionItem, b: ActionItem) -> bool:
    if a.owner and b.owner and a.owner != b.owner:
        return False
    if a.status != b.status and "open" not in (a.status, b.status):
        return False
    same_verb = a.task.split()[:1] and b.task.split()[:1] and \
        stem(a.task.split()[0]) == stem(b.task.split()[0])
    if same_verb:
        # the verb already agrees; the things it acts on must agree too ("bring the survey
        # results" and "bring the staffing plan" are two tasks)
        verb = {stem(a.task.split()[0])}
        return similar(content_stems(a.task) - verb, content_stems(b.task) - verb, 0.5)
    return similar(content_stems(a.task), content_stems(b.task), 0.8)


def _merge_action(keep: ActionItem, other: ActionItem) -> ActionItem:
    evidence = keep.evidence + tuple(e for e in other.evidence if e not in keep.evidence)
    history = tuple(sorted(keep.history + other.history, key=lambda c: c.evidence.start))
    status = keep.status if keep.status != "open" else other.status
    return replace(
        keep,
        owner=keep.owner or other.owner,
        due=keep.due or other.due,
        due_text=keep.due_text or other.due_text,
        status=status,
        evidence=evidence,
        history=history,
        task=keep.task if len(keep.task) >= len(other.task) else other.task,
    )


def _merge_decisions(items: tuple[Decision, ...]) -> list[Decision]:
    out: list[Decision] = []
    for item in sorted(items, key=lambda d: d.time):
        words = content_stems(item.text)
        for n, kept in enumerate(out):
            if item.time - kept.time < 900 and overlap(words, content_stems(kept.text)) >= 0.7:
                ev = kept.evidence + tuple(e for e in item.evidence if e not in kept.evidence)
                out[n] = replace(kept, evidence=ev, history=kept.history + item.history)
                break
        else:
            out.append(item)
    return out


# A decision reported in the past tense ("we decided on a kinetic charger") in the opening
# of a meeting reviews the previous meeting (common practice: the chair recaps the last
# minutes before new business), and this meeting's minutes should not repeat it. Chosen on
# the 7 AMI meetings with gold decisions, leaving one out, jointly with RUN_GAP over
# {0, 0.05, 0.1, 0.15, 0.2} x {none, 5, 20, 30, 45, 60, 90 s}: (0.1, 60 s) is picked in 3 of
# the 7 folds and on all 7 (no other pair in more than 2). ICSI is the held-out check.
OPENING_PART = 0.10
REPORTED = re.compile(r"\b(?:decided|agreed|settled|concluded)\b", re.I)
# One speaker stating decisions back to back ("we've got the T_V, we've got the video, ...")
# is one recap: the minutes list it once, as one item, as a secretary would. Items of the same
# speaker less than this apart (end of one cue to start of the next) are one item.
RUN_GAP = 60.0  # seconds; chosen with OPENING_PART (above)


def _reviews_last_meeting(item: Decision, transcript: Transcript) -> bool:
    """Return True for a stated decision, in the past tense, in the opening of a full meeting."""
    if _carried(item) or item.proposal is not None or not transcript.utterances:
        return False
    start = transcript.utterances[0].start
    length = transcript.duration - start
    if length < WHOLE_MEETING or (item.time - start) / length >= OPENING_PART:
        return False
    return bool(REPORTED.search(item.evidence[0].quote))


def _consolidate(items: list[Decision]) -> list[Decision]:
    """Return the decisions with each run of one speaker's back-to-back items made one item."""
    out: list[Decision] = []
    for item in items:
        if out and not _carried(item) and not _carried(out[-1]) and out[-1].by == item.by:
            kept = out[-1]
            gap = min(e.start for e in item.evidence) - max(e.end for e in kept.evidence)
            if gap <= RUN_GAP:
                ev = kept.evidence + tuple(e for e in item.evidence if e not in kept.evidence)
                out[-1] = replace(kept, text=f"{kept.text}; {item.text}", evidence=ev,
                                  history=kept.history + item.history)
                continue
        out.append(item)
    return out


# Roles that run a meeting (common practice; AMI's "project manager" chairs its meetings).
CHAIR_ROLES = re.compile(r"\b(?:chair|chairs|chairperson|chairman|chairwoman|project manager|"
                         r"facilitator|convener|convenor|president|moderator)\b", re.I)
# Action items are reviewed at the close of a meeting (common practice: the chair sums up
# who does what next). AMI gold actions sit late. Chosen on the 7 AMI meetings with gold
# actions, leaving one out at a time over {0.6, 0.7, 0.75, 0.8, 0.85, no cut}: 0.85 is best
# in 6 of the 7 folds (0.6-0.75 tie lower; the 7th fold prefers no late exception). ICSI
# has no gold actions; the demo keys are the check (unchanged at any of these values).
CLOSING_PART = 0.85
# A transcript shorter than this is an excerpt with no close to review actions at: every
# action stays. (No dev meeting is near it: AMI and ICSI run 17-65 minutes.)
WHOLE_MEETING = 600.0  # seconds


def chair_of(ctx: ReadContext) -> str | None:
    """Return the speaker who chairs: a chair's role in the profiles, else the most talkative."""
    speakers = {u.speaker for u in ctx.transcript.utterances}
    for person in ctx.directory.people:
        if CHAIR_ROLES.search(person.role) and person.name in speakers:
            return person.name
    words: Counter[str] = Counter()
    for u in ctx.transcript.utterances:
        words[u.speaker] += len(u.text.split())
    return words.most_common(1)[0][0] if words else None


def _carried(item: ActionItem | Decision | Question) -> bool:
    """Return True for an item carried in from an earlier meeting of the series."""
    return bool(item.history) and item.history[0].source == "series"


def _firm(item: ActionItem, transcript: Transcript, chair: str | None) -> bool:
    """Return True when an action reads as a task owed after the meeting, not a passing remark.

    A remark mid-meeting ("I'll check it", "I'll leave it there") is mostly about the next
    minute; a task with a date, one handed out at the close, or one the chair gives to
    someone else is a commitment. Carried items and items updated since (done, dropped) stay.
    """
    if _carried(item):
        return True
    # a vote or a procedural move is tracked while the meeting runs (a later "that's done"
    # refers to it, not to an earlier task) but owes nothing afterwards
    if procedural(item.task):
        return False
    if item.status != "open" or item.due is not None:
        return True
    start = transcript.utterances[0].start if transcript.utterances else 0.0
    length = transcript.duration - start if transcript.utterances else 0.0
    if length < WHOLE_MEETING or (item.time - start) / length >= CLOSING_PART:
        return True
    first = item.evidence[0]
    return first.speaker == chair and item.owner is not None and item.owner != chair


def renumber(items: list, prefix: str) -> tuple:
    """Return the items with ids: carried items keep theirs, new ones follow the highest in use."""
    used = [int(i.id[len(prefix):]) for i in items if _carried(i) and i.id.startswith(prefix)
            and i.id[len(prefix):].isdigit()]
    n = max(used, default=0)
    out = []
    for item in items:
        if _carried(item) and item.id.startswith(prefix) and item.id[len(prefix):].isdigit():
            out.append(item)
            continue
        n += 1
        out.append(replace(item, id=f"{prefix}{n}"))
    return tuple(out)


def reconcile(ledger: Ledger, ctx: ReadContext) -> Ledger:
    """Return the ledger of a finished meeting: duplicates merged, proposals settled, in order.

    Items carried from earlier meetings (first change from the "series") keep their
    ids; new items are numbered in time order after the highest id in use (A1, A2...;
    D1...; Q1...); proposals keep theirs, since decisions name the proposal they
    settled. Passing remarks are left out of the actions (``_firm``).
    """
    chair = chair_of(ctx)
    # pending proposals lapse: nobody agreed before the meeting ended
    proposals = []
    for p in ledger.proposals:
        if p.status == "pending":
            change = Change("lapsed", None, p.evidence[-1], source="rules")
            p = replace(p, status="lapsed", history=p.history + (change,))
        proposals.append(p)
    actions: list[ActionItem] = []
    for item in sorted(ledger.actions, key=lambda a: a.time):
        if not item.task.strip():
            continue
        for n, kept in enumerate(actions):
            if _same_action(kept, item):
                actions[n] = _merge_action(kept, item)
                break
        else:
            actions.append(item)
    actions = [a for a in actions if _firm(a, ctx.transcript, chair)]
    decisions = _merge_decisions(tuple(d for d in ledger.decisions
                                       if not _reviews_last_meeting(d, ctx.transcript)))
    decisions = _consolidate(decisions)
    questions: list[Question] = sorted(ledger.questions, key=lambda q: q.time)
    return replace(
        ledger,
        actions=renumber(actions, "A"),
        decisions=renumber(decisions, "D"),
        questions=renumber(questions, "Q"),
        proposals=tuple(sorted(proposals, key=lambda p: p.time)),
    )
