"""Speed and memory of minutes' speech recognition against bare faster-whisper, same settings.

    .venv/bin/python bench/asr.py [--rtf-minutes 3] [--lengths 10,30,60] [--bare-lengths 10]
                                  [--roads minutes,glibc,bare] [--beam 5] [--threads 0]
                                  [--repeats 2] [--workdir DIR] [--skip-memory]

1. Real-time factor, side by side in one process: one loaded model; ``minutes.asr.transcribe``
   and bare ``WhisperModel.transcribe`` (int8, same beam, language, VAD, word timestamps) on
   the same synthetic file, alternating, ``--repeats`` times each; prints the best and the
   median RTF (seconds of work per second of audio) of each and their ratio (target <= 1.10).
2. Peak memory as length grows: each length runs in a fresh child process per road
   (``ru_maxrss`` of the child), so nothing one run allocated hides in the next, with each
   peak's ratio to the same road's peak at the first length (flat: about 1.0). minutes
   decodes and recognises 5-minute windows (``--chunk``) with glibc's mmap threshold fixed
   (``backend.bound_heap``); road ``glibc`` is minutes without that bound, as before the fix,
   whose heap fragments and grows window by window; bare faster-whisper decodes and
   featurises the whole file, so its peak grows.

Speech is made with espeak-ng (two voices, ``-s 165``) from a script of our own, repeated with
1.0 s and 2.5 s silences up to each length. Benchmark, not a test: numbers, never pass/fail.
The machine's load average is printed before and after: on shared machines timings are noisy.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
import wave
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from minutes.asr import AsrOptions, WhisperRecognizer, ensure_model, transcribe  # noqa: E402

SCRIPT = [  # ours, invented for this benchmark
    ("en-us", "Good morning everyone. Let us begin with the first item on the agenda, which is "
              "the budget for the new library building."),
    ("en-gb+f3", "Thank you. I would like to propose that we approve the budget as presented "
                 "today, and that the project team reports back before the next meeting."),
    ("en-us", "Is there any objection to that proposal? Hearing none, the budget is approved."),
    ("en-gb+f3", "The staffing plan for the summer is in your packet. We need two more people "
                 "at the front desk on weekends."),
    ("en-us", "Could the treasurer confirm that the money for those positions is already set "
              "aside?"),
    ("en-gb+f3", "Yes, it is. The amount was included in the spring review, so no further vote "
                 "is needed."),
]
RATE = 22_050  # espeak-ng's output rate


def norm(text: str) -> str:
    return " ".join(re.sub(r"[^\w\s']", " ", text.lower()).split())


def make_parts(workdir: Path) -> list[tuple[np.ndarray, str]]:
    """Return each scripted sentence as int16 samples, spoken by espeak-ng."""
    if shutil.which("espeak-ng") is None:
        sys.exit("espeak-ng is not installed (apt-get install espeak-ng)")
    parts = []
    for i, (voice, text) in enumerate(SCRIPT):
        path = workdir / f"part{i}.wav"
        subprocess.run(["espeak-ng", "-v", voice, "-s", "165", "-w", str(path), text],
                       check=True)
        with wave.open(str(path)) as src:
            assert src.getframerate() == RATE and src.getnchannels() == 1
            parts.append((np.frombuffer(src.readframes(src.getnframes()), "<i2"), text))
    return parts


def make_file(parts: list[tuple[np.ndarray, str]], minutes: float, path: Path) -> str:
    """Write about ``minutes`` of speech to ``path``; return the script spoken in it."""
    gaps = [np.zeros(int(RATE * s), "<i2") for s in (1.0, 2.5)]
    want = int(minutes * 60 * RATE)
    written, k, texts = 0, 0, []
    with wave.open(str(path), "wb") as out:
        out.setnchannels(1)
        out.setsampwidth(2)
        out.setframerate(RATE)
        while written < want:
            audio, text = parts[k % len(parts)]
            gap = gaps[(k // len(parts)) % 2 if k % 3 else 1]
            out.writeframes(audio.tobytes() + gap.tobytes())
            written += len(audio) + len(gap)
            texts.append(text)
            k += 1
    return " ".join(texts)


def bare(model: object, path: Path, options: AsrOptions) -> str:
    segments, _ = model.transcribe(  # type: ignore[attr-defined]
        str(path), language=options.language, beam_size=options.beam_size,
        vad_filter=options.vad, word_timestamps=options.word_timestamps)
    return " ".join(s.text.strip() for s in segments)


def ours(recognizer: WhisperRecognizer, path: Path, options: AsrOptions) -> str:
    t = transcribe(path, options, recognizer=recognizer)
    return " ".join(u.text for u in t.utterances)


def wer(reference: str, hypothesis: str) -> float | None:
    try:
        import jiwer
    except ImportError:
        return None
    return float(jiwer.wer(norm(reference), norm(hypothesis)))


def _pct(value: float | None) -> str:
    return "n/a" if value is None else f"{100 * value:.1f}%"


def child(road: str, path: Path, beam: int, threads: int, chunk: float) -> None:
    """Run one transcription and print its timings and this process's peak memory as JSON."""
    options = AsrOptions(beam_size=beam, threads=threads, chunk_seconds=chunk)
    if road == "glibc":  # minutes with glibc's own heap policy: the behaviour before the fix
        from minutes.asr import backend
        backend.bound_heap = lambda: False  # type: ignore[assignment]
    t0 = time.perf_counter()
    recognizer = WhisperRecognizer(ensure_model(), threads)
    loaded = time.perf_counter()
    cpu0 = resource.getrusage(resource.RUSAGE_SELF)
    text = (bare(recognizer.model, path, options) if road == "bare"
            else ours(recognizer, path, options))
    done = time.perf_counter()
    usage = resource.getrusage(resource.RUSAGE_SELF)
    print(json.dumps({"load_s": loaded - t0, "work_s": done - loaded,
                      "cpu_s": usage.ru_utime + usage.ru_stime - cpu0.ru_utime - cpu0.ru_stime,
                      "peak_mib": usage.ru_maxrss / 1024, "text": text}))


