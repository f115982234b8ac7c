"""What every reader shares: decoding bytes, collecting warnings, clock times, finishing."""

from __future__ import annotations

import codecs
import math
import re
from collections.abc import Sequence

from ..errors import InputError
from ..model import Cue, Transcript
from .merge import merge_cues

# UTF-32 BOMs first: the UTF-32 LE BOM starts with the UTF-16 LE one.
_BOMS = (
    (codecs.BOM_UTF32_LE, "utf-32-le"),
    (codecs.BOM_UTF32_BE, "utf-32-be"),
    (codecs.BOM_UTF8, "utf-8"),
    (codecs.BOM_UTF16_LE, "utf-16-le"),
    (codecs.BOM_UTF16_BE, "utf-16-be"),
)

# Spoken English runs at about 150 words a minute (common practice, value from memory);
# used where a plain-text transcript gives no end time.
WORDS_PER_SECOND = 2.5

_ENCODING_HINT = ("if the file is in another encoding, name it with --encoding "
                  "(for example --encoding cp1252 or --encoding utf-16-le)")


def decode(data: bytes, path: str, encoding: str | None = None) -> str:
    """Return the text of caption bytes: UTF-8 (BOM or not), UTF-16/32 by BOM, or ``encoding``."""
    if encoding:
        try:
            text = data.decode(encoding)
        except LookupError:
            raise InputError(f"unknown encoding {encoding!r}; give a Python codec name such "
                             "as utf-8, utf-16, cp1252 or latin-1", path=path) from None
        except UnicodeDecodeError as err:
            raise InputError(f"cannot be decoded as {encoding} (byte {data[err.start]:#04x}); "
                             "check the --encoding value",
                             path=path, line=data.count(b"\n", 0, err.start) + 1) from None
        text = text.removeprefix("\ufeff")
    else:
        codec, skip = "utf-8", 0
        for bom, name in _BOMS:
            if data.startswith(bom):
                codec, skip = name, len(bom)
                break
        if not skip:
            _refuse_wide(data, path)
        try:
            text = data[skip:].decode(codec)
        except UnicodeDecodeError as err:
            at = skip + err.start
            raise InputError(
                f"is not valid {codec.upper()} text (byte {data[at]:#04x}); it may be a binary "
                f"file, or text in another encoding: {_ENCODING_HINT}",
                path=path, line=data.count(b"\n", 0, at) + 1) from None
    _refuse_binary(text, path)
    return text


def _refuse_wide(data: bytes, path: str) -> None:
    """Raise when the bytes look like UTF-16 written without a byte order mark."""
    head = data[:4096]
    even, odd = head[0::2].count(0), head[1::2].count(0)
    # ASCII text in UTF-16 has a NUL in every other byte, all on one side
    for nuls, other, name in ((odd, even, "utf-16-le"), (even, odd, "utf-16-be")):
        if nuls * 4 > len(head) and other == 0:
            raise InputError(f"has a NUL in every other byte: it looks like {name.upper()} "
                             f"text without a byte order mark; read it with --encoding {name}",
                             path=path, line=1)


def _refuse_binary(text: str, path: str) -> None:
    """Raise when NUL characters say this is a binary file (or UTF-16/32 without a BOM)."""
    nuls = text.count("\0")
    if not nuls:
        return
    # A stray NUL in a text file is replaced later (as the WebVTT parser does); NULs near
    # the start or in bulk mean media, a document, or UTF-16/32 text without a BOM.
    if nuls * 100 > len(text) or "\0" in text[:1024]:
        first = text.index("\0")
        raise InputError(
            "contains NUL bytes: this is a binary file (audio, video, a document), not a "
            f"caption or transcript file; {_ENCODING_HINT}",
            path=path, line=text.count("\n", 0, first) + 1)


def replace_nul(text: str) -> tuple[str, str | None]:
    """Return text with NUL replaced by U+FFFD (as WebVTT's parser does), and a warning."""
    if "\0" not in text:
        return text, None
    lines = sorted({text.count("\n", 0, m.start()) + 1 for m in re.finditer("\0", text)})
    shown = ", ".join(map(str, lines[:10])) + (" ..." if len(lines) > 10 else "")
    return text.replace("\0", "\ufffd"), f"line {shown}: NUL character replaced by U+FFFD"


