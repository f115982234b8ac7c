"""Pseudonyms: people's names and places replaced consistently across a set of transcripts.

Who is replaced, and by what:

- participants (speakers whose profile role is not ``interviewer``, in order of first
  appearance across the set): ``P01``, ``P02``...; interviewers: ``Interviewer`` (or
  ``Interviewer 1``, ``Interviewer 2`` when there are several);
- other people named: ``Person A``, ``Person B``...; places: ``Place 1``...;
  organisations: ``Organisation 1``...; other proper names (a boat, a business):
  ``Name 1``...

Names come from the speaker profiles (name, aliases, first and last name alone), the
speaker labels themselves (an unknown label such as a phone number is a person), and
spaCy's entities (PERSON, GPE, LOC, FAC, ORG, NORP, PRODUCT, WORK_OF_ART) plus
capitalised proper nouns the tagger left unlabelled. A single capitalised word that the
set also uses in lower case ("Forecast", "Harbour") is an ordinary word, not a name.
Each name also stands for its parts: a person's first name or surname alone ("Mick" for
"Mick Hanratty"), the family in the plural ("the Brennans"), and "the X" for a multi-word
place or boat ending in X ("the Head" for "Carrow Head").

Kept on purpose: kinship words (Dad, Mam, grandfather: they name a relation, not a
person) and nationalities. Accented names also match their plain spelling (Ciarán,
Ciaran).

``Pseudonyms.apply(text)`` replaces every variant, longest first, as whole words and
case-sensitively (so "will" is never taken for "Will"). ``key_json`` is the table linking
pseudonyms to real names: the caller writes it only when asked, and apart from the output.
"""

from __future__ import annotations

import dataclasses
import json
import re
import unicodedata
from collections import Counter
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from spacy.tokens import Doc

    from .model import Person

LABELS = ("PERSON", "GPE", "LOC", "FAC", "ORG", "NORP", "PRODUCT", "WORK_OF_ART")
KINSHIP = frozenset("""
    dad daddy da dada mam mammy mum mummy mom mommy ma mother father mamma papa pa tata
    granda grandad granddad grandpa grandfather granny gran grandma grandmother nan nana
    nanna auntie aunty uncle
""".split())
NOT_NAMES = frozenset("""
    i god lord ok okay mr mrs ms miss dr sir madam monday tuesday wednesday thursday friday
    saturday sunday january february march april may june july august september october
    november december christmas easter english irish welsh scottish british polish
""".split())
TITLES = frozenset({"mr", "mrs", "ms", "miss", "dr", "sir", "father", "sister", "councillor"})
PLACE_WORDS = frozenset("""
    head cove bay banks bank port harbour harbor point sound island isle rock rocks quay
    pier street road lane hill strand beach reef ledge sands shoal estuary river creek inlet
    loch lough glen town village city county square park
""".split())
PLACE_FIRST = frozenset({"port", "mount", "glen", "lough", "loch", "lake", "st", "saint",
                         "north", "south", "east", "west", "upper", "lower", "isle"})
ORG_WORDS = frozenset("""
    study university college school group council fund association society co-op coop
    cooperative ltd limited inc company committee board trust agency office service
    federation union club library fisheries
""".split())
# not "to" or "with": people are talked to and worked with as often as places are gone to
PLACE_PREPS = frozenset({"in", "at", "from", "near", "off", "round", "around", "past",
                         "outside", "beyond"})
ROLE_WORDS = frozenset({"interviewer", "chair", "secretary", "clerk", "participant",
                        "moderator", "facilitator", "madam chair", "mr chair"})

KIND_ORDER = ("participant", "interviewer", "person", "place", "organisation", "other")


@dataclass(frozen=True)
class Mention:
    """A candidate name as the text gave it, with spaCy's label and the word before it."""

    text: str
    label: str  # an entity label, or "PROPN" for an unlabelled proper noun
    before: str = ""  # the lower-cased word before it ("in", "the"...)


@dataclass
class _Entry:
    canonical: str
    kind: str
    variants: list[str] = field(default_factory=list)
    short: list[str] = field(default_factory=list)  # used only as "the X"
    pseudonym: str = ""


