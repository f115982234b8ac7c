"""The minutes command: exit codes, messages, files written or kept."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner

from minutes.cli import main

VTT = """WEBVTT

c1
00:00:01.000 --> 00:00:04.000
<v Mei Lin>Okay, um, so the lease. Tomás, can you send the revised lease

c2
00:00:04.000 --> 00:00:06.500
<v Mei Lin>to the landlord by Friday?

c3
00:00:07.000 --> 00:00:09.000
<v Tomás Reyes>Yeah, I'll send it to the landlord by Friday.

c4
00:00:10.000 --> 00:00:13.000
<v Priya Nair>And we've decided to keep the Saturday opening hours.
"""

MEETING = """title = "Warehouse call"
date = 2026-10-14
"""


@pytest.fixture()
def meeting(tmp_path: Path) -> Path:
    path = tmp_path / "call.vtt"
    path.write_text(VTT, encoding="utf-8")
    (tmp_path / "call.meeting.toml").write_text(MEETING, encoding="utf-8")
    return path


def run(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.stdout, result.stderr


def test_markdown_goes_to_stdout_when_no_output_is_given(meeting: Path) -> None:
    code, out, err = run("draft", str(meeting), "--quiet")
    assert code == 0, err
    assert out.startswith("# Warehouse call")
    assert "DRAFT" in out and "Traceback" not in out + err


def test_several_outputs_in_one_run_and_json_cites_cues(meeting: Path, tmp_path: Path) -> None:
    md, js, dx = tmp_path / "m.md", tmp_path / "m.json", tmp_path / "m.docx"
    code, _, err = run("draft", str(meeting), "-o", str(md), "-o", str(js), "-o", str(dx), "-q")
    assert code == 0, err
    data = json.loads(js.read_text(encoding="utf-8"))
    assert data["meeting"]["date"] == "2026-10-14"
    assert data["actions"], "the explicit commitment must be found"
    for item in data["actions"] + data["decisions"]:
        assert item["evidence"] and all(e["cue"] in ("c1", "c2", "c3", "c4")
                                        for e in item["evidence"])
    assert dx.read_bytes()[:2] == b"PK"  # a zip container: DOCX
    assert md.read_text(encoding="utf-8").startswith("# Warehouse call")


def test_an_existing_output_is_kept_without_force(meeting: Path, tmp_path: Path) -> None:
    out = tmp_path / "m.md"
    out.write_text("my edits", encoding="utf-8")
    code, _, err = run("draft", str(meeting), "-o", str(out), "-q")
    assert code == 1
    assert f"{out}: already exists; use --force to replace it" in err
    assert out.read_text(encoding="utf-8") == "my edits"
    code, _, err = run("draft", str(meeting), "-o", str(out), "-q", "--force")
    assert code == 0, err
    assert out.read_text(encoding="utf-8").startswith("# Warehouse call")


def test_the_input_is_never_the_output(meeting: Path) -> None:
    before = meeting.read_bytes()
    code, _, err = run("draft", str(meeting), "-o", str(meeting), "--format", "md", "--force")
    assert code == 1 and "this is an input file" in err
    assert meeting.read_bytes() == before


def test_an_unknown_output_extension_is_a_usage_error(meeting: Path, tmp_path: Path) -> None:
    code, _, err = run("draft", str(meeting), "-o", str(tmp_path / "m.pdf"))
    assert code == 2 and "use .md, .docx or .json" in err
    assert not (tmp_path / "m.pdf").exists()


def test_a_bad_date_is_a_usage_error(meeting: Path) -> None:
    code, _, err = run("draft", str(meeting), "--date", "14/10/2026")
    assert code == 2 and "is not a date like 2026-10-14" in err


def test_llm_engine_needs_a_model(meeting: Path) -> None:
    code, _, err = run("draft", str(meeting), "--engine", "llm")
    assert code == 2 and "--model" in err


def test_missing_model_file_says_what_to_do(meeting: Path, tmp_path: Path) -> None:
    code, _, err = run("draft", str(meeting), "--engine", "llm", "--model",
                       str(tmp_path / "nope.gguf"), "-q")
    assert code == 1 and "never downloads" in err and "Traceback" not in err


@pytest.mark.parametrize(
    ("name", "content", "message"),
    [
        ("missing.vtt", None, "no such file"),
        ("empty.vtt", b"", "empty"),
        ("notes.xyz", b"hello", ".vtt"),
        ("binary.vtt", bytes(range(256)) * 4, "--encoding"),
    ],
)
def test_bad_inputs_fail_with_a_message_not_a_traceback(
    tmp_path: Path, name: str, content: bytes | None, message: str
) -> None:
    path = tmp_path / name
    if content is not None:
        path.write_bytes(content)
    code, out, err = run("draft", str(path), "-q")
    assert code == 1
    assert message in err and str(path) in err
    assert "Traceback" not in out + err


def test_a_broken_timestamp_is_reported_with_its_line(tmp_path: Path) -> None:
    path = tmp_path / "broken.vtt"
    path.write_text(VTT.replace("00:00:07.000 --> 00:00:09.000", "00:00:07.000 --> 00:0x:09"),
                    encoding="utf-8")
    out = tmp_path / "m.json"
    code, _, err = run("draft", str(path), "-o", str(out), "-q")
    assert code == 0, err
    notes = json.loads(out.read_text(encoding="utf-8"))["notes"]
    assert any("line 12" in note for note in notes), notes  # the timing line


def test_python_dash_m_runs_the_same_command() -> None:
    proc = subprocess.run([sys.executable, "-m", "minutes", "--help"], capture_output=True,
                          text=True, check=False)
    assert proc.returncode == 0 and "draft" in proc.stdout
