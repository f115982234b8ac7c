"""End of the meeting: merge duplicates, lapse pending proposals, order items by time."""

from __future__ import annotations

from dataclasses import replace

from ..model import ActionItem, Change, Decision, Ledger, Question
from .clauses import content_stems, overlap, similar, stem
from .context import ReadContext


def _same_action(a: ActionItem, b: ActionItem) -> bool:
    if a.owner and b.owner and a.owner != b.owner:
        return False
    if a.status != b.status and "open" not in (a.status, b.status):
        return False
    same_verb = a.task.split()[:1] and b.task.split()[:1] and \
        stem(a.task.split()[0]) == stem(b.task.split()[0])
    return similar(content_stems(a.task), content_stems(b.task), 0.5 if same_verb else 0.8)


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


def reconcile(ledger: Ledger, ctx: ReadContext) -> Ledger:
    """Return the ledger of a finished meeting: duplicates merged, proposals settled, in order.

    Ids are given again in time order (A1, A2...; D1...; Q1...); proposals keep
    theirs, since decisions name the proposal they settled. ``ctx`` is part of the
    signature so a later pass can consult the transcript (e.g. its end time).
    """
    del ctx
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
    decisions = _merge_decisions(ledger.decisions)
    questions: list[Question] = sorted(ledger.questions, key=lambda q: q.time)
    return replace(
        ledger,
        actions=tuple(replace(a, id=f"A{n}") for n, a in enumerate(actions, 1)),
        decisions=tuple(replace(d, id=f"D{n}") for n, d in enumerate(decisions, 1)),
        questions=tuple(replace(q, id=f"Q{n}") for n, q in enumerate(questions, 1)),
        proposals=tuple(sorted(proposals, key=lambda p: p.time)),
    )
