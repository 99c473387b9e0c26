"""Code and its comments in two aligned columns, for the port lists and parameter lists of
every emitted file (language-neutral: the caller gives the comment mark)."""

from __future__ import annotations


def aligned(rows: list[tuple[str, str]], mark: str) -> list[str]:
    """``(text, comment)`` rows as lines whose comments start in one column after ``mark``;
    a row without a comment is its text alone."""
    if not rows:
        return []
    width = max(len(text) for text, _ in rows)
    return [f"{text.ljust(width)}  {mark} {comment}".rstrip() if comment else text
            for text, comment in rows]  # fmt: skip
