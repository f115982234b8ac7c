"""Write a ``Document`` as CommonMark with GFM tables: UTF-8, LF line endings."""

from __future__ import annotations

import re

from .blocks import Block, Bullets, Document, Heading, Inline, Para, Rule, Table
from .text import DASH, clean, md_text

_SPACE_RUN = re.compile(" {2,}")


def _inline(spans: Inline) -> str:
    out = []
    for s in spans:
        core = clean(s.text) if s.style == "lit" else md_text(s.text)
        if not core:
            if s.text[:1].isspace():
                out.append(" ")  # a separating space of our own ("by ", " ")
            continue
        if s.style == "b":
            core = f"**{core}**"
        elif s.style == "i":
            core = f"*{core}*"
        # Emphasis must hug its text, so the spaces at a span's edges stay outside it.
        lead = " " if s.text[:1].isspace() else ""
        tail = " " if s.text[-1:].isspace() else ""
        out.append(lead + core + tail)
    return _SPACE_RUN.sub(" ", "".join(out)).strip()


def _cell(value: str) -> str:
    return md_text(value) or DASH


def _block(block: Block) -> str:
    if isinstance(block, Heading):
        number = clean(block.number) + " " if block.number else ""
        return "#" * (block.level + 1) + " " + number + (md_text(block.text) or DASH)
    if isinstance(block, Para):
        return _inline(block.spans)
    if isinstance(block, Bullets):
        return "\n".join("- " + _inline(item) for item in block.items)
    if isinstance(block, Table):
        lines = ["| " + " | ".join(_cell(h) for h in block.header) + " |",
                 "|" + "|".join(" --- " for _ in block.header) + "|"]
        for row in block.rows:
            lines.append("| " + " | ".join(_cell(c) for c in row) + " |")
        return "\n".join(lines)
    if isinstance(block, Rule):
        return "---"
    raise TypeError(f"unknown block {block!r}")


def write_markdown(doc: Document) -> bytes:
    """Return the document as Markdown bytes."""
    parts = [_block(b) for b in doc.blocks]
    return ("\n\n".join(p for p in parts if p) + "\n").encode("utf-8")
