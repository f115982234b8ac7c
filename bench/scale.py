"""End-to-end ``draft`` on long meetings, against the spaCy parse alone of the same text.

    .venv/bin/python bench/scale.py [--hours 1,3,10] [--evaldata ../shared/evaldata]

Long transcripts are built by playing the AMI and ICSI dev meetings one after
another (times shifted, cue ids made unique) until each length is reached, and
written as WebVTT. For each length, two child processes run side by side on the
same file: one only parses the utterances with the same spaCy pipeline
(``nlp.pipe``, as the tool does), the other runs the whole ``draft`` (read,
parse, segment, relay, final pass, Markdown + JSON render). Each child reports
its own wall time and peak memory (``ru_maxrss``). The script prints:

* whole run / parse alone (target: at most 1.5);
* time per hour of meeting at each length / at the first length (target: within 1.2);
* peak memory of the whole run (target for 10 hours: under 1.5 GiB).

A benchmark, not a test: it prints numbers, never pass/fail. The machine is
shared and noisy: compare ratios measured in the same run, not absolute times.
Meeting data: AMI Meeting Corpus and ICSI Meeting Corpus (CC BY 4.0), copied in
../shared/evaldata with their PROVENANCE.md.
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import tempfile
from dataclasses import replace
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

CHILD = r"""
import json, resource, sys, time
from pathlib import Path
mode, path = sys.argv[1], Path(sys.argv[2])
t0 = time.perf_counter()
if mode == "parse":
    from minutes import nlp
    from minutes.ingest import read_transcript
    utterances = read_transcript(path).utterances
    t0 = time.perf_counter()  # time the parse alone: reading is part of the tool's work
    nlp.parse(utterances)
else:
    from minutes.pipeline import draft
    from minutes.render import render
    minutes = draft(path)
    render(minutes, "md"); render(minutes, "json")
wall = time.perf_counter() - t0
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
print(json.dumps({"wall": wall, "peak": peak}))
"""


def build(hours: float, evaldata: Path, out: Path) -> tuple[float, int]:
    """Write a WebVTT file of about ``hours`` of meeting; return its duration and word count."""
    from minutes.asr import write_vtt
    from minutes.ingest import read_transcript
    from minutes.model import Transcript

    sources = sorted(evaldata.glob("ami/derived/*/transcript.vtt")) + sorted(
        evaldata.glob("icsi/derived/*/transcript.vtt"))
    if not sources:
        sys.exit(f"no dev meetings under {evaldata}")
    meetings = [read_transcript(p) for p in sources]
    utterances = []
    offset, turn = 0.0, 0
    while offset < hours * 3600:
        for m in meetings:
            for u in m.utterances:
                cues = tuple(replace(c, id=f"{turn}.{c.id}", start=c.start + offset,
                                     end=c.end + offset) for c in u.cues)
                utterances.append(replace(u, index=len(utterances), start=u.start + offset,
                                          end=u.end + offset, cues=cues))
            offset += m.duration + 10.0
            turn += 1
            if offset >= hours * 3600:
                break
    out.write_text(write_vtt(Transcript(tuple(utterances))), encoding="utf-8")
    return offset, sum(len(u.text.split()) for u in utterances)


def child(mode: str, path: Path) -> dict[str, float]:
    proc = subprocess.run([sys.executable, "-c", CHILD, mode, str(path)], capture_output=True,
                          text=True, cwd=ROOT, check=False)
    if proc.returncode != 0:
        sys.exit(f"{mode} run failed:\n{proc.stderr[-2000:]}")
    return json.loads(proc.stdout.strip().splitlines()[-1])  # type: ignore[no-any-return]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--hours", default="1,3,10")
    parser.add_argument("--evaldata", type=Path, default=ROOT.parent / "shared" / "evaldata")
    args = parser.parse_args()
    print(f"{'hours':>5} {'words':>7} | {'parse s':>8} {'whole s':>8} {'whole/parse':>11} | "
          f"{'s per hour':>10} {'vs first':>8} | {'peak MiB':>8} {'parse MiB':>9}")
    first = None
    with tempfile.TemporaryDirectory() as tmp:
        for hours in (float(h) for h in args.hours.split(",")):
            path = Path(tmp) / f"long_{hours:g}h.vtt"
            seconds, words = build(hours, args.evaldata, path)
            parse = child("parse", path)
            whole = child("draft", path)
            per_hour = whole["wall"] / (seconds / 3600)
            first = first or per_hour
            print(f"{seconds / 3600:>5.1f} {words:>7} | {parse['wall']:>8.1f} "
                  f"{whole['wall']:>8.1f} {whole['wall'] / parse['wall']:>11.2f} | "
                  f"{per_hour:>10.1f} {per_hour / first:>8.2f} | "
                  f"{whole['peak'] / 2**20:>8.0f} {parse['peak'] / 2**20:>9.0f}")


if __name__ == "__main__":
    main()
