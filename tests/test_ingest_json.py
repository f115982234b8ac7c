"""The minutes JSON contract (DESIGN.md) read back into a Transcript."""

from __future__ import annotations

import datetime as dt
import json
from pathlib import Path
from typing import Any

import pytest

from minutes.errors import InputError
from minutes.ingest import read_transcript
from minutes.model import Transcript


def write(tmp_path: Path, data: Any) -> Path:
    path = tmp_path / "minutes.json"
    path.write_text(data if isinstance(data, str) else json.dumps(data), encoding="utf-8")
    return path


def contract(t: Transcript) -> dict[str, Any]:
    """Write a transcript's utterances as DESIGN.md's JSON contract lists them."""
    return {
        "meeting": {"title": "Weekly call", "date": "2024-03-14", "source": t.source,
                    "duration_s": t.duration},
        "utterances": [{"index": u.index, "cue": u.cues[0].id if u.cues else None,
                        "start": u.start, "end": u.end, "speaker": u.speaker, "text": u.text}
                       for u in t.utterances],
    }


def test_round_trip_from_webvtt(tmp_path: Path) -> None:
    vtt = tmp_path / "call.vtt"
    vtt.write_text("WEBVTT\n\nq1\n00:00:01.000 --> 00:00:03.000\n<v Ada>Start.\n\n"
                   "q2\n00:00:09.000 --> 00:00:10.500\n<v Ben>Item one.\n\n"
                   "q3\n00:00:12.000 --> 00:00:13.000\n<v Ada>Done.\n", encoding="utf-8")
    original = read_transcript(vtt)
    back = read_transcript(write(tmp_path, contract(original)))
    assert back.format == "json" and back.warnings == ()
    assert [(u.index, u.start, u.end, u.speaker, u.label, u.text) for u in back.utterances] == [
        (u.index, u.start, u.end, u.speaker, u.label, u.text) for u in original.utterances]
    assert [[c.id for c in u.cues] for u in back.utterances] == [["q1"], ["q2"], ["q3"]]
    assert back.meeting.title == "Weekly call"
    assert back.meeting.date == dt.date(2024, 3, 14)


def test_null_cue_and_bare_list(tmp_path: Path) -> None:
    t = read_transcript(write(tmp_path, [{"index": 0, "cue": None, "start": 0, "end": 2,
                                          "speaker": "", "text": "hello"}]))
    (u,) = t.utterances
    assert (u.cues[0].id, u.start, u.end, u.text) == (None, 0.0, 2.0, "hello")


def test_bad_items_are_skipped_with_warnings(tmp_path: Path) -> None:
    t = read_transcript(write(tmp_path, {"utterances": [
        {"cue": "a", "start": 5, "end": 6, "speaker": "Ada", "text": "kept"},
        "not an object",
        {"cue": "b", "start": "soon", "end": 6, "text": "no time"},
        {"cue": "c", "start": -3, "end": 1, "text": "negative"},
        {"cue": "d", "start": 8, "end": 7, "speaker": "Ben", "text": "reversed"},
        {"cue": "e", "start": 9, "end": 10, "text": ""},
        {"cue": "f", "start": 1e308, "end": 10 ** 400, "text": "huge"},
    ], "meeting": {"date": "14 March"}}))
    assert [(u.cues[0].id, u.start, u.end) for u in t.utterances] == [("a", 5, 6), ("d", 8, 8)]
    joined = "\n".join(t.warnings)
    for bit in ("utterances[1] is not an object", "cue 'b': utterances[2] has no numeric",
                "cue 'c': time -3.0", "cue 'd': end 00:00:07.000 is before start",
                "cue 'e': utterances[5] has no text", "cue 'f': utterances[6] has no numeric",
                "meeting date '14 March' is not an ISO 8601 date"):
        assert bit in joined


def test_out_of_order_utterances_are_sorted(tmp_path: Path) -> None:
    t = read_transcript(write(tmp_path, {"utterances": [
        {"cue": "late", "start": 9, "end": 10, "text": "b"},
        {"cue": "early", "start": 1, "end": 2, "text": "a"}]}))
    assert [(u.index, u.cues[0].id) for u in t.utterances] == [(0, "early"), (1, "late")]
    assert "sorted" in t.warnings[0]


def test_invalid_json_names_the_line(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="line 3: is not valid JSON"):
        read_transcript(write(tmp_path, '{\n "utterances": [\n  {"start": 1,,}\n ]\n}'))


def test_json_without_utterances(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="has no 'utterances' list"):
        read_transcript(write(tmp_path, {"meeting": {}}))


def test_json_with_no_readable_utterance(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="holds no readable utterance.*utterances\\[0\\]"):
        read_transcript(write(tmp_path, {"utterances": [{"text": "no times"}]}))


def test_deeply_nested_json_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError):
        read_transcript(write(tmp_path, "[" * 100_000 + "]" * 100_000))
