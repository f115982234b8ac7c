"""The rules reader on small hand-built meetings (invented lines), parsed with the real pipeline."""

from __future__ import annotations

import datetime as dt
from collections.abc import Sequence

import pytest

from minutes import nlp
from minutes.model import Cue, Ledger, MeetingInfo, Person, Segment, Transcript, Utterance
from minutes.relay.context import ReadContext
from minutes.relay.ledger import RelayResult, relay, replay
from minutes.relay.reconcile import reconcile
from minutes.relay.rules import RulesReader
from minutes.speakers import Directory

WED = dt.date(2025, 3, 5)
PEOPLE = Directory((Person("Kim Lee"), Person("Priya Shah", aliases=("Pri",)),
                    Person("Tom Brandt")))


def meeting(lines: Sequence[tuple[str, str | Sequence[str]]], *, cuts: Sequence[int] = (),
            directory: Directory = PEOPLE, date: dt.date | None = WED,
            next_meeting: dt.date | None = dt.date(2025, 3, 12)
            ) -> tuple[ReadContext, tuple[Segment, ...]]:
    """Return the context and segments of a meeting; a line may hold several cues."""
    utterances = []
    t = 0.0
    n = 0
    for i, (speaker, said) in enumerate(lines):
        parts = [said] if isinstance(said, str) else list(said)
        cues = []
        for part in parts:
            d = len(part.split()) / 2.5
            cues.append(Cue(f"c{n}", t, t + d, part))
            n += 1
            t += d
        utterances.append(Utterance(i, cues[0].start, t, speaker, " ".join(parts), tuple(cues),
                                    speaker))
        t += 0.6
    transcript = Transcript(tuple(utterances),
                            meeting=MeetingInfo(date=date, next_meeting=next_meeting))
    ctx = ReadContext(transcript, nlp.parse(transcript.utterances), directory)
    bounds = [0, *cuts, len(utterances)]
    segments = tuple(
        Segment(k, a, b - 1, utterances[a].start, utterances[b - 1].end,
                tuple(utterances[a:b]))
        for k, (a, b) in enumerate(zip(bounds, bounds[1:], strict=False))
    )
    return ctx, segments


def run(lines: Sequence[tuple[str, str | Sequence[str]]], **kw: object) -> Ledger:
    ctx, segments = meeting(lines, **kw)  # type: ignore[arg-type]
    return reconcile(relay(segments, RulesReader(ctx)).ledger, ctx)


def only_action(ledger: Ledger) -> tuple[str, str | None, dt.date | None, str]:
    assert len(ledger.actions) == 1, [a.task for a in ledger.actions]
    a = ledger.actions[0]
    return a.task, a.owner, a.due, a.status


# --------------------------------------------------------------------------- actions


def test_self_commitment_with_date_and_evidence() -> None:
    ledger = run([("Kim Lee", ["Okay, um, so first thing.",
                               "I'll send the revised lease to the landlord by Friday."]),
                  ("Priya Shah", "Great, thanks.")])
    assert only_action(ledger) == ("send the revised lease to the landlord", "Kim Lee",
                                   dt.date(2025, 3, 7), "open")
    item = ledger.actions[0]
    assert item.due_text == "by Friday"
    ev = item.evidence[0]
    assert (ev.utterance, ev.cue, ev.speaker) == (0, "c1", "Kim Lee")  # the cue that holds it
    assert "revised lease" in ev.quote


def test_fillers_are_removed_from_the_task() -> None:
    ledger = run([("Kim Lee", "Um, I'll, uh, you know, send the, the agenda round tomorrow."),
                  ("Tom Brandt", "Okay.")])
    assert only_action(ledger)[:3] == ("send the agenda round", "Kim Lee", dt.date(2025, 3, 6))


def test_let_me_look_into() -> None:
    ledger = run([("Priya Shah", "The parking is a problem."),
                  ("Tom Brandt", "Let me look into the parking permits.")])
    assert only_action(ledger)[:2] == ("look into the parking permits", "Tom Brandt")


def test_talk_in_the_room_is_not_an_action() -> None:
    ledger = run([("Kim Lee", "I'll just show you the slides quickly."),
                  ("Kim Lee", "Let me explain how the quotes work."),
                  ("Tom Brandt", "I think we should talk about the budget.")])
    assert ledger.actions == ()


def test_vocative_request_owner_is_the_person_named() -> None:
    ledger = run([("Priya Shah", "Tom, can you book the van for next Wednesday?"),
                  ("Tom Brandt", "Sure.")])
    assert only_action(ledger) == ("book the van", "Tom Brandt", dt.date(2025, 3, 12), "open")


