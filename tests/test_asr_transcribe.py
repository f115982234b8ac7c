"""transcribe() with the scripted fake recogniser: windows, stitching, progress, errors, options."""

from __future__ import annotations

import importlib.util
from pathlib import Path

import numpy as np
import pytest

from minutes.asr import AsrOptions, ScriptedRecognizer, Span, Word, transcribe
from minutes.asr import recognize as recognize_module
from minutes.errors import InputError, ModelError, UsageError

pytest.importorskip("av", reason="PyAV comes with the audio extra (faster-whisper)")

# pytest puts tests/ on sys.path (rootdir conftest), so sibling test modules import plainly.
from test_asr_audio import hush, tone, write_wav  # noqa: E402


def _span(start: float, *words: str, step: float = 0.5) -> Span:
    ws = tuple(Word(start + i * step, start + i * step + 0.4, w) for i, w in enumerate(words))
    return Span(ws[0].start, ws[-1].end, " ".join(words), ws)


# Bursts of "speech" (a tone) at 0-9, 10.5-19 and 20.5-35 s, silence between.
AUDIO_LAYOUT = [tone(9.0), hush(1.5), tone(8.5), hush(1.5), tone(14.5)]
SCRIPT = [
    _span(0.5, "Call", "to", "order."),
    _span(5.0, "Roll", "call", "please."),
    _span(11.0, "All", "members", "present."),
    _span(21.0, "The", "motion", "carries."),
    _span(30.0, "Meeting", "adjourned."),
]


@pytest.fixture
def recording(tmp_path: Path) -> Path:
    return write_wav(tmp_path / "board.wav", np.concatenate(AUDIO_LAYOUT))


def test_windows_are_stitched_in_order_with_file_times(recording: Path) -> None:
    fake = ScriptedRecognizer(SCRIPT)
    t = transcribe(recording, AsrOptions(chunk_seconds=10.0), recognizer=fake)
    assert len(fake.calls) >= 3  # 35 s in windows of at most 10 s
    words = [w for s in SCRIPT for w in s.words]
    cues = [c for u in t.utterances for c in u.cues]
    assert " ".join(c.text for c in cues) == " ".join(w.text for w in words)
    assert cues[0].start == pytest.approx(0.5) and cues[-1].end == pytest.approx(30.9)
    assert [c.id for c in cues] == [str(i) for i in range(1, len(cues) + 1)]
    starts = [c.start for c in cues]
    assert starts == sorted(starts)
    assert t.format == "audio" and t.source == str(recording)


def test_no_window_is_prompted_with_the_text_before_it(recording: Path) -> None:
    # A previous-text prompt made Whisper drop a sentence (see recognize.py): windows stand alone.
    fake = ScriptedRecognizer(SCRIPT)
    transcribe(recording, AsrOptions(chunk_seconds=10.0), recognizer=fake)
    assert len(fake.calls) >= 3
    assert [call[3] for call in fake.calls] == [None] * len(fake.calls)


def test_a_detected_language_is_held_for_later_windows(recording: Path) -> None:
    fake = ScriptedRecognizer(SCRIPT, language="nl")
    transcribe(recording, AsrOptions(chunk_seconds=10.0, language=None), recognizer=fake)
    assert [call[2] for call in fake.calls] == [None] + ["nl"] * (len(fake.calls) - 1)


def test_progress_rises_to_the_total(recording: Path) -> None:
    seen: list[tuple[float, float]] = []
    transcribe(recording, AsrOptions(chunk_seconds=10.0), lambda d, t: seen.append((d, t)),
               recognizer=ScriptedRecognizer(SCRIPT))
    done = [d for d, _ in seen]
    assert done == sorted(done)
    assert all(d <= t for d, t in seen)
    assert seen[-1][0] == seen[-1][1] == pytest.approx(35.0, abs=0.01)
    assert len(seen) >= 8  # every span and every window end reports


def test_pauses_between_words_end_utterances(recording: Path) -> None:
    t = transcribe(recording, AsrOptions(chunk_seconds=10.0),
                   recognizer=ScriptedRecognizer(SCRIPT))
    assert [u.text for u in t.utterances] == [
        "Call to order.", "Roll call please.", "All members present.", "The motion carries.",
        "Meeting adjourned."]


