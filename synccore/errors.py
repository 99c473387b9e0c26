"""The one error type of synccore, and the located problems it carries.

Every problem knows where in the user's file it comes from, so the command
line can print it as ``file:line:col: field: message`` and a user can fix
every problem of a file in one pass.
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
