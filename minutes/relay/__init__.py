"""The relay: read segments in order, carrying the ledger from one to the next."""

from .ledger import (
    Add,
    Op,
    RelayResult,
    SegmentReader,
    StepRecord,
    Update,
    apply,
    relay,
    replay,
    step,
)

__all__ = ["Add", "Op", "RelayResult", "SegmentReader", "StepRecord", "Update", "apply", "relay",
           "replay", "step"]
