"""Who-spoke-when and voice naming on invented meetings spoken by espeak-ng voices.

    .venv/bin/python bench/diarization.py [--meetings 3] [--speakers 2,3,4] [--turns 24]
                                          [--reverb] [--blind] [--merge 0.86] [--match 0.5]
                                          [--model-dir DIR] [--threads 2]
                                          [--workdir DIR] [--seed 0]

Each meeting is a script of our own (``LINES`` below), spoken turn by turn by 2-4 of the
voices in ``VOICES`` (espeak-ng formant voices with their own pitch and speed), joined with
sox with 0.2-1.2 s pauses; the reference turns are exact sample counts. Each voice also
reads a different text of about 10 s as its voice sample; one voice per meeting is left out
of the enrolment, so it must come out as "Speaker N". ``--reverb`` passes every file
(meeting and samples) through sox ``reverb 50 50 100``.

Prints per meeting and overall:
- DER: pyannote.metrics ``DiarizationErrorRate`` (optimal mapping; collar 0 and 0.25 s,
  overlap none in these scripts); false alarm, missed speech and confusion shares.
- speakers: how many the eigengap + merge found against how many there were.
- identification: share of reference speech time whose label is right (the person's name
  for enrolled voices, some "Speaker N" for the one left out).
- similarity of each found speaker's centre to each voice sample, split into same voice and
  other voice: the gap is where ``match_threshold`` must fall.
- RTF: seconds of work per second of audio for assign_speakers (decode, VAD, prints,
  clustering), and the VAD alone measured side by side as the baseline it adds to.
Benchmark, not a test: numbers, never pass/fail.
"""

from __future__ import annotations

import argparse
import os
import random
import shutil
import subprocess
import sys
import tempfile
import time
import wave
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from minutes.asr.campplus import load_embedder  # noqa: E402
from minutes.asr.speakers import (  # noqa: E402
    SpeakerOptions,
    _read,
    diarize,
    enrol,
    name_speakers,
    speech,
)

# (voice, pitch 0-99, words per minute): invented people, told apart only by these settings.
VOICES = {
    "Ada Voss": ("en-us", 40, 160),
    "Bruno Kale": ("en-gb-scotland+m2", 30, 150),
    "Carla Mendes": ("en-gb+f3", 60, 170),
    "Dev Patel": ("en-029+m4", 50, 175),
    "Elin Strand": ("en-us+f2", 70, 155),
    "Femi Adeyemi": ("en-gb-x-rp+m1", 35, 165),
}

LINES = [
    "Good morning everyone, let us start with the budget for the spring term.",
    "I looked at the numbers again and the printing costs are higher than we planned.",
    "Could we move the workshop to the second week of March instead?",
    "That works for me, as long as the room is free on Thursday afternoon.",
    "I will send the revised schedule to the whole team by Friday.",
    "The volunteers asked whether the parking passes will be ready in time.",
    "We still need a second quote from the catering company before we decide.",
    "My concern is that the survey closes before the parents get the letter.",
    "Let us keep the survey open for another ten days, then.",
    "I move that we approve the minutes of the last meeting as circulated.",
    "I second that motion.",
    "All in favour? Any against? The motion carries.",
    "The library has offered us the small hall for the exhibition.",
    "Who is taking the action on the new signs for the entrance?",
    "I can do the signs, but I need the final wording by Monday.",
    "The website update is nearly finished; only the photo gallery is missing.",
    "Please remember that the grant report is due at the end of the month.",
    "I spoke to the treasurer and the transfer went through yesterday.",
    "Can we have a short update on the repairs to the kitchen roof?",
    "The builder says the work will take three more weeks because of the rain.",
    "That is longer than we hoped, but safety comes first.",
    "Next item: the summer fair and the list of stalls.",
    "We have eighteen stalls booked so far and four more on the waiting list.",
    "I think we should limit the food stalls to six this year.",
]

SAMPLE_TEXT = [
    "This is my voice sample for the speaker profiles. I am reading a short passage about "
    "the weather in the valley, where the wind comes down from the hills every evening.",
    "Here is a recording of how I sound. The train to the coast leaves at seven, and on a "
    "clear day you can see the islands from the window on the left side.",
]


@dataclass(frozen=True)
class Meeting:
    path: Path
    turns: tuple[tuple[float, float, str], ...]  # reference (start, end, person)
    samples: dict[str, Path]  # person -> voice sample
    left_out: str  # the voice with no sample
    seconds: float