@dataclass(frozen=True)
class Pseudonyms:
    """The table of pseudonyms for one set, and the replacement it implies."""

    table: tuple[tuple[str, str, tuple[str, ...]], ...]  # (pseudonym, kind, real names)
    replacements: tuple[tuple[str, str], ...]  # (exact text, replacement), longest first

    def apply(self, text: str) -> str:
        """Return ``text`` with every known name replaced by its pseudonym."""
        if not text or not self.replacements:
            return text
        return _compiled(self.replacements).sub(lambda m: self._lookup[m.group(0)], text)

    @property
    def _lookup(self) -> dict[str, str]:
        return _lookup(self.replacements)

    def key_json(self) -> bytes:
        """Return the key linking each pseudonym to the real names it replaced (JSON)."""
        rows = [{"pseudonym": p, "kind": k, "names": list(n)} for p, k, n in self.table]
        text = json.dumps({"pseudonyms": rows}, ensure_ascii=False, indent=2)
        return (text + "\n").encode("utf-8")

    def names(self) -> tuple[str, ...]:
        """Return every real name and variant this table replaces."""
        return tuple(text for text, _ in self.replacements)


_CACHE: dict[tuple[tuple[str, str], ...], tuple[re.Pattern[str], dict[str, str]]] = {}


def _compiled(replacements: tuple[tuple[str, str], ...]) -> re.Pattern[str]:
    return _cached(replacements)[0]


def _lookup(replacements: tuple[tuple[str, str], ...]) -> dict[str, str]:
    return _cached(replacements)[1]


def _cached(replacements: tuple[tuple[str, str], ...]) -> tuple[re.Pattern[str], dict[str, str]]:
    hit = _CACHE.get(replacements)
    if hit is None:
        alternation = "|".join(re.escape(text) for text, _ in replacements)
        pattern = re.compile(rf"(?<![\w])(?:{alternation})(?![\w])")
        hit = (pattern, dict(replacements))
        _CACHE[replacements] = hit
    return hit


# --------------------------------------------------------------------------- finding names


def mentions(docs: Iterable[Doc]) -> list[Mention]:
    """Return the candidate names in spaCy documents, in order."""
    out: list[Mention] = []
    for doc in docs:
        covered: set[int] = set()
        for ent in doc.ents:
            if ent.label_ in LABELS:
                before = doc[ent.start - 1].lower_ if ent.start > 0 else ""
                out.append(Mention(ent.text, ent.label_, before))
                covered.update(range(ent.start, ent.end))
        run: list[Any] = []
        for tok in [*doc, None]:
            if tok is not None and tok.i not in covered and tok.pos_ == "PROPN" \
                    and tok.text[:1].isupper() and not tok.is_sent_start:
                run.append(tok)
                continue
            if run:
                before = doc[run[0].i - 1].lower_ if run[0].i > 0 else ""
                out.append(Mention(" ".join(t.text for t in run), "PROPN", before))
                run = []
    return out


def lower_words(docs: Iterable[Doc]) -> set[str]:
    """Return the words the set uses in lower case (so their capitalised form is no name)."""
    return {tok.text for doc in docs for tok in doc if tok.text.islower()}


def _clean(text: str) -> str:
    text = re.sub(r"['’]s$", "", text.strip(" .,;:!?\"“”()"))
    text = re.sub(r"^(?:the|The)\s+", "", text)
    return text.strip(" .,;:!?\"“”()")


def _fold(text: str) -> str:
    return "".join(c for c in unicodedata.normalize("NFKD", text) if not unicodedata.combining(c))


def _letters(n: int) -> str:
    out = ""
    n += 1
    while n:
        n, r = divmod(n - 1, 26)
        out = chr(65 + r) + out
    return out


def _name_parts(name: str) -> list[str]:
    words = [w for w in re.split(r"\s+", name) if w[:1].isupper()]
    words = [w for w in words if w.lower().strip(".") not in TITLES]
    parts = words[:1] + words[-1:]
    return [p for p in dict.fromkeys(parts) if len(p.strip(".")) > 1]


def places_in(place: str) -> list[str]:
    """Return the place names in a meeting file's ``place`` ("Harbour office, Ardlune")."""
    out = []
    for part in place.split(","):
        words = _clean(part).split()
        if not words or not all(w[:1].isupper() for w in words) or words[0].lower() in TITLES:
            continue
        if len(words) == 1 and (words[0].lower() in ORG_WORDS or words[0].lower() in PLACE_WORDS):
            continue  # "Office", "Harbour": what kind of place, not which
        out.append(" ".join(words))
    return out


