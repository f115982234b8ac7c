"""A tiny document model both writers share, so Markdown and DOCX carry the same content.

The templates (``general.py``, ``board.py``) build a ``Document`` of plain blocks from a
``Minutes``; ``markdown.py`` and ``word.py`` write it out. Text in blocks is raw (the
writers escape it for their format), except spans marked ``lit``: fixed words and
timestamps of our own that need no escaping.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass


@dataclass(frozen=True)
class Span:
    """A run of text: plain, bold (``b``), italic (``i``) or trusted literal (``lit``)."""

    text: str
    style: str = ""


Inline = tuple[Span, ...]


@dataclass(frozen=True)
class Heading:
    """A heading: level 0 is the document title, 1 a section, 2 a subsection."""

    level: int
    text: str
    number: str = ""  # our own numbering ("1.", "Item 3:"), written before the text unescaped


@dataclass(frozen=True)
class Para:
    """A paragraph of spans."""

    spans: Inline


@dataclass(frozen=True)
class Bullets:
    """A bulleted list, one inline per item."""

    items: tuple[Inline, ...]


@dataclass(frozen=True)
class Table:
    """A table with one header row; every cell is raw text."""

    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]


@dataclass(frozen=True)
class Rule:
    """A thematic break: what follows is the draft's footer text."""


Block = Heading | Para | Bullets | Table | Rule


@dataclass(frozen=True)
class Document:
    """Blocks in order, the page-footer line, and the core properties for DOCX."""

    title: str
    blocks: tuple[Block, ...]
    footer: str  # "DRAFT ..." or "Approved on ..."; DOCX adds page numbers to it
    subject: str = ""
    created: dt.datetime | None = None


def text(value: str) -> Span:
    """Return a plain span of raw (untrusted) text."""
    return Span(value)


def bold(value: str) -> Span:
    """Return a bold span of raw text."""
    return Span(value, "b")


def italic(value: str) -> Span:
    """Return an italic span of raw text."""
    return Span(value, "i")


def lit(value: str) -> Span:
    """Return a span of our own fixed text that writers must not escape."""
    return Span(value, "lit")


def para(*spans: Span | str) -> Para:
    """Return a paragraph; bare strings become plain spans."""
    return Para(tuple(Span(s) if isinstance(s, str) else s for s in spans))


def line(*spans: Span | str) -> Inline:
    """Return an inline (for a bullet item); bare strings become plain spans."""
    return tuple(Span(s) if isinstance(s, str) else s for s in spans)
