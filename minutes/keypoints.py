"""Key points per segment and the meeting summary: extractive, in the speakers' own words.

A key point is one sentence somebody said, chosen because it is central to its
segment: its content words (lemmas from the shared parse, TF-IDF weighted over
the meeting's utterances) lie close to the segment's centroid. Selection uses
maximal marginal relevance (Carbonell & Goldstein 1998) so that two points do
not say the same thing. Back-channels and very short sentences never qualify.
Chosen sentences are cleaned of fillers, stutters and false starts (``clean``);
nothing else about the speaker's words changes.
"""

from __future__ import annotations

import math
import re
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass

from .model import Point, Segment
from .nlp import Parsed, content_lemmas


def _wordset(text: str) -> frozenset[str]:
    return frozenset(text.split())


# Filled pauses and back-channel noises: never part of what was meant.
FILLED_PAUSES = _wordset("um umm uhm uh uhh er erm ah ahh eh hm hmm hmmm mm mmm mhm mm-hmm uh-huh")
MIN_WORDS = 6  # a shorter sentence is a back-channel or a fragment (common practice)
MIN_CONTENT = 3  # content words a point needs to say something
RELEVANCE = 0.7  # MMR: weight of centrality against novelty

_WORD = re.compile(r"\S+")
# Short words that are words in their own right, so never taken for a cut-off start of the
# next word ("a an", "on one" and "so some" can be meant).
SHORT_WORDS = _wordset("""
    a an i in on at to so no go do be we he me my it is as us or of up by if the and but for
    you are our not can one two all any has had her his how its let may now old out own say
    see she too use way who why yes yet get got did man men new off per put ten try few far
    """)


def clean(text: str) -> str:
    """Return ``text`` without fillers, stutters ("the the", "I- I") and cut-off words."""
    words = _WORD.findall(text)
    out: list[str] = []
    for n, word in enumerate(words):
        core = _core(word)
        if core in FILLED_PAUSES:
            _move_punctuation(out, word)
            continue
        nxt = _core(words[n + 1]) if n + 1 < len(words) else ""
        # a false start: a word cut off with a hyphen ("wh-", "I-") before another word
        if word.endswith("-") and len(word) > 1 and nxt:
            continue
        # ... or a cut-off start repeated whole ("pro prosodic", "M my", "wha - what")
        if (core and nxt and len(core) < len(nxt) and nxt.startswith(core)
                and core not in SHORT_WORDS and word[-1:].isalpha()):
            continue
        if word == "-" and out and nxt and len(_core(out[-1])) >= 2 \
                and nxt.startswith(_core(out[-1])[:2]) and len(_core(out[-1])) < len(nxt):
            out.pop()
            continue
        out.append(word)
    out = _drop_repeats(out)
    result = " ".join(out)
    result = re.sub(r"\s+([,.;:?!])", r"\1", result)
    result = re.sub(r"([,;:])(?:\s*[,;:])+", r"\1", result)
    result = re.sub(r"^[\s,;:.-]+", "", result).strip()
    if result and result[0].islower():
        result = result[0].upper() + result[1:]
    return result


def _core(word: str) -> str:
    return word.strip(".,;:?!\"'()[]").lower()


def _move_punctuation(out: list[str], dropped: str) -> None:
    """Keep sentence-final punctuation of a dropped filler on the word before it."""
    end = dropped[len(dropped.rstrip(".?!")):]
    if end and out and out[-1][-1:] not in ".?!":
        out[-1] = out[-1].rstrip(",;:") + end
    elif dropped.endswith(",") and out and out[-1].endswith(","):
        out[-1] = out[-1][:-1]  # "should, um, go": the commas only fenced the filler


def _drop_repeats(words: list[str]) -> list[str]:
    """Return ``words`` with a word or phrase (up to 3 words) said twice in a row said once."""
    out: list[str] = []
    for word in words:
        out.append(word)
        for size in (1, 2, 3):
            if len(out) < 2 * size:
                continue
            first = [_core(w) for w in out[-2 * size : -size]]
            second = [_core(w) for w in out[-size:]]
            # the first copy must not end a sentence or clause: "Yes. Yes." is two answers
            if first == second and all(first) and not out[-size - 1].endswith((".", "?", "!")):
                del out[-2 * size : -size]
                break
    return out


# --------------------------------------------------------------------------- scoring


@dataclass(frozen=True)
class _Candidate:
    point: Point
    vector: dict[str, float]
    norm: float


_IDF: dict[int, tuple[Parsed, dict[str, float]]] = {}


