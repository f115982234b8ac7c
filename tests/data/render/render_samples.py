"""Hand-built ``Minutes`` for the renderer tests. Every meeting and person here is invented."""

from __future__ import annotations

import datetime as dt
from dataclasses import replace

from minutes.model import (
    ActionItem,
    AgendaItem,
    Attendee,
    Change,
    Cue,
    Decision,
    Event,
    Evidence,
    Ledger,
    MeetingInfo,
    Minutes,
    Motion,
    Point,
    Proposal,
    Question,
    Quorum,
    Roster,
    Segment,
    Utterance,
    Vote,
)


def utt(index: int, start: float, end: float, speaker: str, text: str,
        cue: str | None = None) -> Utterance:
    """Return an utterance made of one cue (cue id defaults to ``c<index+1>``)."""
    cue_id = cue if cue is not None else f"c{index + 1}"
    return Utterance(index=index, start=start, end=end, speaker=speaker, text=text,
                     cues=(Cue(id=cue_id, start=start, end=end, text=text),), label=speaker)


def ev(u: Utterance, quote: str | None = None) -> Evidence:
    """Return evidence pointing at the whole of ``u`` (or a quote from it)."""
    return Evidence(utterance=u.index, cue=u.cues[0].id if u.cues else None, start=u.start,
                    end=u.end, speaker=u.speaker, quote=quote or u.text)


# --------------------------------------------------------------------------- general

GU = (
    utt(0, 2.0, 9.5, "Ines Marlow", "Morning all, let's start with the depot survey."),
    utt(1, 10.0, 31.0, "Tomasz Ferreira",
        "The survey is done; the north yard drains badly, so we'll use the south yard."),
    utt(2, 32.0, 44.0, "Ines Marlow", "Agreed, we go with the south yard for the depot."),
    utt(3, 45.0, 61.5, "Priya Quell", "I'll send the soil report to the council by Friday."),
    utt(4, 400.0, 418.0, "Ines Marlow", "Next, the timetable consultation."),
    utt(5, 419.0, 447.0, "SPEAKER_2", "Could we run the consultation for six weeks instead?"),
    utt(6, 448.0, 470.0, "Tomasz Ferreira", "Do we know who prints the leaflets?"),
    utt(7, 471.0, 500.0, "Ines Marlow",
        "We decided: six weeks, starting on the tenth. Someone should book the hall."),
    utt(8, 501.0, 520.0, "Priya Quell", "I booked the hall already, it's done."),
)

GENERAL = Minutes(
    meeting=MeetingInfo(
        title="Weekly coordination call", body="Larkfield Transit Project",
        kind="weekly project call", date=dt.date(2025, 3, 4), place="Video call",
        start_clock=dt.time(9, 30),
        agenda=(AgendaItem("Depot survey", "1"), AgendaItem("Timetable consultation", "2"),
                AgendaItem("Budget forecast", "3"))),
    source="/home/clerk/recordings/larkfield-2025-03-04.vtt",
    duration=1290.0,
    attendees=(
        Attendee("Ines Marlow", "coordinator"),
        Attendee("Tomasz Ferreira", "engineer"),
        Attendee("Priya Quell", "analyst"),
        Attendee("Dmitri Ashe", "engineer", present=False),
    ),
    segments=(
        Segment(0, 0, 3, 0.0, 61.5, GU[0:4], title="Depot survey",
                keywords=("depot", "survey", "south yard"),
                points=(Point("The north yard drains badly; the depot goes to the south yard.",
                              10.0, "Tomasz Ferreira", 1),
                        Point("The soil report goes to the council by Friday.", 45.0,
                              "Priya Quell", 3)),
                agenda_item=0),
        Segment(1, 4, 8, 400.0, 520.0, GU[4:9], title="Timetable consultation",
                keywords=("consultation", "leaflets"),
                points=(Point("The consultation runs for six weeks from the tenth.", 471.0,
                              "Ines Marlow", 7),),
                agenda_item=1),
    ),
    summary=(Point("The depot will be built in the south yard.", 32.0, "Ines Marlow", 2),
             Point("The timetable consultation runs six weeks from 10 March.", 471.0,
                   "Ines Marlow", 7)),
    ledger=Ledger(
        decisions=(
            Decision("D1", "Build the depot in the south yard.", 32.0, "Ines Marlow",
                     (ev(GU[2]),)),
            Decision("D2", "Run the timetable consultation for six weeks from 10 March.",
                     471.0, "Ines Marlow", (ev(GU[7], "six weeks, starting on the tenth"),),
                     proposal="P1"),
        ),
        actions=(
            ActionItem("A1", "Send the soil report to the council", "Priya Quell",
                       dt.date(2025, 3, 7), "open", 45.0, (ev(GU[3]),), due_text="by Friday"),
            ActionItem("A2", "Book the hall for the consultation", "Priya Quell", None, "done",
                       471.0, (ev(GU[7], "Someone should book the hall."),),
                       history=(Change("owner", "Priya Quell", ev(GU[8])),
                                Change("done", None, ev(GU[8])))),
            ActionItem("A3", "Find out who prints the leaflets", None, None, "open", 448.0,
                       (), due_text="before the launch"),
        ),
        proposals=(
            Proposal("P1", "Run the consultation for six weeks", "SPEAKER_2", 419.0,
                     (ev(GU[5]),), status="accepted"),
            Proposal("P2", "Print the leaflets in three languages", "Tomasz Ferreira", 460.0,
                     (ev(GU[6]),)),
        ),
        questions=(
            Question("Q1", "Do we know who prints the leaflets?", "Tomasz Ferreira", False,
                     448.0, (ev(GU[6]),)),
            Question("Q2", "Could we run the consultation for six weeks instead?", "SPEAKER_2",
                     True, 419.0, (ev(GU[5]),)),
        ),
    ),
    utterances=GU,
    template="general",
    unknown_speakers=("SPEAKER_2",),
    not_discussed=("3 Budget forecast",),
    notes=("One speaker label (SPEAKER_2) matched no profile.",),
)


