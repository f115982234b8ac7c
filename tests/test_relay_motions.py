"""The motion reader: motions, seconds, amendments, votes, outcomes and flags for the clerk.

Every meeting here is a few hand-written lines of an invented board. The record these tests
ask for is what Robert's Rules of Order says minutes hold (1915 §60 (f): every main motion
and whether it was adopted or lost; 1876 §51: on a division the number of votes on each side,
on a roll call the names on each side), read from
../shared/evaldata/standards/minutes_content_rules.md. How a chair runs a voice vote ("all in
favor... opposed... abstentions") and "without objection, so ordered" is common practice.
"""

from __future__ import annotations

import datetime as dt
import json
import re
from dataclasses import replace
from pathlib import Path

import pytest

from minutes import nlp
from minutes.model import (
    Cue,
    Ledger,
    MeetingInfo,
    Motion,
    Person,
    Roster,
    Segment,
    Transcript,
    Utterance,
    Vote,
)
from minutes.relay.context import Combined, ReadContext
from minutes.relay.ledger import relay
from minutes.relay.motions import MotionReader, counts_in, figures, settle, tally_outcome
from minutes.speakers import Directory

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "demo_meetings"

PEOPLE = (
    Person("Ada Voss", "chair", ("Madam Chair", "Chair Voss"), votes=True),
    Person("Carla Ramirez", "member", ("Director Ramirez",), votes=True),
    Person("Dev Okafor", "member", votes=True),
    Person("Erin Chen", "treasurer", votes=True),
    Person("Frank Lee", "member", votes=True),
    Person("Gina Park", "member", votes=True),
    Person("Hugo Novak", "member", votes=True),
    Person("Sam Hale", "secretary"),
)
MEMBERS = tuple(p.name for p in PEOPLE if p.votes)
ROSTER = Roster("Harbour Board", MEMBERS, (("chair", "Ada Voss"), ("secretary", "Sam Hale")))


def context(lines: list[str], roster: Roster = ROSTER, meeting: MeetingInfo | None = None,
            people: tuple[Person, ...] = PEOPLE) -> ReadContext:
    """Return a read context for "Speaker: text" lines, five seconds apart, one cue each."""
    utterances = []
    for i, line in enumerate(lines):
        speaker, text = (part.strip() for part in line.split(":", 1))
        start = i * 5.0
        cue = Cue(str(i + 1), start, start + 4.0, text)
        utterances.append(Utterance(i, start, start + 4.0, speaker, text, (cue,), speaker))
    transcript = Transcript(tuple(utterances), meeting=meeting or MeetingInfo())
    return ReadContext(transcript, nlp.parse(utterances), Directory(people, roster))


def segments(ctx: ReadContext, per: int) -> list[Segment]:
    """Return the transcript cut into segments of ``per`` utterances."""
    utts = ctx.transcript.utterances
    out = []
    for k, first in enumerate(range(0, len(utts), per)):
        part = utts[first:first + per]
        out.append(Segment(k, first, first + len(part) - 1, part[0].start, part[-1].end, part))
    return out


def read(lines: list[str], *, per: int | None = None, **kwargs: object) -> Ledger:
    """Return the settled ledger the motion reader builds from ``lines``."""
    ctx = context(lines, **kwargs)  # type: ignore[arg-type]
    result = relay(segments(ctx, per or len(lines)), Combined((MotionReader(ctx),)))
    assert all(not step.rejected for step in result.steps), [s.rejected for s in result.steps]
    return settle(result.ledger, ctx)


def only(ledger: Ledger) -> Motion:
    assert len(ledger.motions) == 1, [m.text for m in ledger.motions]
    return ledger.motions[0]


def quotes(motion: Motion, kind: str) -> list[str]:
    """Return the quotes that support a motion's changes of one kind."""
    return [c.evidence.quote for c in motion.history if c.kind == kind]


# --------------------------------------------------------------------------- moved, seconded, voice


BASIC = [
    "Ada Voss: Next is the paving contract. Do I have a motion to approve the contract with "
    "Harbor Paving for $48,000?",
    "Carla Ramirez: So moved.",
    "Dev Okafor: Second.",
    "Ada Voss: Moved by Director Ramirez, seconded by Okafor. Any discussion?",
    "Frank Lee: I think the price is fair.",
    "Ada Voss: All in favor, say aye.",
    "Carla Ramirez: Aye.",
    "Gina Park: Aye.",
    "Ada Voss: Opposed? Abstentions?",
    "Ada Voss: The motion carries.",
]


