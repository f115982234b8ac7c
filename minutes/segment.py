"""Topic segmentation: cut a transcript into parts a reader (and one relay step) can hold.

Boundaries come from lexical cohesion, after TextTiling (Hearst 1997): at every
gap between utterances, compare the content words said in the ``window``
seconds before it with those said after it (lemmas from the shared spaCy parse,
fillers and stop words removed, IDF-weighted over 1-minute blocks so words heard
all meeting long count for little). A share (``speaker_weight``) of the curve
compares who was speaking before and after, since meetings often move on with a
new presenter. The curve is smoothed and every valley scored by its depth (the
rise to the highest point within ``window`` on each side). Valleys deeper than
``mean + granularity * std`` become boundaries, deepest first, each kept only
if it leaves ``min_duration`` on both sides, then snapped to the best gap within
``snap`` seconds: a long pause or a change of speaker. Parts over
``max_duration`` or ``max_words`` are split into the fewest parts that fit, at
the weakest cohesion points (dynamic programming over the gaps).

With an agenda, the cut is finer and the parts are aligned to the items by
content and order (a monotone alignment by dynamic programming); neighbours on
one item are joined and titled by it, and ``not_discussed`` lists items no part
matched. Otherwise a title is built from the segment's most distinctive noun
phrases (TF-IDF over segments), e.g. "Warehouse lease and moving date".
"""

from __future__ import annotations

import math
import re
from collections import Counter
from collections.abc import Callable, Collection, Sequence
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

import numpy as np

from .errors import UsageError
from .model import AgendaItem, Segment, Transcript, Utterance
from .nlp import FILLERS, Parsed, content_lemmas

if TYPE_CHECKING:
    from spacy.tokens import Doc, Span


@dataclass(frozen=True)
class SegmentOptions:
    """How finely to cut, and the bounds every segment must respect."""

    # Shortest topic worth a heading, in seconds. Boundaries closer than this to each other
    # or to either end of the meeting are dropped (the budget splits below may still cut
    # shorter, since the budget always wins).
    min_duration: float = 120.0
    # Longest segment, in seconds; longer ones are split at their weakest cohesion point.
    max_duration: float = 1200.0
    # The relay's budget: no segment has more words than this (split as above).
    max_words: int = 2500
    # Target granularity: a valley of the cohesion curve becomes a boundary when its depth
    # exceeds mean + granularity * std of all valley depths. Lower cuts more finely; 0 keeps
    # every valley deeper than average (Hearst's cutoffs are mean - std and mean - std / 2,
    # far finer than meeting topics need).
    granularity: float = 1.5
    # Seconds of talk compared on each side of a gap (TextTiling's block size, in time).
    window: float = 200.0
    # Half-width of the moving average applied to the cohesion curve, in seconds.
    smoothing: float = 20.0
    # Share of the cohesion curve given to who is speaking (0: words only). Meetings move
    # from one presenter or group of speakers to the next at many agenda items.
    speaker_weight: float = 0.3
    # A boundary may move this many seconds to reach a long pause or a change of speaker.
    snap: float = 15.0

    def __post_init__(self) -> None:
        if self.min_duration < 0 or self.max_duration <= 0:
            raise UsageError("segment durations must be positive: "
                             f"min_duration={self.min_duration}, max_duration={self.max_duration}")
        if self.min_duration > self.max_duration:
            raise UsageError(f"min_duration ({self.min_duration:g} s) is longer than "
                             f"max_duration ({self.max_duration:g} s); lower it or raise the max")
        if self.max_words < 1 or self.window <= 0 or self.smoothing < 0 or self.snap < 0:
            raise UsageError("max_words must be 1 or more, window positive, smoothing and snap "
                             "0 or more")
        if not 0 <= self.speaker_weight <= 1:
            raise UsageError(f"speaker_weight must lie in [0, 1], not {self.speaker_weight}")


# --------------------------------------------------------------------------- public


