"""Shared pieces of the rules reader: sentences, clean verb phrases, mentions, evidence.

Everything here works on the one spaCy parse of the transcript (``ctx.parsed``);
nothing is parsed again. Spoken text is full of fillers and fragments, so the
cue words are found with patterns on the lower-cased sentence and the parse is
used for what it does well: finding the verb a cue governs and its subtree.
"""

from __future__ import annotations

import functools
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..model import Evidence, Utterance

if TYPE_CHECKING:
    from spacy.tokens import Doc, Span, Token

    from ..speakers import Directory

# Words that carry no content in a task or decision, whatever the tagger says.
FILLER_WORDS = frozenset(
    "um umm uh uhh er erm ah eh hm hmm mm mhm mm-hmm uh-huh oh okay ok yeah yep so well "
    "just actually basically really obviously probably maybe perhaps like please anyway "
    "definitely certainly quickly".split()
)
FILLER_PHRASES = ("you know", "i mean", "kind of", "sort of", "i guess", "i think", "or something",
                  "and stuff", "and everything", "or whatever", "at all")
# a negation in lower-cased tokens ("i 'll probably not send", "we do n't want"): cut after
# a cue, a verb phrase would say the opposite, so readers look for it first
NEGATION = re.compile(r"(?:^|\s)(?:not|n't|never|no longer)(?:\s|$)")
# Verbs of talk in the room ("I'll show you", "let me explain"): they are not action items.
TALK_VERBS = frozenset(
    "show tell say explain talk speak start begin continue present repeat mean think guess see "
    "hear know sit stop wait pass hand open close switch plug click move summarise summarize "
    "recap introduce wrap conclude answer read be remember imagine suppose assume agree "
    "disagree ask wonder like love hate want hope need try understand go come stay "
    "finish end use put note point add mention describe elaborate clarify argue bet admit "
    "interrupt jump skip turn draw give take look have do get make keep prefer decide mind".split()
)
# Of the talk verbs, these make an action item when the rest of the phrase says so
# ("look into", "have a look at the figures", "take care of", "get back to", "do a survey").
WORK_COMPLEMENTS = {
    "look": ("into", "up", "for", "over", "at"),
    "take": ("care", "charge", "over"),
    "get": ("back", "in touch", "hold", "quote", "quotes", "price", "prices", "list", "figures"),
    "have": ("look", "chat", "word", "think"),
    "think": ("about", "over", "through"),
    "go": ("and",),
    "give": ("call", "ring", "update"),
    "put": ("together",),
    "make": ("sure", "list", "call", "booking", "reservation", "copy", "copies"),
    "do": ("research", "survey", "review", "analysis", "draft", "write", "report", "check",
           "test", "evaluation", "questionnaire"),
    "draw": ("up", "design", "prototype", "sketch"),
    "finish": ("the", "off", "up"),
    "ask": ("them", "him", "her", "the", "about", "if", "whether"),
    "try": ("to", "and"),
    "read": ("up", "through"),
    "write": (),
}
IRREGULAR = {"sent": "send", "did": "do", "done": "do", "wrote": "write", "written": "write",
             "took": "take", "taken": "take", "got": "get", "gotten": "get", "made": "make",
             "bought": "buy", "brought": "bring", "gave": "give", "given": "give",
             "spoke": "speak", "spoken": "speak", "found": "find", "paid": "pay", "rang": "ring",
             "told": "tell", "went": "go", "gone": "go", "set": "set", "put": "put",
             "had": "have", "has": "have", "was": "be", "were": "be", "been": "be",
             "drew": "draw", "drawn": "draw", "emailed": "email", "booked": "book",
             "filled": "fill", "thought": "think", "kept": "keep", "left": "leave",
             "met": "meet", "read": "read", "ran": "run", "sold": "sell", "chose": "choose",
             "chosen": "choose", "began": "begin", "begun": "begin", "forgot": "forget"}
STOP = frozenset(
    "a an the and or but if then of to in on at for with by from about into onto over up down "
    "out off that this these those it its it's they them their there here we us our you your "
    "i me my he him his she her be is are was were been am do does did have has had will "
    "would shall should can could may might must not no yes one some any all what which who "
    "whom how why when where as so than too very also just only even still there's that's "
    "gonna na going get got thing things stuff lot bit way let after before later soon again "
    "still already".split()
) | FILLER_WORDS

