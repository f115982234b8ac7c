"""Answer keys of the invented demo meetings: every cue they cite exists and says what they quote.

The keys (``demo_meetings/NAME.key.json``) are written by the author of each invented
meeting, not by the tool; these tests only keep them consistent with the built captions,
the meeting file and the speaker profiles, so a script edit that shifts cue ids is caught.
"""

from __future__ import annotations

import datetime as dt
import json
import re
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest

from minutes.meeting import choose_template, load_meeting
from minutes.speakers import load_profiles

DEMO = Path(__file__).resolve().parents[1] / "demo_meetings"
KEYS = sorted(DEMO.glob("*.key.json"))
STATUSES = {"open", "done", "dropped"}
CHANGE_KINDS = {"owner", "due", "done", "dropped"}


def _norm(text: str) -> str:
    # Compare words only: captions and keys may differ in case, punctuation and apostrophes.
    return " ".join(re.findall(r"[\w']+", text.lower().replace("\u2019", "'")))


def _cues(vtt: Path) -> dict[str, str]:
    """Return cue id -> cue text (voice tag removed) of a built caption file."""
    import webvtt

    return {c.identifier: c.text for c in webvtt.read(str(vtt))}


def _refs(node: Any, where: str = "") -> Iterator[tuple[str, str, str | None]]:
    """Yield (where, cue id, quote or None) for every cue a key cites, at any depth."""
    if isinstance(node, dict):
        if "cue" in node:
            yield where, str(node["cue"]), node.get("quote")
        for cue in node.get("cues", []):
            yield where, str(cue), None
        for name, value in node.items():
            yield from _refs(value, f"{where}.{name}")
    elif isinstance(node, list):
        for i, value in enumerate(node):
            yield from _refs(value, f"{where}[{i}]")


def _key(path: Path) -> dict[str, Any]:
    data = json.loads(path.read_text(encoding="utf-8"))
    assert isinstance(data, dict)
    return data


def _stem(path: Path) -> str:
    return path.name.removesuffix(".key.json")


def test_demo_meetings_have_keys() -> None:
    assert KEYS, f"no answer keys found in {DEMO}"


@pytest.mark.parametrize("path", KEYS, ids=_stem)
def test_key_cues_exist_and_hold_their_quotes(path: Path) -> None:
    cues = _cues(DEMO / f"{_stem(path)}.vtt")
    refs = list(_refs(_key(path)))
    assert refs, f"{path.name} cites no cues"
    for where, cue, quote in refs:
        assert cue in cues, f"{path.name}{where}: cue {cue} is not in the captions"
        if quote:
            assert _norm(quote) in _norm(cues[cue]), (
                f"{path.name}{where}: cue {cue} says {cues[cue]!r}, not {quote!r}")


@pytest.mark.parametrize("path", KEYS, ids=_stem)
def test_key_people_are_profile_names(path: Path) -> None:
    meeting = load_meeting(DEMO / f"{_stem(path)}.meeting.toml")
    if choose_template(meeting.info) == "board":
        # a board refers work to a committee, which is no person (the board demo checks its own)
        pytest.skip("board meeting: owners may be committees")
    assert meeting.profiles is not None, "the meeting file names no profiles"
    names = set(load_profiles(meeting.profiles).names)
    key = _key(path)
    for action in key.get("actions", []):
        assert action["owner"] is None or action["owner"] in names, action
        for change in action.get("changes", []):
            if change["kind"] == "owner":
                assert change["value"] in names, change
    for question in key.get("open_questions", []) + key.get("answered_questions", []):
        if "asked_by" in question:
            assert question["asked_by"] in names, question
    for item in key.get("carried", []):
        if item["status_change"] == "owner":
            assert item["value"] in names, item


@pytest.mark.parametrize("path", KEYS, ids=_stem)
def test_key_dates_and_statuses_are_well_formed(path: Path) -> None:
    meeting = load_meeting(DEMO / f"{_stem(path)}.meeting.toml").info
    key = _key(path)
    assert key.get("date") in (None, meeting.date.isoformat() if meeting.date else None)
    for action in key.get("actions", []):
        assert action["status"] in STATUSES, action
        if action["due"] is not None:
            dt.date.fromisoformat(action["due"])
        for change in action.get("changes", []):
            assert change["kind"] in CHANGE_KINDS, change
            if change["kind"] == "due":
                dt.date.fromisoformat(change["value"])
        # a done or dropped item must say where that happened
        if action["status"] != "open":
            kinds = {c["kind"] for c in action.get("changes", [])}
            carried = {c["from"] for c in key.get("carried", [])
                       if c["status_change"] == action["status"]}
            assert action["status"] in kinds or action["task"] in carried, action


@pytest.mark.parametrize("path", KEYS, ids=_stem)
def test_carried_items_name_last_weeks_actions(path: Path) -> None:
    key = _key(path)
    if not key.get("carried"):
        pytest.skip("not a follow-up meeting")
    earlier = _key(DEMO / f"{key['follows']}.key.json")
    tasks = {a["task"] for a in earlier["actions"] if a["status"] == "open"}
    for item in key["carried"]:
        assert item["from"] in tasks, f"{item['from']!r} is not an open action of {key['follows']}"
        assert item["status_change"] in CHANGE_KINDS | {"open"}, item


@pytest.mark.parametrize("vtt", sorted(DEMO.glob("*.vtt")), ids=lambda p: p.stem)
def test_demo_captions_parse_in_order(vtt: Path) -> None:
    import webvtt

    cues = webvtt.read(str(vtt))
    assert [c.identifier for c in cues] == [str(i) for i in range(1, len(cues) + 1)]
    starts = [c.start_in_seconds for c in cues]
    assert starts == sorted(starts)
    assert all(c.voice for c in cues), f"{vtt.name}: a cue has no voice tag"
