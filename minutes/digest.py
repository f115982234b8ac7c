"""The interview digest: a condensed record of each interview, and themes across the set.

For each interview (``read_interview``, one file's work, run in parallel by ``batch``):
the transcript is read, speakers resolved with the profiles, parsed once, and cut into
parts (by the agenda or topic guide when the meeting file has one); each part keeps its
title, time range and the participant sentences closest to its centre, verbatim, with
time, cue and speaker.

**Interviewer and participants.** A speaker whose profile role is ``interviewer`` is an
interviewer; in an interview with none, the speaker who asks the most questions (turns
ending in "?") is. Everyone else is a participant, and themes come only from
participants' words.

**Themes across the set** (``build``). Participants' talk is cut into passages (a turn
or run of turns between two interviewer questions, at most ``PASSAGE_WORDS`` words).
Each passage becomes a TF-IDF vector of its content lemmas (nouns, verbs, adjectives;
no names, fillers or stop words), keeping only words used in at least two interviews so
that a theme is something the set shares, not one person's vocabulary. Passages are
clustered by average-linkage agglomerative clustering on cosine distance (numpy, no
other library); the cut is the number of clusters with the best mean silhouette
(Rousseeuw 1987) between 2 and ``MAX_THEMES``. A cluster met in two or more interviews
is a theme, named by its most distinctive noun phrases and words; the theme × interview
matrix counts its passages in each interview and quotes the sentence of those passages
closest to the theme's centre.

``pseudonymise`` replaces names everywhere (quotes, titles, speakers, file names) with
``minutes.pseudonym``; the key linking pseudonyms to names is returned apart.
"""

from __future__ import annotations

import datetime as dt
import json
import math
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from .errors import InputError
from .model import Cue, Person, Utterance
from .nlp import FILLERS

if TYPE_CHECKING:
    from spacy.tokens import Doc

    from .pseudonym import Mention, Pseudonyms

PASSAGE_WORDS = 150  # longest passage, in words: about a minute of talk
MIN_PASSAGE_WORDS = 12  # shorter turns ("yeah, that's right") carry no theme
MAX_THEMES = 10
QUOTES_PER_PART = 2
MIN_QUOTE_WORDS = 8
# An interviewer's question of this many words opens a new part (main questions come with
# a lead-in; follow-ups such as "And where did you learn that?" are short), unless the
# part before it would be shorter than MIN_PART_SECONDS (then it opens that part instead).
QUESTION_WORDS = 9
MIN_PART_SECONDS = 60.0
QUESTION_TITLE_WORDS = 14
TERM_POS = frozenset({"NOUN", "VERB", "ADJ"})
# Verbs of talk and thought that every interview is full of: no theme is made of them.
GENERIC = frozenset("""
    tell ask talk want need come look make take give keep put feel try start use happen
    mean guess suppose reckon remember year time day week people way something anything
    everything nothing someone anyone everyone lot kind sort bit thing good bad big little
    sure different same whole last first next old new
""".split())


@dataclass(frozen=True)
class Quote:
    """A participant's sentence, verbatim, with where it was said."""

    text: str
    start: float
    end: float
    speaker: str
    cue: str | None


@dataclass(frozen=True)
class Part:
    """A part of one interview: its title, time range and key quotes."""

    title: str
    start: float
    end: float
    keywords: tuple[str, ...]
    quotes: tuple[Quote, ...]


@dataclass(frozen=True)
class Passage:
    """A run of participant talk between two questions: the unit themes are made of."""

    start: float
    end: float
    speaker: str
    terms: tuple[str, ...]  # content lemmas, in order
    phrases: tuple[str, ...]  # noun phrases (lemmas), for naming themes
    cues: tuple[str, ...]
    sentences: tuple[Quote, ...]


@dataclass(frozen=True)
class Interview:
    """One interview, condensed: everything the set-level work and the renderers need."""

    name: str  # the file name
    title: str
    date: dt.date | None
    duration: float
    interviewers: tuple[str, ...]
    participants: tuple[str, ...]
    parts: tuple[Part, ...]
    passages: tuple[Passage, ...]
    speakers: tuple[tuple[str, str], ...]  # (name, role) in order of first turn
    people: tuple[Person, ...]  # the profiles used
    mentions: tuple[Mention, ...]  # candidate names, for pseudonyms
    lowercase: frozenset[str]  # words used in lower case
    places: tuple[str, ...]  # place names from the meeting file
    words: int = 0


