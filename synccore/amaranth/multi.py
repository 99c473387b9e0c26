"""The multi-mode core as an Amaranth component, and the built-in engine's switching run.

:class:`MultiSyncCore` is the Amaranth model of the emitted multi-mode core (a spec with
``modes:``): the same ports (``mode`` in, ``mode_active`` out, ``x``/``y`` as wide as the
largest mode needs), every output registered.  Its numbers are each mode's
:class:`~synccore.model.Timing`, the same ones :class:`~synccore.amaranth.core.SyncCore`
uses for one mode, selected by the mode in force.  It keeps
:mod:`synccore.model.multimode`'s switching rule: ``cur_mode`` is the mode of the position
the counters hold (one ahead of the outputs); it is loaded from ``mode`` (when the value
names a mode) only on the advancing edge that takes the counters from a frame's last
position to the next frame's first, which is the edge after which the outputs show the
frame's last position; the outputs registered on the next edge belong to the new mode.

:func:`run_switching_builtin` runs it in Amaranth's simulator under a switching sequence
(``synccore.verification.switching``): the sequence is played by a small harness in the
simulation itself (the ``mode`` value for each advancing edge, from a table), and Python
wakes only when a watched output changes, so a run costs about what the free-running
simulation costs.

Import this module only when needed: Amaranth is a required dependency, but slow to import.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from amaranth.hdl import Array, Cat, ClockDomain, Const, Elaboratable, Module, Mux, Signal, Value
from amaranth.lib import wiring
from amaranth.lib.wiring import In, Out
from amaranth.sim import Simulator

from synccore.model import LFSR_SEED, RESET_CYCLES, Change, MultiTiming, Outputs, Timing
from synccore.model.fields import bits_for
from synccore.spec import Spec

WATCHED = ("hsync", "vsync", "de", "hblank", "vblank", "y", "line_start", "frame_start", "mode_active")
"""The outputs whose changes cut a run into segments (x too when every cycle is asked for)."""


class MultiSyncCore(wiring.Component):  # type: ignore[misc]
    """A multi-mode display timing core: the mode read at a frame's end, in force from the next frame."""

    def __init__(self, spec: Spec) -> None:
        self.multi = mt = MultiTiming(spec)
        r = mt.reset_outputs()
        members = {
            "mode": In(mt.mode_width),
            "hsync": Out(1, init=r.hsync),
            "vsync": Out(1, init=r.vsync),
            "de": Out(1, init=r.de),
            "hblank": Out(1, init=r.hblank),
            "vblank": Out(1, init=r.vblank),
            "x": Out(mt.x_width, init=r.x),
            "y": Out(mt.y_width, init=r.y),
            "line_start": Out(1, init=r.line_start),
            "frame_start": Out(1, init=r.frame_start),
            "mode_active": Out(mt.mode_width, init=0),
        }
        if spec.core.clock_enable:
            members["ce"] = In(1)
        super().__init__(members)

    def elaborate(self, platform: object) -> Module:
        mt = self.multi
        m = Module()
        cur_mode = Signal(mt.mode_width)  # the mode of h_pos/v_pos
        h_pos = Signal(mt.h_width)  # the position the outputs take on at the next advance
        v_pos = Signal(mt.v_width)
        in_force = self._in_force(cur_mode)

        def per_mode(number: Callable[[Timing], int]) -> Value:
            """``number`` of the mode in force: one constant per mode, chosen by the mode in force
            (a wire, as the emitted core's ``c_*``: Amaranth's simulator recomputes it only when
            the mode changes)."""
            values = [number(t) for t in mt.modes]
            chosen = Signal(bits_for(max(values)))
            m.d.comb += chosen.eq(Array(Const(v, len(chosen)) for v in values)[in_force])
            return chosen

        h_last, v_last = per_mode(lambda t: t.h_last), per_mode(lambda t: t.v_last)
        h_active, v_active = per_mode(lambda t: t.h_active), per_mode(lambda t: t.v_active)
        advance = self.ce if mt.spec.core.clock_enable else Const(1)
        known = self.mode < mt.count if mt.count < 1 << mt.mode_width else Const(1)

        with m.If(advance):
            with m.If(h_pos == h_last):
                m.d.sync += h_pos.eq(0)
                with m.If(v_pos == v_last):
                    m.d.sync += v_pos.eq(0)
                    with m.If(known):  # the counters leave the frame's last position
                        m.d.sync += cur_mode.eq(self.mode)
                with m.Else():
                    m.d.sync += v_pos.eq(v_pos + 1)
            with m.Else():
                m.d.sync += h_pos.eq(h_pos + 1)

            hblank, vblank = h_pos >= h_active, v_pos >= v_active
            m.d.sync += [
                self.mode_active.eq(in_force),
                self.de.eq(~hblank & ~vblank),
                self.hblank.eq(hblank),
                self.vblank.eq(vblank),
                self.line_start.eq((h_pos == 0) & ~vblank),
                self.frame_start.eq((h_pos == 0) & (v_pos == 0)),
            ]
            self._syncs(m, h_pos, v_pos, per_mode)
            shift = mt.modes[0].scale_shift  # core.scale is shared by every mode
            with m.If(~hblank):
                m.d.sync += self.x.eq(h_pos >> shift)
            with m.Else():
                m.d.sync += self.x.eq(0)
            with m.If(~vblank):
                m.d.sync += self.y.eq(v_pos >> shift)
            with m.Else():
                m.d.sync += self.y.eq(0)
        return m

    def _in_force(self, cur_mode: Signal) -> Value:
        """The mode whose constants the counters and outputs use: the register read at frame ends."""
        return cur_mode

    def _syncs(self, m: Module, h_pos: Signal, v_pos: Signal,
               per_mode: Callable[[Callable[[Timing], int]], Value]) -> None:  # fmt: skip
        """Syncs change only at their edges (a pulse is never cut short); at a frame's first
        position each takes the inactive level of the mode in force, which is how a change of
        polarity happens at a frame boundary (no mode is inside a pulse there)."""
        on_h, off_h = per_mode(lambda t: t.hsync_active_level), per_mode(lambda t: t.hsync_inactive_level)
        on_v, off_v = per_mode(lambda t: t.vsync_active_level), per_mode(lambda t: t.vsync_inactive_level)
        h_start, h_end = per_mode(lambda t: t.h_sync_start), per_mode(lambda t: t.h_sync_end)
        v_column = per_mode(lambda t: t.vsync_at(0)[1])
        v_start = per_mode(lambda t: t.vsync_at(0)[0])
        v_end = per_mode(lambda t: (t.vsync_at(0)[0] + t.spec.vertical.sync) % t.v_total)
        with m.If(h_pos == h_start):
            m.d.sync += self.hsync.eq(on_h)
        with m.Elif((h_pos == h_end) | (h_pos == 0)):
            m.d.sync += self.hsync.eq(off_h)
        with m.If((h_pos == v_column) & (v_pos == v_start)):
            m.d.sync += self.vsync.eq(on_v)
        with m.Elif(((h_pos == v_column) & (v_pos == v_end)) | ((h_pos == 0) & (v_pos == 0))):
            m.d.sync += self.vsync.eq(off_v)


