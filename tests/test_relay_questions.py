"""Open questions: what counts as an answer (invented lines, parsed with the real pipeline)."""

from __future__ import annotations

from test_relay_rules import run


def unanswered(lines: list[tuple[str, str | list[str]]]) -> list[str]:
    return [q.text for q in run(lines).questions if not q.answered]


def test_a_narrative_that_answers_an_interview_question_closes_it() -> None:
    # research interviews: the interviewee's long reply is the answer, even when it uses
    # "I'll look at..." of habit or ends a statement on a rising "?" in the captions
    assert unanswered([
        ("Kim Lee", "Like, what actually happens, from when you wake up?"),
        ("Priya Shah", ["Okay. So, the night before, really, it starts the night before.",
                        "I'll look at the forecast on the phone, the marine one."]),
        ("Kim Lee", "Could you tell me a bit about yourself and the boat?"),
        ("Priya Shah", ["Right.", "Well, I'm fifty-three, and I've been fishing since I was, "
                        "God, sixteen?"]),
    ]) == []


def test_a_rising_statement_is_not_a_question_to_the_group() -> None:
    assert unanswered([("Priya Shah", "I've been fishing out of the harbour since I was sixteen?"),
                       ("Kim Lee", "Okay.")]) == []


def test_a_reply_that_ends_i_would_have_to_check_leaves_the_question_open() -> None:
    # one speaker's reply over several cues is one reply; its "I'd have to check" makes
    # it no answer yet, and what they say next ("Anyway.") does not answer it either
    assert unanswered([
        ("Kim Lee", "Does the insurance cover the volunteers too?"),
        ("Tom Brandt", "The public liability is for the public, so a member who gets hurt."),
        ("Tom Brandt", "The volunteers are, um, I think they're covered, but I'd have to check."),
        ("Priya Shah", "Ha."),
        ("Tom Brandt", "It's riveting. Anyway. We don't have an anvil."),
    ]) == ["Does the insurance cover the volunteers too?"]


def test_a_bare_no_to_has_anyone_leaves_the_matter_open_and_news_answers_it() -> None:
    assert unanswered([("Kim Lee", "Has anyone asked the council about a loading bay?"),
                       ("Priya Shah", "Oh. Hm. No."),
                       ("Tom Brandt", "That's a really good question.")]) == [
        "Has anyone asked the council about a loading bay?"]
    assert unanswered([("Kim Lee", "Has anyone heard back from the health centre?"),
                       ("Priya Shah", "No. Wen said they're still waiting for the committee.")]
                      ) == []