@dataclass(frozen=True)
class Cell:
    """One theme in one interview: how many passages, and the quote that shows it best."""

    count: int
    quote: Quote | None


@dataclass(frozen=True)
class Theme:
    """A theme across the set."""

    id: str  # T1, T2...
    name: str
    phrases: tuple[str, ...]
    cells: tuple[Cell, ...]  # one per interview, in the digest's order
    members: tuple[tuple[int, int], ...]  # (interview, passage) pairs


@dataclass(frozen=True)
class Digest:
    """The whole digest of a set of interviews."""

    interviews: tuple[Interview, ...]
    themes: tuple[Theme, ...]
    notes: tuple[str, ...] = ()
    pseudonymised: bool = False


# --------------------------------------------------------------------------- one interview


@dataclass(frozen=True)
class InterviewJob:
    """One interview to read (picklable, for ``batch.run``)."""

    path: Path
    profiles: Path | None = None


def read_job(job: InterviewJob) -> Interview:
    """Return the condensed record of one interview (the per-file work of ``digest``)."""
    return read_interview(job.path, job.profiles)


def read_interview(path: Path, profiles: Path | None = None) -> Interview:
    """Return the condensed record of the interview in ``path``."""
    from . import nlp
    from .pipeline import DraftOptions, meeting_file, read_input
    from .pseudonym import lower_words, mentions, places_in
    from .segment import segment
    from .speakers import Directory, load_profiles, resolve_speakers

    if not path.is_file():
        raise InputError("no such file", path=str(path))
    mfile = meeting_file(path, DraftOptions(profiles=profiles))
    chosen = profiles or mfile.profiles
    directory = load_profiles(chosen) if chosen else Directory()
    transcript = read_input(path, DraftOptions())
    if not transcript.utterances:
        raise InputError("no speech or captions found in the file", path=str(path))
    info = mfile.info
    if not info.title:
        info = replace(info, title=path.stem.replace("_", " ").strip().title())
    transcript, _ = resolve_speakers(replace(transcript, meeting=info), directory)
    utterances = transcript.utterances
    parsed = nlp.parse(utterances)
    interviewers = _interviewers(utterances, directory)
    roles = {s: ("interviewer" if s in interviewers else
                 (directory.role_of(s) or "participant")) for s in transcript.speakers}
    speaking = tuple((s, roles[s]) for s in transcript.speakers)
    participants = tuple(s for s, r in speaking if r != "interviewer")
    found = mentions(parsed.docs)
    # names never make a theme or a keyword (and must not survive pseudonyms as lemmas)
    names = {w.lower() for m in found for w in m.text.split()}
    names |= {w.lower() for p in directory.people for n in (p.name, *p.aliases)
              for w in n.split()}
    names |= {w.lower() for s in transcript.speakers for w in s.split()}
    passages = _passages(utterances, parsed.docs, set(interviewers), names)
    if interviewers:
        spans = _question_spans(utterances, parsed.docs, set(interviewers))
    else:  # no interviewer to follow: topic segmentation, as for a meeting
        spans = [(seg.title, seg.start, seg.end) for seg in segment(transcript, parsed)]
    parts = _parts(spans, passages)
    return Interview(
        name=path.name, title=info.title, date=info.date, duration=transcript.duration,
        interviewers=tuple(interviewers), participants=participants, parts=parts,
        passages=passages, speakers=speaking, people=directory.people,
        mentions=tuple(found), lowercase=frozenset(lower_words(parsed.docs)),
        places=tuple(places_in(info.place)),
        words=sum(len(u.text.split()) for u in utterances))


def _interviewers(utterances: Sequence[Utterance], directory: Any) -> list[str]:
    named = [s for s in dict.fromkeys(u.speaker for u in utterances)
             if directory.role_of(s) == "interviewer"]
    if named:
        return named
    asks = Counter(u.speaker for u in utterances if u.text.rstrip().endswith("?"))
    speakers = set(u.speaker for u in utterances)
    if len(speakers) < 2 or not asks:
        return []
    return [asks.most_common(1)[0][0]]


