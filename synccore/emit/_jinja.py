"""The Jinja environment: strict, whitespace-controlled, templates from the package."""

from __future__ import annotations

from functools import cache
from pathlib import Path

import jinja2


def templates_dir() -> Path:
    """The templates folder: inside the installed package, or at the top of a source checkout."""
    here = Path(__file__).resolve().parent.parent
    for candidate in (here / "templates", here.parent / "templates"):
        if candidate.is_dir():
            return candidate
    raise FileNotFoundError("synccore templates folder not found")  # pragma: no cover


@cache
def environment() -> jinja2.Environment:
    return jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(templates_dir())),
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
        autoescape=False,
    )
