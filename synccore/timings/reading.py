"""Reading a timing description end to end: YAML, resolution, validation.

The format and its validator live in :mod:`synccore.spec`; a description may
also name a library mode, a formula or datasheet ranges, which only this
package knows how to turn into numbers.  So the whole reading step is here.
"""

from __future__ import annotations

from pathlib import Path

from synccore.errors import Problem, SpecError
from synccore.spec import Node, Spec, load_file, load_text, top_mapping, validate
from synccore.timings.resolve import resolve


def load(path: str | Path) -> Spec:
    """Read, resolve and validate one timing description file; :class:`SpecError` on problems."""
    problems: list[Problem] = []
    return _read(load_file(path, problems), str(path), problems)


def loads(text: str, source: str = "<string>") -> Spec:
    """The same for a timing description given as YAML text."""
    problems: list[Problem] = []
    return _read(load_text(text, source, problems), source, problems)


def _read(doc: Node, source: str, reading: list[Problem]) -> Spec:
    """``reading``: what the YAML reader refused but read past (every problem is reported at once)."""
    try:
        top = top_mapping(doc)
    except SpecError as err:  # the reader's own problems say why a scalar stands where the mapping goes
        raise SpecError([*reading, *err.problems]) from None
    resolved = resolve(top)
    return validate(resolved.doc, source=source, origin=resolved.origin, notes=resolved.notes,
                    fit=resolved.fit, earlier=[*reading, *resolved.problems],
                    modes=[(m.origin, m.notes, m.fit) for m in resolved.modes])  # fmt: skip