def build(speakers: Sequence[tuple[str, str]], people: Sequence[Person],
          found: Sequence[Mention], lowercase: set[str],
          places: Sequence[str] = ()) -> Pseudonyms:
    """Return pseudonyms for a set.

    ``speakers``: (name, role) of every speaker, in order of first appearance across the
    set; ``people``: the profiles (their aliases); ``found``: names found in the text, in
    order; ``lowercase``: words the set uses in lower case; ``places``: place names the
    meeting files give (see ``places_in``).
    """
    entries: list[_Entry] = []
    by_variant: dict[str, _Entry] = {}

    def add(entry: _Entry) -> _Entry:
        entries.append(entry)
        return entry

    def variant(entry: _Entry, text: str) -> None:
        text = text.strip()
        if not text or text.lower() in ROLE_WORDS or text.lower() in KINSHIP:
            return
        for form in dict.fromkeys((text, _fold(text))):
            if form not in by_variant:
                by_variant[form] = entry
                entry.variants.append(form)

    profiles = {p.name: p for p in people}
    for name, role in speakers:
        if name in by_variant:
            continue
        kind = "interviewer" if role == "interviewer" else "participant"
        entry = add(_Entry(name, kind))
        variant(entry, name)
        person = profiles.get(name)
        for alias in person.aliases if person else ():
            variant(entry, alias)
        for part in _name_parts(name):
            variant(entry, part)
    for person in people:  # profile people who did not speak here may still be named
        if person.name in by_variant:
            continue
        kind = {"interviewer": "interviewer", "participant": "participant"}.get(person.role,
                                                                                "person")
        entry = add(_Entry(person.name, kind))
        for text in (person.name, *person.aliases, *_name_parts(person.name)):
            variant(entry, text)

    for place in places:
        if place not in by_variant:
            entry = add(_Entry(place, "place"))
            variant(entry, place)
            if len(place.split()) > 1:
                entry.short.append(place.split()[-1])

    groups: dict[str, list[Mention]] = {}
    for m in found:
        text = _clean(m.text)
        if not text or not text[:1].isupper():
            continue
        words = text.split()
        if all(w.lower() in KINSHIP or w.lower() in NOT_NAMES
               or w.lower().removesuffix("s") in NOT_NAMES for w in words):
            continue  # "Dad", "Tuesdays"
        if len(words) == 1 and (text.lower() in ORG_WORDS or text.lower() in PLACE_WORDS):
            continue  # "the Fisheries", "the Harbour": a kind of body or place, no name
        if len(words) == 1 and (text in lowercase or text.lower() in lowercase
                                or not any(c.isalpha() for c in text)):
            continue
        groups.setdefault(text, []).append(m)

    multi = [t for t in groups if len(t.split()) > 1]
    single = [t for t in groups if len(t.split()) == 1]
    for text in multi:
        if text in by_variant:
            continue
        words = text.split()
        owner = next((by_variant[w] for w in words if w in by_variant
                      and by_variant[w].kind in ("participant", "interviewer", "person")
                      and w[:1].isupper() and w.lower() not in TITLES), None)
        kind = _kind_of_multi(words, groups[text])
        if owner is not None and kind == "person":
            variant(owner, text)
            continue
        entry = add(_Entry(text, kind))
        variant(entry, text)
        if kind == "person":
            for part in _name_parts(text):
                if part not in by_variant:
                    variant(entry, part)
            surname = _name_parts(text)[-1]
            plural = surname + ("es" if surname.endswith(("s", "x", "z", "ch", "sh")) else "s")
            if plural not in by_variant:
                variant(entry, plural)  # "the Brennans"
        elif words[-1][:1].isupper():
            entry.short.append(words[-1])
    shorts = Counter(s for e in entries for s in e.short)
    for text in single:
        if text in by_variant:
            continue
        if shorts.get(text) == 1:  # "Cove" for "Carrow Cove": replaced where it reads "the Cove"
            continue
        stem = text[:-1] if text.endswith("s") else ""
        if stem and stem in by_variant and by_variant[stem].kind == "person":
            variant(by_variant[stem], text)  # "the Brennans"
            continue
        labels = Counter(m.label for m in groups[text])
        if labels.get("NORP") == sum(labels.values()):
            continue  # a nationality or a group of people, not one person
        entry = add(_Entry(text, _kind_of_single(groups[text])))
        variant(entry, text)

    counters: Counter[str] = Counter()
    interviewers = sum(1 for e in entries if e.kind == "interviewer")
    for entry in entries:
        counters[entry.kind] += 1
        n = counters[entry.kind]
        entry.pseudonym = {
            "participant": f"P{n:02d}",
            "interviewer": "Interviewer" if interviewers == 1 else f"Interviewer {n}",
            "person": f"Person {_letters(n - 1)}",
            "place": f"Place {n}",
            "organisation": f"Organisation {n}",
            "other": f"Name {n}",
        }[entry.kind]
    pairs: dict[str, str] = {}
    for entry in entries:
        for text in entry.variants:
            pairs.setdefault(text, entry.pseudonym)
        for short in entry.short:
            for the in ("the", "The"):
                for form in dict.fromkeys((short, _fold(short))):
                    pairs.setdefault(f"{the} {form}", f"{the} {entry.pseudonym}")
    replacements = tuple(sorted(pairs.items(), key=lambda kv: (-len(kv[0]), kv[0])))
    table = tuple((e.pseudonym, e.kind, tuple(e.variants)) for e in
                  sorted(entries, key=lambda e: (KIND_ORDER.index(e.kind), e.pseudonym)))
    return Pseudonyms(table, replacements)


