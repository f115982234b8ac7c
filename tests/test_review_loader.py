"""Reading minutes JSON back: ``minutes_from_json`` is the inverse of ``to_json_dict``.

Also home of ``sample_minutes()``, the small hand-built board meeting the other review
tests share (every person and body in it is invented).
"""

from __future__ import annotations

import datetime as dt
import json
import sys
from pathlib import Path
from typing import Any

import pytest

from minutes.errors import InputError
from minutes.model import (
    ActionItem,
    Attendee,
    Cue,
    Decision,
    Evidence,
    Ledger,
    MeetingInfo,
    Minutes,
    Motion,
    Point,
    Question,
    Roster,
    Segment,
    Utterance,
    Vote,
)
from minutes.render import render, to_json_dict
from minutes.review.loader import minutes_from_json, read_minutes_json

sys.path.insert(0, str(Path(__file__).parent / "data" / "render"))
import render_samples as samples  # noqa: E402

HOSTILE = '<script>window.__pwned = 1</script><img src=x onerror="window.__pwned = 2">'


def _utt(index: int, start: float, end: float, speaker: str, *parts: str) -> Utterance:
    """Return an utterance of one cue per part (cue ids ``c<index>-<n>``)."""
    step = (end - start) / len(parts)
    cues = tuple(Cue(f"c{index}-{n}", start + n * step, start + (n + 1) * step, text)
                 for n, text in enumerate(parts))
    return Utterance(index, start, end, speaker, " ".join(parts), cues, label=speaker)


def _ev(u: Utterance, quote: str) -> Evidence:
    assert quote in u.text
    cue = u.cue_for(quote)
    assert cue is not None
    return Evidence(u.index, cue.id, cue.start, cue.end, u.speaker, quote)


U = (
    _utt(0, 1.0, 4.0, "Wren Halvorsen", "I call the meeting of the Fenmoor Water Board to order."),
    _utt(1, 4.5, 9.0, "Osric Palfrey", "I move that we replace the pump at Millbrook.",
         "The quote is on file."),
    _utt(2, 9.5, 10.5, "Speaker 1", "Second."),
    _utt(3, 11.0, 15.0, "Wren Halvorsen", "All in favour? That carries, I think."),
    _utt(4, 15.5, 20.0, "Speaker 1", "I will send the pump quote to the county by Friday."),
    _utt(5, 20.5, 24.0, "Tamsin Oduya", HOSTILE),
    _utt(6, 24.5, 28.0, "Osric Palfrey", "We agreed the depot stays open on Saturdays."),
    _utt(7, 28.5, 32.0, "Tamsin Oduya", "Who is checking the reservoir fence?",
         "Somebody should walk it before winter."),
)


def sample_minutes() -> Minutes:
    """Return a small board meeting with every kind of item and a few things to check."""
    return Minutes(
        meeting=MeetingInfo(title="Regular meeting of the Fenmoor Water Board",
                            body="Fenmoor Water Board", kind="regular meeting",
                            date=dt.date(2026, 3, 4), place="Pump House",
                            start_clock=dt.time(19, 0)),
        source="fenmoor.vtt", duration=32.0,
        attendees=(Attendee("Wren Halvorsen", "chair"), Attendee("Osric Palfrey", "member"),
                   Attendee("Tamsin Oduya", "member"), Attendee("Speaker 1", "", kind="guest"),
                   Attendee("Ludo Brisk", "member", present=False)),
        segments=(Segment(0, 0, 3, 1.0, 15.0, U[0:4], title="The Millbrook pump",
                          keywords=("pump",), points=(Point("The pump is to be replaced.", 4.5,
                                                            "Osric Palfrey", 1),)),
                  Segment(1, 4, 7, 15.5, 32.0, U[4:8], title="Depot and fences")),
        summary=(Point("The board voted to replace the Millbrook pump.", 4.5, "Osric Palfrey",
                       1),),
        ledger=Ledger(
            motions=(Motion("M1", "Replace the pump at Millbrook", "Osric Palfrey", "Speaker 1",
                            Vote(method="voice"), "carried", 4.5,
                            (_ev(U[1], "I move that we replace the pump at Millbrook."),
                             _ev(U[2], "Second."), _ev(U[3], "That carries, I think.")),
                            flags=("vote not clearly heard; counts left for the clerk",)),),
            decisions=(Decision("D1", "The depot stays open on Saturdays.", 24.5,
                                "Osric Palfrey",
                                (_ev(U[6], "We agreed the depot stays open on Saturdays."),)),),
            actions=(ActionItem("A1", "Send the pump quote to the county", "Speaker 1",
                                dt.date(2026, 3, 6), "open", 15.5,
                                (_ev(U[4], "I will send the pump quote to the county by "
                                           "Friday."),), due_text="by Friday"),
                     ActionItem("A2", HOSTILE, None, None, "open", 20.5, (_ev(U[5], HOSTILE),))),
            questions=(Question("Q1", "Who is checking the reservoir fence?", "Tamsin Oduya",
                                False, 28.5,
                                (_ev(U[7], "Who is checking the reservoir fence?"),)),)),
        utterances=U, template="board", unknown_speakers=("Speaker 1",),
        notes=("M1: vote not clearly heard; counts left for the clerk",
               "speaker labels not found in the profiles: Speaker 1"),
    )


