"""The demo series: week 2 of the tool-library calls updates week 1's items as its key says.

Invented demo data (demo_meetings/project_week1.*, project_week2.*); the keys were written
by the demo's author. Both meetings are drafted once per session with the rules reader.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path

import pytest
from conftest import DEMO

from minutes import series
from minutes.model import ActionItem, Minutes
from minutes.pipeline import DraftOptions, draft


@dataclass(frozen=True)
class Run:
    db: Path
    week1: Minutes
    week2: Minutes
    carried: series.Carried


def _draft(db: Path, name: str) -> tuple[Minutes, series.Carried]:
    path = DEMO / f"{name}.vtt"
    options = DraftOptions()
    carried = series.load(db, series.meeting_of(path, options), series.file_digest(path))
    minutes = series.settle(draft(path, options, initial=carried.ledger), carried)
    series.save(db, minutes, carried)
    return minutes, carried


@pytest.fixture(scope="session")
def demo(tmp_path_factory: pytest.TempPathFactory) -> Run:
    db = tmp_path_factory.mktemp("series") / "ashgrove.sqlite"
    week1, _ = _draft(db, "project_week1")
    week2, carried = _draft(db, "project_week2")
    return Run(db, week1, week2, carried)


def _key(name: str) -> dict:  # type: ignore[type-arg]
    return json.loads((DEMO / f"{name}.key.json").read_text("utf-8"))  # type: ignore[no-any-return]


def _week1_item(week1: Minutes, cue: str) -> ActionItem | None:
    """Return our week-1 action raised at the key's cue (or at most two cues from it)."""
    best, gap = None, 3
    for a in week1.ledger.actions:
        first = a.evidence[0].cue if a.evidence else None
        if first and first.isdigit() and abs(int(first) - int(cue)) < gap:
            best, gap = a, abs(int(first) - int(cue))
    return best


def score(week1: Minutes, week2: Minutes) -> tuple[int, int, int]:
    """Return (key entries carried into week 2, status changes right in week 2, entries)."""
    key1, key2 = _key("project_week1"), _key("project_week2")
    cue_of = {a["task"]: a["cue"] for a in key1["actions"]}
    final = {a.id: a for a in week2.ledger.actions}
    found = right = 0
    for entry in key2["carried"]:
        ours = _week1_item(week1, cue_of[entry["from"]])
        if ours is None or ours.id not in final:
            continue
        found += 1
        item = final[ours.id]
        here = [c for c in series.changes_here(item) if c.kind != "created"]
        want = entry["status_change"]
        if want == "open":
            right += item.status == "open" and not here
        elif want in ("done", "dropped"):
            right += item.status == want
        else:  # "due" or "owner": the last such change carries the key's value, still open
            values = [c.value for c in here if c.kind == want]
            right += bool(values) and values[-1] == entry["value"] and item.status == "open"
    return found, right, len(key2["carried"])


def test_week1_open_items_enter_week2_under_their_series_ids(demo: Run) -> None:
    open1 = {a.id for a in demo.week1.ledger.actions if a.status == "open"}
    assert open1, "week 1 should leave open actions"
    assert {k for k in demo.carried.items if k.startswith("A")} == open1
    carried2 = {a.id for a in demo.week2.ledger.actions if a.source == "series"}
    assert carried2 == open1  # same ids in week 2's minutes
    top = max(int(a.id[1:]) for a in demo.week1.ledger.actions)
    new2 = [int(a.id[1:]) for a in demo.week2.ledger.actions if a.source != "series"]
    assert new2 and min(new2) == top + 1  # new items numbered after the series' last one


def week1_from_key() -> Minutes:
    """Return week 1's minutes built by hand from its key: the actions as the key ends them."""
    import datetime as dt

    from minutes.ingest import read_transcript
    from minutes.model import Evidence, Ledger, MeetingInfo

    key = _key("project_week1")
    transcript = read_transcript(DEMO / "project_week1.vtt")
    where = {c.id: (u, c) for u in transcript.utterances for c in u.cues}
    actions = []
    for n, a in enumerate(key["actions"], 1):
        utt, cue = where[a["cue"]]
        evidence = (Evidence(utt.index, cue.id, cue.start, cue.end, utt.speaker, a["quote"]),)
        actions.append(ActionItem(f"A{n}", a["task"], a["owner"],
                                  dt.date.fromisoformat(a["due"]) if a["due"] else None,
                                  a["status"], cue.start, evidence))
    info = MeetingInfo(title="Kestrel Road branch: weekly call", date=dt.date(2026, 11, 4),
                       start_clock=dt.time(18, 30))
    return Minutes(meeting=info, source="project_week1.vtt", duration=transcript.duration,
                   attendees=(), segments=(), summary=(), ledger=Ledger(actions=tuple(actions)),
                   utterances=transcript.utterances)


@pytest.fixture(scope="session")
def keyed(tmp_path_factory: pytest.TempPathFactory) -> Run:
    """Return week 2 drafted on a series whose week 1 is the key's (hand-built) record."""
    db = tmp_path_factory.mktemp("keyed") / "ashgrove.sqlite"
    week1 = week1_from_key()
    series.save(db, week1, series.Carried(week1.ledger.__class__(), {}, {"A": 1, "P": 1},
                                          "key", "key"))
    week2, carried = _draft(db, "project_week2")
    return Run(db, week1, week2, carried)


def test_week2_updates_the_keys_week1_items_as_the_key_says(keyed: Run) -> None:
    # Week 1 from its key, week 2 read by the rules reader: this measures what the series
    # hands the relay and what the relay makes of it, apart from week 1's own extraction.
    found, right, total = score(keyed.week1, keyed.week2)
    # Measured: found 6/6, right 6/6 (lease done, deposit done, survey re-dated to the
    # 19th, floor plan still open, sign-up sheet dropped, labels handed to Daniel). 5/6
    # before "Daniel's taking the labels" read as a hand-over and "you sent the photos, so
    # that's done" stopped closing the labels; 1-2/6 while carried items counted as "just
    # mentioned" (their week-1 evidence has week 1's clock).
    print(f"key week 1 -> week 2: carried {found}/{total}, right {right}/{total}")
    assert found == total  # every open item of week 1 is in week 2's ledger, same id
    assert right == total


def test_week2_status_changes_of_week1_items_match_the_key(demo: Run) -> None:
    # Both weeks read by the rules reader end to end: week 1's own misses limit this.
    found, right, total = score(demo.week1, demo.week2)
    # Measured: carried 6/6, right 4/6 (week 1's own extraction closes or misses some
    # items before week 2 sees them); 3/6 before the hand-over fix above, 1-2/6 before
    # the clock fix.
    print(f"end to end: carried entries {found}/{total}, right {right}/{total}")
    assert right >= 4


def test_week2_minutes_render_the_carried_table(demo: Run) -> None:
    from minutes.render import render_markdown

    text = render_markdown(demo.week2).decode()
    assert "## Carried from earlier meetings" in text
    part = text.split("## Carried from earlier meetings", 1)[1].split("\n## ", 1)[0]
    for item_id in (a.id for a in demo.week2.ledger.actions if a.source == "series"):
        assert f"| {item_id} |" in part


def test_items_after_week2_are_the_open_ones_of_week2(demo: Run) -> None:
    listed = {s.id for s in series.open_items(demo.db) if s.kind == "action"}
    assert listed == {a.id for a in demo.week2.ledger.actions if a.status == "open"}
