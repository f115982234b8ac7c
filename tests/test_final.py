"""The final pass: procedure is not double-counted; agenda items shown taken up by events."""

from __future__ import annotations

from minutes.final import _taken_up, _without_procedure
from minutes.model import ActionItem, Decision, Event, Evidence, Ledger, Motion, Question, Vote


def ev(i: int, quote: str = "x") -> Evidence:
    return Evidence(i, str(i), float(i), float(i) + 1, "Ada Voss", quote)


def test_items_said_in_motion_procedure_are_dropped_and_others_kept() -> None:
    motion = Motion("M1", "approve the boiler replacement contract with Ferro Heating", "Ada Voss",
                    "Ben Ortiz", Vote(), "carried", 10.0, (ev(10), ev(11, "I'll second that")))
    ledger = Ledger(
        actions=(ActionItem("A1", "second that", "Ben Ortiz", None, "open", 11.0, (ev(11),)),
                 ActionItem("A2", "send the contract to counsel", "Cy Hale", None, "open", 20.0,
                            (ev(20),))),
        decisions=(Decision("D1", "Approve the boiler replacement contract with Ferro", 12.0,
                            "Ada Voss", (ev(12),)),
                   Decision("D2", "keep the winter hours", 30.0, "Ada Voss", (ev(30),))),
        questions=(Question("Q1", "Is there a second?", "Ada Voss", False, 10.0, (ev(10),)),),
        motions=(motion,),
    )
    kept = _without_procedure(ledger)
    # what is left is numbered again: no gap where the "second" was
    assert [(a.id, a.task) for a in kept.actions] == [("A1", "send the contract to counsel")]
    assert [(d.id, d.text) for d in kept.decisions] == [("D1", "keep the winter hours")]
    assert kept.questions == ()
    assert kept.motions == (motion,)


def test_renumbering_after_procedure_keeps_series_ids() -> None:
    from minutes.model import Change

    motion = Motion("M1", "approve the minutes", "Ada Voss", "Ben Ortiz", Vote(), "carried",
                    10.0, (ev(10), ev(11, "I'll second that")))
    carried = ActionItem("A7", "renew the insurance", "Cy Hale", None, "open", 2.0, (ev(2),),
                         history=(Change("carried", "A7", ev(2), source="series"),),
                         source="series")
    ledger = Ledger(
        actions=(carried,
                 ActionItem("A8", "second that", "Ben Ortiz", None, "open", 11.0, (ev(11),)),
                 ActionItem("A9", "send the contract to counsel", "Cy Hale", None, "open", 20.0,
                            (ev(20),))),
        motions=(motion,),
    )
    kept = _without_procedure(ledger)
    assert [(a.id, a.task) for a in kept.actions] == [("A7", "renew the insurance"),
                                                      ("A8", "send the contract to counsel")]


def test_a_meeting_without_motions_is_left_alone() -> None:
    ledger = Ledger(actions=(ActionItem("A1", "second that", None, None, "open", 1.0, (ev(1),)),))
    assert _without_procedure(ledger) is ledger


def test_agenda_items_taken_up_by_an_event() -> None:
    events = (Event("call_to_order", 5.0, (ev(1),)),
              Event("report", 60.0, (ev(9),), detail="Director's report, by Odette Marchbanks"))
    assert _taken_up("Call to order, roll call and agenda", events)
    assert _taken_up("Director's report", events)
    assert not _taken_up("Friends of the Library liaison report", events)
    assert not _taken_up("Public comment", events)
