"""Action items: commitments, assignments, explicit markers, and updates to carried items.

Owner rules: the speaker for first person ("I'll send..."); the addressee for
second person ("Kim, can you..."; a named person in the same turn, else the
previous speaker); a person named as the subject ("Kim's going to...") through
the directory; nobody for "we" and "someone" until a person takes it.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..dates import resolve_due
from ..model import ActionItem, Change, Evidence
from .clauses import (
    NEGATION,
    TALK_VERBS,
    WORK_COMPLEMENTS,
    Sentence,
    content_stems,
    evidence,
    mentions,
    overlap,
    similar,
    stem,
    verb_phrase,
)
from .ledger import Add, Op, Update
from .state import NEVER, State, last_time

if TYPE_CHECKING:
    from spacy.tokens import Token

_NEG = r"(?!not\b|n't\b|never\b)"
_FUT = r"(?:'ll|will|shall|'m going to|'m gon na|am going to|am gon na|'m gonna)"
# strong cues make an action with any verb that is not talk in the room; weak ones
# ("I have to", "you need to": often generic) only with a verb of work
SELF = re.compile(
    r"(?:^|\s)(?<!if )i (?:" + _FUT + r"|'d better|'ll have to|will have to|'ll try (?:and|to)|"
    r"'m (?:also )?(?:happy|glad) to|'ll also|volunteer to|'ll go ahead and) (?!just )" + _NEG
)
SELF_WEAK = re.compile(  # "I'll just hold it": mostly the next minute, unless the verb is work
    r"(?:^|\s)(?<!if )i (?:can|need to|have to|'ve got to|got ta|should|must|can also|'ll just|"
    r"will just|'m just going to|'m just gon na) " + _NEG
)
LET_ME = re.compile(r"(?:^|\s)let me " + _NEG)
OFFER = re.compile(r"(?:^|\s)(?:shall|should) i |(?:^|\s)(?:do you )?want me to ")
REQUEST = re.compile(r"(?:^|\s)(?:can|could|would|will) you (?:please |maybe |also |just )*" + _NEG)
SECOND = re.compile(
    r"(?:^|\s)you (?:'ll|will|'re (?:going to|gon na)|are (?:going to|gon na)|"
    r"'ll need to|'ll have to|'re (?:also )?(?:in charge of|responsible for)) " + _NEG
)
SECOND_WEAK = re.compile(r"(?:^|\s)you (?:should|can|could|might want to|need to|have to|"
                         r"'ve got to|must) " + _NEG)
WANT_YOU = re.compile(r"(?:^|\s)(?:i 'd like|i want|i need|i 'd want) you to ")
PLEASE = re.compile(r"^(?:(?:\S+ ){0,2})please (?!note)")
GROUP_SOMEONE = re.compile(
    r"(?:^|\s)(?:someone|somebody|anyone|anybody|one of us) (?:needs to|has to|should|must|"
    r"'s got to|will have to|'ll have to|could|can|ought to) " + _NEG
    + r"|(?:^|\s)who (?:can|could|will|'s going to|is going to|wants to|'ll) "
    + r"|(?:^|\s)we need (?:someone|somebody) to |(?:^|\s)can (?:someone|somebody|anyone) "
)
GROUP_WE = re.compile(
    r"(?:^|\s)we (?:all )?(?:need to|have to|'ve got to|got ta|should|must|'ll need to|"
    r"will need to|'ll have to|will have to|" + _FUT.replace("'m", "'re").replace("am ", "are ")
    + r"|'re all going to) " + _NEG
)
THIRD_AFTER = re.compile(
    r"^(?:'s|'ll|will|is|are|can|should|could|needs to|has to|'ll have to|is to|to|need to|"
    r"have to|are to|and (?:the )?[a-z_]+ (?:need to|will|are going to|'ll|to)|"
    r"'s going to|'s gon na|is going to|is gon na|are going to|are gon na|and i 'll|and i will|"
    r"and you|'s going to be|will be) "
)
MARKER = re.compile(r"(?:^|\s)(?:action (?:item|point)s?|to do|todo|to-do|next steps?) (?::|-|"
                    r"is|for) ?")
# taking an item: "I'll take that", "leave it with me"; reassigning: "actually Kim will do it"
TAKE_VERBS = r"(?:take|handle|do|grab|cover|own|pick up|look after|deal with|sort out|sort)"
TAKE = re.compile(
    r"(?:^|\s)(?P<who>i|you|[a-z][a-z'_-]*(?: [a-z][a-z_-]*)?) (?:'ll|will|can|could|should|"
    r"'s going to|is going to|'s gon na|is gon na|'m going to|'m gon na|'d be happy to|"
    r"'m happy to|'ll be happy to|'s|is|'m) (?:(?:actually|instead|then|just|also|happily) )*"
    + TAKE_VERBS + r" (?:that|it|this|those|them|these|over|on)\b(?: one)?"
    r"|(?:^|\s)(?P<who6>i|[a-z][a-z'_-]*) (?:(?:'ll|will|can|should|'s going to|is going to|"
    r"'s gon na|is gon na) (?:(?:actually|instead|then|just|also) )*(?:take (?:over )?|handle |"
    r"do |cover |pick up |deal with )"
    # the progressive of a hand-over: "so Daniel's taking the labels"
    r"|(?:'s|is|'m) (?:(?:actually|instead|then|now|also) )*(?:taking (?:over )?|handling |"
    r"covering |picking up ))(?:the|that|this) (?P<obj>[a-z][a-z'_-]*(?: (?!still|instead|then|now|"
    r"before|by|and|on)[a-z][a-z'_-]*){0,4})"
    r"|(?:^|\s)(?:can|could|would|will) (?P<who7>you) (?:(?:please|maybe|also|just) )*(?:take|"
    r"handle|"
    r"do|cover|own|pick up|be there for|be there|look after) (?:that|it|this|those|them)?\b"
    r"|(?:^|\s)leave (?:it|that|this) (?:with|to) (?P<who2>me)\b"
    r"|(?:^|\s)(?P<who3>i) 'm on it\b"
    r"|(?:^|\s)(?:give|hand|pass|assign) (?:that|it|this)(?: one)? (?:to|"
    r"over to) (?P<who4>[a-z]+)\b"
    r"|(?:^|\s)let (?P<who5>[a-z]+) (?:take|do|handle) (?:that|it|this)\b"
)
REASSIGN_WORDS = re.compile(r"\b(?:actually|instead|rather|over|change of plan|no wait)\b")
DUE_CHANGE = re.compile(
    r"\b(?:push|pushed|move|moved|postpone|postponed|shift|delay|delayed|bump|put (?:that|it|"
    r"this) off|"
    r"extend|bring (?:that|it|this) forward|change|make|making|reschedule)\b.*\b(?:to|until|"
    r"till|for|"
    r"by|on|next|in)\b|\b(?:can|could) wait (?:until|till)\b|\blet 's say\b|\binstead\b"
)
DONE = re.compile(
    r"(?:^|\s)(?P<who>i|we|he|she|they|you) (?:(?:'ve|have|has|'s) (?:already |just |finally )?|"
    r"(?:already|just|finally) )(?P<verb>sent|done|did|finished|completed|booked|emailed|called|"
    r"submitted|fixed|sorted|ordered|paid|signed|written|wrote|checked|contacted|rang|bought|"
    r"printed|"
    r"posted|uploaded|shared|circulated|arranged|organised|organized|scheduled|confirmed|updated|"
    r"spoken|spoke|talked|filled|drafted|prepared|reserved|cancelled|canceled|delivered|returned|"
    r"renewed|researched|measured|scanned|replied|asked)\b"
    r"|(?:^|\s)(?:that|it|this|the [a-z]+|those|they) (?:'s|is|has been|'s been|are|were|was) "
    r"(?:already |all |now )?(?P<state>done|finished|sorted|taken care of|complete|completed|sent|"
    r"booked|handled|dealt with|fixed|signed|submitted|paid|filed)\b"
)
# a plain past-tense report: "I sent the lease back on Thursday", "I paid Kilnworth"
PAST_REPORT = re.compile(
    r"(?:^|\s)(?P<who>i|we|he|she|they) "
    r"(?P<verb>sent|done|did|finished|completed|booked|emailed|called|"
    r"submitted|fixed|sorted|ordered|paid|signed|written|wrote|checked|contacted|rang|bought|"
    r"printed|"
    r"posted|uploaded|shared|circulated|arranged|organised|organized|scheduled|confirmed|updated|"
    r"spoken|spoke|talked|filled|drafted|prepared|reserved|cancelled|canceled|delivered|returned|"
    r"renewed|researched|measured|scanned|replied|asked)\b"
)
# a bare "Done." answering a question about an item ("Daniel, the deposit?" / "Done.")
BARE_DONE = re.compile(r"^(?:(?:yeah|yes|yep|um|uh|oh|all) ,? )*(?:done|sorted|finished)\b")
DROP = re.compile(
    r"(?:^|\s)(?:let 's |we can |we could |we should |we 'll |just |so )?(?:forget|drop|scrap|"
    r"ditch|abandon|scratch|cancel|skip)(?: about)? (?P<what>.+)"
    r"|(?:^|\s)never mind (?:about )?(?P<what2>.+)"
    r"|(?:^|\s)(?:we|i) (?:do n't|no longer|wo n't) need (?:to |the |a )?(?P<what3>.+?)"
    r"(?: any ?more| after all)?\s*[.!]?$"
    r"|(?:^|\s)no need (?:to|for) (?P<what4>.+)"
)
IMMEDIATE = re.compile(r"\b(?:walk (?:me|us) through|let (?:you|us|them|everyone) go|"
                       # the chair handing the floor: "I'll let you do your presentation"
                       r"let [a-z]+(?: [a-z]+)? (?:to )?(?:do|give|start|begin|take) (?:your|his|"
                       r"her|their|the) (?:presentation|talk|turn|bit|part)|"
                       r"(?:it|that|this) down|now|"
                       r"right now|first|quickly|briefly|here|at the moment|in a minute|"
                       r"in a second|in a sec|real quick|for a second|for a moment|on the board|"
                       r"on the screen|on the whiteboard|for you|with you|to you|you guys)\b")
# verbs that make "we will ..." an action of the group rather than a plan for the product
WORK_VERBS = frozenset(
    "send email e-mail contact call ring phone check research investigate find prepare write "
    "draft book order buy arrange organise organize schedule set follow circulate review update "
    "submit sign fill complete confirm inform notify remind print post upload share report chase "
    "finalise finalize meet bring collect gather compile distribute draw test evaluate survey "
    "ask look come get work think study design build sketch present figure consult discuss "
    "recommend suggest reply respond speak talk visit interview hire fix finish deliver "
    "produce sort pay invoice reserve renew cancel register apply".split()
)
# "we need to think about it" is the discussion itself, not a task the minutes should carry
WE_WORK_VERBS = WORK_VERBS - frozenset(
    "think discuss design build work look get come present meet talk speak figure produce fix "
    "sort recommend suggest study test evaluate".split()
)
FUTURE = re.compile(r"(?:^|\s)(?:i|we|you|he|she|they) (?:'ll|will|'re going to|'m going to|"
                    r"'m gon na|'re gon na|can|need to|have to)\s")
WINDOW = 300.0  # seconds in which "that" can still point at an item


@dataclass(frozen=True)
class Found:
    """A new action read from one sentence."""

    task: str
    owner: str | None
    due: str | None
    due_text: str
    quote: str
    verb: str


def _work(verb: Token, sentence: Sentence) -> bool:
    """Return True when ``verb`` starts an action, not talk in the room ("I'll show you")."""
    lemma = verb.lemma_.lower()
    if lemma not in TALK_VERBS:
        return True
    comps = WORK_COMPLEMENTS.get(lemma)
    if comps is None:
        return False
    end = min(verb.i + 5, sentence.span.end)
    following = " ".join(t.lower_ for t in verb.doc[verb.i + 1 : end])
    if lemma == "do" and re.match(r"(?:the|a|an|our|some|all the) [a-z]", following):
        return True  # "I'll do the sign-up sheet": a task; "do that" is taking one (TAKE)
    if lemma == "think" and re.match(r"about (?:it|that|this)\b", following):
        return False  # "I'll think about it" promises nothing
    return any(re.search(rf"\b{re.escape(c)}\b", following) for c in comps) if comps else True


def _work_word(lemma: str) -> bool:
    return lemma not in TALK_VERBS


def _due(state: State, sentence: Sentence) -> tuple[str | None, str, tuple[int, int] | None]:
    """Return (ISO date or None, phrase, doc char span of the phrase) of a due date said."""
    meeting = state.ctx.transcript.meeting
    date, phrase = resolve_due(sentence.text, meeting.date, meeting.next_meeting)
    if not phrase:
        return None, "", None
    at = sentence.text.lower().find(phrase.lower())
    span = None
    if at >= 0:
        text = sentence.span.text
        base = sentence.span.start_char + (len(text) - len(text.lstrip()))
        span = (base + at, base + at + len(phrase))
    return (date.isoformat() if date else None), phrase, span


def _addressee(state: State, k: int, sentence: Sentence, *, strict: bool = False) -> str | None:
    """Return who "you" is: a person named in the turn, else the previous speaker."""
    turn = state.turns[k]
    me = turn.speaker
    directory = state.ctx.directory
    named = [m for m in mentions(sentence, directory) if m[0] != me]
    if not named:  # "Um, marketing executive, / you'll be thinking about..."
        before = [s for s in turn.sentences if s.number < sentence.number][-2:]
        for s in reversed(before):
            named = [m for m in mentions(s, directory) if m[0] != me]
            if named:
                break
    if named:
        return named[0][0]
    if strict:
        return None
    return state.previous_speaker(k)


def _phrase(state: State, sentence: Sentence, offset: int, names: list[str],
            due_span: tuple[int, int] | None) -> tuple[str, Token | None]:
    start = sentence.token(offset)
    drops = [due_span] if due_span else []
    return verb_phrase(sentence.span, start, drop_chars=drops, drop_names=names)


# Procedural moves and statements of one's vote are acts performed in the room as they are
# said (common practice of meeting procedure): "I'll second that", "I'll abstain", "I'll
# call the roll", "state your name for the record". Nothing is left to do after the meeting.
PROCEDURAL = re.compile(
    r"^(?:abstain|vote|second|call (?:the |this |a )?(?:roll|meeting|vote|question|order)|"
    r"call (?:this|the) [a-z ]*(?:meeting|session)\b.*\bto order|"
    r"withdraw (?:my |the |our )?(?:motion|amendment|second)|move (?:that|to adjourn|the motion|"
    r"we adjourn)|adjourn|table (?:the|this|that) motion|recuse|recognise|recognize|chair|"
    r"go ahead and state|state (?:your|my|his|her|their) name|"
    r"(?:go ahead and )?(?:state|give|spell) (?:your|my) (?:name|address))\b"
)
# Habitual narrative ("the night before I'll look at the forecast... we can often work the
# inside pots"): "will" of habit describes a routine, not a task owed to this group. The
# markers are adverbs of frequency and generic time clauses, in the sentence or in the same
# speaker's next words (narratives in research interviews run over several cues).
HABITUAL = re.compile(
    r"(?:^|\s)(?:usually|always|normally|typically|often|sometimes|"
    r"tend to|every (?:day|morning|night|evening|week|month|year|time|season|summer|winter)|"
    r"each (?:day|morning|night|time|week)|most (?:days|mornings|nights|weeks)|"
    r"the night before|on (?:a )?(?:good|bad) days?)(?:\s|$)"
)
# in the sentence itself a generic time clause also marks habit ("whenever the wind drops")
HABITUAL_HERE = re.compile(r"(?:^|\s)whenever\s")


def procedural(task: str) -> bool:
    """Return True when a task is a procedural move or a vote stated in the room."""
    return bool(PROCEDURAL.search(task.lower()))


def habitual(state: State, k: int, sentence: Sentence) -> bool:
    """Return True when a commitment sits in a narrative of habit, not a plan for this group."""
    if HABITUAL.search(sentence.toks) or HABITUAL_HERE.search(sentence.toks):
        return True
    turn = state.turns[k]
    utterances = state.ctx.transcript.utterances
    i = turn.utterance.index
    # the same speaker's next words (fixed transcript text: the step stays pure)
    near = [u for u in utterances[i: i + 4]
            if u.speaker == turn.speaker and abs(u.start - turn.utterance.start) <= 30.0]
    return any(HABITUAL.search(" " + u.text.lower().replace(",", " ") + " ") for u in near)


# what is left of a task when it names nothing to act on ("I'll paint and paint", "can you
# separate these uh these"): the thing in hand, not an item to carry
_IN_HAND = frozenset("these those and or again too then".split())


def _nothing_to_act_on(task: str, verb: Token) -> bool:
    """Return True when a task is its verb alone, or its verb and the things in hand."""
    forms = {verb.lower_, verb.lemma_.lower()}
    rest = [w for w in task.lower().split()[1:] if w not in forms]
    return all(w in _IN_HAND for w in rest)


def _reported_before(sentence: Sentence, offset: int) -> bool:
    """Return True when the sentence reports a deed with its object before ``offset``."""
    end = sentence.token(offset)
    return any(t.tag_ in ("VBD", "VBN") and any(c.dep_ == "dobj" for c in t.children)
               for t in sentence.span if t.i < end)


def _speaker_for_me(task: str, speaker: str) -> str:
    """Return a task handed to someone else with the speaker named for "me" and "my".

    "someone needs to let me in", said by Colm and taken by Hana, is "let Colm in" in
    the minutes: read later, "me" would be whoever reads it.
    """
    task = re.sub(r"\b(?:me|myself)\b", speaker, task)
    return re.sub(r"\bmy\b", f"{speaker}'s", task)


def _negated(sentence: Sentence, start: int, verb: Token) -> bool:
    """Return True when a negation stands between the cue and the task's verb, or on the verb."""
    between = " ".join(t.lower_ for t in sentence.doc[start:verb.i])
    return bool(NEGATION.search(between)) or any(c.dep_ == "neg" for c in verb.children)


