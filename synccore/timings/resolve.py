"""Turn ``standard:``, ``formula:`` and datasheet ranges into explicit numbers.

A spec may give its timing in four ways: explicitly (``pixel_clock_hz``,
``horizontal``, ``vertical``), as a library entry (``standard:``), as a formula
(``formula:``), or as panel datasheet ranges (``{min, typ, max}`` in place of
numbers) with a ``fit:`` target.  This step runs before validation and
rewrites the located document into the explicit form, so the validator checks
one shape only.  Every value it writes carries the location of what it came
from (the ``standard:`` value, the ``formula:`` section, the range), so later
problems still point into the user's file.  It collects every problem; when a
part cannot be resolved it writes a stand-in so the rest of the file is still
checked, and the problems it recorded make validation fail anyway.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from synccore.errors import Location, Problem
from synccore.spec import (
    FORMULA_FIELDS,
    TIMING_KEYS,
    Axis,
    Collector,
    Fit,
    Located,
    Node,
    Scalar,
    check_section,
    describe_node,
)
from synccore.timings import formulas, modes
from synccore.timings.ranges import resolve_ranges, resolved_scalar
from synccore.units import fixed

EXPLICIT = ("pixel_clock_hz", "horizontal", "vertical")
ALTERNATIVES = ("standard", "formula")


@dataclass
class Resolved:
    """The explicit-form document, where its timing came from, notes and problems."""

    doc: Located
    origin: str = ""
    notes: tuple[str, ...] = ()
    fit: Fit | None = None  # the datasheet ranges, when the timing was fitted to them
    problems: list[Problem] = field(default_factory=list)
    modes: list[Resolved] = field(default_factory=list)  # a multi-mode spec: each mode's resolution


# A stand-in timing (any valid one) used only after a recorded problem.
_STAND_IN = (25_175_000, Axis(640, 16, 96, 48, "negative"), Axis(480, 10, 2, 33, "negative"))


def _axis_node(a: Axis, where: Location) -> Located:
    values = {k: resolved_scalar(getattr(a, k), where) for k in
              ("active", "front_porch", "sync", "back_porch", "sync_polarity")}  # fmt: skip
    return Located(values, where, key_locations={k: where for k in values})


def _put(given: dict[str, Node], keys: dict[str, Location], clock: Any,
         h: Axis, v: Axis, where: Location) -> None:  # fmt: skip
    given["pixel_clock_hz"] = resolved_scalar(clock, where)
    given["horizontal"] = _axis_node(h, where)
    given["vertical"] = _axis_node(v, where)
    for k in EXPLICIT:
        keys[k] = where


def resolve(doc: Located) -> Resolved:
    """Rewrite ``doc`` (a top-level mapping) into the explicit form; see the module doc."""
    out = Collector()
    given: dict[str, Node] = dict(doc.value)
    keys = dict(doc.key_locations)
    new = Located(given, doc.location, key_locations=keys)
    result = Resolved(new)
    if "modes" in given:
        _resolve_modes(given, keys, result, out)
        result.problems = out.problems
        return result
    chosen = [k for k in ALTERNATIVES if k in given]
    explicit = [k for k in EXPLICIT if k in given]

    if len(chosen) == 2:
        out.add(keys["formula"], "formula",
                f"cannot be combined with standard (at {keys['standard']}); give one")
    if chosen:
        alt = chosen[0]
        for k in explicit:
            out.add(keys[k], k, f"cannot be given together with {alt} (at {keys[alt]}), "
                                f"which supplies it; remove one")  # fmt: skip
        if "fit" in given:
            out.add(keys["fit"], "fit",
                    f"applies to datasheet ranges only; cannot be combined with {alt}")
        node = given.pop(alt)
        given.pop("formula", None)
        given.pop("fit", None)
        where = keys[alt]
        if alt == "standard":
            _standard(node, result, out)
        else:
            _formula(node, result, out)
        if not result.origin:  # unresolved: stand-in, after a recorded problem
            _put(given, keys, *_STAND_IN, where)
        for k in ALTERNATIVES + ("fit",):
            keys.pop(k, None)
    else:
        fitted = resolve_ranges(given, keys, doc, out)
        if fitted is not None:
            result.origin = "fitted to datasheet ranges"
            result.notes = fitted.notes
            result.fit = fitted.fit
    result.problems = out.problems
    return result


def _resolve_modes(given: dict[str, Node], keys: dict[str, Location], result: Resolved,
                   out: Collector) -> None:  # fmt: skip
    """A multi-mode spec: every entry of ``modes:`` resolved as a timing of its own, in place.

    The top level gives no timing of its own; a timing key there is refused (and dropped, so
    that validation reports it once).
    """
    for k in TIMING_KEYS:
        if k in given:
            out.add(keys[k], k, f"cannot be given together with modes (at {keys['modes']}): each "
                                "mode gives its own timing; move it into the modes")  # fmt: skip
            given.pop(k)
            keys.pop(k)
    node = given["modes"]
    if not isinstance(node, Located) or not isinstance(node.value, list):
        return  # validation says what modes must be
    entries = list(node.value)
    for i, entry in enumerate(entries):
        if not isinstance(entry, Located) or not isinstance(entry.value, dict) or "modes" in entry.value:
            result.modes.append(Resolved(entry))  # validation says what an entry must be
            continue
        mode = resolve(entry)
        entries[i] = mode.doc
        out.problems.extend(Problem(p.location, f"modes[{i}].{p.field}" if p.field else f"modes[{i}]",
                                    p.message) for p in mode.problems)  # fmt: skip
        result.modes.append(mode)
    given["modes"] = Located(entries, node.location, key_locations=dict(node.key_locations))


def _standard(node: Node, result: Resolved, out: Collector) -> None:
    where = node.location
    if not isinstance(node, Scalar) or not isinstance(node.value, str):
        out.add(where, "standard",
                f"must be a mode name like '1280x720@60' or a source like 'DMT 55h', "
                f"got {describe_node(node)}")  # fmt: skip
        return
    try:
        mode = modes.find(node.value)
    except modes.ModeLookupError as exc:
        out.add(where, "standard", f"{exc}, got {node.value!r}")
        return
    _put(result.doc.value, result.doc.key_locations, mode.pixel_clock_hz, mode.horizontal,
         mode.vertical, where)  # fmt: skip
    if mode.interlaced:
        result.doc.value["interlaced"] = resolved_scalar(True, where)
        result.doc.key_locations["interlaced"] = where
    result.origin = f"{mode.source} ({mode.name})"
    notes = [mode.note] if mode.note else []
    if mode.repetition > 1:
        notes.append(f"pixel repetition {mode.repetition}: {mode.width} picture pixels per line, "
                     f"each sent {mode.repetition} times ({mode.horizontal.active} pixel clocks)")
    result.notes = tuple(notes)


def _formula(node: Node, result: Resolved, out: Collector) -> None:
    where = node.location
    if not isinstance(node, Located) or not isinstance(node.value, dict):
        out.add(where, "formula", f"must be a mapping of method, width, height, refresh, "
                                  f"got {describe_node(node)}")  # fmt: skip
        return
    values = check_section(FORMULA_FIELDS, node, "formula", out)
    if values is None:
        return
    try:
        r = formulas.compute(values["method"], values["width"], values["height"],
                             values["refresh"],
                             video_optimized=values["video_optimized"])  # fmt: skip
    except formulas.FormulaError as exc:
        out.add(where, "formula", str(exc))
        return
    _put(result.doc.value, result.doc.key_locations, r.pixel_clock_hz, r.horizontal,
         r.vertical, where)  # fmt: skip
    rate = fixed(values["refresh"], 3).rstrip("0").rstrip(".")
    result.origin = f"{r.method.upper()} formula ({values['width']}x{values['height']}@{rate})"
    result.notes = r.notes
