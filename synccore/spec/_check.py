"""Checking located YAML values against the field table, collecting every problem."""

from __future__ import annotations

import difflib
import functools
import re
from collections.abc import Callable
from fractions import Fraction
from typing import Any

from synccore.errors import Location, Problem
from synccore.spec import _yaml as loader
from synccore.spec._fields import Field
from synccore.spec._names import identifier_problem
from synccore.spec._types import MAX_PIXEL_CLOCK_HZ
from synccore.units import exact_number

_FREQUENCY = re.compile(
    r"\s*([0-9]+(?:\.[0-9]*)?(?:[eE][+-]?[0-9]+)?)\s*(hz|khz|mhz|ghz)?\s*\Z", re.IGNORECASE
)
_PLAIN = re.compile(r"\s*[0-9]+(?:\.[0-9]*)?\s*\Z")
_UNIT = {None: 1, "hz": 1, "khz": 10**3, "mhz": 10**6, "ghz": 10**9}


def parse_frequency(value: Any) -> Fraction | None:
    """A frequency in Hz from a number or a string with a unit, exactly; None if not one."""
    if isinstance(value, bool):
        return None
    if isinstance(value, (int, Fraction)):
        return Fraction(value)
    if isinstance(value, float):
        return exact_number(repr(value))
    if isinstance(value, str):
        match = _FREQUENCY.match(value)
        number = exact_number(match.group(1)) if match else None
        if match is None or number is None:
            return None
        unit = match.group(2).lower() if match.group(2) else None
        return number * _UNIT[unit]
    return None



class Collector:
    def __init__(self) -> None:
        self.problems: list[Problem] = []

    def add(self, location: Location | None, path: str, message: str) -> None:
        self.problems.append(Problem(location, path, message))


def _describe(value: Any) -> str:
    if isinstance(value, (loader.Located)):
        return "a list" if isinstance(value.value, list) else "a mapping"
    if value is None:
        return "nothing"
    return repr(value)


SCRATCH_PREFIX = "x-"
"""Keys starting with this are the user's own (anchors to merge with ``<<``) and are not read."""

Report = Callable[[str], None]
"""Records one problem (its message) at the value being checked."""


def _check_int(f: Field, value: Any, bad: Report) -> Any:
    if isinstance(value, bool) or not isinstance(value, int):
        bad(f"must be a whole number, got {value!r}")
        return None
    if f.minimum is not None and value < f.minimum:
        bad(f"must be ≥ {f.minimum}, got {value}")
        return None
    if f.maximum is not None and value > f.maximum:
        bad(f"must be ≤ {f.maximum}, got {value}")
        return None
    return value


def _check_bool(f: Field, value: Any, bad: Report) -> Any:
    if not isinstance(value, bool):
        bad(f"must be true or false, got {value!r}")
        return None
    return value


def _check_choice(f: Field, value: Any, bad: Report) -> Any:
    if value not in f.choices or isinstance(value, bool):
        allowed = ", ".join(str(c) for c in f.choices)
        hint = _near(str(value), [str(c) for c in f.choices])
        bad(f"must be one of {allowed}, got {value!r}{hint}")
        return None
    return value


def _check_decimal(f: Field, value: Any, bad: Report) -> Any:
    number = parse_frequency(value)  # a plain non-negative number, no unit
    if number is None or isinstance(value, str) and not _PLAIN.match(value):
        bad(f"must be a number ≥ 0, got {value!r}")
        return None
    return number


def _check_text(f: Field, value: Any, bad: Report) -> Any:
    if not isinstance(value, str) or not value.strip():
        bad(f"must be text, got {value!r}")
        return None
    return value


def _check_identifier(f: Field, value: Any, bad: Report) -> Any:
    if not isinstance(value, str):
        bad(f"must be a name, got {value!r}")
        return None
    reason = identifier_problem(value)
    if reason:
        bad(f"{reason}, got {value!r}")
        return None
    return value


def _check_prefix(f: Field, value: Any, bad: Report) -> Any:
    if value is None:
        return ""
    if not isinstance(value, str):
        bad(f"must be text, got {value!r}")
        return None
    if value and identifier_problem(value + "x") and identifier_problem(value.rstrip("_") + "_x"):
        bad("must start with a letter and hold only letters, digits and single "
            f"underscores, got {value!r}")  # fmt: skip
        return None
    return value


def _check_frequency(f: Field, value: Any, bad: Report) -> Any:
    hz = parse_frequency(value)
    if hz is None:
        bad('must be a frequency in Hz or a string like "25.175 MHz" or "25175 kHz", '
            f"got {value!r}")  # fmt: skip
        return None
    if hz <= 0 or hz > MAX_PIXEL_CLOCK_HZ:
        bad(f"must be above 0 and at most 10 GHz, got {value!r}")
        return None
    return hz


