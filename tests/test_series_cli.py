"""``minutes draft --series`` and ``minutes items`` through the command line (CliRunner)."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pytest
from click.testing import CliRunner

from minutes.cli import main

WEEK1 = """WEBVTT

c1
00:00:01.000 --> 00:00:05.000
<v Mei Lin>Tomás, can you send the revised lease to the landlord by Friday?

c2
00:00:06.000 --> 00:00:09.000
<v Tomás Reyes>Yes, I'll send the revised lease to the landlord by Friday.

c3
00:00:10.000 --> 00:00:14.000
<v Priya Nair>I'll book the van for the move by Monday.

c4
00:00:15.000 --> 00:00:19.000
<v Mei Lin>=HYPERLINK("x") I'll ring the insurer about the new site next week.
"""

WEEK2 = """WEBVTT

d1
00:00:01.000 --> 00:00:05.000
<v Mei Lin>Let's start with last week's actions. Tomás, the lease?

d2
00:00:06.000 --> 00:00:10.000
<v Tomás Reyes>Done. I sent the revised lease to the landlord on Thursday.

d3
00:00:11.000 --> 00:00:15.000
<v Priya Nair>I'll print the new posters by Wednesday.
"""


def meeting_toml(date: str) -> str:
    return f'title = "Warehouse call"\ndate = {date}\nstart_clock = 09:00:00\n'


@pytest.fixture()
def calls(tmp_path: Path) -> tuple[Path, Path]:
    a, b = tmp_path / "week1.vtt", tmp_path / "week2.vtt"
    a.write_text(WEEK1, encoding="utf-8")
    b.write_text(WEEK2, encoding="utf-8")
    (tmp_path / "week1.meeting.toml").write_text(meeting_toml("2026-10-07"), encoding="utf-8")
    (tmp_path / "week2.meeting.toml").write_text(meeting_toml("2026-10-14"), encoding="utf-8")
    return a, b


def run(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.stdout, result.stderr


def test_draft_series_carries_items_and_items_lists_them(calls: tuple[Path, Path],
                                                        tmp_path: Path) -> None:
    db = tmp_path / "team.sqlite"
    code, out1, err = run("draft", str(calls[0]), "--series", str(db), "-q")
    assert code == 0, err
    assert db.is_file() and "Carried from earlier meetings" not in out1
    code, md, err = run("items", str(db))
    assert code == 0, err
    assert md.startswith("# Open items: team\n")
    week1_ids = [line.split("|")[1].strip() for line in md.splitlines()
                 if line.startswith("| A")]
    assert week1_ids, md
    code, out2, err = run("draft", str(calls[1]), "--series", str(db), "-q")
    assert code == 0, err
    assert "## Carried from earlier meetings" in out2
    carried_part = out2.split("## Carried from earlier meetings", 1)[1].split("\n## ", 1)[0]
    for item_id in week1_ids:  # every open item of week 1 is listed under its own id
        assert f"| {item_id} |" in carried_part


def test_items_csv_is_formula_safe_and_sorted_by_owner(calls: tuple[Path, Path],
                                                      tmp_path: Path) -> None:
    db = tmp_path / "team.sqlite"
    assert run("draft", str(calls[0]), "--series", str(db), "-q")[0] == 0
    code, out, err = run("items", str(db), "--format", "csv")
    assert code == 0, err
    rows = list(csv.reader(io.StringIO(out)))
    assert rows[0] == ["No.", "Owner", "Action", "Due", "Status", "Raised", "Last recorded"]
    assert len(rows) > 1 and all(r[4] == "open" for r in rows[1:])
    owners = [r[1] for r in rows[1:]]
    named = [o for o in owners if o]
    assert named == sorted(named, key=str.casefold) and owners[: len(named)] == named
    for row in rows[1:]:
        for cell in row:
            assert not cell.startswith(("=", "+", "-", "@")), row
    assert all(r[5] == "2026-10-07 Warehouse call" for r in rows[1:])


def test_items_to_a_file_and_errors(calls: tuple[Path, Path], tmp_path: Path) -> None:
    db = tmp_path / "team.sqlite"
    code, _, err = run("items", str(db))
    assert code == 1 and "no such series file" in err
    assert run("draft", str(calls[0]), "--series", str(db), "-q")[0] == 0
    out = tmp_path / "open.md"
    code, stdout, err = run("items", str(db), "-o", str(out))
    assert code == 0 and stdout == "" and out.read_text("utf-8").startswith("# Open items")
    code, _, err = run("items", str(db), "-o", str(out))
    assert code == 1 and "already exists" in err
    code, _, err = run("items", str(db), "--format", "xlsx")
    assert code == 2


def test_rerun_through_the_cli_replaces_the_meeting(calls: tuple[Path, Path],
                                                   tmp_path: Path) -> None:
    import sqlite3

    db = tmp_path / "team.sqlite"
    for _ in range(2):
        assert run("draft", str(calls[0]), "--series", str(db), "-q")[0] == 0
    assert run("draft", str(calls[1]), "--series", str(db), "-q")[0] == 0
    first = run("items", str(db))[1]
    assert run("draft", str(calls[1]), "--series", str(db), "-q")[0] == 0
    assert run("items", str(db))[1] == first
    conn = sqlite3.connect(db)
    try:
        assert conn.execute("SELECT count(*) FROM meeting").fetchone()[0] == 2
    finally:
        conn.close()


def test_several_inputs_with_a_series_run_in_meeting_order(calls: tuple[Path, Path],
                                                          tmp_path: Path) -> None:
    db = tmp_path / "team.sqlite"
    out = tmp_path / "out"
    out.mkdir()
    # given in the wrong order: week 2 must still see week 1's items
    code, _, err = run("draft", str(calls[1]), str(calls[0]), "--series", str(db),
                       "--out-dir", str(out))
    assert code == 0, err
    assert err.index("week1.vtt") < err.index("week2.vtt")
    assert "Carried from earlier meetings" in (out / "week2.md").read_text("utf-8")
    assert "Carried from earlier meetings" not in (out / "week1.md").read_text("utf-8")
