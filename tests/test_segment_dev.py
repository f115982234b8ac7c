"""Segmentation on the AMI and ICSI dev meetings: a regression floor, coverage, budget.

Source: AMI Meeting Corpus (Carletta et al. 2005) and ICSI Meeting Corpus (Janin et al.
2003), CC BY 4.0, as copied into ../shared/evaldata (see their PROVENANCE.md). Reference:
top-level topics, ``topics.json`` -> ``reference_boundaries_by_depth["0"]``, in dialogue
acts; each segment start is mapped to the first act starting at or after it (as in
bench/segmentation.py). Pk with k = half the mean reference segment length.

Measured with the default SegmentOptions on the 11 meetings (bench/segmentation.py):
mean Pk 0.285 (WindowDiff 0.295); no-boundary baseline Pk 0.332 (WD 0.332); a boundary
every 5 minutes Pk 0.516 (WD 0.534). The floor below is "beat both baselines' means".
"""

from __future__ import annotations

import bisect
import json
from dataclasses import replace
from pathlib import Path

import pytest
from conftest import AMI_MEETINGS, ICSI_MEETINGS

from minutes import nlp
from minutes.metrics import labels_from_starts, pk
from minutes.model import Transcript
from minutes.nlp import Parsed
from minutes.segment import SegmentOptions, segment


class Meeting:
    """One dev meeting: its transcript, its one parse, its act start times and reference."""

    def __init__(self, folder: Path) -> None:
        from minutes.ingest import read_transcript

        self.name = folder.name
        self.transcript = read_transcript(folder / "transcript.vtt")
        self.parsed = nlp.parse(self.transcript.utterances)
        with (folder / "transcript.jsonl").open(encoding="utf-8") as f:
            self.acts = [json.loads(line)["start"] for line in f if line.strip()]
        topics = json.loads((folder / "topics.json").read_text(encoding="utf-8"))
        self.reference = labels_from_starts(topics["reference_boundaries_by_depth"]["0"],
                                            len(self.acts))

    def labels(self, times: list[float]) -> list[int]:
        """Return act labels for segments starting at ``times`` (the first is ignored)."""
        return labels_from_starts([bisect.bisect_left(self.acts, t) for t in times[1:]],
                                  len(self.acts))


@pytest.fixture(scope="session")
def dev_meetings(evaldata: Path) -> list[Meeting]:
    """Return the 11 dev meetings, each read and parsed once per test session."""
    folders = [evaldata / "ami" / "derived" / m for m in AMI_MEETINGS]
    folders += [evaldata / "icsi" / "derived" / m for m in ICSI_MEETINGS]
    return [Meeting(f) for f in folders]


def test_mean_pk_beats_both_baselines(dev_meetings: list[Meeting]) -> None:
    ours, none, fixed = [], [], []
    for m in dev_meetings:
        segments = segment(m.transcript, m.parsed)
        ours.append(pk(m.reference, m.labels([s.start for s in segments])))
        none.append(pk(m.reference, [0] * len(m.acts)))
        ticks = [300.0 * i for i in range(int(m.acts[-1] // 300) + 1)]
        fixed.append(pk(m.reference, m.labels(ticks)))
    mean = sum(ours) / len(ours)
    assert mean < sum(none) / len(none)
    assert mean < sum(fixed) / len(fixed)


def test_every_utterance_is_covered_once_on_real_meetings(dev_meetings: list[Meeting]) -> None:
    for m in dev_meetings:
        segments = segment(m.transcript, m.parsed)
        indices = [u.index for s in segments for u in s.utterances]
        assert indices == list(range(len(m.transcript.utterances))), m.name
        assert all(s.title for s in segments), m.name


def test_no_segment_over_budget_on_three_hours_of_real_talk(dev_meetings: list[Meeting]) -> None:
    # the three ICSI meetings end to end: about 2.9 hours; with the AMI ones, over 3
    utterances, docs, offset = [], [], 0.0
    for m in dev_meetings[::-1]:
        for u in m.transcript.utterances:
            utterances.append(replace(u, index=len(utterances), start=u.start + offset,
                                      end=u.end + offset))
        docs += m.parsed.docs
        offset = utterances[-1].end + 5.0
        if offset > 3 * 3600:
            break
    transcript = Transcript(tuple(utterances))
    options = SegmentOptions(max_words=1200, max_duration=900.0)
    segments = segment(transcript, Parsed(tuple(docs)), options)
    assert transcript.duration > 3 * 3600
    assert [u.index for s in segments for u in s.utterances] == list(range(len(utterances)))
    for s in segments:
        assert s.words <= options.max_words
        assert s.end - s.start <= options.max_duration
