"""Read a YAML file into plain Python values that remember their source positions.

Only PyYAML's safe composer is used: the document is composed into a node tree
(which keeps line/column marks) and converted here with the safe resolver's
tags, so no Python object can ever be constructed from the input.  Files over
a size limit and documents that expand into too many nodes (an alias bomb) are
refused before any work is done on them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml

from synccore.errors import Location, Problem, SpecError

MAX_FILE_BYTES = 256 * 1024
"""A timing description is a few hundred bytes; anything larger than this is refused."""

MAX_NODES = 20_000
"""Upper bound on values after alias expansion; defeats 'billion laughs' documents."""


@dataclass
class Located:
    """A mapping or list from the YAML file, with the position of itself and of every entry."""

    value: Any
    location: Location
    key_locations: dict[str, Location] = field(default_factory=dict)


@dataclass(frozen=True)
class Scalar:
    """A scalar from the YAML file with its resolved Python value and position."""

    value: Any
    location: Location
    tag: str


Node = Located | Scalar


def _loc(source: str, mark: yaml.Mark | None) -> Location:
    if mark is None:
        return Location(source, 1, 1)
    return Location(source, mark.line + 1, mark.column + 1)


class _Converter:
    def __init__(self, source: str) -> None:
        self.source = source
        self.count = 0
        self.constructor = yaml.SafeLoader("")

    def convert(self, node: yaml.Node) -> Node:
        self.count += 1
        if self.count > MAX_NODES:
            raise SpecError(
                [
                    Problem(
                        _loc(self.source, node.start_mark),
                        "",
                        f"document expands to more than {MAX_NODES} values "
                        "(aliases nested too deep?); refused",
                    )
                ]
            )
        where = _loc(self.source, node.start_mark)
        if isinstance(node, yaml.MappingNode):
            out: dict[str, Node] = {}
            keys: dict[str, Location] = {}
            for key_node, value_node in node.value:
                key_loc = _loc(self.source, key_node.start_mark)
                if not isinstance(key_node, yaml.ScalarNode):
                    raise SpecError([Problem(key_loc, "", "mapping keys must be plain names")])
                key = str(key_node.value)
                if key in out:
                    raise SpecError(
                        [Problem(key_loc, key, f"duplicate key (first given at {keys[key]})")]
                    )
                keys[key] = key_loc
                out[key] = self.convert(value_node)
            return Located(out, where, key_locations=keys)
        if isinstance(node, yaml.SequenceNode):
            items = [self.convert(item) for item in node.value]
            return Located(items, where)
        assert isinstance(node, yaml.ScalarNode)
        value = self.constructor.construct_object(node, deep=True)
        return Scalar(value, where, node.tag)


def load_text(text: str, source: str = "<string>") -> Node:
    """Parse YAML text into located nodes; raise :class:`SpecError` on any YAML problem."""
    if len(text.encode("utf-8", "replace")) > MAX_FILE_BYTES:
        raise SpecError(
            [Problem(Location(source, 1, 1), "", f"file is larger than {MAX_FILE_BYTES} bytes")]
        )
    try:
        documents = list(yaml.compose_all(text, Loader=yaml.SafeLoader))
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        reason = exc.problem or exc.context or "invalid YAML"
        raise SpecError([Problem(_loc(source, mark), "", f"YAML syntax: {reason}")]) from None
    except yaml.YAMLError as exc:  # pragma: no cover - PyYAML marks nearly everything
        raise SpecError([Problem(Location(source, 1, 1), "", f"YAML: {exc}")]) from None
    documents = [d for d in documents if d is not None]
    if not documents:
        raise SpecError([Problem(Location(source, 1, 1), "", "file holds no YAML document")])
    if len(documents) > 1:
        raise SpecError(
            [
                Problem(
                    _loc(source, documents[1].start_mark),
                    "",
                    "file holds more than one YAML document; give one timing per file",
                )
            ]
        )
    try:
        return _Converter(source).convert(documents[0])
    except yaml.constructor.ConstructorError as exc:
        raise SpecError(
            [Problem(_loc(source, exc.problem_mark), "", f"YAML value: {exc.problem}")]
        ) from None


def load_file(path: str | Path) -> Node:
    """Read and parse a YAML file; the file name in every error is the path as given."""
    source = str(path)
    p = Path(path)
    try:
        size = p.stat().st_size
    except OSError as exc:
        raise SpecError([Problem(None, "", f"{source}: cannot read: {exc.strerror}")]) from None
    if size > MAX_FILE_BYTES:
        raise SpecError(
            [Problem(Location(source, 1, 1), "", f"file is larger than {MAX_FILE_BYTES} bytes")]
        )
    try:
        text = p.read_text(encoding="utf-8")
    except UnicodeDecodeError:
        raise SpecError([Problem(Location(source, 1, 1), "", "file is not UTF-8 text")]) from None
    except OSError as exc:
        raise SpecError([Problem(None, "", f"{source}: cannot read: {exc.strerror}")]) from None
    return load_text(text, source)
