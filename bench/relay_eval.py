"""Score the relay's rules reader on AMI and ICSI meetings: decisions, actions, owners, speed.

Data: ``../shared/evaldata/{ami,icsi}/derived/<meeting>/`` (see its README and
PROVENANCE.md). AMI Meeting Corpus, CC BY 4.0, Carletta et al. (2005) "The AMI
Meeting Corpus: A Pre-announcement"; ICSI Meeting Corpus, CC BY 4.0, Janin et
al. (2003) "The ICSI Meeting Corpus". We use the hand-written abstractive
summaries (decision and action sentences) with their links to dialogue acts,
and the AMI roles as inferred in ``speaker_roles_inferred.json``.

Scoring (item level): a predicted item is correct when one of its evidence cues
is a dialogue act linked to a gold sentence of the same kind, or lies within 15
seconds of one; a gold sentence is found when some predicted item matches it.
Gold sentences with no linked act ("NA.", and a few others) cannot be matched
and are left out; their number is printed. Precision of a meeting with no
prediction is 0. Beside the reader: a keyword baseline (acts with
"decide/agree" are decisions, acts with "I'll/will" are actions), ROUGE-1 of
the decision texts against the gold decision sentences (``rouge-score``), owner
accuracy on matched AMI actions, and the time of the whole chain (parse,
segment, relay) on a 3-hour transcript.

Run: ``.venv/bin/python bench/relay_eval.py [--meetings ES2002a,Bed003] [--no-speed]``
"""

from __future__ import annotations

import argparse
import json
import re
import statistics
import sys
import time
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from minutes.model import Cue, Evidence, Ledger, MeetingInfo, Person, Segment, Transcript, Utterance  # noqa: E402
from minutes.speakers import Directory  # noqa: E402

EVALDATA = ROOT.parent / "shared" / "evaldata"
WINDOW = 15.0  # seconds: an evidence cue this close to a linked act counts
AMI_ROLES = {  # role names as AMI participants and annotators say them (from the corpus text)
    "Project Manager": ("project manager", "PM", "P_M_", "P_M", "manager"),
    "Marketing": ("marketing", "marketing expert", "marketing executive", "marketer"),
    "User Interface": ("user interface", "user interface designer", "interface designer", "UI",
                       "U_I_", "U_I", "user interface expert", "U_I_D_", "U_I_D", "UID"),
    "Industrial Designer": ("industrial designer", "industrial design", "ID", "I_D_", "I_D"),
}
ROLE_IN_GOLD = (  # (pattern in a gold action sentence, role); "the group" -> nobody in particular
    (re.compile(r"\b(?:[Ii]ndustrial [Dd]esigner|ID)\b"), "Industrial Designer"),
    (re.compile(r"\b(?:[Uu]ser [Ii]nterface|UI)\b"), "User Interface"),
    (re.compile(r"\b[Mm]arketing\b"), "Marketing"),
    (re.compile(r"\b(?:[Pp]roject [Mm]anager|PM)\b"), "Project Manager"),
)
GROUP_IN_GOLD = re.compile(r"^(?:the group|all members|they|everyone|the team|all)\b", re.I)
BASE_DECISION = re.compile(r"\b(?:decide[ds]?|deciding|decision|agree[ds]?|agreed)\b", re.I)
BASE_ACTION = re.compile(r"\b(?:i'll|i will|will)\b", re.I)


@dataclass(frozen=True)
class Gold:
    """One gold sentence and the acts linked to it."""

    text: str
    acts: tuple[tuple[str, float, float, str], ...]  # (da_id, start, end, speaker)


@dataclass(frozen=True)
class Meeting:
    name: str
    corpus: str
    transcript: Transcript
    decisions: tuple[Gold, ...]
    actions: tuple[Gold, ...]
    unlinked: int
    roles: dict[str, str]  # role -> channel letter (AMI only)


# --------------------------------------------------------------------------- loading