class _SwitchingHarness(Elaboratable):  # type: ignore[misc]
    """The core, an advancing-edge counter, the clock enable, and the sequence played on ``mode``."""

    def __init__(self, core: MultiSyncCore, changes: Sequence[Change], watched: Sequence[str]) -> None:
        self.core = core
        self.changes = list(changes)
        self.adv = Signal(32)  # advancing edges so far: after edge k, k
        self.names = list(watched)
        self.watched = [getattr(core, name) for name in watched]
        self.mon = Signal(32 + sum(len(s) for s in self.watched) + len(core.x))
        self.hold = Signal()  # during reset: mode held at the last mode, whatever the sequence says
        reset = core.multi.spec.core.reset
        self.domain = ClockDomain("sync", async_reset=reset.startswith("async"))

    def elaborate(self, platform: object) -> Module:
        m = Module()
        m.domains.sync = self.domain
        m.submodules.core = core = self.core
        if core.multi.spec.core.clock_enable:
            lfsr = Signal(16, init=LFSR_SEED)
            m.d.sync += lfsr.eq(Cat(lfsr[15] ^ lfsr[13] ^ lfsr[12] ^ lfsr[10], lfsr[:15]))
            advance = lfsr[:2] != 0
            m.d.comb += core.ce.eq(advance)
        else:
            advance = Const(1)
        # mode holds, before advancing edge k, the value of the last change at or before k
        # (0 before the first); it moves on the advance before the edge a change names.
        edges = [e for e, _ in self.changes]
        first = sum(1 for e in edges if e <= 1)
        value = Signal(len(core.mode), init=self.changes[first - 1][1] if first else 0)
        # Edge 0 stands for "no more changes": advancing edges count from 1.
        table_edge = Array(Const(e, 32) for e in [*edges, 0, 0])
        table_value = Array(Const(v, len(core.mode)) for _, v in [*self.changes, (0, 0)])
        nxt = Signal(range(len(edges) + 1), init=first)
        next_edge = Signal(32, init=[*edges, 0][first])  # the edge of change nxt
        m.d.comb += core.mode.eq(Mux(self.hold, core.multi.count - 1, value))
        with m.If(advance):
            m.d.sync += self.adv.eq(self.adv + 1)
            with m.If(next_edge == self.adv + 2):
                m.d.sync += [value.eq(table_value[nxt]), nxt.eq(nxt + 1),
                             next_edge.eq(table_edge[nxt + 1])]  # fmt: skip
        m.d.comb += self.mon.eq(Cat(self.adv, core.x, *self.watched))
        return m

    def decode(self, word: int) -> Seen:
        """The edge count, outputs and ``mode_active`` packed in a value of ``mon``."""
        adv, word = word & 0xFFFFFFFF, word >> 32
        x_width = len(self.core.x)
        x, word = word & ((1 << x_width) - 1), word >> x_width
        values = {}
        for name, signal in zip(self.names, self.watched, strict=True):
            values[name], word = word & ((1 << len(signal)) - 1), word >> len(signal)
        mode = values.pop("mode_active")
        values["x"] = x
        return Seen(adv, Outputs(**values), mode)