def test_so_moved_takes_the_chairs_wording_and_a_voice_vote_is_not_counted() -> None:
    m = only(read(BASIC))
    assert m.text == "Approve the contract with Harbor Paving for $48,000"
    assert (m.mover, m.seconder, m.kind) == ("Carla Ramirez", "Dev Okafor", "main")
    # the ayes are heard, not counted: no number is invented
    assert m.vote == Vote("voice", None, None, None, ())
    assert m.outcome == "carried"
    assert not m.flags
    # evidence for every field: who moved (and the chair's words it answers), who seconded,
    # how it was voted, what the chair announced
    assert [e.quote for e in m.evidence[:2]] == ["So moved.", BASIC[0].split(". ", 1)[1]]
    assert quotes(m, "seconded") == ["Second."]
    assert quotes(m, "vote") == ["All in favor, say aye."]
    assert quotes(m, "outcome") == ["The motion carries."]
    assert m.evidence[0].cue == "2" and m.time == 5.0


def test_motion_wording_is_the_that_clause_without_fillers() -> None:
    m = only(read(["Erin Chen: I move that we, um, adopt the, uh, budget as presented.",
                   "Gina Park: I'll second that."]))
    assert m.text == "Adopt the budget as presented"
    assert (m.mover, m.seconder, m.outcome) == ("Erin Chen", "Gina Park", "pending")


@pytest.mark.parametrize("said, text", [
    ("I'll make a motion to close the library on Sundays.", "Close the library on Sundays"),
    ("I move we extend the pool hours to 9 p.m.", "Extend the pool hours to 9 p.m."),
    ("I move that the board approve the lease with Pier Seven.",
     "Approve the lease with Pier Seven"),
    ("Motion to accept the audit report.", "Accept the audit report"),
])
def test_ways_of_moving(said: str, text: str) -> None:
    m = only(read([f"Frank Lee: {said}", "Hugo Novak: Seconded."]))
    assert (m.text, m.mover, m.seconder) == (text, "Frank Lee", "Hugo Novak")


def test_a_second_by_the_mover_or_long_after_is_not_a_second() -> None:
    lines = ["Frank Lee: I move to repaint the boathouse.", "Frank Lee: I second that."]
    lines += [f"Gina Park: Point number {i} about paint colours." for i in range(14)]
    lines += ["Hugo Novak: Second."]
    assert only(read(lines)).seconder is None


def test_talk_about_moving_is_not_a_motion() -> None:
    ledger = read(["Ada Voss: I'd like to move to the next item now.",
                   "Frank Lee: We moved to the new office last year.",
                   "Gina Park: If the motion passes, we should tell the staff?"])
    assert ledger.motions == ()


# --------------------------------------------------------------------------- counted votes


ROLL = [
    "Erin Chen: I move that we adopt the budget as presented.",
    "Gina Park: I will second that.",
    "Ada Voss: We will take a roll call vote. Sam, please call the roll.",
    "Sam Hale: Director Ramirez?", "Carla Ramirez: Aye.",
    "Sam Hale: Director Okafor?", "Dev Okafor: No.",
    "Sam Hale: Director Chen?", "Erin Chen: Yes.",
    "Sam Hale: Director Lee?", "Frank Lee: Nay.",
    "Sam Hale: Director Park?", "Gina Park: Aye.",
    "Sam Hale: Director Novak?", "Hugo Novak: Abstain.",
    "Sam Hale: Chair Voss?", "Ada Voss: Aye.",
    "Sam Hale: That is four ayes, two nays, and one abstention.",
    "Ada Voss: The motion carries.",
]


def test_roll_call_records_each_name_and_counts_from_them() -> None:
    m = only(read(ROLL))
    assert m.vote.method == "roll_call"
    assert dict(m.vote.roll_call) == {
        "Carla Ramirez": "aye", "Dev Okafor": "no", "Erin Chen": "aye", "Frank Lee": "no",
        "Gina Park": "aye", "Hugo Novak": "abstain", "Ada Voss": "aye"}
    assert (m.vote.for_, m.vote.against, m.vote.abstain) == (4, 2, 1)
    assert m.outcome == "carried" and not m.flags
    # each answer is evidence of that member's vote
    assert [c.value for c in m.history if c.kind == "vote"][:2] == ["Carla Ramirez: aye",
                                                                   "Dev Okafor: no"]