def say(text: str, person: str, out: Path, reverb: bool = False) -> None:
    """Write ``text`` spoken by ``person``'s espeak-ng voice as 16 kHz mono 16-bit WAV."""
    voice, pitch, speed = VOICES[person]
    raw = out.with_suffix(".raw.wav")
    subprocess.run(["espeak-ng", "-v", voice, "-p", str(pitch), "-s", str(speed), "-w",
                    str(raw), text], check=True, capture_output=True)
    effects = ["reverb", "50", "50", "100"] if reverb else []
    # -R: repeatable dither, so the same seed gives the same audio, bit for bit
    subprocess.run(["sox", "-R", str(raw), "-r", "16000", "-c", "1", "-b", "16", str(out),
                    *effects], check=True, capture_output=True)
    raw.unlink()


def read_wav(path: Path) -> np.ndarray:
    with wave.open(str(path)) as w:
        return np.frombuffer(w.readframes(w.getnframes()), dtype=np.int16)


def write_wav(path: Path, audio: np.ndarray) -> None:
    with wave.open(str(path), "wb") as w:
        w.setnchannels(1)
        w.setsampwidth(2)
        w.setframerate(16000)
        w.writeframes(audio.astype(np.int16).tobytes())


def make_meeting(folder: Path, people: Sequence[str], turns: int, rng: random.Random,
                 reverb: bool = False) -> Meeting:
    """Return an invented meeting: turns by ``people`` in random order, and voice samples."""
    folder.mkdir(parents=True, exist_ok=True)
    parts: list[np.ndarray] = []
    ref: list[tuple[float, float, str]] = []
    at = 0
    last = None
    for n in range(turns):
        person = rng.choice([p for p in people if p != last] or list(people))
        last = person
        clip = folder / f"turn{n}.wav"
        say(" ".join(rng.sample(LINES, rng.choice((1, 1, 2)))), person, clip, reverb)
        audio = read_wav(clip)
        clip.unlink()
        # espeak pads its output with silence: the reference turn is where the samples are loud.
        loud = np.nonzero(np.abs(audio) > 300)[0]
        pause = np.zeros(int(16000 * rng.uniform(0.2, 1.2)), dtype=np.int16)
        parts += [pause, audio]
        at += len(pause)
        ref.append(((at + loud[0]) / 16000, (at + loud[-1]) / 16000, person))
        at += len(audio)
    path = folder / "meeting.wav"
    write_wav(path, np.concatenate(parts))
    left_out = people[-1]
    samples = {}
    for i, person in enumerate(people[:-1]):
        samples[person] = folder / f"sample_{i}.wav"
        say(SAMPLE_TEXT[i % 2], person, samples[person], reverb)
    return Meeting(path, tuple(ref), samples, left_out, at / 16000)


def annotation(turns: Sequence[tuple[float, float, str]]):  # type: ignore[no-untyped-def]
    from pyannote.core import Annotation, Segment

    a = Annotation()
    for i, (s, e, who) in enumerate(turns):
        a[Segment(s, e), i] = who
    return a


