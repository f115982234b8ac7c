"""read_transcript and decode: encodings, format by extension and content, clear errors."""

from __future__ import annotations

from pathlib import Path

import pytest

from minutes.errors import InputError, UsageError
from minutes.ingest import EXTENSIONS, READERS, decode, read_transcript

VTT = "WEBVTT\n\nc1\n00:00:01.000 --> 00:00:02.000\n<v Zoë>Ça va, naïve café?\n"


def put(tmp_path: Path, data: bytes, name: str = "in.vtt") -> Path:
    path = tmp_path / name
    path.write_bytes(data)
    return path


def only_text(path: Path, **kwargs: str) -> tuple[str, str]:
    (u,) = read_transcript(path, **kwargs).utterances
    return u.speaker, u.text


def test_registries() -> None:
    assert set(READERS) == {"vtt", "srt", "txt", "json"}
    assert EXTENSIONS == {".vtt": "vtt", ".srt": "srt", ".txt": "txt", ".json": "json"}


@pytest.mark.parametrize("data", [
    VTT.encode("utf-8"),
    b"\xef\xbb\xbf" + VTT.encode("utf-8"),
    b"\xff\xfe" + VTT.encode("utf-16-le"),
    b"\xfe\xff" + VTT.encode("utf-16-be"),
    b"\xff\xfe\x00\x00" + VTT.encode("utf-32-le"),
    VTT.replace("\n", "\r\n").encode("utf-8"),
    VTT.replace("\n", "\r").encode("utf-8"),
], ids=["utf-8", "utf-8-bom", "utf-16-le-bom", "utf-16-be-bom", "utf-32-le-bom", "crlf", "cr"])
def test_encodings_and_line_ends(tmp_path: Path, data: bytes) -> None:
    assert only_text(put(tmp_path, data)) == ("Zoë", "Ça va, naïve café?")


def test_explicit_encoding_is_used_as_given(tmp_path: Path) -> None:
    path = put(tmp_path, VTT.encode("cp1252"))
    with pytest.raises(InputError, match=r"line 5: is not valid UTF-8 text.*--encoding"):
        read_transcript(path)
    assert only_text(path, encoding="cp1252") == ("Zoë", "Ça va, naïve café?")


def test_unknown_encoding_name() -> None:
    with pytest.raises(InputError, match="unknown encoding 'klingon'"):
        decode(b"WEBVTT\n", "x.vtt", "klingon")


def test_wrong_explicit_encoding_names_the_line() -> None:
    with pytest.raises(InputError, match="x.vtt, line 2: cannot be decoded as ascii"):
        decode("WEBVTT\né\n".encode(), "x.vtt", "ascii")


def test_utf16_without_bom_is_refused_with_a_hint(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="looks like UTF-16-LE.*--encoding utf-16-le"):
        read_transcript(put(tmp_path, VTT.encode("utf-16-le")))
    with pytest.raises(InputError, match="looks like UTF-16-BE.*--encoding utf-16-be"):
        read_transcript(put(tmp_path, VTT.encode("utf-16-be")))


def test_empty_file(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="the file is empty"):
        read_transcript(put(tmp_path, b""))


def test_blank_file(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="only blank space"):
        read_transcript(put(tmp_path, b" \n\r\n\t\n", "in.txt"))


def test_binary_file(tmp_path: Path) -> None:
    data = b"RIFF\x24\x08\x00\x00WAVEfmt \x10\x00\x00\x00\x01\x00" + bytes(range(256)) * 4
    with pytest.raises(InputError, match="not valid UTF-8 text|binary file"):
        read_transcript(put(tmp_path, data, "in.txt"))


def test_stray_nul_is_replaced_with_a_warning(tmp_path: Path) -> None:
    text = VTT + "\n" + "".join(f"\nn{i}\n00:00:{i + 3:02d}.000 --> 00:00:{i + 3:02d}.500\n"
                                f"<v A>cue {i}.\n" for i in range(40))
    text = text.replace("cue 30.", "cue\0 30.")
    t = read_transcript(put(tmp_path, text.encode()))
    line = text.split("\n").index("<v A>cue\0 30.") + 1
    assert t.warnings == (f"line {line}: NUL character replaced by U+FFFD",)
    assert any(c.text == "cue\ufffd 30." for u in t.utterances for c in u.cues)


def test_missing_file_and_folder(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="file not found"):
        read_transcript(tmp_path / "nope.vtt")
    folder = tmp_path / "dir.vtt"
    folder.mkdir()
    with pytest.raises(InputError, match="is a folder"):
        read_transcript(folder)


def test_unknown_extension_lists_the_known_ones(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"extension '\.docx'.*\.vtt, \.srt, \.txt, \.json"):
        read_transcript(put(tmp_path, b"WEBVTT\n", "notes.docx"))
    with pytest.raises(InputError, match="has no extension"):
        read_transcript(put(tmp_path, b"WEBVTT\n", "captions"))


@pytest.mark.parametrize("name", ["call.mp3", "call.WAV", "call.mp4", "call.m4a"])
def test_audio_goes_to_the_audio_path(tmp_path: Path, name: str) -> None:
    with pytest.raises(InputError, match="recording.*speech recognition: use the audio path"):
        read_transcript(put(tmp_path, b"\x00\x01", name))


def test_txt_holding_webvtt_is_read_as_webvtt(tmp_path: Path) -> None:
    t = read_transcript(put(tmp_path, VTT.encode(), "captions.txt"))
    assert t.format == "vtt"
    assert t.warnings == ("the file is named as txt but holds WebVTT; read as WebVTT",)
    assert t.utterances[0].cues[0].id == "c1"


def test_srt_holding_webvtt_and_txt_holding_srt(tmp_path: Path) -> None:
    assert read_transcript(put(tmp_path, VTT.encode(), "a.srt")).format == "vtt"
    srt = b"1\n00:00:01,000 --> 00:00:02,000\nHello.\n"
    t = read_transcript(put(tmp_path, srt, "b.txt"))
    assert (t.format, t.warnings) == ("srt", ("the file is named as txt but holds SRT "
                                              "captions; read as SRT",))


def test_explicit_format(tmp_path: Path) -> None:
    path = put(tmp_path, b"[00:00:01] Ada: Hello.\n", "odd.log")
    t = read_transcript(path, format="txt")
    assert (t.format, t.utterances[0].speaker, t.source) == ("txt", "Ada", str(path))
    with pytest.raises(UsageError, match="choose one of vtt, srt, txt, json"):
        read_transcript(path, format="doc")
    with pytest.raises(InputError, match="audio path"):
        read_transcript(path, format="audio")


def test_result_fields(tmp_path: Path) -> None:
    path = put(tmp_path, VTT.encode())
    t = read_transcript(path)
    (u,) = t.utterances
    assert (t.source, t.format, u.index, u.speaker, u.label) == (str(path), "vtt", 0, "Zoë",
                                                                 "Zoë")
