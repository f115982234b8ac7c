"""Every AMI and ICSI transcript.vtt in evaldata, read against its transcript.jsonl.

AMI Meeting Corpus, CC BY 4.0, Carletta et al. 2005; ICSI Meeting Corpus, CC BY 4.0,
Janin et al. 2003 (derived files in ../shared/evaldata/{ami,icsi}/derived, see their
PROVENANCE.md: one cue per dialogue act, cue id = act id, <v LETTER>; acts with no
spoken word have no cue, so the check counts the acts that have text).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from conftest import AMI_MEETINGS, ICSI_MEETINGS

from minutes.ingest import read_transcript

MEETINGS = [("ami", m) for m in AMI_MEETINGS] + [("icsi", m) for m in ICSI_MEETINGS]


def test_every_meeting_in_evaldata_is_checked(evaldata: Path) -> None:
    found = {(p.parts[-4], p.parts[-2]) for p in evaldata.glob("*/derived/*/transcript.vtt")}
    assert found == set(MEETINGS)


@pytest.mark.parametrize(("corpus", "meeting"), MEETINGS,
                         ids=[f"{c.upper()} {m} (CC BY 4.0)" for c, m in MEETINGS])
def test_corpus_vtt_matches_its_jsonl(evaldata: Path, corpus: str, meeting: str) -> None:
    folder = evaldata / corpus / "derived" / meeting
    acts = [json.loads(line) for line in (folder / "transcript.jsonl").read_text("utf-8")
            .splitlines() if line.strip()]
    spoken = [a for a in acts if a["text"].strip()]
    t = read_transcript(folder / "transcript.vtt")
    flat = [c for u in t.utterances for c in u.cues]
    assert t.warnings == ()
    assert len(flat) == len(spoken)
    assert (flat[0].start, flat[0].end) == (spoken[0]["start"], spoken[0]["end"])
    assert (flat[-1].start, flat[-1].end) == (spoken[-1]["start"], spoken[-1]["end"])
    # the jsonl is sorted by start time, and so are the merged cues: same acts, same order
    assert [c.id for c in flat] == [a["da_id"] for a in spoken]
    speaker_of = {a["da_id"]: a["speaker"] for a in spoken}
    assert all(speaker_of[c.id] == u.speaker == u.label for u in t.utterances for c in u.cues)
    assert [u.index for u in t.utterances] == list(range(len(t.utterances)))
    assert len(t.utterances) < len(flat)  # consecutive acts of one speaker were merged
