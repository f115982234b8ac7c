"""The stderr progress line: minutes done of total, speed against real time, time left."""

from __future__ import annotations

import io

from minutes.asr.progress import ProgressLine, clock, describe


class FakeClock:
    def __init__(self) -> None:
        self.t = 100.0

    def __call__(self) -> float:
        return self.t


def test_clock_formats() -> None:
    assert [clock(s) for s in (0, 59.6, 61, 3599, 3600, 10_000)] == [
        "0:00", "1:00", "1:01", "59:59", "1:00:00", "2:46:40"]


def test_describe_gives_speed_and_time_left() -> None:
    # 10 minutes of a 60-minute file in 100 s: 6x real time, 50 min of audio / 6 left.
    assert describe(600, 3600, 100) == ("transcribing 10:00 / 1:00:00 ( 16%)  6.0x real time  "
                                        "8:20 left")


def test_describe_without_a_known_total() -> None:
    assert describe(90, 0.0, 30) == "transcribing 1:30  3.0x real time"


def test_line_redraws_in_place_and_ends_with_a_newline() -> None:
    out, now = io.StringIO(), FakeClock()
    bar = ProgressLine(stream=out, interval=0.5, now=now)
    now.t += 10
    bar(60, 120)
    now.t += 0.1
    bar(61, 120)  # too soon: skipped
    now.t += 10
    bar(120, 120)
    bar.close()
    text = out.getvalue()
    assert text.count("\r") == 2 and text.endswith("\n")
    assert "1:00 / 2:00 ( 50%)  6.0x real time  0:10 left" in text
    assert "2:00 / 2:00 (100%)" in text


def test_a_shorter_line_blanks_the_rest_of_the_longer_one() -> None:
    out, now = io.StringIO(), FakeClock()
    bar = ProgressLine(stream=out, interval=0.0, now=now)
    now.t += 1
    bar(30, 3600)
    now.t += 1000
    bar(3600, 3600)
    first, second = out.getvalue().split("\r")[1:]
    assert len(second) >= len(first)


def test_quiet_writes_nothing_but_keeps_count() -> None:
    out = io.StringIO()
    with ProgressLine(quiet=True, stream=out) as bar:
        bar(5, 10)
    assert out.getvalue() == ""
    assert (bar.done, bar.total) == (5, 10)