def segment(
    transcript: Transcript, parsed: Parsed, options: SegmentOptions = SegmentOptions()
) -> tuple[Segment, ...]:
    """Return segments that cover every utterance once, in order, titled and with keywords."""
    utterances = transcript.utterances
    if len(parsed) != len(utterances):
        raise UsageError(f"the parse has {len(parsed)} documents for {len(utterances)} "
                         "utterances; parse the transcript's own utterances")
    if not utterances:
        return ()
    lemmas = [content_lemmas(doc) for doc in parsed.docs]
    gaps = cohesion(utterances, lemmas, options)
    agenda = transcript.meeting.agenda
    if agenda:
        groups = _agenda_groups(utterances, gaps, lemmas, agenda, options)
    else:
        groups = [(start, None) for start in _boundaries(utterances, gaps, options)]
    starts = _within_budget(utterances, gaps, [g for g, _ in groups], options)
    segments = [
        _make(n, utterances, a, b - 1) for n, (a, b) in
        enumerate(zip(starts, starts[1:] + [len(utterances)], strict=True))
    ]
    phrases = [_phrases(parsed.docs[s.first : s.last + 1]) for s in segments]
    headings = _headings(phrases)
    out = []
    seen: Counter[int] = Counter()
    g = 0
    for seg, (title, keywords) in zip(segments, headings, strict=True):
        while g + 1 < len(groups) and groups[g + 1][0] <= seg.first:
            g += 1
        item = groups[g][1]  # budget splits keep the item of the part they split
        if item is not None:
            seen[item] += 1
            title = agenda[item].title + (" (continued)" if seen[item] > 1 else "")
        out.append(Segment(seg.index, seg.first, seg.last, seg.start, seg.end, seg.utterances,
                           title=title, keywords=keywords, agenda_item=item))
    return tuple(out)


# An agenda says how many topics to expect: cut finely, align the small parts to the items,
# then join neighbours that discuss the same item.
AGENDA_GRANULARITY = -0.5
AGENDA_MIN_DURATION = 45.0
# Cohesion boundaries this close (seconds) to a spoken transition give way to it.
CUE_CLEARANCE = 30.0
# Added to the match of a part that opens with a spoken move to the item ("Item four").
CUE_BONUS = 1.0


def _agenda_groups(utterances: Sequence[Utterance], gaps: Gaps, lemmas: Sequence[Sequence[str]],
                   agenda: Sequence[AgendaItem], options: SegmentOptions
                   ) -> list[tuple[int, int | None]]:
    """Return (first utterance, agenda item or None) of each part of an agenda meeting."""
    fine = replace(options, granularity=min(options.granularity, AGENDA_GRANULARITY),
                   min_duration=min(options.min_duration, AGENDA_MIN_DURATION))
    starts = _boundaries(utterances, gaps, fine)
    cues, deferred = transitions(utterances, agenda)
    opened = {c.utterance: c.item for c in cues}
    if opened:
        # a spoken move to an item is a surer boundary than a cohesion valley beside it
        starts = sorted({0, *opened} | {s for s in starts if all(
            abs(utterances[s].start - utterances[c].start) >= CUE_CLEARANCE for c in opened)})
    parts = [_make(n, utterances, a, b - 1) for n, (a, b) in
             enumerate(zip(starts, starts[1:] + [len(utterances)], strict=True))]
    items = align(parts, lemmas, agenda, opened=[opened.get(p.first) for p in parts],
                  deferred=deferred)
    groups: list[tuple[int, int | None]] = []
    for start, item in zip(starts, items, strict=True):
        if groups and (item is None or item == groups[-1][1]):
            continue  # talk that matches no item stays with the item before it
        if groups and groups[-1][1] is None and len(groups) == 1 and \
                utterances[start].start - utterances[0].start < options.min_duration:
            groups[-1] = (0, item)  # a short opening belongs to the first item
            continue
        groups.append((start, item))
    if len(groups) > 1 and groups[0][1] is None and 0 not in items and 0 not in deferred:
        # Meetings open with their first item (roll call, last week's actions), often in
        # words too common to score: a long opening that uses its title takes it.
        opening = {w for u in utterances[: groups[1][0]] for w in _words(u.text)}
        if set(_words(agenda[0].title)) & opening:
            groups[0] = (0, 0)
    return groups


