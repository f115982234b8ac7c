"""WebVTT captions, read with webvtt-py and checked against the W3C spec.

webvtt-py 0.6.0 does the file-level work (header, blocks, identifiers, timings, regions,
styles, notes). Where it departs from the spec, or hides what we need, this module
makes up the difference:

- ``Caption.voice`` looks only at a ``<v>`` that opens the first line and gives it the
  whole cue ("Hee!</v> <i>laughter</i>" is all Esme's). We parse the raw cue text by the
  spec's cue text rules instead (``cuetext``), so each voice span becomes its own piece.
- It accepts non-padded timestamps ("0:1:5.2", which the spec rejects). We keep them,
  read as webvtt-py reads them (00:01:05.200), and warn that the file is not conforming.
- It drops a block whose timing line it cannot read, silently and without line numbers.
  We find every timing line ourselves, match webvtt-py's cues to them in order, and warn
  with the line number of each block it dropped.
- It accepts any first line starting with "WEBVTT" ("WEBVTTX"); the spec wants a space,
  a tab or the end of the line after it, and so do we.
"""

from __future__ import annotations

import re

from ..errors import InputError
from ..model import Cue, Transcript
from .common import Notes, check_times, finish, split_lines
from .cuetext import cue_text_pieces

# webvtt-py's own timing pattern (fields may be short), used to find and read timing lines
_LOOSE = r"(?:(\d{1,10}):)?(\d{1,2}):(\d{1,2})\.(\d{1,3})"
_TIMING = re.compile(rf"\s*{_LOOSE}\s*-->\s*{_LOOSE}")
_SRT_TIMING = re.compile(r"\d+:\d{2}:\d{2},\d{1,3}\s*-->")
_STRICT = re.compile(r"\s*(?:\d{2,}:)?\d{2}:\d{2}\.\d{3}\s*-->\s*(?:\d{2,}:)?\d{2}:\d{2}\.\d{3}"
                     r"(?=\s|$)")


def is_webvtt(text: str) -> bool:
    """Return whether text starts with the WebVTT signature, as the spec defines it."""
    return text.startswith("WEBVTT") and text[6:7] in ("", " ", "\t", "\n", "\r")


def read_vtt(text: str, path: str) -> Transcript:
    """Return the transcript of a WebVTT file's text."""
    import webvtt
    from webvtt.errors import MalformedCaptionError, MalformedFileError

    if not is_webvtt(text):
        first = split_lines(text)[0][:40]
        hint = " (it looks like SRT: rename it to .srt)" if _SRT_TIMING.search(text[:4000]) else ""
        raise InputError(f"does not start with 'WEBVTT', so it is not a WebVTT file{hint}; "
                         f"its first line is {first!r}", path=path, line=1)
    try:
        captions = webvtt.from_string(text).captions
    except (MalformedFileError, MalformedCaptionError, ValueError) as err:
        raise InputError(f"webvtt-py cannot read this file: {err}", path=path) from None

    notes = Notes()
    timings = _timing_lines(split_lines(text))
    pieces: list[tuple[str, Cue]] = []
    at = 0
    for caption in captions:
        key = (caption.start_time.in_milliseconds(), caption.end_time.in_milliseconds())
        while at < len(timings) and timings[at][2] != key:
            _dropped(timings[at], notes)
            at += 1
        line = timings[at][0] if at < len(timings) else None
        if at < len(timings) and not _STRICT.match(timings[at][1]):
            notes.add(f"timestamps in {timings[at][1].strip()[:60]!r} are not in the WebVTT "
                      f"form hh:mm:ss.mmm; read as {caption.start} --> {caption.end}",
                      line=line, cue=caption.identifier)
        at += 1
        cue_id = caption.identifier
        times = check_times(key[0] / 1000, key[1] / 1000, notes, line=line, cue=cue_id)
        if times is None:
            continue
        found = cue_text_pieces(caption.raw_text)
        if not found:
            notes.add("cue has no text; skipped", line=line, cue=cue_id)
        for voice, piece in found:
            pieces.append((voice, Cue(id=cue_id, start=times[0], end=times[1], text=piece,
                                      line=line)))
    for rest in timings[at:]:
        _dropped(rest, notes)
    return finish(pieces, notes, path, "vtt")


def _timing_lines(lines: list[str]) -> list[tuple[int, str, tuple[int, int] | None]]:
    """Return (line number, line, (start ms, end ms) or None) for every line with '-->'."""
    out = []
    for number, line in enumerate(lines, 1):
        if "-->" not in line:
            continue
        match = _TIMING.match(line)
        key = None
        if match:
            g = [int(x) if x else 0 for x in match.groups()]
            frac = [match.group(4), match.group(8)]
            if max(g[1], g[2], g[5], g[6]) <= 59:
                key = (_ms(g[0], g[1], g[2], frac[0]), _ms(g[4], g[5], g[6], frac[1]))
        out.append((number, line, key))
    return out


def _ms(hours: int, minutes: int, seconds: int, fraction: str) -> int:
    # webvtt-py pads the fraction on the right: ".2" is 200 ms
    return ((hours * 60 + minutes) * 60 + seconds) * 1000 + int(fraction.ljust(3, "0"))


def _dropped(timing: tuple[int, str, tuple[int, int] | None], notes: Notes) -> None:
    number, line, key = timing
    shown = line.strip()[:80]
    if key is None:
        why = (f"cannot read the timing line {shown!r} (a WebVTT timing line looks like "
               "'00:01:02.500 --> 00:01:04.000')")
    else:
        why = (f"the block with timing line {shown!r} is not a cue (the timing line must be "
               "the block's first line, or follow one identifier line)")
    notes.add(f"{why}; cue skipped", line=number)

