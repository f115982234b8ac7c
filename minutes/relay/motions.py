"""Motions and votes: the deliberative-body reader of the relay.

Interface (what the pipeline calls)::

    MotionReader(ctx)              a SegmentReader, name "motions"; run it in ``Combined``
        .read(ledger, segment)     -> list[Op]: Add(Motion) and Update(motion id, Change)
    settle(ledger, ctx)            -> Ledger at the end of the meeting: outcomes computed from
                                   tallies where no result was announced, flags for the clerk;
                                   a motion never voted on stays "pending"
    tally_outcome(vote, motion, roster) -> (outcome or None, the rule in words)

Helpers (also used by ``minutes.procedure``): ``units(transcript)`` -> sentence ``Unit``s
with their evidence, ``resolve_name(directory, "Director Ramirez")``, ``answer_of(unit)``
("aye"/"no"/"abstain"/"present"), ``counts_in(text)`` -> (for, against, abstain),
``figures(text)`` (spoken sums, dates and hours as figures), ``clean(text)`` (fillers out).

Run it as ``Combined((RulesReader(ctx), MotionReader(ctx), ProcedureReader(ctx)))``; changes
carry ``source="rules"``.

What it reads, sentence by sentence, in order:

- moved: "I move that...", "I'll make a motion to...", "I move we...", "Motion to...";
  "so moved" after the chair's "do I have a motion to X?" (the text is X);
- seconded: "Second.", "I'll second that", "Seconded."; the chair's "moved by X, seconded
  by Y" (names resolved through the directory);
- amendments (kind "amendment", ``amends`` = the motion on the floor; when one carries the
  motion it amends gets Change "amended" with the new wording), subsidiary motions to
  postpone, table or refer (when one carries, the motion it applies to gets Change
  "postponed" / "tabled" / "referred" whose value is the date, meeting or committee), and
  withdrawal by the mover;
- votes: voice ("all in favor... aye... opposed... abstentions": heard, not counted, so the
  counts stay None unless someone states them), counted ("carries five to two", "four in
  favor, two opposed, one abstention"), roll calls (each name the secretary calls and the
  answer given, names resolved through the directory, counts computed from them), and
  unanimous consent ("without objection, so ordered");
- the result: the chair's announcement, else computed from the tally against the threshold
  the roster sets. Disagreement between the two, and any vote not clearly heard, becomes a
  Change "flag" for the clerk; a count that was not heard stays None. Nothing is guessed.

A vote that begins in one segment may run past its end: the reader reads on through the
transcript to the end of that vote, and the next step skips what was already cited. It never
reads back further than a few sentences (to find the chair's proposal before "so moved").
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass, field, replace

from ..model import (
    Change,
    Evidence,
    Ledger,
    Motion,
    Roster,
    Segment,
    Transcript,
    Utterance,
    Vote,
)
from ..speakers import Directory
from .context import ReadContext
from .ledger import Add, Op, Update, apply

SOURCE = "rules"
SUBSIDIARY = ("postpone", "table", "refer")
CHAIR_ROLES = ("chair", "vice chair", "presiding officer", "president", "mayor", "chairperson",
               "chairman", "chairwoman")
CLERK_ROLES = ("secretary", "clerk", "recording secretary")

# How far a second may follow its motion, in utterances (common practice: at once).
SECOND_WINDOW = 12
# How far back "so moved" may look for the chair's proposal, in sentences.
PROPOSAL_LOOKBACK = 10


# --------------------------------------------------------------------------- spoken text

_FILLER = re.compile(r",?\s*(?<![\w'])(?:u+m+|u+h+|uhm|erm?|a+h+|hm+|mm+|uh-huh)(?![\w'])[,.]?\s*",
                     re.I)
_HEDGE = re.compile(r",\s*(?:you know|i mean|like|sort of|kind of),\s*", re.I)
_SPLIT = re.compile(r"(?<=[.?!])\s+(?=\S)")
_ABBR_END = re.compile(r"\b(?:Mr|Mrs|Ms|Dr|St|Jr|Sr|Prof)\.$")
UNCLEAR = re.compile(r"\[(?:inaudible|unintelligible|crosstalk|indistinct|unclear|cross-talk)"
                     r"[^\]]*\]|\((?:inaudible|unintelligible|crosstalk|indistinct|unclear)\)"
                     r"|\binaudible\b|\bunintelligible\b|\bcrosstalk\b", re.I)


def clean(text: str) -> str:
    """Return spoken text with fillers (um, uh) and comma-bounded hedges removed."""
    text = text.replace("\u2019", "'").replace("\u2018", "'").replace("\u201c", '"')
    text = text.replace("\u201d", '"').replace("\u2014", " - ").replace("\u2013", "-")
    text = _FILLER.sub(" ", text)
    text = _HEDGE.sub(" ", text)
    text = re.sub(r"\b(\w+)(?:\s+\1\b)+", r"\1", text, flags=re.I)  # "the the" -> "the"
    text = re.sub(r"\s+([,.?!])", r"\1", text)
    text = re.sub(r",\s*,", ",", text)
    return " ".join(text.split()).strip(" ,")


def sentences(text: str) -> list[str]:
    """Return the sentences of an utterance (split at . ? ! followed by a space)."""
    out: list[str] = []
    for piece in _SPLIT.split(text.strip()):
        if out and (_ABBR_END.search(out[-1]) or (out[-1].endswith(("a.m.", "p.m."))
                                                   and piece[:1].islower())):
            out[-1] += " " + piece
        elif piece.strip():
            out.append(piece.strip())
    return out


@dataclass(frozen=True)
class Unit:
    """One sentence of one utterance: the unit the motion and procedure readers read."""

    pos: int  # position in the transcript's list of units
    utt: Utterance
    text: str  # the sentence as spoken (the evidence quote)
    clean: str  # fillers removed, case kept

    @property
    def low(self) -> str:
        """Return the cleaned sentence in lower case."""
        return self.clean.lower()

    @property
    def bare(self) -> str:
        """Return the cleaned sentence in lower case without punctuation."""
        return " ".join(re.sub(r"[^\w'$%]+", " ", self.clean.lower()).split())

    @property
    def speaker(self) -> str:
        """Return the (resolved) speaker of the utterance."""
        return self.utt.speaker

    def evidence(self, focus: str = "") -> Evidence:
        """Return the evidence for this sentence: its utterance, cue, time and words.

        ``focus`` names the words that matter when the sentence spans cues ("to order at
        6:32"): the cue is the one holding them.
        """
        cue = self.utt.cue_for(focus or self.text)
        start, end = (cue.start, cue.end) if cue else (self.utt.start, self.utt.end)
        return Evidence(self.utt.index, cue.id if cue else None, start, end, self.utt.speaker,
                        self.text)


def units(transcript: Transcript) -> tuple[tuple[Unit, ...], dict[int, int]]:
    """Return every sentence of the transcript, and the position of each utterance's first."""
    out: list[Unit] = []
    first: dict[int, int] = {}
    for utt in transcript.utterances:
        first[utt.index] = len(out)
        for sent in sentences(utt.text):
            out.append(Unit(len(out), utt, sent, clean(sent)))
    first[max(first, default=-1) + 1] = len(out)
    return tuple(out), first


def segment_span(segment: Segment, first: dict[int, int], total: int) -> tuple[int, int]:
    """Return the [start, stop) positions of a segment's sentences."""
    start = first.get(segment.first, total)
    stop = first.get(segment.last + 1)
    if stop is None:  # a segment ending at the last utterance
        stop = total
    return start, stop


def read_up_to(items: Sequence[Motion] | Sequence, index: dict[tuple[int, str], int]) -> int:
    """Return the last sentence position any item's evidence cites (-1 when none)."""
    last = -1
    for item in items:
        for ev in item.evidence:
            last = max(last, index.get((ev.utterance, ev.quote), -1))
    return last


HONORIFIC = re.compile(
    r"^(?:(?:madam|madame|mister|mr|mrs|ms|miss|mx|dr|prof|professor|director|board member|"
    r"council ?member|councill?or|commissioner|trustee|member|alder(?:man|woman|person)?|"
    r"supervisor|select(?:man|woman|board member)|vice[- ]chair|chair(?:man|woman|person)?|"
    r"secretary|treasurer|vice president|president|deputy mayor|mayor|clerk|senator|"
    r"representative|delegate)\.?\s+)+", re.I)


def resolve_name(directory: Directory, phrase: str) -> str | None:
    """Return the canonical name a spoken name refers to ("Director Ramirez"), or None."""
    phrase = " ".join(re.sub(r"[^\w'. -]+", " ", phrase).split()).strip(" .")
    phrase = re.sub(r"'s$", "", phrase)
    for cand in (phrase, HONORIFIC.sub("", phrase)):
        if cand:
            person = directory.resolve(cand)
            if person is not None:
                return person.name
    return None


def name_in(directory: Directory, words: str, *, from_end: bool = False) -> str | None:
    """Return the person named by the first (or last) one to four words of ``words``."""
    parts = words.split()
    for n in (4, 3, 2, 1):
        if len(parts) < n:
            continue
        cand = " ".join(parts[-n:] if from_end else parts[:n])
        name = resolve_name(directory, cand)
        if name:
            return name
    return None


_ANSWER_DROP = {"i", "i'll", "i'm", "will", "vote", "votes", "voting", "my", "is", "and",
                "that's", "a", "going", "to", "gonna", "oh", "uh", "um", "definitely",
                "absolutely", "be", "would", "like", "please", "sir", "ma'am", "madam", "chair",
                "mister", "thank", "thanks", "you", "sorry", "the"}
_ANSWERS = {"aye": "aye", "ayes": "aye", "yes": "aye", "yea": "aye", "yeah": "aye", "yep": "aye",
            "affirmative": "aye", "favor": "aye", "favour": "aye",
            "no": "no", "nay": "no", "nope": "no", "opposed": "no", "against": "no",
            "abstain": "abstain", "abstaining": "abstain", "abstention": "abstain",
            "abstains": "abstain", "pass": "abstain", "recuse": "abstain",
            "recusing": "abstain",
            "present": "present", "here": "present", "absent": "absent"}


def answer_of(unit: Unit) -> str | None:
    """Return "aye", "no", "abstain" or "present" for a short answer to a call, else None."""
    words = unit.bare.split()
    if not words or len(words) > 6 or unit.clean.rstrip().endswith("?"):
        return None
    if words[0] in ("any", "all", "those", "anyone", "anybody", "everyone", "who"):
        return None  # a call ("any opposed?"), not an answer
    rest = [w for w in words if w not in _ANSWER_DROP]
    return _ANSWERS.get(rest[0]) if rest else None


# --------------------------------------------------------------------------- numbers and tallies

_SMALL = ["zero", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten",
          "eleven", "twelve", "thirteen", "fourteen", "fifteen", "sixteen", "seventeen",
          "eighteen", "nineteen"]
_TENS = ["twenty", "thirty", "forty", "fifty", "sixty", "seventy", "eighty", "ninety"]
_NUM_WORD = {w: i for i, w in enumerate(_SMALL)} | {w: 20 + 10 * i for i, w in enumerate(_TENS)}


def digits(text: str) -> str:
    """Return lower-case ``text`` with number words as digits ("twenty-one" -> "21")."""
    text = text.lower()
    text = re.sub(r"\b(?:no one|nobody|nothing|none|zero)\b", "0", text)

    def compound(m: re.Match[str]) -> str:
        return str(_NUM_WORD[m.group(1)] + _NUM_WORD[m.group(2)])

    text = re.sub(rf"\b({'|'.join(_TENS)})[- ]({'|'.join(_SMALL[1:10])})\b", compound, text)
    return re.sub(rf"\b({'|'.join(_NUM_WORD)})\b", lambda m: str(_NUM_WORD[m.group(1)]), text)


_N = r"(\d+|no)"
_FOR = re.compile(rf"\b{_N}\s+(?:votes?\s+)?(?:in\s+favou?r|ayes?|yes(?:es)?|yeas?|for)\b")
_AGAINST = re.compile(rf"\b{_N}\s+(?:votes?\s+)?(?:opposed|against|nays?|noes|nos|no\s+votes?|"
                      r"opposition)\b")
_ABSTAIN = re.compile(rf"\b{_N}\s+(?:abstentions?|abstaining|abstains?|abstained)\b")
_TO = re.compile(r"\b(\d+)\s*(?:to|-|against)\s*(\d+)(?:\s*(?:to|-)\s*(\d+))?\b")
_WITH_OPPOSED = re.compile(r"\bwith\s+(\d+)\s+(?:opposed|against|nays?|no)\b")


def _n(text: str) -> int:
    return 0 if text == "no" else int(text)


def counts_in(text: str) -> tuple[int | None, int | None, int | None]:
    """Return (for, against, abstain) stated in a sentence; None for any not stated."""
    t = digits(text)
    t = re.sub(r"(\d),(\d{3})", r"\1\2", t)
    yes = no = abst = None
    m = _TO.search(t)
    if m and not re.search(r"\d\s*(?:to|-)\s*\d+\s*(?:weeks?|days?|months?|years?|percent|%|"
                           r"minutes?|hours?|pm|am|p\.m|a\.m)", t):
        yes, no = int(m.group(1)), int(m.group(2))
        if m.group(3):
            abst = int(m.group(3))
    if (f := _FOR.search(t)) and yes is None:
        yes = _n(f.group(1))
    if (a := _AGAINST.search(t)) and no is None:
        no = _n(a.group(1))
    if (w := _WITH_OPPOSED.search(t)) and no is None:
        no = int(w.group(1))
    if b := _ABSTAIN.search(t):
        abst = _n(b.group(1))
    return yes, no, abst


def _threshold(motion: Motion, roster: Roster | None) -> str:
    if roster:
        text = motion.text.lower()
        for kind in roster.two_thirds:
            k = kind.strip().lower()
            if k and (k == motion.kind or k in text):
                return "two-thirds"
    return "majority"


def tally_outcome(vote: Vote, motion: Motion, roster: Roster | None) -> tuple[str | None, str]:
    """Return the outcome the tally gives ("carried"/"failed", None when not counted) and why.

    A majority is more than half of the votes cast and two-thirds is at least two thirds of
    them; abstentions are not votes cast, and a tie fails. This is Robert's Rules of Order
    usage, stated here from memory (common practice in US boards and councils).
    """
    rule = _threshold(motion, roster)
    words = ("two-thirds of the votes cast, the roster's rule for this kind of motion"
             if rule == "two-thirds" else "a majority of the votes cast")
    if vote.for_ is None or vote.against is None:
        return None, words
    cast = vote.for_ + vote.against
    if cast == 0:
        return None, words
    passed = 3 * vote.for_ >= 2 * cast if rule == "two-thirds" else vote.for_ > vote.against
    return ("carried" if passed else "failed"), words


# --------------------------------------------------------------------------- patterns

_ASK = re.compile(
    r"\b(?:do\s+i\s+(?:have|hear|see|get)|is\s+there|are\s+there|can\s+i\s+(?:get|have|hear)|"
    r"could\s+i\s+(?:get|have|hear)|may\s+i\s+(?:have|get|hear)|"
    r"i(?:'d|\s+would|\s+will|'ll)?\s+(?:entertain|accept|take|welcome)|"
    r"i(?:'m|\s+am)\s+(?:looking\s+for|seeking)|(?:would|will|does|can)\s+(?:someone|somebody|"
    r"anyone|anybody|a\s+member)\s+(?:like\s+to\s+|care\s+to\s+|want\s+to\s+|wish\s+to\s+|be\s+"
    r"willing\s+to\s+)?(?:make|offer|move)|we\s+(?:need|'ll\s+need|will\s+need)|i\s+need|"
    r"looking\s+for|anyone\s+(?:want|care|like)\s+to\s+make)\s+(?:a|an|the)\s+motion"
    r"(?:\s+(?:to|that|for|on|regarding)\s+(?P<text>.+))?",
    re.I)
_MOVE = (
    re.compile(r"\bi(?:'d|\s+would|\s+will|'ll)?(?:\s+(?:like|want|wish)\s+to)?\s+(?:make|offer|"
               r"put\s+forward|bring)\s+(?:a|the)\s+motion\s+(?:to|that|for)\s+(?P<text>.+)", re.I),
    re.compile(r"\bi(?:'d|\s+would|\s+will|'ll|\s+do|\s+hereby)?(?:\s+(?:like|want|wish)\s+to)?"
               r"(?:\s+hereby)?\s+move\s+(?P<text>(?:that|to|we|for)\s+.+)", re.I),
    re.compile(r"\bi(?:'d|\s+would|\s+will|'ll)?(?:\s+like\s+to)?\s+move\s+(?P<noun>approval|"
               r"adoption|acceptance)\s+of\s+(?P<text>.+)", re.I),
    re.compile(r"^(?:and\s+|so\s+|then\s+)?(?:i\s+)?(?:make\s+a\s+)?motion\s+to\s+(?P<text>.+)",
               re.I),
    re.compile(r"^move\s+to\s+(?P<text>.+)", re.I),
)
_NOT_A_MOTION = re.compile(r"^(?:to\s+|that\s+)?(?:the\s+next|next|on\b|forward|ahead|along|"
                           r"item\b|agenda\s+item|the\s+agenda\s+item|public\s+comment)", re.I)
_SO_MOVED = re.compile(r"^(?:(?:yes|yeah|okay|ok|sure|and)[, ]+)*(?:i\s+)?(?:'ll\s+|will\s+|"
                       r"would\s+|can\s+)?(?:so\s+move(?:d)?|move(?:d)?\s+(?:it|that|so)|i'll\s+"
                       r"move\s+(?:it|that)|i\s+move|moved|make\s+(?:that|the)\s+motion|i'll\s+"
                       r"make\s+(?:that|the|a)\s+motion|i\s+make\s+(?:that|the|a)\s+motion|move\s+"
                       r"(?:approval|adoption))(?:,?\s+(?:madam|mister|mr\.?)\s+\w+)?[.!]*$", re.I)
_SECOND = re.compile(r"^(?:(?:yes|yeah|okay|ok|and|oh|sure|i'm\s+happy\s+to)[, ]+)*(?:i(?:'ll|"
                     r"\s+will|\s+would|'d|\s+can)?\s+)?(?:be\s+(?:happy|glad)\s+to\s+)?"
                     r"second(?:ed|s)?(?:\s+(?:that|it|this|the\s+motion|the\s+amendment|that"
                     r"\s+motion|the\s+main\s+motion|from\s+me))?(?:\s+motion)?(?:,?\s+(?:madam|"
                     r"mister|mr\.?)\s+\w+)?(?:,?\s+(?:so\s+(?:that\s+)?we\s+can\s+(?:discuss|talk"
                     r"\s+about)\s+it|for\s+(?:the\s+purpose\s+of\s+)?discussion))?[.!]*$", re.I)
_MOVED_BY = re.compile(r"\b(?:moved|motion|made)\s+(?:by|from)\s+(?P<who>[\w'.-]+(?:\s+[\w'.-]+)"
                       r"{0,3})", re.I)
_SECONDED_BY = re.compile(r"\bsecond(?:ed)?\s+(?:by|from)\s+(?P<who>[\w'.-]+(?:\s+[\w'.-]+)"
                          r"{0,3})", re.I)
_WHO_MOVED = re.compile(r"(?P<who>(?:[\w'.-]+\s+){0,3}[\w'.-]+)\s+(?:has\s+)?(?:moved|made\s+"
                        r"the\s+motion)\b", re.I)
_WHO_SECONDED = re.compile(r"(?P<who>(?:[\w'.-]+\s+){0,3}[\w'.-]+)\s+(?:has\s+)?seconded\b",
                           re.I)
_WITHDRAW = re.compile(r"\b(?:i(?:'d|\s+would|\s+will|'ll)?(?:\s+(?:like|want|wish)\s+to)?\s+"
                       r"withdraw\s+(?:my\s+|the\s+|that\s+|this\s+)?(?P<what>motion|amendment|it|"
                       r"that)|(?:the|that|this|my)\s+(?P<what2>motion|amendment)\s+(?:is|has\s+"
                       r"been|was)\s+withdrawn)\b", re.I)
_DIES = re.compile(r"\b(?:dies|died|fails|failed|lapses|falls)\s+for\s+(?:lack|want)\s+of\s+a"
                   r"\s+second\b|\bhearing\s+no\s+second\b|\bno\s+second\b.*\b(?:dies|fails|"
                   r"lapses|falls)\b", re.I)

_CALL = re.compile(
    r"\b(?:all|those|everyone|anyone|everybody)(?:\s+(?:those|who\s+are|who're|that\s+are|"
    r"members))?\s+in\s+favou?r\b|\bin\s+favou?r,?\s+(?:please\s+)?(?:say|signify|indicate|raise"
    r"|by\s+saying)\b|\ball\s+who\s+(?:are\s+in\s+favou?r|support)\b|\blet'?s\s+vote\b|"
    r"\bcall\s+(?:for\s+)?the\s+vote\b|\bwe(?:'ll|\s+will)\s+(?:now\s+)?vote\b|\bplease\s+vote\b",
    re.I)
_HANDS = re.compile(r"\b(?:raise\s+your\s+hands?|show\s+of\s+hands|hands\s+up|raise\s+a\s+hand|"
                    r"by\s+hand)\b", re.I)
ROLL_CALL = re.compile(r"\b(?:call\s+the\s+roll|roll[\s-]+call|call\s+roll|take\s+the\s+roll|"
                   r"calling\s+the\s+roll|call\s+the\s+vote)\b", re.I)
_OPPOSED_CALL = re.compile(r"\b(?:opposed|against|nays?|noes|no\s+votes?|any\s+nos|contrary)\b",
                           re.I)
_ABSTAIN_CALL = re.compile(r"\b(?:abstentions?|abstaining|abstain)\b", re.I)
_RETAKE = re.compile(r"\b(?:division|let'?s\s+(?:do|try)\s+(?:that|this|it)\s+again|let\s+me\s+"
                     r"(?:try|do)\s+(?:that|this)\s+again|i'll\s+(?:ask|call)\s+(?:that\s+)?again|"
                     r"(?:take|do)\s+(?:that|the\s+vote|it)\s+again|redo\s+(?:the|that)\s+vote|"
                     r"retake\s+the\s+vote)\b", re.I)
_NOT_HEARD = re.compile(r"\b(?:didn't|did\s+not|couldn't|could\s+not|can't|cannot)\s+(?:quite\s+)?"
                        r"(?:hear|catch|get|count|tell)\b|\bnot\s+sure\s+(?:i|we)\s+(?:heard|got)"
                        r"|\bwasn't\s+clear\b|\bunclear\b", re.I)
_ANNOUNCE = re.compile(
    r"\b(?P<subj>(?:the|that|this|our|your|which|so\s+the|so\s+that)\s+)?(?P<what>(?:main\s+|"
    r"original\s+|amended\s+)?(?:motion|amendment|resolution|ordinance|item|minutes|it|that)"
    r"(?:\s+as\s+amended)?(?:\s+to\s+[\w\s,$'-]+?)?)\s+(?:(?:is|has|was|has\s+been|is\s+hereby)"
    r"\s+)?(?P<verb>carries|carried|passes|passed|adopted|approved|prevails|fails|failed|defeated"
    r"|lost|does\s+not\s+(?:carry|pass)|did\s+not\s+(?:carry|pass)|doesn't\s+(?:carry|pass)|"
    r"didn't\s+(?:carry|pass)|not\s+adopted)\b"
    r"|\bthe\s+(?P<side>ayes|yeas|noes|nays|nos)\s+have\s+it\b", re.I)
_ANNOUNCE_BARE = re.compile(r"^(?:(?:okay|so|all\s+right|great|good|thank\s+you)[, ]+)*(?P<verb>"
                            r"carried|carries|passed|passes|approved|adopted|failed|fails)"
                            r"(?:\s+unanimously)?[.!]*$", re.I)
HYPOTHETICAL = re.compile(r"\b(?:if|whether|unless|until|once|when|hope|hoping|assume|before|"
                          r"should|would|could|might|so\s+that|expect|how)\b", re.I)
HEDGED = re.compile(r"\b(?:i\s+think|i\s+believe|i\s+guess|i\s+suppose|probably|seems?\s+(?:like"
                    r"|to)|sounds\s+like|looks\s+like)\b", re.I)
ADJOURNED = re.compile(
    r"\b(?:we|this\s+meeting|the\s+meeting|meeting|this\s+session|the\s+session|session|"
    r"board|council|committee)\s*(?:is|are|stands?|'re|was|will\s+stand)\s+(?:now\s+|hereby\s+|"
    r"officially\s+)?adjourned\b"
    r"|\bi\s+(?:now\s+|hereby\s+)?(?:declare\s+(?:the|this|our)\s+meeting\s+adjourned|adjourn\s+"
    r"(?:the|this|our)\s+meeting)\b|\b(?:the\s+)?meeting\s+adjourned\b|^adjourned\b", re.I)
_CONSENT = re.compile(r"\bwithout\s+objection\b|\b(?:is|are)\s+there\s+(?:any\s+)?objections?\b"
                      r"|\bany\s+objections?\b|\bif\s+there\s+(?:is|are|'s)\s+no\s+objections?\b"
                      r"|\bhearing\s+no\s+objections?\b|\bseeing\s+no\s+objections?\b|"
                      r"\b(?:unanimous|general)\s+consent\b|\bobjections?\s+to\s+\w+ing\b", re.I)
_GRANTED = re.compile(r"\b(?:hearing|seeing)\s+(?:none|no\s+(?:objections?|one|hands))\b|"
                      r"\bso\s+ordered\b|\bnone\s+heard\b|\bno\s+objections?\s+heard\b", re.I)
_OBJECT = re.compile(r"^(?:(?:yes|yeah|well|actually|sorry)[, ]+)*(?:i\s+(?:do\s+)?object|"
                     r"objection)\b", re.I)
_DISPOSE = re.compile(r"\b(?P<verb>postpone[sd]?|tabled?|refer(?:red)?|defer(?:red)?)\b", re.I)
INLINE_ANSWER = re.compile(r"(?i)^(?P<who>[\w'. -]+?)(?:[,:]\s+(?:[\w' ]+,\s+)?|\s+(?:votes?|"
                            r"is)\s+)(?:votes?\s+)?(?P<how>aye|yes|yea|no|nay|abstains?|present|here|"
                            r"absent)[.!]*$")
_NEXT_ITEM = re.compile(r"(?i)^(?:okay,?\s+|all\s+right,?\s+|so,?\s+)?(?:item\s+\w+|next\s+item|"
                        r"moving\s+on|let'?s\s+move\s+on|next\s+up|new\s+business|old\s+business)"
                        r"\b")
_NOUN_VERB = {"approval": "approve", "adoption": "adopt", "acceptance": "accept"}
_FAILED_WORDS = ("fail", "defeat", "lost", "not", "n't", "noes", "nays", "nos")


def _announced(unit: Unit, *, hedged: bool = False) -> tuple[str | None, str]:
    """Return the outcome a sentence announces ("carried"/"failed") and what it names.

    A hedged announcement ("I think that carries") counts only when ``hedged`` is allowed
    (inside a vote the reader is following); the caller flags it for the clerk.
    """
    low = unit.clean.lower()
    if unit.clean.rstrip().endswith("?"):
        return None, ""
    if HEDGED.search(low) and not hedged:
        return None, ""
    m = _ANNOUNCE_BARE.match(low)
    if m:
        return ("failed" if m.group("verb").startswith("fail") else "carried"), ""
    m = _ANNOUNCE.search(low)
    if not m:
        return None, ""
    if HYPOTHETICAL.search(low[: m.start()]) or HYPOTHETICAL.search(m.group(0)):
        return None, ""
    if m.group("side"):
        return ("carried" if m.group("side") in ("ayes", "yeas") else "failed"), ""
    what = (m.group("what") or "").lower()
    if what in ("it", "that") and not m.group("subj") and len(low.split()) > 6:
        return None, ""  # "it passed last year": too loose without a vote in progress
    verb = m.group("verb").lower()
    failed = any(w in verb for w in _FAILED_WORDS)
    return ("failed" if failed else "carried"), what


def _hint(text: str) -> str | None:
    low = text.lower()
    if "as amended" in low or "main motion" in low or "original motion" in low:
        return "main"
    if "amendment" in low:
        return "amendment"
    return None


_ORDINAL = {w: i + 1 for i, w in enumerate((
    "first", "second", "third", "fourth", "fifth", "sixth", "seventh", "eighth", "ninth", "tenth",
    "eleventh", "twelfth", "thirteenth", "fourteenth", "fifteenth", "sixteenth", "seventeenth",
    "eighteenth", "nineteenth", "twentieth"))} | {"thirtieth": 30}
_ORDINAL |= {f"twenty-{w}": 20 + n for w, n in list(_ORDINAL.items())[:9]}
_ORDINAL |= {f"twenty {w}": 20 + n for w, n in list(_ORDINAL.items())[:9]}
_ORDINAL |= {"thirty-first": 31, "thirty first": 31}
_MONTHS = ("january|february|march|april|may|june|july|august|september|october|november|"
           "december")
_NUMBER_WORD = rf"(?:{'|'.join(sorted(_NUM_WORD, key=len, reverse=True))}|hundred|thousand|" \
               r"million|a)"
_SPOKEN = re.compile(rf"\b{_NUMBER_WORD}(?:[\s-]+(?:and\s+)?{_NUMBER_WORD})*\b", re.I)


def spoken_value(words: str) -> int | None:
    """Return the value of spoken number words ("forty-eight thousand three hundred")."""
    total = current = 0
    seen = False
    for w in re.split(r"[\s-]+", words.lower()):
        if w == "and":
            continue
        if w == "a":
            current = current or 1
            continue
        if w in _NUM_WORD:
            current += _NUM_WORD[w]
        elif w == "hundred":
            current = (current or 1) * 100
        elif w == "thousand":
            total, current = total + (current or 1) * 1000, 0
        elif w == "million":
            total, current = total + (current or 1) * 1_000_000, 0
        else:
            return None
        seen = True
    return total + current if seen else None


def figures(text: str) -> str:
    """Return ``text`` with spoken sums, dates and clock hours as figures (minutes style).

    "twenty-two thousand dollars" -> "$22,000", "January tenth" -> "January 10",
    "one to five p.m." -> "1 to 5 p.m."; other numbers stay as spoken (common practice).
    """
    def money(m: re.Match[str]) -> str:
        value = spoken_value(m.group(1))
        return f"${value:,}" if value is not None else m.group(0)

    text = re.sub(rf"\b({_SPOKEN.pattern[2:-2]})\s+dollars\b", money, text, flags=re.I)
    text = re.sub(r"\$(\d[\d,]*)\s+dollars\b", r"$\1", text, flags=re.I)
    ordinals = "|".join(sorted(_ORDINAL, key=len, reverse=True))
    text = re.sub(rf"\b({_MONTHS})\s+(?:the\s+)?({ordinals})\b",
                  lambda m: f"{m.group(1)} {_ORDINAL[m.group(2).lower()]}", text, flags=re.I)
    hours = "one|two|three|four|five|six|seven|eight|nine|ten|eleven|twelve"
    text = re.sub(rf"\b({hours})(\s+to\s+)({hours})(\s+[ap]\.?m\.?)",
                  lambda m: f"{_NUM_WORD[m.group(1).lower()]}{m.group(2)}"
                            f"{_NUM_WORD[m.group(3).lower()]}{m.group(4)}", text, flags=re.I)
    return re.sub(rf"\b({hours})(\s+[ap]\.?m\.?)",
                  lambda m: f"{_NUM_WORD[m.group(1).lower()]}{m.group(2)}", text, flags=re.I)


_SUBJECT = re.compile(
    r"^(?:the\s+)?(?:board|library|council|committee|commission|trustees|district|city|town|"
    r"village|county|association|society)\s+(?:should\s+|shall\s+|will\s+|hereby\s+)?"
    r"(?=(?:approve|adopt|authori[sz]e|accept|stop|start|direct|award|amend|refer|postpone|table|"
    r"hire|purchase|buy|sell|grant|deny|endorse|support|oppose|establish|create|appoint|extend|"
    r"waive|suspend|allocate|spend|fund|request|ask|enter|sign|hold|set|change|end|begin|open|"
    r"close|reduce|increase|raise|lower|eliminate|remove|add|ratify|receive)\b)", re.I)
_TRAILING = re.compile(r"[,;]?\s*(?:please|thank\s+you|thanks|if\s+that's\s+(?:okay|ok|all\s+"
                       r"right)|i\s+guess|i\s+think|madam\s+chair|mister\s+chair|mr\.?\s+chair|"
                       r"madam\s+president|mr\.?\s+president|chair)\s*$", re.I)


def clause(raw: str) -> str:
    """Return a motion's wording from the clause after "move"/"motion": "that we X" -> "X"."""
    t = clean(raw).strip(" ,.;:!?\"'")
    for _ in range(2):
        t = _TRAILING.sub("", t).strip(" ,.;:!?\"'")
    t = re.sub(r"^(?:that|to)\s+", "", t, flags=re.I)
    t = re.sub(r"^we\s+(?:should\s+|shall\s+|will\s+|would\s+|can\s+|do\s+)?", "", t, flags=re.I)
    t = re.sub(r"^(?:go\s+ahead\s+and|just)\s+", "", t, flags=re.I)
    # "that the board approve X" -> "approve X": the body is the one moving
    t = _SUBJECT.sub("", t, count=1)
    t = figures(t)
    if re.search(r"\b[ap]\.m$", t, re.I):
        t += "."  # the stripped full stop belonged to "p.m."
    return t[:1].upper() + t[1:] if t else t


_GERUND = {"approving": "approve", "adopting": "adopt", "accepting": "accept",
           "amending": "amend", "tabling": "table", "referring": "refer",
           "postponing": "postpone", "extending": "extend", "adding": "add",
           "removing": "remove", "changing": "change", "granting": "grant", "waiving": "waive",
           "suspending": "suspend", "moving": "move", "authorizing": "authorize",
           "authorising": "authorise", "awarding": "award", "ratifying": "ratify",
           "receiving": "receive", "placing": "place", "setting": "set", "naming": "name",
           "appointing": "appoint", "closing": "close", "opening": "open", "going": "go"}
_PASSIVE = re.compile(r"^(?:the\s+)?(?P<obj>.+?)\s+(?:is|are|will\s+be|stands?|shall\s+be)\s+"
                      r"(?P<verb>approved|adopted|accepted|amended|ordered|received|ratified|"
                      r"granted|closed|opened)(?P<rest>.*)$", re.I)
_PAST_TO_BASE = {"approved": "approve", "adopted": "adopt", "accepted": "accept",
                 "amended": "amend", "ordered": "order", "received": "receive",
                 "ratified": "ratify", "granted": "grant", "closed": "close", "opened": "open"}


def proposal_text(raw: str) -> str:
    """Return a chair's proposal as a motion's wording ("approving X" -> "Approve X")."""
    t = clean(raw).strip(" ,.;:!?\"'")
    t = re.sub(r"^(?:to|that|on|for)\s+", "", t, flags=re.I)
    t = re.sub(r"^(?:we(?:'ll|\s+will)?|i(?:'ll|\s+will)?|the\s+(?:board|council|committee)\s+"
               r"will)\s+", "", t, flags=re.I)
    m = _PASSIVE.match(t)
    if m and m.group("verb").lower() != "ordered":
        t = f"{_PAST_TO_BASE[m.group('verb').lower()]} the {m.group('obj')}{m.group('rest')}"
    first, _, rest = t.partition(" ")
    base = _GERUND.get(first.lower())
    if base:
        t = f"{base} {rest}".strip()
    return clause(t)


def _kind(text: str, floor: Motion | None) -> str:
    low = text.lower()
    if re.match(r"amend\b", low) and floor is not None and not re.match(
            r"amend\s+(?:the|our)\s+(?:bylaws?|charter|constitution|budget|policy|minutes|rules)",
            low):
        return "amendment"
    if re.match(r"(?:postpone|defer|delay)\b", low):
        return "postpone"
    if re.match(r"(?:table|lay\s+(?:it|this|that|the\s+\w+)\s+on\s+the\s+table)\b", low):
        return "table"
    if re.match(r"(?:refer|send|commit|recommit)\b.*\bto\b", low):
        return "refer"
    if re.search(r"\b(?:approve|adopt|accept)\b.*\bminutes\b", low):
        return "approve_minutes"
    if re.match(r"adjourn\b", low):
        return "adjourn"
    return "main"


def _trim(phrase: str) -> str:
    """Return a date or committee phrase without the reasons that follow it."""
    phrase = re.split(r"(?i),|\s+so\s+(?:that\s+)?|\s+because\s+|\s+in\s+order\s+to\s+|\s+for\s+"
                      r"(?:a|further)\s+", phrase)[0]
    return figures(phrase.strip(" .,;"))


def disposal_value(kind: str, text: str) -> str | None:
    """Return the date, meeting or committee a motion to postpone/table/refer names."""
    low = clean(text)
    if kind == "refer":
        m = re.search(r"\b(?:back\s+)?to\s+(?P<to>(?:the\s+|our\s+)?(?:(?!to\b)[\w'-]+\s+){0,5}?"
                      r"(?:committee|"
                      r"commission|subcommittee|staff|task\s+force|working\s+group|board|panel|"
                      r"council)\b.*)$", low, re.I)
        return f"to {_trim(m.group('to'))}" if m else None
    m = re.search(r"\b(?P<prep>until|till|to|for)\s+(?P<when>(?:the\s+|our\s+|a\s+)?(?:next|"
                  r"following|january|february|march|april|may|june|july|august|september|"
                  r"october|november|december|monday|tuesday|wednesday|thursday|friday|"
                  r"saturday|sunday|\d|special|regular|later|another|future|june).*)$", low, re.I)
    if m:
        prep = "until" if m.group("prep").lower() in ("until", "till") else m.group("prep").lower()
        return f"{prep} {_trim(m.group('when'))}"
    if re.search(r"\bindefinitely\b", low, re.I):
        return "indefinitely"
    return None


# --------------------------------------------------------------------------- amendments


def amended_text(main_text: str, amendment: str) -> str | None:
    """Return the main motion's wording once ``amendment`` is applied, None when unclear."""
    a = clean(amendment).strip(" .")
    a = re.sub(r"^(?:i\s+move\s+to\s+)?amend(?:ing)?\s+(?:the\s+|this\s+|that\s+|my\s+|his\s+|"
               r"her\s+|our\s+)?(?:main\s+|original\s+)?(?:motion|resolution|it)?\s*,?\s*(?:by\s+|"
               r"to\s+|so\s+that\s+|so\s+)?", "", a, flags=re.I)
    a = re.sub(r"^(?:a\s+)?(?:friendly\s+)?amendment\s+(?:to\s+|that\s+(?:we\s+)?)?", "", a,
               flags=re.I)

    def lit(s: str) -> str:
        return s.strip(" ,.\"'")

    def swap(old: str, new: str) -> str | None:
        for cand in (lit(old), re.sub(r"^(?:the\s+)?(?:words?|phrase|amount|figure|date|number"
                                      r"|sum)\s+", "", lit(old), flags=re.I)):
            i = main_text.lower().find(cand.lower())
            if cand and i >= 0:
                return main_text[:i] + lit(new) + main_text[i + len(cand):]
        return None

    m = re.match(r"(?:read|say|now\s+read)s?[:,]?\s+(?P<new>.+)$", a, re.I)
    if m:
        return clause(m.group("new"))
    m = re.match(r"substitut(?:e|ing)\s+(?P<new>.+?)\s+for\s+(?P<old>.+)$", a, re.I)
    if m:
        return swap(m.group("old"), m.group("new"))
    m = re.match(r"(?:strik(?:e|ing)|remov(?:e|ing)|delet(?:e|ing)|tak(?:e|ing)\s+out)\s+(?P<old>"
                 r".+?)\s+and\s+(?:insert(?:ing)?|add(?:ing)?|replac(?:e|ing)\s+(?:it\s+)?with|"
                 r"put(?:ting)?\s+in)\s+(?P<new>.+)$", a, re.I)
    if m:
        return swap(m.group("old"), m.group("new"))
    m = re.match(r"(?:chang(?:e|ing)|replac(?:e|ing)|mak(?:e|ing))\s+(?:the\s+[\w ]+?\s+)?from\s+"
                 r"(?P<old>.+?)\s+to\s+(?P<new>.+)$", a, re.I)
    m = m or re.match(r"(?:chang(?:e|ing)|replac(?:e|ing)|mak(?:e|ing))\s+(?P<old>.+?)\s+(?:to|"
                      r"with|by|into)\s+(?P<new>.+)$", a, re.I)
    if m:
        return swap(m.group("old"), m.group("new"))
    m = re.match(r"(?:add(?:ing)?|insert(?:ing)?|includ(?:e|ing))\s+(?:the\s+words?\s+)?"
                 r"(?P<add>.+?)(?:\s+(?:at|to)\s+the\s+end(?:\s+of\s+the\s+motion)?|\s+to\s+the"
                 r"\s+motion)?$", a, re.I)
    if m:
        add = lit(m.group("add"))
        joiner = "" if add[:1] in ",;" else " "
        return f"{main_text.rstrip(' .')}{joiner}{add}"
    m = re.match(r"(?:strik(?:e|ing)|remov(?:e|ing)|delet(?:e|ing)|tak(?:e|ing)\s+out)\s+(?P<old>"
                 r".+)$", a, re.I)
    if m:
        out = swap(m.group("old"), "")
        return " ".join(out.split()) if out else None
    return None


# --------------------------------------------------------------------------- the reader


@dataclass
class _Tally:
    """What was heard of one vote, from the call to the announcement."""

    method: str
    call: Unit
    last: Unit
    hint: str | None = None
    for_: int | None = None
    against: int | None = None
    abstain: int | None = None
    stated: Unit | None = None  # the sentence that stated the counts
    announced: str | None = None
    announce: Unit | None = None
    roll: list[tuple[Unit, str, str]] = field(default_factory=list)  # (answer, name, how)
    unclear: list[str] = field(default_factory=list)
    heard: dict[str, int] = field(default_factory=dict)  # voice responses heard per phase
    consent_text: str = ""


class MotionReader:
    """Reads motions, seconds, amendments, votes and outcomes; proposes ledger operations."""

    name = "motions"

    def __init__(self, ctx: ReadContext) -> None:
        self.ctx = ctx
        self.directory = ctx.directory
        self.roster = ctx.directory.roster
        self.units, self.first = units(ctx.transcript)
        self.where = {(u.utt.index, u.text): u.pos for u in self.units}
        people = ctx.directory.people
        self.chairs = {p.name for p in people if p.role in CHAIR_ROLES}
        self.clerks = {p.name for p in people if p.role in CLERK_ROLES}
        if self.roster:
            self.chairs |= {n for office, n in self.roster.officers if office in CHAIR_ROLES}
            self.clerks |= {n for office, n in self.roster.officers if office in CLERK_ROLES}

    # ------------------------------------------------------------------ driving

    def read(self, ledger: Ledger, segment: Segment) -> list[Op]:
        """Return the operations on motions that this segment's sentences support."""
        start, stop = segment_span(segment, self.first, len(self.units))
        start = max(start, read_up_to(ledger.motions, self.where) + 1)
        run = _Run(self, ledger)
        pos = start
        while pos < stop:
            pos = max(run.unit(pos), run.consumed_to)
        return run.ops


class _Run:
    """One reading of one segment: a local ledger that grows with the proposed ops."""

    def __init__(self, reader: MotionReader, ledger: Ledger) -> None:
        self.r = reader
        self.units = reader.units
        self.directory = reader.directory
        self.ledger = ledger
        self.ops: list[Op] = []
        self.consumed_to = 0  # a look past a vote (the chair restating the motion as amended)

    # ------------------------------------------------------------------ ledger helpers

    def emit(self, op: Op) -> str:
        """Apply ``op`` locally, keep it, and return the id of the motion it touched."""
        before = len(self.ledger.motions)
        self.ledger, rejected = apply(self.ledger, [op])
        if not rejected:
            self.ops.append(op)
        if isinstance(op, Add):
            return self.ledger.motions[-1].id if len(self.ledger.motions) > before else ""
        return op.target

    def change(self, target: str, kind: str, value: str | None, unit: Unit,
               vote: Vote | None = None) -> None:
        self.emit(Update(target, Change(kind, value, unit.evidence(), source=SOURCE), vote))

    def flag(self, motion_id: str, text: str, unit: Unit) -> None:
        motion = self.motion(motion_id)
        if motion is not None and text not in motion.flags:
            self.change(motion_id, "flag", text, unit)

    def motion(self, motion_id: str) -> Motion | None:
        return next((m for m in self.ledger.motions if m.id == motion_id), None)

    def floor(self, hint: str | None = None) -> Motion | None:
        """Return the immediately pending motion (the latest one still pending)."""
        pending = [m for m in self.ledger.motions if m.outcome == "pending"]
        if hint == "amendment":
            pending = [m for m in pending if m.kind == "amendment"] or pending
        elif hint == "main":
            pending = [m for m in pending if m.kind not in ("amendment",) + SUBSIDIARY]
        return max(pending, key=lambda m: m.time) if pending else None

    def applies_to(self, motion: Motion) -> Motion | None:
        """Return the motion an amendment or subsidiary motion applies to."""
        if motion.amends:
            return self.motion(motion.amends)
        earlier = [m for m in self.ledger.motions if m.outcome == "pending" and m.id != motion.id
                   and m.time <= motion.time and m.kind not in SUBSIDIARY]
        return max(earlier, key=lambda m: m.time) if earlier else None

    def known(self, name: str) -> bool:
        return bool(self.directory.people) and self.directory.resolve(name) is not None

    def is_chair(self, unit: Unit) -> bool:
        return not self.r.chairs or unit.speaker in self.r.chairs

    def in_utterance(self, unit: Unit) -> list[Unit]:
        """Return the sentences after ``unit`` in the same utterance."""
        out = []
        pos = unit.pos + 1
        while pos < len(self.units) and self.units[pos].utt.index == unit.utt.index:
            out.append(self.units[pos])
            pos += 1
        return out

    # ------------------------------------------------------------------ one sentence

    def unit(self, pos: int) -> int:
        """Read the sentence at ``pos``; return the position of the next one to read."""
        u = self.units[pos]
        text = u.clean
        if not text:
            return pos + 1
        if _CONSENT.search(text):
            end = self.consent(pos)
            if end is not None:
                return end
        if ROLL_CALL.search(text) and self.floor() is not None:
            end = self.vote(pos, "roll_call")
            if end is not None:
                return end
        if _CALL.search(text):
            end = self.vote(pos, "count" if _HANDS.search(text) else "voice")
            if end is not None:
                return end
        self.restated(u)
        if self.withdrawn(u) or self.dies(u):
            return pos + 1
        if self.moved(u) or self.seconded(u):
            return pos + 1
        outcome, what = _announced(u)
        if outcome and self.floor(_hint(what)) is not None:
            tally = _Tally("none", u, u, hint=_hint(what), announced=outcome, announce=u)
            tally.for_, tally.against, tally.abstain = counts_in(text)
            for later in self.in_utterance(u):
                if any(n is not None for n in counts_in(later.clean)):
                    self.merge_counts(tally, later)
                    tally.last = later
            if tally.for_ is not None or tally.against is not None:
                tally.method = "count"
                tally.stated = tally.stated or u
            self.conclude(tally)
            return tally.last.pos + 1
        return pos + 1

    # ------------------------------------------------------------------ motions and seconds

    def moved(self, u: Unit) -> bool:
        text = u.clean
        if text.rstrip().endswith("?"):
            return False
        raw: str | None = None
        for pattern in _MOVE:
            m = pattern.search(text)
            if m:
                raw = m.group("text")
                if m.groupdict().get("noun"):
                    raw = f"{_NOUN_VERB[m.group('noun').lower()]} {raw}"
                break
        proposal: Unit | None = None
        flags: list[str] = []
        if raw is not None:
            if _NOT_A_MOTION.match(raw):
                return False
            wording = clause(raw)
            vague = re.match(r"(?i)^(?:approve|adopt|accept|do)\s+(?:them|it|that|this|those|so)"
                             r"\b(?P<rest>.*)$", wording)
            if len(wording.split()) <= 2 or vague:
                proposal = self.proposal(u)
                asked = self.proposal_wording(proposal) if proposal is not None else ""
                if asked:
                    # "I move we approve them with..." answers "a motion to approve the minutes"
                    wording = asked + (vague.group("rest") if vague else "")
        elif _SO_MOVED.match(text):
            proposal = self.proposal(u)
            if proposal is None:
                return False
            wording = self.proposal_wording(proposal)
            if not wording:
                wording = self.context_wording(proposal)
                flags.append("the motion's wording was not stated; taken from the chair's "
                             "words before it, clerk to check")
        else:
            return False
        if not wording:
            return False
        floor = self.floor()
        kind = _kind(wording, floor)
        amends = floor.id if kind == "amendment" and floor else None
        if kind in SUBSIDIARY and floor is not None:
            wording = self.subsidiary_wording(kind, wording, floor)
        evidence = (u.evidence(),) + ((proposal.evidence(),) if proposal else ())
        mover = u.speaker
        if self.directory.people and not self.known(mover):
            flags.append(f"mover's name not known (caption label {mover!r})")
        motion = Motion(id="", text=wording, mover=mover, seconder=None, vote=Vote(),
                        outcome="pending", time=evidence[0].start, evidence=evidence,
                        amends=amends, kind=kind, source=SOURCE)
        mid = self.emit(Add(motion))
        for f in flags:
            self.flag(mid, f, u)
        return True

    def proposal(self, u: Unit) -> Unit | None:
        """Return the chair's "do I have a motion to...?" shortly before ``u``, if unanswered."""
        low = max(0, u.pos - PROPOSAL_LOOKBACK)
        for pos in range(u.pos - 1, low - 1, -1):
            cand = self.units[pos]
            if cand.speaker == u.speaker:
                continue
            if _ASK.search(cand.clean) or (re.match(r"(?i)^(?:a\s+)?motion\s+to\b", cand.clean)
                                           and cand.clean.rstrip().endswith("?")):
                ev = cand.evidence()
                if any(ev in m.evidence for m in self.ledger.motions):
                    return None  # already answered: a second "so moved" adds nothing
                return cand
        return None

    def proposal_wording(self, proposal: Unit) -> str:
        """Return the wording of the chair's proposal; a bare "to approve" takes its object
        from what the chair said just before ("Item two is approval of the minutes...")."""
        m = _ASK.search(proposal.clean)
        if not (m and m.group("text")):
            m = re.match(r"(?i)^(?:a\s+)?motion\s+to\s+(?P<text>.+)", proposal.clean)
        if not (m and m.group("text")):
            return ""
        wording = proposal_text(m.group("text"))
        verb = re.fullmatch(r"(?i)(approve|adopt|accept)(?:\s+(?:it|that|this|them))?", wording)
        if verb:
            for pos in range(proposal.pos - 1, max(-1, proposal.pos - 4), -1):
                before = self.units[pos]
                if before.speaker != proposal.speaker:
                    break
                o = re.search(r"(?i)\b(?:approval|adoption|acceptance)\s+of\s+(?P<x>.+?)[.?!]*$",
                              before.clean)
                if o:
                    return clause(f"{verb.group(1)} {o.group('x')}")
        return wording

    def context_wording(self, proposal: Unit) -> str:
        """Return the chair's sentence before a bare "do I have a motion?" as the wording."""
        pos = proposal.pos - 1
        if pos >= 0 and self.units[pos].utt.index == proposal.utt.index:
            return clause(self.units[pos].clean)
        return "(wording not stated)"

    @staticmethod
    def subsidiary_wording(kind: str, wording: str, floor: Motion) -> str:
        ref = f'the motion "{floor.text}"'
        return re.sub(r"(?i)^((?:postpone|defer|delay|table|refer|send|commit|recommit)(?:\s+"
                      r"consideration\s+of)?)\s+(?:this(?:\s+(?:item|motion|matter))?|it|that|the"
                      r"\s+(?:motion|item|matter|main\s+motion))\b", rf"\1 {ref}", wording)

    def seconded(self, u: Unit) -> bool:
        if not _SECOND.match(u.clean):
            return False
        target = self.awaiting_second(u)
        if target is None:
            return False
        self.change(target.id, "seconded", u.speaker, u)
        if self.directory.people and not self.known(u.speaker):
            self.flag(target.id, f"seconder's name not known (caption label {u.speaker!r})", u)
        return True

    def awaiting_second(self, u: Unit) -> Motion | None:
        for m in sorted(self.ledger.motions, key=lambda m: m.time, reverse=True):
            if m.outcome != "pending" or m.seconder is not None or m.mover == u.speaker:
                continue
            if u.utt.index - m.evidence[0].utterance <= SECOND_WINDOW:
                return m
            return None
        return None

    def restated(self, u: Unit) -> None:
        """Take the chair's "moved by X, seconded by Y" as the record of mover and seconder."""
        text = u.clean
        mover = seconder = None
        if m := _MOVED_BY.search(text):
            mover = name_in(self.directory, m.group("who"))
        elif (m := _WHO_MOVED.search(text)) and not re.search(r"(?i)\bbeen\s+moved", text):
            mover = name_in(self.directory, m.group("who"), from_end=True)
        if m := _SECONDED_BY.search(text):
            seconder = name_in(self.directory, m.group("who"))
        elif m := _WHO_SECONDED.search(text):
            seconder = name_in(self.directory, m.group("who"), from_end=True)
        if mover is None and seconder is None:
            return
        target = self.floor()
        recent = target is not None and u.utt.index - target.evidence[0].utterance <= 20
        if not recent:
            wording = ""
            if w := re.search(r"(?i)\b(?:motion|moved)\b[^,]*?\b(?:to|that)\s+(?P<t>.+?)(?:,?\s+"
                              r"(?:and\s+)?(?:a\s+)?second(?:ed)?\b|$)", text):
                wording = clause(w.group("t"))
            if mover is None or not wording:
                return
            floor = self.floor()
            kind = _kind(wording, floor)
            motion = Motion(id="", text=wording, mover=mover, seconder=None, vote=Vote(),
                            outcome="pending", time=u.evidence().start, evidence=(u.evidence(),),
                            kind=kind, amends=floor.id if kind == "amendment" and floor else None,
                            source=SOURCE)
            target = self.motion(self.emit(Add(motion)))
            if target is None:
                return
            self.flag(target.id, "the motion itself was not heard; recorded from the chair's "
                      "statement of it", u)
        assert target is not None
        if mover and mover != target.mover:
            if not self.known(target.mover):
                self.change(target.id, "mover", mover, u)
            else:
                self.flag(target.id, f"the chair named {mover} as mover; the captions show "
                          f"{target.mover}", u)
        if seconder and seconder != target.seconder:
            if target.seconder is None or not self.known(target.seconder):
                self.change(target.id, "seconded", seconder, u)
            else:
                self.flag(target.id, f"the chair named {seconder} as seconder; the captions "
                          f"show {target.seconder}", u)

    def withdrawn(self, u: Unit) -> bool:
        m = _WITHDRAW.search(u.clean)
        if not m or re.search(r"(?i)\bsecond\b", u.clean) or u.clean.rstrip().endswith("?"):
            return False
        what = (m.group("what") or m.group("what2") or "").lower()
        pending = [x for x in self.ledger.motions if x.outcome == "pending"]
        if what == "amendment":
            pending = [x for x in pending if x.kind == "amendment"]
        mine = [x for x in pending if x.mover == u.speaker]
        if not mine and self.is_chair(u):
            done = [x for x in self.ledger.motions if x.outcome == "withdrawn" and x.history
                    and u.utt.index - x.history[-1].evidence.utterance <= 8]
            if done:  # the chair confirms what the mover asked: record it with the mover's
                self.change(done[-1].id, "withdrawn", None, u)
                return True
        recent = [x for x in pending if u.utt.index - x.evidence[0].utterance <= 40]
        cands = mine or (recent if self.is_chair(u) else [])
        if not cands:
            return False
        target = max(cands, key=lambda x: x.time)
        self.change(target.id, "withdrawn", None, u)
        return True

    def dies(self, u: Unit) -> bool:
        if not _DIES.search(u.clean):
            return False
        cands = [m for m in self.ledger.motions if m.outcome == "pending" and m.seconder is None]
        if not cands:
            return False
        target = max(cands, key=lambda m: m.time)
        self.change(target.id, "outcome", "failed", u)
        self.flag(target.id, "died for lack of a second", u)
        return True

    # ------------------------------------------------------------------ votes

    def merge_counts(self, tally: _Tally, unit: Unit) -> None:
        yes, no, abst = counts_in(unit.clean)
        if yes is not None or no is not None:
            tally.stated = unit
        tally.for_ = yes if yes is not None else tally.for_
        tally.against = no if no is not None else tally.against
        tally.abstain = abst if abst is not None else tally.abstain

    def vote(self, pos: int, method: str) -> int | None:
        """Read a vote from its call at ``pos``; return the position after it (None: not one)."""
        call = self.units[pos]
        hint = _hint(call.clean)
        target = self.floor(hint)
        if target is None:
            m = re.search(r"(?i)\bin\s+favou?r\s+of\s+(?P<t>.+?)(?:,?\s+(?:please\s+)?(?:say|"
                          r"signify|raise|indicate)\b.*)?[?.!]*$", call.clean)
            if not m or method == "roll_call":
                return None
        tally = _Tally(method, call, call, hint=hint)
        end = (self.roll(tally, pos + 1) if method == "roll_call"
               else self.voice(tally, pos + 1))
        if end is None:
            return None
        if target is None:  # a vote on the chair's words, with no motion heard before it
            wording = proposal_text(m.group("t"))  # type: ignore[union-attr]
            motion = Motion(id="", text=wording, mover="", seconder=None, vote=Vote(),
                            outcome="pending", time=call.evidence().start,
                            evidence=(call.evidence(),), kind=_kind(wording, None),
                            source=SOURCE)
            mid = self.emit(Add(motion))
            self.flag(mid, "put to a vote by the chair with no motion heard before it", call)
        self.conclude(tally)
        return end

    def announcement(self, tally: _Tally, u: Unit) -> bool:
        """Take ``u`` as the vote's result if it announces one; return whether it did."""
        outcome, what = _announced(u, hedged=True)
        target = self.floor(tally.hint)
        if outcome is None and target is not None and target.kind == "adjourn" \
                and ADJOURNED.search(u.clean):
            outcome = "carried"  # "we're adjourned" is the result of a motion to adjourn
        if outcome is None:
            return False
        if HEDGED.search(u.clean):
            tally.unclear.append("the chair did not state the result plainly "
                                 f"(\u201c{u.text}\u201d)")
        tally.announced, tally.announce, tally.last = outcome, u, u
        tally.hint = tally.hint or _hint(what)
        self.merge_counts(tally, u)
        for later in self.in_utterance(u):
            if any(n is not None for n in counts_in(later.clean)) or re.search(
                    r"(?i)\b(?:opposed|abstain|abstaining|unanimous)", later.clean):
                self.merge_counts(tally, later)
                tally.last = later
            else:
                break
        return True

    def voice(self, tally: _Tally, pos: int) -> int:
        """Read the responses and announcement of a voice (or show-of-hands) vote."""
        phase = "for"
        other = 0
        caller = tally.call.speaker
        self.merge_counts(tally, tally.call)
        limit = min(len(self.units), pos + 40)
        while pos < limit:
            u = self.units[pos]
            text = u.clean
            if UNCLEAR.search(u.text):
                tally.unclear.append("responses could not be made out in the captions")
            if _NOT_HEARD.search(text) and u.speaker == caller:
                tally.unclear.append(f"the chair said: \u201c{u.text}\u201d")
            if self.announcement(tally, u):
                if other:
                    tally.unclear.append("discussion resumed after the call for the vote"
                                         + ("" if tally.heard else ", and no ayes, noes or "
                                            "abstentions were heard"))
                return tally.last.pos + 1
            if _RETAKE.search(text):
                tally.for_ = tally.against = tally.abstain = None
                tally.heard.clear()
                tally.unclear.clear()
                if ROLL_CALL.search(text):
                    tally.method = "roll_call"
                    tally.last = u
                    return self.roll(tally, pos + 1) or pos + 1
                phase, other = "for", 0
                tally.last = u
                pos += 1
                continue
            if pos > tally.call.pos and (_MOVE[0].search(text) or _MOVE[1].search(text)
                                         or _ASK.search(text) or _NEXT_ITEM.search(text)):
                break
            how = answer_of(u)
            if u.speaker == caller or how is None:
                if _CALL.search(text) and pos > tally.call.pos + 1 and how is None:
                    phase = "for"
                    tally.last = u
                elif _OPPOSED_CALL.search(text) and len(u.bare.split()) <= 9:
                    phase = "against"
                    tally.last = u
                elif _ABSTAIN_CALL.search(text) and len(u.bare.split()) <= 9:
                    phase = "abstain"
                    tally.last = u
                if any(n is not None for n in counts_in(text)):
                    self.merge_counts(tally, u)
                    tally.last = u
                elif u.speaker == caller and (n := _lone_number(text)) is not None:
                    setattr(tally, {"for": "for_", "against": "against",
                                    "abstain": "abstain"}[phase], n)
                    tally.stated = u
                    tally.last = u
                elif tally.last is not u and how is None:
                    if len(u.bare.split()) > 5 or _MOVE[0].search(text):
                        other += 1
                    if other >= 4:
                        break
                pos += 1
                continue
            tally.heard[phase] = tally.heard.get(phase, 0) + 1
            tally.last = u
            pos += 1
        return tally.last.pos + 1

    def roll(self, tally: _Tally, pos: int) -> int | None:
        """Read a roll-call vote: names called, answers given, then the tally or result.

        An answer is credited to its speaker when the captions name a known person, else to
        the name just called (speech recognition labels speakers "SPEAKER_01").
        """
        members = len(self.r.roster.members) if self.r.roster else 0
        limit = min(len(self.units), pos + max(40, 4 * members + 12))
        caller: str | None = None
        called: tuple[str, Unit] | None = None
        other = 0
        while pos < limit:
            u = self.units[pos]
            text = u.clean
            pos += 1
            if self.announcement(tally, u):
                break
            how = answer_of(u)
            if any(n is not None for n in counts_in(text)) and how is None:
                self.merge_counts(tally, u)
                tally.last = u
                continue
            inline = INLINE_ANSWER.match(text)
            if inline and (name := resolve_name(self.directory, inline.group("who"))):
                vote = _ANSWERS[inline.group("how").lower()]
                if vote == "present" and not tally.roll:
                    return None  # an attendance roll call, not a vote
                if vote != "present":
                    tally.roll.append((u, name, vote))
                caller, called, tally.last = u.speaker, None, u
                continue
            callee = self.called_name(u)
            if callee is not None and how is None:
                if called is not None and called[0] != u.speaker:
                    tally.unclear.append(f"no answer heard from {called[0]}")
                # (when the one called now calls names, the chair had addressed the clerk)
                caller, called, tally.last = u.speaker, (callee, u), u
                continue
            if how is not None and u.speaker != caller:
                if called is None and not tally.roll:
                    continue  # "Yes." from the clerk before the first name is called
                if how in ("present", "absent"):
                    if not tally.roll:
                        return None
                    continue
                name = u.speaker if self.known(u.speaker) else (called[0] if called else None)
                if name is None and not self.directory.people:
                    name = u.speaker
                if name is None:
                    tally.unclear.append(f"an answer by {u.speaker!r} with no name called")
                else:
                    tally.roll.append((u, name, how))
                called, tally.last = None, u
                continue
            if called is not None and u.speaker != caller and UNCLEAR.search(u.text):
                tally.unclear.append(f"the answer of {called[0]} was not clear")
                called, tally.last = None, u
                continue
            other += 1
            if other >= 3 or len(u.bare.split()) > 12:
                break
        if called is not None and tally.announce is None:
            tally.unclear.append(f"no answer heard from {called[0]}")
        if not tally.roll and tally.announce is None:
            return None
        return tally.last.pos + 1

    def called_name(self, u: Unit) -> str | None:
        """Return the member a short sentence calls by name ("Director Ramirez?")."""
        text = re.sub(r"(?i),?\s*(?:how\s+do\s+you\s+vote|your\s+vote)\W*$", "", u.clean)
        words = text.strip(" ?.!,").split()
        if not words or len(words) > 4:
            return None
        return resolve_name(self.directory, " ".join(words))

    def consent(self, pos: int) -> int | None:
        """Read "without objection... so ordered"; return the position after it (None: not)."""
        u = self.units[pos]
        text = u.clean
        # "Without objection, the agenda is approved" grants consent in the same breath
        at_once = bool(_GRANTED.search(text)) or bool(
            re.search(r"(?i)\bwithout\s+objection\b", text)
            and (_announced(u)[0] or _PASSIVE.search(text) or _DISPOSE.search(text)
                 or re.search(r"(?i)\bwe(?:'ll|\s+will)\b", text)))
        granted: Unit | None = u if at_once else None
        p = pos + 1
        while granted is None and p < min(len(self.units), pos + 8):
            v = self.units[p]
            if _OBJECT.match(v.clean) and v.speaker != u.speaker:
                return p + 1  # consent refused: a vote will follow
            if _GRANTED.search(v.clean) or (v.speaker == u.speaker and _announced(v)[0]):
                granted = v
            p += 1
        if granted is None:
            return None
        end = granted.pos + 1
        for later in self.in_utterance(granted):
            if _announced(later)[0] or _PASSIVE.search(later.clean):
                end = later.pos + 1
        whole = " ".join(x.clean for x in self.units[pos:end])
        floor = self.floor()
        disposal = _DISPOSE.search(whole)
        if floor is not None and disposal:
            verb = disposal.group("verb").lower()
            kind = ("referred" if verb.startswith("refer") else
                    "tabled" if verb.startswith("table") else "postponed")
            value = disposal_value({"referred": "refer", "tabled": "table"}.get(kind, "postpone"),
                                   whole[disposal.start():])
            self.change(floor.id, kind, self.with_date(value), self.units[end - 1])
            return end
        tally = _Tally("consent", u, self.units[end - 1], announced="carried",
                       announce=self.units[end - 1])
        recent = floor is not None and u.utt.index - floor.evidence[0].utterance <= 40
        if not recent:
            m = (re.search(r"(?i)\bobjections?\s+to\s+(?P<t>.+?)[?.!]*$", text)
                 or re.search(r"(?i)\bwithout\s+objection,?\s+(?P<t>.+?)[?.!]*$", text)
                 or re.search(r"(?i)\bno\s+objections?,?\s+(?P<t>.+?)[?.!]*$", text))
            wording = proposal_text(m.group("t")) if m else ""
            wording = re.sub(r"(?i)[,;]?\s*(?:hearing|seeing)\s+none.*$|[,;]?\s*(?:it\s+is\s+)?so"
                             r"\s+ordered.*$", "", wording).strip(" ,.")
            if not wording or re.fullmatch(r"(?i)(?:so\s+ordered|it\s+is\s+so\s+ordered)",
                                           wording):
                return end
            motion = Motion(id="", text=wording, mover="", seconder=None, vote=Vote(),
                            outcome="pending", time=u.evidence().start,
                            evidence=(u.evidence(),), kind=_kind(wording, None), source=SOURCE)
            mid = self.emit(Add(motion))
            self.flag(mid, "adopted by general consent on the chair's proposal; no motion was "
                      "made", u)
        self.conclude(tally)
        return end

    def conclude(self, tally: _Tally) -> None:
        """Record a vote, its result and any follow-on change (amended text, postponed...)."""
        target = self.floor(tally.hint)
        if target is None:
            return
        call = tally.call
        latest: dict[str, str] = {}
        for _, name, how in tally.roll:
            if name in latest and latest[name] != how:
                self.flag(target.id, f"{name} answered twice ({latest[name]}, then {how}); the "
                          "later answer is recorded", tally.last)
            latest.pop(name, None)
            latest[name] = how  # a member may change a vote before the result is announced
        roll = tuple(latest.items())
        yes, no, abst = tally.for_, tally.against, tally.abstain
        if tally.method == "roll_call" and roll:
            computed = (sum(h == "aye" for _, h in roll), sum(h == "no" for _, h in roll),
                        sum(h == "abstain" for _, h in roll))
            if yes is not None and (yes, no if no is not None else computed[1]) != computed[:2]:
                self.flag(target.id, f"the roll call gives {_score(*computed)} but the tally "
                          f"stated was {_score(yes, no, abst)}", tally.stated or tally.last)
            if tally.unclear and yes is None:
                yes = no = abst = None
            elif yes is None:
                yes, no, abst = computed
        elif tally.method == "consent":
            yes = no = abst = None
        method = tally.method if tally.method != "none" else ("count" if yes is not None else
                                                             "none")
        vote = Vote(method, yes, no, abst, roll)
        if method != "none":
            for i, (answer, name, how) in enumerate(tally.roll):
                # each answer is the evidence of that member's vote; the roll so far goes with it
                so_far = tuple((n, h) for _, n, h in tally.roll[: i + 1])
                self.change(target.id, "vote", f"{name}: {how}", answer,
                            replace(vote, roll_call=so_far))
            value = {"voice": "voice", "consent": "general consent",
                     "roll_call": "roll call"}.get(method, "counted")
            if yes is not None or no is not None:
                value += " " + _score(yes, no, abst)
            self.change(target.id, "vote", value, tally.stated or call, vote)
        for note in dict.fromkeys(tally.unclear):
            self.flag(target.id, f"vote not clearly heard: {note}; counts left for the clerk to "
                      "fill in", tally.last)
        if method == "count" and yes is None and no is None:
            self.flag(target.id, "votes were shown, not counted aloud; the clerk must enter the "
                      "number on each side (Robert 1876 \u00a751)", tally.last)
        computed_outcome, rule = tally_outcome(vote, target, self.r.roster)
        outcome = tally.announced
        evidence_unit = tally.announce or tally.last
        if outcome and computed_outcome and outcome != computed_outcome:
            self.flag(target.id, f"the chair announced the motion {outcome}, but the tally "
                      f"{_score(yes, no, abst)} means it {computed_outcome} (needs {rule}); "
                      "clerk to check", evidence_unit)
        if outcome is None and computed_outcome:
            outcome = computed_outcome
            self.flag(target.id, f"no result was announced; {computed_outcome} by the tally "
                      f"{_score(yes, no, abst)} ({rule})", evidence_unit)
        if outcome is None:
            self.flag(target.id, "a vote was taken but no result was heard; clerk to fill in",
                      evidence_unit)
            return
        self.change(target.id, "outcome", outcome, evidence_unit)
        if outcome == "carried":
            self.follow_on(self.motion(target.id) or target, evidence_unit)

    def follow_on(self, motion: Motion, unit: Unit) -> None:
        """Carry out what an adopted amendment or subsidiary motion does to its main motion."""
        if motion.kind == "amendment":
            main = self.applies_to(motion)
            if main is None:
                return
            new = amended_text(main.text, motion.text)
            restated = self.restatement(unit)
            if new is None and restated is not None:
                # the chair's "the main motion as amended, which is to..." gives the wording
                self.change(main.id, "amended", restated[0], restated[1])
                self.consumed_to = max(self.consumed_to, restated[1].pos + 1)
            elif new is None:
                change = re.sub(r"(?i)^amend\s+(?:the\s+motion\s+)?(?:by\s+|to\s+)?", "",
                                motion.text)
                self.change(main.id, "amended", f"{main.text}, amended: {change}", unit)
                self.flag(main.id, f"the wording after amendment {motion.id} could not be "
                          "worked out; clerk to write it", unit)
            else:
                self.change(main.id, "amended", new, unit)
        elif motion.kind in SUBSIDIARY:
            main = self.applies_to(motion)
            if main is None:
                return
            kind = {"postpone": "postponed", "table": "tabled", "refer": "referred"}[motion.kind]
            said = motion.evidence[0].quote if motion.evidence else motion.text
            self.change(main.id, kind, self.with_date(disposal_value(motion.kind, said)), unit)

    def with_date(self, value: str | None) -> str | None:
        """Return a postponement's "to the November 11 meeting" with its date, when known."""
        if not value:
            return value
        try:
            from ..dates import resolve_due
        except ImportError:  # pragma: no cover - the date reader ships with the package
            return value
        info = self.r.ctx.transcript.meeting
        day, _ = resolve_due(value, info.date, info.next_meeting)
        if day is None and re.search(r"(?i)\bnext\s+(?:regular\s+)?meeting\b", value):
            day = info.next_meeting
        return f"{value} ({day.isoformat()})" if day else value

    def restatement(self, after: Unit) -> tuple[str, Unit] | None:
        """Return the chair's wording of the motion as amended, said just after ``after``."""
        for pos in range(after.pos + 1, min(len(self.units), after.pos + 4)):
            u = self.units[pos]
            m = re.search(r"(?i)\bmotion\s+as\s+amended,?\s+(?:which\s+is|is|reads|now\s+reads|"
                          r"which\s+reads)[:,]?\s+(?:to\s+|that\s+)?(?P<x>.+?)[.!]*$", u.clean)
            if m:
                return clause(m.group("x")), u
        return None


def _lone_number(text: str) -> int | None:
    t = digits(text)
    m = re.fullmatch(r"\W*(?:(?:that's|that\s+is|i\s+(?:count|see|have)|we\s+have)\s+)?(\d+)"
                     r"(?:\s+(?:hands?|votes?|in\s+favou?r|opposed|abstentions?))?\W*", t)
    return int(m.group(1)) if m else None


def _score(yes: int | None, no: int | None, abst: int | None) -> str:
    parts = ["?" if n is None else str(n) for n in (yes, no)]
    score = "-".join(parts)
    return f"{score}-{abst}" if abst else score


# --------------------------------------------------------------------------- end of meeting


def settle(ledger: Ledger, ctx: ReadContext) -> Ledger:
    """Return the ledger with outcomes computed from tallies and flags for the clerk.

    Runs once after the relay. A motion with counts but no result gets the result the tally
    gives (and a flag saying so); a vote with neither gets a flag; an announced result that
    the tally contradicts gets a flag; a motion never voted on stays "pending".
    """
    roster = ctx.directory.roster
    ops: list[Op] = []
    for m in ledger.motions:
        if not m.evidence:
            continue
        ev = m.evidence[-1]
        result, rule = tally_outcome(m.vote, m, roster)
        score = _score(m.vote.for_, m.vote.against, m.vote.abstain)

        def flag(text: str, motion: Motion = m, evidence: Evidence = ev) -> None:
            if not any(f.split(";")[0] == text.split(";")[0] for f in motion.flags):
                ops.append(Update(motion.id, Change("flag", text, evidence, source=SOURCE)))

        if m.outcome == "pending" and m.vote.method != "none":
            if result:
                ops.append(Update(m.id, Change("outcome", result, ev, source=SOURCE)))
                flag(f"no result was announced; {result} by the tally {score} ({rule})")
            elif not any("no result was heard" in f for f in m.flags):
                flag("a vote was taken but no result was heard; clerk to fill in")
        elif (m.outcome in ("carried", "failed") and result and result != m.outcome
              and not any(f.startswith("the chair announced") for f in m.flags)):
            flag(f"the chair announced the motion {m.outcome}, but the tally {score} means "
                     f"it {result} (needs {rule}); clerk to check")
    return apply(ledger, ops)[0]
