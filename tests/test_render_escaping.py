"""Untrusted caption text must not change the structure of any output.

Markdown is checked by parsing it (markdown-it-py, CommonMark with GFM tables): the
minutes rendered with hostile text must have exactly the token structure of the minutes
rendered with plain words, and the hostile text must come back out as text.
"""

from __future__ import annotations

import csv
import html
import io
import re
import sys
from pathlib import Path
from typing import Any

import docx
import pytest

from minutes.render import actions_csv, render
from minutes.render.text import clean, csv_safe, md_text

sys.path.insert(0, str(Path(__file__).parent / "data" / "render"))
import render_samples as samples  # noqa: E402

HOSTILE = [
    "=cmd|' /C calc'!A0",
    "<script>alert(1)</script>",
    "| pipes | in | cells |",
    "line one\nline two\r\n# not a heading\u2028next",
    "`code` and ``double`` ticks",
    "*star* **bold** _under_ __dunder__",
    "# hash at the start",
    "- dash at the start",
    "+ plus at the start",
    "12. looks numbered",
    "3) also numbered",
    "> looks quoted",
    "[link](javascript:alert(1)) ![image](x.png) <http://example.invalid>",
    "back\\slash\\ and \\*escaped\\*",
    "&amp; and &lt;b&gt; entities",
    "~~struck~~",
    "control\x00 characters\x0b and\x1f more\x7f",
    "---",
    "===",
    "@SUM(1+1)",
]
PLAIN = "plain words"


def _parser() -> Any:
    markdown_it = pytest.importorskip("markdown_it")
    return markdown_it.MarkdownIt("commonmark").enable(["table", "strikethrough"])


def _shape(md: str) -> list[Any]:
    """Return the token structure: block types with tags, and each inline's child types."""
    shape: list[Any] = []
    for tok in _parser().parse(md):
        if tok.type == "inline":
            shape.append(("inline", tuple(c.type for c in tok.children or [])))
        else:
            shape.append((tok.type, tok.tag))
    return shape


@pytest.mark.parametrize("text", HOSTILE)
def test_markdown_structure_is_unchanged_by_hostile_text(text: str) -> None:
    want = _shape(render(samples.hostile(PLAIN), "md").decode())
    got = _shape(render(samples.hostile(text), "md").decode())
    assert got == want


@pytest.mark.parametrize("text", HOSTILE)
def test_markdown_shows_hostile_text_as_the_words_given(text: str) -> None:
    md = render(samples.hostile(text), "md").decode()
    page = _parser().render(md)
    assert "<script" not in page and "<a " not in page and "<img" not in page
    cells = re.findall(r"<td>(.*?)</td>", page)
    # The first decision row's text cell holds the hostile text, shown literally.
    assert html.unescape(cells[1]) == clean(text)


@pytest.mark.parametrize("text", HOSTILE)
def test_docx_takes_hostile_text(text: str) -> None:
    data = render(samples.hostile(text), "docx")
    doc = docx.Document(io.BytesIO(data))
    assert doc.core_properties.title == clean(text)
    decisions = doc.tables[0]
    assert decisions.rows[1].cells[1].text == clean(text)


def test_docx_drops_characters_xml_forbids() -> None:
    data = render(samples.hostile("a\x00b\x01c\ufffed"), "docx")
    doc = docx.Document(io.BytesIO(data))
    assert doc.tables[0].rows[1].cells[1].text == "abcd"


@pytest.mark.parametrize("text", HOSTILE)
def test_csv_cells_never_start_a_formula(text: str) -> None:
    rows = list(csv.reader(io.StringIO(actions_csv(samples.hostile(text)).decode("utf-8"))))
    assert len(rows) == 1 + len(samples.hostile(text).ledger.actions)  # newlines collapsed
    for row in rows:
        for cell in row:
            assert not cell.startswith(("=", "+", "-", "@", "\t", "\r")), cell
    task, owner = rows[1][1], rows[1][2]
    assert task == owner == csv_safe(text)
    assert task.lstrip("'") == clean(text)


def test_csv_action_table() -> None:
    out = actions_csv(samples.GENERAL)
    assert out.count(b"\r\n") == 4  # RFC 4180 record ends: header and three actions
    rows = list(csv.reader(io.StringIO(out.decode("utf-8"))))
    assert rows == [
        ["No.", "Action", "Owner", "Due", "Status", "Time", "Cue"],
        ["A1", "Send the soil report to the council", "Priya Quell", "2025-03-07", "open",
         "00:00:45", "c4"],
        ["A2", "Book the hall for the consultation", "Priya Quell", "", "done", "00:07:51",
         "c8"],
        ["A3", "Find out who prints the leaflets", "", "before the launch", "open",
         "00:07:28", ""],
    ]


@pytest.mark.parametrize(("text", "expected"), [
    # OWASP "CSV Injection": prefix = + - @ TAB CR with a single quote.
    ("=1+1", "'=1+1"), ("+44 20 7946 0000", "'+44 20 7946 0000"), ("-5 minutes", "'-5 minutes"),
    ("@SUM(A1)", "'@SUM(A1)"), ("\t=1+1", "'=1+1"), ("\r=1+1", "'=1+1"),
    ("plain text", "plain text"), ("a = b", "a = b"), ("", ""),
])
def test_csv_safe(text: str, expected: str) -> None:
    assert csv_safe(text) == expected


@pytest.mark.parametrize(("text", "expected"), [
    ("snake_case_name", "snake_case_name"),  # intraword underscores cannot open emphasis
    ("_under_", "\\_under\\_"),
    ("a|b", "a\\|b"),
    ("<b>", "&lt;b&gt;"),
    ("# x", "\\# x"),
    ("12. x", "12\\. x"),
    ("x # y", "x # y"),  # a hash inside a line is only text
    ("two\nlines", "two lines"),
])
def test_md_text(text: str, expected: str) -> None:
    assert md_text(text) == expected
