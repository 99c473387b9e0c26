"""The first-light design as Amaranth: :class:`SyncCore` + the pattern generator + output stage.

Built from the same :class:`~synccore.emit.first_light.pattern.PatternContext` numbers as the
Verilog and VHDL text (bar boundaries, grid bits, channel slices, alignment
delays), so ``synccore view --sim builtin`` shows the Amaranth model of the
design without any HDL simulator.  The testbench wakes only when a pin changes
and records the same change lines as the HDL display bench.

Import this module only when needed: Amaranth is an optional dependency.
"""

from __future__ import annotations

from amaranth.hdl import Elaboratable, Module, Signal, Value
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
        self.colour = [Signal(ch.bits, name=ch.base) for ch in self.ctx.channels]
        self.cycle = Signal(32)

    def _pattern(self, m: Module, x: Value, y: Value) -> list[Signal]:
        c = self.ctx
        out = [Signal(ch.bits, name=f"pattern_{ch.base}") for ch in c.channels]
        if c.flags["gradient"]:
            for sig, ch in zip(out, c.channels, strict=True):
                src = x if ch.source == "x" else y
                taken = src[ch.take_lsb:ch.take_msb + 1]
                m.d.sync += sig.eq(taken << ch.pad if ch.pad else taken)
            return out
        if c.flags["bars"]:
            bar = Signal(3)
            with m.If(x >= c.bar_bounds[0][1]):
                m.d.comb += bar.eq(c.bar_bounds[0][2])
            for _, bound, index in c.bar_bounds[1:]:
                with m.Elif(x >= bound):
                    m.d.comb += bar.eq(index)
            for i, sig in enumerate(out):
                m.d.sync += sig.eq(bar[i].replicate(len(sig)))
            return out
        mask = (1 << (c.grid_msb + 1)) - 1
        if c.flags["grid"]:
            on = ((x & mask) == 0) | ((y & mask) == 0) | (x == c.x_last) | (y == c.y_last)
        elif c.flags["checker"]:
            on = x[c.checker_bit] ^ y[c.checker_bit]
        else:  # edges
            on = (x == 0) | (x == c.x_last) | (y == 0) | (y == c.y_last)
        for sig in out:
            m.d.sync += sig.eq(on.replicate(len(sig)))
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
    """Simulate :class:`FirstLight` for ``cycles`` clocks; the display bench's change lines."""
    top = FirstLight(spec, pattern)
    pins = [top.hsync, top.vsync, top.de, *top.colour]
    lines: list[str] = []

    async def bench(ctx: object) -> None:
        def record() -> None:
            values = [ctx.get(p) for p in pins]  # type: ignore[attr-defined]
            lines.append(" ".join(str(v) for v in [ctx.get(top.cycle), *values]))  # type: ignore[attr-defined]

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
