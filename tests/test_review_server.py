"""The review server over real HTTP on 127.0.0.1: pages, the JSON API, edits on disk,
Host/Origin checks, byte ranges of the recording, and limits on what it accepts."""

from __future__ import annotations

import http.client
import json
import threading
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest
from test_review_loader import HOSTILE, write_sample

from minutes.errors import InputError
from minutes.review.server import MAX_BODY, ReviewServer, ReviewSession, _parse_range, serve

RECORDING = bytes(range(256)) * 40  # 10,240 bytes whose every offset is recognisable


@dataclass
class Running:
    server: ReviewServer
    folder: Path
    minutes: Path

    @property
    def host(self) -> str:
        return f"127.0.0.1:{self.server.port}"

    def request(self, method: str, path: str, body: bytes | None = None,
                headers: dict[str, str] | None = None) -> tuple[int, dict[str, str], bytes]:
        conn = http.client.HTTPConnection("127.0.0.1", self.server.port, timeout=10)
        try:
            conn.putrequest(method, path, skip_host=True, skip_accept_encoding=True)
            sent = {"Host": self.host, **(headers or {})}
            if body is not None and "Content-Length" not in sent:
                sent["Content-Length"] = str(len(body))
            for key, value in sent.items():
                if value is not None:
                    conn.putheader(key, value)
            conn.endheaders(body)
            response = conn.getresponse()
            return response.status, {k.lower(): v for k, v in response.getheaders()}, \
                response.read()
        finally:
            conn.close()

    def edit(self, edit: Any, **headers: str) -> tuple[int, Any]:
        body = json.dumps(edit).encode("utf-8")
        status, _, raw = self.request("POST", "/api/edit", body,
                                      {"Content-Type": "application/json", **headers})
        return status, json.loads(raw)


def _start(folder: Path, recording: bool = True) -> Running:
    minutes = write_sample(folder)
    audio = None
    if recording:
        audio = folder / "fenmoor.wav"
        audio.write_bytes(RECORDING)
    server = serve(ReviewSession.open(minutes, recording=audio))
    threading.Thread(target=server.serve_forever, args=(0.05,), daemon=True).start()
    return Running(server, folder, minutes)


@pytest.fixture
def running(tmp_path: Path) -> Iterator[Running]:
    run = _start(tmp_path)
    yield run
    run.server.shutdown()
    run.server.server_close()


# --------------------------------------------------------------------------- pages and API


def test_binds_loopback_only(running: Running) -> None:
    assert running.server.server_address[0] == "127.0.0.1"
    assert running.server.url == f"http://127.0.0.1:{running.server.port}/"


def test_page_and_its_files_are_served_with_a_strict_policy(running: Running) -> None:
    status, headers, body = running.request("GET", "/")
    assert status == 200 and headers["content-type"].startswith("text/html")
    assert b'<script src="/static/review.js"' in body
    csp = headers["content-security-policy"]
    assert "default-src 'none'" in csp and "script-src 'self'" in csp
    assert headers["x-content-type-options"] == "nosniff"
    for name, kind in (("review.js", "text/javascript"), ("review.css", "text/css")):
        status, headers, body = running.request("GET", f"/static/{name}")
        assert status == 200 and headers["content-type"].startswith(kind) and body
    # nothing is fetched from elsewhere: no absolute URLs in what the page loads
    for name in ("/", "/static/review.js", "/static/review.css"):
        text = running.request("GET", name)[2].decode("utf-8")
        assert "http://" not in text and "https://" not in text and "//cdn" not in text


def test_the_script_never_parses_html() -> None:
    # Captions are untrusted: the page must build its DOM from text only.
    from importlib.resources import files

    script = files("minutes.review").joinpath("static", "review.js").read_text("utf-8")
    for sink in ("innerHTML", "outerHTML", "insertAdjacentHTML", "document.write", "eval(",
                 "new Function"):
        assert sink not in script


@pytest.mark.parametrize("path", ["/static/../edits.py", "/static/index.html.bak",
                                  "/api/nothing", "/fenmoor.json", "/recording/x"])
def test_other_paths_are_not_found(running: Running, path: str) -> None:
    assert running.request("GET", path)[0] == 404


def test_state_carries_the_draft_as_data(running: Running) -> None:
    status, headers, body = running.request("GET", "/api/state")
    assert status == 200 and headers["content-type"].startswith("application/json")
    state = json.loads(body)
    assert state["minutes"]["utterances"][5]["text"] == HOSTILE  # data, escaped as JSON
    assert b"<script>" not in body  # JSON keeps it a string, never markup
    assert state["session"] == {"minutes_file": "fenmoor.json",
                                "review_file": "fenmoor.review.json", "recording": True,
                                "recording_name": "fenmoor.wav", "cues_from_captions": False}
    assert state["minutes"]["actions"][0]["review_state"] == "pending"