def _terms(doc: Doc) -> tuple[list[str], list[str]]:
    terms = []
    for tok in doc:
        if tok.pos_ not in TERM_POS or tok.is_stop or not tok.is_alpha or tok.ent_type_:
            continue
        lemma = tok.lemma_.lower()
        if lemma in FILLERS or lemma in GENERIC or len(lemma) < 3:
            continue
        terms.append(lemma)
    phrases = []
    for chunk in doc.noun_chunks:
        words = [t.lemma_.lower() for t in chunk if t.pos_ in ("NOUN", "ADJ") and not t.is_stop
                 and t.is_alpha and not t.ent_type_ and t.lemma_.lower() not in FILLERS]
        if words and chunk.root.pos_ == "NOUN" and chunk.root.lemma_.lower() not in GENERIC:
            phrases.append(" ".join(words))
    return terms, phrases


def _sentences(u: Utterance, doc: Doc) -> list[Quote]:
    out = []
    for sent in doc.sents:
        text = sent.text.strip()
        if len(text.split()) < MIN_QUOTE_WORDS:
            continue
        # a sentence may run over several cues: cite the one it starts in
        first = _cue_at(u, sent.start_char) or u.cue_for(text)
        last = _cue_at(u, sent.end_char - 1) or first
        start = first.start if first else u.start
        end = last.end if last else u.end
        out.append(Quote(text, start, end, u.speaker, first.id if first else None))
    return out


def _cue_at(u: Utterance, offset: int) -> Cue | None:
    """Return the cue that holds character ``offset`` of the utterance's text."""
    pos = 0
    for cue in u.cues:
        at = u.text.find(cue.text, pos)
        if at < 0:
            return None  # the merge changed the text: let the caller match by words
        if offset < at + len(cue.text):
            return cue
        pos = at + len(cue.text)
    return u.cues[-1] if u.cues else None


def _passages(utterances: Sequence[Utterance], docs: Sequence[Doc],
              interviewers: set[str], names: set[str]) -> tuple[Passage, ...]:
    out: list[Passage] = []
    run: list[int] = []

    def close() -> None:
        words = sum(len(utterances[i].text.split()) for i in run)
        if run and words >= MIN_PASSAGE_WORDS:
            terms: list[str] = []
            phrases: list[str] = []
            sentences: list[Quote] = []
            cues: list[str] = []
            for i in run:
                t, p = _terms(docs[i])
                terms += [w for w in t if w not in names]
                phrases += [x for x in p if not names & set(x.split())]
                sentences += _sentences(utterances[i], docs[i])
                cues += [c.id for c in utterances[i].cues if c.id]
            first, last = utterances[run[0]], utterances[run[-1]]
            out.append(Passage(first.start, last.end, first.speaker, tuple(terms),
                               tuple(phrases), tuple(cues), tuple(sentences)))
        run.clear()

    words = 0
    for i, u in enumerate(utterances):
        if u.speaker in interviewers:
            if len(u.text.split()) >= 6 or u.text.rstrip().endswith("?"):
                close()  # a new question: a new passage
                words = 0
            continue
        n = len(u.text.split())
        if run and (words + n > PASSAGE_WORDS or utterances[run[-1]].speaker != u.speaker):
            close()
            words = 0
        run.append(i)
        words += n
    close()
    return tuple(out)


def _question_spans(utterances: Sequence[Utterance], docs: Sequence[Doc],
                    interviewers: set[str]) -> list[tuple[str, float, float]]:
    """Return (title, start, end) of the parts an interview's main questions open."""
    from .keypoints import clean

    cuts: list[tuple[str, float]] = []
    for u, doc in zip(utterances, docs, strict=True):
        if u.speaker not in interviewers or "?" not in u.text:
            continue
        if len(u.text.split()) < QUESTION_WORDS:
            continue  # "And what happened?": a follow-up stays in its part
        asked = [s.text.strip() for s in doc.sents if s.text.strip().endswith("?")]
        title = clean(asked[-1]) if asked else clean(u.text)
        words = title.split()
        if cuts and u.start - cuts[-1][1] < MIN_PART_SECONDS:
            cuts.pop()  # what came before was a lead-in to this question: cut here instead
        cuts.append((" ".join(words[:QUESTION_TITLE_WORDS]) + (" …" if len(words) >
                                                              QUESTION_TITLE_WORDS else ""),
                     u.start))
    end = utterances[-1].end
    if not cuts or cuts[0][1] > utterances[0].start:
        cuts.insert(0, ("Opening", utterances[0].start))
    return [(title, start, cuts[n + 1][1] if n + 1 < len(cuts) else end)
            for n, (title, start) in enumerate(cuts)]


