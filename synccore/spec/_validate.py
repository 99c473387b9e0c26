"""Validation of an explicit-form document into a frozen :class:`Spec`.

Explicit form: ``pixel_clock_hz``, ``horizontal`` and ``vertical`` hold numbers
(:mod:`synccore.timings.resolve` rewrites ``standard:``, ``formula:`` and datasheet
ranges into that form first).  The validator walks the whole document and
collects every problem before raising, so a user can fix them all at once.
"""

from __future__ import annotations

from collections.abc import Sequence

from synccore.errors import Problem, SpecError
from synccore.spec import _yaml as loader
from synccore.spec._check import Collector, check_section, describe_node, field_names, where
from synccore.spec._fields import SPEC_FIELDS
from synccore.spec._rules import check_names, check_timing, field_locations
from synccore.spec._types import BASE_PORTS, Axis, Board, Color, CoreOptions, Fit, Spec
from synccore.spec._validate_modes import ModeOrigin, validate_modes


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
    modes: Sequence[ModeOrigin] = (),
) -> Spec:
    """Check an explicit-form document; raise :class:`SpecError` with every problem.

    ``origin`` and ``notes`` say where a resolved timing came from, ``fit`` the datasheet
    ranges it was fitted to; ``earlier`` are the problems the resolution step found,
    reported together with the validator's own.  A multi-mode document (``modes:``) gives
    its timings in its modes, and ``modes`` says where each came from, in their order.
    """
    out = Collector()
    out.problems.extend(earlier)
    top = top_mapping(doc)
    if "modes" in top.value:
        return validate_modes(top, source=source, modes=modes, out=out)
    values = check_section(SPEC_FIELDS, top, "", out)
    if values is None or out.problems:
        raise SpecError(out.problems)

    h = Axis(**values["horizontal"])
    v = Axis(**values["vertical"])
    core = CoreOptions(**values["core"]) if values["core"] else CoreOptions()
    prefix: str = (values["ports"] or {}).get("prefix", "") or ""
    interlaced = bool(values["interlaced"])
    check_timing(top, "", h, v, core, out)
    check_names(top, values["name"], prefix, BASE_PORTS, out)
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
        locations=field_locations(top),
    )


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
