"""The ledger fold: apply, step, relay and replay, with a scripted reader (no model)."""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

from minutes.model import (
    ActionItem,
    Change,
    Evidence,
    Ledger,
    Proposal,
    Question,
    Segment,
    Utterance,
)
from minutes.relay.ledger import Add, Op, Update, apply, relay, replay, step


def ev(i: int, quote: str = "said", speaker: str = "Ada") -> Evidence:
    return Evidence(i, f"c{i}", float(i), i + 0.5, speaker, quote)


def action(task: str, i: int, owner: str | None = None) -> ActionItem:
    return ActionItem("", task, owner, None, "open", float(i), (ev(i, task),))


def segment(index: int, first: int, last: int) -> Segment:
    us = tuple(Utterance(i, float(i), i + 0.5, "Ada", f"line {i}") for i in range(first, last + 1))
    return Segment(index, first, last, float(first), last + 0.5, us)


@dataclass
class Scripted:
    """A reader that proposes fixed operations per segment index."""

    script: dict[int, list[Op]]
    name: str = "scripted"

    def read(self, ledger: Ledger, seg: Segment) -> list[Op]:
        return self.script.get(seg.index, [])


def test_add_gives_ids_in_order_and_a_created_change() -> None:
    ledger, rejected = apply(Ledger(), [Add(action("send the lease", 1)),
                                        Add(action("book the van", 2))])
    assert rejected == ()
    assert [a.id for a in ledger.actions] == ["A1", "A2"]
    assert ledger.actions[0].history[0].kind == "created"
    assert ledger.actions[0].history[0].evidence == ev(1, "send the lease")


def test_updates_change_owner_date_status_and_keep_evidence() -> None:
    ledger, _ = apply(Ledger(), [Add(action("send the lease", 1, "Ada"))])
    ops = [Update("A1", Change("owner", "Ben", ev(5, "actually Ben will take that"))),
           Update("A1", Change("due", "2025-03-14", ev(6, "push it to next week"))),
           Update("A1", Change("done", None, ev(9, "I already sent it")))]
    ledger, rejected = apply(ledger, ops)
    item = ledger.actions[0]
    assert rejected == ()
    assert (item.owner, item.due, item.status) == ("Ben", dt.date(2025, 3, 14), "done")
    assert [c.kind for c in item.history] == ["created", "owner", "due", "done"]
    assert [e.utterance for e in item.evidence] == [1, 5, 6, 9]


def test_refused_updates_are_reported_and_change_nothing() -> None:
    ledger, _ = apply(Ledger(), [Add(action("send the lease", 1))])
    ops = [Update("A9", Change("done", None, ev(2))),  # no such item
           Update("A1", Change("answered", None, ev(3))),  # wrong kind for an action
           Update("A1", Change("due", "next Friday", ev(4)))]  # not ISO
    after, rejected = apply(ledger, ops)
    assert after == ledger
    assert len(rejected) == 3
    assert rejected[0].startswith("A9: no such item")
    assert "cannot take 'answered'" in rejected[1]
    assert rejected[2].startswith("A1:")


def test_accepted_proposal_becomes_a_decision() -> None:
    proposal = Proposal("", "go with the blue banner", "Ada", 1.0, (ev(1, "should we..."),))
    ledger, _ = apply(Ledger(), [Add(proposal)])
    ledger, rejected = apply(ledger, [Update("P1", Change("accepted", None, ev(2, "fine by me",
                                                                                "Ben")))])
    assert rejected == ()
    assert ledger.proposals[0].status == "accepted"
    decision = ledger.decisions[0]
    assert (decision.id, decision.text, decision.by, decision.proposal) == (
        "D1", "go with the blue banner", "Ada", "P1")
    assert [e.utterance for e in decision.evidence] == [1, 2]
    # a settled proposal cannot be settled again
    _, rejected = apply(ledger, [Update("P1", Change("rejected", None, ev(3)))])
    assert rejected == ("P1: proposal is already accepted",)


def test_rejected_proposal_makes_no_decision() -> None:
    ledger, _ = apply(Ledger(), [Add(Proposal("", "order chairs", "Ada", 1.0, (ev(1),)))])
    ledger, _ = apply(ledger, [Update("P1", Change("rejected", None, ev(2)))])
    assert ledger.decisions == ()
    assert ledger.proposals[0].status == "rejected"


def test_question_answered_and_reopened() -> None:
    ledger, _ = apply(Ledger(), [Add(Question("", "What is the budget?", "Ada", False, 1.0,
                                              (ev(1),)))])
    assert len(ledger.open_questions) == 1
    ledger, _ = apply(ledger, [Update("Q1", Change("answered", None, ev(4)))])
    assert ledger.open_questions == ()
    ledger, _ = apply(ledger, [Update("Q1", Change("reopened", None, ev(6)))])
    assert len(ledger.open_questions) == 1


def test_relay_carries_the_ledger_and_replay_reproduces_it() -> None:
    script: dict[int, list[Op]] = {
        0: [Add(action("send the lease", 1, "Ada")),
            Add(Proposal("", "go with blue", "Ada", 3.0, (ev(3),)))],
        # the next segment agrees to the proposal carried over and reassigns the action
        1: [Update("P1", Change("accepted", None, ev(4, "yeah", "Ben"))),
            Update("A1", Change("owner", "Ben", ev(5))),
            Update("A7", Change("done", None, ev(6)))],  # refused: no such item
        2: [Update("A1", Change("done", None, ev(9)))],
    }
    segments = [segment(0, 0, 3), segment(1, 4, 7), segment(2, 8, 9)]
    result = relay(segments, Scripted(script))
    assert [r.segment for r in result.steps] == [0, 1, 2]
    assert result.steps[1].rejected == ("A7: no such item",)
    assert result.ledger.actions[0].owner == "Ben"
    assert result.ledger.actions[0].status == "done"
    assert result.ledger.decisions[0].proposal == "P1"
    assert replay(result.steps) == result.ledger


def test_step_is_apply_of_the_readers_operations() -> None:
    reader = Scripted({0: [Add(action("book the van", 2))]})
    assert step(Ledger(), segment(0, 0, 3), reader) == apply(Ledger(), reader.script[0])[0]
