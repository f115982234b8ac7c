"""WebVTT cue text: markup parsed by the W3C WebVTT cue text parsing rules, split by voice.

The tokenizer and tree follow the spec (w3c.github.io/webvtt, "WebVTT cue text parsing
rules"): a ``<`` always opens a tag that runs to the next ``>`` (or the end), character
references are decoded in text and in annotations, unknown tags are dropped, an end tag
closes the current element only when its name matches, and ``<rt>`` counts only inside
``<ruby>``. A text node belongs to the innermost ``<v>`` that holds it, so text after
``</v>`` is not the voice's, and one cue may carry several voices.
"""

from __future__ import annotations

import html
import re
from dataclasses import dataclass, field

_ELEMENTS = frozenset({"c", "i", "b", "u", "ruby", "v", "lang"})  # "rt" only inside ruby
_ASCII_WS = "\t\n\x0c\r "
_WS_RUN = re.compile(r"[\t\n\x0c\r ]+")
# tag content: name, then .classes, then whitespace and the annotation (spec tag states)
_START_TAG = re.compile(r"([^\t\n\x0c .]*)((?:\.[^\t\n\x0c .]*)*)(?:[\t\n\x0c ](.*))?\Z",
                        re.DOTALL)
_TIMESTAMP = re.compile(r"(?:\d{2,}:)?[0-5]\d:[0-5]\d\.\d{3}\Z")


@dataclass(eq=False)
class Node:
    """A node of the cue text tree: root (kind ""), element, "text" or "timestamp"."""

    kind: str
    classes: tuple[str, ...] = ()
    annotation: str = ""  # the voice of a "v", the language of a "lang"
    text: str = ""  # the text of a "text" node, the value of a "timestamp"
    children: list[Node] = field(default_factory=list)
    parent: Node | None = field(default=None, repr=False)


def parse_cue_text(text: str) -> Node:
    """Return the root of the cue text tree, built as the WebVTT spec builds it."""
    root = current = Node("")
    for is_tag, value in _tokens(text):
        if not is_tag:
            current.children.append(Node("text", text=html.unescape(value)))
            continue
        if not value or value[0] not in "/0123456789":
            match = _START_TAG.match(value)
            assert match  # every string matches: each part may be empty
            name = match.group(1)
            if name in _ELEMENTS or (name == "rt" and current.kind == "ruby"):
                classes = tuple(c for c in match.group(2).split(".") if c)
                note = _annotation(match.group(3) or "") if name in ("v", "lang") else ""
                node = Node(name, classes, note, parent=current)
                current.children.append(node)
                current = node
        elif value[0] == "/":
            name = value[1:]
            if current.parent is not None and name == current.kind:
                current = current.parent
            elif name == "ruby" and current.kind == "rt":
                assert current.parent is not None and current.parent.parent is not None
                current = current.parent.parent
        elif _TIMESTAMP.match(value):
            current.children.append(Node("timestamp", text=value))
    return root


def _tokens(text: str) -> list[tuple[bool, str]]:
    """Return (is_tag, content) tokens; linear in the length of the text."""
    out: list[tuple[bool, str]] = []
    pos, size = 0, len(text)
    while pos < size:
        lt = text.find("<", pos)
        if lt < 0:
            out.append((False, text[pos:]))
            break
        if lt > pos:
            out.append((False, text[pos:lt]))
        gt = text.find(">", lt + 1)
        end = size if gt < 0 else gt
        out.append((True, text[lt + 1:end]))
        pos = end + 1
    return out


def _annotation(raw: str) -> str:
    # spec: decode character references, strip ASCII whitespace, collapse runs to a space
    return _WS_RUN.sub(" ", html.unescape(raw).strip(_ASCII_WS))


def voice_pieces(root: Node) -> list[tuple[str, str]]:
    """Return (voice, text) runs in cue order; text outside any voice has voice ""."""
    runs: list[tuple[str, list[str]]] = []
    # iterative walk: a hostile cue can nest tags a hundred thousand deep
    stack: list[tuple[Node, str]] = [(child, "") for child in reversed(root.children)]
    while stack:
        node, voice = stack.pop()
        if node.kind == "text":
            if runs and runs[-1][0] == voice:
                runs[-1][1].append(node.text)
            else:
                runs.append((voice, [node.text]))
        elif node.kind == "rt":
            # Ruby text is a reading aid that repeats its base text; minutes want the base.
            continue
        elif node.kind != "timestamp":
            inner = node.annotation if node.kind == "v" else voice
            stack.extend((child, inner) for child in reversed(node.children))
    pieces = [(voice, clean_text("".join(parts))) for voice, parts in runs]
    return [(voice, text) for voice, text in pieces if text]


def clean_text(text: str) -> str:
    """Return text with ASCII whitespace runs made one space (NBSP and marks are kept)."""
    return _WS_RUN.sub(" ", text).strip(" ")


# The common cue, "<v Name>plain text" (optionally closed), gives the same pieces as the
# full parse; reading it with one regex halves the cost on long caption files.
_SIMPLE = re.compile(r"<v(?:\.[^\t\n\x0c .>]*)*[\t\n\x0c ]([^>&]*)>([^<&]*)(?:</v>)?\Z")


def cue_text_pieces(text: str) -> list[tuple[str, str]]:
    """Return the (voice, plain text) pieces of one cue's text."""
    if "<" not in text and "&" not in text:
        plain = clean_text(text)
        return [("", plain)] if plain else []
    simple = _SIMPLE.match(text)
    if simple:
        plain = clean_text(simple.group(2))
        return [(_annotation(simple.group(1)), plain)] if plain else []
    return voice_pieces(parse_cue_text(text))
