"""The rules reader against the answer keys of the invented demo meetings.

Each ``demo_meetings/NAME.key.json`` is written by the author of the invented
meeting (not by the tool). A key item is found when a predicted item cites a
cue within ``NEAR`` cues of the key's cue. These are floors, not perfection:
the measured values are in the comments, and a change that loses items fails.
"""

from __future__ import annotations

import datetime as dt
import json
from dataclasses import dataclass, replace
from functools import cache
from pathlib import Path
from typing import Any

import pytest

from minutes.model import Evidence, Ledger

DEMO = Path(__file__).resolve().parents[1] / "demo_meetings"
KEYS = sorted(p for p in DEMO.glob("*.key.json")
              if json.loads(p.read_text(encoding="utf-8")).get("actions")
              or json.loads(p.read_text(encoding="utf-8")).get("decisions"))
NEAR = 3  # cues: the key cites one cue of a turn, the reader may cite its neighbour


@cache
def _run(name: str) -> Ledger:
    """Return the reconciled rules ledger of a demo meeting (ingest, profiles, parse, segment)."""
    from minutes import nlp
    from minutes.ingest import read_transcript
    from minutes.meeting import load_meeting
    from minutes.relay.context import ReadContext
    from minutes.relay.ledger import relay
    from minutes.relay.reconcile import reconcile
    from minutes.relay.rules import RulesReader
    from minutes.segment import segment
    from minutes.speakers import Directory, load_profiles, resolve_speakers

    mfile = load_meeting(DEMO / f"{name}.meeting.toml")
    transcript = replace(read_transcript(DEMO / f"{name}.vtt"), meeting=mfile.info)
    directory = load_profiles(mfile.profiles) if mfile.profiles else Directory()
    transcript, _ = resolve_speakers(transcript, directory)
    parsed = nlp.parse(transcript.utterances)
    ctx = ReadContext(transcript, parsed, directory)
    return reconcile(relay(segment(transcript, parsed), RulesReader(ctx)).ledger, ctx)


def _near(evidence: tuple[Evidence, ...], cue: str) -> bool:
    for ev in evidence:
        if ev.cue == cue:
            return True
        if ev.cue and ev.cue.isdigit() and cue.isdigit() and abs(int(ev.cue) - int(cue)) <= NEAR:
            return True
    return False


@dataclass(frozen=True)
class Figures:
    actions: int
    found: int  # key actions some predicted action cites
    owner: int  # ... with the key's owner
    status: int  # ... with the key's status
    due: int  # ... with the key's due date
    decisions: int
    decisions_found: int
    predicted_actions: int
    hanging_made_decisions: int  # key's rejected/hanging proposals that became decisions


def figures(key_path: Path) -> Figures:
    """Return what the reader found of one key."""
    key: dict[str, Any] = json.loads(key_path.read_text(encoding="utf-8"))
    ledger = _run(key_path.name.removesuffix(".key.json"))
    found = owner = status = due = 0
    for item in key.get("actions", []):
        cues = [str(item["cue"])] + [str(c["cue"]) for c in item.get("changes", [])]
        hits = [a for a in ledger.actions if any(_near(a.evidence, c) for c in cues[:1])]
        if not hits:
            continue
        found += 1
        want_due = dt.date.fromisoformat(item["due"]) if item.get("due") else None
        owner += any(a.owner == item.get("owner") for a in hits)
        status += any(a.status == item.get("status", "open") for a in hits)
        due += any(a.due == want_due for a in hits)
    decisions = key.get("decisions", [])
    decisions_found = sum(1 for d in decisions
                          if any(_near(x.evidence, str(d["cue"])) for x in ledger.decisions))
    hanging = key.get("rejected_or_hanging_proposals", [])
    made = sum(1 for p in hanging if any(x.evidence and x.evidence[0].cue == str(p["cue"])
                                         for x in ledger.decisions))
    return Figures(len(key.get("actions", [])), found, owner, status, due, len(decisions),
                   decisions_found, len(ledger.actions), made)


# Measured (rules reader, this commit):
#   project_week1: actions 8, found 8, owner 8, status 8, due 8; decisions 5, found 4;
#                  predicted actions 11; hanging proposals made decisions 0
#   project_week2: actions 5, found 4, owner 3, status 4, due 3; decisions 3, found 2;
#                  predicted actions 12
#   board_regular: actions 16, found 9, owner 9, status 9, due 4; decisions 8, found 1
#                  (board decisions are carried motions: the motion reader's job, not tested here)
#   interview_03:  actions 1, found 1, owner 1, status 1, due 1; predicted actions 3
FLOORS = {  # name: (found, owner, status, due, decisions_found) as fractions of the key
    "project_week1": (0.85, 0.85, 0.85, 0.85, 0.6),
    "project_week2": (0.6, 0.6, 0.6, 0.6, 0.6),
    "board_regular": (0.5, 0.5, 0.5, 0.25, 0.1),
}
DEFAULT_FLOOR = (0.3, 0.2, 0.2, 0.1, 0.2)  # a key written after this test: a modest floor


@pytest.mark.skipif(not KEYS, reason="no demo answer keys with actions or decisions yet")
@pytest.mark.parametrize("key_path", KEYS, ids=[p.name for p in KEYS])
def test_reader_finds_the_key_items(key_path: Path) -> None:
    name = key_path.name.removesuffix(".key.json")
    f = figures(key_path)
    found, owner, status, due, dec = FLOORS.get(name, DEFAULT_FLOOR)
    if f.actions:
        assert f.found >= found * f.actions, f
        assert f.owner >= owner * f.actions, f
        assert f.status >= status * f.actions, f
        assert f.due >= due * f.actions, f
        assert f.predicted_actions <= 2 * f.actions + 4, f  # precision: not everything said
    if f.decisions:
        assert f.decisions_found >= dec * f.decisions, f
    assert f.hanging_made_decisions == 0, f  # rejected or hanging proposals stay undecided


INTERVIEWS = sorted(p for p in DEMO.glob("interview_*.key.json"))


@pytest.mark.skipif(not INTERVIEWS, reason="no interview demo yet")
def test_interviews_have_few_actions_or_decisions() -> None:
    # the interview keys list no actions and no decisions: a reader should add almost none
    for key_path in INTERVIEWS:
        ledger = _run(key_path.name.removesuffix(".key.json"))
        assert len(ledger.actions) + len(ledger.decisions) <= 6, key_path.name
