"""Regression floor of the rules reader on the AMI and ICSI dev meetings.

Source: AMI Meeting Corpus (CC BY 4.0; Carletta et al. 2005) and ICSI Meeting
Corpus (CC BY 4.0; Janin et al. 2003), hand-written summaries whose decision
and action sentences link to dialogue acts (../shared/evaldata). Scoring and
the keyword baseline are those of bench/relay_eval.py: an item is right when
one of its evidence cues is a linked act or within 15 s of one.

Measured at this commit (mean over meetings, all of them):
  decisions (10 meetings with gold): F1 0.448 (P 0.42, R 0.57); keyword baseline 0.250
  (AMI 7 meetings 0.484, ICSI 3 meetings 0.363; 0.434-0.466 with any one meeting left out.
  History: 0.325 -> 0.350 with opening recaps left out and one speaker's back-to-back
  decisions made one item; -> 0.389 with "we want the..." read as the group's choice;
  -> 0.416 with talk that orders the meeting's business left out; -> 0.433 with "we don't
  really want" and "(are) we happy to go ahead?"; -> 0.436 with lukewarm answers ("that's
  a possibility") not agreeing; -> 0.448 with "we could X" read as an option, not a
  proposal. ICSI moved 0.336 -> 0.337 over the steps up to 0.436 and to 0.363 with the
  last. ICSI was held out in the first session; in the second its false positives were
  read with AMI's, so no dev meeting is held out any more: these are dev figures)
  actions (7 AMI meetings with gold): F1 0.476 (P 0.50, R 0.50); keyword baseline 0.099
  (0.389-0.556 with any one meeting left out: each meeting has 1-4 gold actions. History:
  0.246 -> 0.352 with passing remarks mid-meeting left out; -> 0.381 with progressive
  assignments; -> 0.405 with tasks that name nothing to act on left out; -> 0.429 with
  offers on a condition left out; -> 0.476 with the chair handing the floor left out)
  owner accuracy on matched AMI actions, role profiles: 5 of 5
The floors below are the issue's targets (0.40); a change that falls under them is a
regression to explain, not a threshold to lower.
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
    # AMI + ICSI decisions (CC BY 4.0): measured F1 0.448 against baseline 0.250
    assert figures["meetings_decisions"] == 10
    assert figures["decisions_f1"] > figures["decisions_base_f1"] + 0.08
    assert figures["decisions_f1"] >= 0.40


def test_actions_beat_the_keyword_baseline(figures: dict) -> None:
    # AMI actions (CC BY 4.0): measured F1 0.476 against baseline 0.099
    assert figures["meetings_actions"] == 7
    assert figures["actions_f1"] > 2 * figures["actions_base_f1"]
    assert figures["actions_f1"] >= 0.40


def test_owners_of_matched_actions(figures: dict) -> None:
    # AMI roles from speaker_roles_inferred.json as profiles: measured 5 of 5 right
    assert figures["owner_matched"] >= 3
    assert figures["owner_accuracy"] >= 0.6


def test_decision_texts_overlap_the_gold_sentences(figures: dict) -> None:
    # ROUGE-1 F (rouge-score) of decision texts vs gold decision sentences: measured 0.246,
    # the baseline's matching acts 0.162
    assert figures["rouge1"] > figures["rouge1_base"]
