"""Writing a transcript as WebVTT or SRT captions.

WebVTT follows the W3C WebVTT specification: a ``WEBVTT`` header, cues with identifiers and
``HH:MM:SS.mmm`` timings, ``<v Name>`` voice spans for speakers, and ``&amp;``, ``&lt;``,
``&gt;`` escapes in cue text. SRT has no voice markup: the speaker goes in front of the text as
``Name: ``, the habit most caption tools read back (common practice).
"""

from __future__ import annotations

from collections.abc import Iterator

from ..model import Cue, Transcript, Utterance


def timestamp(seconds: float, sep: str = ".") -> str:
    """Return ``seconds`` as HH:MM:SS.mmm (``sep`` "," gives SRT's HH:MM:SS,mmm)."""
    ms = max(0, round(seconds * 1000))
    hours, ms = divmod(ms, 3_600_000)
    minutes, ms = divmod(ms, 60_000)
    secs, ms = divmod(ms, 1000)
    return f"{hours:02d}:{minutes:02d}:{secs:02d}{sep}{ms:03d}"


def _escape(text: str) -> str:
    text = " ".join(text.split())  # a blank line would end the cue
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _voice(name: str) -> str:
    # A voice annotation runs to the closing ">"; keep it plain.
    return " ".join(name.replace(">", " ").replace("<", " ").replace("&", "and").split())


def _cues(transcript: Transcript) -> Iterator[tuple[Utterance, Cue]]:
    """Yield every cue with its utterance; an utterance without cues is one cue."""
    used = {c.id for u in transcript.utterances for c in u.cues if c.id}
    counter = 0
    for utt in transcript.utterances:
        for cue in utt.cues or (Cue(id=None, start=utt.start, end=utt.end, text=utt.text),):
            if cue.id:
                yield utt, cue
                continue
            counter += 1
            while str(counter) in used:
                counter += 1
            used.add(str(counter))
            yield utt, Cue(id=str(counter), start=cue.start, end=cue.end, text=cue.text)


def write_vtt(transcript: Transcript) -> str:
    """Return the transcript as a WebVTT document, one cue per recognised cue."""
    lines = ["WEBVTT", ""]
    for utt, cue in _cues(transcript):
        ident = " ".join(str(cue.id).replace("-->", "- ->").split())
        end = max(cue.end, cue.start)
        text = _escape(cue.text)
        speaker = _voice(utt.speaker)
        lines += [ident, f"{timestamp(cue.start)} --> {timestamp(end)}",
                  f"<v {speaker}>{text}" if speaker else text, ""]
    return "\n".join(lines)


def write_srt(transcript: Transcript, speakers: bool = True) -> str:
    """Return the transcript as SRT, numbered from 1, with "Speaker: " before each cue."""
    blocks = []
    for number, (utt, cue) in enumerate(_cues(transcript), start=1):
        text = " ".join(cue.text.split())
        if speakers and utt.speaker:
            text = f"{utt.speaker}: {text}"
        end = max(cue.end, cue.start)
        blocks.append(f"{number}\n{timestamp(cue.start, ',')} --> {timestamp(end, ',')}\n"
                      f"{text}\n")
    return "\n".join(blocks)
