"""SRT reading: blocks, ids, labels, markup, and broken blocks (hand-made inputs)."""

from __future__ import annotations

from pathlib import Path

import pytest

from minutes.errors import InputError
from minutes.ingest import read_transcript
from minutes.model import Cue, Transcript


def read(tmp_path: Path, text: str) -> Transcript:
    path = tmp_path / "in.srt"
    path.write_text(text, encoding="utf-8")
    return read_transcript(path)


def flat(t: Transcript) -> list[tuple[str, Cue]]:
    return [(u.speaker, c) for u in t.utterances for c in u.cues]


def test_blocks_ids_times_and_text(tmp_path: Path) -> None:
    t = read(tmp_path, "1\n00:00:01,000 --> 00:00:02,500\nHello there,\nall of you.\n\n"
                       "2\n00:00:03,000 --> 00:00:04,000\nWelcome.\n")
    assert flat(t) == [("", Cue("1", 1.0, 2.5, "Hello there, all of you.", 2)),
                       ("", Cue("2", 3.0, 4.0, "Welcome.", 7))]
    assert t.format == "srt" and t.warnings == ()


def test_labels_carry_to_unlabelled_lines_and_dash_clears_them(tmp_path: Path) -> None:
    t = read(tmp_path, "1\n00:00:01,000 --> 00:00:02,000\nADA VOSS: We begin.\n\n"
                       "2\n00:00:02,000 --> 00:00:03,000\nFirst item.\n\n"
                       "3\n00:00:03,000 --> 00:00:05,000\nBen: Agreed.\n- Who said that?\n")
    assert [(s, c.id, c.text) for s, c in flat(t)] == [
        ("ADA VOSS", "1", "We begin."), ("ADA VOSS", "2", "First item."),
        ("Ben", "3", "Agreed."), ("", "3", "Who said that?")]


def test_markup_and_position_codes_are_stripped(tmp_path: Path) -> None:
    t = read(tmp_path, '1\n00:00:01.000 --> 00:00:02.000 X1:10 X2:20\n{\\an8}<i>Soft</i> '
                       '<font color="#ff0">and</font> <b>loud</b> &amp; more\n')
    assert [c.text for _, c in flat(t)] == ["Soft and loud & more"]


def test_voice_tag_in_srt_is_read(tmp_path: Path) -> None:
    t = read(tmp_path, "1\n00:00:01,000 --> 00:00:02,000\n<v Ada>Hi.</v>\n")
    assert [(s, c.text) for s, c in flat(t)] == [("Ada", "Hi.")]


def test_missing_blank_line_between_cues(tmp_path: Path) -> None:
    t = read(tmp_path, "1\n00:00:01,000 --> 00:00:02,000\nOne.\n2\n00:00:02,000 --> "
                       "00:00:03,000\nTwo.\n")
    assert [(c.id, c.text) for _, c in flat(t)] == [("1", "One."), ("2", "Two.")]


def test_broken_timing_line_is_skipped_with_its_line(tmp_path: Path) -> None:
    t = read(tmp_path, "1\n00:00:01,000 --> 00:00:02,000\nOne.\n\n"
                       "2\n00:00:0x,000 --> 00:00:03,000\nBroken.\n\n"
                       "3\n00:00:61,000 --> 00:00:62,000\nOver.\n\n"
                       "4\n00:00:04,000 --> 00:00:05,000\nFour.\n")
    assert [c.id for _, c in flat(t)] == ["1", "4"]
    assert t.warnings[0].startswith("line 6: cannot read the timing line")
    assert t.warnings[1].startswith("line 10, cue '3': minutes or seconds over 59")


def test_reversed_and_very_late_times(tmp_path: Path) -> None:
    t = read(tmp_path, "1\n150:00:05,000 --> 150:00:03,000\nLate and reversed.\n")
    (_, cue), = flat(t)
    assert (cue.start, cue.end) == (540005.0, 540005.0)
    assert "end set to the start" in t.warnings[0]


def test_only_broken_blocks_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"line 2: cannot read the timing line"):
        read(tmp_path, "1\n00:00:0x,000 --> 00:00:03,000\nBroken.\n")


def test_no_cues_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="no readable cue|no cues"):
        read(tmp_path, "just some words\nand more\n")
