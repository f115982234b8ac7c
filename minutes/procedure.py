"""The procedural record of a formal meeting, and its quorum.

Interface (what the pipeline calls)::

    ProcedureReader(ctx)              a SegmentReader, name "procedure"; run it in ``Combined``
                                      after ``MotionReader`` (it reads whether a motion to
                                      approve the minutes carried)
        .read(ledger, segment)        -> list[Op]: ``Add(Event(...))``
    procedural_events(ctx, segments)  -> tuple[Event, ...]: the reader folded over segments
    quorum(attendees, roster)         -> Quorum | None
    clock_at(transcript, seconds)     -> time | None: recording start clock + offset
    spoken_clock(text, expected)      -> time | None: "at 6:32", "seven forty-one p.m."

Events and their ``detail`` (what Robert's Rules of Order, 1915 §60, and 44 CFR 12.12 ask
minutes to hold; see ../shared/evaldata/standards/minutes_content_rules.md):

    call_to_order      "" (or "reconvened" after a recess); ``clock`` = the time spoken
                       ("I'll call this meeting to order at 6:32"), else the recording's start
                       clock + offset, else None
    roll_call          names answering present, in the order called: "Ada Voss, Dev Okafor"
    minutes_approved   "as read", "as distributed"... or "as corrected: <the correction>"
    report             "<Title> report, by <who gave it>"
    public_comment     the speaker's name as they state it ("My name is Dana Ruiz" -> "Dana Ruiz")
    recess             its length or end when stated ("10 minutes", "until 8:05")
    adjournment        ""; ``clock`` as for the call to order
"""

from __future__ import annotations

import datetime as dt
import re
from collections.abc import Sequence

from .model import Attendee, Event, Ledger, Quorum, Roster, Segment, Transcript
from .relay.context import ReadContext
from .relay.ledger import Add, Op, apply
from .relay.motions import (
    ADJOURNED,
    CHAIR_ROLES,
    CLERK_ROLES,
    HYPOTHETICAL,
    INLINE_ANSWER,
    ROLL_CALL,
    Unit,
    answer_of,
    clean,
    digits,
    name_in,
    read_up_to,
    resolve_name,
    segment_span,
    units,
)

# --------------------------------------------------------------------------- clock times


def clock_at(transcript: Transcript, seconds: float) -> dt.time | None:
    """Return the clock time ``seconds`` into the recording (None without a start clock)."""
    start = transcript.meeting.start_clock
    if start is None:
        return None
    moment = dt.datetime.combine(dt.date(2000, 1, 1), start.replace(tzinfo=None))
    moment += dt.timedelta(seconds=round(seconds))
    return moment.time().replace(microsecond=0, tzinfo=start.tzinfo)


_AMPM = r"(?P<ap>a\.?\s?m\b\.?|p\.?\s?m\b\.?|in\s+the\s+(?:morning|afternoon|evening)|tonight|" \
        r"o'clock)?"
_CLOCK_AT = re.compile(r"\b(?:at|it's|it\s+is|now)\s+(?P<h>\d{1,2})(?:(?::|\.|\s+)(?P<m>\d{2})"
                       rf"\b)?\s*{_AMPM}", re.I)
_CLOCK_ANY = re.compile(rf"\b(?P<h>\d{{1,2}}):(?P<m>\d{{2}})\b\s*{_AMPM}", re.I)


def spoken_clock(text: str, expected: dt.time | None = None) -> dt.time | None:
    """Return the clock time said in ``text`` ("at 6:32 p.m.", "at seven forty-one").

    Without "a.m."/"p.m." the hour is read as the one nearer ``expected`` (the recording's
    clock at that moment) when known, else as said.
    """
    t = digits(clean(text))
    t = re.sub(r"\b(?:oh|o)\s+(\d)\b", r"0\1", t)
    for pattern in (_CLOCK_AT, _CLOCK_ANY):
        for m in pattern.finditer(t):
            hour, minute = int(m.group("h")), int(m.group("m") or 0)
            ap = (m.group("ap") or "").replace(" ", "").replace(".", "")
            if not 0 <= hour <= 23 or not 0 <= minute <= 59:
                continue
            if m.group("m") is None and not ap:
                continue  # "at 6" alone may be anything
            if ap.startswith("p") or ap.endswith(("afternoon", "evening")) or ap == "tonight":
                hour = hour % 12 + 12
            elif ap.startswith("a") or ap.endswith("morning"):
                hour %= 12
            elif expected is not None and hour < 12:
                exp = expected.hour * 60 + expected.minute
                hour = min((hour, hour + 12), key=lambda h: abs(h * 60 + minute - exp))
            return dt.time(hour, minute)
    return None


