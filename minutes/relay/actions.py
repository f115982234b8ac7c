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
    TALK_VERBS,
    WORK_COMPLEMENTS,
    Sentence,
    content_stems,
    evidence,
    mentions,
    overlap,
    stem,
    verb_phrase,
)
from .ledger import Add, Op, Update
from .state import State

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
MARKER = re.compile(r"(?:^|\s)(?:action (?:item|point)s?|to do|todo|to-do|next steps?) (?::|-|is|for) ?")
# taking an item: "I'll take that", "leave it with me"; reassigning: "actually Kim will do it"
TAKE_VERBS = r"(?:take|handle|do|grab|cover|own|pick up|look after|deal with|sort out|sort)"
TAKE = re.compile(
    r"(?:^|\s)(?P<who>i|you|[a-z][a-z'_-]*(?: [a-z][a-z_-]*)?) (?:'ll|will|can|could|should|"
    r"'s going to|is going to|'s gon na|is gon na|'m going to|'m gon na|'d be happy to|"
    r"'m happy to|'ll be happy to|'s|is|'m) (?:(?:actually|instead|then|just|also|happily) )*"
    + TAKE_VERBS + r" (?:that|it|this|those|them|these|over|on)\b(?: one)?"
    r"|(?:^|\s)(?P<who6>i|[a-z][a-z'_-]*) (?:'ll|will|can|should|'s going to|is going to|'s gon na|"
    r"is gon na) (?:(?:actually|instead|then|just|also) )*(?:take (?:over )?|handle |do |cover |"
    r"pick up |deal with )(?:the|that|this) (?P<obj>[a-z][a-z '_-]+?)(?: instead| then)?\s*[.!]?$"
    r"|(?:^|\s)leave (?:it|that|this) (?:with|to) (?P<who2>me)\b"
    r"|(?:^|\s)(?P<who3>i) 'm on it\b"
    r"|(?:^|\s)(?:give|hand|pass|assign) (?:that|it|this)(?: one)? (?:to|over to) (?P<who4>[a-z]+)\b"
    r"|(?:^|\s)let (?P<who5>[a-z]+) (?:take|do|handle) (?:that|it|this)\b"
)
REASSIGN_WORDS = re.compile(r"\b(?:actually|instead|rather|over|change of plan|no wait)\b")
DUE_CHANGE = re.compile(
    r"\b(?:push|pushed|move|moved|postpone|postponed|shift|delay|delayed|bump|put (?:that|it|this) off|"
    r"extend|bring (?:that|it|this) forward|change|make|making|reschedule)\b.*\b(?:to|until|till|for|"
    r"by|on|next|in)\b|\b(?:can|could) wait (?:until|till)\b|\blet 's say\b|\binstead\b"
)
DONE = re.compile(
    r"(?:^|\s)(?:i|we|he|she|they|[a-z]+) (?:'ve |have |has |'s )?(?:already |just |finally )?"
    r"(?P<verb>sent|done|did|finished|completed|booked|emailed|called|submitted|fixed|sorted|"
    r"ordered|paid|signed|written|wrote|checked|contacted|rang|bought|printed|posted|uploaded|"
    r"shared|circulated|arranged|organised|organized|scheduled|confirmed|updated|spoke|talked|"
    r"filled|drafted|prepared|reserved|cancelled|canceled|delivered|returned|renewed|researched)\b"
    r"|(?:^|\s)(?:that|it|this|the [a-z]+|those|they) (?:'s|is|has been|'s been|are|were|was) "
    r"(?:already |all |now )?(?P<state>done|finished|sorted|taken care of|complete|completed|sent|"
    r"booked|handled|dealt with|fixed|ready|out|in|signed|submitted|paid|filed)\b"
)
DROP = re.compile(
    r"(?:^|\s)(?:let 's |we can |we could |we should |we 'll |just |so )?(?:forget|drop|scrap|"
    r"ditch|abandon|scratch|cancel|skip)(?: about)? (?P<what>.+)"
    r"|(?:^|\s)never mind (?:about )?(?P<what2>.+)"
    r"|(?:^|\s)(?:we|i) (?:do n't|no longer|wo n't) need (?:to |the |a )?(?P<what3>.+?)"
    r"(?: any ?more| after all)?\s*[.!]?$"
    r"|(?:^|\s)no need (?:to|for) (?P<what4>.+)"
)
IMMEDIATE = re.compile(r"\b(?:now|right now|first|quickly|briefly|here|at the moment|in a minute|"
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
    following = " ".join(t.lower_ for t in verb.doc[verb.i + 1 : min(verb.i + 5, sentence.span.end)])
    return any(re.search(rf"\b{re.escape(c)}\b", following) for c in comps) if comps else True


def _due(state: State, sentence: Sentence) -> tuple[str | None, str, tuple[int, int] | None]:
    """Return (ISO date or None, phrase, doc char span of the phrase) of a due date said."""
    meeting = state.ctx.transcript.meeting
    date, phrase = resolve_due(sentence.text, meeting.date, meeting.next_meeting)
    if not phrase:
        return None, "", None
    at = sentence.text.lower().find(phrase.lower())
    span = None
    if at >= 0:
        base = sentence.span.start_char + (len(sentence.span.text) - len(sentence.span.text.lstrip()))
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


def _immediate(task: str, due: str | None, due_text: str) -> bool:
    """Return True for talk about the next minute ("I'll just go over it quickly")."""
    if due or due_text:
        return False
    return bool(IMMEDIATE.search(task.lower()))


_EMBEDDING = re.compile(r"(?:^|\s)(?:how|what|where|why|whether|if|when|something|anything|"
                       r"everything|which|who|whatever|unless|once|until|before|after)$")
_DENIAL = re.compile(r"(?:n't|not|never) (?:think|know|believe|say|sure|mean)\b|\bnot sure\b")


def _embedded(toks: str, start: int) -> bool:
    """Return True when the cue sits in a subordinate clause or a denial ("I don't think we...")."""
    before = toks[:start].rstrip()
    return bool(_EMBEDDING.search(before) or _DENIAL.search(before))


def read_new(state: State, k: int, sentence: Sentence) -> Found | None:
    """Return the new action a sentence states, or None."""
    turn = state.turns[k]
    toks = sentence.toks
    if sentence.is_question and not (REQUEST.search(toks) or OFFER.search(toks)
                                     or GROUP_SOMEONE.search(toks)):
        return None
    if re.search(r"(?:^|\s)(?:if|when|whether|unless) (?:i|you|we|someone) ", toks[:40]) and not \
            MARKER.search(toks):
        return None
    due, due_text, due_span = _due(state, sentence)
    names = [p.name.split()[0] for p in state.ctx.directory.people] + \
        [m[0] for m in mentions(sentence, state.ctx.directory)]
    cands: list[tuple[int, str | None, bool]] = []  # (offset after cue, owner, needs work verb)
    marker = MARKER.search(toks)
    if marker:
        rest = toks[marker.end():]
        owner = None
        for name, i0, _ in mentions(sentence, state.ctx.directory):
            if sentence.token(marker.end()) <= i0:
                owner = name
                break
        if re.match(r"i (?:'ll|will) ", rest):
            owner = turn.speaker
        cands.append((marker.end(), owner, False))
    for pattern, who, weak in ((SELF, "me", False), (LET_ME, "me", False), (OFFER, "me", False),
                               (SELF_WEAK, "me", True), (REQUEST, "you", False),
                               (SECOND, "you", False), (WANT_YOU, "you", False),
                               (SECOND_WEAK, "you!", True), (GROUP_SOMEONE, None, False),
                               (GROUP_WE, None, True)):
        m = pattern.search(toks)
        if not m or _embedded(toks, m.start()):
            continue
        if who == "me":
            cands.append((m.end(), turn.speaker, weak))
        elif who == "you":
            named = _addressee(state, k, sentence, strict=True)
            # "you will" with nobody named is often generic ("you will save batteries")
            cands.append((m.end(), named or _addressee(state, k, sentence), named is None))
        elif who == "you!":
            named = _addressee(state, k, sentence, strict=True)
            if named:  # "you need to" only counts when said to somebody named
                cands.append((m.end(), named, True))
        else:
            cands.append((m.end(), None, weak))
    # a person named as the subject: "Kim's going to send it", "the designer will look into it"
    for name, i0, i1 in mentions(sentence, state.ctx.directory):
        off = len(" ".join(t.lower_ for t in sentence.doc[sentence.span.start:i1])) + 1
        if off >= len(toks):
            continue
        tail = re.sub(r"^(?:_ )+|(?<= )_ ", "", toks[off:])  # AMI's "I_D_" splits off a "_"
        m = THIRD_AFTER.match(tail)
        if m and not (m.group(0).startswith("to ") and i0 - sentence.span.start > 5
                      and not marker):
            owner = turn.speaker if "and i" in m.group(0) else name
            cands.append((off, owner, False))
    if not cands and PLEASE.search(toks) and not sentence.is_question:
        m = PLEASE.search(toks)
        assert m is not None
        cands.append((m.end(), _addressee(state, k, sentence), False))
    cands.sort(key=lambda c: c[0])
    for offset, owner, need_work in cands:
        task, verb = _phrase(state, sentence, offset, names, due_span)
        if verb is None or not task or len(task.split()) < 2:
            continue
        if _immediate(task, due, due_text):
            continue
        if verb.i < sentence.token(offset) or verb.i - sentence.token(offset) > 8:
            continue  # the verb is far from the cue: another clause
        lemma = verb.lemma_.lower()
        if lemma in ("be", "have") and not _work(verb, sentence):
            continue
        if not _work(verb, sentence) and not due:
            continue
        if need_work and stem(lemma) not in {stem(v) for v in WORK_VERBS}:
            continue
        if len(content_stems(task)) < 1:
            continue
        return Found(task, owner, due, due_text, sentence.text, lemma)
    return None


# --------------------------------------------------------------------------- targets


def _task_stems(item: ActionItem) -> frozenset[str]:
    return content_stems(item.task)


def target(state: State, now: float, words: frozenset[str], *, verb: str = "",
           prefer_owner: str | None = None, pronoun_ok: bool = True,
           unassigned_first: bool = False) -> ActionItem | None:
    """Return the carried open action a remark most likely refers to, or None."""
    best: tuple[float, ActionItem] | None = None
    recent = state.recent_actions(now, seconds=10 * 3600)
    for rank, item in enumerate(recent):
        shared = overlap(words, _task_stems(item))
        score = shared
        if verb and item.task.split()[:1] and stem(item.task.split()[0]) == stem(verb):
            score += 0.5
        if prefer_owner and item.owner == prefer_owner:
            score += 0.15
        if unassigned_first and item.owner is None:
            score += 0.1
        age = now - max(e.start for e in item.evidence)
        score += 0.2 * math.exp(-max(age, 0.0) / WINDOW)
        if shared >= 0.34 or (verb and score >= 0.6):
            if best is None or score > best[0]:
                best = (score, item)
    if best is not None:
        return best[1]
    if not pronoun_ok:
        return None
    for item in recent:  # "that's done": the item mentioned last, if recent
        age = now - max(e.start for e in item.evidence)
        if age > WINDOW:
            break
        if unassigned_first and item.owner is not None:
            continue
        return item
    if unassigned_first:
        return next((a for a in recent if now - max(e.start for e in a.evidence) <= WINDOW), None)
    return None


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
    if m and not question:
        what = next(g for g in m.groups() if g)
        words = content_stems(what)
        pronoun = bool(re.match(r"(?:that|it|this|those|them)\b", what.strip()))
        item = target(state, now, words, pronoun_ok=pronoun)
        if item is not None and (words or pronoun):
            return [Update(item.id, Change("dropped", None, ev))]
    # completion: "I already sent it", "that's done"
    m = DONE.search(toks)
    if m and not question and not re.search(r"\b(?:not|n't|never|if|when|once|until|before)\b",
                                            toks[: m.end()]):
        verb = m.group("verb") or ""
        if verb or m.group("state"):
            who = turn.speaker if re.match(r"\s?(?:i|we) ", m.group(0)) else None
            words = _rest_stems(sentence, 0) - {"already", "done", "finish"}
            pronoun = bool(m.group("state")) or re.search(r"\b(?:it|that|this|them)\b",
                                                          toks[m.end(): m.end() + 12]) is not None
            item = target(state, now, words, verb=verb, prefer_owner=who, pronoun_ok=pronoun)
            if item is not None and (verb == "" or item.task.split()[:1] and (
                    stem(item.task.split()[0]) == stem(verb) or overlap(words, _task_stems(item))
                    >= 0.34 or pronoun)):
                return [Update(item.id, Change("done", None, ev))]
    # taking or reassigning: "I can take that", "actually Kim will do it"
    m = TAKE.search(toks)
    if m:
        who = next((g for g in (m.group("who"), m.group("who2"), m.group("who3"),
                                m.group("who4"), m.group("who5"), m.group("who6")) if g), "")
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
                      pronoun_ok=not m.group("obj"))
        if person and item is not None and item.owner != person and (
                item.owner is None or reassign):
            return [Update(item.id, Change("owner", person, ev))]
    # a new date: "let's push that to next week"
    due, due_text, _ = _due(state, sentence)
    if due and DUE_CHANGE.search(toks):
        words = _rest_stems(sentence, 0) - content_stems(due_text)
        pronoun = re.search(r"\b(?:that|it|this)\b", toks) is not None
        item = target(state, now, words, pronoun_ok=pronoun)
        if item is not None and (item.due is None or item.due.isoformat() != due):
            return [Update(item.id, Change("due", due, ev))]
    return ops


