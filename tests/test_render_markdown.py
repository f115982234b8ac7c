"""Markdown rendering: golden files compared exactly, determinism, and what each row names.

Regenerate the goldens after a deliberate change of layout with
``MINUTES_REGEN_GOLDEN=1 .venv/bin/pytest tests/test_render_markdown.py tests/test_render_docx.py``
and read the diff before committing; without that variable the tests never write files.
"""

from __future__ import annotations

import datetime as dt
import os
import sys
from dataclasses import replace
from pathlib import Path

import pytest

from minutes.errors import UsageError
from minutes.model import Event, Motion, Vote
from minutes.render import RENDERERS, clock, render

sys.path.insert(0, str(Path(__file__).parent / "data" / "render"))
import render_samples as samples  # noqa: E402

GOLDEN = Path(__file__).parent / "golden"

CASES = {
    "render_general.md": samples.GENERAL,
    "render_board.md": samples.BOARD,
    "render_board_approved.md": samples.board_with_seconders(),
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_markdown_matches_golden(name: str) -> None:
    got = render(CASES[name], "md")
    path = GOLDEN / name
    if os.environ.get("MINUTES_REGEN_GOLDEN"):
        path.parent.mkdir(exist_ok=True)
        path.write_bytes(got)
        pytest.skip(f"rewrote {path}")
    assert got.decode("utf-8") == path.read_text(encoding="utf-8")


@pytest.mark.parametrize("fmt", ["md", "json"])
@pytest.mark.parametrize("name", sorted(CASES))
def test_same_minutes_give_identical_bytes(name: str, fmt: str) -> None:
    assert render(CASES[name], fmt) == render(CASES[name], fmt)


def test_markdown_is_utf8_with_lf_line_endings() -> None:
    out = render(samples.GENERAL, "md")
    text = out.decode("utf-8")
    assert "\r" not in text
    assert text.endswith("\n") and not text.endswith("\n\n")


@pytest.mark.parametrize(("seconds", "expected"), [
    (0, "00:00:00"), (59.999, "00:00:59"), (61.5, "00:01:01"), (3600, "01:00:00"),
    (3 * 3600 + 25 * 60 + 7, "03:25:07"), (100 * 3600, "100:00:00"), (-3, "00:00:00"),
])
def test_clock(seconds: float, expected: str) -> None:
    assert clock(seconds) == expected


def test_unknown_format_lists_the_choices() -> None:
    with pytest.raises(UsageError) as err:
        render(samples.GENERAL, "pdf")
    message = str(err.value)
    assert "'pdf'" in message
    for fmt in RENDERERS:
        assert fmt in message


def test_unknown_template_lists_the_choices() -> None:
    with pytest.raises(UsageError, match="general, board"):
        render(replace(samples.GENERAL, template="memo"), "md")


def _table_rows(md: str, header_start: str) -> list[list[str]]:
    lines = md.splitlines()
    start = next(i for i, line in enumerate(lines) if line.startswith(header_start))
    rows = []
    for line in lines[start + 2:]:
        if not line.startswith("|"):
            break
        rows.append([c.strip() for c in line.strip("|").split(" | ")])
    return rows


def test_every_decision_and_action_row_names_its_cue_and_time() -> None:
    md = render(samples.GENERAL, "md").decode()
    decisions = _table_rows(md, "| No. | Decision")
    assert [(r[0], r[3], r[4]) for r in decisions] == [("D1", "00:00:32", "c3"),
                                                       ("D2", "00:07:51", "c8")]
    actions = _table_rows(md, "| No. | Action")
    # A3 has no evidence: its cue cell is a dash, never empty.
    assert [(r[0], r[4], r[6]) for r in actions] == [("A1", "open", "c4"), ("A2", "done", "c8"),
                                                     ("A3", "open", "—")]


def test_general_header_and_sections() -> None:
    md = render(samples.GENERAL, "md").decode()
    assert "- **Time:** 09:30–09:51 (00:21:30 recorded)" in md
    assert "- **Absent:** Dmitri Ashe (engineer)" in md
    assert "- **Speakers not identified:** SPEAKER_2" in md
    # Only the file name of the source, never the clerk's folders.
    assert "larkfield-2025-03-04.vtt" in md and "/home/clerk" not in md
    assert "### 1. Depot survey (00:00:00–00:01:01)" in md
    assert "- [00:00:10] Tomasz Ferreira: The north yard drains badly" in md
    assert "## Agenda items not discussed\n\n- 3 Budget forecast" in md
    # Q2 was answered: only open questions are listed.
    assert "Q1 [00:07:28]" in md and "Q2" not in md


def test_footer_says_draft_and_gives_the_cautions() -> None:
    md = render(samples.GENERAL, "md").decode()
    footer = md[md.rindex("\n---\n"):]
    assert "**DRAFT.**" in footer
    assert "must check them" in footer
    assert "consent" in footer and "ethics approval" in footer
    assert "offline" in footer and "sent off the machine" in footer


def test_approved_minutes_say_so_instead_of_draft() -> None:
    md = render(samples.board_with_seconders(), "md").decode()
    assert "Approved on 2025-03-11" in md
    assert "DRAFT" not in md


# --------------------------------------------------------------------------- board


def test_board_opening_names_the_meeting_and_officers() -> None:
    # Robert's Rules of Order Revised (1915), section 60, essentials (a)-(e) and (g): kind
    # of meeting, assembly, date and place, chairman and secretary, previous minutes,
    # hours of meeting and adjournment.
    md = render(samples.BOARD, "md").decode()
    assert ("A regular meeting of the Board of Trustees of the Riverbend Library Trust was "
            "held on 2025-02-11 (Tuesday) at Community Room, Riverbend Library. The meeting "
            "was called to order at 19:02 by Helena Brandt, chair. Oskar Lind was "
            "secretary.") in md
    assert "4 of 5 voting members were present; 3 are required" in md
    assert "approved as corrected: the book sale is on 12 April" in md
    assert "The meeting was adjourned at 20:14." in md
    assert "Approved on ____________" in md


def test_board_lists_public_commenters_without_quoting_them() -> None:
    md = render(samples.BOARD, "md").decode()
    assert "- **Public:** Marta Kollin" in md
    assert "Sunday opening hours" not in md  # her words are not minuted


def test_board_records_the_mover_but_not_the_seconder_by_default() -> None:
    # Robert's Rules of Order Revised (1915), section 60 "The Minutes": "Generally the name
    # is recorded of the member who introduced a main motion, but not of the seconder."
    md = render(samples.BOARD, "md").decode()
    record = md[md.index("## Record of business"):md.index("## Motion register")]
    assert "moved by Joyce Okafor" in record
    assert "seconded by" not in record
    assert "Kenji Sato, seconded" not in md
    approved = render(samples.board_with_seconders(), "md").decode()
    assert "moved by Joyce Okafor, seconded by Kenji Sato" in approved
    assert "| M1 | That the Board adopt the 2025 operating budget of $412,000. | Joyce " \
           "Okafor | Kenji Sato |" in approved


def test_board_writes_amendments_before_the_main_motion_as_amended() -> None:
    md = render(samples.BOARD, "md").decode()
    amendment = md.index("**Amendment M2 (to M1)**")
    main = md.index("**Motion M1, as amended**")
    assert amendment < main
    assert "The motion, as amended, carried." in md
    assert ("Roll call — Aye: Helena Brandt, Oskar Lind, Kenji Sato; No: Joyce Okafor; "
            "Absent: Luz Reyes.") in md


def test_board_vote_without_counts_is_left_for_the_clerk_never_a_number() -> None:
    md = render(samples.BOARD, "md").decode()
    m1 = md[md.index("**Motion M1, as amended**"):md.index("### Item 5")]
    assert "vote not recorded — clerk to complete" in m1
    assert not any(ch.isdigit() for ch in m1.split("Vote:")[1].split(".")[0])
    assert "*\\[Clerk: the chair declared the result without calling for the noes\\]*" in m1
    register = _table_rows(md, "| No. | Motion")
    assert register[0][4] == "not recorded"


def test_board_outcomes_in_words() -> None:
    md = render(samples.BOARD, "md").decode()
    assert "Vote: 1 for, 3 against, 0 abstaining. The motion failed." in md
    assert "The motion was withdrawn by the mover." in md
    assert "The motion was referred — to the Building Committee." in md
    # A withdrawn motion was never voted on: no vote line, and dashes in the register.
    m4 = md[md.index("**Motion M4**"):md.index("**Motion M5**")]
    assert "Vote:" not in m4
    assert _table_rows(md, "| No. | Motion")[3][4] == "—"


def test_board_motions_fall_in_the_item_whose_time_range_holds_them() -> None:
    md = render(samples.BOARD, "md").decode()
    item5 = md[md.index("### Item 5: Opening hours"):md.index("### Item 6")]
    assert "Motion M3" in item5 and "Motion M4" not in item5
    item1 = md[md.index("### Item 1:"):md.index("### Item 4")]
    assert "- D1 [00:00:41] Agreed: The annual book sale is held on 12 April." in item1
    quiet = replace(samples.BOARD, ledger=replace(samples.BOARD.ledger, decisions=()))
    md = render(quiet, "md").decode()
    item1 = md[md.index("### Item 1:"):md.index("### Item 4")]
    assert "Discussed; no motion or decision was recorded." in item1


def test_empty_template_means_general() -> None:
    assert render(replace(samples.GENERAL, template=""), "md") == render(samples.GENERAL, "md")


def test_board_partial_counts_and_clock_less_events() -> None:
    ledger = samples.BOARD.ledger
    partial = Motion("M9", "To buy chairs.", "Kenji Sato", None,
                     Vote(method="count", for_=4, against=None, abstain=None), "carried",
                     1000.0, ())
    events = tuple(e if e.kind != "call_to_order" else Event("call_to_order", 65.0, ())
                   for e in ledger.events)
    minutes = replace(samples.BOARD,
                      ledger=replace(ledger, motions=(*ledger.motions, partial), events=events))
    md = render(minutes, "md").decode()
    assert "Vote: 4 for, not recorded against, not recorded abstaining — clerk to complete." in md
    assert "called to order at 00:01:05 into the recording by Helena Brandt" in md
    assert "| M9 | To buy chairs. | Kenji Sato | none heard | 4–?–? (? not recorded) |" in md


def test_board_without_call_to_order_or_quorum_asks_the_clerk() -> None:
    ledger = samples.BOARD.ledger
    minutes = replace(samples.BOARD, quorum=None, ledger=replace(
        ledger, events=tuple(e for e in ledger.events
                             if e.kind not in ("call_to_order", "adjournment"))))
    md = render(minutes, "md").decode()
    assert "The call to order was not found in the recording — clerk to complete." in md
    assert "Quorum not determined — clerk to complete." in md
    assert "The adjournment was not found in the recording — clerk to complete." in md


def test_meeting_without_date_or_clock() -> None:
    minutes = replace(samples.GENERAL, meeting=replace(samples.GENERAL.meeting, date=None,
                                                       start_clock=None))
    md = render(minutes, "md").decode()
    assert "- **Date:** not given" in md
    assert "- **Time:** 00:21:30 recorded" in md


def test_end_clock_wraps_past_midnight() -> None:
    minutes = replace(samples.GENERAL,
                      meeting=replace(samples.GENERAL.meeting, start_clock=dt.time(23, 30)))
    assert "- **Time:** 23:30–23:51" in render(minutes, "md").decode()
    late = replace(minutes, duration=3600.0)
    assert "- **Time:** 23:30–00:30" in render(late, "md").decode()
