"""The series file: load, settle and save with hand-built ledgers (no relay, no model)."""

from __future__ import annotations

import datetime as dt
import sqlite3
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import pytest

from minutes import series
from minutes.errors import InputError
from minutes.model import (
    ActionItem,
    Change,
    Evidence,
    Ledger,
    MeetingInfo,
    Minutes,
    Proposal,
)
from minutes.relay.ledger import Add, Update, apply
from minutes.relay.reconcile import reconcile
from minutes.render import render_markdown

WEEK1 = MeetingInfo(title="Branch call", date=dt.date(2026, 11, 4), start_clock=dt.time(18, 30))
WEEK2 = replace(WEEK1, date=dt.date(2026, 11, 11))
WEEK3 = replace(WEEK1, date=dt.date(2026, 11, 18))


def ev(utt: int, cue: str, start: float, speaker: str, quote: str) -> Evidence:
    return Evidence(utt, cue, start, start + 3.0, speaker, quote)


def action(task: str, owner: str | None, time: float, cue: str, quote: str,
           status: str = "open", due: dt.date | None = None) -> ActionItem:
    return ActionItem("", task, owner, due, status, time,  # type: ignore[arg-type]
                      (ev(int(cue), cue, time, owner or "Priya", quote),))


def proposal(text: str, by: str, time: float, cue: str) -> Proposal:
    return Proposal("", text, by, time, (ev(int(cue), cue, time, by, text),))


def minutes_of(info: MeetingInfo, ledger: Ledger, source: str = "call.vtt") -> Minutes:
    """Return minutes as the pipeline's final pass would leave them (reconcile included)."""
    from minutes.model import Transcript
    from minutes.nlp import Parsed
    from minutes.relay.context import ReadContext
    from minutes.speakers import Directory

    ctx = ReadContext(Transcript((), meeting=info), Parsed(()), Directory())  # no transcript
    return Minutes(meeting=info, source=source, duration=900.0, attendees=(), segments=(),
                   summary=(), ledger=reconcile(ledger, ctx), utterances=())


def week1_ledger() -> Ledger:
    ledger, rejected = apply(Ledger(), [
        Add(action("send the signed lease back", "Priya Raghunathan", 80.0, "84",
                   "I'll send the signed lease back", due=dt.date(2026, 11, 6))),
        Add(action("pay the shelving deposit", "Daniel Okafor", 190.0, "198",
                   "can you pay the deposit by Monday")),
        Add(action("hire a van", "Rhys Penhallow", 200.0, "207", "I'll sort out a van")),
        Add(proposal("Charge a small membership fee", "Daniel Okafor", 460.0, "467")),
        Add(proposal("Open on Sundays too", "Hana Sato", 480.0, "487")),
    ])
    assert not rejected
    # the van is dropped in the same meeting; the Sunday idea is rejected
    ledger, rejected = apply(ledger, [
        Update("A3", Change("dropped", "no van", ev(235, "235", 230.0, "Priya", "scrap the van"))),
        Update("P2", Change("rejected", None, ev(489, "489", 485.0, "Priya", "not enough people"))),
    ])
    assert not rejected
    return ledger


@pytest.fixture()
def db(tmp_path: Path) -> Path:
    """Return a series file holding week 1 (saved through the real path)."""
    path = tmp_path / "team.sqlite"
    carried = series.load(path, WEEK1, "w1digest")
    assert not carried.items and not path.exists()  # loading never creates the file
    week1 = series.settle(minutes_of(WEEK1, week1_ledger()), carried)
    series.save(path, week1, carried)
    return path


def week2_minutes(carried: series.Carried) -> Minutes:
    """Return week 2: the deposit is done, the lease is reassigned, a new action is raised."""
    ledger = carried.ledger
    by_task = {a.task: a.id for a in ledger.actions}
    ledger, rejected = apply(ledger, [
        Add(action("email the councillor", "Priya Raghunathan", 130.0, "131",
                   "I'll email her tomorrow")),
        Update(by_task["pay the shelving deposit"],
               Change("done", "paid on Friday", ev(33, "33", 116.0, "Daniel Okafor",
                                                  "I paid Kilnworth on Friday"))),
        Update(by_task["send the signed lease back"],
               Change("owner", "Hana Sato", ev(40, "40", 150.0, "Hana Sato", "I'll take it"))),
    ])
    assert not rejected
    return minutes_of(WEEK2, ledger, "week2.vtt")


