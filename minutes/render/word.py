"""Write a ``Document`` as DOCX with python-docx: real heading styles, repeating table
headers, page numbers and the draft status in the footer, core properties from the meeting.
"""

from __future__ import annotations

import datetime as dt
import io
import zipfile
from typing import Any

from .blocks import Bullets, Document, Heading, Para, Rule, Table
from .text import DASH, clean

TABLE_FONT_PT = 9
FOOTNOTE_PT = 8.5


def _text(value: str) -> str:
    # clean() drops what XML 1.0 forbids (python-docx raises on NUL) and keeps one line.
    return clean(value)


def _run_text(value: str) -> str:
    """Return a span's text cleaned, keeping one space at each edge where it had one."""
    core = clean(value)
    lead = " " if value[:1].isspace() else ""
    tail = " " if value[-1:].isspace() and core else ""
    return lead + core + tail


def _runs(paragraph: Any, spans: Any, size: float | None = None) -> None:
    from docx.shared import Pt

    for s in spans:
        run = paragraph.add_run(_run_text(s.text))
        if s.style == "b":
            run.bold = True
        elif s.style == "i":
            run.italic = True
        if size:
            run.font.size = Pt(size)


def _field(paragraph: Any, instruction: str) -> None:
    """Append a Word field (PAGE, NUMPAGES) that the reader's word processor fills in."""
    from docx.oxml import OxmlElement
    from docx.oxml.ns import qn

    def char(kind: str) -> Any:
        el = OxmlElement("w:fldChar")
        el.set(qn("w:fldCharType"), kind)
        return el

    run = paragraph.add_run()
    run._r.append(char("begin"))
    instr = OxmlElement("w:instrText")
    instr.set(qn("xml:space"), "preserve")
    instr.text = f" {instruction} "
    run._r.append(instr)
    run._r.append(char("separate"))
    shown = paragraph.add_run("1")  # what a reader shows before it updates the field
    end = paragraph.add_run()
    end._r.append(char("end"))
    del shown


def _repeat_header(row: Any) -> None:
    from docx.oxml import OxmlElement
    from docx.oxml.ns import qn

    mark = OxmlElement("w:tblHeader")
    mark.set(qn("w:val"), "true")
    row._tr.get_or_add_trPr().append(mark)


def _rule(paragraph: Any) -> None:
    from docx.oxml import OxmlElement
    from docx.oxml.ns import qn

    borders = OxmlElement("w:pBdr")
    bottom = OxmlElement("w:bottom")
    for key, value in (("w:val", "single"), ("w:sz", "6"), ("w:space", "1"),
                       ("w:color", "auto")):
        bottom.set(qn(key), value)
    borders.append(bottom)
    paragraph._p.get_or_add_pPr().append(borders)


def _keep_row_whole(row: Any) -> None:
    from docx.oxml import OxmlElement

    row._tr.get_or_add_trPr().append(OxmlElement("w:cantSplit"))


def _widths(block: Table, total_emu: int) -> list[int]:
    """Return column widths: text columns wide, ids, times and cues just wide enough."""
    # Rough metrics for 9 pt text (about 0.075 in a character) plus the cell's padding.
    char, pad = 0.075 * 914400, 0.2 * 914400
    columns = [[label] + [row[i] for row in block.rows] for i, label in enumerate(block.header)]
    longest = [max(len(clean(c)) for c in cells) for cells in columns]
    main = longest.index(max(longest))  # the text column (decision, action, motion)
    floors, wants = [], []
    for i, cells in enumerate(columns):
        # The longest word sets a floor, so a cue id or a time never wraps mid-word.
        word = max((len(w) for c in cells for w in clean(c).split()), default=1)
        floors.append(min(word, 14) * char + pad)
        cap = 60 if i == main else 22
        wants.append(max(min(longest[i], cap) * char + pad, floors[-1]))
    spare = total_emu - sum(floors)
    if spare <= 0:
        return [int(f * total_emu / sum(floors)) for f in floors]
    extra = sum(w - f for w, f in zip(wants, floors, strict=True)) or 1.0
    share = min(1.0, spare / extra)
    widths = [f + (w - f) * share for w, f in zip(wants, floors, strict=True)]
    # Whatever is still left goes to the columns that wanted the most.
    left = total_emu - sum(widths)
    total_want = sum(wants)
    return [int(w + left * want / total_want) for w, want in zip(widths, wants, strict=True)]