def test_speakers_are_one_label_with_an_honest_warning(recording: Path) -> None:
    t = transcribe(recording, recognizer=ScriptedRecognizer(SCRIPT))
    assert t.speakers == ("Speaker 1",)
    assert any("not told apart" in w and "speaker-embedding" in w for w in t.warnings)


def test_pause_mode_guesses_turns_and_says_so(recording: Path) -> None:
    t = transcribe(recording, AsrOptions(speakers="pauses", turn_pause_seconds=3.0),
                   recognizer=ScriptedRecognizer(SCRIPT))
    # Gaps: 3.1 s, 4.6 s, 8.6 s, 7.6 s: every one is a change of speaker.
    assert [u.speaker for u in t.utterances] == ["Speaker 1", "Speaker 2", "Speaker 1",
                                                 "Speaker 2", "Speaker 1"]
    assert any("guessed" in w for w in t.warnings)


def test_segment_times_serve_when_words_are_off(recording: Path) -> None:
    t = transcribe(recording, AsrOptions(word_timestamps=False),
                   recognizer=ScriptedRecognizer(SCRIPT))
    assert [c.text for u in t.utterances for c in u.cues] == [s.text for s in SCRIPT]


def test_silence_gives_no_utterances_and_a_warning(tmp_path: Path) -> None:
    path = write_wav(tmp_path / "quiet.wav", hush(3.0))
    t = transcribe(path, recognizer=ScriptedRecognizer([]))
    assert t.utterances == ()
    assert t.warnings == ("no speech was recognised in the recording",)


def test_a_truncated_file_is_flagged(tmp_path: Path) -> None:
    av = pytest.importorskip("av")
    path = tmp_path / "cut.flac"
    with av.open(str(path), "w") as container:
        stream = container.add_stream("flac", rate=16_000, layout="mono")
        audio = (np.concatenate([tone(6.0)]) * 32767).astype(np.int16).reshape(1, -1)
        frame = av.AudioFrame.from_ndarray(audio, format="s16", layout="mono")
        frame.sample_rate = 16_000
        for packet in stream.encode(frame):
            container.mux(packet)
        for packet in stream.encode():
            container.mux(packet)
    data = path.read_bytes()
    path.write_bytes(data[: len(data) // 2])
    t = transcribe(path, recognizer=ScriptedRecognizer([]))
    assert any("truncated" in w for w in t.warnings)


@pytest.mark.parametrize(("name", "content", "message"), [
    ("missing.wav", None, "does not exist"),
    ("notes.mp3", b"not audio, just text\n" * 50, "cannot be read as audio"),
])
def test_unreadable_input_fails_before_any_recognition(tmp_path: Path, name: str,
                                                       content: bytes | None,
                                                       message: str) -> None:
    path = tmp_path / name
    if content is not None:
        path.write_bytes(content)
    fake = ScriptedRecognizer(SCRIPT)
    with pytest.raises(InputError, match=message):
        transcribe(path, recognizer=fake)
    assert fake.calls == []


def test_a_model_name_is_refused_before_loading(recording: Path, tmp_path: Path,
                                                monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    with pytest.raises(ModelError, match="never downloads"):
        transcribe(recording, AsrOptions(model=Path("small")))


def test_missing_faster_whisper_names_the_extra(recording: Path,
                                                monkeypatch: pytest.MonkeyPatch) -> None:
    real = importlib.util.find_spec
    monkeypatch.setattr(recognize_module.importlib.util, "find_spec",
                        lambda name: None if name == "faster_whisper" else real(name))
    with pytest.raises(ModelError, match=r"faster-whisper.*pip install 'minutes\[audio\]'"):
        transcribe(recording)


@pytest.mark.parametrize(("options", "message"), [
    (AsrOptions(beam_size=0), "beam size"),
    (AsrOptions(threads=-1), "threads"),
    (AsrOptions(chunk_seconds=1), "chunk seconds"),
    (AsrOptions(speakers="voices"), "speaker mode"),  # type: ignore[arg-type]
])
def test_bad_options_are_usage_errors(recording: Path, options: AsrOptions, message: str) -> None:
    with pytest.raises(UsageError, match=message):
        transcribe(recording, options, recognizer=ScriptedRecognizer(SCRIPT))


def test_an_unknown_language_lists_the_codes(recording: Path) -> None:
    pytest.importorskip("faster_whisper")
    with pytest.raises(UsageError, match="unknown language 'english'.*en, de"):
        transcribe(recording, AsrOptions(language="english"))