# --------------------------------------------------------------------------- edits on disk


def test_an_edit_is_saved_at_once_beside_the_draft(running: Running) -> None:
    before = running.minutes.read_bytes()
    status, state = running.edit({"op": "set", "id": "A1", "fields": {"owner": "Ludo Brisk"}})
    assert status == 200
    assert state["minutes"]["actions"][0]["owner"] == "Ludo Brisk"
    stored = json.loads((running.folder / "fenmoor.review.json").read_bytes())
    assert stored["items"]["A1"] == {"state": "pending", "fields": {"owner": "Ludo Brisk"}}
    assert running.minutes.read_bytes() == before  # never written into the draft
    # the review file is the only file the server made
    assert sorted(p.name for p in running.folder.iterdir()) == [
        "fenmoor.json", "fenmoor.review.json", "fenmoor.wav"]


def test_a_fresh_server_restores_the_review(running: Running) -> None:
    running.edit({"op": "state", "id": "D1", "state": "rejected"})
    running.edit({"op": "rename", "from": "Speaker 1", "to": "Ludo Brisk"})
    again = ReviewSession.open(running.minutes)
    view = again.view()
    assert view["decisions"][0]["review_state"] == "rejected"
    assert view["actions"][0]["owner"] == "Ludo Brisk"


def test_a_bad_edit_is_refused_and_nothing_is_written(running: Running) -> None:
    status, reply = running.edit({"op": "set", "id": "M1", "fields": {"for": -2}})
    assert status == 400 and "whole number from 0" in reply["error"]
    assert not (running.folder / "fenmoor.review.json").exists()


def test_post_needs_json_a_length_and_a_small_body(running: Running) -> None:
    body = b'{"op": "state", "id": "A1", "state": "accepted"}'
    assert running.request("POST", "/api/edit", body,
                           {"Content-Type": "application/x-www-form-urlencoded"})[0] == 415
    assert running.request("POST", "/api/edit", body, {"Content-Type": "text/plain"})[0] == 415
    status, _, _ = running.request("POST", "/api/edit", None,
                                   {"Content-Type": "application/json"})
    assert status == 411
    big = b'{"op": "state", "pad": "' + b"x" * MAX_BODY + b'"}'
    assert running.request("POST", "/api/edit", big, {"Content-Type": "application/json"})[0] \
        == 413
    assert running.request("POST", "/api/edit", b"{not json",
                           {"Content-Type": "application/json"})[0] == 400
    assert running.request("POST", "/api/edit", b"\xff\xfe",
                           {"Content-Type": "application/json"})[0] == 400
    assert running.request("POST", "/elsewhere", body, {"Content-Type": "application/json"})[0] \
        == 404
    assert running.request("POST", "/api/edit", body,
                           {"Content-Type": "application/json; charset=utf-8"})[0] == 200


# --------------------------------------------------------------------------- Host and Origin


@pytest.mark.parametrize("host", ["evil.example", "evil.example:{port}", "127.0.0.1",
                                  "127.0.0.1:1", "localhost.evil.example:{port}", ""])
def test_a_foreign_host_is_refused(running: Running, host: str) -> None:
    # DNS rebinding: another name that resolves to 127.0.0.1 arrives with its own Host.
    host = host.format(port=running.server.port)
    status, _, body = running.request("GET", "/api/state", headers={"Host": host})
    assert status == 403 and b"its own address" in body
    assert running.request("GET", "/", headers={"Host": host})[0] == 403


@pytest.mark.parametrize("origin", ["http://evil.example", "null",
                                    "http://127.0.0.1:{other}", "https://127.0.0.1:{port}"])
def test_a_foreign_origin_is_refused(running: Running, origin: str) -> None:
    origin = origin.format(port=running.server.port, other=running.server.port + 1)
    status, reply = running.edit({"op": "state", "id": "A1", "state": "rejected"},
                                 Origin=origin)
    assert status == 403 and "other pages" in reply["error"]
    assert running.request("GET", "/api/state", headers={"Origin": origin})[0] == 403
    assert not (running.folder / "fenmoor.review.json").exists()


def test_its_own_host_and_origin_are_served(running: Running) -> None:
    port = running.server.port
    for host in (f"127.0.0.1:{port}", f"localhost:{port}"):
        status, _ = running.edit({"op": "state", "id": "A1", "state": "accepted"},
                                 Host=host, Origin=f"http://{host}")
        assert status == 200


def test_a_cross_site_fetch_is_refused(running: Running) -> None:
    status, _ = running.edit({"op": "state", "id": "A1", "state": "accepted"},
                             **{"Sec-Fetch-Site": "cross-site"})
    assert status == 403