def _immediate(task: str, due: str | None, due_text: str) -> bool:
    """Return True for talk about the next minute ("I'll just go over it quickly")."""
    if due or due_text:
        return False
    return bool(IMMEDIATE.search(task.lower()))


_EMBEDDING = re.compile(r"(?:^|\s)(?:how|what|where|why|whether|if|when|something|anything|"
                       r"everything|which|who|whatever|unless|once|until|before|after)$")
_DENIAL = re.compile(r"(?:n't|not|never) (?:think|know|believe|say|sure|mean)\b|\bnot sure\b")


def _embedded(toks: str, start: int) -> bool:
    """Return True when the cue sits in a subordinate clause or a denial ("I don't think we..."),
    or follows a condition in its clause ("if there's any more, I can email you"): an offer
    on a condition is not yet a commitment."""
    before = toks[:start].rstrip()
    clause = before.rsplit(" , ", 1)[-1]
    return bool(_EMBEDDING.search(before) or _DENIAL.search(before)
                or re.search(r"(?:^|\s)if\s", clause))


def _clause_due(state: State, sentence: Sentence, start: int, end: int
                ) -> tuple[str | None, str, tuple[int, int] | None]:
    """Return the due date said in tokens [start, end) of the sentence's doc."""
    meeting = state.ctx.transcript.meeting
    span = sentence.doc[start:end]
    date, phrase = resolve_due(span.text, meeting.date, meeting.next_meeting)
    if not phrase:
        return None, "", None
    at = span.text.lower().find(phrase.lower())
    chars = (span.start_char + at, span.start_char + at + len(phrase)) if at >= 0 else None
    return (date.isoformat() if date else None), phrase, chars


