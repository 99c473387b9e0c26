"""The JSON Schema of the timing description format, derived from the field table."""

from __future__ import annotations

from typing import Any

from synccore.spec import SPEC_FIELDS, Field
from synccore.spec import TIMING_KEYS as PER_MODE_KEYS

TIMING_KEYS = ("pixel_clock_hz", "horizontal", "vertical")
ALTERNATIVES = ["standard", "formula"]

SCHEMA_ID = "https://synccore.invalid/schema/timing-1.json"


def _field_schema(f: Field) -> dict[str, Any]:
    s: dict[str, Any]
    if f.kind == "section":
        s = _section(f.fields)
    elif f.kind == "list":
        s = {"type": "array", "minItems": f.minimum, "maxItems": f.maximum,
             "items": _timing_choice(_section(f.fields))}  # fmt: skip
    elif f.kind == "int":
        s = {"type": "integer"}
        if f.minimum is not None:
            s["minimum"] = f.minimum
        if f.maximum is not None:
            s["maximum"] = f.maximum
    elif f.kind == "bool":
        s = {"type": "boolean"}
    elif f.kind == "decimal":
        s = {"type": "number", "minimum": 0}
    elif f.kind == "text":
        s = {"type": "string", "minLength": 1}
    elif f.kind == "choice":
        s = {"enum": list(f.choices)}
    elif f.kind == "identifier":
        s = {"type": "string", "pattern": "^[A-Za-z](_?[A-Za-z0-9])*$"}
    elif f.kind == "prefix":
        s = {"type": "string", "pattern": "^([A-Za-z](_?[A-Za-z0-9])*_?)?$"}
    elif f.kind == "frequency":
        s = {
            "anyOf": [
                {"type": "number", "exclusiveMinimum": 0},
                {
                    "type": "string",
                    "pattern": r"^\s*[0-9]+(\.[0-9]*)?([eE][+-]?[0-9]+)?\s*"
                    r"([hH][zZ]|[kK][hH][zZ]|[mM][hH][zZ]|[gG][hH][zZ])?\s*$",
                },
            ]
        }
    else:  # pragma: no cover
        raise AssertionError(f.kind)
    if f.ranged:
        s = {"anyOf": [s, _range(s)]}
    s["description"] = f.doc
    if not f.required and f.default is not None and f.kind != "section":
        s["default"] = f.default
    return s


def _section(fields: tuple[Field, ...]) -> dict[str, Any]:
    return {
        "type": "object",
        "properties": {f.name: _field_schema(f) for f in fields},
        "required": [f.name for f in fields if f.required],
        "additionalProperties": False,
    }


def _range(value: dict[str, Any]) -> dict[str, Any]:
    """A datasheet range {min, typ, max} of values shaped like ``value``."""
    return {
        "type": "object",
        "properties": {"min": value, "typ": value, "max": value},
        "required": ["min", "max"],
        "additionalProperties": False,
    }


def _timing_choice(schema: dict[str, Any], *, modes: bool = False) -> dict[str, Any]:
    """``schema`` with its timing from exactly one of: explicit keys, a library entry, a
    formula, or (``modes``, at the top level) a list of modes that give their own."""
    explicit = list(TIMING_KEYS)
    others = ALTERNATIVES + (["modes"] if modes else [])
    schema["required"] = [k for k in schema["required"] if k not in explicit]
    schema["oneOf"] = [
        {"required": explicit, "not": {"anyOf": [{"required": [k]} for k in others]}},
        *({"required": [k], "not": {"anyOf": [{"required": [x]}
                                              for x in explicit + ["fit"] + others
                                              if x != k]}}
          for k in ALTERNATIVES),
        *([{"required": ["modes"], "not": {"anyOf": [{"required": [k]} for k in PER_MODE_KEYS]}}]
          if modes else []),
    ]  # fmt: skip
    return schema


def json_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of a synccore timing description."""
    schema = {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "$id": SCHEMA_ID,
        "title": "synccore timing description",
        **_section(SPEC_FIELDS),
    }
    return _timing_choice(schema, modes=True)