def identification(ref: Sequence[tuple[float, float, str]],
                   hyp: Sequence[tuple[float, float, str]], enrolled: set[str]) -> float:
    """Return the share of reference speech time labelled right (10 ms steps)."""
    right = total = 0
    for s, e, who in ref:
        for t in np.arange(s, e, 0.01):
            total += 1
            got = next((h for hs, he, h in hyp if hs <= t < he), None)
            if got is None:
                continue
            right += got == who if who in enrolled else got.startswith("Speaker ")
    return right / max(total, 1)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--meetings", type=int, default=3)
    ap.add_argument("--speakers", default="2,3,4")
    ap.add_argument("--turns", type=int, default=24)
    ap.add_argument("--reverb", action="store_true")
    ap.add_argument("--blind", action="store_true",
                    help="cluster without the voice samples (they still name the clusters)")
    ap.add_argument("--merge", type=float, default=SpeakerOptions.merge_threshold)
    ap.add_argument("--match", type=float, default=SpeakerOptions.match_threshold)
    ap.add_argument("--model-dir", type=Path, default=None)
    ap.add_argument("--threads", type=int, default=2)
    ap.add_argument("--workdir", type=Path, default=None)
    ap.add_argument("--seed", type=int, default=0)
    args = ap.parse_args()
    for tool in ("espeak-ng", "sox"):
        if shutil.which(tool) is None:
            sys.exit(f"{tool} is needed: apt-get install {tool}")
    from pyannote.metrics.diarization import DiarizationErrorRate

    work = args.workdir or Path(tempfile.mkdtemp(prefix="minutes-diar-"))
    rng = random.Random(args.seed)
    options = SpeakerOptions(threads=args.threads, model_dir=args.model_dir,
                             merge_threshold=args.merge, match_threshold=args.match)
    embedder = load_embedder(args.model_dir, args.threads)
    der0, der25 = DiarizationErrorRate(collar=0.0), DiarizationErrorRate(collar=0.25)
    same: list[float] = []
    other: list[float] = []
    ids: list[float] = []
    work_s = vad_s = audio_s = 0.0
    counts = []
    print(f"load average before: {os.getloadavg()[0]:.2f}")
    sizes = [int(s) for s in args.speakers.split(",")]
    for m in range(args.meetings):
        for k in sizes:
            people = rng.sample(sorted(VOICES), k)
            meeting = make_meeting(work / f"m{m}_{k}", people, args.turns, rng, args.reverb)
            t0 = time.perf_counter()
            enrolled = [(p, v) for p, path in meeting.samples.items()
                        if (v := enrol(_person(p, path), embedder, options)) is not None]
            voices = np.stack([v for _, v in enrolled]) if enrolled and not args.blind else None
            found = diarize(_read(meeting.path), embedder, options, voices)
            names = name_speakers(found.centres, enrolled, options.match_threshold)
            work_s += time.perf_counter() - t0
            t0 = time.perf_counter()
            speech(np.concatenate(list(_read(meeting.path))))
            vad_s += time.perf_counter() - t0
            audio_s += meeting.seconds
            hyp = [(t.start, t.end, names[t.speaker]) for t in found.turns]
            ref_a, hyp_a = annotation(meeting.turns), annotation(hyp)
            d0 = der0(ref_a, hyp_a, detailed=True)
            d25 = der25(ref_a, hyp_a)
            acc = identification(meeting.turns, hyp, set(meeting.samples))
            ids.append(acc)
            counts.append((len(found.centres), k))
            if enrolled:
                sim = found.centres @ np.stack([v for _, v in enrolled]).T
                # Which person is each found speaker really? The one it covers most time of.
                for i in range(len(found.centres)):
                    truth = _majority(meeting.turns, [t for t in found.turns if t.speaker == i])
                    for j, (p, _) in enumerate(enrolled):
                        (same if p == truth else other).append(float(sim[i, j]))
            print(f"meeting {m} speakers {k}: {meeting.seconds:.0f} s, found "
                  f"{len(found.centres)}, DER {d0['diarization error rate']:.3f} (collar 0) "
                  f"{d25:.3f} (0.25 s), FA {d0['false alarm'] / d0['total']:.3f} miss "
                  f"{d0['missed detection'] / d0['total']:.3f} conf "
                  f"{d0['confusion'] / d0['total']:.3f}, identification {acc:.3f}, "
                  f"names {names}")
    print(f"\nDER overall: {abs(der0):.3f} (collar 0), {abs(der25):.3f} (collar 0.25 s)")
    print(f"speaker count right in {sum(a == b for a, b in counts)}/{len(counts)}: {counts}")
    print(f"identification: mean {np.mean(ids):.3f}, worst {min(ids):.3f}")
    if same and other:
        print(f"similarity centre-sample, same voice: min {min(same):.3f} mean "
              f"{np.mean(same):.3f}; other voice: max {max(other):.3f} mean {np.mean(other):.3f}"
              f"; threshold in use {options.match_threshold}")
    print(f"RTF: assign {work_s / audio_s:.4f} (includes enrolment), VAD alone "
          f"{vad_s / audio_s:.4f}, ratio {work_s / max(vad_s, 1e-9):.1f}x, "
          f"{audio_s:.0f} s of audio, threads {args.threads}")
    print(f"load average after: {os.getloadavg()[0]:.2f}")


def _person(name: str, path: Path):  # type: ignore[no-untyped-def]
    from minutes.model import Person

    return Person(name=name, voice_sample=str(path))


def _majority(ref: Sequence[tuple[float, float, str]], hyp: Sequence) -> str:  # type: ignore[type-arg]
    cover: dict[str, float] = {}
    for h in hyp:
        for s, e, who in ref:
            o = min(e, h.end) - max(s, h.start)
            if o > 0:
                cover[who] = cover.get(who, 0.0) + o
    return max(cover, key=lambda w: cover[w]) if cover else ""


if __name__ == "__main__":
    main()
