"""Decisions: stated outright, or a proposal that others agree to (across turns and segments).

"So we're going with the blue one" is a decision. "Should we go with the blue
one?" is a proposal: it becomes a decision when someone else agrees in the next
turns ("yeah", "fine by me"), even when the agreement opens the next segment
(the proposal is carried in the ledger as pending). A proposal that is turned
down is rejected; one left hanging lapses at the end (``reconcile``).
"""

from __future__ import annotations

import re

from ..model import Change, Decision, Proposal
from .clauses import (
    NEGATION,
    TALK_VERBS,
    Sentence,
    capitalise,
    clean_phrase,
    content_stems,
    evidence,
    overlap,
    verb_phrase,
)
from .ledger import Add, Update
from .state import State, Turn

EXPLICIT = re.compile(
    r"(?:^|\s)we (?:'ve |have |all |just )?(?:decided|agreed|settled|concluded) (?:on |to |"
    r"that |upon |"
    r"we 'd |we 'll |we would |we will |we 're going to |we 're gon na )?"
    r"|(?:^|\s)(?:the |our |final )?decision (?:is|was|'s) (?:to |that |we )?"
    r"|(?:^|\s)we (?:'re|are) (?:going|gon na) (?:to )?(?:go )?(?:with|for) "
    r"|(?:^|\s)(?:we 'll|we will|let 's|we should) (?:go|stick|settle) (?:with|for|on) "
    r"|(?:^|\s)we (?:'re|are) (?:sticking|going to stick|gon na stick|settling) (?:with|on|for) "
    r"|(?:^|\s)we (?:'ve|have) (?:gone|opted|gone ahead) (?:with|for) "
    r"|(?:^|\s)we (?:'ve|have) (?:got|chosen|picked|selected) (?=the |a |an )"
    r"|(?:^|\s)(?:it 's|it is|that 's|that is) (?:been )?(?:decided|agreed|settled) (?:that |"
    r"then |on )?"
    r"|(?:^|\s)we (?:'ll|will) (?:go ahead and |definitely )?(?:use|have|include|keep|"
    r"take) (?=the |a |an )"
    r"|(?:^|\s)so (?:it 's|it is|it 'll be|it will be) (?:going to be |gon na be )(?=the |a |an )"
    # "we want the buttons big", "we don't want it to glow": the group stating what its
    # product or plan shall be is the choice itself (in planning talk the settled
    # requirement is rarely marked "decided"); a wish about the world ("we want people
    # to come") has no object of ours and is left out by the lookahead
    r"|(?:^|\s)we (?:do n't |definitely |just |really |do n't really )?want (?=the |a |an |it to |"
    r"to have |to use )"
)
# an explicit "agreed", "that's settled": settles the proposal on the table
SETTLES = re.compile(
    r"^(?:(?:okay|ok|right|so|well|good|great|yeah|yes|fine|alright) ?,? )*(?:agreed|it 's agreed|"
    r"that 's agreed|that 's settled|settled|decided|it 's decided|that 's decided|done deal|deal|"
    r"we 're agreed|we all agree|everyone agrees|so agreed|that 's the plan|let 's do (?:it|that)|"
    r"let 's go (?:for|with) (?:it|that)|we 'll do that|we 'll go with that)\b"
)
PROPOSAL = re.compile(
    r"(?:^|\s)(?:should|shall) we (?:maybe |just |perhaps |all )?"
    r"|(?:^|\s)(?:how|what) about (?:we |if we )?"
    r"|(?:^|\s)why do n't we (?:just )?"
    r"|(?:^|\s)i (?:would |'d )?(?:suggest|propose|recommend|move) (?:that )?(?:we )?"
    r"|(?:^|\s)maybe we should "
    # "we should use X" recommends; "we could use X" only names an option, and a "yeah"
    # to an option is not yet a choice (the option becomes one through "let's", "we'll")
    r"|(?:^|\s)(?:i think |perhaps |so )?we should (?:maybe |probably |perhaps |"
    r"also |just |definitely |all )?(?=go |use |have |do |make |get |include |put |keep |take |"
    r"try |"
    r"add |choose |pick |stick |offer |hold |move |set |fix |cut |drop |change |switch |buy |hire |"
    r"order |book |sell |aim |target |focus |limit |charge |price |launch |run )"
    r"|(?:^|\s)what if we "
    r"|(?:^|\s)let 's (?:, let 's )?(?:just |maybe |all )?+(?!not |, |hope|hold|make a start|"
    r"get back|"
    r"crack on|kick off|see|start|move|look|talk|go (?:on|back|through|over|"
    r"ahead)|say|get (?:started|going|on)|begin|continue|think|wait|stop|hear|have a (?:look|"
    r"break)|"
    r"finish|wrap|recap|summarise|summarize|do (?:this|that) quickly|check|come back|leave|skip|"
    r"take a (?:look|break|minute|second)|keep going|carry on|turn|break)"
    r"|(?:^|\s)do we (?:want|agree|all agree|need) to "
    r"|(?:^|\s)(?:are we|is everyone|is everybody|everyone|everybody|^(?:so )?we) (?:all )?"
    r"(?:happy|okay|ok|"
    r"agreed|"
    r"fine|good|alright|all right|in agreement) (?:with|to|on|that) "
    r"|(?:^|\s)are we (?:going|gon na) (?:to )?(?:go )?(?:with|for) "
    r"|(?:^|\s)(?:we 'll|we will|we 're going to|we 're gon na|we are going to) (?:use|have|"
    r"include|"
    r"keep|make it|go for|offer|sell|put|add|stick|limit|target|focus|aim|charge) "
)
# what the thing under discussion must be: "the remote should be simple", "it has to be soft";
# with a pronoun subject only the modals of obligation count ("it'll be cleaner" is a guess)
REQUIREMENT = re.compile(
    r"(?:^|\s)(?P<np>(?:the|our)(?: (?!(?:i|you|we|he|she|they|it)\s)[a-z_-]+){1,2}) "
    r"(?:should|must|has to|"
    r"have to|will|'ll|'s going to|'s gon na|is going to|is gon na|needs to|need to|should n't|"
    r"must n't|wo n't|will not|can not|ca n't) (?=[a-z])"
    r"|(?:^|\s)(?P<pn>it|this|that|they) (?:should|must|has to|have to|needs to|need to|should n't|"
    r"must n't) (?=[a-z])"
)
HEDGED = re.compile(r"(?:^|\s)(?:maybe|might|probably|perhaps|possibly|i guess|i suppose|not sure|"
                    r"i do n't know|i wonder|otherwise|unless|or something)(?:\s|$)")