def _parts(spans: Sequence[tuple[str, float, float]],
           passages: Sequence[Passage]) -> tuple[Part, ...]:
    bags = [[t for p in passages if a <= p.start < b for t in p.terms] for _, a, b in spans]
    df = Counter(t for bag in bags for t in set(bag))
    out = []
    for (title, a, b), bag in zip(spans, bags, strict=True):
        tf = Counter(bag)
        ranked = sorted(tf, key=lambda t: -tf[t] * math.log((1 + len(bags)) / df[t]))
        quotes = [q for p in passages if a <= p.start < b for q in p.sentences]
        out.append(_part(title, a, b, tuple(ranked[:4]), quotes, passages))
    return tuple(out)


def _vector(terms: Sequence[str], idf: dict[str, float]) -> dict[str, float]:
    counts = Counter(t for t in terms if t in idf)
    vec = {t: (1 + math.log(c)) * idf[t] for t, c in counts.items()}
    norm = math.sqrt(sum(v * v for v in vec.values()))
    return {t: v / norm for t, v in vec.items()} if norm else {}


def _part(title: str, start: float, end: float, keywords: tuple[str, ...],
          quotes: list[Quote], passages: Sequence[Passage]) -> Part:
    """Return a part with the quotes nearest its centre, in time order, none repeating words."""
    if not quotes:
        return Part(title, start, end, keywords, ())
    bags = [[w.lower().strip(".,?!;:") for w in q.text.split()] for q in quotes]
    df = Counter(w for bag in bags for w in set(bag))
    idf = {w: math.log(1 + len(bags) / n) for w, n in df.items() if w.isalpha() and len(w) > 3
           and w not in FILLERS}
    vecs = [_vector(bag, idf) for bag in bags]
    centre: Counter[str] = Counter()
    for v in vecs:
        centre.update(v)
    scores = [sum(v.get(w, 0.0) * c for w, c in centre.items()) for v in vecs]
    chosen: list[int] = []
    for i in sorted(range(len(quotes)), key=lambda i: -scores[i]):
        if len(chosen) >= QUOTES_PER_PART:
            break
        if all(sum(vecs[i].get(w, 0) * vecs[j].get(w, 0) for w in vecs[i]) < 0.5
               for j in chosen):
            chosen.append(i)
    return Part(title, start, end, keywords, tuple(quotes[i] for i in sorted(chosen)))


# --------------------------------------------------------------------------- across the set


def _matrix(interviews: Sequence[Interview]) -> tuple[list[tuple[int, int]], np.ndarray,
                                                      list[str]]:
    """Return the passages, their TF-IDF rows (L2-normalised) and the vocabulary."""
    units = [(i, k) for i, iv in enumerate(interviews) for k in range(len(iv.passages))]
    seen_in: dict[str, set[int]] = {}
    df: Counter[str] = Counter()
    for i, k in units:
        terms = set(interviews[i].passages[k].terms)
        df.update(terms)
        for t in terms:
            seen_in.setdefault(t, set()).add(i)
    shared = len(interviews) > 1
    vocab = sorted(t for t, n in df.items() if n >= 2 and (not shared or len(seen_in[t]) >= 2))
    index = {t: n for n, t in enumerate(vocab)}
    m = np.zeros((len(units), len(vocab)))
    for row, (i, k) in enumerate(units):
        for t, c in Counter(interviews[i].passages[k].terms).items():
            if t in index:
                m[row, index[t]] = (1 + math.log(c)) * math.log(len(units) / df[t])
    norms = np.linalg.norm(m, axis=1, keepdims=True)
    m = np.divide(m, norms, out=np.zeros_like(m), where=norms > 0)
    return units, m, vocab


