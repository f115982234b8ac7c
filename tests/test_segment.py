"""Segmentation on hand-built transcripts: coverage, boundaries, budget, agenda alignment."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from minutes import nlp
from minutes.errors import UsageError
from minutes.model import AgendaItem, Cue, MeetingInfo, Transcript, Utterance
from minutes.nlp import Parsed
from minutes.segment import SegmentOptions, _monotone, not_discussed, segment

# Three invented topics, each said by a different pair of people.
TOPICS = {
    "lease": (("Ada", "Ben"), [
        "The warehouse lease on Mill Street runs out at the end of March.",
        "The landlord wants a five year lease with a rent review after two years.",
        "Can we move the stock out of the warehouse before the moving date in April?",
        "The removal van is booked for the moving date, and the lease deposit comes back then.",
        "I read the lease again and the break clause in the warehouse lease is fair.",
        "So the new warehouse has loading bays, and the landlord fixes the roof.",
    ]),
    "website": (("Cleo", "Dev"), [
        "The website redesign needs a new checkout page and faster product photos.",
        "Our designer sent three mock-ups of the homepage with a bigger search box.",
        "The checkout page loses customers on mobile phones, the analytics show it.",
        "Let us test the homepage mock-ups with ten customers before we choose a designer.",
        "The product photos load slowly because the image server is in the wrong region.",
        "I can move the image server and compress the product photos this month.",
    ]),
    "party": (("Ada", "Cleo"), [
        "For the holiday party the restaurant can seat forty guests on the terrace.",
        "The caterer offers a vegetarian menu and a dessert buffet for the guests.",
        "Should the holiday party have a band or just a playlist and a quiz?",
        "The restaurant needs the final guest numbers two weeks before the party.",
        "I will collect the menu choices from every guest by Friday.",
        "A quiz with small prizes worked well at the last holiday party.",
    ]),
}
SECONDS = 7.0  # one utterance every 7 seconds


def _build(order: list[str], per_topic: int, agenda: tuple[AgendaItem, ...] = ()
           ) -> tuple[Transcript, Parsed, list[int]]:
    """Return a transcript cycling through each topic's lines, its parse and topic starts."""
    docs = {text: doc for text, doc in zip(
        [t for _, lines in TOPICS.values() for t in lines],
        nlp.load().pipe([t for _, lines in TOPICS.values() for t in lines]), strict=True)}
    utterances, parsed, starts = [], [], []
    for topic in order:
        people, lines = TOPICS[topic]
        starts.append(len(utterances))
        for n in range(per_topic):
            i = len(utterances)
            text = lines[n % len(lines)]
            t = i * SECONDS
            cue = Cue(str(i + 1), t, t + SECONDS - 1.0, text)
            utterances.append(Utterance(i, t, t + SECONDS - 1.0, people[n % 2], text, (cue,)))
            parsed.append(docs[text])
    meeting = MeetingInfo(title="Invented test meeting", agenda=agenda)
    return Transcript(tuple(utterances), meeting=meeting), Parsed(tuple(parsed)), starts


def _assert_covers(transcript: Transcript, segments: tuple) -> None:
    indices = [u.index for s in segments for u in s.utterances]
    assert indices == list(range(len(transcript.utterances)))
    for n, s in enumerate(segments):
        assert s.index == n
        assert (s.first, s.last) == (s.utterances[0].index, s.utterances[-1].index)
        assert s.start == s.utterances[0].start
        assert s.points == ()


def test_boundaries_fall_where_the_topic_changes() -> None:
    transcript, parsed, starts = _build(["lease", "website", "party"], per_topic=60)
    segments = segment(transcript, parsed)
    _assert_covers(transcript, segments)
    found = [s.first for s in segments[1:]]
    assert len(found) == 2
    for true, got in zip(starts[1:], found, strict=True):
        assert abs(true - got) <= 3, (starts, found)


def test_titles_and_keywords_come_from_the_segment_s_own_phrases() -> None:
    transcript, parsed, _ = _build(["lease", "website", "party"], per_topic=60)
    segments = segment(transcript, parsed)
    assert "lease" in segments[0].title.lower() or "warehouse" in segments[0].title.lower()
    assert any(k in segments[1].title.lower() for k in ("website", "checkout", "photo", "mock"))
    assert any(k in segments[2].title.lower() for k in ("party", "guest", "restaurant", "quiz"))
    for s in segments:
        assert s.title[:1].isupper()
        assert 1 <= len(s.keywords) <= 5
        assert len(set(s.keywords)) == len(s.keywords)
        assert s.agenda_item is None


