"""Validation rules shared by single-mode and multi-mode descriptions."""

from __future__ import annotations

from synccore.errors import Location
from synccore.spec import _yaml as loader
from synccore.spec._check import Collector, where
from synccore.spec._fields import SPEC_FIELDS, Field
from synccore.spec._names import identifier_problem
from synccore.spec._types import MAX_AXIS, Axis, CoreOptions


def field_locations(doc: loader.Located, fields: tuple[Field, ...] = SPEC_FIELDS) -> dict[str, Location]:
    """Where ``doc`` writes each field of the format, by dotted path (``""``: the document).

    Only fields the document gives are listed; a field it leaves to its default is found
    through its section (:meth:`Spec.location`).
    """
    out = {"": doc.location}
    _record(fields, doc, "", out)
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


def check_timing(doc: loader.Located, path: str, h: Axis, v: Axis, core: CoreOptions,
                  out: Collector) -> None:  # fmt: skip
    """Rules that involve more than one field of one timing; ``doc`` holds the timing, ``path``
    is its dotted place in the file (``""`` for a single-mode spec, ``"modes[1]."`` for a mode)."""
    for axis, label, unit in ((h, "horizontal", "pixels"), (v, "vertical", "lines")):
        if axis.total > MAX_AXIS:
            out.add(where(doc, label), path + label,
                    f"total of {axis.total} {unit} is more than {MAX_AXIS}")  # fmt: skip
        if 2 * axis.sync >= axis.total:  # a monitor reads the shorter level as the pulse (common practice)
            out.add(where(doc, label, "sync"), f"{path}{label}.sync",
                    f"must be less than half the total ({axis.total} {unit}): a pulse of {axis.sync} "
                    "cannot be told from its inverse, got " + str(axis.sync))  # fmt: skip
    n = core.pixels_per_clock
    if n > 1:
        for key in ("active", "front_porch", "sync", "back_porch"):
            value = getattr(h, key)
            if value % n:
                out.add(where(doc, "horizontal", key), f"{path}horizontal.{key}",
                        f"must divide by core.pixels_per_clock = {n}, got {value}")  # fmt: skip
    if core.scale > 1:
        for axis, label in ((h, "horizontal"), (v, "vertical")):
            if axis.active % core.scale:
                out.add(where(doc, label, "active"), f"{path}{label}.active",
                        f"must divide by core.scale = {core.scale}, got {axis.active}")  # fmt: skip
    frame_cycles = (h.total // n) * v.total
    if core.lead >= frame_cycles and frame_cycles > 0:
        out.add(where(doc, "core", "lead"), "core.lead",
                f"must be less than one frame ({frame_cycles} cycles), got {core.lead}")  # fmt: skip


def check_names(doc: loader.Located, name: str, prefix: str, ports: tuple[str, ...],
                 out: Collector) -> None:  # fmt: skip
    """The port prefix makes legal port names, and no port is named like the core."""
    for port in ports:
        full = prefix + port
        reason = identifier_problem(full)
        if reason:
            out.add(where(doc, "ports", "prefix"), "ports.prefix",
                    f"makes port {full!r} illegal: {reason}")  # fmt: skip
            break
    clash = [p for p in ports if (prefix + p).lower() == name.lower()]
    if clash:
        out.add(where(doc, "name"), "name",
                f"clashes with port {prefix + clash[0]!r} (VHDL ignores case), got {name!r}")  # fmt: skip