# --------------------------------------------------------------------------- board

BU = (
    utt(0, 5.0, 12.0, "Helena Brandt", "I call this meeting to order at two minutes past seven."),
    utt(1, 13.0, 40.0, "Oskar Lind",
        "Roll call: Brandt, Lind, Okafor, Sato present; Reyes absent."),
    utt(2, 41.0, 70.0, "Helena Brandt",
        "The minutes are approved as corrected: the book sale is on 12 April."),
    utt(3, 71.0, 150.0, "Joyce Okafor", "The treasurer's report: we are on budget."),
    utt(4, 151.0, 190.0, "Marta Kollin", "I want to speak about the Sunday opening hours."),
    utt(5, 400.0, 430.0, "Joyce Okafor",
        "I move that we adopt the 2025 operating budget of $412,000."),
    utt(6, 431.0, 440.0, "Kenji Sato", "Second."),
    utt(7, 441.0, 470.0, "Kenji Sato", "I move to amend by cutting the book line by $5,000."),
    utt(8, 471.0, 480.0, "Joyce Okafor", "Second."),
    utt(9, 481.0, 520.0, "Oskar Lind",
        "On the amendment: Brandt aye, Lind aye, Okafor no, Sato aye."),
    utt(10, 521.0, 560.0, "Helena Brandt", "The budget as amended carries."),
    utt(11, 900.0, 930.0, "Kenji Sato", "I move we open on Sundays from May."),
    utt(12, 931.0, 960.0, "Helena Brandt", "One in favour, three against; the motion fails."),
    utt(13, 1500.0, 1530.0, "Joyce Okafor", "I move to rename the reading room after Ms. Reyes."),
    utt(14, 1531.0, 1550.0, "Joyce Okafor", "I withdraw the motion until she can be asked."),
    utt(15, 1600.0, 1640.0, "Oskar Lind",
        "I move to refer the roof repair quotes to the Building Committee."),
    utt(16, 1641.0, 1660.0, "Helena Brandt", "Without objection, so referred."),
    utt(17, 1700.0, 1720.0, "Kenji Sato", "Who is checking the insurance renewal?"),
    utt(18, 4440.0, 4450.0, "Helena Brandt", "We are adjourned at fourteen past eight."),
)

MEMBERS = ("Helena Brandt", "Oskar Lind", "Joyce Okafor", "Kenji Sato", "Luz Reyes")

