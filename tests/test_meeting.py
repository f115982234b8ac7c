"""The meeting file: parsing, validation, template choice."""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest

from minutes.errors import InputError
from minutes.meeting import beside, choose_template, load_meeting
from minutes.model import MeetingInfo

GOOD = """
title = "Regular Meeting"
body = "Lakeside Tenants' Council"
kind = "regular meeting"
date = 2026-10-14
place = "Hall B"
start_clock = 18:30:00
next_meeting = "2026-11-11"
profiles = "people.toml"
present = ["Ada Voss"]
[[agenda]]
title = "Approval of the minutes"
[[agenda]]
title = "Boiler replacement"
"""


def test_a_full_meeting_file_is_read(tmp_path: Path) -> None:
    path = tmp_path / "oct.meeting.toml"
    path.write_text(GOOD, encoding="utf-8")
    m = load_meeting(path)
    assert m.info.date == dt.date(2026, 10, 14)
    assert m.info.next_meeting == dt.date(2026, 11, 11)
    assert m.info.start_clock == dt.time(18, 30)
    assert [a.title for a in m.info.agenda] == ["Approval of the minutes", "Boiler replacement"]
    assert m.profiles == tmp_path / "people.toml"
    assert m.warnings == ()


def test_the_meeting_file_beside_the_input_is_found(tmp_path: Path) -> None:
    (tmp_path / "oct.vtt").write_text("WEBVTT\n", encoding="utf-8")
    assert beside(tmp_path / "oct.vtt") is None
    (tmp_path / "oct.meeting.toml").write_text(GOOD, encoding="utf-8")
    assert beside(tmp_path / "oct.vtt") == tmp_path / "oct.meeting.toml"


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ('date = "14/10/2026"', "must be a date like 2026-10-14"),
        ('start_clock = "half six"', "clock time like 18:30:00"),
        ('template = "fancy"', "must be one of general, board"),
        ("[[agenda]]\nnotes = 'x'", "agenda item #1 needs a 'title'"),
        ("title = 5", "'title' must be a string"),
    ],
)
def test_bad_values_name_the_key_and_the_file(tmp_path: Path, text: str, message: str) -> None:
    path = tmp_path / "m.meeting.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(InputError, match=message) as info:
        load_meeting(path)
    assert str(path) in str(info.value)


def test_unknown_keys_warn_rather_than_fail(tmp_path: Path) -> None:
    path = tmp_path / "m.meeting.toml"
    path.write_text('titel = "typo"\n', encoding="utf-8")
    assert "unknown key 'titel'" in load_meeting(path).warnings[0]


@pytest.mark.parametrize(
    ("info", "template"),
    [
        (MeetingInfo(body="Harbourview Library Board"), "board"),
        (MeetingInfo(body="Town Council"), "board"),
        (MeetingInfo(kind="finance committee meeting"), "board"),
        (MeetingInfo(body="Field Team", kind="weekly project call"), "general"),
        (MeetingInfo(body="Town Council", template="general"), "general"),
    ],
)
def test_template_is_board_for_deliberative_bodies(info: MeetingInfo, template: str) -> None:
    assert choose_template(info) == template
