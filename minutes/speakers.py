"""Speaker profiles: who a caption label or a spoken name refers to.

Profiles are TOML files (see ``speaker_profiles/``)::

    [roster]                      # optional: a body with members who vote
    body = "Board of Directors"
    quorum = 4                    # members needed; absent: a majority of members
    two_thirds = ["amend the bylaws"]
    record_seconder = false

    [[person]]
    name = "Ada Voss"
    role = "chair"                # chair, secretary, member, staff, participant...
    aliases = ["Ada", "Chair", "Madam Chair"]
    organisation = "Harbourview"
    votes = true
    voice_sample = ""             # optional path, relative to the file

A label resolves by exact name, then alias, then a unique first or last name,
all case-insensitive. Unknown labels stay as given and are listed.
"""

from __future__ import annotations

import tomllib
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from .errors import InputError
from .model import Attendee, MeetingInfo, Person, Roster, Transcript

OFFICES = ("chair", "vice chair", "secretary", "treasurer", "clerk", "presiding officer")


@dataclass(frozen=True)
class Directory:
    """The people a meeting may involve, and the body's roster if there is one."""

    people: tuple[Person, ...] = ()
    roster: Roster | None = None

    def resolve(self, label: str) -> Person | None:
        """Return the person a caption label or spoken name refers to, or None."""
        key = _key(label)
        if not key:
            return None
        for person in self.people:
            if _key(person.name) == key:
                return person
        for person in self.people:
            if any(_key(alias) == key for alias in person.aliases):
                return person
        parts = [p for p in self.people if key in (_key(n) for n in person_names(p))]
        return parts[0] if len(parts) == 1 else None

    @property
    def names(self) -> tuple[str, ...]:
        """Return canonical names of everyone in the directory."""
        return tuple(p.name for p in self.people)

    def role_of(self, name: str) -> str:
        """Return the role of the named person ('' when unknown)."""
        person = self.resolve(name)
        return person.role if person else ""


def person_names(person: Person) -> tuple[str, ...]:
    """Return the single-word names a person may be called by: first and last name."""
    words = [w for w in person.name.split() if w[:1].isupper()]
    return tuple(dict.fromkeys(words[:1] + words[-1:]))


def _key(text: str) -> str:
    return " ".join(text.lower().replace(".", " ").split())


def _str_list(value: Any, path: Path, field: str) -> tuple[str, ...]:
    if value is None:
        return ()
    if isinstance(value, str):
        return (value,)
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise InputError(f"'{field}' must be a list of strings", path=str(path))
    return tuple(value)


def _text(table: dict[str, Any], key: str, path: Path, where: str) -> str:
    value = table.get(key, "")
    if not isinstance(value, str):
        raise InputError(f"{where}'{key}' must be a string, not {type(value).__name__}",
                         path=str(path))
    return value


def _flag(table: dict[str, Any], key: str, path: Path, where: str) -> bool:
    value = table.get(key, False)
    if not isinstance(value, bool):
        raise InputError(f"{where}'{key}' must be true or false, not {value!r}", path=str(path))
    return value


def read_toml(path: Path) -> dict[str, Any]:
    """Return the parsed TOML file, or raise InputError naming the line."""
    try:
        data = path.read_bytes()
    except OSError as exc:
        raise InputError(f"cannot read the file ({exc.strerror})", path=str(path)) from exc
    try:
        return tomllib.loads(data.decode("utf-8-sig"))
    except UnicodeDecodeError as exc:
        raise InputError("TOML files must be UTF-8", path=str(path)) from exc
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"not valid TOML: {exc}", path=str(path)) from exc


