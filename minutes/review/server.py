"""The local review page: a small HTTP server on 127.0.0.1 for one draft and its review.

Routes (everything else is 404)::

    GET  /                      the page (static HTML; data comes from /api/state)
    GET  /static/review.js|css  the page's script and style, from the package
    GET  /api/state             the draft with the review applied (the view), the review
    POST /api/edit              one edit (JSON, see ``edits.validate_edit``); saved at once
    GET  /api/export?format=md|docx|json[&approved_on=YYYY-MM-DD]   the final minutes
    GET  /recording             the recording, with byte ranges (206, 416), if one was given

Safety: the server binds loopback only; it answers only requests whose Host is its own
address and whose Origin, when sent, is its own origin (a page elsewhere, or a name
rebound to 127.0.0.1, gets 403); POSTs must be JSON, at most ``MAX_BODY`` bytes; every
edit is checked before it is stored; the only file it writes is the review file, through
a temporary file and a rename. The page builds its DOM from text, never from HTML, and a
Content-Security-Policy allows only its own script and style.
"""

from __future__ import annotations

import datetime as dt
import email.utils
import json
import mimetypes
import re
import threading
from collections.abc import Callable
from dataclasses import dataclass, field
from http import HTTPStatus
from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer
from importlib.resources import files
from pathlib import Path
from typing import Any
from urllib.parse import parse_qs, urlsplit

from ..errors import InputError, MinutesError, UsageError
from ..model import Roster
from ..output import write_atomic
from .edits import (
    apply_review,
    digest,
    dump_review,
    load_review,
    new_review,
    record,
    review_path,
    validate_edit,
)
from .export import export
from .loader import minutes_from_json
from .sources import CueFinder, cue_finder, roster_for

MAX_BODY = 64 * 1024  # one edit is a few hundred bytes; a span of 50 pieces a few KiB
STATIC = {"review.js": "text/javascript; charset=utf-8",
          "review.css": "text/css; charset=utf-8"}
EXPORT_TYPES = {
    "md": "text/markdown; charset=utf-8",
    "docx": "application/vnd.openxmlformats-officedocument.wordprocessingml.document",
    "json": "application/json; charset=utf-8",
}
CSP = ("default-src 'none'; script-src 'self'; style-src 'self'; connect-src 'self'; "
       "media-src 'self'; img-src 'self'; base-uri 'none'; form-action 'none'; "
       "frame-ancestors 'none'")
CHUNK = 64 * 1024


