"""The procedural record (call to order, roll call, minutes, reports, public comment, recess,
adjournment), quorum and clock times.

What minutes must record comes from Robert's Rules of Order Revised (1915) §60 and the Pocket
Manual (1876) §51, and for public participation from 44 CFR 12.12, all read from
../shared/evaldata/standards/minutes_content_rules.md (public domain). The majority quorum
default is Robert's rule as stated from memory (the file does not quote it); the phrasing
chairs use ("I'll call this meeting to order", "we're adjourned") is common practice.
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
    Attendee,
    Cue,
    Event,
    MeetingInfo,
    Person,
    Roster,
    Segment,
    Transcript,
    Utterance,
)
from minutes.procedure import (
    ProcedureReader,
    clock_at,
    procedural_events,
    quorum,
    spoken_clock,
)
from minutes.relay.context import Combined, ReadContext
from minutes.relay.ledger import relay
from minutes.relay.motions import MotionReader
from minutes.speakers import Directory

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "demo_meetings"

PEOPLE = (
    Person("Ada Voss", "chair", ("Madam Chair", "Chair Voss"), votes=True),
    Person("Carla Ramirez", "member", votes=True),
    Person("Dev Okafor", "member", votes=True),
    Person("Erin Chen", "treasurer", votes=True),
    Person("Frank Lee", "member", votes=True),
    Person("Sam Hale", "secretary"),
)
MEMBERS = tuple(p.name for p in PEOPLE if p.votes)
ROSTER = Roster("Harbour Board", MEMBERS, (("chair", "Ada Voss"), ("secretary", "Sam Hale")))


def context(lines: list[str], meeting: MeetingInfo | None = None) -> ReadContext:
    """Return a read context for "Speaker: text" lines, ten seconds apart, one cue each."""
    utterances = []
    for i, line in enumerate(lines):
        speaker, text = (part.strip() for part in line.split(":", 1))
        start = i * 10.0
        cue = Cue(str(i + 1), start, start + 8.0, text)
        utterances.append(Utterance(i, start, start + 8.0, speaker, text, (cue,), speaker))
    transcript = Transcript(tuple(utterances), meeting=meeting or MeetingInfo())
    return ReadContext(transcript, nlp.parse(utterances), Directory(PEOPLE, ROSTER))


def whole(ctx: ReadContext) -> list[Segment]:
    utts = ctx.transcript.utterances
    return [Segment(0, 0, len(utts) - 1, utts[0].start, utts[-1].end, utts)]


def events(lines: list[str], meeting: MeetingInfo | None = None) -> tuple[Event, ...]:
    """Return the events the procedure reader finds, beside the motion reader."""
    ctx = context(lines, meeting)
    reader = Combined((MotionReader(ctx), ProcedureReader(ctx)))
    return relay(whole(ctx), reader).ledger.events


def of(kind: str, found: tuple[Event, ...]) -> list[Event]:
    return [e for e in found if e.kind == kind]


# --------------------------------------------------------------------------- quorum


def present(*names: str) -> tuple[Attendee, ...]:
    return tuple(Attendee(n, present=True) for n in names) + (Attendee("Sam Hale", "secretary",
                                                                      True, "staff"),)


def test_quorum_from_the_rosters_rule() -> None:
    roster = replace(ROSTER, quorum=4)
    q = quorum(present("Ada Voss", "Carla Ramirez", "Dev Okafor"), roster)
    assert q is not None
    assert (q.present, q.members, q.required, q.met) == (3, 5, 4, False)
    assert "quorum of 4" in q.rule


def test_quorum_defaults_to_a_majority_of_the_members() -> None:
    # Robert's Rules of Order: without a rule of its own, a body's quorum is a majority of
    # its members (from memory; common practice). Five members: three make a quorum.
    q = quorum(present("Ada Voss", "Carla Ramirez", "Dev Okafor"), ROSTER)
    assert q is not None
    assert (q.present, q.members, q.required, q.met) == (3, 5, 3, True)
    assert "majority" in q.rule and "Robert's Rules of Order" in q.rule
    q2 = quorum(present("Ada Voss", "Carla Ramirez") + (Attendee("Dev Okafor", present=False),),
                ROSTER)
    assert q2 is not None and (q2.present, q2.met) == (2, False)


def test_no_roster_no_quorum() -> None:
    assert quorum(present("Ada Voss"), None) is None
    assert quorum(present("Ada Voss"), Roster("Club")) is None


# --------------------------------------------------------------------------- clock times


def test_clock_at_is_the_start_clock_plus_the_offset() -> None:
    transcript = Transcript((), meeting=MeetingInfo(start_clock=dt.time(18, 30)))
    assert clock_at(transcript, 153.4) == dt.time(18, 32, 33)
    assert clock_at(Transcript((), meeting=MeetingInfo(start_clock=dt.time(23, 59))), 120) \
        == dt.time(0, 1)
    assert clock_at(Transcript(()), 10.0) is None


@pytest.mark.parametrize("said, expected, clock", [
    ("I'll call this meeting to order at 6:32.", dt.time(18, 31), dt.time(18, 32)),
    ("I'll call this meeting to order at 6:32.", None, dt.time(6, 32)),
    ("We are adjourned at 7:41 p.m.", None, dt.time(19, 41)),
    ("Adjourned at seven forty-one p.m.", None, dt.time(19, 41)),
    ("The meeting is called to order at nine oh five in the morning.", None, dt.time(9, 5)),
    ("Let's start at 6.", dt.time(18, 0), None),
])
def test_spoken_clock(said: str, expected: dt.time | None, clock: dt.time | None) -> None:
    assert spoken_clock(said, expected) == clock


def test_call_to_order_and_adjournment_times() -> None:
    found = events(["Ada Voss: Good evening. I'll call this meeting to order at 6:32.",
                    "Frank Lee: I move to adjourn.", "Erin Chen: Second.",
                    "Ada Voss: All in favor? Aye. The motion carries.",
                    "Ada Voss: This meeting is adjourned at 7:41 p.m."],
                   MeetingInfo(start_clock=dt.time(18, 30)))
    assert [(e.kind, e.clock) for e in found] == [("call_to_order", dt.time(18, 32)),
                                                  ("adjournment", dt.time(19, 41))]
    assert found[1].evidence[0].quote == "This meeting is adjourned at 7:41 p.m."


def test_times_not_spoken_come_from_the_recording_clock() -> None:
    found = events(["Ada Voss: The meeting will come to order.",
                    "Ada Voss: Before we adjourn, one reminder about parking.",
                    "Ada Voss: We stand adjourned."], MeetingInfo(start_clock=dt.time(9, 0)))
    assert [(e.kind, e.clock) for e in found] == [("call_to_order", dt.time(9, 0)),
                                                  ("adjournment", dt.time(9, 0, 20))]


def test_recess_and_reconvening() -> None:
    found = events(["Ada Voss: I call the meeting to order.",
                    "Ada Voss: We will take a ten-minute recess.",
                    "Ada Voss: We are back in session."])
    assert [(e.kind, e.detail) for e in found] == [("call_to_order", ""),
                                                   ("recess", "10 minutes"),
                                                   ("call_to_order", "reconvened")]


# --------------------------------------------------------------------------- roll call, minutes


def test_attendance_roll_call_lists_who_answered_present() -> None:
    found = events(["Ada Voss: Will the secretary please call the roll?",
                    "Sam Hale: Yes. Director Ramirez?", "Carla Ramirez: Present.",
                    "Sam Hale: Director Okafor?", "Sam Hale: Director Okafor is absent.",
                    "Sam Hale: Chen, present. Lee?", "Frank Lee: Here.",
                    "Sam Hale: Chair Voss?", "Ada Voss: Here.",
                    "Sam Hale: We have four members present, a quorum."])
    assert [(e.kind, e.detail) for e in found] == [
        ("roll_call", "Carla Ramirez, Erin Chen, Frank Lee, Ada Voss")]


def test_a_roll_call_vote_is_not_attendance() -> None:
    found = events(["Erin Chen: I move that we adopt the budget.", "Frank Lee: Second.",
                    "Ada Voss: Sam, please call the roll.", "Sam Hale: Ramirez?",
                    "Carla Ramirez: Aye.", "Sam Hale: Okafor?", "Dev Okafor: No.",
                    "Ada Voss: The motion carries."])
    assert of("roll_call", found) == []


CORRECTED = [
    "Ada Voss: Are there any corrections to the minutes of the January meeting?",
    "Dev Okafor: Yes, one correction. On page two, under the paving motion, it lists Frank as "
    "the seconder. It should say Erin seconded, not Frank.",
    "Erin Chen: That's right, it was me.",
    "Ada Voss: Any other corrections? Hearing none, the minutes are approved as corrected.",
]


def test_minutes_approved_as_corrected_with_the_correction() -> None:
    (event,) = of("minutes_approved", events(CORRECTED))
    assert event.detail == ("as corrected: On page two, under the paving motion, it lists Frank "
                            "as the seconder. It should say Erin seconded, not Frank")
    assert event.evidence[0].quote.endswith("the minutes are approved as corrected.")


def test_minutes_approved_as_read_on_a_motion() -> None:
    found = events(["Ada Voss: Item two is approval of the minutes of the March meeting. Is "
                    "there a motion to approve?", "Frank Lee: So moved.", "Erin Chen: Second.",
                    "Ada Voss: All in favor? Opposed? The motion carries."])
    assert [(e.kind, e.detail) for e in found] == [("minutes_approved", "as read")]


def test_minutes_approved_with_the_correction_in_the_motion() -> None:
    found = events(["Ada Voss: Do I have a motion to approve the minutes of the special meeting?",
                    "Frank Lee: I move we approve them with the correction that Director "
                    "Okafor was absent.", "Erin Chen: Second.",
                    "Ada Voss: All in favor? The motion carries."])
    assert [(e.kind, e.detail) for e in found] == [
        ("minutes_approved", "as corrected: Director Okafor was absent")]


# --------------------------------------------------------------------------- reports, public


def test_reports_with_title_and_who_gave_them() -> None:
    found = events(["Ada Voss: Item three, the treasurer's report. Erin?",
                    "Erin Chen: Thank you. Our balance at the end of the month was higher than "
                    "expected, and we are on budget.",
                    "Ada Voss: The treasurer's report is received.",
                    "Ada Voss: Next we will hear the Harbour Committee report from Director Lee.",
                    "Frank Lee: The committee met twice and walked the whole seawall.",
                    "Ada Voss: Item nine is the liaison report, but Dev is not here, so we'll "
                    "carry it over."])
    assert [(e.kind, e.detail) for e in found] == [
        ("report", "Treasurer's report, by Erin Chen"),
        ("report", "Harbour Committee report, by Frank Lee")]


def test_public_comment_speakers_as_they_name_themselves() -> None:
    found = events(["Ada Voss: We now open public comment.",
                    "Speaker 4: Hi, my name is Dana Ruiz and I live on Birch Street. The "
                    "parking lot floods every time it rains.",
                    "Ada Voss: Thank you, Ms. Ruiz.",
                    "Speaker 4: Good evening. Caleb Osterhout, Vinegar Hill Road.",
                    "Speaker 4: I walk with a cane and the lot is a hazard.",
                    "Call-in User 2: Hello? This is Yusra Haddad.",
                    "Ada Voss: Seeing no one else, public comment is closed.",
                    "Frank Lee: My name is Frank and I approve this budget."])
    assert [(e.kind, e.detail) for e in found] == [("public_comment", "Dana Ruiz"),
                                                   ("public_comment", "Caleb Osterhout"),
                                                   ("public_comment", "Yusra Haddad")]
    # the record names them; it does not quote them at length
    assert all(len(e.detail.split()) <= 4 for e in found)


def test_procedural_events_folds_the_reader_over_segments() -> None:
    ctx = context(["Ada Voss: I call the meeting to order.", "Ada Voss: We are adjourned."])
    utts = ctx.transcript.utterances
    parts = [Segment(i, i, i, u.start, u.end, (u,)) for i, u in enumerate(utts)]
    assert [e.kind for e in procedural_events(ctx, parts)] == ["call_to_order", "adjournment"]


# --------------------------------------------------------------------------- against the rules text


def test_record_holds_what_roberts_rules_require(evaldata: Path) -> None:
    """RRO 1915 §60 (e) approval of minutes, (f) main motions and results, (g) hours of meeting
    and adjournment; RRO 1876 §51 vote counts on a division and names on a roll call."""
    rules = (evaldata / "standards" / "minutes_content_rules.md").read_text(encoding="utf-8")
    for row in ("approval of previous minutes", "every main motion and its outcome",
                "mover of main motion", "vote counts on division/ballot; names on roll call",
                "hours of meeting and adjournment"):
        assert f"| {row} |" in rules, row  # the checklist this test follows
    lines = ["Ada Voss: I'll call this meeting to order at 6:32.",
             "Ada Voss: Any corrections to the minutes? Hearing none, the minutes are approved "
             "as read.",
             "Erin Chen: I move that we adopt the budget.", "Frank Lee: Second.",
             "Ada Voss: Sam, please call the roll.", "Sam Hale: Ramirez?", "Carla Ramirez: Aye.",
             "Sam Hale: Okafor?", "Dev Okafor: No.", "Sam Hale: Chen?", "Erin Chen: Aye.",
             "Ada Voss: The motion carries, two to one.",
             "Ada Voss: We're adjourned at 7:05."]
    ctx = context(lines, MeetingInfo(start_clock=dt.time(18, 30)))
    ledger = relay(whole(ctx), Combined((MotionReader(ctx), ProcedureReader(ctx)))).ledger
    kinds = [e.kind for e in ledger.events]
    assert kinds == ["call_to_order", "minutes_approved", "adjournment"]
    assert [e.clock for e in ledger.events if e.kind != "minutes_approved"] == [
        dt.time(18, 32), dt.time(19, 5)]
    (m,) = ledger.motions
    assert (m.mover, m.outcome) == ("Erin Chen", "carried")
    assert (m.vote.for_, m.vote.against) == (2, 1)
    assert m.vote.roll_call == (("Carla Ramirez", "aye"), ("Dev Okafor", "no"),
                                ("Erin Chen", "aye"))


# --------------------------------------------------------------------------- the demo board meeting


def test_demo_board_procedural_record() -> None:
    """The demo board meeting (invented) against its answer key's procedural entries."""
    from minutes.ingest import read_transcript
    from minutes.meeting import load_meeting
    from minutes.speakers import attendance, load_profiles, resolve_speakers

    key = json.loads((DEMO / "board_regular.key.json").read_text(encoding="utf-8"))
    meeting = load_meeting(DEMO / "board_regular.meeting.toml")
    transcript = replace(read_transcript(DEMO / "board_regular.vtt"), meeting=meeting.info)
    assert meeting.profiles is not None
    directory = load_profiles(meeting.profiles)
    transcript, _ = resolve_speakers(transcript, directory)
    parsed = nlp.parse(transcript.utterances)
    ctx = ReadContext(transcript, parsed, directory)
    utts = transcript.utterances
    parts = [Segment(k, i, min(i + 60, len(utts)) - 1, utts[i].start,
                     utts[min(i + 60, len(utts)) - 1].end, utts[i:i + 60])
             for k, i in enumerate(range(0, len(utts), 60))]
    found = relay(parts, Combined((MotionReader(ctx), ProcedureReader(ctx)))).ledger.events

    def hhmm(e: Event) -> str:
        assert e.clock is not None
        return e.clock.strftime("%H:%M")

    (call,) = of("call_to_order", found)
    (end,) = of("adjournment", found)
    assert (hhmm(call), call.evidence[0].cue) == (key["call_to_order"]["clock"],
                                                   key["call_to_order"]["cue"])
    assert (hhmm(end), end.evidence[0].cue) == (key["adjournment"]["clock"],
                                                key["adjournment"]["cue"])
    (roll,) = of("roll_call", found)
    answered = roll.detail.split(", ")
    assert sorted(answered) == sorted(key["members_present"])  # each trustee once, none absent
    (approval,) = of("minutes_approved", found)
    want = key["minutes_approval"]
    assert approval.detail.startswith(f"as {want['as']}: ")
    assert approval.evidence[0].cue == want["approved_cue"]
    correction = set(re.findall(r"\w+", want["correction"].lower()))
    assert len(correction & set(re.findall(r"\w+", approval.detail.lower()))) \
        >= 0.7 * len(correction)
    assert [e.detail for e in of("report", found)] == [f"{r['title']}, by {r['by']}"
                                                       for r in key["reports"]]
    assert [e.detail for e in of("public_comment", found)] == [p["speaker"]
                                                               for p in key["public_comment"]]
    q = quorum(attendance(transcript, directory, meeting.info), directory.roster)
    assert q is not None
    assert (q.present, q.required, q.met) == (key["quorum"]["present"],
                                              key["quorum"]["required"], key["quorum"]["met"])