def run_child(road: str, path: Path, beam: int, threads: int, chunk: float) -> dict:
    out = subprocess.run([sys.executable, __file__, "--child", road, str(path), "--beam",
                          str(beam), "--threads", str(threads), "--chunk", str(chunk)],
                         check=True, capture_output=True, text=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def duration(path: Path) -> float:
    with wave.open(str(path)) as src:
        return src.getnframes() / src.getframerate()


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--rtf-minutes", type=float, default=3.0, help="0 skips the RTF runs")
    ap.add_argument("--lengths", default="10,30,60", help="minutes, for the memory runs")
    ap.add_argument("--roads", default="minutes,glibc,bare",
                    help="memory runs: minutes; glibc (minutes without its heap bound, as "
                         "before the fix); bare (faster-whisper on the whole file)")
    ap.add_argument("--bare-lengths", default="10",
                    help="the lengths bare faster-whisper runs too (its peak grows; saves time)")
    ap.add_argument("--beam", type=int, default=5)
    ap.add_argument("--threads", type=int, default=0)
    ap.add_argument("--chunk", type=float, default=AsrOptions().chunk_seconds,
                    help="minutes' window length in seconds")
    ap.add_argument("--repeats", type=int, default=2)
    ap.add_argument("--workdir", type=Path)
    ap.add_argument("--skip-memory", action="store_true")
    ap.add_argument("--child", nargs=2, metavar=("ROAD", "PATH"), help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.child:
        child(args.child[0], Path(args.child[1]), args.beam, args.threads, args.chunk)
        return

    workdir = args.workdir or Path(tempfile.mkdtemp(prefix="minutes-bench-asr-"))
    workdir.mkdir(parents=True, exist_ok=True)
    print(f"cores usable: {len(os.sched_getaffinity(0))}  load average before: "
          f"{' '.join(f'{x:.2f}' for x in os.getloadavg())}")
    parts = make_parts(workdir)
    options = AsrOptions(beam_size=args.beam, threads=args.threads, chunk_seconds=args.chunk)
    print(f"settings: int8, beam {args.beam}, language en, VAD on, word timestamps on, "
          f"threads {args.threads or 'all'}; minutes' windows {args.chunk:g} s")

    if args.rtf_minutes > 0:
        side_by_side(args, parts, options, workdir)
    if not args.skip_memory:
        memory(args, parts, workdir)
    print(f"\nload average after: {' '.join(f'{x:.2f}' for x in os.getloadavg())}")


def side_by_side(args: argparse.Namespace, parts: list[tuple[np.ndarray, str]],
                 options: AsrOptions, workdir: Path) -> None:
    """Print the RTF of both roads on one file, alternating, with one loaded model."""
    path = workdir / "rtf.wav"
    script = make_file(parts, args.rtf_minutes, path)
    length = duration(path)
    recognizer = WhisperRecognizer(ensure_model(), args.threads)
    times: dict[str, list[float]] = {"minutes": [], "bare": []}
    texts: dict[str, str] = {}
    warm = workdir / "warm.wav"
    make_file(parts, 0.3, warm)
    ours(recognizer, warm, options)  # first-call costs (VAD session, allocator) off the clock
    bare(recognizer.model, warm, options)
    for i in range(args.repeats):
        order = ("minutes", "bare") if i % 2 == 0 else ("bare", "minutes")
        for road in order:
            t0 = time.perf_counter()
            texts[road] = (ours(recognizer, path, options) if road == "minutes"
                           else bare(recognizer.model, path, options))
            times[road].append(time.perf_counter() - t0)
    print(f"\nreal-time factor on {length / 60:.1f} min, {args.repeats} runs each, alternating:")
    for road in ("minutes", "bare"):
        print(f"  {road:8s} best {min(times[road]) / length:.3f}  median "
              f"{statistics.median(times[road]) / length:.3f}  WER vs script "
              f"{_pct(wer(script, texts[road]))}")
    print(f"  ratio minutes/bare: best {min(times['minutes']) / min(times['bare']):.3f}  "
          f"median {statistics.median(times['minutes']) / statistics.median(times['bare']):.3f}")



def memory(args: argparse.Namespace, parts: list[tuple[np.ndarray, str]], workdir: Path) -> None:
    """Print each road's peak memory, one fresh child process per length, with its growth."""
    print("\npeak memory, one fresh child process per run (model load included); x first: the "
          "peak over the same road's peak at the first length:")
    print(f"  {'length':>8s} {'road':8s} {'peak MiB':>9s} {'x first':>8s} {'RTF':>6s} "
          f"{'cores':>6s} {'WER':>6s}")
    first: dict[str, float] = {}
    chosen = [r for r in args.roads.split(",") if r]
    for minutes in (float(x) for x in args.lengths.split(",")):
        path = workdir / f"long{minutes:g}.wav"
        script = make_file(parts, minutes, path)
        length = duration(path)
        roads = [r for r in chosen if r != "bare"]
        if "bare" in chosen and minutes in {float(x) for x in args.bare_lengths.split(",") if x}:
            roads.append("bare")
        for road in roads:
            r = run_child(road, path, args.beam, args.threads, args.chunk)
            first.setdefault(road, r["peak_mib"])
            print(f"  {length / 60:6.1f} m {road:8s} {r['peak_mib']:9.0f} "
                  f"{r['peak_mib'] / first[road]:8.2f} {r['work_s'] / length:6.3f} "
                  f"{r['cpu_s'] / r['work_s']:6.2f} {_pct(wer(script, r['text'])):>6s}",
                  flush=True)
        path.unlink()


if __name__ == "__main__":
    main()
