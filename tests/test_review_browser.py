"""The review page end to end in headless Chromium: what a clerk does, click by click.

Needs Chromium from the system package manager (``apt-get install chromium``) and the
``playwright`` Python package (its own browser downloads are never used). Without them the
tests skip on a workstation and fail in CI. Screenshots go to $MINUTES_SHOTS when set,
else to the test's tmp_path.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import threading
import wave
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from test_review_loader import HOSTILE, write_sample

from minutes.review.server import ReviewServer, ReviewSession, serve

ROOT = Path(__file__).resolve().parents[1]
CHROMIUM = shutil.which("chromium") or "/usr/bin/chromium"
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
        "--disable-background-networking", "--disable-component-update", "--disable-sync",
        # belt and braces: no name but loopback resolves, so nothing can leave the machine
        "--host-resolver-rules=MAP * ~NOTFOUND , EXCLUDE 127.0.0.1"]


def _missing() -> str:
    try:
        import playwright.sync_api  # noqa: F401
    except ImportError:
        return "the playwright package is not installed (pip install playwright)"
    if not Path(CHROMIUM).exists():
        return "Chromium is not installed (apt-get install chromium)"
    return ""


@pytest.fixture(scope="module")
def browser() -> Iterator[Any]:
    missing = _missing()
    if missing:
        if os.environ.get("CI"):
            pytest.fail(f"browser tests cannot run in CI: {missing}")
        pytest.skip(missing)
    from playwright.sync_api import sync_playwright

    with sync_playwright() as play:
        chromium = play.chromium.launch(executable_path=CHROMIUM, args=ARGS)
        yield chromium
        chromium.close()


@pytest.fixture(scope="module")
def board_draft(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """Return the demo board meeting drafted by the pipeline, as minutes JSON."""
    from minutes.pipeline import draft
    from minutes.render import render

    folder = tmp_path_factory.mktemp("board")
    path = folder / "board.json"
    path.write_bytes(render(draft(ROOT / "demo_meetings" / "board_regular.vtt"), "json"))
    return path


def _serve(minutes: Path, recording: Path | None = None) -> ReviewServer:
    server = serve(ReviewSession.open(minutes, recording=recording))
    threading.Thread(target=server.serve_forever, args=(0.05,), daemon=True).start()
    return server


class Shots:
    """Numbered screenshots of one test, for a person to look at."""

    def __init__(self, folder: Path, name: str) -> None:
        self.folder = Path(os.environ.get("MINUTES_SHOTS") or folder)
        self.folder.mkdir(parents=True, exist_ok=True)
        self.name = name
        self.n = 0

    def __call__(self, page: Any, what: str) -> None:
        self.n += 1
        page.screenshot(path=str(self.folder / f"{self.name}-{self.n:02d}-{what}.png"))


def _page(browser: Any, server: ReviewServer,
          responses: list[tuple[str, int, str]] | None = None
          ) -> tuple[Any, Any, list[str], list[str]]:
    context = browser.new_context(viewport={"width": 1440, "height": 900},
                                  accept_downloads=True)
    page = context.new_page()
    page.set_default_timeout(10_000)
    requests: list[str] = []
    problems: list[str] = []
    page.on("request", lambda r: requests.append(r.url))
    if responses is not None:
        page.on("response", lambda r: responses.append(
            (r.url, r.status, r.request.all_headers().get("range", ""))))
    page.on("pageerror", lambda e: problems.append(f"page error: {e}"))
    page.on("console", lambda m: problems.append(f"console: {m.text}")
            if m.type == "error" else None)
    page.goto(server.url)
    page.wait_for_selector("body[data-ready=true]")
    return context, page, requests, problems


def _saved(page: Any) -> None:
    from playwright.sync_api import expect

    expect(page.locator("#save-status")).to_have_text(re.compile(r"^All changes saved"))


def _until(page: Any, script: str) -> None:
    """Wait until ``script`` is true in the page (wait_for_function would need eval, which
    the page's Content-Security-Policy forbids, as it should)."""
    for _ in range(100):
        if page.evaluate(script):
            return
        page.wait_for_timeout(100)
    raise AssertionError(f"never became true: {script}")


def _docx_text(path: Path) -> tuple[str, list[str]]:
    import docx

    document = docx.Document(str(path))
    cells = [c.text for t in document.tables for row in t.rows for c in row.cells]
    footer = [p.text for s in document.sections for p in s.footer.paragraphs]
    return "\n".join([p.text for p in document.paragraphs] + cells + footer), cells


def _download(page: Any, selector: str, target: Path, name: str) -> Path:
    with page.expect_download() as info:
        page.click(selector)
    assert info.value.suggested_filename == name
    info.value.save_as(str(target))
    return target


# --------------------------------------------------------------------------- the demo board


def test_a_clerk_reviews_the_demo_board(browser: Any, board_draft: Path, tmp_path: Path) -> None:
    from playwright.sync_api import expect

    from minutes.render import render
    from minutes.review.loader import minutes_from_json

    minutes = tmp_path / "board.json"
    shutil.copy(board_draft, minutes)
    data = json.loads(minutes.read_bytes())
    # Built against the contract, not particular items: the first of each kind.
    action, motion, decision = data["actions"][0], data["motions"][0], data["decisions"][0]
    server = _serve(minutes)
    shots = Shots(tmp_path, "board")
    context, page, requests, problems = _page(browser, server)
    try:
        expect(page.locator("#doc-status")).to_have_text("DRAFT")
        expect(page.locator(".utt")).to_have_count(len(data["utterances"]))
        shots(page, "loaded")

        # Selecting an action scrolls the transcript to its evidence and highlights it.
        card = page.locator(f"#item-{action['id']}")
        card.locator(".item-text").click()
        evidence = action["evidence"][0]
        turn = page.locator(f"#u-{evidence['utterance']}")
        expect(turn).to_have_class(re.compile(r"\bevidence\b"))
        if evidence["quote"] in data["utterances"][evidence["utterance"]]["text"]:
            expect(turn.locator("mark")).to_have_text(evidence["quote"])
        pane, box = page.locator("#transcript").bounding_box(), turn.bounding_box()
        assert pane["y"] <= box["y"] and box["y"] + min(box["height"], 40) <= \
            pane["y"] + pane["height"]
        shots(page, "action-evidence")

        # Edit the action's owner.
        card.locator("[data-action=edit]").click()
        card.locator("input[data-field=owner]").fill("Dana Whitcombe")
        card.locator("input[data-field=owner]").press("Tab")
        _saved(page)
        expect(card.locator(".field-value[data-field=owner]")).to_have_text("Dana Whitcombe")

        # Fix a motion's mover and a vote count.
        mcard = page.locator(f"#item-{motion['id']}")
        mcard.locator("[data-action=edit]").click()
        mcard.locator("input[data-field=mover]").fill("Rowan Ashdown")
        mcard.locator("input[data-field=mover]").press("Tab")
        _saved(page)
        mcard.locator("input[data-field=for]").fill("5")
        mcard.locator("input[data-field=for]").press("Tab")
        _saved(page)
        shots(page, "motion-editor")

        # Reject one item.
        page.locator(f"#item-{decision['id']} [data-action=reject]").click()
        _saved(page)
        expect(page.locator(f"#item-{decision['id']}")).to_have_class(
            re.compile(r"\bstate-rejected\b"))

        # Reload: every edit is still there.
        page.reload()
        page.wait_for_selector("body[data-ready=true]")
        expect(page.locator(f"#item-{action['id']} .field-value[data-field=owner]")) \
            .to_have_text("Dana Whitcombe")
        expect(page.locator(f"#item-{motion['id']} .field-value[data-field=mover]")) \
            .to_have_text("Rowan Ashdown")
        expect(page.locator(f"#item-{motion['id']} .field-value[data-field=vote]")) \
            .to_contain_text("5–")
        expect(page.locator(f"#item-{decision['id']}")).to_have_class(
            re.compile(r"\bstate-rejected\b"))
        page.locator(f"#item-{decision['id']}").scroll_into_view_if_needed()
        shots(page, "after-reload")

        # Export from the page: the Word file holds the edits, not the rejected item.
        final = _download(page, "#export-form button[data-format=docx]", tmp_path / "f.docx",
                          "board-reviewed-draft.docx")
        text, cells = _docx_text(final)
        assert "Dana Whitcombe" in cells
        assert "Rowan Ashdown" in text
        assert "DRAFT" in text
        before = tmp_path / "draft.docx"
        before.write_bytes(render(minutes_from_json(data), "docx"))
        rejected = f"{decision['id']} ["
        assert rejected in _docx_text(before)[0]  # the check below can fail
        assert rejected not in text

        # Approved: the DRAFT marking goes.
        page.fill("#approved-on", "2026-11-11")
        approved = _download(page, "#export-form button[data-format=md]", tmp_path / "f.md",
                             "board-final.md")
        markdown = approved.read_text(encoding="utf-8")
        assert "Approved on 2026-11-11" in markdown and "DRAFT" not in markdown
        assert "Rowan Ashdown" in markdown

        origin = server.url.rstrip("/")
        assert [u for u in requests if not u.startswith(origin)] == []
        assert problems == []
        assert json.loads(minutes.read_bytes()) == data  # the draft is never written
    finally:
        context.close()
        server.shutdown()
        server.server_close()


# --------------------------------------------------------------------------- the small sample


def _silence(path: Path, seconds: float) -> Path:
    with wave.open(str(path), "wb") as out:
        out.setnchannels(1)
        out.setsampwidth(1)
        out.setframerate(8000)
        out.writeframes(b"\x80" * int(8000 * seconds))
    return path


def test_add_rename_play_and_escape(browser: Any, tmp_path: Path) -> None:
    from playwright.sync_api import expect

    minutes = write_sample(tmp_path)
    recording = _silence(tmp_path / "fenmoor.wav", 33.0)
    server = _serve(minutes, recording)
    shots = Shots(tmp_path, "sample")
    responses: list[tuple[str, int, str]] = []
    context, page, requests, problems = _page(browser, server, responses)
    try:
        # A caption holding markup shows as text and runs nothing.
        expect(page.locator("#u-5 .utt-text")).to_have_text(HOSTILE)
        expect(page.locator("#item-A2 .item-text")).to_have_text(HOSTILE)
        assert page.locator("#minutes-pane script, #minutes-pane img, #transcript script, "
                            "#transcript img").count() == 0
        assert page.evaluate("window.__pwned") is None

        # Unidentified speakers and uncounted votes are marked.
        expect(page.locator("#item-M1 .tag-check")).to_have_text("Check")
        expect(page.locator("#item-M1 .checks")).to_contain_text("Vote counts not recorded")
        expect(page.locator("#item-A1 .checks")).to_contain_text("“Speaker 1” is not identified")
        expect(page.locator("#u-2 .tag-check")).to_have_text("not identified")
        assert "needs-check" not in (page.locator("#item-D1").get_attribute("class") or "")

        # With a recording, selecting an item plays from its evidence.
        _until(page, "() => document.querySelector('#player audio').readyState >= 1")
        page.locator("#item-Q1 .item-text").click()
        _until(page, "() => Math.abs(document.querySelector('#player audio').currentTime - 28.5)"
                     " < 0.3")
        assert any(url.endswith("/recording") and status == 206 and rng.startswith("bytes=")
                   for url, status, rng in responses)

        # Select words in the transcript and add them as a decision.
        page.evaluate("""() => {
            const p = document.querySelector('#u-6 .utt-text');
            const node = p.firstChild, text = node.textContent;
            const range = document.createRange();
            range.setStart(node, text.indexOf('the depot'));
            range.setEnd(node, text.length);
            const sel = window.getSelection();
            sel.removeAllRanges();
            sel.addRange(range);
        }""")
        expect(page.locator("#selection-bar")).to_be_visible()
        shots(page, "selection")
        page.locator("#selection-bar button[data-kind=decision]").click()
        _saved(page)
        added = page.locator("#item-D2")
        expect(added.locator(".item-text")).to_have_text("the depot stays open on Saturdays.")
        expect(added.locator(".item-form")).to_be_visible()
        review = json.loads((tmp_path / "fenmoor.review.json").read_bytes())
        assert review["added"][0]["item"]["evidence"][0] | {"start": 0, "end": 0} == {
            "utterance": 6, "cue": "c6-0", "start": 0, "end": 0, "speaker": "Osric Palfrey",
            "quote": "the depot stays open on Saturdays."}
        expect(page.locator("#u-6 mark")).to_have_text("the depot stays open on Saturdays.")
        shots(page, "added-decision")

        # Rename the unidentified speaker everywhere.
        page.locator('button[data-rename="Speaker 1"]').click()
        page.fill("#rename-new", "Ludo Brisk")
        page.click("#rename-ok")
        _saved(page)
        expect(page.locator("#u-2 .speaker")).to_have_text("Ludo Brisk")
        expect(page.locator("#transcript")).not_to_contain_text("Speaker 1")
        expect(page.locator("#item-A1 .field-value[data-field=owner]")).to_have_text("Ludo Brisk")
        expect(page.locator("#item-M1 .field-value[data-field=seconder]")) \
            .to_have_text("Ludo Brisk")
        shots(page, "renamed")

        page.reload()
        page.wait_for_selector("body[data-ready=true]")
        expect(page.locator("#u-4 .speaker")).to_have_text("Ludo Brisk")
        expect(page.locator("#item-D2 .item-text")).to_have_text(
            "the depot stays open on Saturdays.")
        origin = server.url.rstrip("/")
        assert [u for u in requests if not u.startswith(origin)] == []
        assert problems == []
    finally:
        context.close()
        server.shutdown()
        server.server_close()
