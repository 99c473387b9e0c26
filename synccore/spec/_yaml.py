"""Read a YAML file into plain Python values that remember their source positions.

Only PyYAML's safe composer is used: the document is composed into a node tree
(which keeps line/column marks) and converted here with the safe resolver's
tags, so no Python object can ever be constructed from the input.  Files over
a size limit and documents that expand into too many nodes (an alias bomb) are
refused before any work is done on them.
"""

from __future__ import annotations

import os
import stat
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


MAX_DEPTH = 64
"""Deepest nesting of lists and mappings; a description needs three levels."""

MAX_NUMBER_CHARS = 100
"""Longest number text read; the largest figure a timing needs has a dozen digits."""

_MERGE = "tag:yaml.org,2002:merge"
_TAGS = {f"tag:yaml.org,2002:{t}": f"!!{t}" for t in ("str", "int", "float", "bool", "null")}
_COLLECTION_TAGS = {"tag:yaml.org,2002:map", "tag:yaml.org,2002:seq"}


class Refused:
    """The value of a scalar the reader refused (its problem is already recorded)."""

    def __repr__(self) -> str:
        return "<refused>"


def _join(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


class _Fatal(Exception):
    """A problem after which the document's structure cannot be trusted."""


class _Converter:
    """Composed YAML nodes → located values, every problem collected (fatal ones stop it)."""

    def __init__(self, source: str) -> None:
        self.source = source
        self.count = 0
        self.constructor = yaml.SafeLoader("")
        self.problems: list[Problem] = []
        self.open: set[int] = set()  # collection nodes being converted: an alias to one is a loop

    def _fatal(self, node: yaml.Node, message: str) -> _Fatal:
        self.problems.append(Problem(_loc(self.source, node.start_mark), "", message))
        return _Fatal()

    def convert(self, node: yaml.Node, depth: int = 0, path: str = "") -> Node:
        self.count += 1
        if self.count > MAX_NODES:
            raise self._fatal(node, f"document expands to more than {MAX_NODES} values "
                                    "(aliases nested too deep?); refused")  # fmt: skip
        if depth > MAX_DEPTH:
            raise self._fatal(node, f"lists and mappings nested deeper than {MAX_DEPTH} levels; refused")
        if isinstance(node, yaml.ScalarNode):
            return self._scalar(node, path)
        if id(node) in self.open:
            raise self._fatal(node, "an alias refers to a list or mapping that holds it; refused")
        if node.tag not in _COLLECTION_TAGS:
            self._refuse_tag(node, path)
        self.open.add(id(node))
        try:
            if isinstance(node, yaml.MappingNode):
                return self._mapping(node, depth, path)
            items = [self.convert(item, depth + 1, f"{path}[{i}]") for i, item in enumerate(node.value)]
            return Located(items, _loc(self.source, node.start_mark))
        finally:
            self.open.discard(id(node))

    def _mapping(self, node: yaml.MappingNode, depth: int, path: str) -> Located:
        out: dict[str, Node] = {}
        keys: dict[str, Location] = {}
        merged: list[Located] = []
        for key_node, value_node in node.value:
            key_loc = _loc(self.source, key_node.start_mark)
            if isinstance(key_node, yaml.ScalarNode) and key_node.tag == _MERGE:
                merged += self._merge_sources(value_node, depth, _join(path, "<<"))
                continue
            key = self._key(key_node, key_loc, path)
            if key is None:
                continue
            if key in out:
                first = f"duplicate key (first given at {keys[key]}); the first is used"
                self.problems.append(Problem(key_loc, _join(path, key), first))
                continue
            keys[key] = key_loc
            out[key] = self.convert(value_node, depth + 1, _join(path, key))
        for source in merged:  # YAML merge keys: explicit keys win, then earlier sources
            for key, value in source.value.items():
                if key not in out:
                    out[key] = value
                    keys[key] = source.key_locations.get(key, source.location)
        return Located(out, _loc(self.source, node.start_mark), key_locations=keys)

    def _merge_sources(self, node: yaml.Node, depth: int, path: str) -> list[Located]:
        items = node.value if isinstance(node, yaml.SequenceNode) else [node]
        out = []
        for item in items:
            value = self.convert(item, depth + 1, path)
            if isinstance(value, Located) and isinstance(value.value, dict):
                out.append(value)
            else:
                self.problems.append(Problem(value.location, path, "a merge key (<<) takes a mapping or a "
                                                                   "list of mappings"))  # fmt: skip
        return out

    def _key(self, key_node: yaml.Node, key_loc: Location, path: str) -> str | None:
        if not isinstance(key_node, yaml.ScalarNode):
            self.problems.append(Problem(key_loc, path, "mapping keys must be plain names"))
            return None
        key = str(key_node.value)
        if not key or len(key) > 200 or any(not c.isprintable() for c in key):
            self.problems.append(Problem(key_loc, path, f"a key must be a printable name of at most 200 "
                                                      f"characters, got {key[:40]!r}"))  # fmt: skip
            return None
        return key

    def _refuse_tag(self, node: yaml.Node, path: str) -> None:
        allowed = ", ".join(_TAGS.values())
        self.problems.append(Problem(_loc(self.source, node.start_mark), path,
                                     f"explicit tag {node.tag!r} is not read here; allowed: {allowed}"))

    def _scalar(self, node: yaml.ScalarNode, path: str) -> Scalar:
        where = _loc(self.source, node.start_mark)
        text = str(node.value)
        if node.tag not in _TAGS and node.tag != "tag:yaml.org,2002:timestamp":
            self._refuse_tag(node, path)
            return Scalar(Refused(), where, node.tag)
        if node.tag in ("tag:yaml.org,2002:int", "tag:yaml.org,2002:float") and len(text) > MAX_NUMBER_CHARS:
            self.problems.append(Problem(where, path, f"a number of {len(text)} characters; at most "
                                                    f"{MAX_NUMBER_CHARS} are read"))  # fmt: skip
            return Scalar(Refused(), where, node.tag)
        try:
            value = self.constructor.construct_object(node, deep=True)
        except (ValueError, KeyError, IndexError, TypeError, OverflowError,
                yaml.constructor.ConstructorError):  # IndexError: an empty !!float (found by fuzzing)
            tag = _TAGS.get(node.tag, "!!timestamp")
            self.problems.append(Problem(where, path, f"{text[:40]!r} is not a valid {tag} value; write the "
                                                      "value without the tag, or a valid one"))  # fmt: skip
            return Scalar(Refused(), where, node.tag)
        if node.tag == "tag:yaml.org,2002:timestamp":
            value = text  # a date-like word is text here (nothing in a description is a date)
        return Scalar(value, where, node.tag)


_OPENS = (yaml.BlockMappingStartToken, yaml.BlockSequenceStartToken, yaml.FlowMappingStartToken,
          yaml.FlowSequenceStartToken)  # fmt: skip
_CLOSES = (yaml.BlockEndToken, yaml.FlowMappingEndToken, yaml.FlowSequenceEndToken)


def _check_depth(text: str, source: str) -> None:
    """Refuse deep nesting from the tokens, before the (recursive) composer sees it."""
    depth = 0
    for token in yaml.scan(text, Loader=yaml.SafeLoader):
        if isinstance(token, _OPENS):
            depth += 1
            if depth > MAX_DEPTH:
                raise SpecError([Problem(_loc(source, token.start_mark), "",
                                         f"lists and mappings nested deeper than {MAX_DEPTH} levels; "
                                         "refused")])  # fmt: skip
        elif isinstance(token, _CLOSES):
            depth -= 1


def load_text(text: str, source: str = "<string>", problems: list[Problem] | None = None) -> Node:
    """Parse YAML text into located nodes; raise :class:`SpecError` on any YAML problem.

    With ``problems`` given, the problems that leave the structure usable (a duplicate key,
    a refused tag or value: its scalar holds :class:`Refused`) are added to it instead, so
    that validation can report the rest of the file's problems with them.
    """
    if len(text.encode("utf-8", "replace")) > MAX_FILE_BYTES:
        raise SpecError(
            [Problem(Location(source, 1, 1), "", f"file is larger than {MAX_FILE_BYTES} bytes")]
        )
    try:
        _check_depth(text, source)
        documents = list(yaml.compose_all(text, Loader=yaml.SafeLoader))
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        reason = exc.problem or exc.context or "invalid YAML"
        raise SpecError([Problem(_loc(source, mark), "", f"YAML syntax: {reason}")]) from None
    except yaml.reader.ReaderError as exc:  # a character YAML does not allow, by its offset
        before = text[: exc.position]
        where = Location(source, before.count("\n") + 1, exc.position - (before.rfind("\n") + 1) + 1)
        raise SpecError([Problem(where, "", f"character #x{exc.character:04x} is not allowed in YAML "
                                            "text")]) from None  # fmt: skip
    except yaml.YAMLError as exc:  # pragma: no cover - PyYAML marks nearly everything
        one_line = " ".join(str(exc).split())
        raise SpecError([Problem(Location(source, 1, 1), "", f"YAML: {one_line}")]) from None
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
    converter = _Converter(source)
    try:
        doc = converter.convert(documents[0])
    except _Fatal:
        raise SpecError(converter.problems) from None
    if problems is None and converter.problems:
        raise SpecError(converter.problems)
    if problems is not None:
        problems.extend(converter.problems)
    return doc


def read_bounded(path: str | Path, limit: int = MAX_FILE_BYTES) -> bytes:
    """At most ``limit`` bytes of a regular file, whatever its size claims; :class:`SpecError`
    (one located line) for a missing or unreadable file, a device, a FIFO or a larger file."""
    source = str(path)
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))  # a FIFO must not block here
        with os.fdopen(fd, "rb", buffering=0) as handle:
            if not stat.S_ISREG(os.fstat(fd).st_mode):
                raise SpecError([Problem(None, "", f"{source}: not a regular file (a folder, device or "
                                                   "FIFO); give a file")])  # fmt: skip
            data = handle.read(limit + 1) or b""
    except OSError as exc:
        raise SpecError([Problem(None, "", f"{source}: cannot read: {exc.strerror}")]) from None
    if len(data) > limit:
        raise SpecError([Problem(Location(source, 1, 1), "", f"file is larger than {limit} bytes")])
    return data


def load_file(path: str | Path, problems: list[Problem] | None = None) -> Node:
    """Read and parse a YAML file; the file name in every error is the path as given."""
    source = str(path)
    try:
        text = read_bounded(path).decode("utf-8")
    except UnicodeDecodeError:
        raise SpecError([Problem(Location(source, 1, 1), "", "file is not UTF-8 text")]) from None
    return load_text(text, source, problems)
