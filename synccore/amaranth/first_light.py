"""The first-light design as Amaranth: :class:`SyncCore` + the pattern generator + output stage.

Built from the same :class:`~synccore.emit.first_light.pattern.PatternContext` numbers as the
Verilog and VHDL text (bar boundaries, grid bits, channel slices, alignment
delays), so ``synccore view --sim builtin`` shows the Amaranth model of the
design without any HDL simulator.  The testbench wakes only when a pin changes
and records the same change lines as the HDL display bench.

Import this module only when needed: Amaranth is an optional dependency.
"""

from __future__ import annotations

from amaranth.hdl import Cat, Const, Elaboratable, Module, Signal, Value
from amaranth.sim import Simulator

from synccore.amaranth.core import SyncCore
from synccore.emit.first_light.pattern import PatternContext, pattern_context
from synccore.model import Timing
from synccore.spec import Spec


class FirstLight(Elaboratable):  # type: ignore[misc]
    """Core, pattern generator and output stage; pins ``hsync``, ``vsync``, ``de``, ``red`` ..."""

    def __init__(self, spec: Spec, pattern: str) -> None:
        self.spec = spec
        self.ctx: PatternContext = pattern_context(spec, pattern)
        t = Timing(spec)
        self.core = SyncCore(spec)
        self.hsync = Signal(init=t.hsync_inactive_level)
        self.vsync = Signal(init=t.vsync_inactive_level)
        self.de = Signal()
        self.colour = [Signal(ch.bus_msb + 1, name=ch.base) for ch in self.ctx.channels]
        self.cycle = Signal(32)

    def _lane_columns(self, x: Value) -> list[Value]:
        """The column of each lane: x itself, or x with its low bits set to the lane's index."""
        c = self.ctx
        if not c.has_lanes:
            return [x]
        shift = c.core.x_shift
        return [Cat(Const(lane.index, shift), x[shift:]) for lane in c.lanes]

    def _lane_colours(self, m: Module, x: Value, y: Value) -> list[list[Value]]:
        """(red, green, blue) of each lane, before the pattern's register."""
        c = self.ctx
        out: list[list[Value]] = []
        for lx in self._lane_columns(x):
            if c.flags["gradient"]:
                colour = []
                for ch in c.channels:
                    src = lx if ch.source == "x" else y
                    taken = src[ch.take_lsb:ch.take_msb + 1]
                    colour.append(Cat(Const(0, ch.pad), taken) if ch.pad else taken)
                out.append(colour)
                continue
            if c.flags["bars"]:
                bar = Signal(3)
                with m.If(lx >= c.bar_bounds[0][1]):
                    m.d.comb += bar.eq(c.bar_bounds[0][2])
                for _, bound, index in c.bar_bounds[1:]:
                    with m.Elif(lx >= bound):
                        m.d.comb += bar.eq(index)
                out.append([bar[i].replicate(ch.bits) for i, ch in enumerate(c.channels)])
                continue
            mask = (1 << (c.grid_msb + 1)) - 1
            if c.flags["grid"]:
                on = ((lx & mask) == 0) | ((y & mask) == 0) | (lx == c.x_last) | (y == c.y_last)
            elif c.flags["checker"]:
                on = lx[c.checker_bit] ^ y[c.checker_bit]
            else:  # edges
                on = (lx == 0) | (lx == c.x_last) | (y == 0) | (y == c.y_last)
            out.append([on.replicate(ch.bits) for ch in c.channels])
        return out

    def _pattern(self, m: Module, x: Value, y: Value) -> list[Signal]:
        """The pattern generator's registered colour buses: every pixel's word, pixel 0 lowest."""
        c = self.ctx
        lanes = self._lane_colours(m, x, y)
        out = [Signal(ch.bus_msb + 1, name=f"pattern_{ch.base}") for ch in c.channels]
        for k, sig in enumerate(out):
            m.d.sync += sig.eq(Cat(*(lanes[p.lane.index][k] for p in c.pixels)))
        return out

    def elaborate(self, platform: object) -> Module:
        c = self.ctx
        m = Module()
        m.submodules.core = core = self.core
        if self.spec.core.clock_enable:
            m.d.comb += core.ce.eq(1)
        pattern = self._pattern(m, core.x, core.y)
        hs, vs, de = core.hsync, core.vsync, core.de
        if c.sync_delay:
            hs_d = Signal(init=self.hsync.init)
            vs_d = Signal(init=self.vsync.init)
            de_d = Signal()
            m.d.sync += [hs_d.eq(hs), vs_d.eq(vs), de_d.eq(de)]
            hs, vs, de = hs_d, vs_d, de_d
        colour: list[Value] = list(pattern)
        for _ in range(c.colour_delay):
            stage = [Signal(len(p)) for p in colour]
            m.d.sync += [s.eq(p) for s, p in zip(stage, colour, strict=True)]
            colour = list(stage)
        m.d.sync += [self.hsync.eq(hs), self.vsync.eq(vs), self.de.eq(de), self.cycle.eq(self.cycle + 1)]
        for out, col in zip(self.colour, colour, strict=True):
            m.d.sync += out.eq(col & de.replicate(len(out)))
        return m


def run_picture(spec: Spec, pattern: str, cycles: int) -> str:
    """Simulate :class:`FirstLight` for ``cycles`` clocks; the display bench's change lines.

    As in the HDL bench, a line gives the cycle, hsync, vsync, de and then red, green
    and blue of each pixel of the cycle, pixel 0 first.
    """
    top = FirstLight(spec, pattern)
    pins = [top.hsync, top.vsync, top.de, *top.colour]
    words = [(k, lsb, (1 << (msb - lsb + 1)) - 1) for p in top.ctx.pixels
             for k, (msb, lsb) in enumerate(ch.slices[p.index] for ch in top.ctx.channels)]  # fmt: skip
    lines: list[str] = []

    async def bench(ctx: object) -> None:
        def record() -> None:
            values = [ctx.get(p) for p in pins]  # type: ignore[attr-defined]
            colours = [values[3 + k] >> lsb & mask for k, lsb, mask in words]
            lines.append(" ".join(str(v) for v in [ctx.get(top.cycle), *values[:3], *colours]))  # type: ignore[attr-defined]

        record()
        while True:
            await ctx.changed(*pins)  # type: ignore[attr-defined]
            if ctx.get(top.cycle) >= cycles:  # type: ignore[attr-defined]
                break
            record()

    sim = Simulator(top)
    sim.add_clock(10e-9)
    sim.add_testbench(bench)
    sim.run_until(10e-9 * (cycles + 2))
    return "\n".join(lines + [f"end {cycles}"]) + "\n"
