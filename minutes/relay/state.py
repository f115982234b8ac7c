"""The working state of one rules step: the segment's turns and the ledger as it grows.

Each detector looks at one turn (utterance) with the ledger as it stands after
the turns before it, and proposes operations; ``apply`` is run on a working
copy so that a later turn can update an item an earlier turn of the same
segment created. The ids ``apply`` gives here are the ids the relay will give,
since it applies the same operations to the same ledger in the same order.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from ..model import ActionItem, Ledger, Segment, Utterance
from .clauses import Sentence, sentences
from .context import ReadContext
from .ledger import Op, apply

if TYPE_CHECKING:
    from spacy.tokens import Doc


@dataclass
class Turn:
    """One utterance of the segment with its parse and sentences."""

    utterance: Utterance
    doc: Doc
    sentences: list[Sentence]

    @property
    def speaker(self) -> str:
        return self.utterance.speaker


@dataclass
class State:
    """What a rules step knows while it reads a segment."""

    ctx: ReadContext
    segment: Segment
    ledger: Ledger
    turns: list[Turn]
    ops: list[Op] = field(default_factory=list)
    claimed: set[tuple[int, int]] = field(default_factory=set)  # (utterance, sentence) used

    @classmethod
    def start(cls, ctx: ReadContext, segment: Segment, ledger: Ledger) -> State:
        """Return the state at the start of ``segment``."""
        turns = []
        for u in segment.utterances:
            doc = ctx.parsed[u.index]
            turns.append(Turn(u, doc, sentences(u, doc)))
        return cls(ctx, segment, ledger, turns)

    def apply(self, ops: Sequence[Op]) -> None:
        """Record ``ops`` and carry them out on the working ledger."""
        if ops:
            self.ops.extend(ops)
            self.ledger = apply(self.ledger, ops)[0]

    def claim(self, sentence: Sentence) -> None:
        """Mark a sentence as used, so no other detector reads a second item into it."""
        self.claimed.add((sentence.utterance.index, sentence.number))

    def is_claimed(self, sentence: Sentence) -> bool:
        return (sentence.utterance.index, sentence.number) in self.claimed

    def previous_speaker(self, k: int) -> str | None:
        """Return the last speaker before turn ``k`` other than its own speaker."""
        me = self.turns[k].speaker
        for j in range(k - 1, -1, -1):
            if self.turns[j].speaker != me:
                return self.turns[j].speaker
        # the turn before the segment: fixed transcript text, so the step stays pure
        utterances = self.ctx.transcript.utterances
        first = self.segment.first
        for j in range(first - 1, max(first - 4, -1), -1):
            if utterances[j].speaker != me:
                return utterances[j].speaker
        return None

    def following(self, k: int, *, limit: int = 4, seconds: float = 45.0) -> list[Turn]:
        """Return up to ``limit`` turns after ``k`` within ``seconds``, inside the segment."""
        t0 = self.turns[k].utterance.end
        out: list[Turn] = []
        for turn in self.turns[k + 1 :]:
            if len(out) >= limit or turn.utterance.start - t0 > seconds:
                break
            out.append(turn)
        return out

    def recent_actions(self, now: float, seconds: float = 600.0) -> list[ActionItem]:
        """Return open actions, most recently mentioned first.

        Items carried in from earlier meetings and not yet mentioned in this one come
        last: they can be named by their content, never be "it" or "that".
        """
        acts = [a for a in self.ledger.actions if a.status == "open"]
        acts = [a for a in acts if now - last_time(a) <= seconds or last_time(a) == NEVER]
        return sorted(acts, key=last_time, reverse=True)


NEVER = float("-inf")


def last_time(item: ActionItem) -> float:
    """Return when the item was last mentioned in THIS meeting (NEVER if it was not).

    Evidence that came with an item from an earlier meeting of a series carries that
    meeting's clock, so it says nothing about how recent the item is here.
    """
    carried = [n for n, c in enumerate(item.history) if c.source == "series"]
    if not carried:
        return max((e.start for e in item.evidence), default=item.time)
    # all evidence from before the carry is the earlier meeting's (its owner change too,
    # not only the first quote); what this meeting adds comes with a change after it
    later = {c.evidence for c in item.history[carried[-1] + 1:]}
    here = [e.start for e in item.evidence if e in later]
    return max(here) if here else NEVER