def test_agenda_items_are_aligned_in_order_and_the_missing_one_listed() -> None:
    agenda = (
        AgendaItem("Warehouse lease and moving date"),
        AgendaItem("Pension scheme review", notes="trustees, contributions, annuities"),
        AgendaItem("Website redesign: checkout and product photos"),
        AgendaItem("Holiday party"),
    )
    transcript, parsed, starts = _build(["lease", "website", "party"], 60, agenda)
    segments = segment(transcript, parsed)
    _assert_covers(transcript, segments)
    items = [s.agenda_item for s in segments]
    assert items == sorted(items)  # type: ignore[type-var]
    assert [s.agenda_item for s in segments if s.first in starts] == [0, 2, 3]
    assert segments[0].title == "Warehouse lease and moving date"
    assert not_discussed(segments, agenda) == ("Pension scheme review",)


def test_no_segment_exceeds_the_budget_on_a_three_hour_meeting() -> None:
    order = ["lease", "website", "party"] * 12  # 36 topics of 15 minutes: 9 hours cut to 3
    transcript, parsed, _ = _build(order, per_topic=43)
    assert transcript.duration >= 3 * 3600
    options = SegmentOptions(max_words=900, max_duration=600.0)
    segments = segment(transcript, parsed, options)
    _assert_covers(transcript, segments)
    for s in segments:
        assert s.words <= options.max_words
        assert s.end - s.start <= options.max_duration


def test_one_topic_longer_than_the_budget_is_split_into_the_fewest_parts() -> None:
    transcript, parsed, _ = _build(["lease"], per_topic=300)  # 35 minutes, about 4,000 words
    words = sum(len(u.text.split()) for u in transcript.utterances)
    segments = segment(transcript, parsed, SegmentOptions(max_words=1500))
    _assert_covers(transcript, segments)
    assert len(segments) == -(-words // 1500)
    assert all(s.words <= 1500 for s in segments)


def test_empty_and_tiny_transcripts() -> None:
    assert segment(Transcript(()), Parsed(())) == ()
    transcript, parsed, _ = _build(["party"], per_topic=1)
    (only,) = segment(transcript, parsed)
    assert (only.first, only.last) == (0, 0)


def test_a_parse_of_other_utterances_is_refused() -> None:
    transcript, parsed, _ = _build(["party"], per_topic=4)
    with pytest.raises(UsageError, match="parse"):
        segment(transcript, Parsed(parsed.docs[:2]))


@pytest.mark.parametrize("bad", [
    {"min_duration": 900.0, "max_duration": 600.0},
    {"max_words": 0},
    {"speaker_weight": 1.5},
    {"window": 0.0},
])
def test_options_that_cannot_work_are_refused(bad: dict) -> None:
    with pytest.raises(UsageError):
        SegmentOptions(**bad)


def test_monotone_alignment_keeps_agenda_order() -> None:
    # row 2 matches item 0 best, but after row 1 took item 1 it can only go unassigned
    score = np.array([[0.9, 0.1, 0.0], [0.1, 0.8, 0.2], [0.7, 0.0, 0.0], [0.0, 0.2, 0.9]])
    assert _monotone(score, threshold=0.05) == [0, 1, None, 2]
    assert _monotone(np.zeros((2, 2)), threshold=0.05) == [None, None]


DEMO = Path(__file__).resolve().parents[1] / "demo_meetings"


@pytest.mark.skipif(not (DEMO / "project_week1.meeting.toml").is_file(),
                    reason="demo meeting not built yet")
def test_demo_meeting_agenda_alignment() -> None:
    # Invented demo meeting; its key (project_week1.key.json) says "Insurance renewal" is on
    # the agenda and never mentioned.
    from minutes.ingest import read_transcript
    from minutes.meeting import load_meeting

    info = load_meeting(DEMO / "project_week1.meeting.toml").info
    transcript = replace(read_transcript(DEMO / "project_week1.vtt"), meeting=info)
    segments = segment(transcript, nlp.parse(transcript.utterances))
    _assert_covers(transcript, segments)
    items = [s.agenda_item for s in segments if s.agenda_item is not None]
    assert items == sorted(items)
    assert "Insurance renewal" in not_discussed(segments, info.agenda)
    assert len(set(items)) >= 3