def _table(doc: Any, block: Table) -> None:
    from docx.shared import Pt

    table = doc.add_table(rows=1, cols=len(block.header))
    table.style = "Table Grid"
    table.autofit = False
    section = doc.sections[-1]
    widths = _widths(block, section.page_width - section.left_margin - section.right_margin)
    head = table.rows[0]
    _repeat_header(head)
    for cell, label in zip(head.cells, block.header, strict=True):
        run = cell.paragraphs[0].add_run(_text(label))
        run.bold = True
        run.font.size = Pt(TABLE_FONT_PT)
    for values in block.rows:
        row = table.add_row()
        _keep_row_whole(row)
        for cell, value in zip(row.cells, values, strict=True):
            run = cell.paragraphs[0].add_run(_text(value) or DASH)
            run.font.size = Pt(TABLE_FONT_PT)
    for column, width in zip(table.columns, widths, strict=True):
        column.width = width
        for cell in column.cells:
            cell.width = width  # Word reads the cell widths, LibreOffice the grid


def _properties(doc: Any, meta: Document) -> None:
    from docx.oxml.ns import qn

    props = doc.core_properties
    props.title = _text(meta.title)
    props.subject = _text(meta.subject)
    props.author = ""  # the template says "python-docx"; the clerk is the author
    props.last_modified_by = ""
    props.comments = meta.footer
    props.category = "minutes"
    props.revision = 1
    if meta.created is not None:
        props.created = meta.created
        props.modified = meta.created
    else:
        # No meeting date: leave no date at all rather than the template's or today's.
        for tag in ("dcterms:created", "dcterms:modified"):
            el = props._element.find(qn(tag))
            if el is not None:
                props._element.remove(el)


def _fixed_zip(data: bytes, when: dt.datetime | None) -> bytes:
    """Return the package rewritten with fixed entry times, so equal input gives equal bytes."""
    stamp = (when or dt.datetime(1980, 1, 1)).timetuple()[:6]
    stamp = max(stamp, (1980, 1, 1, 0, 0, 0))  # the earliest time a zip entry can hold
    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as src, \
            zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as dst:
        for info in src.infolist():
            entry = zipfile.ZipInfo(info.filename, date_time=stamp)
            entry.compress_type = zipfile.ZIP_DEFLATED
            dst.writestr(entry, src.read(info.filename))
    return out.getvalue()


def write_docx(meta: Document) -> bytes:
    """Return the document as DOCX bytes."""
    try:
        import docx
    except ImportError as exc:  # a core dependency, but say what to do if it is missing
        from ..errors import ModelError

        raise ModelError("python-docx is not installed; pip install python-docx") from exc

    doc = docx.Document()
    from docx.shared import Inches

    for section in doc.sections:
        section.left_margin = section.right_margin = Inches(0.9)
    small = None  # after the rule: the footer's cautions, in smaller type
    for block in meta.blocks:
        if isinstance(block, Heading):
            label = f"{block.number} {block.text}" if block.number else block.text
            doc.add_heading(_text(label) or DASH, block.level)
        elif isinstance(block, Para):
            _runs(doc.add_paragraph(), block.spans, small)
        elif isinstance(block, Bullets):
            for item in block.items:
                _runs(doc.add_paragraph(style="List Bullet"), item, small)
        elif isinstance(block, Table):
            _table(doc, block)
            doc.add_paragraph()  # keeps two tables, or a table and a heading, apart
        elif isinstance(block, Rule):
            _rule(doc.add_paragraph())
            small = FOOTNOTE_PT
    footer = doc.sections[0].footer.paragraphs[0]
    footer.add_run(f"{_text(meta.footer)} — page ")
    _field(footer, "PAGE")
    footer.add_run(" of ")
    _field(footer, "NUMPAGES")
    _properties(doc, meta)
    raw = io.BytesIO()
    doc.save(raw)
    return _fixed_zip(raw.getvalue(), meta.created)
