"""Plain-text transcripts: each usual shape, ends from the next start, broken stamps."""

from __future__ import annotations

from pathlib import Path

import pytest

from minutes.errors import InputError
from minutes.ingest import read_transcript
from minutes.model import Transcript


def read(tmp_path: Path, text: str) -> Transcript:
    path = tmp_path / "in.txt"
    path.write_text(text, encoding="utf-8")
    return read_transcript(path)


def turns(t: Transcript) -> list[tuple[str, float, float, str]]:
    return [(u.speaker, u.start, u.end, u.text) for u in t.utterances]


@pytest.mark.parametrize("text", [
    "[00:01:02] Ada Voss: We begin.\n[00:01:10] Ben Ode: Two words\n",
    "Ada Voss (00:01:02): We begin.\nBen Ode (00:01:10): Two words\n",
    "00:01:02 Ada Voss: We begin.\n00:01:10 Ben Ode: Two words\n",
    "[01:02] Ada Voss: We begin.\n[01:10] Ben Ode: Two words\n",
    "Ada Voss  00:01:02\nWe begin.\n\nBen Ode  00:01:10\nTwo words\n",
    "Ada Voss 01:02\nWe\nbegin.\nBen Ode 01:10\nTwo words\n",
    "[00:01:02.000] - Ada Voss: We begin.\n[00:01:10,000] Ben Ode: Two words\n",
], ids=["bracket", "name-paren", "time-first", "mm:ss", "speaker-line", "speaker-line-mm:ss",
        "fractions"])
def test_each_shape(tmp_path: Path, text: str) -> None:
    t = read(tmp_path, text)
    # ends: the next turn's start; the last, its start + max(1 s, words / 2.5 per second)
    assert turns(t) == [("Ada Voss", 62.0, 70.0, "We begin."),
                        ("Ben Ode", 70.0, 71.0, "Two words")]
    assert [c.line for u in t.utterances for c in u.cues][0] == 1
    assert t.warnings == () and t.format == "txt"


def test_last_turn_length_from_word_count(tmp_path: Path) -> None:
    t = read(tmp_path, "[00:00:10] Ada: " + " ".join(["word"] * 25) + "\n")
    assert turns(t)[0][1:3] == (10.0, 20.0)  # 25 words at 2.5 words a second


def test_bare_name_lines_then_text(tmp_path: Path) -> None:
    t = read(tmp_path, "Ada Voss\nWe begin.\nThe first item is the budget.\n\n"
                       "Ben Ode\nThank you.\n\nAda Voss\nNext item.\n")
    assert [(u.speaker, u.text) for u in t.utterances] == [
        ("Ada Voss", "We begin. The first item is the budget."), ("Ben Ode", "Thank you."),
        ("Ada Voss", "Next item.")]
    assert "no timestamp" in t.warnings[0]


def test_name_colon_lines_without_times_are_estimated(tmp_path: Path) -> None:
    t = read(tmp_path, "Ada: one two three four five\nBen: six\n")
    assert turns(t) == [("Ada", 0.0, 2.0, "one two three four five"), ("Ben", 2.0, 3.0, "six")]
    assert t.warnings == ("2 of 2 turns have no timestamp; their times are estimated from "
                          "word counts (about 150 words a minute)",)


def test_ordinary_text_is_not_a_speaker(tmp_path: Path) -> None:
    t = read(tmp_path, "[00:00:01] Ada: Shall we meet\nwe meet at 10:30 then\n"
                       "so the plan is: we go\n")
    assert turns(t) == [("Ada", 1.0, 6.6,  # 14 words: 5.6 s
                         "Shall we meet we meet at 10:30 then so the plan is: we go")]


def test_time_on_its_own_line(tmp_path: Path) -> None:
    t = read(tmp_path, "00:00:05\nAda: Hello.\n\n00:00:09\nBen: Hi.\n")
    assert turns(t) == [("Ada", 5.0, 9.0, "Hello."), ("Ben", 9.0, 10.0, "Hi.")]


def test_unnamed_timestamped_lines(tmp_path: Path) -> None:
    t = read(tmp_path, "[00:00:01] Hello.\n[00:00:03] Goodbye.\n")
    assert turns(t) == [("", 1.0, 3.0, "Hello."), ("", 3.0, 4.0, "Goodbye.")]


def test_broken_timestamp_names_its_line(tmp_path: Path) -> None:
    t = read(tmp_path, "[00:00:01] Ada: One.\n[00:61:00] Ada: Bad minutes.\nstill bad\n"
                       "[00:0x:02] Ben: Bad digit.\n[00:00:09] Ben: Fine.\n")
    assert [u.text for u in t.utterances] == ["One.", "Fine."]
    assert t.warnings[0].startswith("line 2: cannot read the timestamp '00:61:00'")
    assert t.warnings[1].startswith("line 4: cannot read the timestamp at the start")


def test_out_of_order_lines_are_sorted(tmp_path: Path) -> None:
    t = read(tmp_path, "[00:00:09] Ben: Later.\n[00:00:01] Ada: Earlier.\n")
    assert turns(t) == [("Ada", 1.0, 9.0, "Earlier."), ("Ben", 9.0, 10.0, "Later.")]
    assert "sorted by start time" in t.warnings[0]


def test_speaker_line_without_text_is_skipped(tmp_path: Path) -> None:
    t = read(tmp_path, "Ada Voss  00:00:01\n\n[00:00:04] Ben: Hello.\n")
    assert [u.speaker for u in t.utterances] == ["Ben"]
    assert t.warnings == ("line 1: speaker line with no text after it; skipped",)


def test_all_lines_broken_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="line 1: cannot read the timestamp"):
        read(tmp_path, "[00:99:00] Ada: no.\n")