_NOT_PLAN = re.compile(r"^(?:already|just|not|never|been|got|also got|n't)\b")


def read_new(state: State, k: int, sentence: Sentence) -> list[Found]:
    """Return the new actions a sentence states (one per commitment in it)."""
    turn = state.turns[k]
    toks = sentence.toks
    if sentence.is_question and not (REQUEST.search(toks) or OFFER.search(toks)
                                     or GROUP_SOMEONE.search(toks)):
        return []
    if re.search(r"(?:^|\s)(?:if|when|whether|unless) (?:i|you|we|someone) ", toks[:40]) and not \
            MARKER.search(toks):
        return []
    directory = state.ctx.directory
    named = mentions(sentence, directory)
    names = [p.name.split()[0] for p in directory.people] + [m[0] for m in named]
    # (offset in toks after the cue, owner, needs a verb of work, "we" cue)
    cands: list[tuple[int, str | None, bool, bool]] = []
    marker = MARKER.search(toks)
    if marker:
        rest = toks[marker.end():]
        owner = None
        for name, i0, _ in named:
            if sentence.token(marker.end()) <= i0:
                owner = name
                break
        if re.match(r"i (?:'ll|will) ", rest):
            owner = turn.speaker
        cands.append((marker.end(), owner, False, False))
    for pattern, who, weak in ((SELF, "me", False), (LET_ME, "me", False), (OFFER, "me", False),
                               (SELF_WEAK, "me", True), (REQUEST, "you", False),
                               (SECOND, "you", False), (WANT_YOU, "you", False),
                               (SECOND_WEAK, "you!", True), (GROUP_SOMEONE, None, False),
                               (GROUP_WE, "we", True)):
        for m in pattern.finditer(toks):
            if _embedded(toks, m.start()):
                continue
            if re.match(r"be able to\b", toks[m.end():]) or (
                    re.match(r"be [a-z]+ing\b", toks[m.end():]) and who != "you"):
                # "I'll be able to...", "I should be writing this down": commentary. Said
                # to someone, the progressive hands out work: "you'll be working on the
                # casing" (common practice of chairs assigning the next phase)
                continue
            if who == "we" and re.search(r"(?:^|\s)(?:maybe|perhaps|probably)\s",
                                         toks[: m.start() + 1]):
                continue
            if who == "me":
                cands.append((m.end(), turn.speaker, weak, False))
            elif who == "you":
                person = _addressee(state, k, sentence, strict=True)
                # "you will" with nobody named is often generic ("you will save batteries");
                # "can you...?" is a request to whoever is addressed
                generic = person is None and pattern is not REQUEST
                cands.append((m.end(), person or _addressee(state, k, sentence), generic, False))
            elif who == "you!":
                person = _addressee(state, k, sentence, strict=True)
                if person:  # "you need to" only counts when said to somebody named
                    cands.append((m.end(), person, True, False))
            elif who == "we":
                cands.append((m.end(), None, weak, True))
            else:
                cands.append((m.end(), None, weak, False))
    # a person named as the subject: "Kim's going to send it", "the designer will look into it"
    for name, i0, i1 in named:
        off = len(" ".join(t.lower_ for t in sentence.doc[sentence.span.start:i1])) + 1
        if off >= len(toks):
            continue
        tail = re.sub(r"^(?:_ )+|(?<= )_ ", "", toks[off:])  # AMI's "I_D_" splits off a "_"
        third = THIRD_AFTER.match(tail)
        if not third or _NOT_PLAN.match(tail[third.end():]):
            continue
        cue = third.group(0)
        if cue.startswith("to ") and i0 - sentence.span.start > 5 and not marker:
            continue
        if re.search(r"(?:^|\s)(?:but then|then|otherwise|or else)\s*$", toks[: off].rsplit(
                name.split()[0].lower(), 1)[0]):
            continue  # "you could, but then Colm has to test it": a consequence, not a task
        weak = bool(re.match(r"(?:can|could|should|has to|have to|needs to|need to) ", cue))
        owner = turn.speaker if "and i" in cue else name
        cands.append((off, owner, weak, False))
    please = PLEASE.search(toks)
    if not cands and please and not sentence.is_question:
        cands.append((please.end(), _addressee(state, k, sentence), False, False))
    cands.sort(key=lambda c: c[0])
    found: list[Found] = []
    used: set[int] = set()
    starts = [sentence.token(c[0]) for c in cands]
    for n, (offset, owner, need_work, we) in enumerate(cands):
        start = starts[n]
        end = next((st for st in starts[n + 1 :] if st > start), sentence.span.end)
        due, due_text, due_span = _clause_due(state, sentence, start, end)
        task, verb = _phrase(state, sentence, offset, names, due_span)
        if verb is None or verb.i in used or not task or len(task.split()) < 2:
            continue
        if verb.i < start or verb.i - start > 8 or verb.i >= end:
            continue  # the verb is far from the cue, or in the next clause
        if _immediate(task, due, due_text):
            continue
        pronoun = bool(_PRONOUN_TASK.match(task))
        if not _work(verb, sentence) and not pronoun:
            continue
        verbs = WE_WORK_VERBS if we else WORK_VERBS
        if need_work and not pronoun and stem(verb.lemma_.lower()) not in {stem(v) for v in verbs}:
            continue
        if not content_stems(task) and not pronoun:
            continue
        if _nothing_to_act_on(task, verb):
            continue
        if _negated(sentence, start, verb):
            continue  # "I'll probably not send it": no commitment, and never its opposite
        if found and found[-1].owner == owner and found[-1].task.endswith(task):
            continue
        if habitual(state, k, sentence):
            continue
        used.add(verb.i)
        clause = sentence.doc[start:end].text
        if owner != turn.speaker:
            task = _speaker_for_me(task, turn.speaker)
        found.append(Found(task, owner, due, due_text, clause, verb.lemma_.lower()))
    return found


