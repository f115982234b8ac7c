"""WebVTT reading: the W3C spec's examples, the web-platform-test cue text cases, the
samples webvtt-py ships, and hand-made cases for markup, entities and broken blocks."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
import webvtt

from minutes.errors import InputError
from minutes.ingest import read_transcript
from minutes.ingest.cuetext import Node, cue_text_pieces, parse_cue_text
from minutes.model import Cue, Transcript


def write(tmp_path: Path, text: str, name: str = "in.vtt") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def cues(transcript: Transcript) -> list[tuple[str, Cue]]:
    return [(u.speaker, c) for u in transcript.utterances for c in u.cues]


def by_time(transcript: Transcript) -> dict[float, list[tuple[str, str]]]:
    out: dict[float, list[tuple[str, str]]] = {}
    for speaker, cue in cues(transcript):
        out.setdefault(cue.start, []).append((speaker, cue.text))
    return out


# --------------------------------------------------------------------------- WPT cue text trees


def render(node: Node, depth: int = 0) -> str:
    """Write a cue text tree in the WPT "#document-fragment" notation."""
    out = ""
    pad = "| " + "  " * depth
    for child in node.children:
        if child.kind == "text":
            out += f'{pad}"{child.text}"\n'
        elif child.kind == "timestamp":
            out += f"{pad}<?timestamp {child.text}?>\n"
        else:
            tag = "span" if child.kind in ("c", "v", "lang") else child.kind
            out += f"{pad}<{tag}>\n"
            attrs = {"class": " ".join(child.classes)} if child.classes else {}
            if child.kind == "v":
                attrs["title"] = child.annotation
            if child.kind == "lang":
                attrs["lang"] = child.annotation
            for key in sorted(attrs):
                out += f'| {"  " * (depth + 1)}{key}="{attrs[key]}"\n'
            out += render(child, depth + 1)
    return out


def wpt_cases() -> list[tuple[str, str]]:
    from conftest import EVALDATA

    path = EVALDATA / "webvtt" / "wpt_cue_text_tags.expected.json"
    if not path.is_file():
        return []
    return [(c["text"], c["expectedTree"]) for c in json.loads(path.read_text("utf-8"))]


# web-platform-tests webvtt/parsing/cue-text-parsing/tags (via w3c/webvtt.js @ 986949e,
# CC0 / W3C test suite licence): the input had its final newline added by the extractor
# (buildtests.py quotes input[:-1]), so it is removed here.
@pytest.mark.parametrize(("text", "expected"), wpt_cases(), ids=lambda v: repr(v)[:40])
def test_cue_text_tree_matches_wpt(text: str, expected: str) -> None:
    assert render(parse_cue_text(text[:-1])) == expected


def test_wpt_cases_are_all_there(evaldata: Path) -> None:
    assert len(wpt_cases()) == 28  # PROVENANCE.md: 28 malformed/edge tag cues


def test_wpt_vtt_voices(evaldata: Path) -> None:
    # wpt_cue_text_tags.vtt (same source): cue n runs n..n+1 s; expected trees give
    # "<v>test" title="", "<v a b>test" title="a b", "<v.a.b>test" title="" class="a b",
    # "a<v.d e>b</v>c": only "b" inside the voice "e".
    t = read_transcript(evaldata / "webvtt" / "wpt_cue_text_tags.vtt")
    seen = by_time(t)
    assert seen[21.0] == [("", "test")]
    assert seen[22.0] == [("a", "test")]
    assert seen[23.0] == [("a b", "test")]
    assert seen[24.0] == [("", "test")]
    assert seen[25.0] == [("", "test")]
    assert seen[26.0] == [("", "a"), ("e", "b"), ("", "c")]
    assert seen[27.0] == [("", "abc")]  # <lang.d e>: a language, not a voice
    assert seen[19.0] == [("", "abde")]  # ruby base kept, its <rt> reading left out
    assert seen[8.0] == [("", "x")] and seen[9.0] == [("", "x")]
    # cues whose text is only a broken tag ("<", "<<", "</") are skipped with a warning
    assert 0.0 not in seen and "line 3: cue has no text; skipped" in t.warnings


# --------------------------------------------------------------------------- W3C spec examples


def test_w3c_interview_voices_and_overlap(evaldata: Path) -> None:
    # W3C WebVTT spec (w3c/webvtt @ 92a85cc, index.bs 150-189): multi-word voices, mm:ss
    # timestamps, overlapping cues with settings, <i> inside a voice.
    t = read_transcript(evaldata / "webvtt" / "w3c_spec_interview.vtt")
    flat = cues(t)
    assert len(flat) == 13
    assert [c.start for _, c in flat] == sorted(c.start for _, c in flat)
    assert flat[0] == ("Roger Bingham", Cue(None, 11.0, 13.0, "We are in New York City", 3))
    assert ("Neil deGrasse Tyson", "Laughs") in [(s, c.text) for s, c in flat]
    assert by_time(t)[30.0] == [("Roger Bingham", "When we e-mailed\u2014")]
    assert t.speakers == ("Roger Bingham", "Neil deGrasse Tyson")
    assert t.warnings == ()


def test_w3c_voice_span_ends_at_close_tag(evaldata: Path) -> None:
    # W3C spec index.bs 438-450: in "<v Esme>Hee!</v> <i>laughter</i>" only "Hee!" is
    # Esme's; "<v.first.loud Esme>" is the voice "Esme" with classes.
    t = read_transcript(evaldata / "webvtt" / "w3c_spec_voice_classes.vtt")
    assert [(s, c.text) for s, c in cues(t)] == [
        ("Esme", "It's a blue apple tree!"), ("Mary", "No way!"), ("Esme", "Hee!"),
        ("", "laughter"), ("Mary", "That's awesome!")]


def test_webvtt_py_gives_the_whole_cue_to_the_voice(evaldata: Path) -> None:
    # Why we parse cue text ourselves: webvtt-py 0.6.0 attributes all of
    # "Hee!</v> <i>laughter</i>" to Esme (webvtt-py-0.6.0.parse.json records the same).
    caption = webvtt.read(str(evaldata / "webvtt" / "w3c_spec_voice_classes.vtt")).captions[2]
    assert (caption.voice, caption.text) == ("Esme", "Hee! laughter")
    assert cue_text_pieces(caption.raw_text) == [("Esme", "Hee!"), ("", "laughter")]


def test_w3c_regions_are_skipped_and_cues_read(evaldata: Path) -> None:
    # W3C spec index.bs 525-559: REGION header blocks, hh:mm:ss.mmm, roll-up cues.
    t = read_transcript(evaldata / "webvtt" / "w3c_spec_regions.vtt")
    assert [(s, c.start, c.end) for s, c in cues(t)] == [
        ("Fred", 0.0, 20.0), ("Bill", 2.5, 22.5), ("Fred", 5.0, 25.0), ("Bill", 7.5, 27.5),
        ("Fred", 10.0, 30.0), ("Fred", 12.5, 32.5)]
    assert cues(t)[3][1].text == "Sure! I've only had one today."


# --------------------------------------------------------------------------- webvtt-py samples


def test_webvtt_py_non_padded_timestamps(evaldata: Path) -> None:
    # webvtt-py 0.6.0 sdist tests/samples/non_padded_timestamps.vtt (MIT): upstream expects
    # 00:00:03.540, 00:01:05.200 -> 01:02:07.950, voice "John Smith". The spec rejects such
    # timestamps; we read them as webvtt-py does and warn, naming each timing line.
    t = read_transcript(evaldata / "webvtt" / "webvttpy_non_padded_timestamps.vtt")
    flat = cues(t)
    assert [(c.start, c.end) for _, c in flat] == [(0.0, 3.54), (3.54, 7.23), (65.2, 3727.95)]
    assert flat[1] == ("John Smith", Cue("6e2b1f0c-0d3a-4c1e-9a7b-2f5d8e1c4a90/17-0", 3.54,
                                         7.23, "Morning, let's get started.", 8))
    assert [w.split(",")[0] for w in t.warnings] == ["line 4", "line 8", "line 12"]
    assert all("not in the WebVTT form" in w for w in t.warnings)


def test_webvtt_py_voice_spans(evaldata: Path) -> None:
    # webvtt-py 0.6.0 tests/test_webvtt.py test_parse_voice_spans (MIT): voices
    # "Lisa Simpson", "Homer Simpson", "Lisa Simpson" (with classes), text without tags.
    t = read_transcript(evaldata / "webvtt" / "webvttpy_voice_spans_inline.vtt")
    assert [(s, c.text) for s, c in cues(t)] == [
        ("Lisa Simpson", "Knock knock"), ("Homer Simpson", "Who's there?"),
        ("Lisa Simpson", "Atish")]


def test_webvtt_py_regions_sample(evaldata: Path) -> None:
    # webvtt-py 0.6.0 tests/samples/regions.vtt (MIT): curly apostrophe kept.
    t = read_transcript(evaldata / "webvtt" / "webvttpy_regions.vtt")
    assert [(s, c.text) for s, c in cues(t)] == [("Fred", "Hi, my name is Fred"),
                                                 ("Bill", "Hi, I\u2019m Bill")]


# --------------------------------------------------------------------------- hand-made cases


def test_markup_is_stripped(tmp_path: Path) -> None:
    text = ("WEBVTT\n\nm1\n00:00:01.000 --> 00:00:03.000\n"
            "<v Ada><b>Bold</b>, <i>italic</i>, <u>under</u> <c.loud.red>classed</c> "
            "<00:00:02.000>timed <lang fr>oui</lang> <ruby>漢<rt>kan</rt></ruby>字\n")
    t = read_transcript(write(tmp_path, text))
    plain = "Bold, italic, under classed timed oui 漢字"
    assert cues(t) == [("Ada", Cue("m1", 1.0, 3.0, plain, 4))]


def test_entities_are_unescaped(tmp_path: Path) -> None:
    # the spec decodes HTML character references in cue text and in annotations
    text = ("WEBVTT\n\n00:01.000 --> 00:02.000\n"
            "<v Ben &amp; Jo>a &amp; b &lt;c&gt; d&nbsp;e &lrm;f&rlm; &mdash; &#39;g&#x27;\n")
    (speaker, cue), = cues(read_transcript(write(tmp_path, text)))
    assert speaker == "Ben & Jo"
    assert cue.text == "a & b <c> d\u00a0e \u200ef\u200f \u2014 'g'"


def test_escaped_angle_brackets_are_not_tags() -> None:
    assert cue_text_pieces("&lt;v Ada&gt;not a voice") == [("", "<v Ada>not a voice")]


def test_two_voices_in_one_cue_become_two_pieces(tmp_path: Path) -> None:
    text = ("WEBVTT\n\nc7\n00:00:05.000 --> 00:00:07.000\n"
            "<v Ada>Shall we vote?</v>\n<v Ben>Yes, now.</v>\n")
    t = read_transcript(write(tmp_path, text))
    assert [(u.speaker, u.text, [c.id for c in u.cues]) for u in t.utterances] == [
        ("Ada", "Shall we vote?", ["c7"]), ("Ben", "Yes, now.", ["c7"])]


def test_voice_runs_across_lines(tmp_path: Path) -> None:
    # an unclosed <v> holds to the end of the cue, over its line breaks (spec tree);
    # webvtt-py's Caption.voice reads only the first line
    text = "WEBVTT\n\n00:01.000 --> 00:04.000\n<v Ada>first line\nsecond line\n"
    assert [(s, c.text) for s, c in cues(read_transcript(write(tmp_path, text)))] == [
        ("Ada", "first line second line")]


def test_cue_without_voice_has_empty_speaker(tmp_path: Path) -> None:
    text = "WEBVTT\n\n00:01.000 --> 00:02.000\nJust words\n"
    (speaker, cue), = cues(read_transcript(write(tmp_path, text)))
    assert (speaker, cue.text, cue.id) == ("", "Just words", None)


def test_notes_styles_and_settings_are_not_text(tmp_path: Path) -> None:
    text = ("WEBVTT - a title\nKind: captions\n\nSTYLE\n::cue { color: red }\n\n"
            "NOTE a comment\n\nx\n00:01.000 --> 00:02.000 align:start line:0\n<v A>hi\n\n"
            "NOTE another\n")
    assert [(s, c.id, c.text) for s, c in cues(read_transcript(write(tmp_path, text)))] == [
        ("A", "x", "hi")]


BROKEN = """WEBVTT

