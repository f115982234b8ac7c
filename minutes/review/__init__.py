"""Review: a person checks the draft in a browser, and the final minutes come out of it.

    loader.py   minutes JSON -> ``Minutes`` (the inverse of ``render.data.to_json_dict``)
    edits.py    the review file beside the draft: verdicts, field edits, added items, renames
    sources.py  what the JSON leaves out, found beside it (the roster, each cue's times)
    export.py   draft + review -> final minutes (rejected items out; DRAFT until approved)
    server.py   the local review page (127.0.0.1 only) that writes nothing but the review
    static/     the page's HTML, script and style (plain files, no build step, no network)
"""

from __future__ import annotations

from .edits import apply_review, load_review, new_review, review_path
from .export import export, reviewed_minutes, unreviewed
from .loader import minutes_from_json, read_minutes_json

__all__ = ["apply_review", "export", "load_review", "minutes_from_json", "new_review",
           "read_minutes_json", "review_path", "reviewed_minutes", "unreviewed"]