def not_discussed(segments: Sequence[Segment], agenda: Sequence[AgendaItem]) -> tuple[str, ...]:
    """Return the titles of agenda items that no segment was aligned to, in agenda order."""
    matched = {s.agenda_item for s in segments}
    return tuple(item.title for i, item in enumerate(agenda) if i not in matched)


# --------------------------------------------------------------------------- cohesion


@dataclass(frozen=True)
class Gaps:
    """Cohesion across each gap: index ``i`` is the gap before utterance ``i + 1``."""

    score: np.ndarray  # smoothed cohesion, in standard deviations (low: the talk moves on)
    depth: np.ndarray  # depth of the valley at the gap (0 where it is not a valley)


def cohesion(
    utterances: Sequence[Utterance], lemmas: Sequence[Sequence[str]], options: SegmentOptions
) -> Gaps:
    """Return the smoothed cohesion and valley depth at every gap between utterances."""
    n = len(utterances)
    if n < 2:
        return Gaps(np.zeros(0), np.zeros(0))
    starts = np.array([u.start for u in utterances])
    times = starts[1:]
    lexical = _lexical(starts, lemmas, options.window)
    curve = _z(lexical)
    if options.speaker_weight > 0:
        speakers = _speakers(utterances, starts, options.window)
        curve = (1 - options.speaker_weight) * curve + options.speaker_weight * _z(speakers)
    smooth = _moving_average(times, curve, options.smoothing)
    return Gaps(smooth, _depths(times, smooth, options.window))


