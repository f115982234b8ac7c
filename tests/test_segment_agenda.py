"""Agenda alignment on the invented demo meetings, checked against their answer keys.

The demo meetings, their meeting files and keys (demo_meetings/*.key.json) are invented by
us. A key's ``not_discussed`` (project calls) or ``agenda_not_taken_up`` (board) lists the
agenda items never taken up; an absent field means every item was.
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import pytest

from minutes import nlp
from minutes.model import AgendaItem, Cue, Segment, Utterance
from minutes.segment import not_discussed, segment, transitions

DEMO = Path(__file__).resolve().parents[1] / "demo_meetings"
MEETINGS = ["project_week1", "project_week2", "board_regular"]


@pytest.fixture(scope="session")
def demo_segments() -> dict[str, tuple[tuple[AgendaItem, ...], tuple[Segment, ...]]]:
    """Return each demo meeting's agenda and segments, each read and parsed once."""
    from minutes.ingest import read_transcript
    from minutes.meeting import load_meeting

    out = {}
    for name in MEETINGS:
        info = load_meeting(DEMO / f"{name}.meeting.toml").info
        transcript = replace(read_transcript(DEMO / f"{name}.vtt"), meeting=info)
        out[name] = (info.agenda, segment(transcript, nlp.parse(transcript.utterances)))
    return out


def _key_not_taken_up(name: str) -> set[str]:
    key = json.loads((DEMO / f"{name}.key.json").read_text(encoding="utf-8"))
    if "agenda_not_taken_up" in key:
        return {item["title"] for item in key["agenda_not_taken_up"]}
    return set(key.get("not_discussed", []))


@pytest.mark.parametrize("name", MEETINGS)
def test_not_discussed_matches_the_key(demo_segments: dict, name: str) -> None:
    agenda, segments = demo_segments[name]
    assert set(not_discussed(segments, agenda)) == _key_not_taken_up(name)


@pytest.mark.parametrize("name", MEETINGS)
def test_aligned_items_follow_agenda_order(demo_segments: dict, name: str) -> None:
    _, segments = demo_segments[name]
    items = [s.agenda_item for s in segments if s.agenda_item is not None]
    assert items == sorted(items)
    assert [u.index for s in segments for u in s.utterances] == \
        list(range(segments[-1].last + 1))


def test_board_short_items_get_their_own_part(demo_segments: dict) -> None:
    # board_regular.key.json: the director's report is given from cue 144, public comment
    # opens with its first speaker at cue 259; each part starts with the chair's call of it
    agenda, segments = demo_segments["board_regular"]
    opening = {agenda[s.agenda_item].title: [c.id for u in s.utterances[:3] for c in u.cues]
               for s in segments if s.agenda_item is not None}
    assert "144" in opening["Director's report"]
    assert "259" in opening["Public comment"]
    assert "Call to order, roll call and agenda" in opening


def _utterances(lines: list[str]) -> list[Utterance]:
    return [Utterance(i, 10.0 * i, 10.0 * i + 8, "Chair", text,
                      (Cue(str(i + 1), 10.0 * i, 10.0 * i + 8, text),))
            for i, text in enumerate(lines)]


def test_transitions_read_numbers_titles_asides_and_deferrals() -> None:
    agenda = (AgendaItem("Budget", number="1"), AgendaItem("Roof repairs", number="2"),
              AgendaItem("Garden party", number="3"), AgendaItem("Staff parking", number="4"))
    utterances = _utterances([
        "Is the parking item still on? Yes, it's item four, we'll get there.",
        "Item one, the budget. Tom?",
        "The figures are in the packet.",
        "Okay. Roof repairs. The roofer came on Monday.",
        "Item three is the garden party, but Ann is away, so we'll carry it over to next month.",
        "That brings us to staff parking.",
    ])
    cues, deferred = transitions(utterances, agenda)
    assert [(c.utterance, c.item, c.explicit) for c in cues] == \
        [(1, 0, True), (3, 1, False), (5, 3, False)]
    assert deferred == {2}


def test_a_run_through_of_the_agenda_is_no_transition() -> None:
    agenda = (AgendaItem("Roof repairs"), AgendaItem("Garden party"), AgendaItem("Insurance"))
    utterances = _utterances(["So roof repairs first, then the garden party and insurance."])
    assert transitions(utterances, agenda) == ([], set())
