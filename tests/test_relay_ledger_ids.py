"""Item ids: never reused, and numbered past items carried in with their own ids."""

from __future__ import annotations

from minutes.model import ActionItem, Evidence, Ledger
from minutes.relay.ledger import Add, apply, next_id

EV = Evidence(0, "1", 0.0, 1.0, "Ada Voss", "x")


def action(item_id: str) -> ActionItem:
    return ActionItem(item_id, "task", None, None, "open", 0.0, (EV,))


def test_new_ids_follow_the_highest_in_use() -> None:
    carried = Ledger(actions=(action("A3"), action("A7")))  # from earlier meetings
    assert next_id(carried, ActionItem) == "A8"
    ledger, _ = apply(carried, [Add(action(""))])
    assert [a.id for a in ledger.actions] == ["A3", "A7", "A8"]


def test_an_empty_ledger_starts_at_one() -> None:
    assert next_id(Ledger(), ActionItem) == "A1"