# --------------------------------------------------------------------------- targets


def _task_stems(item: ActionItem) -> frozenset[str]:
    return content_stems(item.task)


def context_stems(state: State, k: int, sentence: Sentence, turns: int = 2
                  ) -> tuple[frozenset[str], ...]:
    """Return content stems of the sentence and of the sentences before it, nearest first."""
    out = [content_stems(sentence.toks)]
    mine = state.turns[k]
    out += [content_stems(s.toks) for s in reversed(mine.sentences[: sentence.number])]
    for turn in reversed(state.turns[max(k - turns, 0) : k]):
        out += [content_stems(s.toks) for s in reversed(turn.sentences)]
    return tuple(x for x in out if x)


def target(state: State, now: float, words: frozenset[str], *, verb: str = "",
           prefer_owner: str | None = None, pronoun_ok: bool = True,
           unassigned_first: bool = False, context: tuple[frozenset[str], ...] = ()
           ) -> ActionItem | None:
    """Return the carried open action a remark most likely refers to, or None.

    By content first ("the lease is signed"); for a bare "that" or "it", the
    recent action the last turns talked about, else the one mentioned last.
    """
    best: tuple[float, ActionItem] | None = None
    recent = state.recent_actions(now, seconds=2 * 3600)
    for item in recent:
        shared = overlap(words, _task_stems(item))
        score = shared
        if verb and item.task.split()[:1] and stem(item.task.split()[0]) == stem(verb):
            score += 0.5
        if prefer_owner and item.owner == prefer_owner:
            score += 0.15
        if unassigned_first and item.owner is None:
            score += 0.1
        age = now - last_time(item)
        score += 0.2 * math.exp(-max(age, 0.0) / WINDOW)
        if shared >= 0.34 and (best is None or score > best[0]):
            best = (score, item)
    if best is not None:
        return best[1]
    if not pronoun_ok:
        return None
    if context:  # the last turns name the item ("So the sign-up sheet... would you take that?")
        # an item carried from an earlier meeting counts when these very turns name it
        talked = [a for a in recent if (now - last_time(a) <= 6 * WINDOW or
                                        last_time(a) == NEVER)
                  and not (unassigned_first and a.owner is not None)]
        # what the last sentences talked about, the nearest counting most; an item not yet
        # mentioned here must be named by its things, not just its verb ("you sent the
        # photos" does not name "send round a floor plan")
        scores = {a.id: sum(len(said & _named_by(a)) * 0.75 ** n
                            for n, said in enumerate(context)) for a in talked}
        ranked = sorted(talked, key=lambda a: (scores[a.id], _last(a)), reverse=True)
        if ranked and scores[ranked[0].id] > 0:
            return ranked[0]
    for item in recent:  # "that's done": the item mentioned last, if recent
        age = now - last_time(item)
        if age > WINDOW:
            break
        if unassigned_first and item.owner is not None:
            continue
        return item
    if unassigned_first:
        return next((a for a in recent if now - last_time(a) <= WINDOW), None)
    return None