def transcript_of(folder: Path) -> Transcript:
    """Return the meeting's transcript from its WebVTT file (the ingest stage), else the JSONL."""
    try:
        from minutes.ingest import read_transcript
    except ImportError:  # ingest not there yet: one cue per act, same-speaker acts merged
        return _from_jsonl(folder / "transcript.jsonl")
    return read_transcript(folder / "transcript.vtt")


def _from_jsonl(path: Path) -> Transcript:
    acts = [json.loads(line) for line in path.read_text(encoding="utf-8").splitlines() if line]
    acts.sort(key=lambda a: a["start"])
    groups: list[list[dict]] = []
    for act in acts:
        if groups and groups[-1][-1]["speaker"] == act["speaker"] and \
                act["start"] - max(a["end"] for a in groups[-1]) <= 2.0:
            groups[-1].append(act)
        else:
            groups.append([act])
    utterances = []
    for i, group in enumerate(groups):
        cues = tuple(Cue(a["da_id"], a["start"], a["end"], a["text"]) for a in group)
        utterances.append(Utterance(i, group[0]["start"], max(a["end"] for a in group),
                                    group[0]["speaker"], " ".join(a["text"] for a in group),
                                    cues, group[0]["speaker"]))
    return Transcript(tuple(utterances), source=str(path), format="json")


def _gold(sentences: Iterable[dict]) -> tuple[tuple[Gold, ...], int]:
    out, unlinked = [], 0
    for s in sentences:
        if s["text"].strip().rstrip(".").upper() == "NA":
            continue
        acts = tuple((d["da_id"], d["start"], d["end"], d["speaker"]) for d in s["linked_das"])
        if not acts:
            unlinked += 1
            continue
        out.append(Gold(s["text"], acts))
    return tuple(out), unlinked


def load(corpus: str, name: str) -> Meeting:
    """Return one meeting with its gold sentences."""
    folder = EVALDATA / corpus / "derived" / name
    summary = json.loads((folder / "summary.json").read_text(encoding="utf-8"))
    sections = summary["sections"]
    decisions, u1 = _gold(sections.get("decisions", []))
    actions, u2 = _gold(sections.get("actions", []))
    roles: dict[str, str] = {}
    if corpus == "ami":
        table = json.loads((EVALDATA / "ami" / "derived" / "speaker_roles_inferred.json")
                           .read_text(encoding="utf-8"))
        roles = {role: v["letter"] for role, v in table[name]["role_to_letter"].items()}
    transcript = transcript_of(folder)
    return Meeting(name, corpus, transcript, decisions, actions, u1 + u2, roles)


def directory_of(meeting: Meeting) -> Directory:
    """Return AMI's roles as speaker profiles (the letter is the name, roles are aliases)."""
    people = tuple(Person(letter, role=role.lower(), aliases=AMI_ROLES.get(role, ()))
                   for role, letter in sorted(meeting.roles.items(), key=lambda kv: kv[1]))
    return Directory(people)


def all_meetings() -> list[tuple[str, str]]:
    """Return (corpus, meeting) for every derived meeting."""
    out = []
    for corpus in ("ami", "icsi"):
        base = EVALDATA / corpus / "derived"
        out += [(corpus, p.name) for p in sorted(base.iterdir()) if (p / "summary.json").is_file()]
    return out


# --------------------------------------------------------------------------- running


def fixed_segments(transcript: Transcript, size: int = 60) -> tuple[Segment, ...]:
    """Return segments of ``size`` utterances (when ``minutes.segment`` is not available)."""
    us = transcript.utterances
    out = []
    for n, a in enumerate(range(0, len(us), size)):
        part = us[a : a + size]
        out.append(Segment(n, a, a + len(part) - 1, part[0].start, part[-1].end, tuple(part)))
    return tuple(out)


def segments_of(transcript: Transcript, parsed: object) -> tuple[Segment, ...]:
    """Return the segmenter's segments, or a fixed split when it is not available."""
    try:
        from minutes.segment import segment
    except ImportError:
        return fixed_segments(transcript)
    return segment(transcript, parsed)  # type: ignore[arg-type]


