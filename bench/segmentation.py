"""Score topic segmentation and the meeting summary on the AMI and ICSI dev meetings.

For every meeting in ``<evaldata>/ami/derived/*`` and ``<evaldata>/icsi/derived/*``:
read ``transcript.vtt`` with ``minutes.ingest.read_transcript`` (cues of one speaker
merge into utterances), parse once, segment, and map each segment's start time to
the first dialogue act starting at or after it. Pk and WindowDiff (Beeferman et
al. 1999; Pevzner & Hearst 2002; k = half the mean reference segment length) are
scored against the top-level topics (``topics.json``, depth "0"), beside two
baselines: no boundary at all, and a boundary every 5 minutes of recording time.
ROUGE-1 and ROUGE-L F (``rouge-score``, Porter stemmer) compare the overall
summary with the hand-written abstract (``summary.json``, section "abstract").

Data: AMI Meeting Corpus (Carletta et al. 2005) and ICSI Meeting Corpus (Janin et
al. 2003), both CC BY 4.0; see each folder's PROVENANCE.md.

Run: ``python bench/segmentation.py [--evaldata PATH] [--granularity G] ...``
"""

from __future__ import annotations

import argparse
import bisect
import json
import sys
import time
from dataclasses import dataclass, replace
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from minutes import nlp  # noqa: E402
from minutes.ingest import read_transcript  # noqa: E402
from minutes.keypoints import key_points, summarise  # noqa: E402
from minutes.metrics import labels_from_starts, pk, windowdiff  # noqa: E402
from minutes.segment import SegmentOptions, segment  # noqa: E402

BASELINE_EVERY = 300.0  # seconds between boundaries of the fixed-interval baseline


@dataclass(frozen=True)
class Score:
    """One meeting's figures."""

    meeting: str
    acts: int
    segments: int
    reference: int
    pk: float
    wd: float
    pk_none: float
    wd_none: float
    pk_fixed: float
    wd_fixed: float
    rouge1: float
    rougel: float
    parse_s: float
    segment_s: float


def meetings(evaldata: Path) -> list[Path]:
    """Return the dev meeting folders (those with a transcript and topics), AMI then ICSI."""
    found = []
    for corpus in ("ami", "icsi"):
        found += sorted(d for d in (evaldata / corpus / "derived").glob("*")
                        if (d / "transcript.vtt").is_file() and (d / "topics.json").is_file())
    return found


def act_starts(folder: Path) -> list[float]:
    """Return the start time of every dialogue act, in transcript order."""
    with (folder / "transcript.jsonl").open(encoding="utf-8") as f:
        return [json.loads(line)["start"] for line in f if line.strip()]


def to_acts(starts: list[float], times: list[float]) -> list[int]:
    """Return, for each time, the index of the first act starting at or after it."""
    return [bisect.bisect_left(starts, t) for t in times]


def score(folder: Path, options: SegmentOptions, scorer: object) -> Score:
    """Return the figures for one meeting."""
    transcript = read_transcript(folder / "transcript.vtt")
    t0 = time.perf_counter()
    parsed = nlp.parse(transcript.utterances)
    t1 = time.perf_counter()
    segments = segment(transcript, parsed, options)
    t2 = time.perf_counter()
    starts = act_starts(folder)
    n = len(starts)
    topics = json.loads((folder / "topics.json").read_text(encoding="utf-8"))
    reference = labels_from_starts(topics["reference_boundaries_by_depth"]["0"], n)
    hypothesis = labels_from_starts(to_acts(starts, [s.start for s in segments[1:]]), n)
    none = [0] * n
    ticks = [BASELINE_EVERY * m for m in range(1, int(starts[-1] // BASELINE_EVERY) + 1)]
    fixed = labels_from_starts(to_acts(starts, ticks), n)
    segments = tuple(replace(s, points=key_points(s, parsed)) for s in segments)
    summary = " ".join(p.text for p in summarise(segments, parsed))
    abstract = json.loads((folder / "summary.json").read_text(encoding="utf-8"))
    gold = " ".join(s["text"] for s in abstract["sections"].get("abstract", []))
    rouge = scorer.score(gold, summary)  # type: ignore[attr-defined]
    return Score(folder.name, n, len(segments), len(set(reference)), pk(reference, hypothesis),
                 windowdiff(reference, hypothesis), pk(reference, none),
                 windowdiff(reference, none), pk(reference, fixed), windowdiff(reference, fixed),
                 rouge["rouge1"].fmeasure, rouge["rougeL"].fmeasure, t1 - t0, t2 - t1)


def main(argv: list[str] | None = None) -> int:
    """Print the per-meeting table and the means; return the exit status."""
    defaults = SegmentOptions()
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--evaldata", type=Path, default=ROOT.parent / "shared" / "evaldata",
                    help="folder holding ami/ and icsi/ (default: ../shared/evaldata)")
    ap.add_argument("--granularity", type=float, default=defaults.granularity)
    ap.add_argument("--speaker-weight", type=float, default=defaults.speaker_weight,
                    help="0 scores words alone")
    ap.add_argument("--window", type=float, default=defaults.window)
    ap.add_argument("--max-words", type=int, default=defaults.max_words)
    ap.add_argument("--max-duration", type=float, default=defaults.max_duration)
    args = ap.parse_args(argv)
    folders = meetings(args.evaldata)
    if not folders:
        print(f"no AMI/ICSI meetings found under {args.evaldata}; pass --evaldata PATH",
              file=sys.stderr)
        return 1
    from rouge_score import rouge_scorer

    scorer = rouge_scorer.RougeScorer(["rouge1", "rougeL"], use_stemmer=True)
    options = replace(defaults, granularity=args.granularity, speaker_weight=args.speaker_weight,
                      window=args.window, max_words=args.max_words,
                      max_duration=args.max_duration)
    print(f"options: {options}")
    head = (f"{'meeting':9} {'acts':>5} {'segs':>4} {'ref':>3} | {'Pk':>5} {'WD':>5} | "
            f"{'none Pk':>7} {'WD':>5} | {'5min Pk':>7} {'WD':>5} | {'R-1':>5} {'R-L':>5} | "
            f"{'parse s':>7} {'seg s':>6}")
    print(head)
    print("-" * len(head))
    rows = []
    for folder in folders:
        r = score(folder, options, scorer)
        rows.append(r)
        print(f"{r.meeting:9} {r.acts:5d} {r.segments:4d} {r.reference:3d} | {r.pk:5.3f} "
              f"{r.wd:5.3f} | {r.pk_none:7.3f} {r.wd_none:5.3f} | {r.pk_fixed:7.3f} "
              f"{r.wd_fixed:5.3f} | {r.rouge1:5.3f} {r.rougel:5.3f} | {r.parse_s:7.2f} "
              f"{r.segment_s:6.3f}", flush=True)

    def mean(name: str) -> float:
        return sum(getattr(r, name) for r in rows) / len(rows)

    print("-" * len(head))
    print(f"{'mean':9} {'':5} {'':4} {'':3} | {mean('pk'):5.3f} {mean('wd'):5.3f} | "
          f"{mean('pk_none'):7.3f} {mean('wd_none'):5.3f} | {mean('pk_fixed'):7.3f} "
          f"{mean('wd_fixed'):5.3f} | {mean('rouge1'):5.3f} {mean('rougel'):5.3f} | "
          f"{sum(r.parse_s for r in rows):7.2f} {sum(r.segment_s for r in rows):6.3f}")
    print(f"segmenting took {sum(r.segment_s for r in rows) / sum(r.parse_s for r in rows):.1%} "
          "of the time of the spaCy parse it shares with the relay")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
