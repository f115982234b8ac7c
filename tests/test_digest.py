"""The interview digest on the three demo interviews (invented; keys by the demo's author).

The interviews are read once per session; clustering and rendering run on those records.
"""

from __future__ import annotations

import json
from collections import Counter
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner
from conftest import DEMO

from minutes import digest
from minutes.cli import main

NAMES = ("interview_01", "interview_02", "interview_03")


@pytest.fixture(scope="session")
def interviews() -> list[digest.Interview]:
    return [digest.read_interview(DEMO / f"{n}.vtt") for n in NAMES]


@pytest.fixture(scope="session")
def keys() -> list[dict]:  # type: ignore[type-arg]
    return [json.loads((DEMO / f"{n}.key.json").read_text("utf-8")) for n in NAMES]


@pytest.fixture(scope="session")
def result(interviews: list[digest.Interview]) -> digest.Digest:
    return digest.build(interviews)


def test_interviewer_is_told_apart_and_themes_use_participants_words(
        interviews: list[digest.Interview], keys: list[dict]) -> None:  # type: ignore[type-arg]
    for iv, key in zip(interviews, keys, strict=True):
        assert iv.interviewers == (key["interviewer"],)
        assert iv.participants == (key["participant"],)
        assert iv.passages and all(p.speaker == key["participant"] for p in iv.passages)
        for part in iv.parts:
            assert all(q.speaker == key["participant"] for q in part.quotes)


def test_interviewer_found_by_questions_without_profiles(tmp_path: Path) -> None:
    vtt = tmp_path / "talk.vtt"
    vtt.write_text("WEBVTT\n\n1\n00:00:01.000 --> 00:00:04.000\n<v Ann>How did you start?\n\n"
                   "2\n00:00:05.000 --> 00:00:12.000\n<v Bo>My uncle had a boat and I went out "
                   "with him every summer from when I was nine years old.\n\n"
                   "3\n00:00:13.000 --> 00:00:15.000\n<v Ann>And what did you like about it?\n\n"
                   "4\n00:00:16.000 --> 00:00:22.000\n<v Bo>The quiet, mostly, and the early "
                   "mornings out on the water before anyone else was up.\n", encoding="utf-8")
    iv = digest.read_interview(vtt)
    assert iv.interviewers == ("Ann",) and iv.participants == ("Bo",)
    assert [p.speaker for p in iv.passages] == ["Bo", "Bo"]


def test_parts_have_titles_times_and_verbatim_timed_quotes(
        interviews: list[digest.Interview], keys: list[dict]) -> None:  # type: ignore[type-arg]
    from minutes.ingest import read_transcript

    for name, iv, key in zip(NAMES, interviews, keys, strict=True):
        assert len(iv.parts) >= 5, [p.title for p in iv.parts]
        starts = [p.start for p in iv.parts]
        assert starts == sorted(starts)
        utterances = read_transcript(DEMO / f"{name}.vtt").utterances
        cues = {c.id: c for u in utterances for c in u.cues}
        turn_start = {c.id: u.start for u in utterances for c in u.cues}
        quotes = [q for p in iv.parts for q in p.quotes]
        assert len(quotes) >= len(iv.parts)
        for q in quotes:  # verbatim: the quote's words are in the cue it cites, at its time
            cue = cues[q.cue]  # type: ignore[index]
            assert cue.start == q.start
            assert q.text.split()[0].strip(",.?") in cue.text or q.text[:20] in cue.text
        # most parts open at one of the key's topic questions (the interviewer's guide)
        topics = [turn_start[t["cue"]] for t in key["topic_questions"]]
        opened = sum(1 for p in iv.parts[1:] if any(abs(t - p.start) < 1.0 for t in topics))
        # Measured: parts after the opening that start at a key topic question: 01 7 of 9
        # (9 topic questions), 02 4 of 7 (6), 03 4 of 7 (5).
        assert opened * 2 >= len(iv.parts) - 1


def _key_theme(key: dict, passage: digest.Passage) -> str | None:  # type: ignore[type-arg]
    votes = Counter({t["theme"]: len(set(passage.cues) & set(t["cues"])) for t in key["themes"]})
    theme, n = votes.most_common(1)[0]
    return theme if n else None


