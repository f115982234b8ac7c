"""Key points, the meeting summary and the cleaning of spoken text."""

from __future__ import annotations

import pytest

from minutes import nlp
from minutes.keypoints import clean, key_points, summarise
from minutes.model import Cue, Segment, Utterance
from minutes.nlp import Parsed


@pytest.mark.parametrize(("spoken", "cleaned"), [
    ("Um well this is the kick-off meeting for our our project.",
     "Well this is the kick-off meeting for our project."),  # AMI ES2002a, act 2 (CC BY 4.0)
    ("I- I think we should, um, go with the the blue one.",
     "I think we should go with the blue one."),
    ("I think I think we could do it.", "I think we could do it."),
    ("Wha - what you'd really like is a beep.", "What you'd really like is a beep."),
    ("M my favourite animal is my own dog.", "My favourite animal is my own dog."),
    ("Uh, the budget is, uh, fine.", "The budget is fine."),
    ("The price is fine, uh.", "The price is fine."),
    # words that only look like repeats or fragments stay
    ("So we agreed on one design. Yes. Yes.", "So we agreed on one design. Yes. Yes."),
    ("The kick-off is at nine, then a stand-up.", "The kick-off is at nine, then a stand-up."),
    ("We need an answer in a week.", "We need an answer in a week."),
])
def test_clean_removes_fillers_stutters_and_false_starts_only(spoken: str, cleaned: str) -> None:
    assert clean(spoken) == cleaned


def test_clean_of_nothing_but_fillers_is_empty() -> None:
    assert clean("Um, uh, hmm.") == ""


LINES = [
    ("Ada", "Okay."),
    ("Ben", "Yeah."),
    ("Ada", "The warehouse lease runs out in March and the landlord offers a five year lease."),
    ("Ben", "Mm-hmm."),
    ("Ben", "Um, the the new warehouse lease has a break clause after two years."),
    ("Ada", "The moving date depends on when the old warehouse lease ends."),
    ("Ada", "The moving date depends on when the old warehouse lease ends."),
    ("Cleo", "Right, so the removal van is booked for the moving date in April."),
    ("Ben", "The weather was nice this morning."),
]


def _segment(lines: list[tuple[str, str]]) -> tuple[Segment, Parsed]:
    utterances = []
    for i, (speaker, text) in enumerate(lines):
        t = 10.0 * i
        # two cues per utterance: the point's time is the start of the cue that holds it
        cues = (Cue(f"{i}a", t, t + 1.0, "(noise)"), Cue(f"{i}b", t + 2.0, t + 8.0, text))
        utterances.append(Utterance(i, t, t + 8.0, speaker, text, cues))
    parsed = nlp.parse(utterances)
    return Segment(0, 0, len(lines) - 1, 0.0, utterances[-1].end, tuple(utterances)), parsed


def test_key_points_are_central_cleaned_unrepeated_and_timed() -> None:
    segment, parsed = _segment(LINES)
    points = key_points(segment, parsed, limit=3)
    assert 1 <= len(points) <= 3
    texts = [p.text for p in points]
    assert len({t.lower() for t in texts}) == len(texts)  # the repeated line appears once
    assert "The new warehouse lease has a break clause after two years." in texts
    assert not any(t in ("Okay.", "Yeah.", "Mm-hmm.") for t in texts)
    assert "The weather was nice this morning." not in texts  # off the segment's topic
    for p in points:
        u = segment.utterances[p.utterance]
        assert p.speaker == u.speaker
        assert p.start == u.cues[1].start
    assert [p.start for p in points] == sorted(p.start for p in points)


def test_key_points_of_back_channels_only_is_empty() -> None:
    segment, parsed = _segment([("Ada", "Okay."), ("Ben", "Yeah, yeah."), ("Ada", "Mm-hmm.")])
    assert key_points(segment, parsed) == ()


def test_summary_takes_a_point_from_every_segment_before_a_second() -> None:
    lines = LINES[:8] + [
        ("Cleo", "For the holiday party the restaurant can seat forty guests on the terrace."),
        ("Ada", "The caterer offers a vegetarian menu and a dessert buffet for the guests."),
        ("Ben", "The restaurant needs the final guest numbers two weeks before the party."),
    ]
    whole, parsed = _segment(lines)
    first = Segment(0, 0, 7, 0.0, 78.0, whole.utterances[:8])
    second = Segment(1, 8, 10, 80.0, 108.0, whole.utterances[8:])
    summary = summarise([first, second], parsed, limit=2)
    assert len(summary) == 2
    assert {p.utterance < 8 for p in summary} == {True, False}
    assert summarise([first, second], parsed, limit=0) == ()
    longer = summarise([first, second], parsed, limit=5)
    assert 2 < len(longer) <= 5
    assert [p.start for p in longer] == sorted(p.start for p in longer)
