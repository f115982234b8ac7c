"""Open questions: put to the group and not answered in the turns that follow.

A question answered at once is not minuted. One that nobody answers, or that
gets "I don't know", is carried as open; a later turn that answers it (the same
content, said as a statement by someone else) closes it, in this segment or a
later one.
"""

from __future__ import annotations

import re

from ..model import Change, Question
from .clauses import Sentence, capitalise, clean_phrase, content_stems, evidence, overlap
from .ledger import Add, Update
from .state import State, Turn

TAG = re.compile(
    r"(?:^|\s)(?:right|is n't it|is it|are n't they|do n't you think|you know|okay|ok|yeah|no|eh|"
    r"huh|yes|aye|innit|do n't we|wo n't it|does n't it|ca n't we|is n't that|alright|all right|"
    r"sorry|pardon|really|what)\s*\?\s*$"
)
NOT_TO_GROUP = re.compile(
    r"^(?:(?:um|uh|so|and|but|oh|okay|well) )*(?:sorry|pardon|what \?|how are you|"
    r"can you (?:see|hear)|"
    r"is that (?:right|okay|ok|it)|are you (?:okay|ok|there|done|ready|with me)|did you (?:say|"
    r"mean)|"
    r"do you mean|you mean|what do you mean|what was that|who 's next|shall i (?:start|go|"
    r"continue)|"
    r"can i (?:just )?(?:ask|say|interrupt|start)|may i|where was i|where were we|is it on|"
    r"what time|any (?:questions|comments|thoughts)|(?:yeah|no|right|what) \?|"
    r"(?:can|could|would|will) you (?!tell|say|explain))"
)
WONDER = re.compile(r"(?:^|\s)(?:i wonder (?:if|whether|what|how|why|who)|does anyone know|"
                    r"do we know|we need to (?:find out|figure out|work out) (?:whether|if|what|"
                    r"how|who))\b")
NON_ANSWER = re.compile(
    r"^(?:(?:um|uh|well|hmm|mm|oh) ,? )*(?:i do n't know|dunno|no idea|not sure|i 'm not sure|"
    r"(?:a )?(?:really |very )?good question|who knows|i have no idea|"
    r"we 'll (?:have to )?(?:see|check|find out)|i 'll (?:have to )?(?:check|find out)|"
    r"i ca n't remember|i forget|that 's a (?:really |very )?good question|"
    r"i was (?:going to|gon na) ask|i wondered that too|i 'm wondering)"
)
LATER = re.compile(r"(?:^|\s)(?:i 'd have to|i 'll have to|i would have to|i 'd need to|"
                   r"i 'll need to|"
                   r"i do n't (?:actually |really )?know|not sure|let me check|i can check|"
                   r"i can find out|i 'll find out|i 'll check|i 'll look (?:into|it up|that up)|"
                   r"we 'd have to check|we 'll have to check|no one knows|nobody knows)\b")
LATER_CUE = re.compile(r"\b(?:to answer|about (?:the|your|that) question|the answer is|"
                       r"turns out|i checked|i found out|we found out|regarding|as for|i looked)\b")
IMMEDIATE_TURNS = 3
LATE_SECONDS = 3600.0  # an answer an hour later is not recognised: talk has moved on
IMMEDIATE_SECONDS = 30.0


def is_group_question(sentence: Sentence) -> bool:
    """Return True for a question put to the group (not a tag, a check or a request)."""
    toks = sentence.toks
    if WONDER.search(toks):
        return True
    if not sentence.is_question:
        return False
    words = [w for w in toks.split() if w not in ("?", ",", ".")]
    if len(words) < 4 or TAG.search(toks) or NOT_TO_GROUP.search(toks):
        return False
    if not any(t.pos_ in ("VERB", "AUX") for t in sentence.span):
        return False  # "East of the river?": a fragment that adds to the question before
    if not _asks(sentence) and not re.search(r"(?:^|\s)(?:what|who|which|when|where|why|how)\s",
                                             toks):
        return False  # "I'm fifty-three, since I was sixteen?": a rising statement
    return len(content_stems(toks)) >= 2