def test_load_carries_open_items_under_ids_that_cannot_collide(db: Path) -> None:
    carried = series.load(db, WEEK2, "w2digest")
    # open actions A1, A2 and the hanging proposal P1 come in; the dropped van (A3) and
    # the rejected Sunday idea (P2) stay behind
    assert sorted(carried.items) == ["A1", "A2", "P1"]
    assert [a.id for a in carried.ledger.actions] == ["A1", "A2"]
    assert [p.id for p in carried.ledger.proposals] == ["P1"]
    assert carried.ledger.proposals[0].status == "pending"  # hung at the end of week 1
    assert carried.next_number == {"A": 4, "P": 3}
    lease = carried.items["A1"]
    assert lease.source == "series"
    mark = lease.history[-1]
    assert (mark.kind, mark.source) == ("carried", "series")
    assert mark.value == "A1 from 2026-11-04 Branch call"
    assert mark.evidence.cue == "84" and mark.evidence.quote == "I'll send the signed lease back"


def test_settle_restores_series_ids_after_the_final_pass_renumbers(db: Path) -> None:
    carried = series.load(db, WEEK2, "w2digest")
    raw = week2_minutes(carried)
    # the final pass numbered everything again in time order, mixing both meetings' clocks
    assert {a.id for a in raw.ledger.actions} == {"A1", "A2", "A3"}
    week2 = series.settle(raw, carried)
    actions = {a.id: a for a in week2.ledger.actions}
    assert list(actions) == ["A1", "A2", "A4"]  # carried first, new ones after the series' A3
    assert actions["A2"].status == "done" and actions["A2"].source == "series"
    assert actions["A1"].owner == "Hana Sato"
    assert actions["A4"].task == "email the councillor" and actions["A4"].source == "rules"
    here = series.changes_here(actions["A2"])
    assert [(c.kind, c.evidence.cue) for c in here] == [("done", "33")]
    # the history reads in meeting order: week 1's entries, the carried mark, then week 2's
    kinds = [c.kind for c in actions["A2"].history]
    assert kinds == ["created", "carried", "done"]


def test_week2_minutes_show_the_carried_table_with_this_meetings_cue_and_time(db: Path) -> None:
    carried = series.load(db, WEEK2, "w2digest")
    week2 = series.settle(week2_minutes(carried), carried)
    text = render_markdown(week2).decode()
    table = text.split("## Carried from earlier meetings", 1)[1].split("## Action items", 1)
    rows = [line for line in table[0].splitlines() if line.startswith("| A") or
            line.startswith("| P")]
    assert rows == [
        "| A1 | send the signed lease back | 2026-11-04 | Hana Sato | 2026-11-06 | open | "
        "owner → Hana Sato | “I'll take it” | 00:02:30 | 40 |",
        "| A2 | pay the shelving deposit | 2026-11-04 | Daniel Okafor | — | done | done | "
        "“I paid Kilnworth on Friday” | 00:01:56 | 33 |",
        "| P1 | Charge a small membership fee | 2026-11-04 | Daniel Okafor | — | "
        "lapsed (not taken up) | not discussed | — | — | — |",
    ]
    own = table[1].split("\n## ", 1)[0]
    assert "| A4 | email the councillor |" in own
    assert "| A1 |" not in own and "| A2 |" not in own  # carried items are not listed twice