def test_request_without_a_name_goes_to_the_previous_speaker() -> None:
    ledger = run([("Kim Lee", "The printer quote came in this morning."),
                  ("Priya Shah", "Could you forward the quote to the treasurer?")])
    assert only_action(ledger)[:2] == ("forward the quote to the treasurer", "Kim Lee")


def test_named_person_resolved_through_the_directory() -> None:
    ledger = run([("Kim Lee", "And Pri's going to draft the newsletter before the next meeting."),
                  ("Tom Brandt", "Good.")])
    assert only_action(ledger) == ("draft the newsletter", "Priya Shah", dt.date(2025, 3, 12),
                                   "open")


def test_we_stays_unassigned_until_someone_takes_it() -> None:
    ledger = run([("Tom Brandt", "We need someone to call the caterer."),
                  ("Kim Lee", "Right.")])
    assert only_action(ledger)[:2] == ("call the caterer", None)
    ledger = run([("Tom Brandt", "We need someone to call the caterer."),
                  ("Priya Shah", "I can take that.")])
    assert only_action(ledger)[:2] == ("call the caterer", "Priya Shah")
    assert [c.kind for c in ledger.actions[0].history] == ["created", "owner"]


def test_explicit_action_item_marker() -> None:
    ledger = run([("Tom Brandt", "Action item: Priya to draft the newsletter."),
                  ("Kim Lee", "Noted.")])
    assert only_action(ledger)[:2] == ("draft the newsletter", "Priya Shah")


def test_two_commitments_in_one_sentence_each_with_its_date() -> None:
    ledger = run([("Kim Lee", "I'll sign it tomorrow and I'll send the lease back by Friday."),
                  ("Tom Brandt", "Thanks.")])
    got = {(a.task, a.due) for a in ledger.actions}
    assert got == {("sign it", dt.date(2025, 3, 6)),
                   ("send the lease back", dt.date(2025, 3, 7))}


def test_same_task_said_twice_is_one_item() -> None:
    ledger = run([("Kim Lee", "I'll book the community hall for the fair."),
                  ("Tom Brandt", "Great."),
                  ("Kim Lee", "So yes, I'll book the community hall by Friday.")])
    assert only_action(ledger) == ("book the community hall for the fair", "Kim Lee",
                                   dt.date(2025, 3, 7), "open")


# --------------------------------------------------------------------------- updates


def test_reassigned_later_in_another_segment() -> None:
    ledger = run([("Kim Lee", "I'll send the revised lease to the landlord by Friday."),
                  ("Priya Shah", "Good."),
                  ("Tom Brandt", "Something else now, the stand."),
                  ("Kim Lee", "Actually Tom will take the lease instead.")], cuts=(3,))
    item = ledger.actions[0]
    assert (item.owner, item.due) == ("Tom Brandt", dt.date(2025, 3, 7))
    change = item.history[-1]
    assert (change.kind, change.value, change.evidence.utterance) == ("owner", "Tom Brandt", 3)


def test_date_pushed_done_and_dropped() -> None:
    ledger = run([("Priya Shah", "Tom, can you book the van for next Wednesday?"),
                  ("Tom Brandt", "Yes. And I'll call the caterer about the menu."),
                  ("Kim Lee", "Let's push the van to the end of next week."),
                  ("Priya Shah", "Fine."),
                  ("Tom Brandt", "Oh, I already called the caterer."),
                  ("Kim Lee", "And actually, let's forget the van.")], cuts=(2, 4))
    van, caterer = ledger.actions
    assert van.task == "book the van" and van.status == "dropped"
    assert van.due == dt.date(2025, 3, 14)
    assert [c.kind for c in van.history] == ["created", "due", "dropped"]
    assert caterer.task == "call the caterer about the menu" and caterer.status == "done"


def test_pronoun_points_at_the_item_just_discussed() -> None:
    ledger = run([("Kim Lee", "I'll print the labels for the new tools."),
                  ("Tom Brandt", "I'll measure the back room."),
                  ("Kim Lee", "About the labels, the printer is late."),
                  ("Kim Lee", "Can we push that to the fourteenth of March?")])
    labels = next(a for a in ledger.actions if "labels" in a.task)
    room = next(a for a in ledger.actions if "room" in a.task)
    assert (labels.due, room.due) == (dt.date(2025, 3, 14), None)


# --------------------------------------------------------------------------- decisions


def test_explicit_decision() -> None:
    ledger = run([("Kim Lee", "So we've decided to hold the fair in May."),
                  ("Tom Brandt", "Good.")])
    assert [(d.text, d.by) for d in ledger.decisions] == [("Hold the fair in May", "Kim Lee")]
    assert ledger.decisions[0].evidence[0].utterance == 0


