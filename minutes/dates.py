"""Due dates as people say them in meetings, resolved against the meeting date.

``resolve_due("send it by Friday", date(2025, 3, 5))`` returns
``(date(2025, 3, 7), "by Friday")``. The phrases are normalised first (ordinal
and number words to digits), then matched by a small table of patterns; the
first match in the text wins, the longest where several start at one place.

Conventions (common practice, chosen here and tested in tests/test_dates.py):

- a weekday ("Friday", "by Friday", "next Friday", "on Friday") is its next
  occurrence strictly after the meeting date: "by Friday" said on a Friday means
  the Friday a week later; "this Friday" said on a Friday is that same day;
- "end of the week" is the Friday of the meeting's week (the next Friday when
  said at the weekend); "end of next week" and "next week" are the Friday of the
  following week: a task due "next week" is due by the end of that working week;
- "end of the month" is the month's last day; "next month" and "end of next
  month" are the last day of the following month;
- "the 15th" is the next 15th on or after the meeting date; a month and day
  ("the fourteenth of March", "March 14") falls in the meeting's year, or the
  next year when that day has already passed;
- "in two weeks" adds 14 days, "in a month" one calendar month (clamped);
- "before the next meeting" is the next meeting's date when it is known.

Without a meeting date nothing relative can be resolved: the phrase is still
returned, with ``None``, so the minutes can quote it.
"""

from __future__ import annotations

import calendar
import datetime as dt
import re
from collections.abc import Callable

WEEKDAYS = ("monday", "tuesday", "wednesday", "thursday", "friday", "saturday", "sunday")
MONTHS = ("january", "february", "march", "april", "may", "june", "july", "august",
          "september", "october", "november", "december")
MONTH_ABBR = {m[:3]: i + 1 for i, m in enumerate(MONTHS)} | {"sept": 9}

_UNITS = ("zero one two three four five six seven eight nine ten eleven twelve thirteen "
          "fourteen fifteen sixteen seventeen eighteen nineteen").split()
_TENS = {"twenty": 20, "thirty": 30}
_ORD = {"first": 1, "second": 2, "third": 3, "fourth": 4, "fifth": 5, "sixth": 6,
        "seventh": 7, "eighth": 8, "ninth": 9, "tenth": 10, "eleventh": 11, "twelfth": 12,
        "thirteenth": 13, "fourteenth": 14, "fifteenth": 15, "sixteenth": 16,
        "seventeenth": 17, "eighteenth": 18, "nineteenth": 19, "twentieth": 20,
        "thirtieth": 30}
_COUNT = {"a": 1, "an": 1, "one": 1, "a couple of": 2, "a couple": 2, "couple of": 2}


