"""SubRip (SRT) captions: numbered blocks, 'hh:mm:ss,mmm --> hh:mm:ss,mmm', text lines.

SRT has no voice markup. Speakers appear as a 'Name:' prefix on a line (often only when
the speaker changes), or as a leading '- ' for a change to an unnamed speaker; so an
unlabelled line keeps the speaker of the line before it, and a dash line has none.
"""

from __future__ import annotations

import re

from ..model import Cue, Transcript
from .common import Notes, check_times, finish, split_label, split_lines
from .cuetext import clean_text, cue_text_pieces

_TIME = r"(\d{1,9}):(\d{1,2}):(\d{1,2})(?:[,.](\d{1,3}))?"
_TIMING = re.compile(rf"\s*{_TIME}\s*-->\s*{_TIME}")
_INDEX = re.compile(r"\s*\d{1,12}\s*\Z")
_ASS_TAG = re.compile(r"\{\\[^}]*\}")  # {\an8} position codes some SRT files carry


def looks_like_srt(text: str) -> bool:
    """Return whether the text starts like an SRT file (an index line, then a timing line)."""
    lines = [line for line in split_lines(text[:2000]) if line.strip()][:2]
    return len(lines) == 2 and bool(_INDEX.match(lines[0]) and _TIMING.match(lines[1]))


def read_srt(text: str, path: str) -> Transcript:
    """Return the transcript of an SRT file's text."""
    notes = Notes()
    blocks: list[tuple[str | None, int, tuple[float, float], list[str]]] = []
    current: list[str] | None = None  # text lines of the cue being read
    index_line: str | None = None
    skipping = stray = False
    for number, line in enumerate(split_lines(text), 1):
        if not line.strip():
            current, index_line, skipping, stray = None, None, False, False
            continue
        match = _TIMING.match(line)
        if match:
            cue_id = index_line
            if cue_id is None and current and _INDEX.match(current[-1]):
                cue_id = current.pop().strip()  # the next index, with no blank line before it
            times = _times(match, notes, number, cue_id)
            current, index_line, skipping = None, None, times is None
            if times is not None:
                current = []
                blocks.append((cue_id, number, times, current))
            continue
        if "-->" in line:
            notes.add(f"cannot read the timing line {line.strip()[:80]!r} (an SRT timing line "
                      "looks like '00:01:02,500 --> 00:01:04,000'); cue skipped", line=number)
            current, skipping = None, True
            continue
        if skipping:
            continue
        if current is not None:
            current.append(line)
        elif index_line is None and _INDEX.match(line):
            index_line = line.strip()
        elif not stray:
            notes.add("text outside any cue skipped", line=number)
            stray = True
    pieces: list[tuple[str, Cue]] = []
    speaker = ""
    for cue_id, number, times, lines in blocks:
        found = 0
        for piece_speaker, piece in _pieces(lines, speaker):
            speaker = piece_speaker
            pieces.append((speaker, Cue(id=cue_id, start=times[0], end=times[1], text=piece,
                                        line=number)))
            found += 1
        if not found:
            notes.add("cue has no text; skipped", line=number, cue=cue_id)
    return finish(pieces, notes, path, "srt")


def _times(match: re.Match[str], notes: Notes, line: int,
           cue: str | None) -> tuple[float, float] | None:
    g = match.groups()
    if max(int(g[1]), int(g[2]), int(g[5]), int(g[6])) > 59:
        notes.add(f"minutes or seconds over 59 in {match.group(0).strip()!r}; cue skipped",
                  line=line, cue=cue)
        return None
    start, end = (int(h) * 3600 + int(m) * 60 + int(s) + int((f or "0").ljust(3, "0")) / 1000
                  for h, m, s, f in (g[:4], g[4:]))
    return check_times(start, end, notes, line=line, cue=cue)


def _pieces(lines: list[str], speaker: str) -> list[tuple[str, str]]:
    """Return (speaker, text) runs of a cue's lines, starting with the current speaker."""
    runs: list[tuple[str, list[str]]] = []
    for raw in lines:
        parts = cue_text_pieces(_ASS_TAG.sub("", raw))  # strips <i>, <font>; reads <v>
        if not parts:
            continue
        voiced = next((v for v, _ in parts if v), None)
        text = clean_text(" ".join(t for _, t in parts))
        label, rest = split_label(text)
        if voiced is not None:
            speaker = voiced
        elif label is not None:
            speaker, text = label, rest
        elif text.startswith(("- ", "-\u00a0")):
            speaker, text = "", text[2:]
        if runs and runs[-1][0] == speaker and label is None and voiced is None:
            runs[-1][1].append(text)
        else:
            runs.append((speaker, [text]))
    return [(who, clean_text(" ".join(texts))) for who, texts in runs]