_WORD = re.compile(r"[a-z0-9][a-z0-9'_-]*")


def norm(text: str) -> str:
    """Return ``text`` lower-cased with curly quotes straightened and spaces collapsed."""
    return " ".join(text.lower().replace("’", "'").replace("‘", "'").split())


@functools.lru_cache(maxsize=65536)
def stem(word: str) -> str:
    """Return a crude stem of ``word`` so that "sent", "sending" and "send" compare equal."""
    w = word.lower().strip("'")
    if w in IRREGULAR:
        return IRREGULAR[w]
    for suffix, keep in (("ies", "y"), ("ing", ""), ("ed", ""), ("es", ""), ("s", "")):
        if w.endswith(suffix) and len(w) - len(suffix) >= 3:
            w = w[: -len(suffix)] + keep
            break
    if len(w) > 3 and w[-1] == w[-2] and w[-1] not in "aeiousl":  # "shipp" -> "ship"
        w = w[:-1]
    return w.rstrip("e") if len(w) > 4 else w


@functools.lru_cache(maxsize=16384)  # the same sentences are compared many times in a step
def content_stems(text: str) -> frozenset[str]:
    """Return the stems of the content words of ``text``."""
    return frozenset(stem(w) for w in _WORD.findall(norm(text)) if w not in STOP and len(w) > 2)


def similar(a: frozenset[str], b: frozenset[str], share: float = 0.5) -> bool:
    """Return True when two sets of stems say the same thing: two words shared, or all of one."""
    common = len(a & b)
    if not common:
        return False
    small = (len(a) == 1 and len(b) <= 2) or (len(b) == 1 and len(a) <= 2)
    if common < 2 and not (a == b or small):
        return False
    return common / min(len(a), len(b)) >= share


def overlap(a: frozenset[str], b: frozenset[str]) -> float:
    """Return how much of the smaller set the two share (0.0-1.0)."""
    if not a or not b:
        return 0.0
    return len(a & b) / min(len(a), len(b))


@dataclass(frozen=True)
class Sentence:
    """One sentence of an utterance with ``toks``: its lower-cased tokens joined by spaces.

    Patterns are matched on ``toks`` ("i 'll send it by friday ."), so an offset
    maps back to a token by counting spaces, however spaCy split the contractions.
    """

    utterance: Utterance
    span: Span
    text: str
    toks: str
    number: int  # position of the sentence in its utterance

    @property
    def doc(self) -> Doc:
        return self.span.doc

    def token(self, offset: int) -> int:
        """Return the doc index of the token at ``offset`` of ``toks``."""
        return self.span.start + self.toks[:offset].count(" ")

    def after(self, offset: int) -> Span:
        """Return the part of the sentence from ``offset`` of ``toks`` on."""
        return self.doc[self.token(offset) : self.span.end]

    @property
    def is_question(self) -> bool:
        return self.text.rstrip().endswith("?")


def sentences(utterance: Utterance, doc: Doc) -> list[Sentence]:
    """Return the sentences of an utterance's parse (the parser's sentence boundaries)."""
    out: list[Sentence] = []
    for span in doc.sents:
        text = span.text.strip()
        if not text:
            continue
        toks = " ".join(t.lower_.replace("’", "'").replace(" ", "_") for t in span)
        out.append(Sentence(utterance, span, text, toks, len(out)))
    return out


def evidence(utterance: Utterance, quote: str) -> Evidence:
    """Return the evidence for ``quote`` said in ``utterance``, naming the cue that holds it."""
    quote = " ".join(quote.split())
    cue = utterance.cue_for(quote)
    start, end = (cue.start, cue.end) if cue else (utterance.start, utterance.end)
    return Evidence(utterance.index, cue.id if cue else None, start, end, utterance.speaker, quote)


# --------------------------------------------------------------------------- verb phrases

_DROP_DEPS = frozenset({"nsubj", "nsubjpass", "expl", "aux", "auxpass", "intj", "parataxis",
                        "discourse", "meta", "vocative", "preconj", "mark", "csubj"})
_CHAIN = frozenset({"go", "gon", "going", "be", "have", "need", "want", "try", "able", "got",
                    "gotta", "wanna", "like", "start", "begin", "plan", "mean", "hope", "will",
                    "let", "would", "should", "could", "can", "may", "might", "must", "shall"})
_EDGE_WORDS = frozenset("and or but so then because if that which to with as for um uh".split())