ANSWER_START = re.compile(
    r"^(?:(?:um|uh|well|oh|so|mm) ,? )*(?:yes|no|yeah|yep|nope|sure|definitely|probably|maybe|"
    r"both|neither|either|none|all of them|"
    r"i think|i believe|it 's|it is|they 're|they are|about|around|roughly|because|we (?:have|'ve|"
    r"can|could|should)|that 's|there 's|there are|you can|you could|i would|i 'd|not)\b"
)
PROPOSING = re.compile(r"^(?:(?:um|uh|well|so|okay|right) ,? )*(?:let 's|shall we|should we|"
                       r"how about|"
                       r"what about|moving on|next|anyway)\b")
ANSWER_ENTS = frozenset({"MONEY", "CARDINAL", "DATE", "TIME", "PERCENT", "QUANTITY", "PERSON",
                         "ORG", "GPE"})


# the words a sentence opens with when it asks something; "I'm fifty-three, since I was,
# God, sixteen?" ends on a rising "?" in the captions but tells
_ASKING = re.compile(r"^(?:(?:um|uh|so|and|but|oh|okay|well|like|right) ,? )*(?:what|who|whom|"
                     r"whose|which|when|where|why|how|is|are|was|were|am|do|does|did|can|could|"
                     r"would|will|shall|should|may|might|have|has|had|is n't|are n't|do n't|"
                     r"does n't|did n't|ca n't|wo n't|would n't|should n't|any|anyone|anybody)\b")


def _asks(sentence: Sentence) -> bool:
    """Return True for a sentence that asks: a "?" and the opening of a question."""
    return sentence.is_question and bool(_ASKING.search(sentence.toks))


# "Has anyone asked the council about a loading bay?" asks whether something was done; a
# bare "No." answers the poll and leaves the matter open. "No. Wen said they're still
# waiting for the committee." brings news: that is an answer.
POLL = re.compile(r"^(?:(?:um|uh|so|and|but|oh|okay|well) ,? )*(?:has|have|did) (?:anyone|"
                  r"anybody|someone|somebody|any of us|we|you)\b")
BARE_NO = re.compile(r"^(?:(?:oh|um|uh|hm|hmm|mm|well|no|nope|not yet|nobody|no one|not me|"
                     r"i have n't|we have n't|i did n't|we did n't) ?[.,!]? ?)+$")


def _answer_kind(turn: Turn, question: frozenset[str], poll: bool = False) -> str:
    """Return "answer", "non-answer" or "" (not a reply) for a turn after a question."""
    if not turn.sentences:
        return ""
    if poll and BARE_NO.search(" ".join(s.toks for s in turn.sentences)):
        return "non-answer"
    first = turn.sentences[0]
    if len(turn.sentences) > 1 and not content_stems(first.toks):
        first = turn.sentences[1]  # "Hm. The system has postcodes..."
    said_lead = " ".join(s.toks for s in turn.sentences[:3])
    if NON_ANSWER.search(first.toks) or LATER.search(said_lead):
        return "non-answer"
    if first.is_question and len(turn.sentences) == 1:
        return ""  # a question back is not an answer
    said = content_stems(" ".join(s.toks for s in turn.sentences[:2]))
    if said & question or ANSWER_START.search(first.toks):
        return "answer"
    if any(ent.label_ in ANSWER_ENTS for ent in first.span.ents):
        return "answer"
    lead = " ".join(s.toks for s in turn.sentences[:3] if not _asks(s))  # "God. Hm. Fewer..."
    words = [w for w in lead.split() if w[:1].isalnum() or "'" in w]
    if len(words) >= 3 and not _asks(first) and not PROPOSING.search(first.toks):
        return "answer"  # a statement in reply: take it as the answer
    return ""