def _lexical(starts: np.ndarray, lemmas: Sequence[Sequence[str]], window: float) -> np.ndarray:
    """Return the cosine of the content words said in ``window`` seconds before each gap
    against those said in the ``window`` seconds after it (IDF-weighted over 1-minute blocks,
    so words heard all meeting long count for little)."""
    vocab: dict[str, int] = {}
    ids = np.fromiter((vocab.setdefault(w, len(vocab)) for ws in lemmas for w in ws),
                      dtype=np.int64)
    when = np.repeat(starts, [len(ws) for ws in lemmas])  # time of every content word
    size = len(vocab)
    out = np.zeros(len(starts) - 1)
    if size == 0:
        return out
    block = ((when - starts[0]) // 60).astype(np.int64)
    blocks = int(block[-1]) + 1
    df = np.bincount(np.unique(block * size + ids) % size, minlength=size)
    weight = np.log((blocks + 1) / (df + 0.5))
    lo = np.searchsorted(when, starts[1:] - window, side="left")
    mid = np.searchsorted(when, starts[1:], side="left")
    hi = np.searchsorted(when, starts[1:] + window, side="left")
    last = (-1, -1, -1)
    for g in range(len(out)):
        span = (lo[g], mid[g], hi[g])
        if span == last:  # utterances without content words leave the windows unchanged
            out[g] = out[g - 1]
            continue
        last = span
        a = np.bincount(ids[lo[g] : mid[g]], minlength=size) * weight
        b = np.bincount(ids[mid[g] : hi[g]], minlength=size) * weight
        norm = math.sqrt(float(a @ a) * float(b @ b))
        out[g] = float(a @ b) / norm if norm else 0.0
    return out


def _speakers(utterances: Sequence[Utterance], starts: np.ndarray, window: float) -> np.ndarray:
    """Return the cosine of who spoke (words per speaker) before each gap against after it:
    a new presenter, or a new set of people talking, often opens a new item."""
    index: dict[str, int] = {}
    words = np.zeros((len(utterances), len({u.speaker for u in utterances})))
    for i, u in enumerate(utterances):
        words[i, index.setdefault(u.speaker, len(index))] = len(u.text.split())
    csum = np.vstack([np.zeros(words.shape[1]), np.cumsum(words, axis=0)])
    gaps = np.arange(1, len(utterances))
    lo = np.searchsorted(starts, starts[1:] - window, side="left")
    hi = np.searchsorted(starts, starts[1:] + window, side="left")
    a = csum[gaps] - csum[lo]
    b = csum[hi] - csum[gaps]
    norm = np.sqrt((a * a).sum(axis=1) * (b * b).sum(axis=1))
    dot = (a * b).sum(axis=1)
    return np.divide(dot, norm, out=np.ones_like(dot), where=norm > 0)


def _z(values: np.ndarray) -> np.ndarray:
    std = values.std()
    return (values - values.mean()) / std if std > 0 else values - values.mean()


def _moving_average(times: np.ndarray, values: np.ndarray, half: float) -> np.ndarray:
    """Return each value averaged with those within ``half`` seconds of it."""
    if half <= 0:
        return values.copy()
    csum = np.concatenate([[0.0], np.cumsum(values)])
    lo = np.searchsorted(times, times - half, side="left")
    hi = np.searchsorted(times, times + half, side="right")
    return (csum[hi] - csum[lo]) / (hi - lo)


def _depths(times: np.ndarray, score: np.ndarray, reach: float) -> np.ndarray:
    """Return the depth of each local minimum: the rise to the highest score within ``reach``
    seconds on the left plus that on the right (Hearst's depth score); 0 elsewhere."""
    m = len(score)
    depth = np.zeros(m)
    if m < 3:
        return depth
    lo = np.searchsorted(times, times - reach, side="left")
    hi = np.searchsorted(times, times + reach, side="right")
    prev = np.concatenate([[np.inf], score[:-1]])
    nxt = np.concatenate([score[1:], [np.inf]])
    for j in np.flatnonzero((score <= prev) & (score < nxt)):
        depth[j] = (score[lo[j] : j + 1].max() - score[j]) + (score[j : hi[j]].max() - score[j])
    return depth


# --------------------------------------------------------------------------- boundaries


def _boundaries(utterances: Sequence[Utterance], gaps: Gaps, options: SegmentOptions) -> list[int]:
    """Return the first utterance of every segment: deep valleys, spaced, snapped to turns."""
    depth = gaps.depth
    valleys = np.flatnonzero(depth > 0)
    if len(valleys) == 0:
        return [0]
    cut = depth[valleys].mean() + options.granularity * depth[valleys].std()
    begin, end = utterances[0].start, utterances[-1].end
    chosen: list[int] = []
    for g in sorted(valleys[depth[valleys] > cut], key=lambda g: -depth[g]):
        i = _snap(utterances, gaps, int(g) + 1, options.snap)
        t = utterances[i].start
        if t - begin < options.min_duration or end - t < options.min_duration:
            continue
        if all(abs(t - utterances[c].start) >= options.min_duration for c in chosen):
            chosen.append(i)
    return [0] + sorted(chosen)


def _snap(utterances: Sequence[Utterance], gaps: Gaps, i: int, reach: float) -> int:
    """Return the utterance near ``i`` (within ``reach`` seconds) that best opens a topic.

    A long pause before it and a change of speaker both mark a turn in the talk; the
    cohesion score breaks ties so the boundary stays near the lexical valley.
    """
    t = utterances[i].start
    best, best_score = i, -math.inf
    j = i
    while j > 1 and t - utterances[j - 1].start <= reach:
        j -= 1
    while j < len(utterances) and utterances[j].start - t <= reach:
        prev = utterances[j - 1]
        pause = max(0.0, utterances[j].start - prev.end)
        score = (min(pause, 5.0) + (1.0 if prev.speaker != utterances[j].speaker else 0.0)
                 - gaps.score[j - 1] - 0.02 * abs(utterances[j].start - t))
        if score > best_score:
            best, best_score = j, score
        j += 1
    return best


def _within_budget(
    utterances: Sequence[Utterance], gaps: Gaps, starts: list[int], options: SegmentOptions
) -> list[int]:
    """Return ``starts`` with every segment over the duration or word budget split into as
    few parts as fit, at the weakest cohesion points."""
    words = np.concatenate([[0], np.cumsum([len(u.text.split()) for u in utterances])])
    begin = np.array([u.start for u in utterances])
    finish = np.maximum.accumulate(np.array([u.end for u in utterances]))
    # what a cut before utterance i costs: high cohesion is dear, a long pause is cheap
    pause = np.concatenate([[0.0], np.clip(begin[1:] - finish[:-1], 0.0, 5.0)])
    cost = np.concatenate([[0.0], gaps.score]) - 0.2 * pause
    out: list[int] = []
    for a, b in zip(starts, starts[1:] + [len(utterances)], strict=True):
        out += _split(a, b, words, begin, finish, cost, options)
    return out


def _split(a: int, b: int, words: np.ndarray, begin: np.ndarray, finish: np.ndarray,
           cost: np.ndarray, options: SegmentOptions) -> list[int]:
    """Return the starts of the fewest parts of utterances [a, b) that each fit the budget,
    choosing the cuts of least total cost (dynamic programming over the gaps)."""
    def fits(i: int, j: int) -> bool:  # part [i, j)
        return (words[j] - words[i] <= options.max_words
                and finish[j - 1] - begin[i] <= options.max_duration) or j - i == 1

    if fits(a, b):
        return [a]
    n = b - a
    # lo[j]: the earliest start i from which [i, j) still fits (parts only grow leftwards)
    lo = np.empty(n + 1, dtype=np.int64)
    i = 0
    for j in range(1, n + 1):
        while not fits(a + i, a + j):
            i += 1
        lo[j] = i
    best = np.full(n + 1, np.inf)
    best[0] = 0.0
    parts = np.zeros(n + 1, dtype=np.int64)
    back = np.zeros(n + 1, dtype=np.int64)
    for j in range(1, n + 1):
        # fewest parts first, then no part under min_duration, then least cost
        prior = np.arange(lo[j], j)
        short = finish[a + j - 1] - begin[a + prior] < options.min_duration
        window = best[lo[j] : j] + 1e6 * parts[lo[j] : j] + 1e3 * short
        k = int(np.argmin(window)) + int(lo[j])
        back[j] = k
        parts[j] = parts[k] + 1
        best[j] = best[k] + (cost[a + j] if j < n else 0.0)
    cuts = []
    j = n
    while j > 0:
        j = int(back[j])
        cuts.append(a + j)
    return sorted(cuts)


def _make(index: int, utterances: Sequence[Utterance], first: int, last: int) -> Segment:
    part = tuple(utterances[first : last + 1])
    return Segment(index, first, last, part[0].start, max(u.end for u in part), part)


# --------------------------------------------------------------------------- titles


LEADING_JUNK = frozenset({"DET", "PRON", "CCONJ", "ADP", "PART", "INTJ", "PUNCT", "SCONJ", "AUX",
                          "NUM", "SPACE", "X"})

Phrase = tuple[str, ...]  # a noun phrase as its lower-case lemmas


@dataclass
class _Phrases:
    """Noun phrases of one segment: how often each was said, and how it was said."""

    counts: Counter[Phrase]
    surface: dict[Phrase, Counter[str]]

    def text(self, key: Phrase) -> str:
        return self.surface[key].most_common(1)[0][0]


def _phrases(docs: Sequence[Doc]) -> _Phrases:
    """Return the noun phrases of ``docs``, stripped of determiners and fillers, counted."""
    found = _Phrases(Counter(), {})
    for doc in docs:
        for chunk in doc.noun_chunks:
            key, text = _phrase(chunk)
            if key:
                found.counts[key] += 1
                found.surface.setdefault(key, Counter())[text] += 1
    return found


def _phrase(chunk: Span) -> tuple[Phrase, str]:
    tokens = list(chunk)
    while tokens and (tokens[0].pos_ in LEADING_JUNK or tokens[0].is_stop
                      or tokens[0].lower_ in FILLERS):
        tokens.pop(0)
    while tokens and (tokens[-1].pos_ not in ("NOUN", "PROPN") or tokens[-1].lower_ in FILLERS):
        tokens.pop()
    if not tokens or len(tokens) > 4:
        return (), ""
    if any(not t.is_alpha and "-" not in t.text for t in tokens):
        return (), ""
    if all(t.is_stop or t.lower_ in FILLERS or len(t.text) < 3 for t in tokens):
        return (), ""
    key = tuple(t.lemma_.lower() for t in tokens)
    # keep the speaker's spacing ("high-pass", not "high - pass"); proper nouns keep their case
    text = "".join((t.text if t.pos_ == "PROPN" else t.text.lower()) + t.whitespace_
                   for t in tokens).strip()
    return key, text


def _headings(phrases: Sequence[_Phrases]) -> list[tuple[str, tuple[str, ...]]]:
    """Return (title, keywords) per segment from its phrases ranked by TF-IDF over segments."""
    n = len(phrases)
    df: Counter[Phrase] = Counter()
    word_df: Counter[str] = Counter()
    for found in phrases:
        df.update(found.counts.keys())
        word_df.update({w for key in found.counts for w in key})

    def idf(d: int) -> float:
        return math.log((n + 1) / (d + 0.5)) + 0.1

    out = []
    for found in phrases:
        word_tf: Counter[str] = Counter()
        for key, c in found.counts.items():
            for w in key:
                word_tf[w] += c
        scores = {key: _score(key, c, df, word_tf, word_df, idf) for key, c in found.counts.items()}
        picked: list[Phrase] = []
        used: set[str] = set()
        for key in sorted(scores, key=lambda k: (-scores[k], k)):
            if not set(key) & used:
                picked.append(key)
                used |= set(key)
            if len(picked) == 5:
                break
        keywords = tuple(found.text(k) for k in picked)
        out.append((_title(keywords, [scores[k] for k in picked]), keywords))
    return out


def _score(key: Phrase, count: int, df: Counter[Phrase], word_tf: Counter[str],
           word_df: Counter[str], idf: Callable[[int], float]) -> float:
    """Return a phrase's weight in its segment: its own TF-IDF plus that of its words (so
    "lease" lifts "warehouse lease"); longer phrases read better as headings."""
    words = sum(word_tf[w] * idf(word_df[w]) for w in key) / len(key)
    return (count * idf(df[key]) + 0.5 * words) * (1 + 0.25 * (len(key) - 1))


def _title(keywords: Sequence[str], scores: Sequence[float]) -> str:
    """Return a heading: the top phrase, joined by the second when it is nearly as strong."""
    if not keywords:
        return ""
    title = keywords[0]
    if len(keywords) > 1 and scores[1] >= 0.5 * scores[0]:
        both = f"{title} and {keywords[1]}"
        if len(both.split()) <= 7:
            title = both
    return title[0].upper() + title[1:]


# --------------------------------------------------------------------------- agenda


def align(
    segments: Sequence[Segment], lemmas: Sequence[Sequence[str]], agenda: Sequence[AgendaItem],
    opened: Sequence[int | None] = (), deferred: Collection[int] = frozenset(),
) -> list[int | None]:
    """Return, per segment, the agenda item it discusses (or None), keeping agenda order.

    ``opened[s]`` is the item segment ``s`` opens aloud, if any (see ``transitions``); items
    in ``deferred`` were announced and put off, so no segment takes them.
    """
    from .nlp import load

    nlp = load()
    seg_tf = [Counter(w for i in range(s.first, s.last + 1) for w in lemmas[i]) for s in segments]
    n = len(segments)
    df: Counter[str] = Counter()
    for tf in seg_tf:
        df.update(tf.keys())
    items = [set(content_lemmas(doc)) for doc in
             nlp.pipe(f"{item.title}. {item.notes}" for item in agenda)]

    def idf(w: str) -> float:
        return math.log((n + 1) / (df[w] + 0.5))

    score = np.zeros((n, len(agenda)))
    for s, tf in enumerate(seg_tf):
        total = sum(tf.values()) or 1
        for j, words in enumerate(items):
            if not words:
                continue
            # share of the item's (weighted) words the segment uses, scaled by how much
            # of the segment's talk they make up: a passing mention scores low
            hits = [w for w in words if tf[w]]
            cover = sum(idf(w) for w in hits) / sum(idf(w) for w in words)
            density = sum(tf[w] for w in hits) / total
            score[s, j] = cover * math.sqrt(density)
    cued = [(s, j) for s, j in enumerate(opened) if j is not None]
    for s, j in cued:
        score[s, j] += CUE_BONUS
    # between two spoken moves, talk belongs to the item opened first or to one between
    # them that was never announced: [previous cue's item, next cue's item)
    bounds = [(-1, 0)] + cued + [(n, len(agenda))]
    for (a, lo), (b, hi) in zip(bounds, bounds[1:], strict=False):
        score[a + 1 : b, :lo] = 0.0
        score[a + 1 : b, hi:] = 0.0
    for j in deferred:
        score[:, j] = 0.0
    return _monotone(score, threshold=0.05)


def _monotone(score: np.ndarray, threshold: float) -> list[int | None]:
    """Return the best order-keeping assignment of rows to columns (or None), by DP.

    Row ``s`` may take column ``j`` only if every earlier assigned row took a column <= j
    (several rows may share a column: a long item can span segments). Taking earns
    ``score - threshold``; leaving a row unassigned earns 0.
    """
    n, m = score.shape
    gain = score - threshold
    left, skip, take = 0, 1, 2
    # best[s, j]: best total over rows < s with every assigned column <= j
    best = np.zeros((n + 1, m))
    how = np.zeros((n, m), dtype=np.int8)
    for s in range(n):
        for j in range(m):
            value, choice = best[s, j], skip
            if best[s, j] + gain[s, j] > value:
                value, choice = best[s, j] + gain[s, j], take
            if j and best[s + 1, j - 1] > value:
                value, choice = best[s + 1, j - 1], left
            best[s + 1, j] = value
            how[s, j] = choice
    out: list[int | None] = [None] * n
    s, j = n - 1, m - 1
    while s >= 0:
        if how[s, j] == left:
            j -= 1
            continue
        if how[s, j] == take:
            out[s] = j
        s -= 1
    return out


# --------------------------------------------------------------------------- spoken transitions


@dataclass(frozen=True)
class AgendaCue:
    """A point where someone opens an agenda item aloud ("Item four, the director's report")."""

    utterance: int
    item: int
    explicit: bool  # the item's number was said, not only its title words


# Said right before an item's title when the chair moves the meeting on (common practice).
TRANSITION_PHRASES = ("next item", "next on the agenda", "next is", "next thing", "moving on",
                      "move on to", "brings us to", "turn to", "last thing on the agenda",
                      "last item", "we also have", "now to", "on to the")
# Said of an item that is announced but put off; the item is then not taken up.
DEFERRAL_PHRASES = ("carry it over", "carried over", "carry that over", "postpone", "defer",
                    "next month", "not taken up", "skip", "held over", "hold it over",
                    "table it", "tabled")
# Words an utterance may open with before the title of the item it moves on to.
OPENERS = frozenset("okay ok right alright all so now next then um uh well".split())
NUMBER_WORDS = {w: str(n) for n, w in enumerate(
    "zero one two three four five six seven eight nine ten eleven twelve thirteen fourteen "
    "fifteen sixteen seventeen eighteen nineteen twenty".split())}
_WORD = re.compile(r"[a-z][a-z'-]*|\d+")
_ITEM = re.compile(r"\bitem (?:number )?([a-z]+|\d+)(?:[ -]?([a-h])\b)?")


def _stem(word: str) -> str:
    """Return a crude stem, so "opening", "openings" and "open" meet (lemmas disagree)."""
    word = word.removesuffix("'s").removesuffix("s'")
    for suffix, repl in (("ies", "y"), ("ing", ""), ("s", "")):
        if word.endswith(suffix) and len(word) - len(suffix) >= 4:
            return word[: len(word) - len(suffix)] + repl
    return word


def _words(text: str) -> list[str]:
    """Return the stems of the content words of ``text`` (stop words and fillers dropped)."""
    from spacy.lang.en.stop_words import STOP_WORDS

    return [_stem(w) for w in _WORD.findall(text.lower())
            if w not in STOP_WORDS and w not in FILLERS and len(w) > 2]


def _title_words(utterances: Sequence[Utterance], agenda: Sequence[AgendaItem]
                 ) -> tuple[list[set[str]], list[set[str]]]:
    """Return, per item, the words of its title on no other item's title, and those of them
    said in few utterances of this meeting (words heard all along mark nothing alone)."""
    titles = [set(_words(item.title)) for item in agenda]
    shared = Counter(w for words in titles for w in words)
    own = [{w for w in words if shared[w] == 1} for words in titles]
    df = Counter(w for u in utterances for w in set(_words(u.text)))
    most = max(3, int(0.08 * len(utterances)))
    return own, [{w for w in words if 0 < df[w] <= most} for words in own]


def transitions(utterances: Sequence[Utterance], agenda: Sequence[AgendaItem]
                ) -> tuple[list[AgendaCue], set[int]]:
    """Return the spoken openings of agenda items, in order, and the items announced only to
    be put off ("Item nine ... we'll carry it over to next month")."""
    numbers = {item.number.lower().replace(" ", ""): j for j, item in enumerate(agenda)
               if item.number}
    own, distinct = _title_words(utterances, agenda)
    found: list[AgendaCue] = []
    deferred: set[int] = set()
    for i, u in enumerate(utterances):
        text = u.text.lower()
        mentions: list[tuple[int, int, bool]] = []  # (position, item, explicit)
        for m in _ITEM.finditer(text):
            key = NUMBER_WORDS.get(m.group(1), m.group(1)) + (m.group(2) or "")
            if key not in numbers and m.group(2):
                key = key[:-1]  # "item nine a": the letter was the next word, not a part
            if key in numbers:
                mentions.append((m.start(), numbers[key], True))
        for phrase in TRANSITION_PHRASES:
            at = text.find(phrase)
            if at >= 0:
                # after "that brings us to" any word of the title names the item
                j = _named(_words(text[at + len(phrase) : at + len(phrase) + 80]), own)
                if j is not None:
                    mentions.append((at, j, False))
        words = _WORD.findall(text)
        if words and words[0] in OPENERS:
            # "Okay. Opening day.": only a rare title word right at the start names the item
            j = _named(_words(text)[:3], distinct)
            if j is not None:
                mentions.append((0, j, False))
        said = set(_words(text))
        named = {j for j, title in enumerate(distinct) if title & said}
        if len(named) > 2 and all(at == 0 and not explicit for at, _, explicit in mentions):
            continue  # a run-through of the agenda or a read-back, not a move to one item
        mentions.sort()
        opened = None
        for n, (at, j, explicit) in enumerate(mentions):
            end = mentions[n + 1][0] if n + 1 < len(mentions) else len(text)
            if any(p in text[at:end] for p in DEFERRAL_PHRASES):
                deferred.add(j)
            else:
                opened = (j, explicit)
        if opened is not None:
            found.append(AgendaCue(i, *opened))
    return _in_order(found, deferred), deferred


def _named(words: Sequence[str], titles: Sequence[set[str]]) -> int | None:
    """Return the item whose title has the first of ``words`` that one title has (or None)."""
    for w in words:
        items = [j for j, title in enumerate(titles) if w in title]
        if len(items) == 1:
            return items[0]
    return None


def _in_order(cues: Sequence[AgendaCue], deferred: set[int]) -> list[AgendaCue]:
    """Return the heaviest chain of cues whose items rise (a said number weighs double), so
    an aside ("it's item eight D, we'll get there") does not reorder the meeting."""
    cues = [c for c in cues if c.item not in deferred]
    if not cues:
        return []
    weight = [2.0 if c.explicit else 1.0 for c in cues]
    best = weight[:]
    back = [-1] * len(cues)
    for k in range(len(cues)):
        for p in range(k):
            if cues[p].item < cues[k].item and best[p] + weight[k] > best[k]:
                best[k], back[k] = best[p] + weight[k], p
    k = int(np.argmax(best))
    chain = []
    while k >= 0:
        chain.append(cues[k])
        k = back[k]
    return chain[::-1]
