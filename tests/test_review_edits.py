"""The review file: each edit checked, stored, replayed from disk and applied to the draft."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest
from test_review_loader import HOSTILE, sample_json, sample_minutes

from minutes.errors import InputError, UsageError
from minutes.ingest import read_transcript
from minutes.render import render, to_json_dict
from minutes.review.edits import (
    apply_review,
    digest,
    dump_review,
    load_review,
    new_review,
    record,
    review_path,
    validate_edit,
)
from minutes.review.export import reviewed_minutes, unreviewed
from minutes.review.sources import cue_finder, roster_for


def _review(data: dict[str, Any], *edits: dict[str, Any], cue_of: Any = None) -> dict[str, Any]:
    review = new_review("fenmoor.json", "0" * 64)
    for edit in edits:
        record(review, validate_edit(edit, data, review, cue_of))
    return review


def test_review_lives_beside_the_minutes() -> None:
    assert review_path(Path("out/board.json")) == Path("out/board.review.json")


# --------------------------------------------------------------------------- applying


def test_field_edits_reach_the_item_and_nothing_else() -> None:
    data = sample_json()
    review = _review(data,
                     {"op": "set", "id": "A1", "fields": {"owner": "Ludo Brisk",
                                                          "due": "2026-03-13"}},
                     {"op": "set", "id": "M1", "fields": {"mover": "Tamsin Oduya", "for": 3,
                                                          "against": 0, "abstain": 1}})
    out = apply_review(data, review)
    assert out["actions"][0]["owner"] == "Ludo Brisk"
    assert out["actions"][0]["due"] == "2026-03-13"
    assert out["motions"][0]["mover"] == "Tamsin Oduya"
    assert out["motions"][0]["vote"] | {"roll_call": {}} == {
        "for": 3, "against": 0, "abstain": 1, "roll_call": {}, "method": "voice",
        "roll_call_order": []}
    assert out["actions"][1] == data["actions"][1]
    assert data == sample_json()  # the draft itself is never changed


def test_counts_on_a_motion_without_a_vote_make_it_a_counted_vote() -> None:
    data = sample_json()
    data["motions"][0]["vote"]["method"] = "none"
    out = apply_review(data, _review(data, {"op": "set", "id": "M1", "fields": {"for": 4}}))
    assert out["motions"][0]["vote"]["method"] == "count"
    # clearing a count back to "not heard" is None, never zero
    out = apply_review(data, _review(data, {"op": "set", "id": "M1", "fields": {"for": ""}}))
    assert out["motions"][0]["vote"]["for"] is None


def test_rejected_items_and_dismissed_notes_are_left_out() -> None:
    data = sample_json()
    review = _review(data, {"op": "state", "id": "D1", "state": "rejected"},
                     {"op": "state", "id": "A1", "state": "accepted"},
                     {"op": "state", "id": "N1", "state": "rejected"})
    out = apply_review(data, review)
    assert [d["id"] for d in out["decisions"]] == []
    assert [a["id"] for a in out["actions"]] == ["A1", "A2"]
    assert out["notes"] == data["notes"][1:]
    view = apply_review(data, review, drop_rejected=False)
    assert [(a["id"], a["review_state"]) for a in view["actions"]] == [
        ("A1", "accepted"), ("A2", "pending")]
    assert view["decisions"][0]["review_state"] == "rejected"
    assert view["note_states"] == {"N1": "rejected", "N2": "pending"}
    assert unreviewed(data, review) == ["M1", "A2", "Q1"]


def test_an_amendment_of_a_rejected_motion_stands_alone() -> None:
    data = sample_json()
    amendment = json.loads(json.dumps(data["motions"][0]))
    amendment.update(id="M2", amends="M1", kind="amendment", time=9.0)
    data["motions"].append(amendment)
    out = apply_review(data, _review(data, {"op": "state", "id": "M1", "state": "rejected"}))
    assert [(m["id"], m["amends"]) for m in out["motions"]] == [("M2", None)]


def test_a_settled_flag_can_be_dropped_but_none_invented() -> None:
    data = sample_json()
    out = apply_review(data, _review(data, {"op": "set", "id": "M1", "fields": {"flags": []}}))
    assert out["motions"][0]["flags"] == []
    with pytest.raises(UsageError, match="only keep flags the draft raised"):
        _review(data, {"op": "set", "id": "M1", "fields": {"flags": ["all fine"]}})


def test_rename_reaches_every_mention() -> None:
    data = sample_json()
    out = apply_review(data, _review(
        data, {"op": "rename", "from": "Speaker 1", "to": "Ludo Brisk"}))
    labels = [u.pop("label") for u in out["utterances"]]
    notes = out.pop("notes")
    assert "Speaker 1" not in json.dumps(out)
    assert labels[2] == "Speaker 1" and "Speaker 1" in notes[1]  # as the source gave them
    assert out["utterances"][2]["speaker"] == "Ludo Brisk"
    assert out["motions"][0]["seconder"] == "Ludo Brisk"
    assert out["motions"][0]["evidence"][1]["speaker"] == "Ludo Brisk"
    assert out["actions"][0]["owner"] == "Ludo Brisk"
    assert out["unknown_speakers"] == []
    # the guest line and the absent member are one person now: one line, present
    assert [(a["name"], a["present"]) for a in out["attendees"]].count(("Ludo Brisk", True)) == 1
    assert "Ludo Brisk" not in [a["name"] for a in out["attendees"] if not a["present"]]


def test_renames_apply_in_order_and_can_be_undone() -> None:
    data = sample_json()
    review = _review(data, {"op": "rename", "from": "Speaker 1", "to": "L. Brisk"},
                     {"op": "rename", "from": "L. Brisk", "to": "Ludo Brisk"})
    assert apply_review(data, review)["actions"][0]["owner"] == "Ludo Brisk"
    record(review, validate_edit({"op": "unrename", "index": 1}, data, review))
    assert apply_review(data, review)["actions"][0]["owner"] == "L. Brisk"


# --------------------------------------------------------------------------- checking


@pytest.mark.parametrize(("edit", "message"), [
    ({"op": "state", "id": "A9", "state": "accepted"}, "no item 'A9'"),
    ({"op": "state", "id": "A1", "state": "maybe"}, "'state': choose one of"),
    ({"op": "set", "id": "A1", "fields": {"time": 3.0}}, "'time' cannot be edited"),
    ({"op": "set", "id": "A1", "fields": {"due": "next Friday"}}, "expected a date"),
    ({"op": "set", "id": "A1", "fields": {"due": "2026-02-30"}}, "expected a date"),
    ({"op": "set", "id": "A1", "fields": {"status": "finished"}}, "choose one of open"),
    ({"op": "set", "id": "A1", "fields": {"task": "  "}}, "must not be empty"),
    ({"op": "set", "id": "A1", "fields": {"task": "x" * 2001}}, "longer than 2000"),
    ({"op": "set", "id": "A1", "fields": {"owner": "Ann\x00"}}, "control characters"),
    ({"op": "set", "id": "A1", "fields": {"owner": 7}}, "expected text"),
    ({"op": "set", "id": "M1", "fields": {"for": -1}}, "whole number from 0"),
    ({"op": "set", "id": "M1", "fields": {"for": True}}, "whole number from 0"),
    ({"op": "set", "id": "M1", "fields": {"for": 2.5}}, "whole number from 0"),
    ({"op": "set", "id": "M1", "fields": {"outcome": "passed"}}, "choose one of carried"),
    ({"op": "set", "id": "Q1", "fields": {"answered": "yes"}}, "true or false"),
    ({"op": "set", "id": "N1", "fields": {"text": "x"}}, "kept or rejected, not edited"),
    ({"op": "set", "id": "A1", "fields": {}}, "'fields' must be"),
    ({"op": "rename", "from": "Nobody Here", "to": "X"}, "nobody is called"),
    ({"op": "rename", "from": "Speaker 1", "to": "Speaker 1"}, "same as the old"),
    ({"op": "unrename", "index": 0}, "one of the renames"),
    ({"op": "delete", "id": "A1"}, "'op' must be one of"),
    ([1, 2], "must be a JSON object"),
    ({"op": "add", "kind": "memo", "span": []}, "'kind': choose one of"),
    ({"op": "add", "kind": "action", "span": []}, "1 to 50 pieces"),
    ({"op": "add", "kind": "action", "span": [{"utterance": 99, "from": 0, "to": 3}]},
     "utterance 99 is out of order"),
    ({"op": "add", "kind": "action", "span": [{"utterance": 4, "from": 0, "to": 999}]},
     "not inside utterance 4"),
    ({"op": "add", "kind": "action", "span": [{"utterance": 4, "from": 5, "to": 5}]},
     "not inside utterance 4"),
    ({"op": "add", "kind": "action", "span": [{"utterance": 4, "from": 1, "to": 2}]},
     "holds no words"),
    ({"op": "add", "kind": "action", "span": [{"utterance": 4, "from": 0, "to": 3},
                                              {"utterance": 2, "from": 0, "to": 3}]},
     "out of order"),
    ({"op": "add", "kind": "action", "span": [{"utterance": "4", "from": 0, "to": 3}]},
     "expected a whole number"),
])
def test_bad_edits_are_refused_with_a_reason(edit: Any, message: str) -> None:
    data = sample_json()
    with pytest.raises(UsageError, match=message):
        _review(data, edit)


def test_text_is_stored_as_typed_markup_and_all() -> None:
    data = sample_json()
    out = apply_review(data, _review(data, {"op": "set", "id": "D1",
                                            "fields": {"text": f"  {HOSTILE}  "}}))
    assert out["decisions"][0]["text"] == HOSTILE  # escaping is the renderers' job


# --------------------------------------------------------------------------- adding


def test_an_added_item_cites_the_selected_words() -> None:
    data = sample_json()
    text = data["utterances"][6]["text"]
    start = text.index("the depot")
    review = _review(data, {"op": "add", "kind": "decision",
                            "span": [{"utterance": 6, "from": start, "to": len(text)}]})
    added = review["added"][0]["item"]
    assert added["id"] == "D2"
    assert added["text"] == "the depot stays open on Saturdays."
    assert added["by"] == "Osric Palfrey"
    assert added["source"] == "clerk"
    assert added["evidence"] == [{"utterance": 6, "cue": "c6-0", "start": 24.5, "end": 28.0,
                                  "speaker": "Osric Palfrey",
                                  "quote": "the depot stays open on Saturdays."}]
    out = apply_review(data, review)
    assert [d["id"] for d in out["decisions"]] == ["D1", "D2"]
    # an added item is reviewed like any other
    review2 = _review(data, {"op": "add", "kind": "decision",
                             "span": [{"utterance": 6, "from": start, "to": len(text)}]},
                      {"op": "state", "id": "D2", "state": "rejected"})
    assert [d["id"] for d in apply_review(data, review2)["decisions"]] == ["D1"]


def test_a_span_over_turns_gives_one_evidence_per_turn() -> None:
    data = sample_json()
    review = _review(data, {"op": "add", "kind": "motion", "span": [
        {"utterance": 1, "from": 0, "to": 45}, {"utterance": 2, "from": 0, "to": 7}]})
    motion = apply_review(data, review)["motions"][1]
    assert motion["id"] == "M2"
    assert [(e["utterance"], e["quote"]) for e in motion["evidence"]] == [
        (1, "I move that we replace the pump at Millbrook."), (2, "Second.")]
    assert motion["mover"] == "Osric Palfrey"
    assert motion["seconder"] is None and motion["outcome"] == "pending"
    assert motion["vote"]["for"] is None
    # the merged turn's cue is not in the JSON: none is claimed; the one-cue turn's is
    assert [e["cue"] for e in motion["evidence"]] == [None, "c2-0"]


def test_the_caption_file_gives_added_items_their_cue(tmp_path: Path) -> None:
    from dataclasses import replace

    vtt = tmp_path / "fenmoor.vtt"
    vtt.write_text("WEBVTT\n\n1\n00:00:01.000 --> 00:00:04.000\n<v Osric Palfrey>I move that "
                   "we replace the pump.\n\n2\n00:00:04.200 --> 00:00:07.000\n<v Osric "
                   "Palfrey>The quote is on file.\n", encoding="utf-8")
    utterances = read_transcript(vtt).utterances
    assert len(utterances) == 1 and len(utterances[0].cues) == 2
    minutes = replace(sample_minutes(), utterances=utterances, segments=(), source=str(vtt))
    minutes = replace(minutes, ledger=replace(minutes.ledger, motions=(), decisions=(),
                                              actions=(), questions=()))
    path = tmp_path / "fenmoor.json"
    path.write_bytes(render(minutes, "json"))
    data = json.loads(path.read_bytes())
    finder, found = cue_finder(path, data)
    assert found == str(vtt)
    text = data["utterances"][0]["text"]
    at = text.index("The quote")
    review = _review(data, {"op": "add", "kind": "action",
                            "span": [{"utterance": 0, "from": at, "to": len(text)}]},
                     cue_of=finder)
    assert review["added"][0]["item"]["evidence"][0] | {"quote": ""} == {
        "utterance": 0, "cue": "2", "start": 4.2, "end": 7.0, "speaker": "Osric Palfrey",
        "quote": ""}
    # a caption file that no longer matches the JSON is not used
    vtt.write_text(vtt.read_text(encoding="utf-8").replace("on file", "in the post"),
                   encoding="utf-8")
    assert cue_finder(path, data) == (None, "")


def test_roster_comes_from_the_meeting_file_beside_the_source(tmp_path: Path) -> None:
    (tmp_path / "people.toml").write_text(
        '[roster]\nbody = "Fenmoor Water Board"\nrecord_seconder = true\n\n[[person]]\n'
        'name = "Wren Halvorsen"\nrole = "chair"\nvotes = true\n', encoding="utf-8")
    (tmp_path / "fenmoor.vtt").write_text("WEBVTT\n", encoding="utf-8")
    (tmp_path / "fenmoor.meeting.toml").write_text('profiles = "people.toml"\n',
                                                   encoding="utf-8")
    data = sample_json()
    roster, where = roster_for(tmp_path / "fenmoor.json", data)
    assert roster is not None and roster.record_seconder and where.endswith("people.toml")
    assert roster_for(tmp_path / "elsewhere" / "x.json", {"meeting": {"source": "none.vtt"}}) \
        == (None, "")


# --------------------------------------------------------------------------- stored and replayed


def _stored(tmp_path: Path, data: dict[str, Any], review: dict[str, Any]) -> Path:
    path = tmp_path / "fenmoor.review.json"
    path.write_bytes(dump_review(review))
    return path


def test_a_review_file_replays_to_the_same_review(tmp_path: Path) -> None:
    data = sample_json()
    sha = digest(b"draft bytes")
    review = new_review("fenmoor.json", sha)
    for edit in ({"op": "set", "id": "A1", "fields": {"owner": "Ludo Brisk"}},
                 {"op": "state", "id": "D1", "state": "rejected"},
                 {"op": "add", "kind": "question",
                  "span": [{"utterance": 7, "from": 37, "to": 75}]},
                 {"op": "set", "id": "Q2", "fields": {"answered": True}},
                 {"op": "rename", "from": "Speaker 1", "to": "Ludo Brisk"}):
        record(review, validate_edit(edit, data, review))
    loaded = load_review(_stored(tmp_path, data, review), data, sha)
    assert loaded == review
    assert apply_review(data, loaded) == apply_review(data, review)


def test_a_review_of_another_draft_is_refused(tmp_path: Path) -> None:
    data = sample_json()
    path = _stored(tmp_path, data, new_review("fenmoor.json", digest(b"old draft")))
    with pytest.raises(InputError, match="another version of 'fenmoor.json'"):
        load_review(path, data, digest(b"new draft"))


@pytest.mark.parametrize("tamper", [
    lambda r: r["items"].update({"A7": {"state": "rejected", "fields": {}}}),
    lambda r: r["items"].update({"A1": {"state": "pending", "fields": {"owner": 3}}}),
    lambda r: r["added"].append({"kind": "action", "item": {
        "id": "A1", "evidence": [{"utterance": 0, "quote": "I call"}]}}),
    lambda r: r["added"].append({"kind": "action", "item": {
        "id": "A3", "evidence": [{"utterance": 0, "quote": "words nobody said"}]}}),
    lambda r: r.update(renames="Speaker 1"),
])
def test_a_tampered_review_file_is_refused(tmp_path: Path, tamper: Any) -> None:
    data = sample_json()
    sha = digest(b"draft")
    review = new_review("fenmoor.json", sha)
    tamper(review)
    with pytest.raises(InputError, match="does not fit the minutes"):
        load_review(_stored(tmp_path, data, review), data, sha)


def test_reviewed_minutes_stay_a_draft_until_approved() -> None:
    import datetime as dt

    data = sample_json()
    review = _review(data, {"op": "state", "id": "Q1", "state": "rejected"})
    draft = reviewed_minutes(data, review)
    assert draft.approved_on is None and draft.ledger.questions == ()
    approved = reviewed_minutes(data, review, approved_on=dt.date(2026, 4, 1))
    assert to_json_dict(approved)["draft"] is False
    assert to_json_dict(approved)["approved_on"] == "2026-04-01"
