"""Robustness: whatever the bytes, the readers give a sane Transcript or an InputError."""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from minutes.errors import InputError
from minutes.ingest import read_transcript
from minutes.ingest.common import clock
from minutes.ingest.cuetext import cue_text_pieces, parse_cue_text, voice_pieces
from minutes.model import Transcript

FUZZ = settings(max_examples=60, deadline=None,
                suppress_health_check=[HealthCheck.too_slow])

SAMPLES = {
    ".vtt": ("WEBVTT\n\nREGION\nid:r\n\nNOTE hi\n\na1\n00:00:01.000 --> 00:00:02.500 align:start\n"
             "<v.loud Ada Voss>We <b>begin</b> &amp; go.</v> <i>laughs</i>\n\n"
             "00:02.000 --> 00:04.000\n<v Ben>Yes<00:03.000> indeed\nsecond line\n\n"
             "a3\n00:00:03.000 --> 00:00:01.000\n<v Ada Voss>Reversed.\n"),
    ".srt": ("1\n00:00:01,000 --> 00:00:02,500\nADA: We begin.\n\n2\n00:00:02,000 --> "
             "00:00:04,000\n<i>Yes</i> indeed\n- Other.\n"),
    ".txt": ("[00:00:01] Ada Voss: We begin.\nBen (00:00:03): Yes.\n00:00:05 Ada: More\n"
             "text here.\n\nCy Ode  00:01:00\nA speaker line.\n[01:30] Ben: mm:ss.\n"),
    ".json": ('{"meeting": {"title": "t", "date": "2024-01-02"}, "utterances": ['
              '{"index": 0, "cue": "a", "start": 1.0, "end": 2.0, "speaker": "Ada", '
              '"text": "We begin."}, {"index": 1, "cue": null, "start": 3, "end": 4, '
              '"speaker": "", "text": "Yes."}]}'),
}