def agglomerate(vectors: np.ndarray) -> list[list[list[int]]]:
    """Return the average-linkage merge sequence: the clustering at every number of clusters.

    ``out[j]`` holds the clusters after ``j`` merges (``out[0]``: every row alone).
    Distances are cosine distances between L2-normalised rows.
    """
    n = len(vectors)
    dist = 1.0 - vectors @ vectors.T
    np.fill_diagonal(dist, np.inf)
    clusters: dict[int, list[int]] = {i: [i] for i in range(n)}
    d = dist.copy()
    out = [[list(c) for c in clusters.values()]]
    active = list(range(n))
    while len(active) > 1:
        sub = d[np.ix_(active, active)]
        a, b = np.unravel_index(np.argmin(sub), sub.shape)
        x, y = active[a], active[b]
        nx, ny = len(clusters[x]), len(clusters[y])
        # average linkage (UPGMA): the new cluster's distance is the size-weighted mean
        d[x, :] = (d[x, :] * nx + d[y, :] * ny) / (nx + ny)
        d[:, x] = d[x, :]
        d[x, x] = np.inf
        clusters[x] = clusters[x] + clusters.pop(y)
        active.remove(y)
        out.append([list(clusters[c]) for c in active])
    return out


def silhouette(vectors: np.ndarray, clusters: Sequence[Sequence[int]]) -> float:
    """Return the mean silhouette of a clustering under cosine distance (Rousseeuw 1987)."""
    dist = 1.0 - vectors @ vectors.T
    label = np.empty(len(vectors), dtype=int)
    for c, members in enumerate(clusters):
        label[list(members)] = c
    scores = []
    for i in range(len(vectors)):
        own = clusters[label[i]]
        if len(own) == 1:
            scores.append(0.0)
            continue
        a = (dist[i, list(own)].sum()) / (len(own) - 1)
        b = min(dist[i, list(other)].mean() for c, other in enumerate(clusters)
                if c != label[i])
        scores.append((b - a) / max(a, b) if max(a, b) > 0 else 0.0)
    return float(np.mean(scores))


def build(interviews: Sequence[Interview], max_themes: int = MAX_THEMES) -> Digest:
    """Return the digest of a set: the interviews and the themes across them."""
    units, m, vocab = _matrix(interviews)
    usable = [r for r in range(len(units)) if m[r].any()]
    notes: list[str] = []
    if len(usable) < 4:
        return Digest(tuple(interviews), (), ("too little participant talk to find themes",))
    vectors = m[usable]
    merges = agglomerate(vectors)
    best, best_score = None, -2.0
    for clusters in merges:
        if not 2 <= len(clusters) <= max_themes:
            continue
        score = silhouette(vectors, clusters)
        if score > best_score:
            best, best_score = clusters, score
    assert best is not None
    notes.append(f"{len(best)} clusters of {len(usable)} passages (mean silhouette "
                 f"{best_score:.2f})")
    themes = []
    single = 0
    for rows in sorted(best, key=len, reverse=True):
        members = [units[usable[r]] for r in rows]
        if len(interviews) > 1 and len({i for i, _ in members}) < 2:
            single += 1
            continue
        themes.append((members, vectors[rows].mean(axis=0)))
    if single:
        notes.append(f"{single} cluster(s) met in one interview only are not themes")
    out = []
    names = _real_name_words(interviews)
    mean_all = vectors.mean(axis=0)
    for n, (members, centre) in enumerate(themes, 1):
        phrases = _name_theme(interviews, members, centre, mean_all, vocab, names)
        cells = tuple(_cell(interviews, members, i, centre, vocab) for i in range(len(interviews)))
        out.append(Theme(f"T{n}", ", ".join(phrases[:3]), tuple(phrases), cells,
                         tuple(members)))
    return Digest(tuple(interviews), tuple(out), tuple(notes))


def _real_name_words(interviews: Sequence[Interview]) -> set[str]:
    words: set[str] = set()
    for iv in interviews:
        for m in iv.mentions:
            words.update(w.lower() for w in m.text.split())
        for name, _ in iv.speakers:
            words.update(w.lower() for w in name.split())
        for p in iv.people:
            for n in (p.name, *p.aliases):
                words.update(w.lower() for w in n.split())
    return words


