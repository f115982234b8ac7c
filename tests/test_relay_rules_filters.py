"""The rules reader's filters: votes and procedural moves, habit, passing remarks, carried ids."""

from __future__ import annotations

from dataclasses import replace

import pytest
from test_relay_rules import meeting, run

from minutes.model import (
    ActionItem,
    Change,
    Cue,
    Decision,
    Evidence,
    Ledger,
    Transcript,
    Utterance,
)
from minutes.nlp import Parsed
from minutes.relay.context import ReadContext
from minutes.relay.reconcile import reconcile
from minutes.speakers import Directory


def test_votes_and_procedural_moves_are_not_actions() -> None:
    ledger = run([("Kim Lee", "I'll second that."),
                  ("Priya Shah", "I'm going to abstain on this one."),
                  ("Tom Brandt", "I'll vote against it."),
                  ("Kim Lee", "Go ahead and state your name for the record."),
                  ("Priya Shah", "I'll call the roll."),
                  ("Tom Brandt", "I'll send the revised lease to the landlord by Friday.")])
    assert [a.task for a in ledger.actions] == ["send the revised lease to the landlord"]


def test_habitual_will_is_not_a_commitment() -> None:
    # a research interview: a routine told in the future of habit (common practice of
    # interview analysis: "will" with frequency adverbs describes what usually happens)
    ledger = run([("Kim Lee", "Walk me through a morning."),
                  ("Priya Shah", "I'll check the forecast on the phone, usually the marine one."),
                  ("Priya Shah", "I'll look at the tide tables every morning."),
                  ("Tom Brandt", "I'll send you the consent form by Friday.")])
    assert [a.task for a in ledger.actions] == ["send you the consent form"]


def test_passing_remarks_mid_meeting_are_left_out_of_a_long_meeting() -> None:
    # a first-person remark early in a long meeting is dropped; an assignment at the close
    # (where the work is handed out: common practice) stays
    filler = [("Priya Shah", "We talked about the colours of the case for a while today.")] * 40
    lines = ([("Kim Lee", "Okay, let's begin."),
              ("Tom Brandt", "I will email the printer about the paper.")]
             + filler + [("Kim Lee", "Tom, you will draw up the case design."),
                         ("Tom Brandt", "Sure.")])
    ctx, segments = meeting(lines)
    stretched = tuple(replace(u, start=u.start * 8, end=u.end * 8,
                              cues=tuple(replace(c, start=c.start * 8, end=c.end * 8)
                                         for c in u.cues))
                      for u in ctx.transcript.utterances)
    assert stretched[-1].end > 600  # a whole meeting, not an excerpt
    from minutes.model import Segment
    from minutes.relay.context import ReadContext
    from minutes.relay.ledger import relay
    from minutes.relay.rules import RulesReader

    t = replace(ctx.transcript, utterances=stretched)
    ctx = ReadContext(t, ctx.parsed, ctx.directory)
    seg = Segment(0, 0, len(stretched) - 1, stretched[0].start, stretched[-1].end, stretched)
    ledger = reconcile(relay((seg,), RulesReader(ctx)).ledger, ctx)
    assert [(a.task, a.owner) for a in ledger.actions] == [
        ("draw up the case design", "Tom Brandt")]


def test_carried_items_keep_their_ids_and_new_ones_follow() -> None:
    ctx, _ = meeting([("Kim Lee", "Hello.")])
    ev = Evidence(0, "c0", 0.0, 1.0, "Kim Lee", "Hello.")
    carried = ActionItem("A7", "book the hall", "Kim Lee", None, "open", -100.0, (ev,),
                         (Change("created", None, ev, source="series"),))
    new_early = ActionItem("A1", "print the flyers", None, None, "open", -200.0, (ev,),
                           (Change("created", None, ev),))
    new_late = ActionItem("A2", "email the council", None, None, "open", 50.0, (ev,),
                          (Change("created", None, ev),))
    out = reconcile(Ledger(actions=(new_late, carried, new_early)), ctx)
    assert [(a.id, a.task) for a in out.actions] == [
        ("A8", "print the flyers"), ("A7", "book the hall"), ("A9", "email the council")]


def _decision_ctx(length: float) -> ReadContext:
    """Return a context whose transcript runs ``length`` seconds (two speakers)."""
    us = (Utterance(0, 0.0, 2.0, "Kim Lee", "Hello.", (Cue("c0", 0.0, 2.0, "Hello."),)),
          Utterance(1, length - 2.0, length, "Tom Brandt", "Bye.",
                    (Cue("c1", length - 2.0, length, "Bye."),)))
    return ReadContext(Transcript(us), Parsed(()), Directory())


