"""The language-neutral context of a multi-mode core (a spec with ``modes:``).

All arithmetic happens here, as for the single-mode core (:mod:`synccore.emit.core.context`):
per-mode constants (one value per mode), counter widths for the largest mode, the flags and
the ports.  The switching rule is :mod:`synccore.model.multimode`'s.

How the core keeps that rule.  ``cur_mode`` is the mode of the position the counters hold
(they run one position ahead of the outputs).  It is loaded from the ``mode`` input on the
advancing edge that takes the counters from a frame's last position to the next frame's
first, which is the edge after which the outputs show the frame's last position; the
outputs registered on the next edge are then the new mode's.  The position flags loaded
on the switching edge describe position 0, where every mode's flags agree (each mode's
sync pulses start after and end before it: the spec's rules refuse zero back porches), so
the compares may still use the old mode's constants on that edge.  Sync levels are
per-mode constants; at every line start each sync takes its inactive level of the mode in
force, which is how a change of polarity happens at a frame boundary.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import PurePath

from synccore._version import __version__
from synccore.emit.core.context import GENERATED_MARK, Port, core_ports
from synccore.emit.core.flags import progressive_roles
from synccore.model import Timing, reset_port
from synccore.model.multimode import MultiTiming
from synccore.model.report import figures, text_table, timing_table


@dataclass(frozen=True)
class ModeConstant:
    """A constant with one value per mode; the core reads the value of the mode in force."""

    name: str
    values: tuple[int, ...]
    width: int  # bits; 1 for a level
    comment: str
    is_level: bool = False

    @property
    def current(self) -> str:
        """The name of the selected value in the core: the constant's name in lower case."""
        return "c_" + self.name.lower()


@dataclass(frozen=True)
class ModeFlag:
    """A registered position flag (see :mod:`synccore.emit.core.flags`), per-mode compares."""

    name: str
    axis: str  # "h" or "v"
    reset: int
    source: str  # a flag one position before in every mode, or ""
    before: ModeConstant | None  # compared with the counter when source is ""


@dataclass(frozen=True)
class MultiContext:
    """Everything a multi-mode core template needs, precomputed."""

    name: str
    header: tuple[str, ...]
    count: int  # modes
    mode_width: int
    all_values_known: bool  # every value of the mode input names a mode
    last_mode: int
    constants: tuple[ModeConstant, ...]
    flags: tuple[ModeFlag, ...]
    flag: dict[str, str]  # role -> flag register
    ports: tuple[Port, ...]
    port: dict[str, str]
    h_width: int
    v_width: int
    x_width: int
    y_width: int
    h_max: int  # the largest column and line any mode reaches (VHDL counter ranges)
    v_max: int
    has_ce: bool
    reset_async: bool
    reset_active_low: bool
    reset_port: str
    reset_active: int
    x_count_bits: int
    x_count_lsb: int
    y_lsb: int
    scale: int
    has_scale: bool
    mode_map: tuple[str, ...]  # one line per mode: its number and what it is

    @property
    def h_msb(self) -> int:
        return self.h_width - 1

    @property
    def v_msb(self) -> int:
        return self.v_width - 1

    @property
    def x_msb(self) -> int:
        return self.x_width - 1

    @property
    def y_msb(self) -> int:
        return self.y_width - 1

    @property
    def mode_msb(self) -> int:
        return self.mode_width - 1

    @property
    def x_count_msb(self) -> int:
        return self.x_count_lsb + self.x_count_bits - 1

    @property
    def y_src_msb(self) -> int:
        return self.y_lsb + self.y_width - 1


def _flags(mt: MultiTiming) -> tuple[tuple[ModeFlag, ...], dict[str, str], list[ModeConstant]]:
    """Every flag role of the single-mode core, one register each, with per-mode compares.

    ``h_at_zero`` follows ``h_at_last`` in every mode; ``h_at_vsync`` is the register of
    the hsync leading edge or of the line start (``core.vsync_align``, shared by the modes).
    """
    modes = mt.modes
    per_mode = [progressive_roles(t) for t in modes]
    align = mt.spec.core.vsync_align
    flag = {"h_at_vsync": "h_at_sync_start" if align == "hsync" else "h_at_zero"}
    flags, consts = [], []
    for i, (role, axis, _, mark) in enumerate(per_mode[0]):
        if role in flag:
            continue
        flag[role] = role
        if role == "h_at_zero":
            flags.append(ModeFlag(role, axis, 1, "h_at_last", None))
            continue
        totals = [t.h_total if axis == "h" else t.v_total for t in modes]
        befores = tuple((roles[i][2] - 1) % total for roles, total in zip(per_mode, totals, strict=True))
        width = mt.h_width if axis == "h" else mt.v_width
        before = ModeConstant(f"{role.upper()}_FROM", befores, width,
                              f"{role} is 1 after the advance from here ({mark})")  # fmt: skip
        consts.append(before)
        flags.append(ModeFlag(role, axis, int(role.endswith("_zero")), "", before))
    return tuple(flags), flag, consts