BOARD = Minutes(
    meeting=MeetingInfo(
        title="", body="Board of Trustees of the Riverbend Library Trust",
        kind="regular meeting", date=dt.date(2025, 2, 11),
        place="Community Room, Riverbend Library", start_clock=dt.time(19, 0),
        agenda=(AgendaItem("Call to order and roll call", "1"),
                AgendaItem("Operating budget 2025", "4"),
                AgendaItem("Opening hours", "5"),
                AgendaItem("Building matters", "6"),
                AgendaItem("Strategic plan", "7"))),
    source="riverbend-2025-02-11.vtt",
    duration=4455.0,
    attendees=(
        Attendee("Helena Brandt", "chair"),
        Attendee("Oskar Lind", "secretary"),
        Attendee("Joyce Okafor", "treasurer"),
        Attendee("Kenji Sato", "member"),
        Attendee("Luz Reyes", "member", present=False),
        Attendee("Ruth Adeyemi", "library director", kind="staff"),
        Attendee("Marta Kollin", "", kind="public"),
    ),
    segments=(
        Segment(0, 0, 4, 0.0, 399.0, BU[0:5], title="Opening business", agenda_item=0),
        Segment(1, 5, 10, 399.0, 899.0, BU[5:11], title="Operating budget 2025", agenda_item=1),
        Segment(2, 11, 12, 899.0, 1499.0, BU[11:13], title="Opening hours", agenda_item=2),
        Segment(3, 13, 18, 1499.0, 4455.0, BU[13:19], title="Building matters", agenda_item=3),
    ),
    summary=(),
    ledger=Ledger(
        decisions=(
            Decision("D1", "The annual book sale is held on 12 April.", 41.0, "Helena Brandt",
                     (ev(BU[2], "the book sale is on 12 April"),)),
        ),
        motions=(
            Motion("M1", "That the Board adopt the 2025 operating budget of $412,000.",
                   "Joyce Okafor", "Kenji Sato", Vote(method="voice"), "carried", 400.0,
                   (ev(BU[5]), ev(BU[10])),
                   flags=("the chair declared the result without calling for the noes",)),
            Motion("M2", "To reduce the book acquisitions line by $5,000.", "Kenji Sato",
                   "Joyce Okafor",
                   Vote(method="roll_call", for_=3, against=1, abstain=0,
                        roll_call=(("Helena Brandt", "aye"), ("Oskar Lind", "aye"),
                                   ("Joyce Okafor", "no"), ("Kenji Sato", "aye"),
                                   ("Luz Reyes", "absent"))),
                   "carried", 441.0, (ev(BU[7]), ev(BU[9])), amends="M1", kind="amendment"),
            Motion("M3", "To open the library on Sundays from May.", "Kenji Sato", None,
                   Vote(method="count", for_=1, against=3, abstain=0), "failed", 900.0,
                   (ev(BU[11]), ev(BU[12]))),
            Motion("M4", "To rename the reading room after Luz Reyes.", "Joyce Okafor",
                   None, Vote(), "withdrawn", 1500.0, (ev(BU[13]), ev(BU[14])),
                   history=(Change("withdrawn", None, ev(BU[14])),)),
            Motion("M5", "To refer the roof repair quotes.", "Oskar Lind", "Kenji Sato",
                   Vote(method="consent"), "referred", 1600.0, (ev(BU[15]), ev(BU[16])),
                   history=(Change("referred", "to the Building Committee", ev(BU[16])),),
                   kind="refer"),
        ),
        actions=(
            ActionItem("A1", "Ask Luz Reyes about naming the reading room", "Joyce Okafor",
                       dt.date(2025, 3, 11), "open", 1531.0, (ev(BU[14]),),
                       due_text="before the March meeting"),
        ),
        questions=(
            Question("Q1", "Who is checking the insurance renewal?", "Kenji Sato", False,
                     1700.0, (ev(BU[17]),)),
        ),
        events=(
            Event("call_to_order", 5.0, (ev(BU[0]),), clock=dt.time(19, 2)),
            Event("roll_call", 13.0, (ev(BU[1]),),
                  detail="Brandt, Lind, Okafor, Sato present; Reyes absent"),
            Event("minutes_approved", 41.0, (ev(BU[2]),),
                  detail="as corrected: the book sale is on 12 April"),
            Event("report", 71.0, (ev(BU[3]),), detail="Treasurer's report (Joyce Okafor)"),
            Event("public_comment", 151.0, (ev(BU[4]),), detail="Marta Kollin"),
            Event("recess", 1661.0, (), detail="ten minutes"),
            Event("adjournment", 4440.0, (ev(BU[18]),), clock=dt.time(20, 14)),
        ),
    ),
    utterances=BU,
    template="board",
    not_discussed=("7 Strategic plan",),
    notes=("Check the vote on M1: no count was heard.",),
    roster=Roster(body="Board of Trustees of the Riverbend Library Trust", members=MEMBERS,
                  officers=(("chair", "Helena Brandt"), ("secretary", "Oskar Lind")),
                  quorum=3, record_seconder=False),
    quorum=Quorum(present=4, members=5, required=3, met=True,
                  rule="bylaws: a majority of the 5 trustees"),
)


def board_with_seconders() -> Minutes:
    """Return the board meeting under rules that record the seconder, already approved."""
    assert BOARD.roster is not None
    return replace(BOARD, roster=replace(BOARD.roster, record_seconder=True),
                   approved_on=dt.date(2025, 3, 11))


def hostile(text: str) -> Minutes:
    """Return the general meeting with ``text`` put into every free-text field a user controls."""
    ledger = GENERAL.ledger
    seg = replace(GENERAL.segments[0], title=text, keywords=(text,),
                  points=(Point(text, 10.0, text, 1),))
    return replace(
        GENERAL,
        meeting=replace(GENERAL.meeting, title=text, place=text),
        attendees=(*GENERAL.attendees, Attendee(text, text)),
        segments=(seg, GENERAL.segments[1]),
        summary=(Point(text, 1.0),),
        ledger=replace(
            ledger,
            decisions=(replace(ledger.decisions[0], text=text, by=text),),
            actions=(replace(ledger.actions[0], task=text, owner=text),),
            questions=(replace(ledger.questions[0], text=text, asked_by=text),)),
        notes=(text,),
        not_discussed=(text,),
    )
