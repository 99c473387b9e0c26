"""The error types of synccore: spec problems, and tool or clock problems.

:class:`SpecError` is about what a timing description says.  It carries every
:class:`Problem` found, each knowing where in the user's file it comes from, so
the command line can print it as ``file:line:col: field: message`` and a user
can fix every problem of a file in one pass.

:class:`ToolError` is about what the machine or the board can do: a simulator
that is missing or cannot run, an unknown engine or FPGA family, a board clock
that is not a frequency, a clock no setting can make.  It is one sentence.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True, order=True)
class Location:
    """A 1-based line and column in a named source (a file path or ``<string>``)."""

    source: str
    line: int
    column: int

    def __str__(self) -> str:
        return f"{self.source}:{self.line}:{self.column}"


@dataclass(frozen=True)
class Problem:
    """One violated rule: where, which field (dotted path, may be empty), and what is wrong."""

    location: Location | None
    field: str
    message: str

    def __str__(self) -> str:
        where = f"{self.location}: " if self.location else ""
        what = f"{self.field}: " if self.field else ""
        return f"{where}{what}{self.message}"


class SpecError(Exception):
    """Raised with every problem found in a timing description; ``str()`` is one line each."""

    def __init__(self, problems: list[Problem]) -> None:
        if not problems:
            raise ValueError("SpecError needs at least one problem")
        self.problems = sorted(
            problems,
            key=lambda p: (p.location or Location("", 0, 0), p.field, p.message),
        )
        super().__init__("\n".join(str(p) for p in self.problems))


class ToolError(Exception):
    """Raised when a tool or a clock cannot do what was asked; ``str()`` is one line.

    ``subject`` names what was wrong (a parameter such as ``board_clock_hz`` or
    ``family``; empty when the sentence says it all) and ``message`` is the rule
    and the bad value, so that the command line can put its own option name in
    front of ``message``.
    """

    def __init__(self, message: str, *, subject: str = "") -> None:
        self.message = message
        self.subject = subject
        super().__init__(f"{subject}: {message}" if subject else message)
