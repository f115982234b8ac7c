"""Due dates spoken in meetings, resolved against the meeting date.

Cross-checked against ``dateparser`` (RELATIVE_BASE = the meeting date,
PREFER_DATES_FROM = future) where it reads the phrase the same way; where it
is wrong or reads nothing (listed in ../shared/STACK.md: "by Friday the 7th",
"the fourteenth of March", "end of next week"), or where we chose another
convention (marked "common practice" in minutes/dates.py), the expected date is
computed by hand here and the disagreement is stated.
"""

from __future__ import annotations

import datetime as dt

import pytest

from minutes.dates import normalise, resolve_due

WED = dt.date(2025, 3, 5)  # a Wednesday
FRI = dt.date(2025, 3, 7)  # a Friday
NEXT_MEETING = dt.date(2025, 3, 12)

# phrase, meeting date, expected; dateparser agrees on every one of these
AGREES = [
    ("by Friday", WED, dt.date(2025, 3, 7)),
    ("Friday", WED, dt.date(2025, 3, 7)),
    ("next Wednesday", FRI, dt.date(2025, 3, 12)),
    ("next Friday", WED, dt.date(2025, 3, 7)),
    ("tomorrow", WED, dt.date(2025, 3, 6)),
    ("in two weeks", WED, dt.date(2025, 3, 19)),
    ("in 3 days", FRI, dt.date(2025, 3, 10)),
    ("March 14th", WED, dt.date(2025, 3, 14)),
    ("15 March", WED, dt.date(2025, 3, 15)),
    ("the 15th", WED, dt.date(2025, 3, 15)),
    ("this Friday", FRI, dt.date(2025, 3, 7)),
    ("Friday the 14th", WED, dt.date(2025, 3, 14)),
    ("by Friday", FRI, dt.date(2025, 3, 14)),  # said on a Friday: next week's (common practice)
]

# phrase, meeting date, expected (hand-computed), why dateparser differs
HAND = [
    ("the fourteenth of March", WED, dt.date(2025, 3, 14), "dateparser reads nothing"),
    ("end of next week", WED, dt.date(2025, 3, 14), "dateparser reads nothing"),
    ("end of the week", WED, dt.date(2025, 3, 7), "dateparser reads nothing"),
    ("end of the month", WED, dt.date(2025, 3, 31), "dateparser reads nothing"),
    ("by Friday the 7th", WED, dt.date(2025, 3, 7), "dateparser: wrong date (STACK.md)"),
    ("by the twenty-first", WED, dt.date(2025, 3, 21), "ordinal words: dateparser misses them"),
    ("next week", WED, dt.date(2025, 3, 14), "common practice: by the end of next week; "
                                             "dateparser: today + 7"),
    ("next month", WED, dt.date(2025, 4, 30), "common practice: end of next month; "
                                              "dateparser: same day next month"),
    ("the 3rd", WED, dt.date(2025, 4, 3), "the next 3rd on or after the meeting"),
]


def _dateparser(phrase: str, base: dt.date) -> dt.date | None:
    import dateparser

    settings = {"RELATIVE_BASE": dt.datetime.combine(base, dt.time()),
                "PREFER_DATES_FROM": "future"}
    found = dateparser.parse(phrase, settings=settings)  # type: ignore[arg-type]
    return found.date() if found else None


@pytest.mark.parametrize(("phrase", "meeting", "expected"), AGREES)
def test_matches_dateparser(phrase: str, meeting: dt.date, expected: dt.date) -> None:
    assert _dateparser(phrase, meeting) == expected  # the outside check itself
    assert resolve_due(phrase, meeting) == (expected, phrase)


@pytest.mark.parametrize(("phrase", "meeting", "expected", "why"), HAND)
def test_hand_computed_where_dateparser_differs(phrase: str, meeting: dt.date,
                                                expected: dt.date, why: str) -> None:
    assert _dateparser(phrase, meeting) != expected, f"dateparser now agrees: {why}"
    assert resolve_due(phrase, meeting)[0] == expected


def test_finds_the_phrase_inside_a_sentence() -> None:
    said = "So um I'll send the lease back to them by the end of next week, okay?"
    date, phrase = resolve_due(said, WED)
    assert (date, phrase) == (dt.date(2025, 3, 14), "by the end of next week")


def test_before_the_next_meeting_needs_the_next_meeting() -> None:
    assert resolve_due("before the next meeting", WED, NEXT_MEETING) == (
        NEXT_MEETING, "before the next meeting")
    assert resolve_due("before the next meeting", WED) == (None, "before the next meeting")


def test_without_a_meeting_date_the_phrase_is_kept() -> None:
    assert resolve_due("by Friday", None) == (None, "by Friday")
    assert resolve_due("by 2025-04-01", None) == (dt.date(2025, 4, 1), "by 2025-04-01")


@pytest.mark.parametrize("text", ["the second option is better", "two may work", "we may need it",
                                  "that was a first for us", "send it"])
def test_no_date_in_ordinary_words(text: str) -> None:
    assert resolve_due(text, WED) == (None, "")


def test_month_day_already_past_falls_next_year() -> None:
    assert resolve_due("the second of March", WED)[0] == dt.date(2026, 3, 2)


def test_normalise_writes_numbers_as_digits() -> None:
    assert normalise("The Twenty-First of May in two weeks") == "the 21st of may in 2 weeks"
