"""Formatting shared by every renderer: clock times, escaping, and the words for votes.

Caption text is untrusted: a speaker can say (or a caption file can contain) anything,
including Markdown, HTML, spreadsheet formulas and control characters. Everything that
comes from the meeting passes through one of the ``*_safe`` / ``md_*`` helpers here
before it reaches an output.
"""

from __future__ import annotations

import datetime as dt
import re

from ..model import Evidence, Motion, Vote

DASH = "—"  # an empty cell or a missing value, in every format

# XML 1.0 allows TAB, LF, CR and U+0020 upward, minus surrogates and U+FFFE/U+FFFF;
# python-docx raises on anything else (NUL from a broken caption file, for instance).
_XML_FORBIDDEN = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ud800-\udfff\ufffe\uffff]")
# Line and paragraph separators and C1 controls also break a Markdown line or a cell.
_SPACES = re.compile("[\\s\x7f-\x9f\u2028\u2029]+")

WEEKDAYS = ("Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday")


def clock(seconds: float) -> str:
    """Return a recording offset as ``hh:mm:ss`` (hours may exceed 24; negatives read 0)."""
    # Round down: a timestamp should point at, or just before, the moment it names.
    total = max(0, int(seconds))
    hours, rest = divmod(total, 3600)
    return f"{hours:02d}:{rest // 60:02d}:{rest % 60:02d}"


def span(start: float, end: float) -> str:
    """Return a time range as ``hh:mm:ss–hh:mm:ss``."""
    return f"{clock(start)}–{clock(end)}"


def wall(time: dt.time) -> str:
    """Return a clock time of day as ``HH:MM`` (24-hour; minutes are what minutes record)."""
    return f"{time.hour:02d}:{time.minute:02d}"


def day(date: dt.date) -> str:
    """Return a date as ISO 8601 with its weekday, e.g. ``2024-03-12 (Tuesday)``."""
    # A fixed table, not strftime("%A"), so the output never depends on the locale.
    return f"{date.isoformat()} ({WEEKDAYS[date.weekday()]})"


def clean(text: str) -> str:
    """Return ``text`` on one line: control characters dropped, whitespace runs collapsed."""
    return _SPACES.sub(" ", _XML_FORBIDDEN.sub("", text)).strip()


def xml_safe(text: str) -> str:
    """Return ``text`` without the characters XML 1.0 forbids (line breaks kept)."""
    return _XML_FORBIDDEN.sub("", text)


# --------------------------------------------------------------------------- Markdown

# Backslash-escapes for CommonMark/GFM punctuation that can start markup anywhere in a
# line: code spans, emphasis, links/images, tables, strikethrough. ``_`` inside a word
# cannot open emphasis, so it stays bare there ("snake_case" reads as written).
_MD_ANYWHERE = re.compile(r"([\\`*\[\]|~]|(?<![0-9A-Za-z])_|_(?![0-9A-Za-z]))")
# Block markers that matter only at the start of a line (headings, quotes, lists,
# thematic breaks, setext underlines, ordered-list numbers).
_MD_LINE_START = re.compile(r"^([#>+=-]|\d+(?=[.)]))")


def md_text(text: str) -> str:
    """Return untrusted ``text`` as Markdown that renders exactly as the words given."""
    text = clean(text)
    text = text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
    text = _MD_ANYWHERE.sub(r"\\\1", text)
    # The escaped '>' is now '&gt;', so only the other markers need the line-start guard;
    # they are escaped wherever the text lands (after "- " a '#' would make a heading).
    return _MD_LINE_START.sub(lambda m: m.group(1) + "\\" if m.group(1).isdigit()
                              else "\\" + m.group(1), text)


# --------------------------------------------------------------------------- CSV

# OWASP "CSV Injection" (https://owasp.org/www-community/attacks/CSV_Injection) and
# OWASP ASVS 4.0 requirement 1.2.10: a cell that starts with = + - @ TAB or CR is read
# as a formula by spreadsheets; prefix it with a single quote so it stays text.
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def csv_safe(text: str) -> str:
    """Return ``text`` as one spreadsheet cell that no spreadsheet reads as a formula."""
    text = clean(text)
    return "'" + text if text.startswith(_FORMULA_START) else text


