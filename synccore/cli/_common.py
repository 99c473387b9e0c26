"""What every command shares: the console, the one way out on bad input, loading a spec.

Bad input is never a traceback: each problem is one line on stderr, and the
command exits with status 2 (1 is kept for "ran, and the result is a failure").
"""

from __future__ import annotations

import sys
from collections.abc import Iterable
from typing import NoReturn

import click
from rich.console import Console

from synccore.errors import SpecError
from synccore.spec import Spec
from synccore.timings import load

BAD_INPUT = 2
"""Exit status for input synccore refuses (a spec problem, a bad option, a missing tool)."""

FAILED = 1
"""Exit status for a run whose result is a failure (a mismatch, a monitor problem)."""


def console(*, wide_pipe: bool = False) -> Console:
    """The terminal console; ``wide_pipe`` gives piped output room for wide tables."""
    width = None if sys.stdout.isatty() or not wide_pipe else 140
    return Console(highlight=False, soft_wrap=True, width=width)


def fail(lines: str | Iterable[str], *, code: int = BAD_INPUT) -> NoReturn:
    """Print ``lines`` (one or many) on stderr and exit with ``code``."""
    for line in [lines] if isinstance(lines, str) else lines:
        click.echo(line, err=True)
    sys.exit(code)


def fail_spec(err: SpecError) -> NoReturn:
    """Every problem of ``err``, one line each (``file:line:col: field: message``), exit 2."""
    fail(str(p) for p in err.problems)


def load_spec(path: str) -> Spec:
    """The spec at ``path``, or every problem it has and exit 2."""
    try:
        return load(path)
    except SpecError as err:
        fail_spec(err)
