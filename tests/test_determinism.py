"""Same input and options give byte-identical Markdown and JSON; failures leave no files."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import DEMO

from minutes.cli import main


def draft_in_child(source: Path, out: Path, seed: str) -> None:
    # A fresh interpreter with another hash seed: set and dict order, caches and
    # anything keyed on id() or hash() cannot leak into the output unnoticed.
    env = dict(os.environ, PYTHONHASHSEED=seed)
    subprocess.run([sys.executable, "-m", "minutes", "draft", str(source), "-o", str(out),
                    "-o", str(out.with_suffix(".json")), "-q"], check=True, env=env)


@pytest.mark.parametrize("meeting", ["project_week1", "board_regular"])
def test_two_runs_write_identical_markdown_and_json(meeting: str, tmp_path: Path) -> None:
    source = DEMO / f"{meeting}.vtt"
    draft_in_child(source, tmp_path / "a.md", "1")
    draft_in_child(source, tmp_path / "b.md", "2")
    assert (tmp_path / "a.md").read_bytes() == (tmp_path / "b.md").read_bytes()
    assert (tmp_path / "a.json").read_bytes() == (tmp_path / "b.json").read_bytes()


def test_a_failing_render_leaves_no_output_at_all(tmp_path: Path,
                                                  monkeypatch: pytest.MonkeyPatch) -> None:
    import minutes.render as render_module

    real = render_module.render

    def broken(minutes: object, fmt: str) -> bytes:
        if fmt == "docx":
            raise OSError(28, "No space left on device")
        return real(minutes, fmt)  # type: ignore[arg-type]

    monkeypatch.setattr(render_module, "render", broken)
    outputs = [tmp_path / "m.md", tmp_path / "m.json", tmp_path / "m.docx"]
    args = ["draft", str(DEMO / "interview_01.vtt"), "-q"]
    for path in outputs:
        args += ["-o", str(path)]
    result = CliRunner().invoke(main, args)
    assert result.exit_code == 1
    assert "No space left on device" in result.stderr and "Traceback" not in result.output
    assert list(tmp_path.iterdir()) == []