# --------------------------------------------------------------------------- shared words


def cue_of(evidence: tuple[Evidence, ...]) -> str:
    """Return the cue id of the first evidence, or a dash when there is none."""
    if evidence and evidence[0].cue:
        return evidence[0].cue
    return DASH


def or_dash(text: str | None) -> str:
    """Return ``text`` or a dash when it is empty or None."""
    return text if text else DASH


NOT_RECORDED = "vote not recorded — clerk to complete"

OUTCOME_WORDS = {
    "carried": "carried",
    "failed": "failed",
    "withdrawn": "withdrawn by the mover",
    "tabled": "laid on the table",
    "postponed": "postponed",
    "referred": "referred",
    "pending": "pending (no result in the recording)",
}


def outcome_text(motion: Motion, short: bool = False) -> str:
    """Return a motion's outcome in words, with where it was referred or postponed to."""
    words = motion.outcome if short else OUTCOME_WORDS.get(motion.outcome, motion.outcome)
    if motion.outcome not in ("referred", "postponed", "tabled"):
        return words
    # The history keeps the detail ("to the Finance Committee", "to the May meeting").
    for change in reversed(motion.history):
        if change.kind in (motion.outcome, "outcome") and change.value \
                and change.value != motion.outcome:
            return f"{words} {DASH} {clean(change.value)}"
    return words


def voted(motion: Motion) -> bool:
    """Return whether a vote belongs in the record (one was taken or one decided it)."""
    return motion.vote.method != "none" or motion.outcome in ("carried", "failed")


def tally_text(vote: Vote) -> str:
    """Return a vote as ``for–against–abstain`` (e.g. ``3–1–0``); unheard counts are "?"."""
    numbers = (vote.for_, vote.against, vote.abstain)
    if all(n is None for n in numbers):
        return "not recorded"
    text = "–".join("?" if n is None else str(n) for n in numbers)
    return text + " (? not recorded)" if None in numbers else text


def counts(vote: Vote) -> tuple[str, str, str]:
    """Return for/against/abstain as text; a count that was not heard is never a number."""
    return tuple(  # type: ignore[return-value]
        "not recorded" if n is None else str(n) for n in (vote.for_, vote.against, vote.abstain)
    )


def vote_text(vote: Vote) -> str:
    """Return a vote in words: the counts, or the note that the clerk must fill them in."""
    if vote.for_ is None and vote.against is None and vote.abstain is None:
        how = {"voice": "voice vote; ", "consent": "general consent; ",
               "roll_call": "roll call; "}.get(vote.method, "")
        return how + NOT_RECORDED
    yes, no, abstain = counts(vote)
    text = f"{yes} for, {no} against, {abstain} abstaining"
    if None in (vote.for_, vote.against, vote.abstain):
        text += " — clerk to complete"
    return text


ROLL_WORDS = (("aye", "Aye"), ("no", "No"), ("abstain", "Abstain"), ("absent", "Absent"))


def roll_call_text(vote: Vote) -> str:
    """Return roll-call names grouped by how each voted, e.g. ``Aye: A, B; No: C``."""
    groups = []
    known = {key for key, _ in ROLL_WORDS}
    for key, label in ROLL_WORDS:
        names = [clean(name) for name, how in vote.roll_call if how == key]
        if names:
            groups.append(f"{label}: {', '.join(names)}")
    other = [f"{clean(name)} ({clean(how)})" for name, how in vote.roll_call if how not in known]
    if other:
        groups.append(f"Other: {', '.join(other)}")
    return "; ".join(groups)


def end_clock(start: dt.time, seconds: float) -> dt.time:
    """Return the clock time ``seconds`` after ``start`` (wrapping past midnight)."""
    moment = dt.datetime.combine(dt.date(2000, 1, 1), start) + dt.timedelta(seconds=seconds)
    return moment.time().replace(microsecond=0)