def test_save_then_items_lists_what_is_still_open(db: Path) -> None:
    carried = series.load(db, WEEK2, "w2digest")
    series.save(db, series.settle(week2_minutes(carried), carried), carried)
    items = {s.id: s for s in series.open_items(db)}
    # A2 was done and P1 lapsed for good in week 2 (carried once, nobody took it up)
    assert sorted(items) == ["A1", "A4"]
    assert items["A1"].owner == "Hana Sato" and items["A1"].origin == "2026-11-04 Branch call"
    assert items["A1"].last == "2026-11-11 Branch call"
    week3 = series.load(db, WEEK3, "w3digest")
    assert sorted(week3.items) == ["A1", "A4"] and week3.next_number == {"A": 5, "P": 3}


def test_rerun_of_a_meeting_replaces_its_record(db: Path) -> None:
    first = series.load(db, WEEK2, "w2digest")
    series.save(db, series.settle(week2_minutes(first), first), first)
    again = series.load(db, WEEK2, "other digest: corrected captions")
    # the rerun starts from week 1's state, not from its own earlier record
    assert sorted(again.items) == sorted(first.items) and again.next_number == first.next_number
    ledger, _ = apply(again.ledger, [Add(action("book the hall", "Inês Carvalho", 300.0, "300",
                                                "I'll book the hall"))])
    series.save(db, series.settle(minutes_of(WEEK2, ledger, "week2.vtt"), again), again)
    conn = sqlite3.connect(db)
    try:
        meetings = conn.execute("SELECT identity FROM meeting ORDER BY seq").fetchall()
        week2_rows = conn.execute("SELECT i.id FROM item i JOIN meeting m ON m.seq = i.meeting "
                                  "WHERE m.date = '2026-11-11' ORDER BY i.id").fetchall()
    finally:
        conn.close()
    assert meetings == [("2026-11-04 18:30 Branch call",), ("2026-11-11 18:30 Branch call",)]
    assert [r[0] for r in week2_rows] == ["A1", "A2", "A4", "P1"]
    items = {s.id: s.text for s in series.open_items(db)}
    assert items == {"A1": "send the signed lease back", "A2": "pay the shelving deposit",
                     "A4": "book the hall"}


def test_carried_proposal_accepted_names_its_series_id(db: Path) -> None:
    carried = series.load(db, WEEK2, "w2digest")
    fee = next(p.id for p in carried.ledger.proposals)
    ledger, rejected = apply(carried.ledger, [
        Add(proposal("Hold a members' preview", "Hana Sato", 180.0, "185")),
        Update(fee, Change("accepted", "Membership stays free",
                           ev(258, "258", 600.0, "Priya", "we've agreed"))),
    ])
    assert not rejected
    week2 = series.settle(minutes_of(WEEK2, ledger), carried)
    assert [p.id for p in week2.ledger.proposals] == ["P1", "P3"]
    assert [d.proposal for d in week2.ledger.decisions] == ["P1"]
    series.save(db, week2, carried)
    # the new proposal hangs at the end of week 2, so week 3 gets it; P1 is settled
    assert sorted(series.load(db, WEEK3, "w3").items) == ["A1", "A2", "P3"]


def test_identity_is_date_clock_and_title_else_the_file_hash() -> None:
    assert series.identity(WEEK1, "abc") == "2026-11-04 18:30 Branch call"
    assert series.identity(replace(WEEK1, start_clock=None), "abc") == "2026-11-04 Branch call"
    assert series.identity(replace(WEEK1, date=None), "abc") == "sha256:abc"


CRASH = """
import pickle, sys
from pathlib import Path
from minutes import series
minutes, carried = pickle.loads(Path(sys.argv[2]).read_bytes())
series.save(Path(sys.argv[1]), minutes, carried)
"""