SUBORDINATE = re.compile(r"(?:^|\s)(?:if|since|because|'cause|cause|when|whether|so that|"
                         r"as long as|"
                         r"even though|although|which|where|how|what|that you|than)\s")
AGREE = re.compile(
    r"^(?:(?:um|uh|oh|well|so|mm|hmm|okay|ok) ,? )*(?:yeah|yes|yep|yup|yeah yeah|sure|definitely|"
    r"absolutely|exactly|fine|sounds good|sounds great|sounds fine|sounds like a plan|good idea|"
    r"great idea|great|perfect|i agree|agreed|that works|works for me|fine by me|fine with me|"
    r"i 'm happy with that|i 'm fine with that|i 'm okay with that|go for it|why not|of course|"
    r"cool|that 's fine|that 's good|that 's great|that 's a good idea|that would be good|"
    r"that 'd be good|let 's do (?:it|that)|i like that|i like it|i think so|i 'd go with that|"
    r"i 'm for that|same here|me too|i 'm in)\b"
)
AGREE_STRONG = re.compile(r"^(?:(?:um|uh|oh|well|so|mm|okay) ,? )*(?:okay|ok|alright|all right|"
                          r"right)"
                          r" ?[.!]?$")
HEDGE = re.compile(r"\b(?:but|though|however|although|not sure|unless|depends|maybe|perhaps|"
                   r"possibly|a possibility|might)\b")