def _decision(text: str, at: float, by: str, quote: str, proposal: str | None = None) -> Decision:
    ev = Evidence(0, f"c{at:g}", at, at + 3.0, by, quote)
    return Decision("", text, at, by, (ev,), (Change("created", None, ev),), proposal=proposal)


def test_past_decisions_in_the_opening_review_the_last_meeting() -> None:
    # the chair recaps the last meeting's decisions before new business (common practice)
    recap = _decision("A kinetic charger", 30.0, "Kim Lee", "So we decided on a kinetic charger.")
    agreed = _decision("Use rubber buttons", 60.0, "Tom Brandt", "Should we use rubber buttons?",
                       proposal="P1")
    later = _decision("A rubber case", 900.0, "Kim Lee", "So we decided on a rubber case.")
    ledger = Ledger(decisions=(recap, agreed, later))
    out = reconcile(ledger, _decision_ctx(1200.0))  # a whole 20-minute meeting
    assert [d.text for d in out.decisions] == ["Use rubber buttons", "A rubber case"]
    # an excerpt (under 10 minutes) has no opening: the statement stays
    short = reconcile(Ledger(decisions=(recap,)), _decision_ctx(300.0))
    assert [d.text for d in short.decisions] == ["A kinetic charger"]


def test_one_speakers_back_to_back_decisions_are_one_item() -> None:
    a = _decision("The T_V", 500.0, "Kim Lee", "We've got the T_V,")
    b = _decision("The video", 510.0, "Kim Lee", "we've got the video.")
    other = _decision("A flip screen", 520.0, "Tom Brandt", "We're going with a flip screen.")
    late = _decision("A yellow case", 900.0, "Tom Brandt", "We're going with a yellow case.")
    out = reconcile(Ledger(decisions=(late, other, b, a)), _decision_ctx(1200.0))
    assert [d.text for d in out.decisions] == ["The T_V; The video", "A flip screen",
                                               "A yellow case"]
    assert [len(d.evidence) for d in out.decisions] == [2, 1, 1]


def _carried(task: str, owner: str, at: float) -> ActionItem:
    """An open action loaded from an earlier meeting: its evidence has that meeting's clock."""
    ev = Evidence(3, "9", at, at + 2, owner, task)
    return ActionItem("A4", task, owner, None, "open", at, (ev,),
                      history=(Change("carried", "A4 from week 1", ev, source="series"),),
                      source="series")


def test_a_carried_item_is_not_it_or_that_until_this_meeting_names_it() -> None:
    # Week 1's evidence sits at 2-4 s of week 1's recording; this meeting's first seconds
    # must not make it "the item just mentioned".
    from minutes.relay.ledger import relay
    from minutes.relay.rules import RulesReader

    ctx, segments = meeting([("Kim Lee", "Right. So that's done already, the room is booked."),
                             ("Priya Shah", "Great.")])
    ledger = relay(segments, RulesReader(ctx),
                   Ledger(actions=(_carried("pay the Kilnworth shelving deposit", "Tom Brandt",
                                            2.0),))).ledger
    assert ledger.actions[0].status == "open"


def test_a_plain_past_report_that_names_a_carried_item_closes_it() -> None:
    from minutes.relay.ledger import relay
    from minutes.relay.rules import RulesReader

    ctx, segments = meeting([("Kim Lee", "Tom, the deposit?"),
                             ("Tom Brandt", "I paid Kilnworth on Friday, all of it.")])
    carried = Ledger(actions=(_carried("pay the Kilnworth shelving deposit", "Tom Brandt",
                                       2.0),))
    ledger = relay(segments, RulesReader(ctx), carried).ledger
    assert ledger.actions[0].status == "done"
    assert ledger.actions[0].history[-1].evidence.quote.startswith("I paid Kilnworth")


def test_same_verb_different_objects_are_two_tasks_and_repeats_merge() -> None:
    from minutes.relay.reconcile import _same_action

    def task(text: str) -> ActionItem:
        return ActionItem("", text, "Odette Marchbanks", None, "open", 1.0,
                          (Evidence(0, "1", 1.0, 2.0, "Odette Marchbanks", text),))

    assert not _same_action(task("bring the full results to the planning retreat in January"),
                            task("bring back the staffing plan and the full cost breakdown"))
    assert _same_action(task("send the revised lease to the landlord"),
                        task("send the lease to the landlord"))


def test_we_want_the_thing_is_a_choice_but_a_wish_about_people_is_not() -> None:
    ledger = run([("Kim Lee", "Okay, so we want the buttons to be big and rubbery."),
                  ("Priya Shah", "Yeah."),
                  ("Tom Brandt", "We want people to come back to the shop.")])
    assert [d.text for d in ledger.decisions] == ["The buttons to be big and rubbery"]