def _kind_of_multi(words: list[str], seen: list[Mention]) -> str:
    first, last = words[0].lower().strip("."), words[-1].lower()
    if first in TITLES:
        return "person"
    if last in PLACE_WORDS or first in PLACE_FIRST:
        return "place"
    if last in ORG_WORDS:
        return "organisation"
    label = _majority(seen)
    # an organisation's name nearly always says what it is (Group, Council, Co-op...);
    # without such a word an ORG tag in speech is more often a boat or a business
    return {"PERSON": "person", "GPE": "place", "LOC": "place", "FAC": "place"}.get(label,
                                                                                  "other")


def _kind_of_single(seen: list[Mention]) -> str:
    label = _majority(seen)
    if label in ("GPE", "LOC", "FAC"):
        return "place"
    if label in ("PERSON", "ORG"):  # a lone capitalised word tagged ORG in speech is a name
        return "person"
    if label in ("PRODUCT", "WORK_OF_ART"):
        return "other"
    # an unlabelled name: a place when it mostly follows "in", "at", "from"...
    after_prep = sum(1 for m in seen if m.before in PLACE_PREPS)
    return "place" if after_prep * 2 >= len(seen) else "person"


def _majority(seen: list[Mention]) -> str:
    labels = Counter(m.label for m in seen if m.label != "PROPN")
    if not labels:
        return "PROPN"
    return labels.most_common(1)[0][0]


# --------------------------------------------------------------------------- applying


def replace_strings(value: Any, pseudonyms: Pseudonyms) -> Any:
    """Return ``value`` (records, tuples, lists, dicts, strings) with every string replaced."""
    if isinstance(value, str):
        return pseudonyms.apply(value)
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        changes = {f.name: replace_strings(getattr(value, f.name), pseudonyms)
                   for f in dataclasses.fields(value)}
        return dataclasses.replace(value, **changes)
    if isinstance(value, tuple):
        return tuple(replace_strings(v, pseudonyms) for v in value)
    if isinstance(value, list):
        return [replace_strings(v, pseudonyms) for v in value]
    if isinstance(value, dict):
        return {replace_strings(k, pseudonyms): replace_strings(v, pseudonyms)
                for k, v in value.items()}
    return value


def for_minutes(minutes: Any, people: Sequence[Person] = ()) -> Pseudonyms:
    """Return pseudonyms for one meeting's minutes: its speakers, profiles and named entities."""
    from . import nlp

    docs = nlp.parse(minutes.utterances).docs
    roles = {p.name: p.role for p in people}
    speakers = [(s, "interviewer" if roles.get(s) == "interviewer" else "participant")
                for s in dict.fromkeys([u.speaker for u in minutes.utterances]
                                       + [a.name for a in minutes.attendees])]
    return build(speakers, people, mentions(docs), lower_words(docs),
                 places_in(minutes.meeting.place))


def pseudonymise_minutes(minutes: Any, pseudonyms: Pseudonyms) -> Any:
    """Return ``minutes`` with every name replaced, the source file name included."""
    from pathlib import Path

    done = replace_strings(minutes, pseudonyms)
    source = Path(minutes.source)
    words = {w.lower() for text in pseudonyms.names() for w in re.findall(r"[^\W\d_]+", text)
             if len(w) > 2 and w.lower() != "the"}
    if any(w.lower() in words for w in re.findall(r"[^\W\d_]+", source.stem)):
        done = dataclasses.replace(done, source=f"meeting{source.suffix}")
    return done