REJECT = re.compile(
    r"^(?:(?:um|uh|oh|well|hmm|mm) ,? )*(?:no\b|nope|nah|i do n't think so|i 'm not sure|"
    r"not really|"
    r"i disagree|i 'd rather not|i do n't agree|i do n't know|i do n't like|not (?:a good|"
    r"the best)|"
    r"that wo n't work|that will not work|i would n't|i would rather|i 'd rather|i prefer|"
    r"we ca n't|we can not|we should n't|let 's not|too (?:expensive|much|risky))"
)
# Talk that orders the business of this meeting ("let's watch Paul's presentation first", "we'll
# have the three presentations", "the next meeting's in thirty minutes", "make notes of this")
# is the agenda at work, not a decision on the business the minutes record (common practice:
# minutes record what was decided on the matters before the meeting, not who spoke when).
ORDER_OF_BUSINESS = re.compile(
    r"\b(?:presentations?|to present|agenda|slides?|take notes|(?:make|making|keep) notes|"
    r"minutes of (?:the|this|last)|(?:the|our) next meeting (?:'s|is|will)|individual work|"
    r"(?:a|the|our) (?:short |quick |coffee |lunch |tea )?break)\b"
)
# talk verbs that can still carry a decision ("let's use the red one", "we'll keep it")
DECIDING_VERBS = frozenset("go use have keep make take get put do add give try".split())
WINDOW_TURNS = 4
WINDOW_SECONDS = 45.0


def _text_after(sentence: Sentence, offset: int, *, talk: bool = True) -> str:
    """Return the clean phrase after a cue: its verb phrase, or the words that follow."""
    start = sentence.token(offset)
    phrase, verb = verb_phrase(sentence.span, start)
    if verb is not None and verb.i - start <= 2 and len(phrase.split()) >= 2:
        if talk and verb.lemma_.lower() in TALK_VERBS - DECIDING_VERBS:
            return ""
        return phrase
    toks = [t for t in sentence.span if t.i >= start]
    return clean_phrase(toks, lemmatise_first=False)


def _clause_from(sentence: Sentence, offset: int) -> str:
    """Return the clean words of the sentence from ``offset`` of its tokens on."""
    start = sentence.token(offset + (1 if sentence.toks[offset:offset + 1] == " " else 0))
    toks = [t for t in sentence.span if t.i >= start]
    return clean_phrase(toks, lemmatise_first=False, max_words=20)


_VERB_IN_CUE = re.compile(r"(?:go|going|gone|stick|sticking|settle|settling|opted|use|have|include|"
                          r"keep|take) (?:with |for |on )?$")


def _decision_text(sentence: Sentence, offset: int, cue: str = "", *, talk: bool = True) -> str:
    # "we don't want to use the teletext", "we've decided not to": a verb phrase would drop
    # the negation and say the opposite, so a negated decision keeps the speaker's clause
    ahead = " ".join(sentence.toks[offset:].split()[:2])
    asked = re.sub(r"why (?:do n't|not) we", "", cue)  # "why don't we...": a proposal
    if NEGATION.search(asked) or NEGATION.search(ahead):
        text = _clause_from(sentence, offset - len(cue))
        return capitalise(text) if len(content_stems(text)) >= 2 else ""
    m = _VERB_IN_CUE.search(cue)
    if m:  # "let's go with the red one": keep "go with" in the text
        offset = offset - len(cue) + m.start()
    text = _text_after(sentence, offset, talk=talk)
    if len(content_stems(text)) < 1 or len(text.split()) < 2:
        return ""
    return capitalise(text)


def orders_business(text: str) -> bool:
    """Return True when a decision's text orders this meeting's business (``ORDER_OF_BUSINESS``)."""
    return bool(ORDER_OF_BUSINESS.search(text.lower().replace("'s", " 's")))


def agrees(turn: Turn) -> bool:
    """Return True when a turn opens with agreement and no hedge."""
    if not turn.sentences:
        return False
    first = turn.sentences[0].toks
    if not AGREE.search(first) and not AGREE_STRONG.search(first):
        return False
    head = " ".join(first.split()[:8])
    if HEDGE.search(head):
        return False
    return not (len(turn.sentences) > 1 and REJECT.search(turn.sentences[1].toks))


def rejects(turn: Turn) -> bool:
    """Return True when a turn opens by turning the proposal down."""
    if not turn.sentences:
        return False
    first = turn.sentences[0].toks
    head = " ".join(first.split()[:8])
    return bool(REJECT.search(first)) or (first.startswith("yeah but") or " but " in head[:20])