_ACTION_VERBS = frozenset(stem(w) for w in (
    "send give get make do take put check call write ask tell bring book pay sign print "
    "email ring buy order fix sort set measure draft post share update arrange").split())


def _named_by(item: ActionItem) -> frozenset[str]:
    """Return the stems that name an item in talk: its task words, less its verbs when the
    item has not been mentioned in this meeting yet (carried from an earlier one)."""
    words = _task_stems(item)
    if last_time(item) == NEVER:
        words = words - _ACTION_VERBS
    return words


def _just_updated(state: State, now: float, kind: str, seconds: float = 45.0) -> bool:
    """Return True when an item took a ``kind`` change in the last ``seconds`` of this part."""
    return any(isinstance(op, Update) and op.change.kind == kind
               and 0 <= now - op.change.evidence.start <= seconds for op in state.ops)


def _last(item: ActionItem) -> float:
    return last_time(item)


def _rest_stems(sentence: Sentence, start: int) -> frozenset[str]:
    return content_stems(sentence.toks[start:])


def read_update(state: State, k: int, sentence: Sentence) -> list[Op]:
    """Return updates a sentence makes to carried actions: owner, date, done, dropped."""
    turn = state.turns[k]
    toks = sentence.toks
    now = turn.utterance.start
    ev = evidence(turn.utterance, sentence.text)
    ops: list[Op] = []
    if not state.ledger.actions:
        return ops
    question = sentence.is_question
    # dropping: "let's forget the van"
    m = DROP.search(toks)
    if m and re.search(r"\bdrop (?:(?:it|that|this|them|him|her) )?(?:in|off|round|by|over|"
                       r"at)\b", toks):
        m = None  # "I'll drop it in to their office": delivering, not dropping
    if m and re.search(r"(?:^|\s)(?:n't|not|never)(?: (?:just|ever|you|we))? $",
                       toks[: m.start() + 1]):
        m = None  # "please don't forget the K", "I won't forget": a reminder, not a drop
    if m and not question:
        what = next(g for g in m.groups() if g)
        words = content_stems(what)
        pronoun = bool(re.match(r"(?:that|it|this|those|them)\b", what.strip()))
        if pronoun and _just_updated(state, now, "dropped"):
            return ops  # "So we drop the sheet." "Yes, drop it.": the same item, once
        item = target(state, now, words, pronoun_ok=pronoun,
                      context=context_stems(state, k, sentence) if pronoun else ())
        if item is not None and (words or pronoun):
            return [Update(item.id, Change("dropped", None, ev))]
    # completion: "I already sent it", "that's done"
    m = DONE.search(toks)
    if m and any(isinstance(op, Update) and op.change.kind == "done"
                 and op.change.evidence.utterance == turn.utterance.index for op in state.ops):
        m = None  # "It's done. I already sent them.": one completion, said twice
    if m and not question and not FUTURE.search(toks) and not re.search(
            r"\b(?:not|n't|never|if|when|once|until|till|before|after)\b", toks[: m.end()]):
        verb = m.group("verb") or ""
        if verb or m.group("state"):
            who = turn.speaker if re.match(r"\s?(?:i|we) ", m.group(0)) else None
            words = _rest_stems(sentence, 0) - {"already", "done", "finish"}
            pronoun = bool(m.group("state")) or re.search(r"\b(?:it|that|this|them)\b",
                                                          toks[m.end(): m.end() + 12]) is not None
            if m.group("state") and _reported_before(sentence, m.start()):
                pronoun = False  # "you sent the photos, so that's done": "that" is the photos
            item = target(state, now, words, verb=verb, prefer_owner=who, pronoun_ok=pronoun,
                          context=context_stems(state, k, sentence))
            if item is not None and (verb == "" or item.task.split()[:1] and (
                    stem(item.task.split()[0]) == stem(verb) or overlap(words, _task_stems(item))
                    >= 0.34 or pronoun)):
                done: list[Op] = [Update(item.id, Change("done", None, ev))]
                mine = m.group("who") == "i" or any(
                    re.search(r"(?:^|\s)i (?:'ve |have )?(?:already|just) ", x.toks)
                    for x in turn.sentences)
                if item.owner is None and mine:  # "It's done. I already sent them."
                    done.insert(0, Update(item.id, Change("owner", turn.speaker, ev)))
                return done
    # Without "already", a past-tense report closes an item only when it names it: the
    # task's own verb and another of its words ("I paid Kilnworth on Friday" for "pay the
    # Kilnworth shelving deposit"). A bare "Done." answers whatever the last turns named.
    m = PAST_REPORT.search(toks)
    if m and not question and not FUTURE.search(toks) and not re.search(
            r"\b(?:not|n't|never|if|when|once|until|till|before|after)\b", toks[: m.end()]):
        verb = m.group("verb")
        words = _rest_stems(sentence, m.start())
        item = target(state, now, words, verb=verb, pronoun_ok=False)
        if item is not None and item.task.split() and \
                stem(item.task.split()[0]) == stem(verb) and \
                overlap(words - {stem(verb)}, _task_stems(item) - {stem(verb)}) > 0:
            return [Update(item.id, Change("done", None, ev))]
    if BARE_DONE.search(toks) and not question and sentence.number == 0:
        item = target(state, now, frozenset(), pronoun_ok=True,
                      context=context_stems(state, k, sentence)[1:])
        if item is not None:
            return [Update(item.id, Change("done", None, ev))]
    # taking or reassigning: "I can take that", "actually Kim will do it"
    m = TAKE.search(toks)
    if m:
        who = next((g for g in (m.group("who"), m.group("who2"), m.group("who3"),
                                m.group("who4"), m.group("who5"), m.group("who6"),
                                m.group("who7")) if g), "")
        person: str | None
        if who in ("i", "me"):
            person = turn.speaker
        elif who == "you":
            person = _addressee(state, k, sentence)
        else:
            found = [n for n, _, _ in mentions(sentence, state.ctx.directory)]
            person = found[0] if found else None
        reassign = bool(REASSIGN_WORDS.search(toks)) or who not in ("i", "me")
        words = content_stems(m.group("obj")) if m.group("obj") else _rest_stems(sentence, m.end())
        item = target(state, now, words, unassigned_first=not reassign,
                      pronoun_ok=not m.group("obj"), context=context_stems(state, k, sentence))
        if person and item is not None and item.owner != person and (
                item.owner is None or reassign):
            ops = [Update(item.id, Change("owner", person, ev))]
            due, _, _ = _due(state, sentence)
            if due and (item.due is None or item.due.isoformat() != due):
                ops.append(Update(item.id, Change("due", due, ev)))
            return ops
    # a new date: "let's push that to next week"; the owner naming a date: "I can have them
    # printed by next Wednesday"
    due, due_text, _ = _due(state, sentence)
    if due and not question and re.search(r"(?:^|\s)i (?:'ll|will|can|should|could)\s", toks) and \
            re.search(r"\b(?:it|that|this|them|those)\b", toks):
        mine = [a for a in state.recent_actions(now, WINDOW) if a.owner == turn.speaker]
        if mine and mine[0].due is None:
            return [Update(mine[0].id, Change("due", due, ev))]
    if due and _due_change(sentence):
        words = _rest_stems(sentence, 0) - content_stems(due_text)
        pronoun = re.search(r"\b(?:that|it|this)\b", toks) is not None
        item = target(state, now, words, pronoun_ok=pronoun,
                      context=context_stems(state, k, sentence, turns=4))
        if item is not None and (item.due is None or item.due.isoformat() != due):
            return [Update(item.id, Change("due", due, ev))]
    return ops