def run(transcript: Transcript, directory: Directory) -> Ledger:
    """Return the reconciled ledger of a transcript: parse, segment, relay, reconcile."""
    from minutes import nlp
    from minutes.relay.context import ReadContext
    from minutes.relay.ledger import relay
    from minutes.relay.reconcile import reconcile
    from minutes.relay.rules import RulesReader

    parsed = nlp.parse(transcript.utterances)
    ctx = ReadContext(transcript, parsed, directory)
    result = relay(segments_of(transcript, parsed), RulesReader(ctx))
    return reconcile(result.ledger, ctx)


# --------------------------------------------------------------------------- scoring


def _near(ev: Evidence, act: tuple[str, float, float, str]) -> bool:
    da, start, end, _ = act
    if ev.cue == da:
        return True
    gap = max(start - ev.end, ev.start - end, 0.0)
    return gap <= WINDOW


def matches(evidence: Sequence[Evidence], gold: Gold) -> bool:
    """Return True when some evidence is a linked act or within the window of one."""
    return any(_near(ev, act) for ev in evidence for act in gold.acts)


@dataclass(frozen=True)
class Score:
    precision: float
    recall: float
    f1: float
    predicted: int
    gold: int


def score(predicted: Sequence[Sequence[Evidence]], gold: Sequence[Gold]) -> Score:
    """Return item-level precision, recall and F1 of predicted items against gold sentences."""
    if not gold:
        return Score(0.0, 0.0, 0.0, len(predicted), 0)
    right = sum(1 for ev in predicted if any(matches(ev, g) for g in gold))
    found = sum(1 for g in gold if any(matches(ev, g) for ev in predicted))
    p = right / len(predicted) if predicted else 0.0
    r = found / len(gold)
    f = 2 * p * r / (p + r) if p + r else 0.0
    return Score(p, r, f, len(predicted), len(gold))


def baseline(transcript: Transcript, pattern: re.Pattern[str]) -> list[list[Evidence]]:
    """Return one item per act (cue) that matches the keyword pattern."""
    out = []
    for u in transcript.utterances:
        for cue in u.cues:
            if pattern.search(cue.text.replace("’", "'")):
                out.append([Evidence(u.index, cue.id, cue.start, cue.end, u.speaker, cue.text)])
    return out


def rouge1(predicted: Sequence[str], gold: Sequence[str]) -> float:
    """Return ROUGE-1 F of all predicted texts against all gold sentences (one meeting)."""
    from rouge_score import rouge_scorer

    if not predicted or not gold:
        return 0.0
    scorer = rouge_scorer.RougeScorer(["rouge1"], use_stemmer=True)
    return scorer.score(" ".join(gold), " ".join(predicted))["rouge1"].fmeasure


def gold_owners(gold: Gold, roles: dict[str, str]) -> set[str | None]:
    """Return the channel letters a gold action sentence names (None: the whole group)."""
    found: set[str | None] = set()
    for pattern, role in ROLE_IN_GOLD:
        if pattern.search(gold.text) and role in roles:
            found.add(roles[role])
    if not found or GROUP_IN_GOLD.search(gold.text):
        found.add(None)
    return found


def owner_hits(ledger: Ledger, meeting: Meeting) -> tuple[int, int]:
    """Return (right owner, matched) over predicted actions that match a gold sentence."""
    right = total = 0
    for item in ledger.actions:
        golds = [g for g in meeting.actions if matches(item.evidence, g)]
        if not golds:
            continue
        total += 1
        if any(item.owner in gold_owners(g, meeting.roles) for g in golds):
            right += 1
    return right, total


# --------------------------------------------------------------------------- report


