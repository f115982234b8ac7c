"""Segmentation error metrics: Pk (Beeferman et al. 1999) and WindowDiff (Pevzner & Hearst 2002).

Both take **label sequences**: one label per unit (dialogue act, utterance),
``labels[i]`` naming the segment unit ``i`` belongs to. A boundary lies between
units ``i - 1`` and ``i`` wherever their labels differ, so a topic that recurs
later still counts as a new segment, and any hashable labels work
(``[0, 0, 1, 1, 1, 2]`` or topic ids).

Convention (the same as ``nltk.metrics.segmentation`` applied to the string of
*gaps*): the ``n`` units have ``n - 1`` gaps; a probe pairs unit ``i`` with unit
``i + k`` for ``i = 0 .. n - k - 1`` and asks whether a boundary lies in the
``k`` gaps between them. Pk counts probes where reference and hypothesis
disagree on "same segment or not"; WindowDiff counts probes where they disagree
on how many boundaries lie between. Both are error rates in [0, 1]; lower is
better. ``k`` defaults to half the mean reference segment length in units
(Beeferman et al.), rounded, at least 1, at most ``n - 1``.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence


def boundaries_of(labels: Sequence[Hashable]) -> list[int]:
    """Return the 0/1 gap sequence: ``1`` at gap ``i`` when units ``i`` and ``i + 1`` differ."""
    return [int(labels[i] != labels[i + 1]) for i in range(len(labels) - 1)]


def labels_from_starts(starts: Sequence[int], n: int) -> list[int]:
    """Return a label sequence of ``n`` units whose segments begin at the given unit indices."""
    cuts = sorted({s for s in starts if 0 < s < n})
    labels, segment, nxt = [], 0, 0
    for i in range(n):
        while nxt < len(cuts) and cuts[nxt] <= i:
            segment, nxt = segment + 1, nxt + 1
        labels.append(segment)
    return labels


def default_k(reference: Sequence[Hashable]) -> int:
    """Return half the mean reference segment length (in units), rounded, within [1, n - 1]."""
    n = len(reference)
    segments = sum(boundaries_of(reference)) + 1
    return max(1, min(n - 1, round(n / (2 * segments))))


def _check(reference: Sequence[Hashable], hypothesis: Sequence[Hashable], k: int | None) -> int:
    if len(reference) != len(hypothesis):
        raise ValueError(
            f"reference has {len(reference)} units but hypothesis has {len(hypothesis)}; "
            "both must label the same units"
        )
    if k is None:
        k = default_k(reference)
    if k < 1 or k >= len(reference):
        raise ValueError(f"window k={k} must lie in [1, {len(reference) - 1}] for "
                         f"{len(reference)} units")
    return k


def _window_counts(gaps: list[int], k: int) -> list[int]:
    """Return the number of boundaries in each window of ``k`` consecutive gaps."""
    count = sum(gaps[:k])
    counts = [count]
    for i in range(1, len(gaps) - k + 1):
        count += gaps[i + k - 1] - gaps[i - 1]
        counts.append(count)
    return counts


def _probes(
    reference: Sequence[Hashable], hypothesis: Sequence[Hashable], k: int | None
) -> tuple[list[int], list[int]]:
    """Return the boundary count in each probe window of the reference and the hypothesis."""
    k = _check(reference, hypothesis, k)
    return (_window_counts(boundaries_of(reference), k),
            _window_counts(boundaries_of(hypothesis), k))


def pk(
    reference: Sequence[Hashable], hypothesis: Sequence[Hashable], k: int | None = None
) -> float:
    """Return Pk: the share of probes ``k`` units apart where the segmentations disagree."""
    if len(reference) < 2 and len(reference) == len(hypothesis):
        return 0.0
    ref, hyp = _probes(reference, hypothesis, k)
    return sum((r > 0) != (h > 0) for r, h in zip(ref, hyp, strict=True)) / len(ref)


def windowdiff(
    reference: Sequence[Hashable], hypothesis: Sequence[Hashable], k: int | None = None
) -> float:
    """Return WindowDiff: the share of probes whose boundary counts differ."""
    if len(reference) < 2 and len(reference) == len(hypothesis):
        return 0.0
    ref, hyp = _probes(reference, hypothesis, k)
    return sum(r != h for r, h in zip(ref, hyp, strict=True)) / len(ref)
