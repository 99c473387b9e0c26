"""Validation of an explicit-form document into a frozen :class:`Spec`.

Explicit form: ``pixel_clock_hz``, ``horizontal`` and ``vertical`` hold numbers
(:mod:`synccore.timings.resolve` rewrites ``standard:``, ``formula:`` and datasheet
ranges into that form first).  The validator walks the whole document and
collects every problem before raising, so a user can fix them all at once.
"""

from __future__ import annotations

from collections.abc import Sequence

from synccore.errors import Location, Problem, SpecError
from synccore.spec import _yaml as loader
from synccore.spec._check import Collector, check_section, describe_node, field_names, where
from synccore.spec._fields import SPEC_FIELDS, Field
from synccore.spec._names import identifier_problem
from synccore.spec._types import BASE_PORTS, MAX_AXIS, Axis, Board, Color, CoreOptions, Fit, Spec


def top_mapping(doc: loader.Node) -> loader.Located:
    """``doc`` as the top-level mapping a description must be; :class:`SpecError` otherwise."""
    if not isinstance(doc, loader.Located) or not isinstance(doc.value, dict):
        raise SpecError([Problem(doc.location, "", f"must be a mapping of {field_names(SPEC_FIELDS)}, "
                                                   f"got {describe_node(doc)}")])  # fmt: skip
    return doc


def validate(
    doc: loader.Node,
    *,
    source: str = "<string>",
    origin: str = "",
    notes: tuple[str, ...] = (),
    fit: Fit | None = None,
    earlier: Sequence[Problem] = (),
) -> Spec:
    """Check an explicit-form document; raise :class:`SpecError` with every problem.

    ``origin`` and ``notes`` say where a resolved timing came from, ``fit`` the datasheet
    ranges it was fitted to; ``earlier`` are the problems the resolution step found,
    reported together with the validator's own.
    """
    out = Collector()
    out.problems.extend(earlier)
    top = top_mapping(doc)
    values = check_section(SPEC_FIELDS, top, "", out)
    if values is None or out.problems:
        raise SpecError(out.problems)

    h = Axis(**values["horizontal"])
    v = Axis(**values["vertical"])
    core = CoreOptions(**values["core"]) if values["core"] else CoreOptions()
    prefix: str = (values["ports"] or {}).get("prefix", "") or ""
    interlaced = bool(values["interlaced"])
    _check_cross(top, values["name"], h, v, core, prefix, out)
    if interlaced:
        _check_interlace(top, h, v, core, out)
    if out.problems:
        raise SpecError(out.problems)
    return Spec(
        name=values["name"],
        pixel_clock_hz=values["pixel_clock_hz"],
        horizontal=h,
        vertical=v,
        core=core,
        port_prefix=prefix,
        interlaced=interlaced,
        source=source,
        origin=origin,
        notes=notes,
        board=Board(**values["board"]) if values["board"] else Board(),
        color=Color(**values["color"]) if values["color"] else Color(),
        fit=fit,
        locations=_field_locations(top),
    )


def _field_locations(doc: loader.Located) -> dict[str, Location]:
    """Where ``doc`` writes each field of the format, by dotted path (``""``: the document).

    Only fields the document gives are listed; a field it leaves to its default is found
    through its section (:meth:`Spec.location`).
    """
    out = {"": doc.location}
    _record(SPEC_FIELDS, doc, "", out)
    return out


def _record(fields: tuple[Field, ...], node: loader.Located, path: str,
            out: dict[str, Location]) -> None:  # fmt: skip
    for f in fields:
        child = node.value.get(f.name)
        if child is None:
            continue
        here = f"{path}.{f.name}" if path else f.name
        out[here] = child.location
        if f.kind == "section" and isinstance(child, loader.Located) and isinstance(child.value, dict):
            _record(f.fields, child, here, out)


def _check_cross(
    doc: loader.Located,
    name: str,
    h: Axis,
    v: Axis,
    core: CoreOptions,
    prefix: str,
    out: Collector,
) -> None:
    """Rules that involve more than one field."""
    for axis, label, unit in ((h, "horizontal", "pixels"), (v, "vertical", "lines")):
        if axis.total > MAX_AXIS:
            out.add(where(doc, label), label,
                    f"total of {axis.total} {unit} is more than {MAX_AXIS}")  # fmt: skip
        if 2 * axis.sync >= axis.total:  # a monitor reads the shorter level as the pulse (common practice)
            out.add(where(doc, label, "sync"), f"{label}.sync",
                    f"must be less than half the total ({axis.total} {unit}): a pulse of {axis.sync} "
                    "cannot be told from its inverse, got " + str(axis.sync))  # fmt: skip
    n = core.pixels_per_clock
    if n > 1:
        for key in ("active", "front_porch", "sync", "back_porch"):
            value = getattr(h, key)
            if value % n:
                out.add(where(doc, "horizontal", key), f"horizontal.{key}",
                        f"must divide by core.pixels_per_clock = {n}, got {value}")  # fmt: skip
    if core.scale > 1:
        for axis, label in ((h, "horizontal"), (v, "vertical")):
            if axis.active % core.scale:
                out.add(where(doc, label, "active"), f"{label}.active",
                        f"must divide by core.scale = {core.scale}, got {axis.active}")  # fmt: skip
    frame_cycles = (h.total // n) * v.total
    if core.lead >= frame_cycles and frame_cycles > 0:
        out.add(where(doc, "core", "lead"), "core.lead",
                f"must be less than one frame ({frame_cycles} cycles), got {core.lead}")  # fmt: skip
    port_names = [p for p in BASE_PORTS]
    for port in port_names:
        full = prefix + port
        reason = identifier_problem(full)
        if reason:
            out.add(where(doc, "ports", "prefix"), "ports.prefix",
                    f"makes port {full!r} illegal: {reason}")  # fmt: skip
            break
    clash = [p for p in port_names if (prefix + p).lower() == name.lower()]
    if clash:
        out.add(where(doc, "name"), "name",
                f"clashes with port {prefix + clash[0]!r} (VHDL ignores case), got {name!r}")  # fmt: skip


def _check_interlace(doc: loader.Located, h: Axis, v: Axis, core: CoreOptions,
                     out: Collector) -> None:  # fmt: skip
    """Rules of an interlaced timing: a half line in whole cycles, the options the core has."""
    half = 2 * core.pixels_per_clock
    if h.total % half:
        out.add(where(doc, "horizontal"), "horizontal",
                f"interlaced: the total must divide by 2 x core.pixels_per_clock = {half} "
                f"(vsync starts half a line late), got {h.total}")  # fmt: skip
    if v.back_porch < 1:
        out.add(where(doc, "vertical", "back_porch"), "vertical.back_porch",
                f"interlaced: must be at least 1 (vsync ends inside its field), got {v.back_porch}")
    if core.lead:
        out.add(where(doc, "core", "lead"), "core.lead",
                f"interlaced cores have no lead yet: must be 0, got {core.lead}")
    if core.scale > 1:
        out.add(where(doc, "core", "scale"), "core.scale",
                f"interlaced cores have no scale yet: must be 1, got {core.scale}")
    if v.active < 2:
        out.add(where(doc, "vertical", "active"), "vertical.active",
                f"interlaced: must be at least 2 (a field of one row), got {v.active}")