@dataclass(frozen=True)
class Seen:
    """The outputs and ``mode_active`` from advancing edge ``edge`` on, until the next :class:`Seen`."""

    edge: int
    outputs: Outputs
    mode: int


@dataclass(frozen=True)
class BuiltinSwitching:
    """What a switching run of the Amaranth model saw."""

    seen: list[Seen]  # after edge 1, then after every edge where a watched output changed
    reset_problems: list[str]  # cycles in reset whose outputs were not mode 0's reset values


def run_switching_builtin(spec: Spec, changes: Sequence[Change], edges: int, *,
                          every_cycle: bool = False, vcd: Path | None = None,
                          core: Callable[[Spec], object] | None = None) -> BuiltinSwitching:  # fmt: skip
    """Run the Amaranth model of ``spec`` for ``edges`` advancing edges under ``changes``.

    Reset is held for ``RESET_CYCLES`` cycles with ``mode`` at the last mode (reset must still
    start a frame of mode 0), then released; edge 1 is the first advancing edge after that.
    What the outputs were after edge 1 and after every edge where a watched output changed
    (:data:`WATCHED`; with ``every_cycle`` x too, so that every cycle is known) is returned.
    The clock enable, when the core has one, follows the measurement harness's LFSR.
    ``core`` builds the component (default :class:`MultiSyncCore`).
    """
    component = (core or MultiSyncCore)(spec)
    assert isinstance(component, MultiSyncCore)
    names = [*WATCHED, *(("x",) if every_cycle else ())]
    harness = _SwitchingHarness(component, changes, names)
    decode = harness.decode
    want_reset = (component.multi.reset_outputs(), 0)
    seen: list[Seen] = []
    reset_problems: list[str] = []

    async def bench(ctx: Any) -> None:
        ctx.set(harness.hold, 1)
        ctx.set(harness.domain.rst, 1)
        for cycle in range(RESET_CYCLES):
            await ctx.tick()
            got = decode(ctx.get(harness.mon))
            if (got.outputs, got.mode) != want_reset:
                reset_problems.append(f"cycle {cycle}: got {got.outputs}, mode {got.mode}; "
                                      f"want {want_reset[0]}, mode 0")  # fmt: skip
        ctx.set(harness.domain.rst, 0)
        ctx.set(harness.hold, 0)
        await ctx.changed(harness.adv)
        seen.append(decode(ctx.get(harness.mon)))
        watched = [getattr(component, name) for name in names]
        while seen[-1].edge < edges:
            await ctx.changed(*watched)
            got = decode(ctx.get(harness.mon))
            if got.edge == seen[-1].edge:
                seen[-1] = got
            elif got.edge <= edges:
                seen.append(got)
            else:
                break

    sim = Simulator(harness)
    sim.add_clock(10e-9)
    sim.add_testbench(bench)
    if vcd is not None:
        with sim.write_vcd(str(vcd)):
            sim.run()
    else:
        sim.run()
    return BuiltinSwitching(seen, reset_problems)