@pytest.fixture(scope="module")
def folder(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return tmp_path_factory.mktemp("fuzz")


def read_bytes(folder: Path, data: bytes, ext: str) -> Transcript | None:
    """Read data as a file with extension ext; None when it raised InputError."""
    path = folder / f"fuzz{ext}"
    path.write_bytes(data)
    try:
        transcript = read_transcript(path)
    except InputError as err:
        assert str(err)  # every error says something
        return None
    sane(transcript)
    if transcript.format in ("vtt", "srt") and not data.startswith((b"\xff", b"\xfe")):
        # each cue names the line that holds its timing
        lines = re.split(r"\r\n|\r|\n", data.decode("utf-8-sig"))
        assert all("-->" in lines[c.line - 1] for u in transcript.utterances for c in u.cues
                   if c.line is not None)
        assert all(c.line is not None for u in transcript.utterances for c in u.cues)
    return transcript


def sane(t: Transcript) -> None:
    assert t.utterances
    assert [u.index for u in t.utterances] == list(range(len(t.utterances)))
    starts = [u.start for u in t.utterances]
    assert starts == sorted(starts)
    for u in t.utterances:
        assert u.cues and u.text and u.speaker == u.label
        assert math.isfinite(u.start) and 0 <= u.start <= u.end
        for c in u.cues:
            assert 0 <= c.start <= c.end and c.text
    assert all(isinstance(w, str) and w for w in t.warnings)


@FUZZ
@given(data=st.binary(max_size=1500), ext=st.sampled_from(sorted(SAMPLES)))
def test_random_bytes(folder: Path, data: bytes, ext: str) -> None:
    read_bytes(folder, data, ext)


@FUZZ
@given(ext=st.sampled_from(sorted(SAMPLES)), cut=st.floats(0, 1))
def test_truncated_files(folder: Path, ext: str, cut: float) -> None:
    data = SAMPLES[ext].encode()
    read_bytes(folder, data[:int(len(data) * cut)], ext)


@FUZZ
@given(ext=st.sampled_from(sorted(SAMPLES)),
       edits=st.lists(st.tuples(st.floats(0, 1), st.sampled_from(
           ["<", ">", "</v>", "<v ", "&", "&#x0;", "-->", "\n", "\n\n", ":", "[", "]", "(",
            "0", "99:", "\0", "\r", "\ufeff", "\x85", "\u2028", "\xff", "{", "}", '"', ","])),
           max_size=8))
def test_mutated_files(folder: Path, ext: str, edits: list[tuple[float, str]]) -> None:
    text = SAMPLES[ext]
    for where, piece in edits:
        at = int(len(text) * where)
        text = text[:at] + piece + text[at:]
    read_bytes(folder, text.encode("utf-8", "surrogatepass"), ext)


@FUZZ
@given(text=st.text(st.sampled_from(list("<>/.&;#x0 \t\nvbicurtlang19:Ada")), max_size=200))
def test_cue_text_markup_never_breaks(text: str) -> None:
    for voice, piece in cue_text_pieces(text):
        assert piece and piece == piece.strip(" ") and "\n" not in piece and "\t" not in piece
        assert "\n" not in voice


@FUZZ
@given(text=st.text(st.sampled_from(list("<>/.&;#x0 \t\nvbicurtlang19:Ada")), max_size=60)
       | st.builds(lambda a, b, c: f"<v{a}>{b}{c}", st.text(" .a\t&<", max_size=6),
                   st.text("ab <&\n", max_size=6), st.sampled_from(["", "</v>", " x"])))
def test_quick_path_agrees_with_the_full_parse(text: str) -> None:
    assert cue_text_pieces(text) == voice_pieces(parse_cue_text(text))


@FUZZ
@given(times=st.lists(st.tuples(st.integers(0, 400 * 3_600_000), st.integers(0, 400 * 3_600_000)),
                      min_size=1, max_size=30))
def test_any_times_negative_overlapping_reversed_or_past_99_hours(
        folder: Path, times: list[tuple[int, int]]) -> None:
    body = "".join(f"\nc{i}\n{clock(s / 1000)} --> {clock(e / 1000)}\n<v S{i % 3}>cue {i}\n"
                   for i, (s, e) in enumerate(times))
    t = read_bytes(folder, ("WEBVTT\n" + body).encode(), ".vtt")
    assert t is not None
    got = sorted((c.id, c.start, c.end) for u in t.utterances for c in u.cues)
    want = sorted((f"c{i}", s / 1000, max(s, e) / 1000) for i, (s, e) in enumerate(times))
    assert got == want
    assert sum("end set to the start" in w for w in t.warnings) == sum(e < s for s, e in times)


def test_negative_times_are_skipped(folder: Path) -> None:
    t = read_bytes(folder, b"WEBVTT\n\n-00:00:01.000 --> 00:00:02.000\nneg\n\n"
                           b"00:00:03.000 --> 00:00:04.000\nok\n", ".vtt")
    assert t is not None and [u.text for u in t.utterances] == ["ok"]
    assert t.warnings[0].startswith("line 3: cannot read the timing line")


@FUZZ
@given(at=st.floats(0, 1), byte=st.sampled_from([b"\xe9", b"\xff", b"\x80", b"\xc3"]))
def test_mixed_encodings_give_a_clear_error(folder: Path, at: float, byte: bytes) -> None:
    data = SAMPLES[".vtt"].encode()
    cut = int(len(data) * at)
    while cut < len(data) and (data[cut] & 0xC0) == 0x80:  # not inside a UTF-8 sequence
        cut += 1
    mixed = data[:cut] + byte + b" " + data[cut:]
    path = folder / "mixed.vtt"
    path.write_bytes(mixed)
    with pytest.raises(InputError, match="--encoding") as err:
        read_transcript(path)
    assert err.value.line == mixed[:cut].count(b"\n") + 1


@FUZZ
@given(at=st.floats(0, 1))
def test_nul_bytes(folder: Path, at: float) -> None:
    data = SAMPLES[".srt"].encode()
    cut = int(len(data) * at)
    t = read_bytes(folder, data[:cut] + b"\0" + data[cut:], ".srt")
    if t is not None:
        assert any("NUL" in w for w in t.warnings)


def test_a_cue_of_100000_characters(folder: Path) -> None:
    words = ("word " * 20_000).strip()
    t = read_bytes(folder, f"WEBVTT\n\nbig\n00:00:01.000 --> 00:00:09.000\n<v A>{words}\n"
                   .encode(), ".vtt")
    assert t is not None and len(t.utterances[0].text) == len(words) == 99_999


def test_deeply_nested_markup(folder: Path) -> None:
    text = "<b>" * 100_000 + "deep" + "</b>" * 100_000
    t = read_bytes(folder, f"WEBVTT\n\n00:01.000 --> 00:02.000\n<v A>{text}\n".encode(), ".vtt")
    assert t is not None and t.utterances[0].text == "deep"


def test_a_long_unclosed_tag_and_many_ampersands(folder: Path) -> None:
    text = "<" + "x" * 100_000 + " &" * 50_000
    t = read_bytes(folder, f"WEBVTT\n\n00:01.000 --> 00:02.000\nok {text}\n".encode(), ".vtt")
    assert t is not None and t.utterances[0].text == "ok"


def test_200000_cues(folder: Path) -> None:
    # one test, not a hypothesis loop; the time it takes is measured in bench/, not here
    lines = ["WEBVTT", ""]
    for i in range(200_000):
        lines += [f"n{i}", f"{clock(i)} --> {clock(i + 0.8)}", f"<v S{i % 4 // 2}>cue {i}.", ""]
    t = read_bytes(folder, "\n".join(lines).encode(), ".vtt")
    assert t is not None
    flat = [c for u in t.utterances for c in u.cues]
    assert len(flat) == 200_000 and flat[-1].id == "n199999" and flat[-1].line == 4 * 199_999 + 4
    assert len(t.utterances) == 100_000  # speakers alternate every two cues
