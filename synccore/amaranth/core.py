"""The core as an Amaranth component, and the built-in engine that measures it.

:class:`SyncCore` is an ``amaranth.lib.wiring.Component`` whose signature is the
port contract (clock and reset come from the ``sync`` domain; use
``ClockDomain(async_reset=True)`` for an asynchronous reset).  It is built from
the same :class:`~synccore.model.Timing` numbers as the Verilog and VHDL text.

:func:`run_builtin` simulates it with Amaranth's own simulator inside the same
harness as the HDL runs (irregular clock enable, lead delay, counters) and
returns the same events, so ``synccore verify --sim builtin`` works with no
simulator installed.  It checks this Amaranth model, not the emitted text.

Import this module only when needed: Amaranth is a required dependency, but slow to import.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from amaranth.hdl import Array, Cat, Const, Elaboratable, Module, Mux, Signal
from amaranth.lib import wiring
from amaranth.lib.wiring import In, Out
from amaranth.sim import Simulator

from synccore.model import LFSR_SEED, Event, Timing, decode, monitor_fields, stop_count
from synccore.spec import Spec


class SyncCore(wiring.Component):  # type: ignore[misc]
    """A display timing core: sync, blank, data enable, coordinates and strobes, all registered."""

    def __init__(self, spec: Spec) -> None:
        self.timing = t = Timing(spec)
        r = t.reset_outputs()
        members = {
            "hsync": Out(1, init=r.hsync),
            "vsync": Out(1, init=r.vsync),
            "de": Out(1, init=r.de),
            "hblank": Out(1, init=r.hblank),
            "vblank": Out(1, init=r.vblank),
            "x": Out(t.x_width, init=r.x),
            "y": Out(t.y_width, init=r.y),
            "line_start": Out(1, init=r.line_start),
            "frame_start": Out(1, init=r.frame_start),
        }
        if spec.interlaced:
            members["field"] = Out(1, init=r.field)
        if spec.core.clock_enable:
            members["ce"] = In(1)
        super().__init__(members)

    def elaborate(self, platform: object) -> Module:
        t = self.timing
        m = Module()
        h_pos = Signal(t.h_width)
        v_pos = Signal(t.v_width)
        lead_h, lead_v = t.lead_reset
        h_lead = Signal(t.h_width, init=lead_h)
        v_lead = Signal(t.v_width, init=lead_v)
        advance = self.ce if t.spec.core.clock_enable else Const(1)
        on_h, on_v = t.hsync_active_level, t.vsync_active_level
        off_h, off_v = t.hsync_inactive_level, t.vsync_inactive_level

        fld = Signal()  # interlaced: the field of h_pos/v_pos
        with m.If(advance):
            if t.interlaced:  # no lead (refused): x/y come from h_pos/v_pos
                self._step_fields(m, h_pos, v_pos, fld)
                h_lead, v_lead = h_pos, v_pos
            else:
                for h, v in ((h_pos, v_pos), (h_lead, v_lead)):
                    with m.If(h == t.h_last):
                        m.d.sync += h.eq(0)
                        with m.If(v == t.v_last):
                            m.d.sync += v.eq(0)
                        with m.Else():
                            m.d.sync += v.eq(v + 1)
                    with m.Else():
                        m.d.sync += h.eq(h + 1)

            m.d.sync += [
                self.de.eq((h_pos < t.h_active) & (v_pos < t.v_active)),
                self.hblank.eq(h_pos >= t.h_active),
                self.vblank.eq(v_pos >= t.v_active),
                self.line_start.eq((h_pos == 0) & (v_pos < t.v_active)),
                self.frame_start.eq((h_pos == 0) & (v_pos == 0) & ~fld),
            ]
            if t.interlaced:
                m.d.sync += self.field.eq(fld)
            # Syncs change only at their edges, so a pulse is never cut short.
            with m.If(h_pos == t.h_sync_start):
                m.d.sync += self.hsync.eq(on_h)
            with m.Elif(h_pos == t.h_sync_end):
                m.d.sync += self.hsync.eq(off_h)
            for f in range(t.fields):  # field 0's vsync half a line late when interlaced
                line, column = t.vsync_at(f)
                in_field = (fld == f) if t.interlaced else Const(1)
                with m.If(in_field & (h_pos == column)):
                    with m.If(v_pos == line):
                        m.d.sync += self.vsync.eq(on_v)
                    with m.Elif(v_pos == (line + t.spec.vertical.sync) % t.field_lines(f)):
                        m.d.sync += self.vsync.eq(off_v)
            with m.If(h_lead < t.h_active):
                m.d.sync += self.x.eq((h_lead * t.ppc) >> t.scale_shift)
            with m.Else():
                m.d.sync += self.x.eq(0)
            with m.If(v_lead < t.v_active):
                row = Cat(fld, v_lead) if t.interlaced else v_lead
                m.d.sync += self.y.eq(row >> t.scale_shift)
            with m.Else():
                m.d.sync += self.y.eq(0)
        return m

    def _step_fields(self, m: Module, h_pos: Signal, v_pos: Signal, fld: Signal) -> None:
        """Interlaced: step the position through field 0 (one line longer), then field 1."""
        t = self.timing
        last = Mux(fld, t.field_lines(1) - 1, t.field_lines(0) - 1)
        with m.If(h_pos == t.h_last):
            m.d.sync += h_pos.eq(0)
            with m.If(v_pos == last):
                m.d.sync += [v_pos.eq(0), fld.eq(~fld)]
            with m.Else():
                m.d.sync += v_pos.eq(v_pos + 1)
        with m.Else():
            m.d.sync += h_pos.eq(h_pos + 1)


class _Harness(Elaboratable):  # type: ignore[misc]
    """The measurement harness of ``synccore.emit.bench.harness``, in Amaranth."""

    def __init__(self, spec: Spec) -> None:
        self.core = SyncCore(spec)
        self.spec = spec
        self.fields = monitor_fields(spec.interlaced)
        self.mon = Signal(sum(bits for _, bits in self.fields))

    def elaborate(self, platform: object) -> Module:
        m = Module()
        m.submodules.core = core = self.core
        t = core.timing
        if self.spec.core.clock_enable:
            lfsr = Signal(16, init=LFSR_SEED)
            m.d.sync += lfsr.eq(Cat(lfsr[15] ^ lfsr[13] ^ lfsr[12] ^ lfsr[10], lfsr[:15]))
            advance = lfsr[:2] != 0
            m.d.comb += core.ce.eq(advance)
        else:
            advance = Const(1)

        adv = Signal(32)
        lead = t.lead  # the delay line stands for a pixel pipeline of that latency
        x_d, y_d = Signal(16), Signal(16)
        if lead:
            x_pipe = Array(Signal(t.x_width, name=f"x_pipe{i}") for i in range(lead))
            y_pipe = Array(Signal(t.y_width, name=f"y_pipe{i}") for i in range(lead))
            with m.If(advance):
                m.d.sync += [x_pipe[0].eq(core.x), y_pipe[0].eq(core.y)]
                for i in range(1, lead):
                    m.d.sync += [x_pipe[i].eq(x_pipe[i - 1]), y_pipe[i].eq(y_pipe[i - 1])]
            m.d.comb += [x_d.eq(x_pipe[lead - 1]), y_d.eq(y_pipe[lead - 1])]
        else:
            m.d.comb += [x_d.eq(core.x), y_d.eq(core.y)]

        prev_de = Signal()
        prev_x, prev_y = Signal(16), Signal(16)
        step_faults, x_last = Signal(16), Signal(16)
        line_starts, frame_starts = Signal(16), Signal(16)
        with m.If(advance):
            m.d.sync += adv.eq(adv + 1)
            if t.x_step:
                x_bad = x_d != prev_x + t.x_step
            else:  # scaled: x holds for a few cycles, then grows by one
                x_bad = (x_d != prev_x) & (x_d != prev_x + 1)
            with m.If((adv > t.xy_steps_judged_after) & core.de & prev_de & (x_bad | (y_d != prev_y))):
                m.d.sync += step_faults.eq(step_faults + 1)
            m.d.sync += [prev_de.eq(core.de), prev_x.eq(x_d), prev_y.eq(y_d)]
            with m.If(core.de):
                m.d.sync += x_last.eq(x_d)
            with m.If(core.line_start):
                m.d.sync += line_starts.eq(line_starts + 1)
            with m.If(core.frame_start):
                m.d.sync += frame_starts.eq(frame_starts + 1)
        fields = {
            "adv": adv, "hsync": core.hsync, "vsync": core.vsync, "de": core.de,
            "hblank": core.hblank, "vblank": core.vblank, "frame_start": core.frame_start,
            "line_start": core.line_start, "x": x_d, "y": y_d,
            "x_last": x_last, "step_faults": step_faults, "line_starts": line_starts,
            "frame_starts": frame_starts,
            **({"field": core.field} if self.spec.interlaced else {}),
        }  # fmt: skip
        m.d.comb += self.mon.eq(Cat(*(fields[name][:bits] for name, bits in self.fields)))
        return m


def run_builtin(
    spec: Spec,
    *,
    frames: int = 2,
    progress: Callable[[int], None] | None = None,
    vcd: Path | None = None,
) -> list[Event]:
    """Simulate the Amaranth model of ``spec`` for ``frames`` frames; the events the harness saw."""
    harness = _Harness(spec)
    t = harness.core.timing
    stop = stop_count(t, frames)
    words: list[int] = []
    core = harness.core

    async def bench(ctx: object) -> None:
        adv, done = 0, 0
        while adv < stop:
            await ctx.changed(core.hsync, core.vsync, core.de, core.hblank,  # type: ignore[attr-defined]
                              core.vblank)
            word = ctx.get(harness.mon)  # type: ignore[attr-defined]
            words.append(word)
            adv = word & 0xFFFFFFFF
            if progress is not None and adv // t.frame_cycles > done:
                done = adv // t.frame_cycles
                progress(done)

    sim = Simulator(harness)
    sim.add_clock(10e-9)
    sim.add_testbench(bench)
    if vcd is not None:
        with sim.write_vcd(str(vcd)):
            sim.run()
    else:
        sim.run()
    return [decode(w, interlaced=spec.interlaced) for w in words]
