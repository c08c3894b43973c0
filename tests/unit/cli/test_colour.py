"""Colour and progress decisions. The NO_COLOR rule (any non-empty value
disables colour) is from https://no-color.org; TERM=dumb and CI=<anything>
are common practice, no source."""

from __future__ import annotations

import io

import pytest

from auditor.cli.colour import use_colour, use_progress
from auditor.errors import UsageError


class FakeTerminal(io.StringIO):
    def isatty(self) -> bool:
        return True


@pytest.mark.parametrize(("choice", "env", "tty", "expected"), [
    ("always", {"NO_COLOR": "1"}, False, True),
    ("never", {}, True, False),
    ("auto", {}, True, True),
    ("auto", {}, False, False),
    ("auto", {"NO_COLOR": "1"}, True, False),
    ("auto", {"NO_COLOR": ""}, True, True),
    ("auto", {"TERM": "dumb"}, True, False),
])
def test_colour_choice(choice: str, env: dict[str, str], tty: bool, expected: bool) -> None:
    stream = FakeTerminal() if tty else io.StringIO()
    assert use_colour(choice, stream, env) is expected


def test_unknown_colour_choice_lists_the_valid_ones() -> None:
    with pytest.raises(UsageError, match="auto, always, never"):
        use_colour("sometimes", io.StringIO(), {})


@pytest.mark.parametrize(("env", "quiet", "tty", "expected"), [
    ({}, False, True, True),
    ({"CI": "true"}, False, True, False),
    ({}, True, True, False),
    ({}, False, False, False),
])
def test_progress_only_on_an_interactive_terminal(env: dict[str, str], quiet: bool, tty: bool,
                                                  expected: bool) -> None:
    stream = FakeTerminal() if tty else io.StringIO()
    assert use_progress(stream, env, quiet) is expected


def test_progress_counts_and_draws_nothing_when_disabled() -> None:
    from auditor.cli.progress import SolveProgress

    stream = io.StringIO()
    with SolveProgress(3, enabled=False, stream=stream) as bar:
        for name in ("A", "B", "C"):
            bar.step(name)
    assert bar.done == 3
    assert stream.getvalue() == ""


def test_progress_draws_on_a_terminal() -> None:
    from auditor.cli.progress import SolveProgress

    stream = FakeTerminal()
    with SolveProgress(2, enabled=True, stream=stream) as bar:
        bar.step("A")
        bar.step("B")
    assert "\x1b[" in stream.getvalue()


def test_progress_for_follows_the_environment() -> None:
    from auditor.cli.progress import progress_for

    assert progress_for(1, stream=FakeTerminal(), env={})._progress is not None
    assert progress_for(1, stream=FakeTerminal(), env={"CI": "1"})._progress is None
    assert progress_for(1, quiet=True, stream=FakeTerminal(), env={})._progress is None