# --------------------------------------------------------------------------- quorum


def quorum(attendees: Sequence[Attendee], roster: Roster | None) -> Quorum | None:
    """Return whether the voting members present make a quorum (None without a roster).

    The quorum is the roster's own number when it sets one; otherwise a majority of the
    members. That default is the rule of Robert's Rules of Order when a body has not set its
    own (stated here from memory; RRO 1915 treats it under "Quorum"), and common practice.
    """
    if roster is None or not roster.members:
        return None
    members = tuple(dict.fromkeys(roster.members))
    present = len({a.name for a in attendees if a.present and a.name in members})
    if roster.quorum is not None:
        required = roster.quorum
        rule = f"the body's rules set a quorum of {required}"
    else:
        required = len(members) // 2 + 1
        rule = (f"a majority of the {len(members)} members, the default under Robert's Rules "
                "of Order when the body sets no quorum (from memory)")
    return Quorum(present, len(members), required, present >= required, rule)


# --------------------------------------------------------------------------- patterns

_CALL_TO_ORDER = re.compile(
    r"\bcall(?:ing|ed)?\s+(?:(?:[\w'.,-]+\s+){0,12}?)(?P<back>back\s+)?to\s+order\b"
    r"|\b(?:meeting|session|board|council|committee|we|hearing)\s+(?:will\s+)?(?:now\s+)?"
    r"(?:please\s+)?(?:come|is|are|be)\s+(?:now\s+)?(?:called\s+)?(?P<back2>back\s+)?to\s+order\b"
    r"|\bcome\s+(?P<back3>back\s+)?to\s+order\b", re.I)
_RECONVENE = re.compile(r"\b(?:back\s+in\s+session|reconven(?:e|ed|ing)|resum(?:e|ing)\s+(?:the|"
                        r"our)\s+meeting)\b", re.I)
_RECESS = re.compile(
    r"\b(?:take|have|call|declare)\s+(?:a|an)\s+(?:(?P<len>[\w-]+(?:[- ][\w]+)?)[- ]minute\s+|"
    r"short\s+|brief\s+|quick\s+)?(?P<what>recess|break)\b(?P<until>\s+until\s+[\d:.\w ]+)?"
    r"|\b(?:we\s+are|we're|we\s+stand|we'll\s+stand|we\s+will\s+stand)\s+(?:now\s+)?in\s+recess\b"
    r"(?P<until2>\s+until\s+[\d:.\w ]+)?|\bwe(?:'ll|\s+will)\s+(?:now\s+)?recess\b"
    r"(?P<until3>\s+until\s+[\d:.\w ]+)?", re.I)
_MINUTES_APPROVED = re.compile(
    r"\bminutes(?:\s+of\s+[^.?!]+?)?\s+(?:are|stand|will\s+stand|have\s+been|is|were)\s+"
    r"(?:hereby\s+)?(?:approved|adopted|accepted)(?:\s+(?P<how>as\s+(?:read|corrected|amended|"
    r"presented|distributed|submitted|written|circulated)))?", re.I)
_CORRECTIONS_ASKED = re.compile(r"\b(?:corrections?|additions?|changes?|amendments?)\b[^.?!]*\?"
                                r"|\bany\s+corrections\b", re.I)
_CORRECTION = re.compile(r"\b(?:should\s+(?:say|read|be|show|reflect|have\s+been|state|list)|"
                         r"correction|instead\s+of|rather\s+than|misspell\w*|spelled|left\s+out|"
                         r"omitted|missing|typo|was\s+(?:absent|present)|not\s+\w+\s+but|"
                         r"change\s+.+\s+to)\b", re.I)
_WHERE = re.compile(r"(?i)\b(?:on\s+page|page\s+\w+|section\s+\w+|under\s+(?:the\s+)?"
                    r"(?:motion|item)|item\s+\w+|paragraph)\b")
_ONE_CORRECTION = re.compile(r"(?i)(?:yes,?\s+|so,?\s+)?(?:i\s+have\s+)?(?:a|one|just\s+one)\s+"
                             r"correction\W*")