def settle_pending(state: State, k: int) -> None:
    """Accept or reject pending proposals that turn ``k`` answers."""
    turn = state.turns[k]
    now = turn.utterance.start
    for proposal in reversed(state.ledger.pending_proposals):  # a "yeah" answers the latest
        last = max(e.end for e in proposal.evidence)
        if now - last > WINDOW_SECONDS or now < proposal.time:
            continue
        if turn.utterance.index <= proposal.evidence[-1].utterance:
            continue
        if turn.utterance.index - proposal.evidence[-1].utterance > WINDOW_TURNS:
            continue
        first = turn.sentences[0] if turn.sentences else None
        if first is None:
            continue
        settled = SETTLES.search(first.toks)
        if turn.speaker == proposal.by and not settled:
            continue
        if settled or agrees(turn):
            ev = evidence(turn.utterance, first.text)
            state.apply([Update(proposal.id, Change("accepted", proposal.text, ev))])
            state.claim(first)
            return
        if rejects(turn):
            ev = evidence(turn.utterance, first.text)
            state.apply([Update(proposal.id, Change("rejected", None, ev))])
            state.claim(first)
            return
        if turn.speaker != proposal.by:
            return  # someone answered with something else: the latest proposal stays open


def _duplicate(state: State, text: str, now: float) -> Decision | None:
    words = content_stems(text)
    for decision in reversed(state.ledger.decisions[-40:]):
        if now - decision.time < 900 and overlap(words, content_stems(decision.text)) >= 0.7:
            return decision
    return None


def _matching_proposal(state: State, text: str, now: float) -> Proposal | None:
    words = content_stems(text)
    for proposal in reversed(state.ledger.pending_proposals):
        if now - proposal.time < 300 and overlap(words, content_stems(proposal.text)) >= 0.5:
            return proposal
    return None


def read(state: State, k: int) -> None:
    """Read the decisions and proposals of turn ``k`` into the state."""
    turn = state.turns[k]
    now = turn.utterance.start
    for sentence in turn.sentences:
        if state.is_claimed(sentence):
            continue
        toks = sentence.toks
        m = EXPLICIT.search(toks)
        if m and not sentence.is_question and not re.search(r"(?:^|\s)(?:if|whether|not|n't)\s",
                                                             toks[: m.start() + 1]):
            text = _decision_text(sentence, m.end(), m.group(0), talk=False)
            ev = evidence(turn.utterance, sentence.text)
            pending = _matching_proposal(state, text, now) if text else None
            if pending is None and not text:
                # "we've agreed" with nothing after it: the proposal on the table
                pending = state.ledger.pending_proposals[-1] if state.ledger.pending_proposals \
                    else None
                if pending is not None and now - pending.time > 180:
                    pending = None
            if pending is not None:
                state.apply([Update(pending.id, Change("accepted", text or pending.text, ev))])
                state.claim(sentence)
                continue
            if text and orders_business(text):
                state.claim(sentence)
                continue
            if text and _duplicate(state, text, now) is None:
                state.apply([Add(Decision("", text, ev.start, turn.speaker, (ev,)))])
                state.claim(sentence)
                continue
        m = PROPOSAL.search(toks)
        if m and SUBORDINATE.search(toks[: m.start() + 1]):
            m = None  # "if we're gonna put in more technology, ..."
        text = ""
        if m:
            text = _decision_text(sentence, m.end(), m.group(0))
        else:
            m = REQUIREMENT.search(toks)
            if m and (HEDGED.search(toks) or SUBORDINATE.search(toks[: m.start() + 1])
                      or sentence.is_question):
                m = None
            if m:  # the whole clause: "The feel of the material has to be spongy"
                text = capitalise(_clause_from(sentence, m.start()))
        if m and text and orders_business(text):
            state.claim(sentence)
            continue
        if m and text and content_stems(text) and _duplicate(state, text, now) is None \
                and _matching_proposal(state, text, now) is None:
            ev = evidence(turn.utterance, sentence.text)
            state.apply([Add(Proposal("", text, turn.speaker, ev.start, (ev,)))])
            state.claim(sentence)
