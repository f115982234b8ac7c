"""From recognised words to cues and utterances, and the speaker labels we can honestly give.

A pause longer than ``pause`` seconds between two words ends an utterance. An utterance
that passes ``max_chars`` or ``max_seconds`` is cut in two where a cut reads best (a sentence
end, then a comma, then a gap between words, near the middle) until every cue fits. Two caption
lines of about 42 characters shown for up to about 7 seconds is common practice for subtitles
(a value from memory, not a standard).
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from ..model import Cue, Utterance
from .backend import Word

SENTENCE_END = (".", "?", "!", "…")


@dataclass(frozen=True)
class CueRules:
    """Where cues and utterances end."""

    pause: float = 0.8  # a longer gap between words ends the utterance
    max_chars: int = 84
    max_seconds: float = 7.0


def tidy(words: Iterable[Word]) -> list[Word]:
    """Return words in time order with non-decreasing, non-overlapping times."""
    out: list[Word] = []
    last_end = 0.0
    for w in sorted(words, key=lambda w: (w.start, w.end)):
        start = max(w.start, last_end)
        end = max(w.end, start)
        out.append(Word(start, end, w.text, w.probability))
        last_end = end
    return out


def group(words: Sequence[Word], rules: CueRules | None = None) -> list[list[list[Word]]]:
    """Return utterances, each a list of cues, each a list of words."""
    rules = rules or CueRules()
    runs: list[list[Word]] = []
    for w in words:
        if runs and w.start - runs[-1][-1].end <= rules.pause:
            runs[-1].append(w)
        else:
            runs.append([w])
    return [split(run, rules) for run in runs]


def _chars(words: Sequence[Word]) -> int:
    return sum(len(w.text) for w in words) + max(0, len(words) - 1)


def split(words: list[Word], rules: CueRules) -> list[list[Word]]:
    """Return ``words`` cut into cues that fit the rules, at the most natural places."""
    fits = (_chars(words) <= rules.max_chars
            and words[-1].end - words[0].start <= rules.max_seconds)
    if fits or len(words) < 2:
        return [words]
    total = _chars(words)
    best, best_cost = 1, float("inf")
    for i in range(1, len(words)):
        before = words[i - 1].text
        strength = 3.0 if before.endswith(SENTENCE_END) else (
            2.0 if before.endswith((",", ";", ":")) else 0.0)
        gap = min(2.0, 5.0 * (words[i].start - words[i - 1].end))
        balance = abs(_chars(words[:i]) / total - 0.5)  # 0 in the middle, 0.5 at an edge
        cost = 6.0 * balance - strength - gap
        if cost < best_cost:
            best, best_cost = i, cost
    return split(words[:best], rules) + split(words[best:], rules)


def build(words: Sequence[Word], rules: CueRules | None = None, speaker: str = "Speaker 1",
          turn_pause: float | None = None) -> tuple[Utterance, ...]:
    """Return utterances with cue ids "1", "2", ... in order.

    With ``turn_pause`` set, an utterance that follows a silence of at least that long is taken
    to be the other of two speakers: a guess that fits interviews, not meetings.
    """
    utterances: list[Utterance] = []
    cue_id = 0
    labels = ("Speaker 1", "Speaker 2")
    current = 0
    prev_end: float | None = None
    for groups in group(words, rules):
        cues = []
        for ws in groups:
            cue_id += 1
            cues.append(Cue(id=str(cue_id), start=round(ws[0].start, 3),
                            end=round(ws[-1].end, 3), text=" ".join(w.text for w in ws)))
        if turn_pause is not None:
            if prev_end is not None and cues[0].start - prev_end >= turn_pause:
                current = 1 - current
            label = labels[current]
        else:
            label = speaker
        prev_end = cues[-1].end
        utterances.append(Utterance(index=len(utterances), start=cues[0].start,
                                    end=cues[-1].end, speaker=label,
                                    text=" ".join(c.text for c in cues), cues=tuple(cues),
                                    label=label))
    return tuple(utterances)