def read(state: State, k: int) -> None:
    """Read questions asked and answered in turn ``k`` into the state."""
    turn = state.turns[k]
    now = turn.utterance.start
    # answers to open questions carried in the ledger or asked earlier in this segment
    for question in state.ledger.open_questions:
        if turn.speaker == question.asked_by or now - question.time > LATE_SECONDS:
            continue
        asked_at = question.evidence[0].utterance
        if turn.utterance.index <= asked_at:
            continue
        immediate = (turn.utterance.index - asked_at <= IMMEDIATE_TURNS
                     and now - question.evidence[0].end <= IMMEDIATE_SECONDS
                     and not _asked_since(state, asked_at, k))
        q_words = content_stems(question.text)
        poll = bool(POLL.search(question.text.lower()))
        kind = _answer_kind(_run_from(state, k), q_words, poll)
        if immediate and any(t.speaker == turn.speaker and t.utterance.index > asked_at
                             and _answer_kind(t, q_words, poll) == "non-answer"
                             for t in state.turns[:k]):
            immediate = False  # "...I'd have to check the wording." / "Anyway.": still open
        for sentence in turn.sentences:
            if sentence.is_question:
                continue
            shared = overlap(q_words, content_stems(sentence.toks))
            late = shared >= 0.5 and len(q_words & content_stems(sentence.toks)) >= 2 and (
                LATER_CUE.search(sentence.toks) or shared >= 0.75) and kind != "non-answer"
            if (immediate and kind == "answer" and question.history[-1].kind != "reopened"
                    and _asked_in_segment(state, asked_at)) or late:
                ev = evidence(turn.utterance, sentence.text)
                state.apply([Update(question.id, Change("answered", None, ev))])
                break
    # new questions: kept only when the next turns do not answer them
    for sentence in turn.sentences:
        if state.is_claimed(sentence) or not is_group_question(sentence):
            continue
        replies = _runs([t for t in state.following(k, limit=IMMEDIATE_TURNS + 2,
                                                    seconds=IMMEDIATE_SECONDS)
                         if t.speaker != turn.speaker])[:IMMEDIATE_TURNS]
        if sentence.number < len(turn.sentences) - 1 and not replies:
            continue  # the speaker goes on: a rhetorical question, or one they answer themselves
        q_words = content_stems(sentence.toks)
        first = ""
        for reply in replies:
            first = _answer_kind(reply, q_words, bool(POLL.search(sentence.toks)))
            short_back = all(s.is_question and len(s.toks.split()) <= 5 for s in reply.sentences)
            if first or (any(s.is_question for s in reply.sentences) and not short_back):
                break  # answered, or a new question takes the floor ("When's opening?" does not)
        if first == "answer":
            continue
        text = capitalise(clean_phrase(list(sentence.span), lemmatise_first=False, max_words=30))
        if not text:
            continue
        text = text.rstrip("?. ") + "?"
        ev = evidence(turn.utterance, sentence.text)
        state.apply([Add(Question("", text, turn.speaker, False, ev.start, (ev,)))])
        state.claim(sentence)


def _runs(turns: list[Turn]) -> list[Turn]:
    """Return the turns with each run of one speaker's consecutive turns read as one reply:
    "The public liability is for the public." / "...but I'd have to check the wording." is
    one answer that is not yet an answer."""
    out: list[Turn] = []
    for turn in turns:
        if out and out[-1].speaker == turn.speaker:
            out[-1] = Turn(out[-1].utterance, out[-1].doc, out[-1].sentences + turn.sentences)
        else:
            out.append(turn)
    return out


def _run_from(state: State, k: int) -> Turn:
    """Return turn ``k`` with the same speaker's turns that follow it read as one."""
    nxt = state.following(k, limit=3, seconds=IMMEDIATE_SECONDS)
    run = [state.turns[k]]
    for turn in nxt:
        if turn.speaker != run[0].speaker:
            break
        run.append(turn)
    return _runs(run)[0]


def _asked_since(state: State, asked_at: int, k: int) -> bool:
    """Return True when another question was asked between ``asked_at`` and turn ``k``."""
    return any(s.is_question for t in state.turns[:k] if t.utterance.index > asked_at
               for s in t.sentences)


def _asked_in_segment(state: State, asked_at: int) -> bool:
    """Return True when the question was asked in this segment or just before its start."""
    return asked_at >= state.segment.first - IMMEDIATE_TURNS
