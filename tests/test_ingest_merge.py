"""Merging cues into utterances, and finding the cue that holds a quote."""

from __future__ import annotations

from minutes.ingest import MAX_DURATION, MAX_GAP, merge_cues
from minutes.model import Cue


def cue(cid: str, start: float, end: float, text: str) -> Cue:
    return Cue(id=cid, start=start, end=end, text=text)


def test_consecutive_cues_of_one_speaker_merge_keeping_ids_and_times() -> None:
    pieces = [("Ada", cue("1", 0.0, 2.0, "We need a new")),
              ("Ada", cue("2", 2.0, 4.0, "supplier by Friday.")),
              ("Ben", cue("3", 4.5, 6.0, "I'll ask around.")),
              ("Ada", cue("4", 6.5, 8.0, "Thanks."))]
    utts = merge_cues(pieces)
    assert [(u.index, u.speaker, u.label, u.start, u.end, u.text) for u in utts] == [
        (0, "Ada", "Ada", 0.0, 4.0, "We need a new supplier by Friday."),
        (1, "Ben", "Ben", 4.5, 6.0, "I'll ask around."),
        (2, "Ada", "Ada", 6.5, 8.0, "Thanks.")]
    assert utts[0].cues == (pieces[0][1], pieces[1][1])


def test_evidence_names_the_cue_holding_the_quote() -> None:
    utt, = merge_cues([("Ada", cue("c1", 10.0, 12.0, "Let's start with the budget.")),
                       ("Ada", cue("c2", 12.0, 15.0, "Ben will send the report by Friday.")),
                       ("Ada", cue("c3", 15.0, 17.0, "Any questions?"))])
    found = utt.cue_for("Ben will send the report")
    assert found is not None and found.id == "c2"
    assert utt.time_of("send the report by Friday") == (12.0, 15.0)


def test_a_long_pause_ends_the_utterance() -> None:
    at_limit = merge_cues([("A", cue("1", 0.0, 1.0, "one")),
                           ("A", cue("2", 1.0 + MAX_GAP, 4.0, "two"))])
    past = merge_cues([("A", cue("1", 0.0, 1.0, "one")),
                       ("A", cue("2", 1.0 + MAX_GAP + 0.01, 4.0, "two"))])
    assert (len(at_limit), len(past)) == (1, 2)


def test_utterances_stop_at_the_maximum_length() -> None:
    pieces = [("A", cue(str(i), i * 5.0, i * 5.0 + 5.0, f"part {i}")) for i in range(30)]
    utts = merge_cues(pieces)
    assert all(u.end - u.start <= MAX_DURATION for u in utts)
    assert [len(u.cues) for u in utts] == [12, 12, 6]
    assert [c for u in utts for c in u.cues] == [c for _, c in pieces]


def test_parameters_change_the_limits() -> None:
    pieces = [("A", cue("1", 0.0, 1.0, "a")), ("A", cue("2", 4.0, 5.0, "b"))]
    assert len(merge_cues(pieces)) == 2
    assert len(merge_cues(pieces, max_gap=5.0)) == 1
    assert len(merge_cues(pieces, max_gap=5.0, max_duration=4.0)) == 2


def test_out_of_order_cues_are_sorted_stably() -> None:
    pieces = [("B", cue("late", 9.0, 10.0, "late.")),
              ("A", cue("tie1", 3.0, 4.0, "first of the tie.")),
              ("C", cue("tie2", 3.0, 3.5, "second of the tie.")),
              ("A", cue("early", 0.0, 0.5, "early."))]
    utts = merge_cues(pieces)
    assert [c.id for u in utts for c in u.cues] == ["early", "tie1", "tie2", "late"]
    assert [u.index for u in utts] == [0, 1, 2, 3]


def test_overlapping_speakers_interleave_by_start() -> None:
    # as in AMI, where one speaker's backchannel falls inside another's turn
    pieces = [("A", cue("a1", 0.0, 6.0, "So the remote should")),
              ("B", cue("b1", 2.0, 2.5, "Mm-hmm.")),
              ("A", cue("a2", 6.0, 9.0, "be easy to hold."))]
    utts = merge_cues(pieces)
    assert [(u.speaker, [c.id for c in u.cues]) for u in utts] == [
        ("A", ["a1"]), ("B", ["b1"]), ("A", ["a2"])]


def test_overlapping_cues_of_one_speaker_keep_the_latest_end() -> None:
    utt, = merge_cues([("A", cue("1", 0.0, 10.0, "long")), ("A", cue("2", 1.0, 3.0, "inside"))])
    assert (utt.start, utt.end) == (0.0, 10.0)


def test_unlabelled_cues_merge_only_inside_a_sentence() -> None:
    pieces = [("", cue("1", 0.0, 1.0, "The motion")), ("", cue("2", 1.0, 2.0, "is carried.")),
              ("", cue("3", 2.0, 3.0, "Next item."))]
    assert [u.text for u in merge_cues(pieces)] == ["The motion is carried.", "Next item."]


def test_no_cues_no_utterances() -> None:
    assert merge_cues([]) == ()
