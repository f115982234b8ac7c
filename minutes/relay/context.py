"""What every segment reader may consult besides the ledger and the segment."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..model import Ledger, Segment, Transcript
from ..nlp import Parsed
from ..speakers import Directory

if TYPE_CHECKING:
    from .ledger import Op, SegmentReader


@dataclass(frozen=True)
class ReadContext:
    """The whole transcript, its one parse, and the people: fixed for a run."""

    transcript: Transcript
    parsed: Parsed  # parsed.docs[i] is the spaCy Doc of transcript.utterances[i]
    directory: Directory


@dataclass(frozen=True)
class Combined:
    """A reader that runs several readers on each segment, in order, against the same ledger."""

    readers: tuple[SegmentReader, ...]
    name: str = "rules"

    def read(self, ledger: Ledger, segment: Segment) -> list[Op]:
        """Return the operations of every reader, in order."""
        from .ledger import apply

        ops: list[Op] = []
        for reader in self.readers:
            new = list(reader.read(ledger, segment))
            ops.extend(new)
            # later readers see earlier readers' items (e.g. a motion reader sees decisions)
            ledger = apply(ledger, new)[0]
        return ops