def test_ordering_this_meetings_business_is_not_a_decision() -> None:
    # who presents when, the next meeting's time and note-taking run the meeting; the
    # minutes record what was decided on its business (common practice)
    ledger = run([("Kim Lee", "So we'll have the three presentations first."),
                  ("Priya Shah", "Okay."),
                  ("Kim Lee", "Let's watch Tom's presentation first then."),
                  ("Tom Brandt", "Yeah."),
                  ("Kim Lee", "The next meeting's going to be in thirty minutes."),
                  ("Priya Shah", "Yep."),
                  ("Tom Brandt", "Should we use rubber buttons?"),
                  ("Priya Shah", "Yeah, fine by me.")])
    assert [d.text for d in ledger.decisions] == ["Use rubber buttons"]


def test_a_requirement_names_a_thing_not_a_speaker() -> None:
    # "the first I will present..." is someone taking the floor; "the remote should be
    # simple" states what the product must be
    ledger = run([("Kim Lee", "The first I will present the function design."),
                  ("Priya Shah", "Okay."),
                  ("Tom Brandt", "The remote should be simple."),
                  ("Priya Shah", "Yeah.")])
    assert [d.text for d in ledger.decisions] == ["The remote should be simple"]


def test_a_task_with_nothing_to_act_on_is_not_an_item() -> None:
    # "I'll paint and paint" and "can you separate these" are about the thing in hand;
    # "email her" names whom to write to, so it stays
    ledger = run([("Kim Lee", "Okay, and I'll paint and paint."),
                  ("Priya Shah", "Tom, can you separate these uh these?"),
                  ("Tom Brandt", "Sure."),
                  ("Priya Shah", "I'll email her by Friday.")])
    assert [a.task for a in ledger.actions] == ["email her"]


def test_an_offer_on_a_condition_is_not_a_commitment() -> None:
    ledger = run([("Kim Lee", "I'll keep it simple, if there's any more information I can email "
                              "you the tables."),
                  ("Priya Shah", "Okay."),
                  ("Tom Brandt", "I'll email you the tables by Friday.")])
    assert [(a.owner, a.task) for a in ledger.actions] == [("Tom Brandt", "email you the tables")]


def test_we_dont_really_want_and_happy_to_go_ahead() -> None:
    # "we don't really want to use X" states the group's choice; "(are) we happy to go
    # ahead?" asks the room, and a "yeah" settles it (spoken English drops the "are")
    ledger = run([("Kim Lee", "So we don't really want to use the teletext anymore."),
                  ("Priya Shah", "Mm-hmm."),
                  ("Tom Brandt", "We happy to go ahead with the flip case?"),
                  ("Priya Shah", "Yeah.")])
    assert [d.text for d in ledger.decisions] == ["We don't want to use the teletext anymore",
                                                  "Go ahead with the flip case"]


@pytest.mark.parametrize(("said", "text"), [
    ("We've decided not to use the teletext.", "We've decided not to use the teletext"),
    ("And we don't want it to cost more than twelve Euros.",
     "We don't want it to cost more than twelve Euros"),
    ("We agreed to not have a screen.", "We agreed to not have a screen"),
    ("We've decided to use the teletext.", "Use the teletext"),
])
def test_a_negated_decision_keeps_its_negation(said: str, text: str) -> None:
    # a verb phrase cut after the cue would turn "decided not to use" into "use"
    ledger = run([("Kim Lee", said), ("Priya Shah", "Yeah.")])
    assert [d.text for d in ledger.decisions] == [text]


def test_why_dont_we_is_a_proposal_not_a_negation() -> None:
    ledger = run([("Kim Lee", "So why don't we do the supplier survey first?"),
                  ("Priya Shah", "Yeah, fine by me.")])
    assert [d.text for d in ledger.decisions] == ["Do the supplier survey first"]



@pytest.mark.parametrize("said", [
    "I'll probably not send the quote to the landlord by Friday.",
    "Priya, you'll also not need to call the printer by Friday.",
    "Tom is going to no longer order the paper by Friday.",
    "Please don't forget the deposit.",
])
def test_a_negated_commitment_is_no_action(said: str) -> None:
    # cut after the cue, the verb phrase would say the opposite of what was said
    ledger = run([("Kim Lee", said), ("Priya Shah", "Yeah.")])
    assert ledger.actions == ()


def test_a_reminder_not_to_forget_an_item_does_not_drop_it() -> None:
    ledger = run([("Kim Lee", "Tom, can you pay the shelving deposit by Friday?"),
                  ("Tom Brandt", "Sure."),
                  ("Priya Shah", "Please don't forget the deposit."),
                  ("Tom Brandt", "I won't forget the deposit.")])
    assert [(a.task, a.status) for a in ledger.actions] == [("pay the shelving deposit", "open")]


