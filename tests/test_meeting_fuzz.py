"""Hostile meeting files and speaker profiles: a clear InputError, never a traceback."""

from __future__ import annotations

import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from minutes.errors import InputError
from minutes.meeting import load_meeting
from minutes.speakers import load_profiles

SETTINGS = settings(max_examples=80, deadline=None,
                    suppress_health_check=[HealthCheck.function_scoped_fixture])

# TOML values of every type, under the keys the readers look at.
values = st.recursive(
    st.none().map(lambda _: '""') | st.integers(-10**6, 10**6).map(str)
    | st.booleans().map(lambda b: str(b).lower()) | st.text(max_size=30).map(repr)
    | st.sampled_from(["2026-10-14", "18:30:00", "1979-05-27T07:32:00Z", "nan", "inf"]),
    lambda children: st.lists(children, max_size=4).map(lambda xs: "[" + ", ".join(xs) + "]"),
    max_leaves=8,
)
meeting_keys = st.sampled_from(
    "title body kind date place start_clock next_meeting template profiles present absent "
    "agenda other".split())
person_keys = st.sampled_from("name role aliases organisation votes voice_sample".split())


def check(reader, data: bytes) -> None:  # type: ignore[no-untyped-def]
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "x.toml"
        path.write_bytes(data)
        try:
            reader(path)
        except InputError as exc:
            assert str(path) in str(exc)


@SETTINGS
@given(st.binary(max_size=400))
def test_random_bytes_never_crash_the_meeting_reader(data: bytes) -> None:
    check(load_meeting, data)


@SETTINGS
@given(st.lists(st.tuples(meeting_keys, values), max_size=8),
       st.lists(st.lists(st.tuples(st.sampled_from(["title", "number", "notes"]), values),
                         max_size=3), max_size=3))
def test_well_formed_toml_with_wrong_types_gives_input_errors(
    pairs: list[tuple[str, str]], agenda: list[list[tuple[str, str]]]
) -> None:
    lines = [f"{k} = {v}" for k, v in dict(pairs).items()]
    for item in agenda:
        lines.append("[[agenda]]")
        lines += [f"{k} = {v}" for k, v in dict(item).items()]
    check(load_meeting, "\n".join(lines).encode("utf-8"))


@SETTINGS
@given(st.binary(max_size=400))
def test_random_bytes_never_crash_the_profile_reader(data: bytes) -> None:
    check(load_profiles, data)


@SETTINGS
@given(st.lists(st.lists(st.tuples(person_keys, values), max_size=6), max_size=4),
       st.lists(st.tuples(st.sampled_from(["body", "quorum", "members", "two_thirds",
                                           "record_seconder"]), values), max_size=5))
def test_profiles_with_wrong_types_give_input_errors(
    people: list[list[tuple[str, str]]], roster: list[tuple[str, str]]
) -> None:
    lines = []
    for person in people:
        lines.append("[[person]]")
        lines += [f"{k} = {v}" for k, v in dict(person).items()]
    if roster:
        lines.append("[roster]")
        lines += [f"{k} = {v}" for k, v in dict(roster).items()]
    check(load_profiles, "\n".join(lines).encode("utf-8"))


def test_a_truncated_profile_names_the_file(tmp_path: Path) -> None:
    path = tmp_path / "p.toml"
    path.write_text('[[person]]\nname = "Ada Vo', encoding="utf-8")
    with pytest.raises(InputError, match="not valid TOML") as info:
        load_profiles(path)
    assert str(path) in str(info.value)


def test_a_boolean_is_not_a_quorum(tmp_path: Path) -> None:
    path = tmp_path / "p.toml"
    path.write_text("[roster]\nquorum = true\n", encoding="utf-8")
    with pytest.raises(InputError, match="quorum"):
        load_profiles(path)
