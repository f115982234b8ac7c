"""Merging caption cues into utterances: one speaker's consecutive cues become one turn."""

from __future__ import annotations

from collections.abc import Sequence

from ..model import Cue, Utterance

# Captions cut a speaker's sentence into cues of a few seconds; a silence of more than
# about two seconds usually means a new thought or a new turn (common practice, value
# from memory), so it ends the utterance even when the speaker stays the same.
MAX_GAP = 2.0
# A monologue is still cut into utterances of at most a minute, so evidence stays precise
# and the segmenter can place a topic boundary inside a long report.
MAX_DURATION = 60.0

_SENTENCE_END = (".", "?", "!", "…", ":", ";", "\u3002", "\uff1f", "\uff01")


def merge_cues(cues: Sequence[tuple[str, Cue]], *, max_gap: float = MAX_GAP,
               max_duration: float = MAX_DURATION) -> tuple[Utterance, ...]:
    """Return utterances, indexed 0..n-1, from (speaker label, cue) pairs in time order."""
    # Sorted by start, stably: overlapping and out-of-order cues (AMI's speakers overlap)
    # come out in the order they were spoken, ties in the order of the file.
    ordered = sorted(cues, key=lambda pair: pair[1].start)
    groups: list[tuple[str, list[Cue], float]] = []  # (label, cues, end)
    for label, cue in ordered:
        if groups:
            last_label, last_cues, last_end = groups[-1]
            if (label == last_label
                    and cue.start - last_end <= max_gap
                    and max(cue.end, last_end) - last_cues[0].start <= max_duration
                    and (label or _unfinished(last_cues[-1].text))):
                last_cues.append(cue)
                groups[-1] = (last_label, last_cues, max(last_end, cue.end))
                continue
        groups.append((label, [cue], cue.end))
    return tuple(
        Utterance(index=i, start=cs[0].start, end=end, speaker=label,
                  text=" ".join(c.text for c in cs), cues=tuple(cs), label=label)
        for i, (label, cs, end) in enumerate(groups)
    )


def _unfinished(text: str) -> bool:
    # Cues with no speaker label may come from different people: join them only to
    # finish a sentence that a cue boundary cut, never across a sentence end.
    return not text.rstrip().endswith(_SENTENCE_END)
