"""Timestamped plain-text transcripts, in the shapes people and tools usually write.

One turn per line::

    [00:01:02] Ada Voss: text          [01:02] Ada Voss: text   (mm:ss)
    Ada Voss (00:01:02): text          00:01:02 Ada Voss: text
    Ada Voss: text                     (no time: estimated from word counts)

or a speaker line, then the turn's text lines (until a blank line or the next speaker)::

    Ada Voss  00:01:02                 Ada Voss:                Ada Voss
    text ...                           text ...                 text ...

A turn ends where the next one starts; the last ends after an estimate from its word
count. A bare name line counts as a speaker line only when the file is written that way
throughout (at least two paragraphs, half of those with more than one line, open so).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from ..model import Cue, Transcript
from .common import NAME, Notes, finish, is_label, split_label, split_lines, words_duration

_T = r"(?:\d{1,9}:)?\d{1,4}:\d{1,2}(?:[.,]\d{1,3})?"
_HMS = r"\d{1,9}:\d{1,2}:\d{1,2}(?:[.,]\d{1,3})?"
_SEP = r"(?:[-–—|]\s*)?"
# (kind, pattern): "turn" opens a turn (text optional), "time" gives the next turn's time
_SHAPES = (
    ("turn", re.compile(rf"\[(?P<t>{_T})\]\s*{_SEP}(?P<x>.*)\Z")),  # name, if any, in x
    ("turn", re.compile(rf"(?P<n>{NAME})\s*[(\[](?P<t>{_T})[)\]]\s*:?\s*(?P<x>.*)\Z")),
    ("turn", re.compile(rf"(?P<t>{_T})\s+{_SEP}(?P<n>{NAME})\s*:\s*(?P<x>.*)\Z")),
    ("turn", re.compile(rf"(?P<n>{NAME})\s*[-–—|,]?\s+(?P<t>{_T})\s*(?P<x>)\Z")),
    ("time", re.compile(rf"\[?(?P<t>{_T})\]?\Z")),
    ("turn", re.compile(rf"(?P<t>{_HMS})\s+{_SEP}(?P<x>.*)\Z")),  # 00:01:02 text (no name)
    ("turn", re.compile(rf"(?P<n>{NAME})\s*:(?:\s+(?P<x>.*))?\Z")),
)
# a line that opens with something meant as a timestamp that we cannot read
_BROKEN = re.compile(r"\[[^\]]{0,24}\d:[^\]]{0,24}\]|\([^)]{0,24}\d:[^)]{0,24}\)|\d+:\d+:\S")


@dataclass
class _Turn:
    line: int
    label: str
    time: float | None
    text: list[str] = field(default_factory=list)


def read_txt(text: str, path: str) -> Transcript:
    """Return the transcript of a plain-text transcript."""
    notes = Notes()
    lines = [line.strip() for line in split_lines(text)]
    headers = _bare_headers(lines)
    turns: list[_Turn] = []
    current: _Turn | None = None
    pending: float | None = None  # a time given on a line of its own
    label = ""  # the last speaker named: text with no speaker line is theirs
    skipping = False  # after an unreadable line, until a blank line or a readable turn
    for number, line in enumerate(lines, 1):
        if not line:
            current, skipping = None, False
            continue
        if number in headers:
            label = line.rstrip(":").strip()
            current = _Turn(number, label, pending)
            turns.append(current)
            pending, skipping = None, False
            continue
        kind, match = _shape(line)
        if match is None:
            if _BROKEN.match(line):
                notes.add(f"cannot read the timestamp at the start of {line[:60]!r}; "
                          "line skipped", line=number)
                current, skipping = None, True
            elif not skipping:
                if current is None:
                    current = _Turn(number, label, pending)
                    turns.append(current)
                    pending = None
                current.text.append(line)
            continue
        time = _seconds(match.group("t")) if match.groupdict().get("t") else None
        if match.groupdict().get("t") and time is None:
            notes.add(f"cannot read the timestamp {match.group('t')!r} (minutes and seconds "
                      "go up to 59); line skipped", line=number)
            current, skipping = None, True
            continue
        skipping = False
        if kind == "time":
            if current is not None and current.time is None and not current.text:
                current.time = time
            else:
                pending = time
            continue
        name = match.groupdict().get("n")
        words = (match.group("x") or "").strip()
        if name is None and time is not None:
            name, words = split_label(words)
        # "[00:01:02] text" names nobody; "Name:" lines name the speaker
        label = name.strip() if name else ("" if time is not None else label)
        current = _Turn(number, label, time if time is not None else pending)
        pending = None
        if words:
            current.text.append(words)
        turns.append(current)
    return finish(_cues(turns, notes), notes, path, "txt")


def _shape(line: str) -> tuple[str, re.Match[str] | None]:
    for kind, pattern in _SHAPES:
        match = pattern.match(line)
        if match and (not match.groupdict().get("n") or is_label(match.group("n"))):
            return kind, match
    return "", None


def _seconds(value: str) -> float | None:
    """Return hh:mm:ss or mm:ss (fraction optional) in seconds, None when out of range."""
    whole, _, fraction = value.replace(",", ".").partition(".")
    parts = [int(p) for p in whole.split(":")]
    if parts[-1] > 59 or (len(parts) == 3 and parts[1] > 59):
        return None
    seconds = 0
    for part in parts:
        seconds = seconds * 60 + part
    return seconds + (int(fraction.ljust(3, "0")) / 1000 if fraction else 0.0)


def _bare_headers(lines: list[str]) -> set[int]:
    """Return line numbers of bare 'Name' lines that open paragraphs, when the file uses them."""
    paragraphs: list[list[int]] = [[]]
    for number, line in enumerate(lines, 1):
        if line:
            paragraphs[-1].append(number)
        elif paragraphs[-1]:
            paragraphs.append([])
    long = [p for p in paragraphs if len(p) > 1]
    opened = [p[0] for p in long if _is_bare_name(lines[p[0] - 1])]
    if len(opened) >= 2 and 2 * len(opened) >= len(long):
        return set(opened)
    return set()


def _is_bare_name(line: str) -> bool:
    name = line.rstrip(":").strip()
    return (len(name) <= 40 and re.fullmatch(NAME, name) is not None and is_label(name)
            and all(w[:1].isupper() or w[:1].isdigit() for w in name.split())
            and _shape(line)[1] is None)


def _cues(turns: list[_Turn], notes: Notes) -> list[tuple[str, Cue]]:
    """Return (label, cue) pairs, with missing times estimated and ends filled in."""
    kept = []
    for turn in turns:
        if turn.text:
            kept.append(turn)
        else:
            notes.add("speaker line with no text after it; skipped", line=turn.line)
    untimed = sum(1 for t in kept if t.time is None)
    if untimed:
        notes.add(f"{untimed} of {len(kept)} turns have no timestamp; their times are "
                  "estimated from word counts (about 150 words a minute)")
    texts = [" ".join(t.text) for t in kept]
    starts: list[float] = []
    for i, turn in enumerate(kept):
        if turn.time is not None:
            starts.append(turn.time)
        else:
            starts.append(starts[-1] + words_duration(texts[i - 1]) if i else 0.0)
    order = sorted(range(len(kept)), key=starts.__getitem__)
    if order != list(range(len(kept))):
        notes.add("turns are not in time order; sorted by start time")
    out: list[tuple[str, Cue]] = []
    for pos, i in enumerate(order):
        start = starts[i]
        # the next later start ends this turn; look a bounded way ahead to stay linear
        later = next((starts[j] for j in order[pos + 1:pos + 50] if starts[j] > start), None)
        end = later if later is not None else start + words_duration(texts[i])
        out.append((kept[i].label, Cue(id=None, start=start, end=end, text=texts[i],
                                       line=kept[i].line)))
    return out
