"""``minutes export`` and ``minutes review`` on the command line: exit codes and messages."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import jsonschema
import pytest
from click.testing import CliRunner
from test_review_loader import write_sample

from minutes.cli import main
from minutes.render import schema
from minutes.review.edits import digest, dump_review, new_review, record, validate_edit


def _reviewed(folder: Path, *edits: dict[str, Any]) -> tuple[Path, Path]:
    minutes = write_sample(folder)
    data = json.loads(minutes.read_bytes())
    review = new_review(minutes.name, digest(minutes.read_bytes()))
    for edit in edits:
        record(review, validate_edit(edit, data, review))
    path = folder / "fenmoor.review.json"
    path.write_bytes(dump_review(review))
    return minutes, path


EDITS = ({"op": "set", "id": "M1", "fields": {"mover": "Tamsin Oduya", "for": 4,
                                              "against": 1, "abstain": 0, "flags": []}},
         {"op": "state", "id": "D1", "state": "rejected"},
         {"op": "set", "id": "A1", "fields": {"owner": "Ludo Brisk"}},
         {"op": "state", "id": "N1", "state": "rejected"})


def _run(*args: str) -> Any:
    return CliRunner().invoke(main, list(args), catch_exceptions=False)


def test_export_markdown_applies_the_review(tmp_path: Path) -> None:
    minutes, review = _reviewed(tmp_path, *EDITS)
    out = tmp_path / "final.md"
    result = _run("export", str(minutes), "--review", str(review), "-o", str(out))
    assert result.exit_code == 0, result.output
    text = out.read_text(encoding="utf-8")
    assert "moved by Tamsin Oduya" in text
    assert "4 for, 1 against, 0 abstaining" in text
    assert "| A1 | Send the pump quote to the county | Ludo Brisk |" in text
    assert "depot stays open" not in text  # rejected
    assert "counts left for the clerk" not in text  # flag settled and note dismissed
    assert "DRAFT" in text
    assert f"wrote {out}" in result.stderr
    assert "4 items were neither accepted nor rejected: M1, A1, A2, Q1\n" in result.stderr
    assert "stay marked DRAFT" in result.stderr


def test_approved_on_lifts_the_draft_marking(tmp_path: Path) -> None:
    minutes, review = _reviewed(tmp_path, *EDITS)
    out = tmp_path / "final.md"
    result = _run("export", str(minutes), "--approved-on", "2026-04-01", "-o", str(out), "-q")
    assert result.exit_code == 0 and result.output == ""
    text = out.read_text(encoding="utf-8")
    assert "Approved on 2026-04-01" in text and "DRAFT" not in text


def test_export_docx_holds_the_edits(tmp_path: Path) -> None:
    import docx

    minutes, review = _reviewed(tmp_path, *EDITS)
    out = tmp_path / "final.docx"
    assert _run("export", str(minutes), "-o", str(out)).exit_code == 0
    document = docx.Document(str(out))
    cells = [c.text for t in document.tables for row in t.rows for c in row.cells]
    text = "\n".join([p.text for p in document.paragraphs] + cells)
    assert "Ludo Brisk" in cells and "Tamsin Oduya" in text
    assert "depot stays open" not in text


def test_export_json_is_valid_minutes(tmp_path: Path) -> None:
    minutes, review = _reviewed(tmp_path, *EDITS)
    out = tmp_path / "final.json"
    assert _run("export", str(minutes), "--approved-on", "2026-04-01", "-o", str(out)) \
        .exit_code == 0
    data = json.loads(out.read_bytes())
    validator = jsonschema.Draft202012Validator(schema())
    assert [e.message for e in validator.iter_errors(data)] == []
    assert data["draft"] is False and data["approved_on"] == "2026-04-01"
    assert [d["id"] for d in data["decisions"]] == []
    assert data["motions"][0]["vote"]["for"] == 4


def test_without_a_review_file_the_draft_is_exported_as_is(tmp_path: Path) -> None:
    minutes = write_sample(tmp_path)
    out = tmp_path / "same.md"
    result = _run("export", str(minutes), "-o", str(out))
    assert result.exit_code == 0
    assert "no review file (fenmoor.review.json); exporting the draft as it is" in result.stderr
    assert "depot stays open" in out.read_text(encoding="utf-8")


def test_a_review_file_named_but_missing_fails(tmp_path: Path) -> None:
    minutes = write_sample(tmp_path)
    result = _run("export", str(minutes), "--review", str(tmp_path / "nope.json"),
                  "-o", str(tmp_path / "x.md"))
    assert result.exit_code == 1
    assert "nope.json: no such review file" in result.output


def test_a_review_of_another_draft_fails(tmp_path: Path) -> None:
    minutes, _ = _reviewed(tmp_path, *EDITS)
    minutes.write_bytes(minutes.read_bytes().replace(b"Pump House", b"Pump Shed"))
    result = _run("export", str(minutes), "-o", str(tmp_path / "x.md"))
    assert result.exit_code == 1
    assert "made for another version of 'fenmoor.json'" in result.output
    assert not (tmp_path / "x.md").exists()


@pytest.mark.parametrize(("args", "code", "message"), [
    (["--approved-on", "1 April"], 2, "'1 April' is not a date like 2026-10-14"),
    (["-o", "final.pdf"], 2, "cannot tell the format of 'final.pdf'"),
    (["-o", "fenmoor.json"], 1, "this is an input file"),
    (["-o", "fenmoor.review.json"], 1, "this is an input file"),
    (["-o", "exists.md"], 1, "already exists; use --force"),
])
def test_export_usage_errors(tmp_path: Path, monkeypatch: pytest.MonkeyPatch, args: list[str],
                             code: int, message: str) -> None:
    monkeypatch.chdir(tmp_path)
    _reviewed(tmp_path, *EDITS)
    (tmp_path / "exists.md").write_text("keep me", encoding="utf-8")
    if "-o" not in args:
        args = [*args, "-o", "out.md"]
    result = _run("export", "fenmoor.json", *args)
    assert result.exit_code == code
    assert message in result.output
    assert (tmp_path / "exists.md").read_text(encoding="utf-8") == "keep me"


def test_export_of_what_is_not_minutes_fails(tmp_path: Path) -> None:
    other = tmp_path / "package.json"
    other.write_text('{"name": "x"}', encoding="utf-8")
    result = _run("export", str(other), "-o", str(tmp_path / "x.md"))
    assert result.exit_code == 1 and "this is not minutes JSON" in result.output


def test_the_roster_decides_whether_seconders_are_named(tmp_path: Path) -> None:
    minutes, _ = _reviewed(tmp_path, {"op": "set", "id": "M1",
                                      "fields": {"seconder": "Ludo Brisk"}})
    profiles = tmp_path / "people.toml"
    profiles.write_text('[roster]\nrecord_seconder = true\n\n[[person]]\nname = "Wren '
                        'Halvorsen"\nrole = "chair"\nvotes = true\n', encoding="utf-8")
    plain, named = tmp_path / "plain.md", tmp_path / "named.md"
    assert _run("export", str(minutes), "-o", str(plain)).exit_code == 0
    assert _run("export", str(minutes), "--profiles", str(profiles), "-o", str(named)) \
        .exit_code == 0
    assert "seconded by Ludo Brisk" not in plain.read_text(encoding="utf-8")
    assert "seconded by Ludo Brisk" in named.read_text(encoding="utf-8")


# --------------------------------------------------------------------------- minutes review


def test_review_prints_its_loopback_address(tmp_path: Path, monkeypatch: pytest.MonkeyPatch
                                            ) -> None:
    from minutes.review.server import ReviewServer

    seen: dict[str, Any] = {}

    def stop_at_once(self: ReviewServer, poll_interval: float = 0.5) -> None:
        seen["address"] = self.server_address
        raise KeyboardInterrupt

    monkeypatch.setattr(ReviewServer, "serve_forever", stop_at_once)
    opened: list[str] = []
    monkeypatch.setattr("webbrowser.open", opened.append)
    minutes = write_sample(tmp_path)
    result = _run("review", str(minutes), "--no-open")
    assert result.exit_code == 0, result.output
    host, port = seen["address"]
    assert host == "127.0.0.1" and port > 0
    assert result.stdout == f"Review page: http://127.0.0.1:{port}/\n"
    assert "Edits are saved to" in result.stderr and "fenmoor.review.json" in result.stderr
    assert opened == []


def test_review_of_a_missing_file_fails(tmp_path: Path) -> None:
    result = _run("review", str(tmp_path / "gone.json"), "--no-open")
    assert result.exit_code == 1
    assert "gone.json: no such file" in result.output


def test_review_on_a_port_in_use_fails(tmp_path: Path) -> None:
    import socket

    with socket.socket() as taken:
        taken.bind(("127.0.0.1", 0))
        taken.listen()
        port = taken.getsockname()[1]
        result = _run("review", str(write_sample(tmp_path)), "--port", str(port), "--no-open")
    assert result.exit_code == 1
    assert f"cannot listen on 127.0.0.1:{port}" in result.output


def test_an_unreviewed_demo_draft_exports_as_the_draft_itself(tmp_path: Path) -> None:
    # The round trip through JSON loses nothing a renderer uses: the roster comes back from
    # the meeting file beside the source, so seconders are recorded as the draft has them.
    from minutes.pipeline import draft
    from minutes.render import render

    minutes = draft(Path(__file__).resolve().parents[1] / "demo_meetings" / "board_regular.vtt")
    source = tmp_path / "board.json"
    source.write_bytes(render(minutes, "json"))
    out = tmp_path / "board.md"
    result = _run("export", str(source), "-o", str(out), "-q")
    assert result.exit_code == 0, result.output
    assert out.read_bytes() == render(minutes, "md")