a
00:00:01.000 --> 00:00:02.000
<v Ada>One.

b
00:00:0x.000 --> 00:00:04.000
<v Ada>Broken.

c
00:00:05.000 --> 00:00:06.000
<v Ada>Three.

d
00:01:61.000 --> 00:01:62.000
<v Ada>Seconds over 59.
"""


def test_broken_timestamp_skips_the_cue_and_names_its_line(tmp_path: Path) -> None:
    # webvtt-py drops these blocks silently; the warning must name line 8 and line 16
    t = read_transcript(write(tmp_path, BROKEN))
    assert [c.id for _, c in cues(t)] == ["a", "c"]
    assert [c.line for _, c in cues(t)] == [4, 12]
    assert len(t.warnings) == 2
    assert t.warnings[0].startswith("line 8: cannot read the timing line '00:00:0x.000")
    assert t.warnings[1].startswith("line 16: cannot read the timing line '00:01:61.000")
    # what webvtt-py 0.6.0 itself gives: the two good cues, no trace of the others
    assert [c.identifier for c in webvtt.from_string(BROKEN).captions] == ["a", "c"]


def test_only_broken_cues_is_an_error(tmp_path: Path) -> None:
    text = "WEBVTT\n\n00:00:0x.000 --> 00:00:04.000\nBroken.\n"
    with pytest.raises(InputError, match="no readable cue.*line 3"):
        read_transcript(write(tmp_path, text))


def test_timing_line_after_two_lines_starts_a_new_block(tmp_path: Path) -> None:
    # spec "collect a block": a "-->" line that cannot be this block's timing line ends
    # the block, so "id" + "extra line" is a block of text (ignored) and the cue follows
    # with no identifier; webvtt-py 0.6.0 splits the same way
    text = ("WEBVTT\n\nid\nextra line\n00:00:01.000 --> 00:00:02.000\nread\n\n"
            "00:00:03.000 --> 00:00:04.000\nkept\n")
    t = read_transcript(write(tmp_path, text))
    assert [(c.id, c.text, c.line) for _, c in cues(t)] == [(None, "read", 5),
                                                            (None, "kept", 8)]


def test_reversed_times_are_fixed_with_a_warning(tmp_path: Path) -> None:
    text = "WEBVTT\n\nr\n00:00:05.000 --> 00:00:03.000\n<v A>back\n"
    t = read_transcript(write(tmp_path, text))
    (_, cue), = cues(t)
    assert (cue.start, cue.end) == (5.0, 5.0)
    assert t.warnings == ("line 4, cue 'r': end 00:00:03.000 is before start 00:00:05.000; "
                          "end set to the start",)


def test_times_past_99_hours(tmp_path: Path) -> None:
    text = "WEBVTT\n\n123:00:00.000 --> 123:00:01.500\nlate\n"
    (_, cue), = cues(read_transcript(write(tmp_path, text)))
    assert (cue.start, cue.end) == (442800.0, 442801.5)


def test_vtt_without_header_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="line 1: does not start with 'WEBVTT'"):
        read_transcript(write(tmp_path, "00:01.000 --> 00:02.000\nhello\n"))


def test_vtt_holding_srt_says_so(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="looks like SRT"):
        read_transcript(write(tmp_path, "1\n00:00:01,000 --> 00:00:02,000\nhello\n"))


def test_header_must_be_followed_by_space_or_line_end(tmp_path: Path) -> None:
    # the spec's signature check; webvtt-py would accept "WEBVTTX"
    with pytest.raises(InputError, match="WEBVTT"):
        read_transcript(write(tmp_path, "WEBVTTX\n\n00:01.000 --> 00:02.000\nhi\n"))


def test_header_only_has_no_cues(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="no cues"):
        read_transcript(write(tmp_path, "WEBVTT\n\nNOTE nothing here\n"))


def test_warnings_are_bounded(tmp_path: Path) -> None:
    broken = "".join(f"\n00:00:{i % 60:02d}.00x --> 00:00:59.000\nbad {i}\n" for i in range(600))
    t = read_transcript(write(tmp_path, "WEBVTT\n" + broken + "\n00:01.000 --> 00:02.000\nok\n"))
    assert [u.text for u in t.utterances] == ["ok"]
    assert len(t.warnings) == 501 and t.warnings[-1] == "100 more warnings not shown"
    assert t.warnings[0].startswith("line 3:") and t.warnings[499].startswith(f"line {3 * 500}:")