def next_verb(span: Span, start: int) -> Token | None:
    """Return the first verb at or after token ``start`` of ``span`` that heads the action.

    Auxiliaries and the verbs of a modal chain ("going to", "have to", "need to",
    "want to", "be able to") are skipped: the action is the verb they govern.
    """
    toks = [t for t in span if t.i >= start]
    for k, tok in enumerate(toks):
        low = tok.lower_
        # right after the cue, the parser's root is the verb even when tagged otherwise
        # ("could you forward the quote": "forward" comes out as an adverb)
        root_first = k == 0 and tok.dep_ == "ROOT" and tok.pos_ in ("NOUN", "ADV", "ADJ", "PROPN")
        if tok.pos_ not in ("VERB", "AUX") and not (tok.tag_ == "VB" or root_first):
            continue
        if tok.dep_ in ("aux", "auxpass") and tok.pos_ == "AUX":
            continue
        prev = toks[k - 1].lower_ if k else ""
        if f"{prev} {low}" in FILLER_PHRASES:
            continue  # "I'll, uh, you know, send it": "you know" is a filler
        nxt = toks[k + 1].lower_ if k + 1 < len(toks) else ""
        if tok.lemma_.lower() in _CHAIN or low in _CHAIN:
            if nxt in ("to", "na", "ta", "be", "get", "go", "have") or tok.pos_ == "AUX" or (
                    tok.lemma_.lower() == "try" and nxt == "and"):
                continue
            if low in ("gon", "gonna", "wanna", "gotta", "going", "got"):
                continue
            if tok.lemma_.lower() == "be" and nxt in ("able",):
                continue
        if low in ("able",):
            continue
        return tok
    return None


def phrase_tokens(verb: Token, *, stop_at: int | None = None) -> list[Token]:
    """Return the tokens of the verb phrase headed by ``verb``: the verb and what follows it.

    Left of the verb (subject, modals, fillers) is dropped, and so are dependents
    that start another clause: "... and I'll do the rest", "because it's late".
    """
    banned: set[int] = set()
    for child in verb.children:  # spaCy makes a new Token per access: compare indices
        drop = child.dep_ in _DROP_DEPS
        if child.dep_ == "conj" and any(c.dep_ in ("nsubj", "nsubjpass") for c in child.children):
            drop = True
        if child.dep_ in ("advcl", "relcl") and any(c.dep_ in ("nsubj", "mark")
                                                      for c in child.children):
            drop = True
        if drop:
            banned.update(t.i for t in child.subtree)
    keep = []
    for tok in verb.subtree:
        if tok.i in banned or tok.i < verb.i:
            continue
        if stop_at is not None and tok.i >= stop_at:
            continue
        keep.append(tok)
    return keep


def _vocative(tok: Token) -> bool:
    """Return True when a name is said to someone ("send it, Tom"), not part of the task
    ("pay the Kilnworth deposit", "email Colm")."""
    in_task = tok.dep_ in ("compound", "dobj", "pobj", "dative", "poss", "nsubj")
    return not in_task or tok.head.i == tok.i or _beside_comma(tok)


def _beside_comma(tok: Token) -> bool:
    doc = tok.doc
    return (tok.i > 0 and doc[tok.i - 1].text == ",") or (
        tok.i + 1 < len(doc) and doc[tok.i + 1].text in (",", ".", "?", "!"))