_REPORT = re.compile(
    r"^(?:(?:okay|all\s+right|so|and|thank\s+you)[,.]?\s+)*(?:next|now|(?:we(?:'ll|\s+will)|let'?s|"
    r"i'd\s+like\s+to|i\s+would\s+like\s+to)\s+(?:now\s+)?(?:hear|have|get|move\s+(?:on\s+)?to|go"
    r"\s+to|turn\s+to|take|receive|call\s+for)|we\s+(?:also\s+)?have|moving\s+on\s+to|move\s+on\s+"
    r"to|up\s+next|next\s+up|next\s+item|item\s+\w+(?:\s+[a-z])?(?:\s+is|,)|that\s+brings\s+us\s+to|"
    r"i(?:'ll|\s+will)\s+(?:now\s+)?(?:give|present|deliver|make)|here\s+is|here's|this\s+is|"
    r"turning\s+to|on\s+to|may\s+we\s+have|can\s+we\s+(?:have|get)|could\s+we\s+(?:have|get))(?:\b|(?<=,))"
    r"(?P<mid>(?:\s+[\w'.,-]+){0,7}?)\s+report\b(?!\s+(?:back|to|on\s+that|is|was|has))", re.I)
_RECEIVED = re.compile(r"(?i)\bthe\s+(?P<title>[\w' -]{2,60}?)\s+report\s+(?:is|was|has\s+been|"
                       r"will\s+be)\s+(?:received|accepted|filed)\b")
_NOT_GIVEN = re.compile(r"(?i)\b(?:not\s+here|isn't\s+here|absent|carry\s+(?:it|that)\s+over|"
                        r"postpone|defer|skip|not\s+taken\s+up|no\s+report|next\s+month)\b")
_COMMITTEE = re.compile(r"\b((?:[A-Z][\w'-]*\s+){1,4}(?:Committee|Commission|Subcommittee|Task\s+"
                        r"Force|Council|Board))\b")
_PREPOSITIONS = {"in", "on", "about", "from", "through", "into", "for", "with", "of", "at", "by",
                 "under", "per"}
_GENERIC = {"committee", "short committee", "brief committee", "staff", "short", "brief", ""}
_TITLE_STOP = {"the", "our", "a", "an", "to", "is", "hear", "have", "get", "give", "present",
               "with", "for", "next", "now", "take", "receive", "of", "on", "item", "move",
               "go", "turn", "up", "we'll", "will", "let's", "i'll", "deliver", "make", "call",
               "it", "over", "here", "this", "here's", "may", "can", "could", "we", "moving",
               "and", "then", "that", "brings", "us", "at", "from", "first", "second", "also",
               "turning", "short", "brief", "quick", "written", "monthly"}
_GIVER = re.compile(r"\breport\b[^.?!]*?\b(?:from|by|with|given\s+by)\s+(?P<who>[\w'.-]+(?:\s+"
                    r"[\w'.-]+){0,3})", re.I)
_PUBLIC_OPEN = re.compile(r"\b(?:open|opening|opened|move\s+(?:on\s+)?to|now\s+to|turn\s+to|time"
                          r"\s+for|begin|start|hear|next\s+is|next\s+item\s+is|go\s+to|now\s+have|"
                          r"we'll\s+have|take)\b[^.?!]*\bpublic\s+comments?\b|\bpublic\s+comments?"
                          r"\s+(?:period|section|portion|time)?\s*(?:is\s+)?(?:now\s+)?open\b",
                          re.I)
_PUBLIC_NEXT = re.compile(r"(?i)\b(?:brings\s+us\s+to|on\s+to|now\s+for)\s+public\s+comments?")
_PUBLIC_CLOSE = re.compile(r"\b(?:close|closing|closed|concludes?|ends?|end\s+of)\b[^.?!]*\bpublic"
                           r"\s+comments?\b|\bpublic\s+comments?\s+(?:is\s+)?(?:now\s+)?closed\b",
                           re.I)
_MY_NAME = re.compile(r"(?i:\b(?:my\s+name\s+is|my\s+name's|name\s+is)\s+)(?P<name>[^,.;!?]+)"
                      r"|^(?i:(?:hi|hello|yes|okay|good\s+evening),?\s+)?(?i:this\s+is|i'm|i\s+am)\s+"
                      r"(?P<name2>[A-Z][\w'-]+(?:\s+[A-Z][\w'-]+){1,2})\b")
