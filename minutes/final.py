"""The final pass: reconcile the ledger, write key points and the summary, build ``Minutes``."""

from __future__ import annotations

from collections import Counter
from collections.abc import Sequence
from dataclasses import replace

from .keypoints import key_points, summarise
from .meeting import choose_template
from .model import Minutes, Segment, Transcript
from .nlp import Parsed
from .procedure import quorum
from .relay.context import ReadContext
from .relay.ledger import RelayResult
from .relay.motions import settle
from .relay.reconcile import reconcile
from .segment import not_discussed
from .speakers import Directory, attendance


def finish(
    transcript: Transcript,
    segments: Sequence[Segment],
    result: RelayResult,
    parsed: Parsed,
    directory: Directory,
    *,
    unknown_speakers: Sequence[str] = (),
    template: str = "",
    notes: Sequence[str] = (),
) -> Minutes:
    """Return the minutes of a meeting from its transcript, segments and relay result."""
    ctx = ReadContext(transcript, parsed, directory)
    ledger = settle(reconcile(result.ledger, ctx), ctx)
    segments = tuple(replace(s, points=key_points(s, parsed)) for s in segments)
    people = attendance(transcript, directory, transcript.meeting)
    meeting = transcript.meeting
    run_notes = list(notes)
    rejected = Counter(why.split(":", 1)[1].strip() for r in result.steps for why in r.rejected)
    for why, n in sorted(rejected.items()):
        run_notes.append(f"{n} proposed update(s) not applied: {why}")
    if unknown_speakers:
        run_notes.append(
            "speaker labels not found in the profiles (shown as given): "
            + ", ".join(unknown_speakers)
        )
    for motion in ledger.motions:
        run_notes.extend(f"{motion.id}: {flag}" for flag in motion.flags)
    return Minutes(
        meeting=meeting,
        source=transcript.source,
        duration=transcript.duration,
        attendees=people,
        segments=segments,
        summary=summarise(segments, parsed),
        ledger=ledger,
        utterances=transcript.utterances,
        template=template or choose_template(meeting),
        unknown_speakers=tuple(unknown_speakers),
        not_discussed=not_discussed(segments, meeting.agenda),
        notes=tuple(run_notes),
        roster=directory.roster,
        quorum=quorum(people, directory.roster),
    )