@dataclass
class ReviewSession:
    """One draft under review: its data, the review so far, and where the review is saved."""

    minutes_path: Path
    data: dict[str, Any]
    sha256: str
    review_file: Path
    review: dict[str, Any]
    recording: Path | None = None
    roster: Roster | None = None
    cue_of: CueFinder | None = None
    notes: tuple[str, ...] = ()  # what was found beside the draft, for the start-up message
    lock: threading.Lock = field(default_factory=threading.Lock)

    @classmethod
    def open(cls, minutes_path: Path, *, recording: Path | None = None,
             profiles: Path | None = None) -> ReviewSession:
        """Return a session for the draft in ``minutes_path``, its review loaded if one exists."""
        from .loader import read_minutes_json

        data = read_minutes_json(minutes_path)
        raw = minutes_path.read_bytes()
        minutes_from_json(data, source=str(minutes_path))  # fail now, not at export
        sha = digest(raw)
        where = review_path(minutes_path)
        if recording is not None and not recording.is_file():
            raise InputError("no such recording file", path=str(recording))
        review = load_review(where, data, sha) if where.exists() else \
            new_review(minutes_path.name, sha)
        roster, roster_from = roster_for(minutes_path, data, profiles)
        finder, captions = cue_finder(minutes_path, data)
        notes = []
        if roster_from:
            notes.append(f"roster and rules from {roster_from}")
        if captions:
            notes.append(f"cues of added items from {captions}")
        return cls(minutes_path, data, sha, where, review, recording, roster, finder,
                   tuple(notes))

    def view(self) -> dict[str, Any]:
        """Return the draft as the page shows it: review applied, rejected items kept."""
        out = apply_review(self.data, self.review, drop_rejected=False)
        for key in ("decisions", "actions", "motions", "questions", "proposals"):
            for item in out.get(key, []):
                item.pop("history", None)  # the page does not show it; keep replies small
        return out

    def state(self) -> dict[str, Any]:
        """Return what the page loads: the view, the review, and facts about the session."""
        with self.lock:
            return {"minutes": self.view(), "review": self.review,
                    "session": {"minutes_file": self.minutes_path.name,
                                "review_file": self.review_file.name,
                                "recording": self.recording is not None,
                                "recording_name": self.recording.name if self.recording else "",
                                "cues_from_captions": self.cue_of is not None}}

    def edit(self, payload: Any) -> dict[str, Any]:
        """Check and store one edit, write the review file, and return the new state."""
        with self.lock:
            checked = validate_edit(payload, self.data, self.review, self.cue_of)
            updated = json.loads(json.dumps(self.review))
            record(updated, checked)
            write_atomic(self.review_file, dump_review(updated), force=True,
                         inputs=[self.minutes_path])
            self.review = updated
        return self.state()

    def export(self, fmt: str, approved_on: dt.date | None) -> bytes:
        """Return the final minutes in ``fmt`` with the review applied."""
        with self.lock:
            review = json.loads(json.dumps(self.review))
        return export(self.data, review, fmt, approved_on=approved_on, roster=self.roster,
                      source=str(self.minutes_path))


class ReviewServer(ThreadingHTTPServer):
    """A threading HTTP server for one ``ReviewSession``, on loopback."""

    daemon_threads = True
    allow_reuse_address = False  # a second review on the same port must fail, not share it

    def __init__(self, session: ReviewSession, port: int = 0,
                 log: Callable[[str], None] | None = None) -> None:
        self.session = session
        self.log = log
        super().__init__(("127.0.0.1", port), ReviewHandler)
        self.port = int(self.server_address[1])
        self.hosts = {f"127.0.0.1:{self.port}", f"localhost:{self.port}"}
        self.origins = {f"http://{h}" for h in self.hosts}

    @property
    def url(self) -> str:
        """Return the page's address."""
        return f"http://127.0.0.1:{self.port}/"

    def handle_error(self, request: Any, client_address: Any) -> None:
        # A browser drops media connections mid-stream all the time: that is not an error.
        import sys

        exc = sys.exc_info()[1]
        if isinstance(exc, (ConnectionError, TimeoutError)):
            return
        super().handle_error(request, client_address)


_RANGE = re.compile(r"^bytes=([0-9]*)-([0-9]*)$")