def test_roll_call_names_come_from_the_call_when_captions_do_not_name_speakers() -> None:
    """Speech recognition labels speakers SPEAKER_nn: the name called is the voter."""
    lines = ["Erin Chen: I move that we adopt the budget.", "Gina Park: Second.",
             "Ada Voss: Clerk, please call the roll.",
             "Sam Hale: Ramirez?", "SPEAKER_03: Aye.",
             "Sam Hale: Okafor?", "SPEAKER_07: No.",
             "Sam Hale: Chen, aye. Lee?", "SPEAKER_01: Aye.",
             "Ada Voss: The motion carries."]
    m = only(read(lines))
    assert m.vote.roll_call == (("Carla Ramirez", "aye"), ("Dev Okafor", "no"),
                                ("Erin Chen", "aye"), ("Frank Lee", "aye"))
    assert (m.vote.for_, m.vote.against, m.vote.abstain) == (3, 1, 0)


def test_counted_vote_five_to_two() -> None:
    m = only(read(["Frank Lee: I move to buy a second rescue boat.", "Dev Okafor: Second.",
                   "Ada Voss: All in favor? Opposed?",
                   "Ada Voss: The motion carries five to two."]))
    assert (m.vote.for_, m.vote.against, m.vote.abstain) == (5, 2, None)
    assert m.outcome == "carried" and not m.flags


def test_counted_vote_stated_in_full() -> None:
    m = only(read(["Frank Lee: I move to buy a second rescue boat.", "Dev Okafor: Second.",
                   "Ada Voss: All those in favor, raise your hand.",
                   "Ada Voss: That's four in favor, two opposed, one abstention.",
                   "Ada Voss: The motion passes."]))
    assert (m.vote.method, m.vote.for_, m.vote.against, m.vote.abstain) == ("count", 4, 2, 1)
    assert m.outcome == "carried"


def test_show_of_hands_counted_phase_by_phase_and_failed() -> None:
    m = only(read(["Frank Lee: I make a motion to close the library on Sundays.",
                   "Dev Okafor: Second.",
                   "Ada Voss: All in favor, raise your hand. I count two. Those opposed? Five.",
                   "Ada Voss: The motion fails."]))
    assert (m.vote.method, m.vote.for_, m.vote.against) == ("count", 2, 5)
    assert m.outcome == "failed" and not m.flags


def test_hands_shown_but_not_counted_aloud_is_flagged() -> None:
    m = only(read(["Frank Lee: I move to buy a kayak.", "Dev Okafor: Second.",
                   "Ada Voss: All in favor, raise your hand. Opposed?",
                   "Ada Voss: The motion carries."]))
    assert m.outcome == "carried"
    assert (m.vote.for_, m.vote.against) == (None, None)
    assert any("number on each side" in f for f in m.flags)


@pytest.mark.parametrize("said, counts", [
    ("The motion carries five to two.", (5, 2, None)),
    ("That's four in favor, two opposed, one abstention.", (4, 2, 1)),
    ("It passes 6-1-0.", (6, 1, 0)),
    ("Seven ayes, no nays.", (7, 0, None)),
    ("The motion carries with two opposed.", (None, 2, None)),
    ("Let's take two to three weeks on that.", (None, None, None)),
])
def test_counts_stated(said: str, counts: tuple) -> None:
    assert counts_in(said) == counts


# --------------------------------------------------------------------------- amendments, others


AMEND = [
    "Erin Chen: I move that we approve the contract with Harbor Paving for $48,000.",
    "Gina Park: Seconded.",
    "Frank Lee: I move to amend the motion by changing $48,000 to $45,000.",
    "Carla Ramirez: Second.",
    "Ada Voss: All in favor of the amendment?",
    "Carla Ramirez: Aye.",
    "Ada Voss: Opposed?",
    "Ada Voss: The amendment carries five to two.",
    "Ada Voss: Now the main motion as amended. All those in favor?",
    "Gina Park: Aye.",
    "Ada Voss: Any opposed?",
    "Dev Okafor: No.",
    "Ada Voss: The motion as amended passes.",
]


def test_amendment_is_voted_first_then_the_main_motion_as_amended() -> None:
    main, amendment = read(AMEND).motions
    assert (amendment.kind, amendment.amends, amendment.mover) == ("amendment", main.id,
                                                                    "Frank Lee")
    assert amendment.outcome == "carried"
    assert (amendment.vote.for_, amendment.vote.against) == (5, 2)
    assert main.text == "Approve the contract with Harbor Paving for $45,000"
    assert [c.value for c in main.history if c.kind == "amended"] == [main.text]
    assert quotes(main, "amended") == ["The amendment carries five to two."]
    assert main.outcome == "carried" and quotes(main, "outcome") == [
        "The motion as amended passes."]
    # the amendment was voted before the main motion
    assert amendment.history[-1].evidence.start < main.history[-1].evidence.start