def _due_change(sentence: Sentence) -> bool:
    """Return True when the sentence moves a date: a verb of moving with a new date."""
    m = DUE_CHANGE.search(sentence.toks)
    if not m:
        return False
    word = m.group(0).split()[0]
    if word in ("can", "could", "let", "instead"):
        return True
    verbs = [t for t in sentence.span if t.lower_ == word]
    return any(t.pos_ == "VERB" or t.tag_ == "VB" for t in verbs)


def duplicate(state: State, found: Found) -> ActionItem | None:
    """Return a carried open action that says the same thing, or None."""
    words = content_stems(found.task)
    for item in state.ledger.actions:
        if item.status != "open":
            continue
        if found.owner and item.owner and found.owner != item.owner:
            continue
        same_verb = stem(item.task.split()[0]) == stem(found.task.split()[0])
        if similar(words, _task_stems(item), 0.5 if same_verb else 0.8):
            return item
        verb = stem(found.task.split()[0])
        if same_verb and found.owner == item.owner and (
                not words - {verb} or not _task_stems(item) - {verb}):
            return item  # "Hana's letting him in" restates "let me in", Hana's
    return None


_PRONOUN_TASK = re.compile(r"^[a-z-]+ (?:it|that|this)\b", re.I)


def new_ops(state: State, k: int, sentence: Sentence, found: Found) -> list[Op]:
    """Return the operations for a new action: an Add, or updates of the item it repeats.

    "Could you get it out before the next meeting?" names no new task: "it" is
    the action just discussed, which takes the date (and the owner, if it had none).
    """
    turn = state.turns[k]
    ev = evidence(turn.utterance, found.quote)
    same = duplicate(state, found)
    if same is None and _PRONOUN_TASK.match(found.task):
        same = target(state, turn.utterance.start, frozenset(), pronoun_ok=True,
                      context=context_stems(state, k, sentence))
        if same is None and not _work_word(found.verb):
            return []  # "could you get it out?" with nothing to point at: no new task
    if same is not None:
        ops: list[Op] = []
        if found.owner and same.owner is None:
            ops.append(Update(same.id, Change("owner", found.owner, ev)))
        if found.due and (same.due is None or same.due.isoformat() != found.due):
            ops.append(Update(same.id, Change("due", found.due, ev)))
        if len(content_stems(found.task)) > len(_task_stems(same)) and not \
                _PRONOUN_TASK.match(found.task):  # "send them some" -> "send the fund photos"
            ops.append(Update(same.id, Change("task", found.task, ev)))
        return ops
    import datetime as dt

    item = ActionItem(
        id="",
        task=found.task,
        owner=found.owner,
        due=dt.date.fromisoformat(found.due) if found.due else None,
        status="open",
        time=ev.start,
        evidence=(ev,),
        due_text=found.due_text,
    )
    return [Add(item)]


