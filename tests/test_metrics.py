"""Pk and WindowDiff against nltk's implementation (nltk.metrics.segmentation).

Convention matched: our label sequences of n units become nltk's 0/1 strings of
the n - 1 *gaps* ("1" where units i and i + 1 differ), with the same k passed to
both. nltk's window of k characters then covers exactly the k gaps between
units i and i + k, which is the probe of Beeferman et al. (1999).
"""

from __future__ import annotations

import random

import pytest
from nltk.metrics import segmentation as nltk_seg

from minutes.metrics import (
    boundaries_of,
    default_k,
    labels_from_starts,
    pk,
    windowdiff,
)


def _random_labels(rng: random.Random, n: int, p: float) -> list[int]:
    labels, current = [], 0
    for i in range(n):
        if i and rng.random() < p:
            current += 1
        labels.append(current)
    return labels


def _gaps(labels: list[int]) -> str:
    return "".join(map(str, boundaries_of(labels)))


@pytest.mark.parametrize("seed", range(40))
def test_pk_and_windowdiff_equal_nltk_on_random_segmentations(seed: int) -> None:
    rng = random.Random(seed)
    n = rng.randint(5, 400)
    ref = _random_labels(rng, n, rng.choice([0.01, 0.05, 0.2]))
    hyp = _random_labels(rng, n, rng.choice([0.0, 0.02, 0.1, 0.5]))
    for k in {1, rng.randint(1, n - 1), default_k(ref)}:
        assert pk(ref, hyp, k) == pytest.approx(nltk_seg.pk(_gaps(ref), _gaps(hyp), k))
        assert windowdiff(ref, hyp, k) == pytest.approx(
            nltk_seg.windowdiff(_gaps(ref), _gaps(hyp), k)
        )


def test_default_k_is_half_the_mean_reference_segment_length() -> None:
    ref = [0] * 10 + [1] * 10 + [2] * 10 + [3] * 10  # 4 segments of 10 units
    assert default_k(ref) == 5
    hyp = [0] * 40
    # 35 probes (i, i + 5); those straddling one of the 3 boundaries: 3 * 5 = 15
    assert pk(ref, hyp) == pytest.approx(15 / 35)
    assert windowdiff(ref, hyp) == pytest.approx(15 / 35)


def test_recurring_topic_label_still_makes_boundaries() -> None:
    ref = ["a"] * 5 + ["b"] * 5 + ["a"] * 5
    assert boundaries_of(ref).count(1) == 2
    assert pk(ref, ref) == 0.0
    assert pk(ref, ["x"] * 15, k=3) > 0


def test_windowdiff_penalises_extra_boundaries_that_pk_forgives() -> None:
    ref = [0] * 10 + [1] * 10
    hyp = [0] * 10 + [1] * 2 + [2] * 8  # a second boundary 2 units after the true one
    assert windowdiff(ref, hyp, 5) > pk(ref, hyp, 5)


def test_labels_from_starts_and_errors() -> None:
    assert labels_from_starts([0, 2, 2, 5], 6) == [0, 0, 1, 1, 1, 2]
    with pytest.raises(ValueError, match="same units"):
        pk([0, 0, 1], [0, 0])
    with pytest.raises(ValueError, match="window"):
        windowdiff([0, 0, 1], [0, 0, 0], k=3)
