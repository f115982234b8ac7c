"""The rules reader: patterns over the one spaCy parse for actions, decisions and questions.

For each turn of the segment, in order: answers to what is pending (proposals
agreed or turned down, questions answered), updates to carried actions (owner,
date, done, dropped), then new items. Each turn sees the ledger as the turns
before it left it, so an item named early in a segment can be reassigned later
in it; the ledger carries everything on to the next segment.

A step is pure: its operations depend only on (ledger, segment) and the fixed
context (the transcript, its parse, the people).
"""

from __future__ import annotations

from collections.abc import Sequence

from ..model import Ledger, Segment
from . import actions, decisions, questions
from .context import ReadContext
from .ledger import Op
from .state import State


class RulesReader:
    """The default segment reader: no model beyond spaCy, always available."""

    name = "rules"

    def __init__(self, ctx: ReadContext) -> None:
        self.ctx = ctx

    def read(self, ledger: Ledger, segment: Segment) -> list[Op]:
        """Return the operations that the segment's turns support, in order."""
        state = State.start(self.ctx, segment, ledger)
        for k in range(len(state.turns)):
            decisions.settle_pending(state, k)
            actions.read(state, k)
            decisions.read(state, k)
            questions.read(state, k)
        return list(state.ops)


def read_all(ctx: ReadContext, segments: Sequence[Segment]) -> Ledger:
    """Return the ledger after reading every segment in order (a convenience for scripts)."""
    from .ledger import relay

    return relay(segments, RulesReader(ctx)).ledger