_SCALAR_CHECKS: dict[str, Callable[[Field, Any, Report], Any]] = {
    "int": _check_int,
    "bool": _check_bool,
    "choice": _check_choice,
    "decimal": _check_decimal,
    "text": _check_text,
    "identifier": _check_identifier,
    "prefix": _check_prefix,
    "frequency": _check_frequency,
}
"""The checker of each single-value field kind: the checked value, or None after a problem."""


def _check_value(f: Field, node: loader.Node, path: str, out: Collector) -> Any:
    """Return the checked Python value of one field, or None after recording a problem."""
    where = node.location
    if f.kind == "section":
        if not isinstance(node, loader.Located) or not isinstance(node.value, dict):
            out.add(where, path, f"must be a mapping of {field_names(f.fields)}, got {describe_node(node)}")
            return None
        return check_section(f.fields, node, path, out)
    if f.kind == "list":
        return _check_list(f, node, path, out)
    check = _SCALAR_CHECKS.get(f.kind)
    if check is None:  # pragma: no cover
        raise AssertionError(f"unknown field kind {f.kind!r}")
    if not isinstance(node, loader.Scalar):
        out.add(where, path, f"must be a single value, got {_describe(node)}")
        return None
    if isinstance(node.value, loader.Refused):
        return None  # the reader has said why
    return check(f, node.value, functools.partial(out.add, where, path))


def _check_list(f: Field, node: loader.Node, path: str, out: Collector) -> list[Any] | None:
    """A list of ``f.minimum`` .. ``f.maximum`` mappings of ``f.fields``; every entry is checked."""
    if not isinstance(node, loader.Located) or not isinstance(node.value, list):
        out.add(node.location, path, f"must be a list of mappings of {field_names(f.fields)}, "
                                     f"got {describe_node(node)}")  # fmt: skip
        return None
    entries: list[loader.Node] = node.value
    ok = True
    low, high = f.minimum or 0, f.maximum if f.maximum is not None else len(entries)
    if not low <= len(entries) <= high:
        out.add(node.location, path,
                f"must hold {f.minimum} to {f.maximum} entries, got {len(entries)}")  # fmt: skip
        ok = False
    checked = []
    for i, entry in enumerate(entries):
        here = f"{path}[{i}]"
        if not isinstance(entry, loader.Located) or not isinstance(entry.value, dict):
            out.add(entry.location, here, f"must be a mapping of {field_names(f.fields)}, "
                                          f"got {describe_node(entry)}")  # fmt: skip
            ok = False
            continue
        values = check_section(f.fields, entry, here, out)
        ok = ok and values is not None
        checked.append(values)
    return checked if ok else None


def describe_node(node: loader.Node) -> str:
    if isinstance(node, loader.Scalar):
        return repr(node.value)
    return _describe(node)


def field_names(fields: tuple[Field, ...]) -> str:
    return ", ".join(f.name for f in fields)


def _near(word: str, options: list[str]) -> str:
    close = difflib.get_close_matches(word, options, n=1, cutoff=0.6)
    return f" (did you mean {close[0]!r}?)" if close else ""


def _join(path: str, name: str) -> str:
    return f"{path}.{name}" if path else name


def check_section(
    fields: tuple[Field, ...], node: loader.Located, path: str, out: Collector
) -> dict[str, Any] | None:
    given: dict[str, loader.Node] = node.value
    known = {f.name: f for f in fields}
    result: dict[str, Any] = {}
    ok = True
    suggested: set[str] = set()
    for key in given:
        if key.startswith(SCRATCH_PREFIX):
            continue  # a place for the user's anchors (``x-porches: &p {...}``), not read
        if key not in known:
            close = difflib.get_close_matches(key, [k for k in known if k not in given], n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            suggested.update(close)
            out.add(node.key_locations[key], _join(path, key),
                    f"unknown key{hint}; allowed here: {field_names(fields)}")  # fmt: skip
            ok = False
    for f in fields:
        if f.name not in given:
            if f.name in suggested:  # already reported as a misspelling
                ok = False
            elif f.required:
                out.add(node.location, _join(path, f.name), "required key is missing")
                ok = False
            elif f.kind == "section":
                result[f.name] = {}
            else:
                result[f.name] = f.default
            continue
        value = _check_value(f, given[f.name], _join(path, f.name), out)
        if value is None:
            ok = False
        result[f.name] = value
    return result if ok else None


def where(doc: loader.Located, *path: str) -> Location:
    """The location of the value at a dotted path, or of the nearest enclosing mapping."""
    node: loader.Node = doc
    for key in path:
        if not isinstance(node, loader.Located) or not isinstance(node.value, dict):
            break
        if key not in node.value:
            return node.location
        node = node.value[key]
    return node.location
