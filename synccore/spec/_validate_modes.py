"""Validation of a multi-mode description (``modes:``) into a :class:`Spec` with its modes.

The top level gives the shared keys (name, core, ports, board, color); every entry of
``modes:`` gives one timing, as a single-mode description gives it (the resolution step
has already turned ``standard:``, ``formula:`` and ranges into numbers).  Each mode is
checked by the single-mode rules with the shared core options, then by the rules of the
multi-mode core (docs/multimode.md), which refuse what that core cannot do yet.  Every
problem is collected and located; one :class:`SpecError` carries them all.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from synccore.errors import Location, SpecError
from synccore.spec import _yaml as loader
from synccore.spec._check import Collector, check_section, where
from synccore.spec._fields import MODE_FIELDS, SHARED_FIELDS
from synccore.spec._rules import check_names, check_timing, field_locations
from synccore.spec._types import (
    BASE_PORTS,
    MULTI_MODE_PORTS,
    Axis,
    Board,
    Color,
    CoreOptions,
    Fit,
    Spec,
)

ModeOrigin = tuple[str, tuple[str, ...], Fit | None]
"""Where one mode's timing came from: its origin, notes and datasheet fit (or None)."""


def validate_modes(top: loader.Located, *, source: str, modes: Sequence[ModeOrigin],
                   out: Collector) -> Spec:  # fmt: skip
    """The multi-mode spec of ``top``; raise :class:`SpecError` with every problem in ``out``."""
    values = check_section(SHARED_FIELDS, top, "", out)
    if values is None or out.problems:
        raise SpecError(out.problems)
    core = CoreOptions(**values["core"]) if values["core"] else CoreOptions()
    prefix: str = (values["ports"] or {}).get("prefix", "") or ""
    check_names(top, values["name"], prefix, BASE_PORTS + MULTI_MODE_PORTS, out)
    _check_core(top, core, out)
    entries: list[loader.Located] = top.value["modes"].value
    built = []
    for i, (entry, mode) in enumerate(zip(entries, values["modes"], strict=True)):
        h, v = Axis(**mode["horizontal"]), Axis(**mode["vertical"])
        check_timing(entry, f"modes[{i}].", h, v, core, out)
        _check_mode(entry, i, h, v, bool(mode["interlaced"]), out)
        origin, notes, fit = modes[i] if i < len(modes) else ("", (), None)
        locations = field_locations(entry, MODE_FIELDS)
        built.append(Spec(
            name=values["name"], pixel_clock_hz=mode["pixel_clock_hz"], horizontal=h, vertical=v,
            core=core, port_prefix=prefix, source=source, origin=origin, notes=notes,
            board=Board(**values["board"]) if values["board"] else Board(),
            color=Color(**values["color"]) if values["color"] else Color(),
            fit=fit, locations=locations,
        ))  # fmt: skip
    if out.problems:
        raise SpecError(out.problems)
    # The top level is mode 0 (so that every single-mode stage keeps working), with the modes.
    shared: dict[str, Location] = dict(built[0].locations)
    shared.update(field_locations(top, SHARED_FIELDS))
    return replace(built[0], modes=tuple(built), locations=shared)


def _check_core(top: loader.Located, core: CoreOptions, out: Collector) -> None:
    """The core options the multi-mode core does not have yet."""
    if core.pixels_per_clock != 1:
        out.add(where(top, "core", "pixels_per_clock"), "core.pixels_per_clock",
                f"multi-mode cores carry one pixel per clock yet: must be 1, "
                f"got {core.pixels_per_clock}")  # fmt: skip
    if core.lead:
        out.add(where(top, "core", "lead"), "core.lead",
                f"multi-mode cores have no lead yet: must be 0, got {core.lead}")


def _check_mode(entry: loader.Located, i: int, h: Axis, v: Axis, interlaced: bool,
                out: Collector) -> None:  # fmt: skip
    """One mode's rules: progressive, and sync pulses that end inside their own line and frame."""
    here = f"modes[{i}]"
    if interlaced:
        out.add(where(entry, "interlaced"), f"{here}.interlaced",
                "multi-mode cores take progressive timings only yet: must be false, got an "
                "interlaced timing")  # fmt: skip
    # A pulse that runs into the next line (frame) would run into the next mode's.
    for axis, label, what in ((h, "horizontal", "hsync ends inside its line"),
                              (v, "vertical", "vsync ends inside its frame")):  # fmt: skip
        if axis.back_porch < 1:
            out.add(where(entry, label, "back_porch"), f"{here}.{label}.back_porch",
                    f"multi-mode: must be at least 1 so that {what} (a mode switch must "
                    f"not cut a pulse), got {axis.back_porch}")  # fmt: skip

