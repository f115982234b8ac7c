"""Build the demo WebVTT caption files from their scripts in ``src/``.

The demo meetings are invented. Each script is plain text::

    # a comment
    @start 00:00:04        start time of the first line (default 00:00:03)
    @pause 6               extra silence before the next line, in seconds
    @label Ada Voss = Chair Voss   caption label to write for a speaker (default: the name)
    Ada Voss: Okay, um, let's get started.

Timing is computed from word counts (about 2.6 words a second, varied per speaker
and per line with a fixed seed, so builds are reproducible). Long turns are split
into cues of at most 14 words at punctuation where possible, the way video-call
caption exports split sentences. Run: ``python demo_meetings/build.py``.
"""

from __future__ import annotations

import random
import re
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
MAX_WORDS = 14


def clock(seconds: float) -> str:
    ms = round(seconds * 1000)
    h, rest = divmod(ms, 3_600_000)
    m, rest = divmod(rest, 60_000)
    s, ms = divmod(rest, 1000)
    return f"{h:02d}:{m:02d}:{s:02d}.{ms:03d}"


def parse_clock(text: str) -> float:
    parts = [float(p) for p in text.strip().split(":")]
    while len(parts) < 3:
        parts.insert(0, 0.0)
    return parts[0] * 3600 + parts[1] * 60 + parts[2]


def split_cues(words: list[str]) -> list[list[str]]:
    """Split a turn into caption-sized chunks, preferring breaks after punctuation."""
    chunks: list[list[str]] = []
    while len(words) > MAX_WORDS:
        cut = MAX_WORDS
        for i in range(MAX_WORDS, 5, -1):
            if re.search(r"[,.;:?!]$", words[i - 1]):
                cut = i
                break
        chunks.append(words[:cut])
        words = words[cut:]
    if words:
        chunks.append(words)
    return chunks


def build(script: Path) -> str:
    rng = random.Random(script.stem)
    t = 3.0
    labels: dict[str, str] = {}
    rates: dict[str, float] = {}
    pause = 0.0
    out = ["WEBVTT", ""]
    n = 0
    for lineno, raw in enumerate(script.read_text(encoding="utf-8").splitlines(), 1):
        line = raw.strip()
        if not line or line.startswith("#"):
            continue
        if line.startswith("@start"):
            t = parse_clock(line.split(None, 1)[1])
            continue
        if line.startswith("@pause"):
            pause += float(line.split()[1])
            continue
        if line.startswith("@label"):
            name, label = (s.strip() for s in line.split(None, 1)[1].split("=", 1))
            labels[name] = label
            continue
        if ":" not in line:
            sys.exit(f"{script}:{lineno}: expected 'Speaker: text'")
        speaker, text = (s.strip() for s in line.split(":", 1))
        rate = rates.setdefault(speaker, rng.uniform(2.3, 2.9))
        t += pause + rng.uniform(0.25, 1.1)
        pause = 0.0
        for chunk in split_cues(text.split()):
            n += 1
            dur = max(0.6, len(chunk) / (rate * rng.uniform(0.9, 1.1)))
            label = labels.get(speaker, speaker)
            out += [str(n), f"{clock(t)} --> {clock(t + dur)}", f"<v {label}>{' '.join(chunk)}", ""]
            t += dur + rng.uniform(0.02, 0.2)
    return "\n".join(out)


def main() -> None:
    for script in sorted((HERE / "src").glob("*.txt")):
        target = HERE / f"{script.stem}.vtt"
        target.write_text(build(script), encoding="utf-8")
        print(f"wrote {target.relative_to(HERE.parent)}")


if __name__ == "__main__":
    main()