_NAME_STOP = re.compile(r"\s+(?:and|i|i'm|from|with|of|at|here|speaking|on|representing|"
                        r"who|the|live|resident|a|an)\b.*$", re.I)


def _title_case(words: list[str]) -> str:
    return " ".join(w if any(c.isupper() for c in w) else w for w in words)


# --------------------------------------------------------------------------- the reader


class ProcedureReader:
    """Reads the procedural moments of a formal meeting; proposes ``Add(Event)`` operations."""

    name = "procedure"

    def __init__(self, ctx: ReadContext) -> None:
        self.ctx = ctx
        self.directory = ctx.directory
        self.units, self.first = units(ctx.transcript)
        self.where = {(u.utt.index, u.text): u.pos for u in self.units}
        people = ctx.directory.people
        roster = ctx.directory.roster
        self.chairs = {p.name for p in people if p.role in CHAIR_ROLES}
        self.clerks = {p.name for p in people if p.role in CLERK_ROLES}
        if roster:
            self.chairs |= {n for office, n in roster.officers if office in CHAIR_ROLES}
            self.clerks |= {n for office, n in roster.officers if office in CLERK_ROLES}
        self.public = self._public_windows()

    def _public_windows(self) -> list[bool]:
        """Return, per sentence, whether the public comment period is open (read forward)."""
        out = []
        open_ = False
        since = 0
        for u in self.units:
            if _PUBLIC_CLOSE.search(u.clean):
                open_ = False
            elif (_PUBLIC_OPEN.search(u.clean) or _PUBLIC_NEXT.search(u.clean)) \
                    and not u.clean.rstrip().endswith("?"):
                open_, since = True, 0
            elif open_:
                since += 1
                if _MY_NAME.search(u.clean):
                    since = 0
                if since > 80 or re.search(r"(?i)\bi\s+move\b", u.clean):
                    open_ = False
            out.append(open_)
        return out

    def is_chair(self, u: Unit) -> bool:
        return not self.chairs or u.speaker in self.chairs

    def read(self, ledger: Ledger, segment: Segment) -> list[Op]:
        """Return ``Add(Event)`` operations for the procedural moments of this segment."""
        start, stop = segment_span(segment, self.first, len(self.units))
        start = max(start, read_up_to(ledger.events, self.where) + 1)
        ops: list[Op] = []
        local = ledger
        pos = start
        while pos < stop:
            events, pos = self._unit(local, pos)
            for event in events:
                op = Add(event)
                local = apply(local, [op])[0]
                ops.append(op)
        ops += self._minutes_from_motions(local, segment, start, stop)
        return ops

    # ------------------------------------------------------------------ one sentence

    def _event(self, kind: str, u: Unit, detail: str = "", clock: dt.time | None = None,
               focus: str = "") -> Event:
        ev = u.evidence(focus)
        return Event(kind, ev.start, (ev,), detail,
                     clock or clock_at(self.ctx.transcript, ev.start))

    def _clock(self, u: Unit) -> dt.time | None:
        expected = clock_at(self.ctx.transcript, u.utt.start)
        said = spoken_clock(u.clean, expected)
        if said is None:  # "I call the meeting to order. The time is 6:32."
            rest = " ".join(x.clean for x in self.units if x.utt.index == u.utt.index)
            said = spoken_clock(rest, expected)
        return said or expected

    def _unit(self, ledger: Ledger, pos: int) -> tuple[list[Event], int]:
        u = self.units[pos]
        text = u.clean
        kinds = [e.kind for e in ledger.events]
        if (m := _CALL_TO_ORDER.search(text)) and not HYPOTHETICAL.search(text[: m.start()]):
            back = bool(m.group("back") or m.group("back2") or m.group("back3")
                        or _RECONVENE.search(text))
            after_recess = "recess" in kinds and (
                "call_to_order" not in kinds
                or max(i for i, k in enumerate(kinds) if k == "recess")
                > max(i for i, k in enumerate(kinds) if k == "call_to_order"))
            if "call_to_order" not in kinds or back or after_recess:
                detail = "reconvened" if "call_to_order" in kinds else ""
                return [self._event("call_to_order", u, detail, self._clock(u),
                                    _focus(u, r"to\s+order"))], pos + 1
        if _RECONVENE.search(text) and "recess" in kinds and kinds[-1] == "recess":
            return [self._event("call_to_order", u, "reconvened", self._clock(u))], pos + 1
        if ((m := ADJOURNED.search(text)) and "adjournment" not in kinds
                and not HYPOTHETICAL.search(text[: m.start()])
                and not re.search(r"(?i)\bmotion\s+to\s+adjourn\b", text[: m.start()])):
            return [self._event("adjournment", u, "", self._clock(u),
                                _focus(u, r"adjourn\w*"))], pos + 1
        if (m := _RECESS.search(text)) and (m.group("what") != "break" or self.is_chair(u)) \
                and not text.rstrip().endswith("?"):
            return [self._event("recess", u, _recess_detail(m), self._clock(u))], pos + 1
        if ROLL_CALL.search(text) and not re.search(r"(?i)\bvote\b", text):
            event, end = self._roll_call(pos)
            if event is not None:
                return [event], end
        if (m := _MINUTES_APPROVED.search(text)) and not HYPOTHETICAL.search(text[: m.start()]):
            how = (m.group("how") or "").lower()
            return [self._event("minutes_approved", u, self._approval_detail(pos, how))], pos + 1
        m = _REPORT.search(text)
        if (m and (self.is_chair(u) or not text.rstrip().endswith("?"))) or (
                _RECEIVED.search(text) and self.is_chair(u)):
            event = self._report(ledger, u, m)
            if event is not None:
                return [event], pos + 1
        name = self._stated_name(u)
        if name and not any(e.kind == "public_comment" and e.detail == name
                            for e in ledger.events):
            return [self._event("public_comment", u, name)], pos + 1
        return [], pos + 1

    # ------------------------------------------------------------------ the pieces

    def _stated_name(self, u: Unit) -> str | None:
        """Return the name a member of the public gives ("My name is Dana Ruiz"), or None."""
        person = self.directory.resolve(u.speaker)
        public = person is not None and person.role == "public"
        if not (public or (person is None and (self.public[u.pos] or self.directory.people))):
            return None
        m = _MY_NAME.search(u.clean)
        if m and (m.group("name") or self.public[u.pos] or public):
            raw = m.group("name") or m.group("name2")
            words = _NAME_STOP.sub("", raw).strip(" '\"").split()[:4]
            return " ".join(words) or None
        if not self.public[u.pos]:
            return None
        # "Good evening. Caleb Osterhout, Vinegar Hill Road.": a name opening a sentence
        doc = self.ctx.parsed.docs[u.utt.index] if u.utt.index < len(self.ctx.parsed) else None
        offset = u.utt.text.find(u.text)
        first = self.first.get(u.utt.index, -1)
        if doc is None or offset < 0 or u.pos - first > 2:
            return None
        for ent in doc.ents:
            if ent.label_ == "PERSON" and ent.start_char == offset and \
                    doc.text[ent.end_char: ent.end_char + 1] in (",", "."):
                return str(ent.text)
        return None

    def _roll_call(self, pos: int) -> tuple[Event | None, int]:
        """Read an attendance roll call; return its event (None when it is a vote) and end."""
        call = self.units[pos]
        roster = self.directory.roster
        limit = min(len(self.units), pos + max(30, 3 * len(roster.members if roster else ()) + 8))
        present: list[str] = []
        called: str | None = None
        caller: str | None = None
        last = pos
        other = 0
        p = pos + 1
        while p < limit:
            u = self.units[p]
            p += 1
            inline = INLINE_ANSWER.match(u.clean)
            if inline and (name := resolve_name(self.directory, inline.group("who"))):
                how = inline.group("how").lower()
                if how in ("aye", "yes", "yea", "no", "nay", "abstain", "abstains"):
                    return None, pos + 1  # a vote by roll call: the motion reader's business
                if how != "absent":
                    present.append(name)
                caller, called, last = u.speaker, None, p - 1
                continue
            how = answer_of(u)
            words = u.clean.strip(" ?.!,").split()
            callee = resolve_name(self.directory, " ".join(words)) if 0 < len(words) <= 4 \
                else None
            if callee and how is None:
                caller, called, last = u.speaker, callee, p - 1
                continue
            if how is not None and u.speaker != caller:
                if called is None and not present:
                    continue  # "Yes." from the clerk before the first name is called
                if how not in ("present", "absent"):
                    return None, pos + 1  # a vote by roll call: the motion reader's business
                known = self.directory.resolve(u.speaker)
                who = known.name if known else called
                if who and how == "present":
                    present.append(who)
                called, last = None, p - 1
                continue
            other += 1
            if other >= 3 or len(u.bare.split()) > 14:
                break
        if not present:
            return None, pos + 1
        end = self.units[last]
        event = self._event("roll_call", call, ", ".join(dict.fromkeys(present)))
        # cite the last answer too, so the next step knows the roll was read up to there
        return Event(event.kind, event.time, event.evidence + (end.evidence(),), event.detail,
                     event.clock), last + 1

    def _approval_detail(self, pos: int, how: str) -> str:
        if how in ("as corrected", "as amended") or not how and self._correction(pos):
            correction = self._correction(pos)
            return f"as corrected: {correction}" if correction else "as corrected"
        return how or "as read"

    def _correction(self, pos: int) -> str:
        """Return the correction a member offered since the chair asked for corrections.

        The first member's correction, from the sentence that says where ("On page two...")
        to the one that says what it should be, as spoken; repeats of it are left out.
        """
        first: Unit | None = None
        for p in range(pos - 1, max(-1, pos - 40), -1):
            u = self.units[p]
            if self.is_chair(u) and _CORRECTIONS_ASKED.search(u.clean) and (
                    first is not None or re.search(r"(?i)\bminutes\b", u.clean)):
                break  # back at the chair's question ("any other corrections?" may come later)
            if self.is_chair(u) or len(u.bare.split()) < 4 or u.clean.rstrip().endswith("?"):
                continue
            if _CORRECTION.search(u.clean) and not _ONE_CORRECTION.fullmatch(u.clean):
                first = u
        if first is None:
            return ""
        same = [x for x in self.units[max(0, first.pos - 4): first.pos + 1]
                if x.utt.index == first.utt.index]
        start = next((i for i, x in enumerate(same) if _WHERE.search(x.clean)), len(same) - 1)
        picked = [x.clean for x in same[start:] if not _ONE_CORRECTION.fullmatch(x.clean)]
        text = " ".join(picked)
        return re.sub(r"(?i)^(?:yes|yeah|okay|so)[, ]+", "", text).rstrip(" .")

    def _minutes_from_motions(self, ledger: Ledger, segment: Segment, start: int,
                              stop: int) -> list[Op]:
        """Return minutes_approved events for motions to approve the minutes that carried."""
        ops: list[Op] = []
        for motion in ledger.motions:
            if motion.kind != "approve_minutes" or motion.outcome != "carried":
                continue
            change = next((c for c in reversed(motion.history) if c.kind == "outcome"), None)
            if change is None:
                continue
            pos = self.where.get((change.evidence.utterance, change.evidence.quote), -1)
            if not start <= pos < max(stop, start + 1) and not (
                    segment.first <= change.evidence.utterance <= segment.last):
                continue
            if any(e.kind == "minutes_approved" and abs(
                    self.where.get((e.evidence[0].utterance, e.evidence[0].quote), -99) - pos) < 3
                   for e in ledger.events):
                continue
            low = motion.text.lower()
            amended = any(c.kind == "amended" for c in motion.history)
            m = re.search(r"\bas\s+(read|corrected|amended|presented|distributed|submitted|"
                          r"written|circulated)\b", low)
            how = f"as {m.group(1)}" if m else ""
            wc = re.search(r"(?i)\b(?:with|including)\s+(?:the\s+|a\s+)?corrections?\s+"
                           r"(?:that\s+|of\s+)?(?P<c>.+)$", motion.text)
            if wc:
                detail = f"as corrected: {wc.group('c').rstrip(' .')}"
            else:
                detail = self._approval_detail(pos, "as corrected" if amended else how)
            ev = change.evidence
            ops.append(Add(Event("minutes_approved", ev.start, (ev,), detail,
                                 clock_at(self.ctx.transcript, ev.start))))
        return ops

    def _report(self, ledger: Ledger, u: Unit, m: re.Match[str] | None) -> Event | None:
        """Return a report event for an introduction ("Item three, the treasurer's report")."""
        rest = [x for x in self.units[u.pos + 1: u.pos + 4] if x.utt.index == u.utt.index]
        if _NOT_GIVEN.search(" ".join([u.clean] + [x.clean for x in rest])):
            return None  # "Imani usually gives that, and she's not here, so we'll carry it over"
        received = _RECEIVED.search(u.clean)
        words = (m.group("mid") if m else received.group("title") if received else "").split()
        low = [w.lower().strip(",") for w in words]
        dets = [i for i, w in enumerate(low) if w in ("the", "my", "our", "a", "an", "this")]
        if dets and dets[-1] > 0 and low[dets[-1] - 1] in _PREPOSITIONS:
            return None  # "... comes through in the report": a mention, not an introduction
        title: list[str] = []
        for w in reversed(words):
            if w.lower().strip(",") in _TITLE_STOP:
                break
            title.insert(0, w.strip(","))
        person = self.directory.resolve(u.speaker)
        if title and title[0].lower() in ("my", "our"):
            title = title[1:]
            if not title and person and person.role:
                title = [f"{person.role}'s"]
        label = " ".join(title).strip()
        if label.lower() in _GENERIC:
            named = next((c.group(1) for x in [u, *rest] if (c := _COMMITTEE.search(x.clean))),
                         None)
            label = named or label
        name = None
        if g := _GIVER.search(u.clean):
            name = name_in(self.directory, g.group("who"))
        if name is None and re.search(r"(?i)\bi(?:'ll|\s+will)\s+(?:now\s+)?(?:give|present|"
                                      r"deliver|make)|\bhere\s+is\s+my|\bhere's\s+my|\bmy\s+"
                                      r"report\b", u.clean):
            name = u.speaker
        for x in rest:  # "... the treasurer's report. Tom?" / "Desmond, the committee met...?"
            lead = re.match(r"^([\w'.-]+(?:\s+[\w'.-]+)?)(?:[,?]|\s*$)", x.clean)
            if name is None and lead:
                name = name_in(self.directory, lead.group(1))
        if name is None and not received:
            name = self._next_speaker(u)
        if not label and name is None:
            return None
        label = (label[:1].upper() + label[1:] + " report") if label else "Report"
        for e in ledger.events[-8:]:
            if e.kind == "report" and e.detail.split(",")[0].lower() == label.lower():
                return None
        if received and name is None:
            name = self._main_speaker(u)
        detail = f"{label}, by {name}" if name else label
        return self._event("report", u, detail)

    def _main_speaker(self, u: Unit) -> str | None:
        """Return who spoke most in the 40 sentences before a report was received."""
        words: dict[str, int] = {}
        for x in self.units[max(0, u.pos - 40): u.pos]:
            if x.speaker != u.speaker:
                words[x.speaker] = words.get(x.speaker, 0) + len(x.bare.split())
        return max(words, key=lambda k: words[k]) if words else None

    def _next_speaker(self, u: Unit) -> str | None:
        """Return who speaks at length next, not the one introducing the report."""
        seen = 0
        p = u.pos + 1
        while p < len(self.units) and seen < 6:
            v = self.units[p]
            if v.speaker != u.speaker and len(v.bare.split()) >= 6:
                return v.speaker
            seen += 1
            p += 1
        return None


def _focus(u: Unit, words: str) -> str:
    """Return the words from ``words`` to the clock time after it, as said in ``u``."""
    m = re.search(rf"(?i){words}(?:\s+\S+){{0,3}}", u.text)
    return m.group(0) if m else ""


def _recess_detail(m: re.Match[str]) -> str:
    until = m.group("until") or m.group("until2") or m.group("until3")
    if until:
        return " ".join(until.split()).rstrip(" .")
    length = m.group("len")
    if length:
        n = digits(length.replace("-", " "))
        n = re.sub(r"(\d+)\s+(\d)\b", lambda x: str(int(x.group(1)) + int(x.group(2))), n)
        return f"{n} minutes" if n.isdigit() else ""
    return ""


def procedural_events(ctx: ReadContext, segments: Sequence[Segment],
                      ledger: Ledger | None = None) -> tuple[Event, ...]:
    """Return the events ``ProcedureReader`` finds over ``segments``, folded in order."""
    reader = ProcedureReader(ctx)
    ledger = ledger or Ledger()
    for segment in segments:
        ledger = apply(ledger, reader.read(ledger, segment))[0]
    return ledger.events


__all__ = ["ProcedureReader", "clock_at", "procedural_events", "quorum", "spoken_clock"]