# --------------------------------------------------------------------------- byte ranges


@pytest.mark.parametrize(("header", "first", "last"), [
    ("bytes=0-9", 0, 9),
    ("bytes=100-", 100, len(RECORDING) - 1),
    ("bytes=-16", len(RECORDING) - 16, len(RECORDING) - 1),
    ("bytes=10200-99999", 10200, len(RECORDING) - 1),
    ("bytes=-999999", 0, len(RECORDING) - 1),
    ("bytes=5-5", 5, 5),
])
def test_a_range_gives_206_and_exactly_those_bytes(running: Running, header: str, first: int,
                                                   last: int) -> None:
    status, headers, body = running.request("GET", "/recording", headers={"Range": header})
    assert status == 206
    assert headers["content-range"] == f"bytes {first}-{last}/{len(RECORDING)}"
    assert headers["content-length"] == str(last - first + 1)
    assert body == RECORDING[first:last + 1]
    assert headers["content-type"] in ("audio/x-wav", "audio/wav")


@pytest.mark.parametrize("header", ["bytes=10240-", "bytes=20000-20010", "bytes=9-3",
                                    "bytes=-0", "bytes=-", "bytes=a-b", "items=0-5",
                                    "bytes 0-5"])
def test_a_bad_range_gives_416(running: Running, header: str) -> None:
    status, headers, body = running.request("GET", "/recording", headers={"Range": header})
    assert status == 416
    assert headers["content-range"] == f"bytes */{len(RECORDING)}"
    assert body == b""


def test_no_range_or_several_gives_the_whole_file(running: Running) -> None:
    for headers in ({}, {"Range": "bytes=0-1,5-6"}):
        status, got, body = running.request("GET", "/recording", headers=headers)
        assert status == 200 and body == RECORDING
        assert got["accept-ranges"] == "bytes"


def test_if_range_that_no_longer_matches_gives_the_whole_file(running: Running) -> None:
    status, _, body = running.request("GET", "/recording", headers={
        "Range": "bytes=0-9", "If-Range": "Wed, 21 Oct 2015 07:28:00 GMT"})
    assert status == 200 and body == RECORDING
    modified = running.request("HEAD", "/recording")[1]["last-modified"]
    status, _, body = running.request("GET", "/recording", headers={
        "Range": "bytes=0-9", "If-Range": modified})
    assert status == 206 and body == RECORDING[:10]


def test_head_sends_headers_only(running: Running) -> None:
    status, headers, body = running.request("HEAD", "/recording", headers={"Range": "bytes=0-9"})
    assert status == 206 and headers["content-length"] == "10" and body == b""


def test_parse_range_on_an_empty_file() -> None:
    assert _parse_range("bytes=0-", 0) is None
    assert _parse_range("bytes=0-0", 1) == (0, 0)


def test_without_a_recording_there_is_none(tmp_path: Path) -> None:
    run = _start(tmp_path, recording=False)
    try:
        assert run.request("GET", "/recording")[0] == 404
        assert json.loads(run.request("GET", "/api/state")[2])["session"]["recording"] is False
    finally:
        run.server.shutdown()
        run.server.server_close()


# --------------------------------------------------------------------------- export


def test_export_applies_the_review(running: Running) -> None:
    running.edit({"op": "set", "id": "M1", "fields": {"mover": "Ludo Brisk", "for": 4,
                                                      "against": 1, "abstain": 0}})
    running.edit({"op": "state", "id": "D1", "state": "rejected"})
    status, headers, body = running.request("GET", "/api/export?format=md")
    assert status == 200 and headers["content-type"].startswith("text/markdown")
    assert headers["content-disposition"] == 'attachment; filename="fenmoor-reviewed-draft.md"'
    text = body.decode("utf-8")
    assert "Ludo Brisk" in text and "4 for, 1 against, 0 abstaining" in text
    assert "depot stays open" not in text
    assert "DRAFT" in text
    status, headers, body = running.request("GET", "/api/export?format=md&approved_on=2026-04-01")
    assert "Approved on 2026-04-01" in body.decode("utf-8")
    assert headers["content-disposition"] == 'attachment; filename="fenmoor-final.md"'
    assert "DRAFT" not in body.decode("utf-8")


@pytest.mark.parametrize("query", ["format=pdf", "", "format=md&approved_on=April"])
def test_export_refuses_bad_queries(running: Running, query: str) -> None:
    assert running.request("GET", f"/api/export?{query}")[0] == 400


def test_a_missing_recording_is_refused_at_start(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="no such recording"):
        ReviewSession.open(write_sample(tmp_path), recording=tmp_path / "gone.wav")
