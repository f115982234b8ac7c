"""The transcribe command and draft on a recording: real speech recognition, end to end.

Speech with a known script is made here with espeak-ng (our own script); it needs the
audio extra and espeak-ng + sox (CI installs them).
"""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import unavailable

from minutes.cli import main

SCRIPT = ("Good evening. I will send the budget report to the board by Friday. "
          "We have decided to keep the library open on Sundays.")

pytestmark = pytest.mark.audio


@pytest.fixture(scope="module")
def recording(tmp_path_factory: pytest.TempPathFactory) -> Path:
    if shutil.which("espeak-ng") is None:
        unavailable("espeak-ng is not installed (apt-get install espeak-ng sox)")
    path = tmp_path_factory.mktemp("speech") / "meeting.wav"
    subprocess.run(["espeak-ng", "-v", "en-us", "-s", "160", "-w", str(path), SCRIPT],
                   check=True, capture_output=True)
    return path


def test_transcribe_writes_webvtt_with_cue_ids_and_voices(recording: Path,
                                                          tmp_path: Path) -> None:
    out = tmp_path / "meeting.vtt"
    result = CliRunner().invoke(main, ["transcribe", str(recording), "-o", str(out),
                                       "--beam-size", "1", "-q"])
    assert result.exit_code == 0, result.output
    text = out.read_text(encoding="utf-8")
    assert text.startswith("WEBVTT")
    assert "\n1\n" in text and "<v Speaker 1>" in text
    assert "budget report" in text.lower()


def test_draft_on_a_recording_cites_the_transcript_it_writes(recording: Path,
                                                             tmp_path: Path) -> None:
    out = tmp_path / "minutes.json"
    result = CliRunner().invoke(main, ["draft", str(recording), "-o", str(out),
                                       "--beam-size", "1", "-q", "--date", "2026-10-14"])
    assert result.exit_code == 0, result.output
    vtt = tmp_path / "minutes.transcript.vtt"
    assert vtt.is_file()
    cue_ids = {line for line in vtt.read_text(encoding="utf-8").splitlines() if line.isdigit()}
    data = json.loads(out.read_text(encoding="utf-8"))
    items = data["actions"] + data["decisions"]
    assert items, "the commitment or the decision in the script must be found"
    for item in items:
        assert {e["cue"] for e in item["evidence"]} <= cue_ids


def test_a_damaged_recording_is_a_clean_error(tmp_path: Path) -> None:
    bad = tmp_path / "broken.mp3"
    bad.write_bytes(b"ID3" + bytes(range(256)) * 8)
    result = CliRunner().invoke(main, ["transcribe", str(bad), "-o", str(tmp_path / "b.vtt")])
    assert result.exit_code == 1
    assert str(bad) in result.stderr and "Traceback" not in result.output
    assert not (tmp_path / "b.vtt").exists()


def test_transcribe_output_must_be_captions(recording: Path, tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["transcribe", str(recording), "-o",
                                       str(tmp_path / "m.docx")])
    assert result.exit_code == 2 and ".vtt or .srt" in result.stderr
