"""JSON rendering: valid against minutes.schema.json and true to the DESIGN.md contract."""

from __future__ import annotations

import json
import sys
from dataclasses import replace
from pathlib import Path
from typing import Any

import jsonschema
import pytest

from minutes.model import Minutes
from minutes.render import render, schema, to_json_dict

sys.path.insert(0, str(Path(__file__).parent / "data" / "render"))
import render_samples as samples  # noqa: E402

# The field names of "The JSON output contract" in DESIGN.md, written out here by hand so
# that renaming or dropping one in the renderer fails this test.
CONTRACT = {
    "meeting": {"title", "date", "source", "duration_s"},
    "attendees": {"name", "role", "present"},
    "segments": {"index", "start", "end", "first_utterance", "last_utterance", "title",
                 "keywords", "points"},
    "decisions": {"id", "text", "time", "by", "evidence"},
    "actions": {"id", "task", "owner", "due", "status", "time", "evidence"},
    "motions": {"id", "text", "mover", "seconder", "vote", "outcome", "evidence"},
    "questions": {"id", "text", "asked_by", "answered", "evidence"},
    "utterances": {"index", "cue", "start", "end", "speaker", "text"},
}
EVIDENCE = {"utterance", "cue", "start", "end", "speaker", "quote"}
VOTE = {"for", "against", "abstain", "roll_call"}

ALL = [samples.GENERAL, samples.BOARD, samples.board_with_seconders()]
IDS = ["general", "board", "board-approved"]


def _validator() -> jsonschema.Draft202012Validator:
    spec = schema()
    jsonschema.Draft202012Validator.check_schema(spec)
    return jsonschema.Draft202012Validator(
        spec, format_checker=jsonschema.Draft202012Validator.FORMAT_CHECKER)


def _load(minutes: Minutes) -> Any:
    return json.loads(render(minutes, "json").decode("utf-8"))


@pytest.mark.parametrize("minutes", ALL, ids=IDS)
def test_json_validates_against_the_schema(minutes: Minutes) -> None:
    errors = [e.message for e in _validator().iter_errors(_load(minutes))]
    assert errors == []


def test_schema_rejects_what_the_contract_forbids() -> None:
    # The schema must be able to fail: a zero-for-unknown, a bad date, an extra evidence key.
    validator = _validator()
    good = _load(samples.BOARD)
    bad_date = json.loads(json.dumps(good))
    bad_date["meeting"]["date"] = "11/02/2025"
    bad_status = json.loads(json.dumps(good))
    bad_status["actions"][0]["status"] = "finished"
    extra = json.loads(json.dumps(good))
    extra["motions"][0]["evidence"][0]["confidence"] = 0.9
    missing = json.loads(json.dumps(good))
    del missing["motions"][0]["seconder"]
    for broken in (bad_date, bad_status, extra, missing):
        assert not validator.is_valid(broken)


@pytest.mark.parametrize("minutes", ALL, ids=IDS)
def test_json_keeps_every_contract_field(minutes: Minutes) -> None:
    data = _load(minutes)
    assert CONTRACT["meeting"] <= set(data["meeting"])
    for key, fields in CONTRACT.items():
        if key == "meeting":
            continue
        for item in data[key]:
            assert fields <= set(item), (key, fields - set(item))
            for ev in item.get("evidence", []):
                assert set(ev) == EVIDENCE
    for motion in data["motions"]:
        assert set(motion["vote"]) >= VOTE


def test_json_values_general() -> None:
    data = _load(samples.GENERAL)
    assert data["meeting"] == {**data["meeting"], "title": "Weekly coordination call",
                               "date": "2025-03-04", "duration_s": 1290.0,
                               "start_clock": "09:30:00"}
    assert data["meeting"]["source"] == samples.GENERAL.source  # JSON keeps the path as given
    assert data["draft"] is True and data["approved_on"] is None
    a1, a2, a3 = data["actions"]
    assert (a1["owner"], a1["due"], a1["status"], a1["due_text"]) == (
        "Priya Quell", "2025-03-07", "open", "by Friday")
    assert a2["status"] == "done" and [h["kind"] for h in a2["history"]] == ["owner", "done"]
    assert (a3["owner"], a3["due"], a3["evidence"]) == (None, None, [])
    assert a1["evidence"] == [{"utterance": 3, "cue": "c4", "start": 45.0, "end": 61.5,
                               "speaker": "Priya Quell",
                               "quote": "I'll send the soil report to the council by Friday."}]
    assert data["segments"][1]["first_utterance"] == 4
    assert data["segments"][1]["points"][0] == {"text": "The consultation runs for six weeks "
                                                "from the tenth.", "start": 471.0,
                                                "speaker": "Ines Marlow", "utterance": 7}
    assert data["utterances"][0] == {"index": 0, "cue": "c1", "start": 2.0, "end": 9.5,
                                     "speaker": "Ines Marlow",
                                     "text": "Morning all, let's start with the depot survey.",
                                     "cues": ["c1"], "label": "Ines Marlow"}
    assert [q["answered"] for q in data["questions"]] == [False, True]


def test_json_motions_keep_unheard_counts_as_null() -> None:
    data = _load(samples.BOARD)
    m1, m2, m3, m4, m5 = data["motions"]
    assert m1["vote"]["for"] is None and m1["vote"]["against"] is None
    assert m1["vote"]["method"] == "voice"
    assert m1["flags"] == ["the chair declared the result without calling for the noes"]
    assert m2["amends"] == "M1" and m2["kind"] == "amendment"
    assert m2["vote"]["roll_call"] == {"Helena Brandt": "aye", "Oskar Lind": "aye",
                                       "Joyce Okafor": "no", "Kenji Sato": "aye",
                                       "Luz Reyes": "absent"}
    assert (m3["vote"]["for"], m3["vote"]["against"], m3["outcome"]) == (1, 3, "failed")
    assert (m4["outcome"], m4["seconder"]) == ("withdrawn", None)
    assert m5["outcome"] == "referred"
    events = {e["kind"]: e for e in data["events"]}
    assert events["call_to_order"]["clock"] == "19:02:00"
    assert events["recess"]["clock"] is None
    assert data["quorum"] == {"present": 4, "members": 5, "required": 3, "met": True,
                              "rule": "bylaws: a majority of the 5 trustees"}


def test_json_times_are_floats_even_from_ints() -> None:
    minutes = replace(samples.GENERAL, duration=1290)
    assert "\"duration_s\": 1290.0" in render(minutes, "json").decode()


def test_to_json_dict_is_what_render_writes() -> None:
    assert json.loads(render(samples.BOARD, "json")) == to_json_dict(samples.BOARD)


def test_json_keeps_untrusted_text_exactly() -> None:
    # JSON is data: quotes stay as spoken (escaping is json's job, not ours).
    text = "=cmd|' /C calc'!A0 <script>alert(1)</script> | *x* \u00e9"
    minutes = samples.hostile(text)
    data = _load(minutes)
    assert data["decisions"][0]["text"] == text
    assert render(minutes, "json").decode().count("\u00e9") > 0  # UTF-8, not \\u escapes
