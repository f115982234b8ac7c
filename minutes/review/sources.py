"""What the draft's JSON leaves out, found again beside it: the body's roster, the cues.

The JSON names its source file (``meeting.source``, as given to ``minutes draft``). Where
that file, or the transcript the draft wrote beside a recording, can still be read, the
review uses it: the meeting file beside it names the profiles (and so the roster, which
says whether seconders are recorded), and the caption file gives each cue's own times and
words, so an item added from the transcript cites the cue that holds its quote. Nothing
here is required: without them the roster is unknown and a quote in a merged utterance
cites no cue.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import Any

from ..errors import InputError
from ..model import Roster, Utterance


def _candidates(minutes_path: Path, data: dict[str, Any]) -> list[Path]:
    source = str(data.get("meeting", {}).get("source") or "")
    found: list[Path] = []
    if source:
        given = Path(source)
        for path in (given, minutes_path.parent / given, minutes_path.parent / given.name):
            if path.is_file() and path.resolve() not in {p.resolve() for p in found}:
                found.append(path)
    return found


def roster_for(minutes_path: Path, data: dict[str, Any],
               profiles: Path | None = None) -> tuple[Roster | None, str]:
    """Return the body's roster and where it came from ('' when none was found)."""
    from ..meeting import beside, load_meeting
    from ..speakers import load_profiles

    if profiles is not None:
        return load_profiles(profiles).roster, str(profiles)
    for source in _candidates(minutes_path, data):
        meeting = beside(source)
        if meeting is None:
            continue
        mfile = load_meeting(meeting)
        if mfile.profiles is not None and mfile.profiles.exists():
            return load_profiles(mfile.profiles).roster, str(mfile.profiles)
    return None, ""


CueFinder = Callable[[int, str], tuple[str | None, float, float]]


def _same(a: Utterance, b: dict[str, Any]) -> bool:
    return (a.start, a.end, a.text, [c.id for c in a.cues]) == (
        b.get("start"), b.get("end"), b.get("text"), b.get("cues"))


def cue_finder(minutes_path: Path, data: dict[str, Any]) -> tuple[CueFinder | None, str]:
    """Return a function giving (cue id, start, end) of a quote, and the file it reads.

    Only a caption file whose utterances match the JSON's exactly (times, words, cue ids)
    is used; otherwise (None, '').
    """
    from ..ingest import read_transcript

    paths = _candidates(minutes_path, data)
    paths.append(minutes_path.with_name(minutes_path.stem + ".transcript.vtt"))
    wanted = data.get("utterances", [])
    for path in paths:
        if not path.is_file() or path.suffix.lower() not in (".vtt", ".srt", ".txt", ".json"):
            continue
        if path.resolve() == minutes_path.resolve():
            continue
        try:
            utterances = read_transcript(path).utterances
        except InputError:
            continue
        if len(utterances) == len(wanted) and all(map(_same, utterances, wanted)):
            return _finder(utterances), str(path)
    return None, ""


def _finder(utterances: tuple[Utterance, ...]) -> CueFinder:
    def find(index: int, quote: str) -> tuple[str | None, float, float]:
        u = utterances[index]
        cue = u.cue_for(quote)
        if cue is None:
            return None, u.start, u.end
        return cue.id, cue.start, cue.end

    return find