def _suffix(n: int) -> str:
    if 10 <= n % 100 <= 20:
        return "th"
    return {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")


def _number_words() -> list[tuple[str, str]]:
    """Return (words, digits) pairs, longest first, for ordinals and small cardinals."""
    pairs: list[tuple[str, str]] = []
    for tens_word, tens in _TENS.items():
        for unit_word, unit in _ORD.items():
            if unit < 10:
                for sep in (" ", "-"):
                    n = tens + unit
                    pairs.append((f"{tens_word}{sep}{unit_word}", f"{n}{_suffix(n)}"))
        for unit in range(1, 10):
            for sep in (" ", "-"):
                pairs.append((f"{tens_word}{sep}{_UNITS[unit]}", str(tens + unit)))
    pairs += [(w, f"{n}{_suffix(n)}") for w, n in _ORD.items()]
    pairs += [(w, str(n)) for w, n in _TENS.items()]
    pairs += [(w, str(n)) for n, w in enumerate(_UNITS) if n >= 2]
    return sorted(pairs, key=lambda p: -len(p[0]))


_NUMBER_RE = re.compile(r"\b(" + "|".join(re.escape(w) for w, _ in _number_words()) + r")\b")
_NUMBER_MAP = dict(_number_words())


def normalise(text: str) -> str:
    """Return ``text`` lower-cased with number and ordinal words written as digits."""
    return _normalise(text)[0]


def _normalise(text: str) -> tuple[str, list[int]]:
    """Return the normalised text and, per character of it, its offset in ``text``."""
    low = "".join(ch.lower() if len(ch.lower()) == 1 else ch for ch in text.replace("’", "'"))
    out: list[str] = []
    where: list[int] = []
    pos = 0
    for m in _NUMBER_RE.finditer(low):
        out.append(low[pos : m.start()])
        where.extend(range(pos, m.start()))
        digits = _NUMBER_MAP[m.group(1)]
        out.append(digits)
        where.extend([m.start()] * (len(digits) - 1) + [m.end() - 1])
        pos = m.end()
    out.append(low[pos:])
    where.extend(range(pos, len(low)))
    return "".join(out), where


def _add_months(day: dt.date, months: int) -> dt.date:
    month0 = day.month - 1 + months
    year, month = day.year + month0 // 12, month0 % 12 + 1
    return dt.date(year, month, min(day.day, calendar.monthrange(year, month)[1]))


def _month_end(day: dt.date, months_ahead: int = 0) -> dt.date:
    first = _add_months(day.replace(day=1), months_ahead)
    return first.replace(day=calendar.monthrange(first.year, first.month)[1])


def _next_weekday(day: dt.date, weekday: int, *, same_day: bool = False) -> dt.date:
    ahead = (weekday - day.weekday()) % 7
    if ahead == 0 and not same_day:
        ahead = 7
    return day + dt.timedelta(days=ahead)


def _week_friday(day: dt.date, weeks_ahead: int) -> dt.date:
    if day.weekday() >= 5 and weeks_ahead == 0:  # said at the weekend: the coming Friday
        return _next_weekday(day, 4)
    monday = day - dt.timedelta(days=day.weekday())
    return monday + dt.timedelta(days=7 * weeks_ahead + 4)


def _day_of_month(day: dt.date, dom: int) -> dt.date | None:
    """Return the next date on or after ``day`` whose day of month is ``dom``."""
    for months in range(0, 13):
        first = _add_months(day.replace(day=1), months)
        if dom <= calendar.monthrange(first.year, first.month)[1]:
            candidate = first.replace(day=dom)
            if candidate >= day:
                return candidate
    return None


def _month_day(day: dt.date, month: int, dom: int) -> dt.date | None:
    for year in (day.year, day.year + 1):
        try:
            candidate = dt.date(year, month, dom)
        except ValueError:
            return None
        if candidate >= day:
            return candidate
    return None


def _weekday_and_dom(day: dt.date, weekday: int, dom: int) -> dt.date | None:
    """Return the next date on or after ``day`` that is both ``weekday`` and the ``dom``th."""
    candidate = _day_of_month(day, dom)
    for _ in range(24):
        if candidate is None:
            return None
        if candidate.weekday() == weekday:
            return candidate
        candidate = _day_of_month(candidate + dt.timedelta(days=1), dom)
    return None


def _month_number(word: str) -> int:
    return MONTH_ABBR[word[:4] if word.startswith("sept") else word[:3]]


_WD = r"(?P<wd>monday|tuesday|wednesday|thursday|friday|saturday|sunday)s?"
_MON = (r"(?P<mon>january|february|march|april|may|june|july|august|september|october|november"
        r"|december|jan|feb|mar|apr|jun|jul|aug|sept|sep|oct|nov|dec)\.?")
_DOM = r"(?P<dom>[12]?\d|3[01])(?:st|nd|rd|th)?"
_LEAD = r"\b(?:(?:by|on|before|until|till|for|due|no later than|at)\s+)?"
_N = r"(?P<n>\d+|a couple of|a couple|couple of|a|an|one)"

Resolver = Callable[[re.Match[str], dt.date | None, dt.date | None], dt.date | None]


def _wd(m: re.Match[str]) -> int:
    return WEEKDAYS.index(m.group("wd"))


def _count(m: re.Match[str]) -> int:
    n = m.group("n")
    return _COUNT[n] if n in _COUNT else int(n)


def _rel(fn: Callable[[re.Match[str], dt.date], dt.date | None]) -> Resolver:
    """Wrap a resolver that needs the meeting date."""
    return lambda m, day, nxt: fn(m, day) if day else None


PATTERNS: list[tuple[re.Pattern[str], Resolver]] = [
    (re.compile(_LEAD + r"(?P<y>\d{4})-(?P<m>\d{2})-(?P<d>\d{2})\b"),
     lambda m, day, nxt: _iso(m)),
    (re.compile(_LEAD + r"(?:the\s+)?(?:next|following)\s+meeting\b"),
     lambda m, day, nxt: nxt),
    (re.compile(_LEAD + r"(?:the\s+)?end\s+of\s+(?:the\s+)?(?P<next>next\s+)?week\b"),
     _rel(lambda m, day: _week_friday(day, 1 if m.group("next") else 0))),
    (re.compile(_LEAD + r"(?:the\s+)?end\s+of\s+(?:the\s+|this\s+)?(?P<next>next\s+)?month\b"),
     _rel(lambda m, day: _month_end(day, 1 if m.group("next") else 0))),
    (re.compile(_LEAD + r"(?:the\s+)?end\s+of\s+(?:the\s+|this\s+)?(?:year)\b"),
     _rel(lambda m, day: dt.date(day.year, 12, 31))),
    (re.compile(_LEAD + r"(?:the\s+)?end\s+of\s+(?:the\s+)?(?:day|today)\b|\btonight\b"
                r"|" + _LEAD + r"today\b"),
     _rel(lambda m, day: day)),
    (re.compile(_LEAD + r"(?:the\s+)?day\s+after\s+tomorrow\b"),
     _rel(lambda m, day: day + dt.timedelta(days=2))),
    (re.compile(_LEAD + r"tomorrow\b"),
     _rel(lambda m, day: day + dt.timedelta(days=1))),
    # "Friday the 14th", "Friday, March 14th": the weekday and the date must agree
    (re.compile(_LEAD + r"(?:this\s+|next\s+)?" + _WD + r",?\s+(?:the\s+)?" + _DOM
                + r"(?:\s+of\s+" + _MON + r")?\b"),
     _rel(lambda m, day: _weekday_month_day(m, day))),
    (re.compile(_LEAD + r"(?:this\s+|next\s+)?" + _WD + r",?\s+" + _MON + r"\s+" + _DOM + r"\b"),
     _rel(lambda m, day: _weekday_month_day(m, day))),
    (re.compile(_LEAD + r"(?:the\s+)?" + _DOM + r"\s+(?:of\s+)?" + _MON + r"(?!\w)"),
     _rel(lambda m, day: _month_day(day, _month_number(m.group("mon")), int(m.group("dom"))))),
    (re.compile(_LEAD + _MON + r"\s+(?:the\s+)?" + _DOM + r"\b"),
     _rel(lambda m, day: _month_day(day, _month_number(m.group("mon")), int(m.group("dom"))))),
    # a bare "the second" is usually "the second option": ask for a lead word or a pause after
    (re.compile(r"\b(?:by|on|before|until|till|due|no later than)\s+the\s+"
                r"(?P<dom>[12]?\d|3[01])(?:st|nd|rd|th)\b"
                r"|\bthe\s+(?P<dom2>[12]?\d|3[01])(?:st|nd|rd|th)\b(?!\s*[a-z0-9])"),
     _rel(lambda m, day: _day_of_month(day, int(m.group("dom") or m.group("dom2"))))),
    (re.compile(r"\bthis\s+(?:coming\s+)?" + _WD + r"\b"),
     _rel(lambda m, day: _next_weekday(day, _wd(m), same_day=True))),
    (re.compile(_LEAD + r"(?:(?:next|coming|this\s+coming|the\s+coming)\s+)?" + _WD + r"\b"),
     _rel(lambda m, day: _next_weekday(day, _wd(m)))),
    (re.compile(_LEAD + r"(?:the\s+)?(?:next|following)\s+week\b"),
     _rel(lambda m, day: _week_friday(day, 1))),
    (re.compile(_LEAD + r"(?:the\s+)?(?:next|following)\s+month\b"),
     _rel(lambda m, day: _month_end(day, 1))),
    (re.compile(r"\b(?:in|within)\s+(?:the\s+next\s+)?" + _N + r"\s+(?P<unit>day|week|month)s?\b"),
     _rel(lambda m, day: _in(m, day))),
    (re.compile(r"\b" + _N + r"\s+(?P<unit>day|week|month)s?\s+from\s+(?:now|today)\b"),
     _rel(lambda m, day: _in(m, day))),
]


def _iso(m: re.Match[str]) -> dt.date | None:
    try:
        return dt.date(int(m.group("y")), int(m.group("m")), int(m.group("d")))
    except ValueError:
        return None


def _weekday_month_day(m: re.Match[str], day: dt.date) -> dt.date | None:
    dom = int(m.group("dom"))
    if m.group("mon"):
        found = _month_day(day, _month_number(m.group("mon")), dom)
        return found  # the month settles it; a wrong weekday is the speaker's slip
    return _weekday_and_dom(day, _wd(m), dom)


def _in(m: re.Match[str], day: dt.date) -> dt.date:
    n, unit = _count(m), m.group("unit")
    if unit == "day":
        return day + dt.timedelta(days=n)
    if unit == "week":
        return day + dt.timedelta(days=7 * n)
    return _add_months(day, n)


_MAY_OK = re.compile(r"\d(?:st|nd|rd|th)\b|\bof\b|\bthe\b")


def find_due(text: str) -> list[tuple[int, int, re.Match[str], Resolver]]:
    """Return every due-date phrase match in normalised ``text`` as (start, end, match, fn)."""
    norm = normalise(text)
    found: list[tuple[int, int, re.Match[str], Resolver]] = []
    for pattern, fn in PATTERNS:
        for m in pattern.finditer(norm):
            if m.groupdict().get("mon") == "may" and not _MAY_OK.search(m.group(0)):
                continue  # "we may 2 ..." is not a date
            found.append((m.start(), m.end(), m, fn))
    found.sort(key=lambda f: (f[0], -(f[1] - f[0])))
    return found


def resolve_due(
    phrase_or_text: str, meeting_date: dt.date | None, next_meeting: dt.date | None = None
) -> tuple[dt.date | None, str]:
    """Return the due date a phrase (or a sentence holding one) names, and the phrase matched."""
    _, where = _normalise(phrase_or_text)
    for start, end, m, fn in find_due(phrase_or_text):
        phrase = phrase_or_text[where[start] : where[end - 1] + 1].strip(" ,.;:!?")
        return fn(m, meeting_date, next_meeting), " ".join(phrase.split())
    return None, ""
