"""Regression floor of the rules reader on the AMI and ICSI dev meetings.

Source: AMI Meeting Corpus (CC BY 4.0; Carletta et al. 2005) and ICSI Meeting
Corpus (CC BY 4.0; Janin et al. 2003), hand-written summaries whose decision
and action sentences link to dialogue acts (../shared/evaldata). Scoring and
the keyword baseline are those of bench/relay_eval.py: an item is right when
one of its evidence cues is a linked act or within 15 s of one.

Measured at this commit (mean over meetings, all of them):
  decisions (10 meetings with gold): F1 0.389 (P 0.35, R 0.54); keyword baseline 0.250
  (AMI 7 meetings 0.41, ICSI 3 meetings 0.336. 0.350 before "we want the..." statements
  were read as the group's choice: AMI rose, the ICSI meetings, held out, stayed exactly
  as they were. 0.325 before opening recaps of the last meeting were left out and one
  speaker's back-to-back decisions made one item)
  actions (7 AMI meetings with gold): F1 0.381 (P 0.33, R 0.50); keyword baseline 0.099
  (was 0.246 before passing remarks mid-meeting were left out: bench/relay_eval.py)
  owner accuracy on matched AMI actions, role profiles: 5 of 5
These fall short of the issue's targets (0.40); the floors below keep what we have.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "bench"))


@pytest.fixture(scope="module")
def figures(evaldata: Path) -> dict:
    import relay_eval

    relay_eval.EVALDATA = evaldata
    return relay_eval.evaluate(verbose=False, no_profiles=False)


def test_decisions_beat_the_keyword_baseline(figures: dict) -> None:
    # AMI + ICSI decisions (CC BY 4.0): measured F1 0.389 against baseline 0.250
    assert figures["meetings_decisions"] == 10
    assert figures["decisions_f1"] > figures["decisions_base_f1"] + 0.08
    assert figures["decisions_f1"] >= 0.37


def test_actions_beat_the_keyword_baseline(figures: dict) -> None:
    # AMI actions (CC BY 4.0): measured F1 0.381 against baseline 0.099 (0.352 before
    # progressive assignments, "you'll be working on...", counted)
    assert figures["meetings_actions"] == 7
    assert figures["actions_f1"] > 2 * figures["actions_base_f1"]
    assert figures["actions_f1"] >= 0.36


def test_owners_of_matched_actions(figures: dict) -> None:
    # AMI roles from speaker_roles_inferred.json as profiles: measured 4 of 4 right
    assert figures["owner_matched"] >= 3
    assert figures["owner_accuracy"] >= 0.6


def test_decision_texts_overlap_the_gold_sentences(figures: dict) -> None:
    # ROUGE-1 F (rouge-score) of decision texts vs gold decision sentences: measured 0.249,
    # the baseline's matching acts 0.162
    assert figures["rouge1"] > figures["rouge1_base"]
