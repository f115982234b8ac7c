"""WebVTT and SRT output, read back with webvtt-py (an outside parser of the W3C format)."""

from __future__ import annotations

import html
import importlib
from collections.abc import Callable
from pathlib import Path

import pytest
import webvtt

from minutes.asr.captions import timestamp, write_srt, write_vtt
from minutes.model import Cue, Transcript, Utterance


def _transcript() -> Transcript:
    u1 = Utterance(index=0, start=0.0, end=4.2, speaker="Speaker 1",
                   text="Call to order. Tom & Jerry <sic> present.",
                   cues=(Cue("1", 0.0, 1.5, "Call to order."),
                         Cue("2", 1.6, 4.2, "Tom & Jerry <sic> present.")),
                   label="Speaker 1")
    u2 = Utterance(index=1, start=3725.5, end=3727.25, speaker="Speaker 2",
                   text="Seconded.", cues=(Cue("3", 3725.5, 3727.25, "Seconded."),),
                   label="Speaker 2")
    return Transcript(utterances=(u1, u2), source="x.wav", format="audio")


@pytest.mark.parametrize(("seconds", "text"), [
    (0.0, "00:00:00.000"), (1.0005, "00:00:01.000"), (61.25, "00:01:01.250"),
    (3725.5, "01:02:05.500"), (36000.001, "10:00:00.001"), (-0.2, "00:00:00.000"),
])
def test_timestamps_are_hours_minutes_seconds_millis(seconds: float, text: str) -> None:
    assert timestamp(seconds) == text


def test_vtt_round_trips_through_webvtt_py() -> None:
    text = write_vtt(_transcript())
    assert text.startswith("WEBVTT\n\n")
    doc = webvtt.WebVTT.from_string(text)
    assert [c.identifier for c in doc.captions] == ["1", "2", "3"]
    assert [(c.start, c.end) for c in doc.captions] == [
        ("00:00:00.000", "00:00:01.500"), ("00:00:01.600", "00:00:04.200"),
        ("01:02:05.500", "01:02:07.250")]
    assert [c.voice for c in doc.captions] == ["Speaker 1", "Speaker 1", "Speaker 2"]
    # webvtt-py keeps character references as written; unescape to compare the text.
    assert [html.unescape(c.text) for c in doc.captions] == [
        "Call to order.", "Tom & Jerry <sic> present.", "Seconded."]
    assert "&lt;sic&gt;" in text and "&amp;" in text


def test_vtt_gives_cue_ids_to_utterances_without_cues() -> None:
    t = Transcript(utterances=(
        Utterance(index=0, start=0.0, end=1.0, speaker="A", text="First."),
        Utterance(index=1, start=1.0, end=2.0, speaker="", text="Second."),
    ))
    doc = webvtt.WebVTT.from_string(write_vtt(t))
    assert [c.identifier for c in doc.captions] == ["1", "2"]
    assert [c.voice for c in doc.captions] == ["A", None]


def _own_reader(module: str, name: str) -> Callable[[str, str], Transcript]:
    return getattr(importlib.import_module(f"minutes.ingest.{module}"), name)  # type: ignore[no-any-return]


def _cue_view(t: Transcript) -> list[tuple[str | None, float, float, str, str]]:
    return [(c.id, c.start, c.end, u.speaker, c.text) for u in t.utterances for c in u.cues]


def test_vtt_reads_back_through_minutes_own_reader() -> None:
    read_vtt = _own_reader("vtt", "read_vtt")
    original = _transcript()
    back = read_vtt(write_vtt(original), "out.vtt")
    # The reader may merge cues into utterances its own way; the cues themselves must survive.
    assert _cue_view(back) == _cue_view(original)


def test_srt_reads_back_through_minutes_own_reader() -> None:
    read_srt = _own_reader("srt", "read_srt")
    original = _transcript()
    back = read_srt(write_srt(original), "out.srt")
    assert [(c.start, c.end, u.speaker) for u in back.utterances for c in u.cues] == [
        (c.start, c.end, u.speaker) for u in original.utterances for c in u.cues]


def test_srt_round_trips_through_webvtt_py(tmp_path: Path) -> None:
    text = write_srt(_transcript())
    assert text.splitlines()[:3] == ["1", "00:00:00,000 --> 00:00:01,500",
                                     "Speaker 1: Call to order."]
    path = tmp_path / "out.srt"
    path.write_text(text, encoding="utf-8")
    doc = webvtt.from_srt(str(path))
    # SRT has no escapes; readers take <...> for a tag, so compare the text as written.
    assert [c.raw_text for c in doc.captions] == [
        "Speaker 1: Call to order.", "Speaker 1: Tom & Jerry <sic> present.",
        "Speaker 2: Seconded."]
    assert doc.captions[2].start == "01:02:05.500"


def test_srt_without_speakers() -> None:
    assert "Speaker" not in write_srt(_transcript(), speakers=False)
