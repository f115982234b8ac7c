"""Render one ``Minutes`` as Markdown, DOCX or JSON (plus the action table as CSV).

Renderers format; they decide nothing about the meeting. Markdown and DOCX come from the
same document blocks (``general.py`` or ``board.py`` by ``Minutes.template``), so both
carry the same content; JSON follows the contract in DESIGN.md.

    RENDERERS = {"md": ..., "docx": ..., "json": ...}
    render(minutes, "md") -> bytes
"""

from __future__ import annotations

from collections.abc import Callable

from ..errors import UsageError
from ..model import Minutes
from .blocks import Document
from .board import build_board
from .data import actions_csv, render_json, schema, to_json_dict
from .general import build_general
from .markdown import write_markdown
from .text import clock

__all__ = ["RENDERERS", "TEMPLATES", "actions_csv", "build", "clock", "render",
           "render_docx", "render_json", "render_markdown", "schema", "to_json_dict"]

TEMPLATES: dict[str, Callable[[Minutes], Document]] = {
    "general": build_general,
    "board": build_board,
}


def build(minutes: Minutes) -> Document:
    """Return the document blocks of ``minutes`` in its template."""
    try:
        # "" is what a meeting file says when it leaves the choice open: the general one.
        template = TEMPLATES[minutes.template or "general"]
    except KeyError:
        raise UsageError(
            f"unknown minutes template {minutes.template!r}; choose one of: "
            + ", ".join(TEMPLATES)) from None
    return template(minutes)


def render_markdown(minutes: Minutes) -> bytes:
    """Return the minutes as Markdown (UTF-8, LF)."""
    return write_markdown(build(minutes))


def render_docx(minutes: Minutes) -> bytes:
    """Return the minutes as a DOCX file's bytes."""
    from .word import write_docx  # python-docx loads only when a DOCX is asked for

    return write_docx(build(minutes))


RENDERERS: dict[str, Callable[[Minutes], bytes]] = {
    "md": render_markdown,
    "docx": render_docx,
    "json": render_json,
}


def render(minutes: Minutes, fmt: str) -> bytes:
    """Return ``minutes`` rendered in format ``fmt`` (one of ``RENDERERS``)."""
    try:
        renderer = RENDERERS[fmt]
    except KeyError:
        raise UsageError(
            f"unknown output format {fmt!r}; choose one of: {', '.join(RENDERERS)}") from None
    return renderer(minutes)