def test_amendment_wording_the_reader_cannot_work_out_is_flagged_not_guessed() -> None:
    lines = AMEND[:2] + ["Frank Lee: I move to amend the motion so the work starts in spring.",
                         "Carla Ramirez: Second.", "Ada Voss: All in favor of the amendment?",
                         "Ada Voss: The amendment carries."]
    main = read(lines).motions[0]
    assert main.text.startswith("Approve the contract with Harbor Paving for $48,000, amended:")
    assert any("could not be worked out" in f for f in main.flags)


def test_withdrawn_by_the_mover() -> None:
    m = only(read(["Dev Okafor: I move we hire a second auditor.", "Hugo Novak: Second.",
                   "Dev Okafor: Actually, I would like to withdraw my motion.",
                   "Ada Voss: The motion is withdrawn."]))
    assert m.outcome == "withdrawn"
    assert quotes(m, "withdrawn") == ["Actually, I would like to withdraw my motion.",
                                      "The motion is withdrawn."]


def test_postponed_to_a_date() -> None:
    lines = ["Carla Ramirez: I move to purchase a new van for the shelter.",
             "Frank Lee: I second it.",
             "Gina Park: I move to postpone this until the March 14 meeting.",
             "Hugo Novak: Second.",
             "Ada Voss: All in favor of postponing? Opposed? The motion to postpone carries."]
    main, postpone = read(lines, meeting=MeetingInfo(date=dt.date(2027, 2, 9))).motions
    assert (postpone.kind, postpone.outcome, postpone.amends) == ("postpone", "carried", None)
    assert main.outcome == "postponed"
    assert [c.value for c in main.history if c.kind == "postponed"] == [
        "until the March 14 meeting (2027-03-14)"]


def test_tabled_without_objection() -> None:
    m = only(read(["Carla Ramirez: I move to purchase a new van.", "Frank Lee: Second.",
                   "Ada Voss: Without objection, we'll table this until the next meeting."],
                  meeting=MeetingInfo(date=dt.date(2027, 2, 9),
                                      next_meeting=dt.date(2027, 3, 9))))
    assert m.outcome == "tabled"
    assert [c.value for c in m.history if c.kind == "tabled"] == [
        "until the next meeting (2027-03-09)"]


def test_referred_to_a_committee() -> None:
    lines = ["Erin Chen: I move that we adopt the new parking policy.", "Frank Lee: Second.",
             "Gina Park: I move to refer the motion to the Finance Committee.",
             "Dev Okafor: Second.", "Ada Voss: All in favor?", "Ada Voss: Motion passes."]
    main, refer = read(lines).motions
    assert refer.kind == "refer" and refer.outcome == "carried"
    assert main.outcome == "referred"
    assert [c.value for c in main.history if c.kind == "referred"] == ["to the Finance Committee"]


def test_unanimous_consent_on_the_chairs_proposal() -> None:
    m = only(read(["Ada Voss: Is there any objection to approving the agenda as presented?",
                   "Ada Voss: Hearing none, so ordered."]))
    assert m.text == "Approve the agenda as presented"
    assert (m.vote.method, m.outcome, m.mover) == ("consent", "carried", "")
    assert any("general consent" in f for f in m.flags)  # no motion was made: say so


def test_objection_blocks_consent() -> None:
    m = only(read(["Frank Lee: I move to close the pier in winter.", "Gina Park: Second.",
                   "Ada Voss: Is there any objection?", "Dev Okafor: I object.",
                   "Ada Voss: Then we'll vote. All in favor? Opposed?",
                   "Ada Voss: The motion carries six to one."]))
    assert (m.vote.method, m.vote.for_, m.vote.against, m.outcome) == ("voice", 6, 1, "carried")


def test_dies_for_lack_of_a_second() -> None:
    m = only(read(["Frank Lee: I move to sell the boathouse.", "Ada Voss: Is there a second?",
                   "Ada Voss: Hearing no second, the motion dies for lack of a second."]))
    assert m.outcome == "failed" and m.seconder is None
    assert "died for lack of a second" in m.flags


