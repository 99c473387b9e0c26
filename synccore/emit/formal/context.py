"""The context of the property wrapper: a reference counter and the properties of every output.

The wrapper instantiates a core and, beside it, a reference position counter
written from :class:`~synccore.model.Timing`'s numbers alone.  Both are reset by
the same port and advanced by the same clock enable, so the reference shows, on
every cycle, the position the core's outputs must show (``Timing.outputs_at``):
the properties compare each output with what the reference says.  All numbers
are computed here; the template only lays them out.

With ``internals=True`` (a core synccore generated) the wrapper also states how
the core's own counters relate to the reference: invariants that make the
properties provable by k-induction at a small depth.  A core edited by hand
(``internals=False``) is judged on its ports only.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.emit.core.context import GENERATED_MARK, build_context
from synccore.emit.core.flags import Flag
from synccore.model import Timing, bits_for

PROPERTY_NAMES: dict[str, str] = {
    "reset_values": "reset values (while in reset and before the first advance)",
    "hsync_level": "hsync polarity/position",
    "vsync_level": "vsync polarity/position",
    "de_level": "de",
    "hblank_level": "hblank",
    "vblank_level": "vblank",
    "x_value": "x",
    "y_value": "y",
    "line_start_pulse": "line_start",
    "frame_start_pulse": "frame_start",
    "ref_in_range": "reference counter in range (invariant)",
    "core_position": "core position counters follow the reference (invariant)",
    "core_lead": "core lead counters follow the reference (invariant)",
    "core_flags": "core position flags match the reference counter (invariant)",
}
"""Label of each assertion in the wrapper -> the property it checks, as reports name it."""


@dataclass(frozen=True)
class Value:
    """A named constant of the wrapper: ``name = value`` in ``width`` bits (``level``: one bit)."""

    name: str
    value: int
    width: int
    comment: str
    level: bool = False


@dataclass(frozen=True)
class FormalContext:
    """Everything the property wrapper's template needs, precomputed."""

    name: str  # the wrapper module's name
    core_name: str
    header: tuple[str, ...]
    constants: tuple[Value, ...]
    port: dict[str, str]  # base name -> the core's port name
    has_ce: bool
    has_lead: bool
    reset_async: bool
    reset_active: int
    vsync_wraps: bool  # a vsync pulse runs past the end of the frame into line 0
    internals: bool  # relate the core's own counters to the reference
    h_msb: int
    v_msb: int
    x_msb: int
    y_msb: int
    x_full_msb: int  # a column in pixels, before the scale: the lead column times pixels_per_clock
    labels: tuple[str, ...]
    flags: tuple[Flag, ...]  # the core's position flags (each: 1 while its counter is at ``at``)

    @property
    def internal_wires(self) -> tuple[tuple[str, str, int], ...]:
        """(wrapper wire, core signal, msb) of the core signals the invariants read."""
        if not self.internals:
            return ()
        wires = [("core_h_pos", "h_pos", self.h_msb), ("core_v_pos", "v_pos", self.v_msb)]
        if self.has_lead:
            wires += [("core_h_lead", "h_lead", self.h_msb), ("core_v_lead", "v_lead", self.v_msb)]
        wires += [(f"core_{f.name}", f.name, 0) for f in self.flags]
        return tuple(wires)


def _width(value: int, at_least: int) -> int:
    return max(at_least, bits_for(value))


def _constants(t: Timing) -> tuple[Value, ...]:
    hw, vw = t.h_width, t.v_width
    lead_h, lead_v = t.lead_reset
    ppc_log2 = t.ppc.bit_length() - 1
    values = [
        Value("REF_H_LAST", t.h_last, hw, "last cycle of a line"),
        Value("REF_V_LAST", t.v_last, vw, "last line of a frame"),
        Value("REF_H_ACTIVE", t.h_active, _width(t.h_active, hw), "active cycles per line"),
        Value("REF_V_ACTIVE", t.v_active, _width(t.v_active, vw), "active lines per frame"),
        Value("REF_HS_FROM", t.h_sync_start, hw, "first cycle of the hsync pulse"),
        Value("REF_HS_TO", t.h_sync_stop, _width(t.h_sync_stop, hw),
              "one past the last cycle of the hsync pulse (not wrapped)"),
        Value("REF_VS_V_FROM", t.v_sync_start, vw, "line of the vsync leading edge"),
        Value("REF_VS_V_TO", t.v_sync_stop, _width(t.v_sync_stop, vw),
              "line of the vsync trailing edge (not wrapped)"),
        Value("REF_VS_H", t.v_sync_at_h, hw, "cycle of the line at which vsync changes"),
        Value("REF_LEAD_H", lead_h, hw, f"column (cycles) {t.lead} cycles after the first pixel"),
        Value("REF_LEAD_V", lead_v, vw, f"line {t.lead} cycles after the first pixel"),
        Value("REF_PPC_LOG2", ppc_log2, 4, "x = (column * pixels_per_clock) >> REF_SCALE_LOG2"),
        Value("REF_SCALE_LOG2", t.scale_shift, 4, "x and y are divided by core.scale"),
        Value("REF_HS_ON", t.hsync_active_level, 1, "hsync level during the pulse", True),
        Value("REF_HS_OFF", t.hsync_inactive_level, 1, "hsync level outside it", True),
        Value("REF_VS_ON", t.vsync_active_level, 1, "vsync level during the pulse", True),
        Value("REF_VS_OFF", t.vsync_inactive_level, 1, "vsync level outside it", True),
    ]  # fmt: skip
    return tuple(values)


def build_formal_context(t: Timing, *, internals: bool) -> FormalContext:
    """The property wrapper of ``t``'s core; ``internals``: add the invariants on its counters."""
    core = build_context(t)
    labels = [k for k in PROPERTY_NAMES if not k.startswith("core_")]
    if internals:
        labels.append("core_position")
        if core.has_lead:
            labels.append("core_lead")
        labels.append("core_flags")
    return FormalContext(
        name=f"{core.name}_props",
        core_name=core.name,
        header=(
            f"{GENERATED_MARK}: formal properties of the core '{core.name}'.",
            "A reference position counter, reset and advanced with the core, says what",
            "every output must show; one labelled assertion per output.",
        ),
        constants=_constants(t),
        port=dict(core.port) | {"reset": core.reset_port},
        has_ce=core.has_ce,
        has_lead=core.has_lead,
        reset_async=core.reset_async,
        reset_active=core.reset_active,
        vsync_wraps=t.v_sync_stop == t.v_total and t.v_sync_at_h > 0,
        internals=internals,
        h_msb=t.h_width - 1,
        v_msb=t.v_width - 1,
        x_msb=t.x_width - 1,
        y_msb=t.y_width - 1,
        x_full_msb=t.h_width + t.ppc.bit_length() - 2,
        labels=tuple(labels),
        flags=core.flags if internals else (),
    )