def load_profiles(path: Path) -> Directory:
    """Return the directory of people in a profile file, or every ``*.toml`` in a folder."""
    files = sorted(path.glob("*.toml")) if path.is_dir() else [path]
    if not path.exists():
        raise InputError("no such profile file or folder", path=str(path))
    people: list[Person] = []
    roster: Roster | None = None
    for file in files:
        data = read_toml(file)
        entries = data.get("person", [])
        if not isinstance(entries, list):
            raise InputError("'person' must be an array of tables: [[person]]", path=str(file))
        for n, entry in enumerate(entries, 1):
            where = f"person #{n}: "
            if not isinstance(entry, dict):
                raise InputError(f"{where}must be a table", path=str(file))
            name = _text(entry, "name", file, where).strip()
            if not name:
                raise InputError(f"{where}needs a 'name'", path=str(file))
            sample = _text(entry, "voice_sample", file, where)
            people.append(
                Person(
                    name=name,
                    role=_text(entry, "role", file, where).strip().lower(),
                    aliases=_str_list(entry.get("aliases"), file, "aliases"),
                    organisation=_text(entry, "organisation", file, where),
                    votes=_flag(entry, "votes", file, where),
                    voice_sample=str((file.parent / sample).resolve()) if sample else "",
                )
            )
        if "roster" in data:
            roster = _roster(data["roster"], file, people)
    if roster is not None and not roster.members:
        roster = replace(roster, members=tuple(p.name for p in people if p.votes))
    return Directory(tuple(people), roster)


def _roster(table: Any, path: Path, people: Sequence[Person]) -> Roster:
    if not isinstance(table, dict):
        raise InputError("'roster' must be a table: [roster]", path=str(path))
    quorum = table.get("quorum")
    if quorum is not None and (not isinstance(quorum, int) or isinstance(quorum, bool)
                               or quorum < 1):
        raise InputError("'quorum' must be a whole number of members, 1 or more", path=str(path))
    officers = tuple(
        (p.role, p.name) for p in people if p.role in OFFICES
    )
    return Roster(
        body=_text(table, "body", path, "roster: "),
        members=_str_list(table.get("members"), path, "members"),
        officers=officers,
        quorum=quorum,
        two_thirds=_str_list(table.get("two_thirds"), path, "two_thirds"),
        record_seconder=_flag(table, "record_seconder", path, "roster: "),
    )


def resolve_speakers(
    transcript: Transcript, directory: Directory
) -> tuple[Transcript, tuple[str, ...]]:
    """Return the transcript with labels resolved to names, and the labels left unknown."""
    unknown: dict[str, None] = {}
    utterances = []
    for u in transcript.utterances:
        label = u.label or u.speaker
        person = directory.resolve(label)
        if person is None and label:
            unknown[label] = None
        utterances.append(replace(u, speaker=person.name if person else u.speaker, label=label))
    return replace(transcript, utterances=tuple(utterances)), tuple(unknown)


def attendance(
    transcript: Transcript, directory: Directory, meeting: MeetingInfo
) -> tuple[Attendee, ...]:
    """Return who was present (spoke, or listed present) and which roster members were absent."""
    spoke = set(transcript.speakers)
    listed_present = {directory.resolve(n).name if directory.resolve(n) else n  # type: ignore[union-attr]
                      for n in meeting.present}
    listed_absent = {directory.resolve(n).name if directory.resolve(n) else n  # type: ignore[union-attr]
                     for n in meeting.absent}
    members = set(directory.roster.members) if directory.roster else set()
    out: list[Attendee] = []
    seen: set[str] = set()

    def kind_of(person: Person | None, name: str) -> str:
        if name in members or (person and person.votes):
            return "member"
        if person and person.role in ("staff", "clerk", "counsel"):
            return "staff"
        if person and person.role == "public":
            return "public"
        return "member" if person and not members else "guest"

    for person in directory.people:
        name = person.name
        present = (name in spoke or name in listed_present) and name not in listed_absent
        if not present and name not in members and name not in listed_absent:
            continue  # a profile of someone who had no part in this meeting
        out.append(Attendee(name, person.role, present, kind_of(person, name)))
        seen.add(name)
    resolved_any = bool(directory.people)
    for name in _ordered(list(transcript.speakers) + sorted(listed_present)):
        if resolved_any and directory.resolve(name) is None and name not in listed_present:
            continue  # a caption label no profile knows ("Public Speaker"): listed apart
        if name not in seen:
            out.append(Attendee(name, "", name not in listed_absent, "guest"))
            seen.add(name)
    return tuple(out)


def _ordered(names: Iterable[str]) -> list[str]:
    return list(dict.fromkeys(n for n in names if n))