def _idf(parsed: Parsed) -> dict[str, float]:
    """Return the IDF of every content lemma over the meeting's utterances (cached per parse)."""
    hit = _IDF.get(id(parsed))
    if hit is not None and hit[0] is parsed:
        return hit[1]
    df: Counter[str] = Counter()
    for doc in parsed.docs:
        df.update(set(content_lemmas(doc)))
    n = len(parsed.docs)
    idf = {w: math.log((n + 1) / (c + 0.5)) for w, c in df.items()}
    if len(_IDF) > 8:
        _IDF.clear()
    _IDF[id(parsed)] = (parsed, idf)
    return idf


def _candidates(segment: Segment, parsed: Parsed) -> list[_Candidate]:
    idf = _idf(parsed)
    out = []
    for u in segment.utterances:
        if u.index >= len(parsed):
            continue
        for sent in parsed[u.index].sents:
            text = clean(sent.text)
            lemmas = content_lemmas(sent)  # type: ignore[arg-type]  # a Span iterates like a Doc
            if len(text.split()) < MIN_WORDS or len(lemmas) < MIN_CONTENT:
                continue
            vector: dict[str, float] = {}
            for w in lemmas:
                vector[w] = vector.get(w, 0.0) + idf.get(w, 1.0)
            norm = math.sqrt(sum(v * v for v in vector.values()))
            start = u.time_of(sent.text)[0]
            out.append(_Candidate(Point(text, start, u.speaker, u.index), vector, norm))
    return out


def _cos(a: dict[str, float], na: float, b: dict[str, float], nb: float) -> float:
    if not na or not nb:
        return 0.0
    if len(a) > len(b):
        a, b = b, a
    return sum(v * b.get(w, 0.0) for w, v in a.items()) / (na * nb)


def _centroid(cands: Sequence[_Candidate]) -> tuple[dict[str, float], float]:
    total: dict[str, float] = {}
    for c in cands:
        for w, v in c.vector.items():
            total[w] = total.get(w, 0.0) + v / c.norm
    return total, math.sqrt(sum(v * v for v in total.values()))


def _mmr(cands: Sequence[_Candidate], centroid: tuple[dict[str, float], float],
         limit: int, chosen: Sequence[_Candidate] = ()) -> list[_Candidate]:
    """Return up to ``limit`` candidates, central but unlike those already chosen."""
    relevance = [_cos(c.vector, c.norm, *centroid) for c in cands]
    picked: list[_Candidate] = list(chosen)
    out: list[_Candidate] = []
    left = list(range(len(cands)))
    while left and len(out) < limit:
        def gain(i: int) -> float:
            c = cands[i]
            overlap = max((_cos(c.vector, c.norm, p.vector, p.norm) for p in picked), default=0.0)
            return RELEVANCE * relevance[i] - (1 - RELEVANCE) * overlap

        best = max(left, key=lambda i: (gain(i), -i))
        left.remove(best)
        if any(cands[best].point.text.lower() == p.point.text.lower() for p in picked):
            continue
        out.append(cands[best])
        picked.append(cands[best])
    return out


# --------------------------------------------------------------------------- public


def key_points(segment: Segment, parsed: Parsed, limit: int = 4) -> tuple[Point, ...]:
    """Return 1 to ``limit`` central, cleaned statements of the segment, in time order."""
    cands = _candidates(segment, parsed)
    if not cands or limit < 1:
        return ()
    chosen = _mmr(cands, _centroid(cands), limit)
    return tuple(sorted((c.point for c in chosen), key=lambda p: (p.start, p.utterance)))


def summarise(segments: Sequence[Segment], parsed: Parsed, limit: int = 10) -> tuple[Point, ...]:
    """Return up to ``limit`` points that sum up the meeting, drawn from the segments' points
    (computed here when a segment has none), one per segment before any second, in time order.
    """
    idf = _idf(parsed)
    pools: list[list[_Candidate]] = []
    for seg in segments:
        points = seg.points or key_points(seg, parsed)
        pool = []
        for p in points:
            vector: dict[str, float] = {}
            if p.utterance < len(parsed):
                for w in content_lemmas(parsed[p.utterance]):
                    vector[w] = vector.get(w, 0.0) + idf.get(w, 1.0)
            norm = math.sqrt(sum(v * v for v in vector.values()))
            if norm:
                pool.append(_Candidate(p, vector, norm))
        pools.append(pool)
    everything = [c for pool in pools for c in pool]
    if not everything or limit < 1:
        return ()
    centroid = _centroid(everything)
    # One point from each segment first, longest segments first, so every part of the
    # meeting is represented before any part twice.
    order = sorted(range(len(segments)), key=lambda i: -segments[i].words)
    chosen: list[_Candidate] = []
    for i in order:
        if len(chosen) >= limit:
            break
        chosen += _mmr(pools[i], centroid, 1, chosen)
    rest = [c for c in everything if c not in chosen]
    chosen += _mmr(rest, centroid, limit - len(chosen), chosen)
    return tuple(sorted((c.point for c in chosen), key=lambda p: (p.start, p.utterance)))
