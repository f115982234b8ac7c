"""From recognised words to cues and utterances: pauses, cue length, order, speaker labels."""

from __future__ import annotations

from minutes.asr.backend import Word
from minutes.asr.cues import CueRules, build, group, tidy


def _words(*spec: tuple[float, float, str]) -> list[Word]:
    return [Word(s, e, t) for s, e, t in spec]


def test_a_pause_over_the_limit_ends_the_utterance() -> None:
    words = _words((0.0, 0.4, "We"), (0.5, 0.9, "agree."), (1.8, 2.2, "Next"),
                   (2.3, 2.8, "item."))
    utts = build(words)  # gap 0.9 s > 0.8 s
    assert [u.text for u in utts] == ["We agree.", "Next item."]
    assert [(u.start, u.end) for u in utts] == [(0.0, 0.9), (1.8, 2.8)]


def test_a_pause_under_the_limit_keeps_the_utterance() -> None:
    words = _words((0.0, 0.4, "We"), (0.5, 0.9, "agree."), (1.6, 2.2, "Next"))
    assert [u.text for u in build(words)] == ["We agree. Next"]  # gap 0.7 s


def test_pause_is_configurable() -> None:
    words = _words((0.0, 0.4, "We"), (0.5, 0.9, "agree."), (1.6, 2.2, "Next"))
    assert len(build(words, CueRules(pause=0.5))) == 2


def test_long_utterances_are_cut_at_a_sentence_end_near_the_middle() -> None:
    text = ["The", "treasurer", "read", "the", "report.", "Everyone", "listened", "to", "the",
            "figures", "for", "the", "spring", "term", "and", "the", "summer", "term",
            "closely."]
    words = [Word(i * 0.3, i * 0.3 + 0.25, w) for i, w in enumerate(text)]
    (utt,) = build(words)
    assert [c.text for c in utt.cues] == [
        "The treasurer read the report.",
        "Everyone listened to the figures for the spring term and the summer term closely.",
    ]
    assert all(len(c.text) <= 84 for c in utt.cues)
    assert utt.text == " ".join(text)


def test_no_cue_passes_the_length_limits() -> None:
    words = [Word(i * 0.4, i * 0.4 + 0.3, f"word{i}") for i in range(60)]
    rules = CueRules(max_chars=40, max_seconds=5.0)
    cues = [c for cue_groups in group(words, rules) for c in cue_groups]
    assert len(cues) > 1
    for cue in cues:
        assert len(" ".join(w.text for w in cue)) <= 40
        assert cue[-1].end - cue[0].start <= 5.0
    assert [w for cue in cues for w in cue] == words  # nothing lost or reordered


def test_cue_ids_run_through_the_transcript() -> None:
    words = _words((0.0, 0.5, "One."), (2.0, 2.5, "Two."), (4.0, 4.5, "Three."))
    utts = build(words)
    assert [c.id for u in utts for c in u.cues] == ["1", "2", "3"]
    assert [u.index for u in utts] == [0, 1, 2]
    assert {u.speaker for u in utts} == {"Speaker 1"}
    assert all(u.label == u.speaker for u in utts)


def test_turn_pauses_alternate_two_labels() -> None:
    words = _words((0.0, 0.5, "Question?"), (3.0, 3.5, "Answer."), (4.5, 5.0, "More."),
                   (8.0, 8.5, "Thanks."))
    utts = build(words, turn_pause=2.0)
    # 2.5 s gap: change; 1.0 s gap: new utterance, same speaker; 3.0 s gap: change back.
    assert [u.speaker for u in utts] == ["Speaker 1", "Speaker 2", "Speaker 2", "Speaker 1"]


def test_tidy_orders_words_and_removes_overlap() -> None:
    words = _words((1.0, 1.6, "b"), (0.0, 1.2, "a"), (1.5, 1.4, "c"))
    out = tidy(words)
    assert [w.text for w in out] == ["a", "b", "c"]
    for prev, cur in zip(out, out[1:], strict=False):
        assert cur.start >= prev.end
    assert all(w.end >= w.start for w in out)


def test_no_words_no_utterances() -> None:
    assert build([]) == ()