def _name_theme(interviews: Sequence[Interview], members: Sequence[tuple[int, int]],
                centre: np.ndarray, mean_all: np.ndarray, vocab: Sequence[str],
                names: set[str]) -> list[str]:
    """Return the theme's key phrases: its most distinctive noun phrases, then words."""
    inside: Counter[str] = Counter()
    for i, k in members:
        inside.update(set(interviews[i].passages[k].phrases))
    total: Counter[str] = Counter()
    for iv in interviews:
        for p in iv.passages:
            total.update(set(p.phrases))
    lift = centre - mean_all
    weight = {vocab[j]: lift[j] for j in np.argsort(-lift)[:40] if lift[j] > 0}
    scored = []
    for phrase, n in inside.items():
        words = phrase.split()
        if n < 2 or any(w in names for w in words):
            continue
        score = n / total[phrase] * sum(weight.get(w, 0.0) for w in words)
        if score > 0:
            scored.append((score, phrase))
    out: list[str] = []
    for _, phrase in sorted(scored, reverse=True):
        if not any(phrase in o or o in phrase for o in out):
            out.append(phrase)
        if len(out) >= 3:
            break
    for word in weight:
        if len(out) >= 5:
            break
        if word not in names and not any(word in o.split() for o in out):
            out.append(word)
    return out


def _cell(interviews: Sequence[Interview], members: Sequence[tuple[int, int]], i: int,
          centre: np.ndarray, vocab: Sequence[str]) -> Cell:
    mine = [interviews[i].passages[k] for j, k in members if j == i]
    if not mine:
        return Cell(0, None)
    weight = {vocab[int(j)]: float(centre[j]) for j in np.nonzero(centre)[0]}
    best, best_score = None, -1.0
    for passage in mine:
        for quote in passage.sentences:
            words = {w.lower().strip(".,?!;:") for w in quote.text.split()}
            lemmas = [t for t in passage.terms if t in words or t in weight]
            score = sum(weight.get(t, 0.0) for t in set(lemmas) if t in words)
            score /= math.sqrt(len(words)) or 1.0
            if score > best_score:
                best, best_score = quote, score
    return Cell(len(mine), best)


# --------------------------------------------------------------------------- pseudonyms


def pseudonyms_for(interviews: Sequence[Interview]) -> Pseudonyms:
    """Return the pseudonyms of a whole set (names found in every interview)."""
    from .pseudonym import build as build_pseudonyms

    speakers: dict[str, str] = {}
    for iv in interviews:
        for name, role in iv.speakers:
            speakers.setdefault(name, role)
    people: dict[str, Person] = {}
    for iv in interviews:
        for p in iv.people:
            people.setdefault(p.name, p)
    found = [m for iv in interviews for m in iv.mentions]
    lowercase = set().union(*(iv.lowercase for iv in interviews)) if interviews else set()
    places = [p for iv in interviews for p in iv.places]
    return build_pseudonyms(tuple(speakers.items()), tuple(people.values()), found, lowercase,
                            places)


def pseudonymise(digest: Digest, pseudonyms: Pseudonyms) -> Digest:
    """Return the digest with every name replaced (the records that held names dropped)."""
    import re

    from .pseudonym import replace_strings

    real = {w.lower() for text in pseudonyms.names() for w in re.findall(r"[^\W\d_]+", text)
            if len(w) > 2 and w.lower() != "the"}
    interviews = []
    for n, iv in enumerate(digest.interviews, 1):
        done = replace_strings(replace(iv, mentions=(), people=(), lowercase=frozenset(),
                                       places=()), pseudonyms)
        # a file name such as "sorcha_keane.vtt" hides names from whole-word matching
        if any(w.lower() in real for w in re.findall(r"[^\W\d_]+", done.name)):
            stem = "-".join(done.participants) or f"interview-{n:02d}"
            taken = {other.name for other in digest.interviews}
            name = f"{stem}{Path(iv.name).suffix}"
            if name in taken:
                name = f"{stem}-{n}{Path(iv.name).suffix}"
            done = replace(done, name=name)
        interviews.append(done)
    themes = tuple(replace_strings(t, pseudonyms) for t in digest.themes)
    return replace(digest, interviews=tuple(interviews), themes=themes, pseudonymised=True)


# --------------------------------------------------------------------------- output