def split_lines(text: str) -> list[str]:
    """Return the lines of text, split on CRLF, CR or LF only (as WebVTT and SRT do)."""
    return re.split(r"\r\n|\r|\n", text)


class Notes:
    """Warnings gathered while reading, each naming its line and cue; bounded in number."""

    LIMIT = 500  # a file broken throughout should not yield a warning per cue

    def __init__(self) -> None:
        self.items: list[str] = []
        self.dropped = 0

    def add(self, message: str, *, line: int | None = None, cue: str | None = None) -> None:
        """Record one warning."""
        if len(self.items) >= self.LIMIT:
            self.dropped += 1
            return
        self.items.append(where(line, cue) + message)

    def result(self) -> tuple[str, ...]:
        """Return the warnings, with a last line counting those left out."""
        more = (f"{self.dropped} more warnings not shown",) if self.dropped else ()
        return (*self.items, *more)


def where(line: int | None, cue: str | None) -> str:
    """Return the 'line N, cue 'x': ' prefix of a warning."""
    parts = []
    if line is not None:
        parts.append(f"line {line}")
    if cue:
        parts.append(f"cue {cue!r}")
    return ", ".join(parts) + ": " if parts else ""


def clock(seconds: float) -> str:
    """Return seconds as hh:mm:ss.mmm."""
    ms = round(seconds * 1000)
    hours, ms = divmod(ms, 3_600_000)
    minutes, ms = divmod(ms, 60_000)
    return f"{hours:02d}:{minutes:02d}:{ms // 1000:02d}.{ms % 1000:03d}"


def check_times(start: float, end: float, notes: Notes, *, line: int | None,
                cue: str | None) -> tuple[float, float] | None:
    """Return (start, end) fixed where possible, or None (with a warning) when unusable."""
    if not (math.isfinite(start) and math.isfinite(end)) or start < 0:
        notes.add(f"time {start!r} --> {end!r} is not a time from the start of the "
                  "recording; cue skipped", line=line, cue=cue)
        return None
    if end < start:
        # A reversed range is a typing slip; keep the start, which orders the cue, and
        # make the cue instantaneous rather than guess its length.
        notes.add(f"end {clock(end)} is before start {clock(start)}; end set to the start",
                  line=line, cue=cue)
        end = start
    return start, end


def finish(pieces: Sequence[tuple[str, Cue]], notes: Notes, path: str, fmt: str) -> Transcript:
    """Return the transcript of the pieces read, or raise when nothing readable remains."""
    if not pieces:
        if notes.items:
            raise InputError(f"no readable cue in this file; first problem: {notes.items[0]}",
                             path=path)
        raise InputError("holds no cues (no timed caption text was found)", path=path)
    return Transcript(utterances=merge_cues(pieces), source=path, format=fmt,
                      warnings=notes.result())


# A speaker label as transcripts write it: one to five words, starting with a letter
# ("Ada Voss", "Dr. Lee", "SPEAKER_01", "Speaker 2"), no colon or bracket inside.
NAME = r"[^\W\d_][\w.'’\-]*(?:[ \t]+[\w.'’\-]+){0,4}"
_LABEL = re.compile(rf"\s*(?:>>\s*)?({NAME})\s*:\s+(\S.*)\Z", re.DOTALL)


def split_label(text: str) -> tuple[str | None, str]:
    """Return (speaker label or None, rest) of a 'Name: text' line."""
    match = _LABEL.match(text)
    if not match or not is_label(match.group(1)):
        return None, text
    return match.group(1).strip(), match.group(2)


def is_label(name: str) -> bool:
    """Return whether a 'Name' before a colon or a time reads as a speaker label."""
    # First and last word capitalised ("Ada Voss", "Ada van Berg", "SPEAKER 1"), so that
    # ordinary text such as "so the plan is: ..." or "we meet at 10:30" is not a speaker.
    words = name.split()
    return (0 < len(name) <= 50 and bool(words)
            and all(w[:1].isupper() or w[:1].isdigit() for w in (words[0], words[-1])))


def words_duration(text: str) -> float:
    """Return an estimate of how long text takes to say, in seconds (at least 1 s)."""
    return max(1.0, len(text.split()) / WORDS_PER_SECOND)