def test_a_name_inside_the_task_stays_and_a_vocative_goes() -> None:
    ledger = run([("Kim Lee", "Tom, can you pay the Kilnworth deposit by Friday?"),
                  ("Tom Brandt", "Sure."),
                  ("Priya Shah", "I'll email Colm the floor plan, Kim.")])
    assert [a.task for a in ledger.actions] == ["pay the Kilnworth deposit",
                                                "email Colm the floor plan"]


def test_me_in_a_task_handed_to_someone_else_names_the_speaker() -> None:
    ledger = run([("Kim Lee", "Priya, can you send me the floor plan by Friday?"),
                  ("Priya Shah", "Sure."),
                  ("Tom Brandt", "And I'll send my notes round by Friday.")])
    assert [(a.owner, a.task) for a in ledger.actions] == [
        ("Priya Shah", "send Kim Lee the floor plan"), ("Tom Brandt", "send my notes round")]


def test_a_lukewarm_answer_does_not_agree_to_a_proposal() -> None:
    # "that's a possibility", "maybe": the room has not agreed yet (common practice: a
    # decision by consensus needs clear assent)
    ledger = run([("Kim Lee", "What about integrating a scroll wheel on this side?"),
                  ("Priya Shah", "Yeah, uh, that's a possibility."),
                  ("Tom Brandt", "Should we use rubber buttons?"),
                  ("Priya Shah", "Yeah, maybe, if it's not too expensive.")])
    assert ledger.decisions == ()


def test_an_option_is_not_a_proposal_but_a_recommendation_is() -> None:
    ledger = run([("Kim Lee", "In fact we could get the frequencies out of the synthesizer."),
                  ("Priya Shah", "Yeah."),
                  ("Tom Brandt", "I think we should use rubber buttons."),
                  ("Priya Shah", "Yeah.")])
    assert [d.text for d in ledger.decisions] == ["Use rubber buttons"]


def test_handing_the_floor_is_not_an_action() -> None:
    ledger = run([("Kim Lee", "So I'll let Tom do his presentation."),
                  ("Tom Brandt", "Thanks."),
                  ("Kim Lee", "And I'll let the landlord know about the lease by Friday.")])
    assert [a.task for a in ledger.actions] == ["let the landlord know about the lease"]


def test_a_progressive_hand_over_reassigns_the_item() -> None:
    ledger = run([("Kim Lee", "We need someone to print the barcode labels by Friday."),
                  ("Tom Brandt", "I can do it, I'm at the main branch anyway."),
                  ("Kim Lee", "Great, so Priya's taking the labels, still for Friday.")])
    assert [(a.task, a.owner) for a in ledger.actions] == [("print the barcode labels",
                                                            "Priya Shah")]


def test_that_is_done_after_a_named_deed_refers_to_that_deed() -> None:
    # "you sent the photos last week, so that's done": the photos, not the labels just
    # reassigned
    ledger = run([("Kim Lee", "Tom, can you print the barcode labels by Friday?"),
                  ("Tom Brandt", "Sure."),
                  ("Kim Lee", "And Priya, you sent the photos last week, so that's done already.")])
    assert [(a.task, a.status) for a in ledger.actions] == [("print the barcode labels", "open")]


def test_a_carried_items_earlier_changes_do_not_make_it_just_mentioned() -> None:
    # Week 1 gave the item an owner at 1,497 s of week 1's clock. Three minutes into week 2
    # that is not "a minute ago": "he's moved it to Thursday" must not re-date it.
    from minutes.relay.ledger import relay
    from minutes.relay.rules import RulesReader
    from minutes.relay.state import NEVER, last_time

    first = Evidence(3, "359", 1490.0, 1494.0, "Kim Lee", "we need someone to print the labels")
    taken = Evidence(4, "361", 1497.0, 1499.0, "Tom Brandt", "I can do it")
    item = ActionItem("A4", "print the barcode labels", "Tom Brandt", None, "open", 1490.0,
                      (first, taken),
                      history=(Change("created", None, first), Change("owner", "Tom Brandt", taken),
                               Change("carried", "A4 from week 1", first, source="series")),
                      source="series")
    assert last_time(item) == NEVER
    ctx, segments = meeting([("Kim Lee", "Priya, the survey's tomorrow, right?"),
                             ("Priya Shah", "No, he's moved it to next Thursday.")])
    ledger = relay(segments, RulesReader(ctx), Ledger(actions=(item,))).ledger
    assert ledger.actions[0].due is None
