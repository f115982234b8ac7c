"""Speaker profiles: loading, label resolution, attendance."""

from __future__ import annotations

from pathlib import Path

import pytest

from minutes.errors import InputError
from minutes.model import MeetingInfo, Transcript, Utterance
from minutes.speakers import Directory, attendance, load_profiles, resolve_speakers

PROFILE = """
[roster]
body = "Lakeside Tenants' Council"
quorum = 3
two_thirds = ["amend the bylaws"]

[[person]]
name = "Ada Voss"
role = "Chair"
aliases = ["Chair Voss", "Madam Chair"]
votes = true

[[person]]
name = "Ben Ortiz"
role = "secretary"
votes = true

[[person]]
name = "Chen Wu"
role = "member"
aliases = ["CW (phone)"]
votes = true

[[person]]
name = "Dara Quinn"
role = "staff"
"""


@pytest.fixture()
def profile(tmp_path: Path) -> Path:
    path = tmp_path / "council.toml"
    path.write_text(PROFILE, encoding="utf-8")
    return path


def utt(i: int, label: str, text: str = "hello") -> Utterance:
    return Utterance(i, float(i), float(i) + 1, label, text, (), label)


def test_labels_resolve_by_name_alias_and_unique_first_or_last_name(profile: Path) -> None:
    d = load_profiles(profile)
    assert d.resolve("ada voss").name == "Ada Voss"  # type: ignore[union-attr]
    assert d.resolve("Madam Chair").name == "Ada Voss"  # type: ignore[union-attr]
    assert d.resolve("CW (phone)").name == "Chen Wu"  # type: ignore[union-attr]
    assert d.resolve("Ortiz").name == "Ben Ortiz"  # type: ignore[union-attr]
    assert d.resolve("Dara").name == "Dara Quinn"  # type: ignore[union-attr]
    assert d.resolve("Speaker 7") is None
    assert d.resolve("") is None


def test_roster_members_are_the_voting_people_and_officers_come_from_roles(profile: Path) -> None:
    roster = load_profiles(profile).roster
    assert roster is not None
    assert roster.members == ("Ada Voss", "Ben Ortiz", "Chen Wu")
    assert ("chair", "Ada Voss") in roster.officers
    assert ("secretary", "Ben Ortiz") in roster.officers
    assert roster.quorum == 3 and roster.two_thirds == ("amend the bylaws",)


def test_unknown_labels_stay_as_given_and_are_listed(profile: Path) -> None:
    d = load_profiles(profile)
    t = Transcript((utt(0, "Chair Voss"), utt(1, "Guest 1"), utt(2, "Guest 1")))
    resolved, unknown = resolve_speakers(t, d)
    assert [u.speaker for u in resolved.utterances] == ["Ada Voss", "Guest 1", "Guest 1"]
    assert [u.label for u in resolved.utterances] == ["Chair Voss", "Guest 1", "Guest 1"]
    assert unknown == ("Guest 1",)


def test_attendance_marks_members_present_when_they_speak_or_are_listed(profile: Path) -> None:
    d = load_profiles(profile)
    t, _ = resolve_speakers(Transcript((utt(0, "Madam Chair"), utt(1, "Dara"),
                                        utt(2, "Guest 1"))), d)
    people = {a.name: a for a in attendance(t, d, MeetingInfo(present=("Ben Ortiz",)))}
    assert people["Ada Voss"].present and people["Ada Voss"].kind == "member"
    assert people["Ben Ortiz"].present  # listed present, never spoke
    assert not people["Chen Wu"].present and people["Chen Wu"].kind == "member"
    assert people["Dara Quinn"].kind == "staff"
    # a label no profile knows is listed apart (unknown speakers), not guessed into attendance
    assert "Guest 1" not in people


def test_without_profiles_everyone_who_speaks_attends() -> None:
    t = Transcript((utt(0, "Mei"), utt(1, "Speaker 2")))
    people = attendance(t, Directory(), MeetingInfo())
    assert [(a.name, a.present) for a in people] == [("Mei", True), ("Speaker 2", True)]


def test_listed_absent_overrides_speaking(profile: Path) -> None:
    d = load_profiles(profile)
    t, _ = resolve_speakers(Transcript((utt(0, "Chen Wu"),)), d)
    people = {a.name: a for a in attendance(t, d, MeetingInfo(absent=("Chen",)))}
    assert not people["Chen Wu"].present


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("[[person]]\nrole = 'x'\n", "needs a 'name'"),
        ("[[person]]\nname = 3\n", "'name' must be a string"),
        ("[[person]]\nname = 'A'\naliases = 'B'\n[roster]\nquorum = 0\n", "quorum"),
        ("person = 'x'\n", "array of tables"),
        ("[[person]\nname='x'", "not valid TOML"),
    ],
)
def test_bad_profiles_give_errors_naming_the_file(tmp_path: Path, text: str, message: str) -> None:
    path = tmp_path / "bad.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(InputError, match=message) as info:
        load_profiles(path)
    assert str(path) in str(info.value)


def test_a_folder_of_profiles_is_read_in_name_order(tmp_path: Path) -> None:
    (tmp_path / "b.toml").write_text('[[person]]\nname = "Bo Lind"\n', encoding="utf-8")
    (tmp_path / "a.toml").write_text('[[person]]\nname = "Al Roy"\n', encoding="utf-8")
    assert load_profiles(tmp_path).names == ("Al Roy", "Bo Lind")


def test_missing_profile_path_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="no such profile"):
        load_profiles(tmp_path / "nope.toml")
