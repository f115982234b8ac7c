"""Integrity of the invented demo board meeting: captions, meeting file, profiles, answer key.

These check the demo data against itself (the key must point at real cues and real
people), not the tool. The meeting and its key are invented by their author.
"""

from __future__ import annotations

import datetime as dt
import json
import re
from collections import Counter
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
import webvtt

from minutes.meeting import load_meeting
from minutes.speakers import Directory, load_profiles

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "demo_meetings"
VTT = DEMO / "board_regular.vtt"
KEY = DEMO / "board_regular.key.json"
MEETING = DEMO / "board_regular.meeting.toml"
CUE_FIELDS = ("cue", "result_cue", "approved_cue")


@pytest.fixture(scope="module")
def cues() -> dict[str, webvtt.Caption]:
    """Return the demo captions by cue id."""
    return {str(c.identifier): c for c in webvtt.read(str(VTT)).captions}


@pytest.fixture(scope="module")
def key() -> dict[str, Any]:
    """Return the parsed answer key."""
    return json.loads(KEY.read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def directory() -> Directory:
    """Return the speaker directory the meeting file points at."""
    profiles = load_meeting(MEETING).profiles
    assert profiles is not None
    return load_profiles(profiles)


def cue_refs(node: Any, where: str = "key") -> Iterator[tuple[str, str]]:
    """Yield (where, cue id) for every cue reference in the key, however deep."""
    if isinstance(node, dict):
        for name, value in node.items():
            if name in CUE_FIELDS:
                yield f"{where}.{name}", value
            elif name != "cue_quotes":
                yield from cue_refs(value, f"{where}.{name}")
    elif isinstance(node, list):
        for i, value in enumerate(node):
            yield from cue_refs(value, f"{where}[{i}]")


def text_of(caption: webvtt.Caption) -> str:
    return re.sub(r"<[^>]+>", "", caption.raw_text).replace("\n", " ")


def label_of(caption: webvtt.Caption) -> str:
    match = re.match(r"<v ([^>]+)>", caption.raw_text)
    assert match, f"cue {caption.identifier} has no voice tag"
    return match.group(1)


def seconds(clock: str) -> float:
    h, m, s = clock.split(":")
    return int(h) * 3600 + int(m) * 60 + float(s)


def test_the_captions_parse_with_numeric_ordered_cue_ids(cues: dict[str, webvtt.Caption]) -> None:
    ids = list(cues)
    assert ids == [str(n) for n in range(1, len(ids) + 1)]
    starts = [seconds(c.start) for c in cues.values()]
    assert starts == sorted(starts)
    assert all(seconds(c.end) > seconds(c.start) for c in cues.values())
    assert all(label_of(c) for c in cues.values())
    # the brief asks for about an hour and several hundred cues
    assert 50 * 60 < starts[-1] < 70 * 60 and len(ids) > 300


def test_every_cue_in_the_key_exists(key: dict[str, Any], cues: dict[str, webvtt.Caption]) -> None:
    refs = list(cue_refs(key))
    assert len(refs) > 40
    missing = [(where, cue) for where, cue in refs if cue not in cues]
    assert missing == []


def test_every_cited_cue_holds_its_quote(key: dict[str, Any],
                                         cues: dict[str, webvtt.Caption]) -> None:
    quotes = key["cue_quotes"]
    assert {cue for _, cue in cue_refs(key)} == set(quotes)
    wrong = {cue: q for cue, q in quotes.items() if q not in text_of(cues[cue])}
    assert wrong == {}


def test_movers_seconders_and_roll_calls_are_roster_members(key: dict[str, Any],
                                                            directory: Directory) -> None:
    assert directory.roster is not None
    members = set(directory.roster.members)
    for n, motion in enumerate(key["motions"]):
        assert motion["mover"] in members, n
        assert motion["seconder"] is None or motion["seconder"] in members, n
        assert motion["mover"] != motion["seconder"], n
        assert set(motion["vote"]["roll_call"]) <= members, n


def test_roll_call_tallies_match_the_names(key: dict[str, Any]) -> None:
    roll_calls = [m["vote"] for m in key["motions"] if m["vote"]["method"] == "roll_call"]
    assert len(roll_calls) == 2
    for vote in roll_calls:
        said = Counter(vote["roll_call"].values())
        assert (said["aye"], said["no"], said["abstain"]) == (
            vote["for"], vote["against"], vote["abstain"])


def test_unstated_counts_are_null_never_invented(key: dict[str, Any]) -> None:
    for n, motion in enumerate(key["motions"]):
        vote = motion["vote"]
        if vote["method"] in ("voice", "consent", "none"):
            assert (vote["for"], vote["against"], vote["abstain"]) == (None, None, None), n
            assert vote["roll_call"] == {}, n


def test_the_key_covers_what_the_brief_asks_for(key: dict[str, Any]) -> None:
    motions = key["motions"]
    kinds = Counter(m["kind"] for m in motions)
    outcomes = Counter(m["outcome"] for m in motions)
    methods = Counter(m["vote"]["method"] for m in motions)
    assert {"main", "amendment", "postpone", "refer", "adjourn", "approve_minutes"} <= set(kinds)
    assert {"carried", "failed", "withdrawn", "postponed"} <= set(outcomes)
    assert {"voice", "count", "roll_call", "consent"} <= set(methods)
    assert sum(1 for m in motions if m["flag"]) == 2
    for n, motion in enumerate(motions):
        if motion["amends"] is not None:
            assert motions[motion["amends"]]["kind"] == "main", n
            assert int(motions[motion["amends"]]["cue"]) < int(motion["cue"]), n
    assert key["minutes_approval"]["as"] == "corrected"
    assert len(key["public_comment"]) == 3 and key["open_questions"]
    assert any(d["method"] == "consensus" for d in key["decisions"])


def test_motions_are_in_the_order_they_were_moved(key: dict[str, Any]) -> None:
    moved = [int(m["cue"]) for m in key["motions"]]
    assert moved == sorted(moved)


def test_attendance_and_quorum_agree_with_the_roster(key: dict[str, Any],
                                                     directory: Directory) -> None:
    assert directory.roster is not None
    members = set(directory.roster.members)
    assert set(key["members_present"]) | set(key["absent"]) == members
    assert not set(key["members_present"]) & set(key["absent"])
    assert set(key["members_present"]) <= set(key["present"]) <= set(directory.names)
    quorum = key["quorum"]
    assert quorum["present"] == len(key["members_present"])
    assert quorum["required"] == directory.roster.quorum
    assert quorum["met"] is (quorum["present"] >= quorum["required"])
    assert key["absent"] == list(load_meeting(MEETING).info.absent)
    assert directory.role_of(key["presiding"]) == "chair"
    assert directory.role_of(key["secretary"]) == "secretary"


def test_absent_members_never_speak_and_present_members_do(key: dict[str, Any],
                                                          cues: dict[str, webvtt.Caption],
                                                          directory: Directory) -> None:
    speakers = set()
    for caption in cues.values():
        person = directory.resolve(label_of(caption))
        if person:
            speakers.add(person.name)
    assert speakers == set(key["present"])


def test_public_commenters_are_not_in_the_profiles(key: dict[str, Any],
                                                   cues: dict[str, webvtt.Caption],
                                                   directory: Directory) -> None:
    for comment in key["public_comment"]:
        assert directory.resolve(comment["speaker"]) is None
        assert directory.resolve(comment["label"]) is None
        assert label_of(cues[comment["cue"]]) == comment["label"]
        assert comment["speaker"] in text_of(cues[comment["cue"]])


def test_spoken_clock_times_match_the_meeting_file(key: dict[str, Any],
                                                   cues: dict[str, webvtt.Caption]) -> None:
    info = load_meeting(MEETING).info
    assert info.start_clock is not None and info.date is not None
    start = dt.datetime.combine(info.date, info.start_clock)
    for item in ("call_to_order", "adjournment"):
        at = start + dt.timedelta(seconds=seconds(cues[key[item]["cue"]].start))
        assert at.strftime("%H:%M") == key[item]["clock"], item
        hour, minute = key[item]["clock"].split(":")
        spoken = f"{int(hour) - 12}:{minute}"  # both are p.m. times, said on a 12-hour clock
        assert spoken in text_of(cues[key[item]["cue"]]), item


def test_dates_in_the_key_are_iso_and_on_or_after_the_meeting(key: dict[str, Any]) -> None:
    meeting_date = load_meeting(MEETING).info.date
    assert meeting_date is not None
    for action in key["actions"]:
        assert action["status"] == "open"
        if action["due"] is not None:
            assert dt.date.fromisoformat(action["due"]) > meeting_date, action["task"]