def _constants(mt: MultiTiming, befores: list[ModeConstant]) -> tuple[ModeConstant, ...]:
    modes = mt.modes

    def each(f: object) -> tuple[int, ...]:
        return tuple(f(t) for t in modes)  # type: ignore[operator]

    return (
        ModeConstant("V_LAST", each(lambda t: t.v_last), mt.v_width, "last line of a frame"),
        *befores,
        ModeConstant("H_SYNC_ON", each(lambda t: t.hsync_active_level), 1,
                     "hsync level during the pulse", True),
        ModeConstant("H_SYNC_OFF", each(lambda t: t.hsync_inactive_level), 1,
                     "hsync level outside the pulse", True),
        ModeConstant("V_SYNC_ON", each(lambda t: t.vsync_active_level), 1,
                     "vsync level during the pulse", True),
        ModeConstant("V_SYNC_OFF", each(lambda t: t.vsync_inactive_level), 1,
                     "vsync level outside the pulse", True),
    )  # fmt: skip


def _multi_ports(mt: MultiTiming) -> tuple[Port, ...]:
    """The single-mode ports (x and y wide enough for every mode), ``mode`` and ``mode_active``."""
    p = mt.spec.port_prefix
    widths = {"x": mt.x_width, "y": mt.y_width}
    out = []
    for port in core_ports(Timing(mt.spec)):
        port = Port(port.base, port.name, port.direction, widths.get(port.base, port.width),
                    port.comment)  # fmt: skip
        out.append(port)
        if port.base in ("ce",) or (port.base.startswith("rst") and not mt.spec.core.clock_enable):
            out.append(Port("mode", p + "mode", "in", mt.mode_width,
                            "the mode of the next frame, read on the last cycle of each frame"))
    out.append(Port("mode_active", p + "mode_active", "out", mt.mode_width,
                    "the mode the outputs are in"))
    return tuple(out)


def mode_lines(mt: MultiTiming) -> list[str]:
    """One line per mode: its number, size, refresh and where its timing came from."""
    lines = []
    for i, t in enumerate(mt.modes):
        h, v = t.spec.horizontal, t.spec.vertical
        rate = next(text for label, text in figures(t) if label == "refresh")
        origin = f" ({t.spec.origin})" if t.spec.origin else ""
        lines.append(f"mode {i}: {h.active}x{v.active}, {rate}{origin}")
    return lines


def multi_header(mt: MultiTiming) -> tuple[str, ...]:
    """The header comment: the generator, the modes with their timing tables, the switching rule."""
    source = PurePath(mt.spec.source).name
    lines = [
        f"{GENERATED_MARK} {__version__} from {source}; do not edit, regenerate instead.",
        f"Multi-mode display timing core '{mt.spec.name}': {mt.count} modes.",
        "",
    ]
    for i, t in enumerate(mt.modes):
        lines += [mode_lines(mt)[i], *(f"  Note: {n}" for n in t.spec.notes)]
        lines += [f"  {row}" for row in text_table(timing_table(t))]
        lines += [f"  {label}: {text}" for label, text in figures(t)]
        lines.append("")
    lines += [
        "Switching: the mode input is read on the last cycle of each frame (the edge",
        "that shows the frame's last position); the next frame is a whole frame of",
        "that mode, and mode_active says so from its first cycle. A value that names",
        "no mode is ignored. Reset starts a frame of mode 0.",
        "Order within a line: active, front porch, sync, back porch; the same in lines.",
        "Every output comes straight from a flip-flop.",
    ]
    return tuple(lines)


def build_multi_context(mt: MultiTiming) -> MultiContext:
    """The context of ``mt``'s core."""
    spec = mt.spec
    core = spec.core
    reset = reset_port(core.reset)
    flags, flag, befores = _flags(mt)
    ports = _multi_ports(mt)
    shift = Timing(spec).scale_shift
    return MultiContext(
        name=spec.name,
        header=multi_header(mt),
        count=mt.count,
        mode_width=mt.mode_width,
        all_values_known=mt.count == 1 << mt.mode_width,
        last_mode=mt.count - 1,
        constants=_constants(mt, befores),
        flags=flags,
        flag=flag,
        ports=ports,
        port={p.base: p.name for p in ports},
        h_width=mt.h_width,
        v_width=mt.v_width,
        x_width=mt.x_width,
        y_width=mt.y_width,
        h_max=max(t.h_last for t in mt.modes),
        v_max=max(t.v_last for t in mt.modes),
        has_ce=core.clock_enable,
        reset_async=core.reset.startswith("async"),
        reset_active_low=reset.active == 0,
        reset_port=spec.port_prefix + reset.base,
        reset_active=reset.active,
        x_count_bits=mt.x_width,
        x_count_lsb=shift,
        y_lsb=shift,
        scale=core.scale,
        has_scale=core.scale > 1,
        mode_map=tuple(mode_lines(mt)),
    )