def test_themes_match_the_keys_shared_themes(result: digest.Digest,
                                             keys: list[dict]) -> None:  # type: ignore[type-arg]
    ivs = result.interviews
    found: dict[str, list[digest.Theme]] = {}
    for theme in result.themes:
        labels = Counter(_key_theme(keys[i], ivs[i].passages[k]) for i, k in theme.members)
        labels.pop(None, None)
        if labels:
            found.setdefault(labels.most_common(1)[0][0], []).append(theme)
    key_themes = [t["theme"] for t in keys[0]["themes"]]
    mapped = [t for t in key_themes if t in found]
    # every key theme is present in all three interviews: the cells of its themes show it
    cells = sum(1 for t in mapped for i in range(3)
                if any(th.cells[i].count for th in found[t]))
    print(f"key themes mapped {len(mapped)}/{len(key_themes)}; cells {cells}/12;"
          f" {len(result.themes)} themes found")
    # Measured: 4 of 4 key themes are the majority of a found theme (9 themes found), and
    # all 12 of their interview cells have passages.
    assert len(mapped) == 4
    assert cells == 12


def test_matrix_cells_count_passages_and_quote_one_of_them(result: digest.Digest) -> None:
    for theme in result.themes:
        assert sum(1 for c in theme.cells if c.count) >= 2  # a theme spans interviews
        for i, cell in enumerate(theme.cells):
            mine = [k for j, k in theme.members if j == i]
            assert cell.count == len(mine)
            if cell.count:
                sentences = [q for k in mine for q in result.interviews[i].passages[k].sentences]
                assert cell.quote in sentences
        assert theme.name and all(p == p.lower() for p in theme.phrases)


def test_agglomerative_clustering_and_silhouette_by_hand() -> None:
    pts = np.array([[1, 0], [0.95, 0.05], [0, 1], [0.05, 0.95], [0.7, 0.7]], dtype=float)
    pts /= np.linalg.norm(pts, axis=1, keepdims=True)
    merges = digest.agglomerate(pts)
    assert len(merges) == 5 and len(merges[-1]) == 1
    two = next(m for m in merges if len(m) == 3)
    assert sorted(sorted(c) for c in two) == [[0, 1], [2, 3], [4]]
    good = digest.silhouette(pts[:4], [[0, 1], [2, 3]])
    bad = digest.silhouette(pts[:4], [[0, 2], [1, 3]])
    assert good > 0.8 and bad < 0


@pytest.mark.parametrize("fmt", ["md", "json", "docx"])
def test_render_every_format(result: digest.Digest, fmt: str) -> None:
    data = digest.render_digest(result, fmt)
    if fmt == "json":
        doc = json.loads(data)
        assert [iv["source"] for iv in doc["interviews"]] == [f"{n}.vtt" for n in NAMES]
        assert len(doc["themes"]) == len(result.themes)
        assert all(len(t["cells"]) == 3 for t in doc["themes"])
    elif fmt == "md":
        text = data.decode()
        assert "## Theme by interview" in text and "| Theme | interview_01.vtt |" in text
        assert "DRAFT" in text
    else:
        import io

        import docx

        document = docx.Document(io.BytesIO(data))
        assert len(document.tables) == 2
        assert document.tables[1].rows[0].cells[1].text == "interview_01.vtt"


def test_digest_command_writes_the_digest(tmp_path: Path) -> None:
    out = tmp_path / "digest.json"
    files = [str(DEMO / f"{n}.vtt") for n in NAMES]
    result = CliRunner().invoke(main, ["digest", *files, "-o", str(out), "-q", "--jobs", "1"])
    assert result.exit_code == 0, result.output
    doc = json.loads(out.read_text("utf-8"))
    assert len(doc["interviews"]) == 3 and doc["themes"]
    result = CliRunner().invoke(main, ["digest", *files, "-o", str(out), "-q"])
    assert result.exit_code == 1 and "already exists" in result.stderr
    result = CliRunner().invoke(main, ["digest", files[0], "-o", str(tmp_path / "d.pdf")])
    assert result.exit_code == 2
    result = CliRunner().invoke(main, ["digest", files[0], "-o", str(tmp_path / "d.md"),
                                       "--key-out", str(tmp_path / "k.json")])
    assert result.exit_code == 2 and "--pseudonymise" in result.stderr