def test_a_crash_half_way_through_the_save_leaves_the_file_as_it_was(db: Path,
                                                                      tmp_path: Path) -> None:
    import pickle

    carried = series.load(db, WEEK2, "w2digest")
    week2 = series.settle(week2_minutes(carried), carried)
    job = tmp_path / "job.pickle"
    job.write_bytes(pickle.dumps((week2, carried)))
    before = db.read_bytes()
    before_rows = _dump(db)
    env = {"PATH": "/usr/bin:/bin", series.CRASH_ENV: "2"}  # die after two item rows
    proc = subprocess.run([sys.executable, "-c", CRASH, str(db), str(job)], env=env,
                          capture_output=True, timeout=120)
    assert proc.returncode == 70, proc.stderr.decode()
    assert _dump(db) == before_rows  # the next open rolls back the interrupted transaction
    assert db.read_bytes() == before
    # and the same save without the crash goes through
    proc = subprocess.run([sys.executable, "-c", CRASH, str(db), str(job)],
                          env={"PATH": "/usr/bin:/bin"}, capture_output=True, timeout=120)
    assert proc.returncode == 0, proc.stderr.decode()
    assert _dump(db) != before_rows


def _dump(path: Path) -> list[str]:
    conn = sqlite3.connect(path)
    try:
        return [line for line in conn.iterdump() if "saved_at" not in line]
    finally:
        conn.close()


def test_schema_is_versioned_and_foreign_files_are_refused(tmp_path: Path, db: Path) -> None:
    conn = sqlite3.connect(db)
    assert conn.execute("PRAGMA user_version").fetchone()[0] == series.SCHEMA_VERSION
    assert conn.execute("PRAGMA application_id").fetchone()[0] == series.APPLICATION_ID
    conn.close()
    empty = tmp_path / "empty.sqlite"
    sqlite3.connect(empty).close()  # a version-0 file with no tables: migrated on open
    series.connect(empty, create=False).close()
    conn = sqlite3.connect(empty)
    assert conn.execute("PRAGMA user_version").fetchone()[0] == series.SCHEMA_VERSION
    conn.close()
    newer = tmp_path / "newer.sqlite"
    conn = sqlite3.connect(newer)
    conn.execute(f"PRAGMA application_id = {series.APPLICATION_ID}")
    conn.execute(f"PRAGMA user_version = {series.SCHEMA_VERSION + 1}")
    conn.close()
    with pytest.raises(InputError, match="newer than this minutes understands"):
        series.connect(newer, create=False)
    other = tmp_path / "other.sqlite"
    conn = sqlite3.connect(other)
    conn.execute("CREATE TABLE photos (id INTEGER)")
    conn.close()
    with pytest.raises(InputError, match="not a minutes series file"):
        series.load(other, WEEK2, "x")
    junk = tmp_path / "junk.sqlite"
    junk.write_bytes(b"not a database at all, just text" * 40)
    with pytest.raises(InputError, match="not a series file"):
        series.open_items(junk)
    with pytest.raises(InputError, match="no such series file"):
        series.open_items(tmp_path / "missing.sqlite")


def test_undated_meetings_come_after_dated_ones() -> None:
    assert series._order(None, None, 1) > series._order("2026-11-11", "18:30", 9)
    assert series._order("2026-11-04", "18:30", 9) < series._order("2026-11-11", None, 1)


def test_items_csv_and_markdown_escape_what_was_said() -> None:
    item = replace(action('=HYPERLINK("http://x") call the insurer', "@Mei", 10.0, "5", "q"),
                   id="A7")
    rows = [series.SeriesItem("A7", "action", item.task, "@Mei", dt.date(2026, 11, 20), "open",
                              "2026-11-04 Branch call", "2026-11-11 Branch call", item),
            series.SeriesItem("A2", "action", "-1+2 print labels", None, None, "open",
                              "2026-11-04 Branch call", "2026-11-04 Branch call", item)]
    text = series.items_csv(rows).decode()
    assert text.splitlines()[1] == ("A7,'@Mei,\"'=HYPERLINK(\"\"http://x\"\") call the insurer\","
                                    "2026-11-20,open,2026-11-04 Branch call,2026-11-11 Branch call")
    assert text.splitlines()[2].startswith("A2,,'-1+2 print labels,,open,")
    md = series.items_markdown(rows, "team").decode()
    assert "## @Mei" in md and "## No owner named" in md
    assert md.index("## @Mei") < md.index("## No owner named")  # unnamed owners go last