def take_from_previous(state: State, k: int, sentence: Sentence) -> list[Op]:
    """Return a new action when someone takes a task put to the room just before.

    "We should email the landlord." / "I'll do it." -> "email the landlord", owner: the taker.
    """
    m = TAKE.search(sentence.toks)
    if not m or not (m.group("who") in ("i",) or m.group("who2") or m.group("who3")):
        return []
    turn = state.turns[k]
    for j in range(k - 1, max(k - 3, -1), -1):
        prev = state.turns[j]
        if prev.speaker == turn.speaker:
            continue
        for s in reversed(prev.sentences):
            for pattern in (GROUP_WE, GROUP_SOMEONE, REQUEST):
                pm = pattern.search(s.toks)
                if not pm:
                    continue
                task, verb = verb_phrase(s.span, s.token(pm.end()))
                if verb is None or len(task.split()) < 2 or not _work(verb, s):
                    continue
                due, due_text, _ = _due(state, sentence)
                if not due:
                    due, due_text, _ = _due(state, s)
                found = Found(task, turn.speaker, due, due_text, sentence.text, verb.lemma_)
                return new_ops(state, k, sentence, found)
        break
    return []


def read(state: State, k: int) -> None:
    """Read the actions of turn ``k`` into the state."""
    turn = state.turns[k]
    for sentence in turn.sentences:
        if state.is_claimed(sentence):
            continue
        ops = read_update(state, k, sentence)
        if ops:
            state.apply(ops)
            state.claim(sentence)
            continue
        found = read_new(state, k, sentence)
        if found:
            for item in found:
                state.apply(new_ops(state, k, sentence, item))
            state.claim(sentence)
            continue
        ops = take_from_previous(state, k, sentence)
        if ops:
            state.apply(ops)
            state.claim(sentence)


def evidence_of(item: ActionItem) -> Evidence:
    """Return the first evidence of an action."""
    return item.evidence[0]
