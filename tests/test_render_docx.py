"""DOCX rendering, compared by extracted structure (styles, tables, footer), not by bytes.

Goldens are ``tests/golden/*.docx.json``; regenerate them with ``MINUTES_REGEN_GOLDEN=1``
(see tests/test_render_markdown.py).
"""

from __future__ import annotations

import datetime as dt
import io
import json
import os
import shutil
import subprocess
import sys
from dataclasses import replace
from pathlib import Path
from typing import Any

import docx
import pytest
from docx.oxml.ns import qn
from docx.table import Table
from docx.text.paragraph import Paragraph

from minutes.render import build, render
from minutes.render.blocks import Heading

sys.path.insert(0, str(Path(__file__).parent / "data" / "render"))
import render_samples as samples  # noqa: E402

GOLDEN = Path(__file__).parent / "golden"

CASES = {
    "render_general.docx.json": samples.GENERAL,
    "render_board.docx.json": samples.BOARD,
}


def structure(data: bytes) -> dict[str, Any]:
    """Return what a reader sees: styled paragraphs, tables, footer, core properties."""
    doc = docx.Document(io.BytesIO(data))
    body: list[Any] = []
    for child in doc.element.body.iterchildren():
        if child.tag == qn("w:p"):
            p = Paragraph(child, doc)
            if p.text.strip():
                body.append([p.style.name, p.text])
        elif child.tag == qn("w:tbl"):
            table = Table(child, doc)
            header = table.rows[0]._tr
            repeats = header.trPr is not None and header.trPr.find(qn("w:tblHeader")) is not None
            body.append({"table": [[c.text for c in row.cells] for row in table.rows],
                         "repeat_header": repeats,
                         "style": table.style.name if table.style else None})
    footer = doc.sections[0].footer
    fields = [el.text.strip() for el in footer._element.iter(qn("w:instrText"))]
    props = doc.core_properties
    return {"body": body,
            "footer": [p.text for p in footer.paragraphs],
            "footer_fields": fields,
            "core": {"title": props.title,
                     "created": props.created.isoformat() if props.created else None,
                     "author": props.author}}


@pytest.mark.parametrize("name", sorted(CASES))
def test_docx_structure_matches_golden(name: str) -> None:
    got = structure(render(CASES[name], "docx"))
    path = GOLDEN / name
    if os.environ.get("MINUTES_REGEN_GOLDEN"):
        path.write_text(json.dumps(got, ensure_ascii=False, indent=1) + "\n", encoding="utf-8")
        pytest.skip(f"rewrote {path}")
    assert got == json.loads(path.read_text(encoding="utf-8"))


@pytest.mark.parametrize("minutes", [samples.GENERAL, samples.BOARD], ids=["general", "board"])
def test_docx_has_the_same_headings_as_the_markdown(minutes: Any) -> None:
    # Both writers take the same blocks; every heading must arrive with a Word style.
    want = []
    for block in build(minutes).blocks:
        if isinstance(block, Heading):
            style = "Title" if block.level == 0 else f"Heading {block.level}"
            text = f"{block.number} {block.text}" if block.number else block.text
            want.append([style, text])
    got = [p for p in structure(render(minutes, "docx"))["body"]
           if isinstance(p, list) and (p[0] == "Title" or p[0].startswith("Heading"))]
    assert got == want


def test_docx_tables_repeat_their_header_row_and_footer_numbers_pages() -> None:
    got = structure(render(samples.BOARD, "docx"))
    tables = [b for b in got["body"] if isinstance(b, dict)]
    assert tables and all(t["repeat_header"] for t in tables)
    assert tables[0]["table"][0] == ["No.", "Motion", "Mover", "Seconder",
                                     "For / against / abstain", "Outcome", "Time", "Cue"]
    assert got["footer_fields"] == ["PAGE", "NUMPAGES"]
    assert got["footer"] == ["DRAFT — not yet approved — page 1 of 1"]


def test_docx_core_properties_come_from_the_meeting_not_the_clock() -> None:
    got = structure(render(samples.GENERAL, "docx"))["core"]
    assert got == {"title": "Weekly coordination call",
                   "created": "2025-03-04T09:30:00+00:00", "author": ""}
    undated = replace(samples.GENERAL, meeting=replace(samples.GENERAL.meeting, date=None))
    assert structure(render(undated, "docx"))["core"]["created"] is None


def test_docx_bytes_are_deterministic() -> None:
    assert render(samples.BOARD, "docx") == render(samples.BOARD, "docx")


def test_approved_docx_footer() -> None:
    got = structure(render(samples.board_with_seconders(), "docx"))
    assert got["footer"] == ["Approved on 2025-03-11 — page 1 of 1"]
    texts = [b[1] for b in got["body"] if isinstance(b, list)]
    assert "Approved on 2025-03-11" in texts
    assert not any("DRAFT" in t for t in texts)


@pytest.mark.slow
@pytest.mark.skipif(shutil.which("soffice") is None, reason="LibreOffice is not installed")
@pytest.mark.parametrize("minutes", [samples.GENERAL, samples.BOARD], ids=["general", "board"])
def test_docx_opens_in_libreoffice(minutes: Any, tmp_path: Path) -> None:
    source = tmp_path / "minutes.docx"
    source.write_bytes(render(minutes, "docx"))
    subprocess.run(["soffice", "--headless", f"-env:UserInstallation=file://{tmp_path}/lo",
                    "--convert-to", "pdf", "--outdir", str(tmp_path), str(source)],
                   check=True, capture_output=True, timeout=180)
    assert (tmp_path / "minutes.pdf").read_bytes().startswith(b"%PDF")


def test_docx_dates_use_meeting_date_even_at_midnight_start() -> None:
    minutes = replace(samples.GENERAL, meeting=replace(samples.GENERAL.meeting,
                                                       start_clock=None,
                                                       date=dt.date(2024, 12, 31)))
    assert structure(render(minutes, "docx"))["core"]["created"] == "2024-12-31T00:00:00+00:00"
