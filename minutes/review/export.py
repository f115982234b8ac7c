"""Final minutes from a draft and its review: edits applied, rejected items left out."""

from __future__ import annotations

import datetime as dt
from dataclasses import replace
from typing import Any

from ..model import Minutes, Roster
from .edits import apply_review
from .loader import minutes_from_json


def reviewed_minutes(data: dict[str, Any], review: dict[str, Any], *,
                     approved_on: dt.date | None = None, roster: Roster | None = None,
                     source: str = "") -> Minutes:
    """Return the ``Minutes`` of the draft with the review applied.

    They stay a DRAFT unless ``approved_on`` (the date the body approved them) is given.
    """
    minutes = minutes_from_json(apply_review(data, review), roster=roster, source=source)
    if approved_on is not None:
        minutes = replace(minutes, approved_on=approved_on)
    return minutes


def export(data: dict[str, Any], review: dict[str, Any], fmt: str, *,
           approved_on: dt.date | None = None, roster: Roster | None = None,
           source: str = "") -> bytes:
    """Return the reviewed minutes rendered as ``fmt`` (md, docx or json)."""
    from ..render import render

    return render(reviewed_minutes(data, review, approved_on=approved_on, roster=roster,
                                   source=source), fmt)


def unreviewed(data: dict[str, Any], review: dict[str, Any]) -> list[str]:
    """Return the ids of items nobody has accepted or rejected yet."""
    view = apply_review(data, review, drop_rejected=False)
    return [item["id"] for key in ("motions", "decisions", "actions", "questions")
            for item in view[key] if item["review_state"] == "pending"]