def to_json(digest: Digest) -> dict[str, Any]:
    """Return the digest as a JSON-ready dict."""
    def quote(q: Quote | None) -> dict[str, Any] | None:
        return None if q is None else {"text": q.text, "start": q.start, "end": q.end,
                                       "speaker": q.speaker, "cue": q.cue}

    return {
        "pseudonymised": digest.pseudonymised,
        "interviews": [{
            "source": iv.name, "title": iv.title,
            "date": iv.date.isoformat() if iv.date else None, "duration_s": iv.duration,
            "interviewers": list(iv.interviewers), "participants": list(iv.participants),
            "parts": [{"title": p.title, "start": p.start, "end": p.end,
                       "keywords": list(p.keywords), "quotes": [quote(q) for q in p.quotes]}
                      for p in iv.parts],
        } for iv in digest.interviews],
        "themes": [{
            "id": t.id, "name": t.name, "phrases": list(t.phrases),
            "cells": [{"interview": iv.name, "count": c.count, "quote": quote(c.quote)}
                      for iv, c in zip(digest.interviews, t.cells, strict=True)],
        } for t in digest.themes],
        "notes": list(digest.notes),
    }


def document(digest: Digest) -> Any:
    """Return the digest as render blocks (Markdown and DOCX share them)."""
    from .render.blocks import (
        Bullets,
        Document,
        Heading,
        Rule,
        Table,
        bold,
        italic,
        line,
        lit,
        para,
    )
    from .render.parts import CAUTIONS
    from .render.text import DASH, clock, span

    ivs = digest.interviews
    title = f"Interview digest: {len(ivs)} interview{'s' if len(ivs) != 1 else ''}"
    blocks: list[Any] = [Heading(0, title), para(italic(
        "DRAFT — check every quote against its recording before it is used."
        + (" Names are pseudonyms." if digest.pseudonymised else "")))]
    blocks.append(Heading(1, "Themes across the set"))
    if not digest.themes:
        blocks.append(para("No theme was found in more than one interview."))
    else:
        blocks.append(Table(("Theme", "Key phrases", "Passages", "Interviews"), tuple(
            (t.id, ", ".join(t.phrases), str(sum(c.count for c in t.cells)),
             str(sum(1 for c in t.cells if c.count)))
            for t in digest.themes)))
        blocks.append(Heading(1, "Theme by interview"))
        header = ("Theme", *(iv.name for iv in ivs))
        rows = []
        for t in digest.themes:
            cells = []
            for c in t.cells:
                if not c.count or c.quote is None:
                    cells.append(DASH if not c.count else str(c.count))
                    continue
                q = c.quote
                cells.append(f"{c.count}: “{q.text}” ({q.speaker}, {clock(q.start)}"
                             + (f", cue {q.cue})" if q.cue else ")"))
            rows.append((f"{t.id} {t.name}", *cells))
        blocks.append(Table(header, tuple(rows)))
    for iv in ivs:
        blocks.append(Heading(1, f"{iv.title} ({iv.name})"))
        facts = [line(bold("Date:"), lit(" "), iv.date.isoformat() if iv.date else "not given"),
                 line(bold("Length:"), lit(" "), clock(iv.duration)),
                 line(bold("Participants:"), lit(" "), ", ".join(iv.participants) or DASH),
                 line(bold("Interviewer:"), lit(" "), ", ".join(iv.interviewers) or DASH)]
        blocks.append(Bullets(tuple(facts)))
        for n, p in enumerate(iv.parts, 1):
            blocks.append(Heading(2, f"{p.title or 'Untitled part'} ({span(p.start, p.end)})",
                                  number=f"{n}."))
            if p.quotes:
                blocks.append(Bullets(tuple(
                    line(lit(f"[{clock(q.start)}] "), f"{q.speaker}: “{q.text}”")
                    for q in p.quotes)))
            else:
                blocks.append(para("No participant quote in this part."))
    if digest.notes:
        blocks += [Heading(1, "Notes"), Bullets(tuple(line(n) for n in digest.notes))]
    blocks += [Rule(), para(CAUTIONS[1]), para(CAUTIONS[2])]
    return Document(title=title, blocks=tuple(blocks), footer="DRAFT — interview digest")


def render_digest(digest: Digest, fmt: str) -> bytes:
    """Return the digest as ``md``, ``docx`` or ``json`` bytes."""
    from .errors import UsageError

    if fmt == "json":
        return (json.dumps(to_json(digest), ensure_ascii=False, indent=2) + "\n").encode()
    if fmt == "md":
        from .render.markdown import write_markdown

        return write_markdown(document(digest))
    if fmt == "docx":
        from .render.word import write_docx

        return write_docx(document(digest))
    raise UsageError(f"unknown digest format {fmt!r}; choose one of md, docx, json")