def clean_phrase(tokens: Sequence[Token], *, drop_chars: Iterable[tuple[int, int]] = (),
                 drop_names: Iterable[str] = (), lemmatise_first: bool = True,
                 max_words: int = 18) -> str:
    """Return the words of ``tokens`` as a clean phrase: fillers, dates and names removed."""
    spans = list(drop_chars)
    names = {n.lower() for n in drop_names}
    words: list[str] = []
    toks = [t for t in tokens if not any(a <= t.idx < b for a, b in spans)]
    skip: set[int] = set()
    lows = [t.lower_ for t in toks]
    for k in range(len(toks) - 1):
        if f"{lows[k]} {lows[k + 1]}" in FILLER_PHRASES:
            skip.update((k, k + 1))
    for k, tok in enumerate(toks):
        low = tok.lower_
        if k in skip or low in FILLER_WORDS and not (low == "like" and tok.pos_ in ("VERB", "ADP")):
            continue
        if low in names and _vocative(tok) or tok.is_punct and low not in ("-", "/", "&", "'s"):
            continue
        if low.endswith("_") and low.replace("_", "").isalpha() and len(low) <= 8:
            low = low.replace("_", "")  # AMI spells letters out: "L_C_D_" -> "lcd"
            words.append(low.upper() if len(low) <= 4 else low)
            continue
        if words and words[-1].lower() == low and tok.is_alpha:
            continue  # stutter: "the the"
        text = tok.text
        if not words and lemmatise_first and tok.pos_ in ("VERB", "AUX"):
            text = tok.lemma_.lower()
        elif tok.pos_ != "PROPN" and not (low == "i" or low.startswith("i'")) and not tok.is_upper:
            text = tok.lower_ if k == 0 else tok.text
        words.append(text)
    # edges: no trailing "and", "to", "the"...
    while words and words[-1].lower() in _EDGE_WORDS | {"the", "a", "an", "of", "like"}:
        words.pop()
    while words and words[0].lower() in _EDGE_WORDS - {"to"}:
        words.pop(0)
    if len(words) > max_words:
        words = words[:max_words]
        while words and words[-1].lower() in _EDGE_WORDS | {"the", "a", "an", "of"}:
            words.pop()
    text = " ".join(words)
    text = re.sub(r" (n't|'s|'re|'ll|'ve|'d|'m)\b", r"\1", text)
    text = re.sub(r"(\w) - (\w)", r"\1-\2", text)  # "sign - up" -> "sign-up"
    return text.strip()


def verb_phrase(span: Span, start: int, *, drop_chars: Iterable[tuple[int, int]] = (),
                drop_names: Iterable[str] = ()) -> tuple[str, Token | None]:
    """Return the clean verb phrase governed at or after token ``start``, and its verb."""
    verb = next_verb(span, start)
    if verb is None:
        return "", None
    toks = [t for t in phrase_tokens(verb) if t.i < span.end]
    if len(toks) <= 2 or toks[-1].pos_ == "ADP":
        toks = tail_tokens(span, verb)  # the parse hung the object elsewhere: read on
    return clean_phrase(toks, drop_chars=drop_chars, drop_names=drop_names), verb


_NEW_CLAUSE = frozenset("i you we he she they it there".split())


def tail_tokens(span: Span, verb: Token) -> list[Token]:
    """Return the words from ``verb`` to the end of its clause, read left to right."""
    out: list[Token] = []
    toks = [t for t in span if t.i >= verb.i]
    for k, tok in enumerate(toks):
        nxt = toks[k + 1].lower_ if k + 1 < len(toks) else ""
        if k and tok.lower_ in ("and", "but", "so", "because", "cause", "'cause", "or") and (
                nxt in _NEW_CLAUSE):
            break
        if k and tok.is_punct and tok.text in ".;?!":
            break
        if k and tok.dep_ in ("nsubj", "nsubjpass") and tok.lower_ in _NEW_CLAUSE and not (
                out and out[-1].lower_ in ("you",)) and nxt not in ("know", "mean"):
            break
        out.append(tok)
    return out


# --------------------------------------------------------------------------- people


def mentions(sentence: Sentence, directory: Directory, *,
             max_words: int = 3) -> list[tuple[str, int, int]]:
    """Return (name, first token, end token) of people named in the sentence, in order."""
    toks = list(sentence.span)
    found: list[tuple[str, int, int]] = []
    k = 0
    while k < len(toks):
        hit = None
        for n in range(min(max_words, len(toks) - k), 0, -1):
            group = toks[k : k + n]
            word = group[0].text.replace("_", "")
            if n == 1 and (group[0].is_stop or not word.isalpha() or len(word) < 2):
                continue
            if any(t.is_punct for t in group):
                continue
            if n == 1 and group[0].pos_ not in ("PROPN", "NOUN", "X") and not word[:1].isupper():
                continue
            said = " ".join(t.text for t in group)
            person = directory.resolve(said) if directory.people else None
            if person is not None:
                hit = (person.name, group[0].i, group[-1].i + 1)
                break
            if n == 1 and group[0].ent_type_ == "PERSON" and group[0].pos_ == "PROPN":
                hit = (group[0].text, group[0].i, group[0].i + 1)
                break
        if hit:
            found.append(hit)
            k = hit[2] - sentence.span.start
        else:
            k += 1
    return found


def capitalise(text: str) -> str:
    """Return ``text`` with its first letter upper-cased."""
    return text[:1].upper() + text[1:] if text else text