def evaluate(names: Sequence[tuple[str, str]] | None = None, *, verbose: bool = True,
             no_profiles: bool = True) -> dict:
    """Return the figures for the given meetings (all by default), printing a table."""
    rows = []
    for corpus, name in names or all_meetings():
        meeting = load(corpus, name)
        directory = directory_of(meeting)
        ledger = run(meeting.transcript, directory)
        dec = score([d.evidence for d in ledger.decisions], meeting.decisions)
        act = score([a.evidence for a in ledger.actions], meeting.actions)
        bdec = score(baseline(meeting.transcript, BASE_DECISION), meeting.decisions)
        bact = score(baseline(meeting.transcript, BASE_ACTION), meeting.actions)
        r1 = rouge1([d.text for d in ledger.decisions], [g.text for g in meeting.decisions])
        r1b = rouge1([e[0].quote for e in baseline(meeting.transcript, BASE_DECISION)],
                     [g.text for g in meeting.decisions])
        owners = owner_hits(ledger, meeting) if corpus == "ami" else (0, 0)
        plain_owners = (0, 0)
        if corpus == "ami" and no_profiles:  # the same, no profiles: owners are letters only
            plain_owners = owner_hits(run(meeting.transcript, Directory()), meeting)
        rows.append(dict(name=name, corpus=corpus, dec=dec, act=act, bdec=bdec, bact=bact,
                         r1=r1, r1b=r1b, owners=owners, plain_owners=plain_owners,
                         unlinked=meeting.unlinked, ledger=ledger, meeting=meeting))
        if verbose:
            print(f"{name:8} dec P {dec.precision:.2f} R {dec.recall:.2f} F {dec.f1:.2f} "
                  f"({dec.predicted:2d}/{dec.gold}) base F {bdec.f1:.2f} ({bdec.predicted:3d}) | "
                  f"act P {act.precision:.2f} R {act.recall:.2f} F {act.f1:.2f} "
                  f"({act.predicted:2d}/{act.gold}) base F {bact.f1:.2f} ({bact.predicted:3d}) | "
                  f"R1 {r1:.2f}/{r1b:.2f} | owners {owners[0]}/{owners[1]}", flush=True)
    dec_rows = [r for r in rows if r["dec"].gold]
    act_rows = [r for r in rows if r["act"].gold]

    def mean(key: str, rs: list[dict], field: str = "f1") -> float:
        return statistics.fmean(getattr(r[key], field) for r in rs) if rs else 0.0

    owner_right = sum(r["owners"][0] for r in rows)
    owner_total = sum(r["owners"][1] for r in rows)
    plain_right = sum(r["plain_owners"][0] for r in rows)
    plain_total = sum(r["plain_owners"][1] for r in rows)
    figures = {
        "decisions_f1": mean("dec", dec_rows), "decisions_p": mean("dec", dec_rows, "precision"),
        "decisions_r": mean("dec", dec_rows, "recall"),
        "decisions_base_f1": mean("bdec", dec_rows),
        "actions_f1": mean("act", act_rows), "actions_p": mean("act", act_rows, "precision"),
        "actions_r": mean("act", act_rows, "recall"), "actions_base_f1": mean("bact", act_rows),
        "rouge1": statistics.fmean(r["r1"] for r in dec_rows) if dec_rows else 0.0,
        "rouge1_base": statistics.fmean(r["r1b"] for r in dec_rows) if dec_rows else 0.0,
        "owner_accuracy": owner_right / owner_total if owner_total else 0.0,
        "owner_matched": owner_total,
        "owner_accuracy_no_profiles": plain_right / plain_total if plain_total else 0.0,
        "meetings_decisions": len(dec_rows), "meetings_actions": len(act_rows),
        "unlinked_gold": sum(r["unlinked"] for r in rows), "rows": rows,
    }
    if verbose:
        f = figures
        print(f"\nmean over {f['meetings_decisions']} meetings, decisions: "
              f"P {f['decisions_p']:.3f} R {f['decisions_r']:.3f} F1 {f['decisions_f1']:.3f} "
              f"(keyword baseline F1 {f['decisions_base_f1']:.3f})")
        print(f"mean over {f['meetings_actions']} AMI meetings, actions: "
              f"P {f['actions_p']:.3f} R {f['actions_r']:.3f} F1 {f['actions_f1']:.3f} "
              f"(keyword baseline F1 {f['actions_base_f1']:.3f})")
        print(f"ROUGE-1 F of decision texts: {f['rouge1']:.3f} "
              f"(baseline acts {f['rouge1_base']:.3f})")
        print(f"owner accuracy on matched AMI actions: {f['owner_accuracy']:.3f} of "
              f"{owner_total} (role profiles); {f['owner_accuracy_no_profiles']:.3f} of "
              f"{plain_total} (no profiles)")
        print(f"gold sentences with no linked act, left out: {f['unlinked_gold']}")
        for corpus in ("ami", "icsi"):
            rs = [r for r in dec_rows if r["corpus"] == corpus]
            if rs:
                print(f"decisions F1, {corpus.upper()} only ({len(rs)} meetings): "
                      f"{mean('dec', rs):.3f}")
        # how much one meeting moves the mean: the samples are small (1-8 gold items each)
        for key, rs in (("dec", dec_rows), ("act", act_rows)):
            if len(rs) > 1:
                loo = [mean(key, [r for r in rs if r is not left]) for left in rs]
                print(f"{'decisions' if key == 'dec' else 'actions'} F1 with one meeting left "
                      f"out: {min(loo):.3f}-{max(loo):.3f}")
    return figures