def test_a_motion_never_voted_on_stays_pending() -> None:
    m = only(read(["Frank Lee: I move to sell the boathouse.", "Gina Park: Second.",
                   "Dev Okafor: I have a lot of questions about the boathouse roof, honestly.",
                   "Ada Voss: Let's come back to that after the break."]))
    assert (m.outcome, m.vote.method, m.flags) == ("pending", "none", ())


# --------------------------------------------------------------------------- outcomes and flags


def test_announcement_disagreeing_with_the_tally_is_flagged() -> None:
    m = only(read(["Gina Park: I move we extend the pool hours.", "Hugo Novak: Second.",
                   "Ada Voss: All in favor? Opposed? That is three in favor, four opposed.",
                   "Ada Voss: The motion carries."]))
    assert m.outcome == "carried"  # what the chair announced is the record...
    assert any(f.startswith("the chair announced the motion carried, but the tally 3-4")
               for f in m.flags)  # ...and the clerk is told it does not add up


def test_roll_call_tie_announced_as_carried_is_flagged() -> None:
    lines = ["Erin Chen: I move to join the regional cooperative.", "Gina Park: Second.",
             "Ada Voss: Sam, call the roll.",
             "Sam Hale: Ramirez?", "Carla Ramirez: Aye.", "Sam Hale: Okafor?", "Dev Okafor: No.",
             "Sam Hale: Chen?", "Erin Chen: Aye.", "Sam Hale: Lee?", "Frank Lee: No.",
             "Ada Voss: Okay, so, that's, the motion carries."]
    m = only(read(lines))
    assert (m.vote.for_, m.vote.against, m.vote.abstain) == (2, 2, 0)
    assert m.outcome == "carried" and any("means it failed" in f for f in m.flags)


def test_unclear_roll_call_answer_leaves_counts_for_the_clerk() -> None:
    lines = ROLL[:6] + ["Dev Okafor: [inaudible]"] + ROLL[7:17] + ["Ada Voss: The motion carries."]
    m = only(read(lines))
    assert (m.vote.for_, m.vote.against, m.vote.abstain) == (None, None, None)
    assert "Dev Okafor" not in dict(m.vote.roll_call)  # never guessed
    assert any("Dev Okafor was not clear" in f for f in m.flags)


def test_vote_with_no_result_heard_is_flagged_and_left_pending() -> None:
    m = only(read(["Carla Ramirez: I move to approve the grant application.",
                   "Erin Chen: Second.", "Ada Voss: All in favor?", "Carla Ramirez: [inaudible]",
                   "Ada Voss: Opposed?",
                   "Ada Voss: Okay, next item is the librarian's report on the summer program."]))
    assert m.outcome == "pending"
    assert m.vote == Vote("voice", None, None, None, ())
    assert any("responses could not be made out" in f for f in m.flags)
    assert any("no result was heard" in f for f in m.flags)


def test_hedged_announcement_is_taken_but_flagged() -> None:
    m = only(read(["Tom Berg: I move to refer the bookmobile to the Facilities Committee.",
                   "Gina Park: Second.", "Ada Voss: All in favor?",
                   "Frank Lee: Sorry, does the committee get the mechanic's report on the van?",
                   "Erin Chen: I can send it to the committee as soon as we have it.",
                   "Ada Voss: Okay. I think that carries."]))
    assert m.outcome == "carried"
    assert any("did not state the result plainly" in f for f in m.flags)
    assert any("discussion resumed" in f for f in m.flags)
    assert any("mover's name not known" in f for f in m.flags)  # "Tom Berg" has no profile


def test_two_thirds_threshold_from_the_roster() -> None:
    # the same 4-3 tally: enough for an ordinary motion, not for one the roster puts at 2/3
    roster = replace(ROSTER, two_thirds=("amend the bylaws",))
    lines = ["Erin Chen: I move to {}.", "Frank Lee: Second.",
             "Ada Voss: All in favor? Opposed? That is four in favor, three opposed."]
    bylaws = only(read([lines[0].format("amend the bylaws to allow remote attendance")]
                       + lines[1:], roster=roster))
    ordinary = only(read([lines[0].format("buy new chairs")] + lines[1:], roster=roster))
    assert (bylaws.outcome, ordinary.outcome) == ("failed", "carried")
    assert any("two-thirds" in f for f in bylaws.flags)
    assert tally_outcome(Vote("count", 4, 2, 1), bylaws, roster)[0] == "carried"  # 4 of 6 cast