def test_proposal_agreed_in_the_next_turn() -> None:
    ledger = run([("Kim Lee", "Should we go with the blue banner for the stand?"),
                  ("Priya Shah", "Yeah, fine by me.")])
    decision = ledger.decisions[0]
    assert decision.text == "Go with the blue banner for the stand"
    assert decision.proposal == "P1" and decision.by == "Kim Lee"
    assert [e.utterance for e in decision.evidence] == [0, 1]


def test_proposal_agreed_across_a_segment_boundary() -> None:
    lines = [("Tom Brandt", "The printer quotes are both fine."),
             ("Kim Lee", "Shall we go with the cheaper printer?"),
             ("Priya Shah", "Sounds good to me.")]
    ctx, segments = meeting(lines, cuts=(2,))
    result = relay(segments, RulesReader(ctx))
    assert result.steps[0].ops and result.ledger.proposals[0].status == "accepted"
    first = relay(segments[:1], RulesReader(ctx)).ledger
    assert first.pending_proposals[0].text == "Go with the cheaper printer"  # carried over
    assert result.ledger.decisions[0].text == "Go with the cheaper printer"
    assert result.ledger.decisions[0].evidence[-1].utterance == 2


def test_rejected_or_hanging_proposal_is_no_decision() -> None:
    ledger = run([("Tom Brandt", "Should we also order new chairs for the hall?"),
                  ("Kim Lee", "No, I don't think so."),
                  ("Priya Shah", "Maybe we should charge a small fee at the door."),
                  ("Priya Shah", "Anyway, the rota is next.")])
    assert ledger.decisions == ()
    assert {p.text: p.status for p in ledger.proposals} == {
        "Order new chairs for the hall": "rejected",
        "Charge a small fee at the door": "lapsed",  # left hanging: lapses at the end
    }


# --------------------------------------------------------------------------- questions


def test_open_question_stays_open_and_is_closed_later() -> None:
    lines = [("Priya Shah", "What is the budget for the stand this year?"),
             ("Kim Lee", "Let's go with the cheaper printer."),
             ("Tom Brandt", "Should we also order new chairs?"),
             ("Kim Lee", "No, I don't think so.")]
    ledger = run(lines)
    assert [(q.text, q.asked_by, q.answered) for q in ledger.questions] == [
        ("What is the budget for the stand this year?", "Priya Shah", False)]
    later = [*lines, ("Tom Brandt", "Other things now."),
             ("Kim Lee", "About the budget for the stand, it is four hundred this year.")]
    ledger = run(later, cuts=(4,))
    assert ledger.questions[0].answered
    assert ledger.questions[0].history[-1].evidence.utterance == 5


def test_answered_question_is_not_minuted() -> None:
    ledger = run([("Priya Shah", "Who has got the keys to the unit at the moment?"),
                  ("Kim Lee", "The agent has them until the lease is signed.")])
    assert ledger.questions == ()


def test_question_answered_at_the_start_of_the_next_segment() -> None:
    ledger = run([("Kim Lee", "Right, the hall."),
                  ("Priya Shah", "Does the hall have a kitchen we can use?"),
                  ("Tom Brandt", "Yes, there is a small kitchen at the back.")], cuts=(2,))
    assert [q.answered for q in ledger.questions] == [True]


# --------------------------------------------------------------------------- the fold


def test_a_step_is_pure_and_replay_reproduces_the_run() -> None:
    ctx, segments = meeting([("Kim Lee", "I'll send the lease by Friday."),
                             ("Priya Shah", "Should we go with the blue banner?"),
                             ("Tom Brandt", "Yeah."),
                             ("Kim Lee", "Actually Tom will take the lease instead.")],
                            cuts=(2,))
    reader = RulesReader(ctx)
    result: RelayResult = relay(segments, reader)
    assert replay(result.steps) == result.ledger
    again = relay(segments, RulesReader(ctx))
    assert again.steps == result.steps
    carried = relay(segments[:1], reader).ledger
    assert reader.read(carried, segments[1]) == reader.read(carried, segments[1])


@pytest.mark.parametrize("date", [None, WED])
def test_due_text_is_kept_when_the_date_cannot_be_resolved(date: dt.date | None) -> None:
    ledger = run([("Kim Lee", "I'll send the minutes round before the next meeting."),
                  ("Tom Brandt", "Thanks.")], date=date, next_meeting=None)
    item = ledger.actions[0]
    assert (item.due, item.due_text) == (None, "before the next meeting")