class ReviewHandler(BaseHTTPRequestHandler):
    """Answers the routes listed at the top of this module."""

    server: ReviewServer
    server_version = "minutes-review"
    sys_version = ""
    protocol_version = "HTTP/1.1"
    timeout = 60  # a stalled client must not hold a thread for ever

    # ----------------------------------------------------------------- plumbing

    def log_message(self, format: str, *args: Any) -> None:
        if self.server.log is not None:
            self.server.log(format % args)

    def _headers(self, status: int, ctype: str, length: int,
                 extra: dict[str, str] | None = None) -> None:
        self.send_response(status)
        self.send_header("Content-Type", ctype)
        self.send_header("Content-Length", str(length))
        self.send_header("Content-Security-Policy", CSP)
        self.send_header("X-Content-Type-Options", "nosniff")
        self.send_header("Referrer-Policy", "no-referrer")
        self.send_header("X-Frame-Options", "DENY")
        self.send_header("Cross-Origin-Resource-Policy", "same-origin")
        self.send_header("Cache-Control", "no-store")
        for key, value in (extra or {}).items():
            self.send_header(key, value)
        self.end_headers()

    def _send(self, status: int, body: bytes, ctype: str,
              extra: dict[str, str] | None = None) -> None:
        self._headers(status, ctype, len(body), extra)
        if self.command != "HEAD":
            self.wfile.write(body)

    def _json(self, status: int, payload: Any) -> None:
        text = json.dumps(payload, ensure_ascii=False)
        # Markup characters only occur inside JSON strings, where \u escapes mean the same;
        # so no caption reaches the wire as a tag, even to a client that sniffs.
        text = text.replace("<", "\\u003c").replace(">", "\\u003e").replace("&", "\\u0026")
        body = text.encode("utf-8")
        self._send(status, body, "application/json; charset=utf-8")

    def _error(self, status: int, message: str) -> None:
        self._json(status, {"error": message})

    def _allowed(self) -> bool:
        """Return whether Host and Origin name this server; answer 403 when not."""
        host = self.headers.get("Host", "")
        origin = self.headers.get("Origin")
        if host not in self.server.hosts:
            # DNS rebinding: a page on evil.example resolved to 127.0.0.1 sends its own Host.
            self._error(HTTPStatus.FORBIDDEN, "this server answers only to its own address")
            return False
        if origin is not None and origin not in self.server.origins:
            self._error(HTTPStatus.FORBIDDEN, "requests from other pages are refused")
            return False
        if self.headers.get("Sec-Fetch-Site") == "cross-site":
            self._error(HTTPStatus.FORBIDDEN, "requests from other pages are refused")
            return False
        return True

    # ----------------------------------------------------------------- methods

    def do_HEAD(self) -> None:
        self.do_GET()

    def do_GET(self) -> None:
        if not self._allowed():
            return
        url = urlsplit(self.path)
        path = url.path
        if path == "/":
            self._static("index.html", "text/html; charset=utf-8")
        elif path.startswith("/static/") and path[len("/static/"):] in STATIC:
            name = path[len("/static/"):]
            self._static(name, STATIC[name])
        elif path == "/api/state":
            self._json(HTTPStatus.OK, self.server.session.state())
        elif path == "/api/export":
            self._export(parse_qs(url.query))
        elif path == "/favicon.ico":  # browsers ask; there is none, and that is fine
            self._send(HTTPStatus.NO_CONTENT, b"", "text/plain")
        elif path == "/recording" and self.server.session.recording is not None:
            self._recording(self.server.session.recording)
        else:
            self._error(HTTPStatus.NOT_FOUND, "no such page")

    def do_POST(self) -> None:
        if not self._allowed():
            return
        if urlsplit(self.path).path != "/api/edit":
            self._error(HTTPStatus.NOT_FOUND, "no such page")
            return
        ctype = self.headers.get("Content-Type", "").split(";")[0].strip().lower()
        if ctype != "application/json":
            # A cross-site HTML form cannot send JSON: this closes the last CSRF door.
            self._error(HTTPStatus.UNSUPPORTED_MEDIA_TYPE, "edits must be sent as JSON")
            return
        length_text = self.headers.get("Content-Length")
        if length_text is None or not length_text.isdigit():
            self._error(HTTPStatus.LENGTH_REQUIRED, "a Content-Length is required")
            return
        length = int(length_text)
        if length > MAX_BODY:
            self.close_connection = True  # do not read what we refuse
            self._error(HTTPStatus.REQUEST_ENTITY_TOO_LARGE,
                        f"an edit must be at most {MAX_BODY} bytes")
            return
        raw = self.rfile.read(length)
        try:
            payload = json.loads(raw.decode("utf-8"))
        except (UnicodeDecodeError, json.JSONDecodeError):
            self._error(HTTPStatus.BAD_REQUEST, "the edit is not valid JSON")
            return
        try:
            state = self.server.session.edit(payload)
        except UsageError as exc:
            self._error(HTTPStatus.BAD_REQUEST, str(exc))
            return
        except MinutesError as exc:  # the review file could not be written
            self._error(HTTPStatus.INTERNAL_SERVER_ERROR, f"not saved: {exc}")
            return
        self._json(HTTPStatus.OK, state)

    # ----------------------------------------------------------------- routes

    def _static(self, name: str, ctype: str) -> None:
        body = files("minutes.review").joinpath("static", name).read_bytes()
        self._send(HTTPStatus.OK, body, ctype)

    def _export(self, query: dict[str, list[str]]) -> None:
        fmt = (query.get("format") or [""])[0]
        if fmt not in EXPORT_TYPES:
            self._error(HTTPStatus.BAD_REQUEST, "format must be one of: "
                        + ", ".join(EXPORT_TYPES))
            return
        approved_text = (query.get("approved_on") or [""])[0]
        approved = None
        if approved_text:
            try:
                approved = dt.date.fromisoformat(approved_text)
            except ValueError:
                self._error(HTTPStatus.BAD_REQUEST, "approved_on must be a date like "
                            "2026-11-11")
                return
        try:
            body = self.server.session.export(fmt, approved)
        except MinutesError as exc:
            self._error(HTTPStatus.INTERNAL_SERVER_ERROR, str(exc))
            return
        stem = re.sub(r"[^A-Za-z0-9._-]+", "_", self.server.session.minutes_path.stem)
        name = f"{stem}-{'final' if approved else 'reviewed-draft'}.{fmt}"
        self._send(HTTPStatus.OK, body, EXPORT_TYPES[fmt],
                   {"Content-Disposition": f'attachment; filename="{name}"'})

    def _recording(self, path: Path) -> None:
        try:
            stat = path.stat()
        except OSError:
            self._error(HTTPStatus.NOT_FOUND, "the recording is gone")
            return
        size = stat.st_size
        ctype = mimetypes.guess_type(path.name)[0] or "application/octet-stream"
        modified = email.utils.formatdate(stat.st_mtime, usegmt=True)
        common = {"Accept-Ranges": "bytes", "Last-Modified": modified}
        header = self.headers.get("Range")
        if_range = self.headers.get("If-Range")
        if header is not None and if_range is not None and if_range != modified:
            header = None  # the file changed since the client's copy: send it whole
        if header is None or "," in header:
            # No range, or several: the whole file (RFC 9110 lets a server ignore Range).
            self._file(path, HTTPStatus.OK, 0, size, ctype, common)
            return
        span = _parse_range(header.strip(), size)
        if span is None:
            body = b""
            self._headers(HTTPStatus.REQUESTED_RANGE_NOT_SATISFIABLE, "text/plain", len(body),
                          {**common, "Content-Range": f"bytes */{size}"})
            return
        start, end = span
        self._file(path, HTTPStatus.PARTIAL_CONTENT, start, end - start + 1, ctype,
                   {**common, "Content-Range": f"bytes {start}-{end}/{size}"})

    def _file(self, path: Path, status: int, start: int, length: int, ctype: str,
              extra: dict[str, str]) -> None:
        self._headers(status, ctype, length, extra)
        if self.command == "HEAD":
            return
        with path.open("rb") as handle:
            handle.seek(start)
            left = length
            while left > 0:
                chunk = handle.read(min(CHUNK, left))
                if not chunk:
                    break
                self.wfile.write(chunk)
                left -= len(chunk)


def _parse_range(header: str, size: int) -> tuple[int, int] | None:
    """Return (first, last) byte of a single ``bytes=`` range, or None when unsatisfiable."""
    match = _RANGE.match(header)
    if match is None or size == 0:
        return None
    first, last = match.groups()
    if not first and not last:
        return None
    if not first:  # a suffix: the last N bytes
        count = int(last)
        if count == 0:
            return None
        return max(0, size - count), size - 1
    start = int(first)
    if start >= size:
        return None
    end = size - 1 if not last else min(int(last), size - 1)
    if int(last or size - 1) < start:
        return None
    return start, end


def serve(session: ReviewSession, port: int = 0,
          log: Callable[[str], None] | None = None) -> ReviewServer:
    """Return a review server for ``session``, bound to 127.0.0.1 (``port`` 0: any free one)."""
    return ReviewServer(session, port, log)