def test_tie_fails_and_abstentions_are_not_votes_cast() -> None:
    motion = Motion("M1", "Buy chairs", "Erin Chen", None, Vote(), "pending", 0.0, ())
    assert tally_outcome(Vote("count", 3, 3, 0), motion, ROSTER)[0] == "failed"
    assert tally_outcome(Vote("count", 2, 1, 4), motion, ROSTER)[0] == "carried"
    assert tally_outcome(Vote("voice"), motion, ROSTER)[0] is None


def test_settle_computes_the_outcome_from_a_tally_once() -> None:
    ctx = context(["Erin Chen: I move to buy new chairs."])
    ev = MotionReader(ctx).units[0].evidence()
    motion = Motion("M1", "Buy new chairs", "Erin Chen", None, Vote("count", 5, 1, None),
                    "pending", 0.0, (ev,))
    once = settle(Ledger(motions=(motion,)), ctx)
    assert once.motions[0].outcome == "carried"
    assert any(f.startswith("no result was announced") for f in once.motions[0].flags)
    assert settle(once, ctx) == once


def test_segment_boundaries_do_not_change_the_record() -> None:
    lines = BASIC + ROLL
    whole = read(lines)
    for per in (2, 3, 5, 7):
        assert read(lines, per=per) == whole, per


@pytest.mark.parametrize("spoken, written", [
    ("for forty-eight thousand three hundred dollars", "for $48,300"),
    ("at sixty-two hundred dollars a year", "at $6,200 a year"),
    ("from January tenth through May thirtieth, 2027", "from January 10 through May 30, 2027"),
    ("open one to five p.m. on Sundays", "open 1 to 5 p.m. on Sundays"),
    ("section four, ninety days", "section four, ninety days"),
])
def test_figures_in_motion_wording(spoken: str, written: str) -> None:
    assert figures(spoken) == written


# --------------------------------------------------------------------------- the demo board meeting


def _words(text: str) -> set[str]:
    return set(re.sub(r"[^\w$]+", " ", figures(text).lower()).split()) - {"the", "a", "of", "to"}


@pytest.fixture(scope="module")
def demo_board() -> tuple[Ledger, dict]:
    """Return the settled ledger of the demo board meeting, and its answer key."""
    from minutes.ingest import read_transcript
    from minutes.meeting import load_meeting
    from minutes.procedure import ProcedureReader
    from minutes.segment import segment
    from minutes.speakers import load_profiles, resolve_speakers

    key = json.loads((DEMO / "board_regular.key.json").read_text(encoding="utf-8"))
    meeting = load_meeting(DEMO / "board_regular.meeting.toml")
    transcript = replace(read_transcript(DEMO / "board_regular.vtt"), meeting=meeting.info)
    assert meeting.profiles is not None
    directory = load_profiles(meeting.profiles)
    transcript, _ = resolve_speakers(transcript, directory)
    parsed = nlp.parse(transcript.utterances)
    ctx = ReadContext(transcript, parsed, directory)
    reader = Combined((MotionReader(ctx), ProcedureReader(ctx)))
    result = relay(segment(transcript, parsed), reader)
    return settle(result.ledger, ctx), key


def test_demo_board_key(demo_board: tuple[Ledger, dict]) -> None:
    """Every motion in the demo's answer key (invented meeting) with mover, seconder, tally."""
    ledger, key = demo_board
    assert len(ledger.motions) == len(key["motions"])
    for got, want in zip(ledger.motions, key["motions"], strict=True):
        label = want["text"][:40]
        words = _words(want["text"])
        assert len(words & _words(got.text)) >= 0.8 * len(words), (label, got.text)
        assert (got.kind, got.mover, got.seconder) == (want["kind"], want["mover"],
                                                       want["seconder"]), label
        vote = want["vote"]
        assert got.vote.method == vote["method"], label
        assert (got.vote.for_, got.vote.against, got.vote.abstain) == (
            vote["for"], vote["against"], vote["abstain"]), label
        assert dict(got.vote.roll_call) == vote["roll_call"], label
        assert got.outcome == want["outcome"], label
        if want["amends"] is not None:
            assert got.amends == ledger.motions[want["amends"]].id, label
        if want.get("as_amended"):
            assert any(c.kind == "amended" for c in got.history), label
        if want.get("postponed_to"):
            assert any(want["postponed_to"] in (c.value or "") for c in got.history
                       if c.kind == "postponed"), label
        # the key's flagged motions are flagged; and nothing else is
        assert bool(got.flags) == bool(want["flag"]), (label, got.flags)
        # the result is cited at the key's cue
        assert any(e.cue == want["result_cue"] for e in got.evidence), label