def duplicate(state: State, found: Found) -> ActionItem | None:
    """Return a carried open action that says the same thing, or None."""
    words = content_stems(found.task)
    for item in state.ledger.actions:
        if item.status != "open":
            continue
        if found.owner and item.owner and found.owner != item.owner:
            continue
        same_verb = stem(item.task.split()[0]) == stem(found.task.split()[0])
        if overlap(words, _task_stems(item)) >= (0.5 if same_verb else 0.8):
            return item
    return None


def new_ops(state: State, k: int, sentence: Sentence, found: Found) -> list[Op]:
    """Return the operations for a new action: an Add, or updates of its duplicate."""
    turn = state.turns[k]
    ev = evidence(turn.utterance, found.quote)
    same = duplicate(state, found)
    if same is not None:
        ops: list[Op] = []
        if found.owner and same.owner is None:
            ops.append(Update(same.id, Change("owner", found.owner, ev)))
        if found.due and (same.due is None or same.due.isoformat() != found.due):
            ops.append(Update(same.id, Change("due", found.due, ev)))
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
        if found is not None:
            state.apply(new_ops(state, k, sentence, found))
            state.claim(sentence)
            continue
        ops = take_from_previous(state, k, sentence)
        if ops:
            state.apply(ops)
            state.claim(sentence)


def evidence_of(item: ActionItem) -> Evidence:
    """Return the first evidence of an action."""
    return item.evidence[0]