def sample_json() -> dict[str, Any]:
    """Return the sample meeting as the JSON contract's dict."""
    return json.loads(json.dumps(to_json_dict(sample_minutes())))


def write_sample(folder: Path, name: str = "fenmoor.json") -> Path:
    """Write the sample meeting's JSON into ``folder`` and return its path."""
    path = folder / name
    path.write_bytes(render(sample_minutes(), "json"))
    return path


# --------------------------------------------------------------------------- round trip

ALL = [samples.GENERAL, samples.BOARD, samples.board_with_seconders(), sample_minutes()]
IDS = ["render-general", "render-board", "render-board-approved", "review-sample"]


@pytest.mark.parametrize("minutes", ALL, ids=IDS)
def test_json_round_trip_is_exact(minutes: Minutes) -> None:
    data = json.loads(render(minutes, "json"))
    assert to_json_dict(minutes_from_json(data)) == data


@pytest.mark.parametrize("minutes", ALL, ids=IDS)
def test_rebuilt_minutes_render_the_same(minutes: Minutes) -> None:
    # The roster is not in the JSON; given back, Markdown and DOCX come out the same.
    rebuilt = minutes_from_json(json.loads(render(minutes, "json")), roster=minutes.roster)
    assert render(rebuilt, "md") == render(minutes, "md")
    assert rebuilt.ledger == minutes.ledger
    assert rebuilt.segments[0].utterances == tuple(
        u for u in rebuilt.utterances if minutes.segments[0].first <= u.index
        <= minutes.segments[0].last)


def test_single_cue_utterances_come_back_whole() -> None:
    rebuilt = minutes_from_json(json.loads(render(samples.GENERAL, "json")),
                                roster=samples.GENERAL.roster)
    assert rebuilt == samples.GENERAL


def test_merged_cues_keep_their_ids_in_order() -> None:
    rebuilt = minutes_from_json(sample_json())
    assert [c.id for c in rebuilt.utterances[1].cues] == ["c1-0", "c1-1"]
    assert rebuilt.utterances[1].cues[0].start == rebuilt.utterances[1].start


def test_roll_call_order_comes_from_roll_call_order() -> None:
    data = json.loads(render(samples.BOARD, "json"))
    motion = next(m for m in data["motions"] if m["vote"]["roll_call"])
    motion["vote"]["roll_call_order"] = list(reversed(motion["vote"]["roll_call_order"]))
    rebuilt = minutes_from_json(data).ledger.motions[1]
    assert [n for n, _ in rebuilt.vote.roll_call] == motion["vote"]["roll_call_order"]


def test_roster_is_read_when_the_json_carries_one() -> None:
    data = sample_json()
    data["roster"] = {"body": "Fenmoor Water Board", "members": ["Wren Halvorsen"],
                      "officers": [{"office": "chair", "name": "Wren Halvorsen"}],
                      "quorum": 1, "two_thirds": [], "record_seconder": True}
    assert minutes_from_json(data).roster == Roster(
        body="Fenmoor Water Board", members=("Wren Halvorsen",),
        officers=(("chair", "Wren Halvorsen"),), quorum=1, record_seconder=True)


# --------------------------------------------------------------------------- bad input


@pytest.mark.parametrize(("change", "where"), [
    (lambda d: d["actions"][0].update(due="6 March"), "actions[0].due"),
    (lambda d: d["actions"][0].update(status="finished"), "actions[0].status"),
    (lambda d: d["motions"][0]["vote"].update({"for": "three"}), "motions[0].vote.for"),
    (lambda d: d["motions"][0].pop("seconder"), "motions[0].seconder"),
    (lambda d: d["utterances"][2].update(index=7), "utterances[2].index"),
    (lambda d: d["decisions"][0]["evidence"][0].update(utterance="x"),
     "decisions[0].evidence[0].utterance"),
    (lambda d: d["meeting"].update(date="04/03/2026"), "meeting.date"),
    (lambda d: d.update(attendees={}), "attendees"),
])
def test_a_bad_field_is_named(change: Any, where: str) -> None:
    data = sample_json()
    change(data)
    with pytest.raises(InputError) as err:
        minutes_from_json(data, source="m.json")
    assert str(err.value).startswith(f"m.json: {where}:")


def test_read_minutes_json_refuses_what_is_not_minutes(tmp_path: Path) -> None:
    broken = tmp_path / "broken.json"
    broken.write_text('{"meeting": {', encoding="utf-8")
    with pytest.raises(InputError, match=r"broken.json, line 1: not valid JSON"):
        read_minutes_json(broken)
    other = tmp_path / "other.json"
    other.write_text('{"name": "a package"}', encoding="utf-8")
    with pytest.raises(InputError, match="not minutes JSON"):
        read_minutes_json(other)
    with pytest.raises(InputError, match="no such file"):
        read_minutes_json(tmp_path / "missing.json")
    assert read_minutes_json(write_sample(tmp_path)) == sample_json()