def long_transcript(words: int) -> Transcript:
    """Return the dev meetings laid end to end until the transcript has ``words`` words."""
    out: list[Utterance] = []
    offset = 0.0
    total = 0
    while total < words:
        for corpus, name in all_meetings():
            t = transcript_of(EVALDATA / corpus / "derived" / name)
            for u in t.utterances:
                if total >= words:
                    break
                cues = tuple(replace(c, start=c.start + offset, end=c.end + offset) for c in u.cues)
                out.append(replace(u, index=len(out), start=u.start + offset, end=u.end + offset,
                                   cues=cues, speaker=f"{name}-{u.speaker}"))
                total += len(u.text.split())
            offset = out[-1].end + 5.0
            if total >= words:
                break
    return Transcript(tuple(out), meeting=MeetingInfo(title="long"))


def speed(words: int = 27_000) -> None:
    """Print the time of parse + segment + relay + reconcile at 1/3, 2/3 and all of ``words``."""
    from minutes import nlp

    nlp.load()  # loading the pipeline is a one-off cost, not part of the run
    full = long_transcript(words)
    print(f"\nspeed: {len(full.utterances)} utterances, "
          f"{sum(len(u.text.split()) for u in full.utterances)} words, "
          f"{full.duration / 3600:.2f} h of meetings")
    base = None
    for part in (1, 2, 3):
        n = len(full.utterances) * part // 3
        t = Transcript(full.utterances[:n], meeting=full.meeting)
        w = sum(len(u.text.split()) for u in t.utterances)
        t0 = time.perf_counter()
        parsed = nlp.parse(t.utterances)
        t1 = time.perf_counter()
        from minutes.relay.context import ReadContext
        from minutes.relay.ledger import relay
        from minutes.relay.reconcile import reconcile
        from minutes.relay.rules import RulesReader

        segs = segments_of(t, parsed)
        t2 = time.perf_counter()
        ctx = ReadContext(t, parsed, Directory())
        reconcile(relay(segs, RulesReader(ctx)).ledger, ctx)
        t3 = time.perf_counter()
        per = (t3 - t0) / w * 1000
        base = base or per
        print(f"  {w:6d} words: parse {t1 - t0:5.2f} s, segment {t2 - t1:4.2f} s, "
              f"relay {t3 - t2:4.2f} s, total {t3 - t0:5.2f} s "
              f"({per:.3f} ms/word, x{per / base:.2f} of the first third)")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--meetings", default="", help="comma-separated meeting names (default all)")
    ap.add_argument("--no-speed", action="store_true", help="skip the 3-hour timing")
    args = ap.parse_args()
    names = None
    if args.meetings:
        wanted = set(args.meetings.split(","))
        names = [(c, n) for c, n in all_meetings() if n in wanted]
    evaluate(names)
    if not args.no_speed:
        speed()


if __name__ == "__main__":
    main()
