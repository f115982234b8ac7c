"""Reading recordings: probing, clean errors for files we cannot read, windows cut in silence."""

from __future__ import annotations

import subprocess
import sys
import wave
from pathlib import Path

import numpy as np
import pytest

from minutes.asr.audio import SAMPLE_RATE, DecodeReport, probe, quietest_cut, samples, windows
from minutes.errors import InputError

av = pytest.importorskip("av", reason="PyAV comes with the audio extra (faster-whisper)")


def write_wav(path: Path, audio: np.ndarray, rate: int = SAMPLE_RATE) -> Path:
    """Write float samples in [-1, 1] as 16-bit mono WAV."""
    with wave.open(str(path), "wb") as out:
        out.setnchannels(1)
        out.setsampwidth(2)
        out.setframerate(rate)
        out.writeframes((np.clip(audio, -1, 1) * 32767).astype("<i2").tobytes())
    return path


def tone(seconds: float, rate: int = SAMPLE_RATE, freq: float = 220.0) -> np.ndarray:
    t = np.arange(int(seconds * rate)) / rate
    return (0.3 * np.sin(2 * np.pi * freq * t)).astype(np.float32)


def hush(seconds: float, rate: int = SAMPLE_RATE) -> np.ndarray:
    return np.zeros(int(seconds * rate), dtype=np.float32)


def test_probe_reads_duration_and_format(tmp_path: Path) -> None:
    path = write_wav(tmp_path / "a.wav", tone(3.0, 44_100), 44_100)
    info = probe(path)
    assert info.duration == pytest.approx(3.0, abs=0.01)
    assert (info.sample_rate, info.channels) == (44_100, 1)


def test_a_missing_file_is_a_clean_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="does not exist"):
        probe(tmp_path / "nope.m4a")


def test_an_empty_file_is_a_clean_error(tmp_path: Path) -> None:
    (tmp_path / "empty.mp3").write_bytes(b"")
    with pytest.raises(InputError, match="empty"):
        probe(tmp_path / "empty.mp3")


def test_text_renamed_to_mp3_is_a_clean_error(tmp_path: Path) -> None:
    path = tmp_path / "notes.mp3"
    path.write_text("Minutes of the last meeting, typed by hand.\n" * 40, encoding="utf-8")
    with pytest.raises(InputError, match=r"notes\.mp3: cannot be read as audio or video"):
        probe(path)


def test_a_corrupt_container_is_a_clean_error(tmp_path: Path) -> None:
    path = tmp_path / "call.m4a"
    path.write_bytes(b"\x00\x00\x00\x18ftypM4A " + bytes(range(256)) * 40)
    with pytest.raises(InputError, match="damaged"):
        probe(path)


def test_a_video_without_sound_is_a_clean_error(tmp_path: Path) -> None:
    path = tmp_path / "silent.mp4"
    with av.open(str(path), "w") as container:
        stream = container.add_stream("mpeg4", rate=10)
        stream.width, stream.height, stream.pix_fmt = 64, 48, "yuv420p"
        for _ in range(5):
            frame = av.VideoFrame.from_ndarray(np.zeros((48, 64, 3), np.uint8), format="rgb24")
            for packet in stream.encode(frame):
                container.mux(packet)
        for packet in stream.encode():
            container.mux(packet)
    with pytest.raises(InputError, match="no audio stream"):
        probe(path)


def test_samples_resample_to_16k_mono(tmp_path: Path) -> None:
    path = write_wav(tmp_path / "a.wav", tone(2.0, 44_100), 44_100)
    report = DecodeReport()
    audio = np.concatenate(list(samples(path, report)))
    assert audio.dtype == np.float32
    assert len(audio) == pytest.approx(2 * SAMPLE_RATE, abs=400)
    assert report.decoded_seconds == pytest.approx(2.0, abs=0.03)
    assert 0.25 < float(np.abs(audio).max()) < 0.35


def test_samples_match_faster_whisper_decode(tmp_path: Path) -> None:
    decode_audio = pytest.importorskip("faster_whisper.audio").decode_audio
    path = write_wav(tmp_path / "a.wav", np.concatenate([tone(1.3, 22_050), hush(0.4, 22_050),
                                                         tone(0.9, 22_050, 440)]), 22_050)
    ours = np.concatenate(list(samples(path)))
    theirs = decode_audio(str(path), sampling_rate=SAMPLE_RATE)
    # The same samples reach the model by either road, so short files transcribe alike.
    assert np.array_equal(ours, theirs)


def test_quietest_cut_lands_in_the_pause() -> None:
    rng = np.random.default_rng(7)
    audio = (0.2 * rng.standard_normal(10 * SAMPLE_RATE)).astype(np.float32)
    audio[int(7.2 * SAMPLE_RATE):int(7.9 * SAMPLE_RATE)] *= 0.01  # a quiet 0.7 s
    cut = quietest_cut(audio, 6 * SAMPLE_RATE)
    assert 7.35 * SAMPLE_RATE <= cut <= 7.75 * SAMPLE_RATE


def test_quietest_cut_in_digital_silence_takes_the_middle_of_the_last_run() -> None:
    audio = np.concatenate([tone(6.0), hush(1.0), tone(1.0), hush(1.0), tone(1.0)])
    cut = quietest_cut(audio, 5 * SAMPLE_RATE)
    assert 8.3 * SAMPLE_RATE <= cut <= 8.7 * SAMPLE_RATE


def test_windows_cover_the_stream_exactly_once() -> None:
    audio = np.concatenate([tone(9.0), hush(1.5), tone(8.5), hush(1.5), tone(12.3)])
    blocks = (audio[i:i + 3000] for i in range(0, len(audio), 3000))
    out = list(windows(blocks, seconds=10.0))
    assert np.array_equal(np.concatenate([w.samples for w in out]), audio)
    for prev, cur in zip(out, out[1:], strict=False):
        assert cur.start == pytest.approx(prev.end)
    assert all(len(w.samples) <= 10 * SAMPLE_RATE for w in out)
    # The first two cuts fall in the silences at 9.0-10.5 s and 19.0-20.5 s.
    assert 9.0 < out[1].start < 10.0 and 19.0 < out[2].start < 20.5


def test_importing_the_package_loads_no_speech_libraries() -> None:
    code = ("import sys, minutes.asr, minutes.asr.progress; "
            "print(sorted(m for m in ('faster_whisper', 'ctranslate2', 'av', 'onnxruntime') "
            "if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True)
    assert out.stdout.strip() == "[]"


def test_recordings_are_known_by_suffix() -> None:
    from minutes.asr import is_recording

    assert is_recording("board.M4A") and is_recording(Path("call.webm"))
    assert not is_recording("board.vtt") and not is_recording("notes.txt")
