"""What every command shares: the console, the one way out on bad input, loading a spec.

Bad input is never a traceback: each problem is one line on stderr, and the
command exits with status 2 (1 is kept for "ran, and the result is a failure").
"""

from __future__ import annotations

import sys
from collections.abc import Callable, Iterable
from pathlib import Path
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


def save(path: str | Path, data: bytes | str | Callable[[Path], None], *, force: bool,
         option: str = "") -> Path:  # fmt: skip
    """Write one file through the writing layer (:mod:`synccore.emit.writing`): owned files only,
    whole or not at all; ``data`` may be a renderer that writes to a path.  Bad: one line, exit 2."""
    from synccore.emit.writing import rendered

    if callable(data):
        data = rendered(data, Path(path).suffix)
    return save_all({Path(path): data}, force=force, option=option)[0]


def save_all(files: dict[Path, bytes | str], *, force: bool, option: str = "") -> list[Path]:
    """Several files of one folder, all or none, by the same rules."""
    from synccore.emit.writing import write_files

    folders = {p.parent for p in files}
    assert len(folders) == 1, "save_all writes into one folder"
    notes: list[str] = []
    raw = {p.name: d.encode("utf-8") if isinstance(d, str) else d for p, d in files.items()}
    try:
        write_files(raw, folders.pop(), force=force, notes=notes)
    except SpecError as err:
        fail(f"{option}: {p}" if option else str(p) for p in err.problems)
    for note in notes:
        click.echo(f"note: {note}", err=True)
    return list(files)


def load_spec(path: str, *, single_mode: str = "") -> Spec:
    """The spec at ``path``, or every problem it has and exit 2.

    ``single_mode``: the name of a command that takes one timing; a multi-mode spec
    (``modes:``) is then refused with one line."""
    try:
        spec = load(path)
    except SpecError as err:
        fail_spec(err)
    if single_mode and spec.modes:
        fail(f"{path}: {single_mode} takes one timing; a multi-mode spec (modes:) is built, "
             "shown and verified only yet (docs/multimode.md)")  # fmt: skip
    return spec
