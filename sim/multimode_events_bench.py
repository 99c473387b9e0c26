"""Multi-mode switching bench for full-size modes: Python wakes only when an output changes.

Runs inside the simulator (cocotb).  The clock runs in the simulator (cocotb's clock),
and Python wakes when hsync, vsync, de, hblank, vblank, y, line_start, frame_start or
mode_active changes, and on the cycles where the sequence changes the ``mode`` input.
Between two wakes those outputs hold, so the run is known on every cycle as runs of
constant outputs (``synccore.verification.switching.Segment``).  It is judged by
measuring every frame against the mode it is in, and by comparing the model
(``synccore.model.MultiTiming``) with both ends of every run; x is compared on each
run's first cycle only (it counts in between).  The clock enable is held at 1: the
cycle-by-cycle bench (``multimode_bench``) drives an irregular one.

Environment: as ``multimode_bench``; SYNCCORE_HDL_CLOCK=1 when the top level makes the
clock itself (``synccore.emit.bench.multi_clock``, for Icarus).
"""

from __future__ import annotations

import json
import os
from dataclasses import asdict, fields
from pathlib import Path

import cocotb
from cocotb.clock import Clock
from cocotb.simtime import get_sim_time
from cocotb.triggers import FallingEdge, First, ReadOnly, RisingEdge, Timer

from synccore.model import RESET_CYCLES, MultiTiming, Outputs, reset_port
from synccore.spec import from_dict
from synccore.verification.switching import Segment, compare_segments, judge_frames, measure_frames

PERIOD_NS = 10
MAX_LINES = 24
PORTS = [f.name for f in fields(Outputs) if f.name != "field"]
WATCHED = ["hsync", "vsync", "de", "hblank", "vblank", "y", "line_start", "frame_start", "mode_active"]


def _read(dut, prefix: str) -> tuple[Outputs, int]:
    values = {name: int(getattr(dut, prefix + name).value) for name in PORTS}
    return Outputs(**values), int(getattr(dut, prefix + "mode_active").value)


def _now() -> int:
    return round(get_sim_time("ns"))


@cocotb.test()
async def switching_events(dut):
    spec = from_dict(json.loads(Path(os.environ["SYNCCORE_SPEC_JSON"]).read_text()))
    mt = MultiTiming(spec)
    plan = json.loads(Path(os.environ["SYNCCORE_SWITCHING"]).read_text())
    changes = [(int(e), int(v)) for e, v in plan["changes"]]
    edges = int(plan["edges"])
    p = spec.port_prefix
    clk = getattr(dut, p + "clk")
    reset = reset_port(spec.core.reset)
    rst = getattr(dut, p + reset.base)
    mode = getattr(dut, p + "mode")
    if spec.core.clock_enable:
        getattr(dut, p + "ce").value = 1

    rst.value = reset.active
    mode.value = mt.count - 1  # held during reset: reset still starts a frame of mode 0
    if os.environ.get("SYNCCORE_HDL_CLOCK") != "1":  # else a wrapper toggles it in HDL
        Clock(clk, PERIOD_NS, unit="ns").start()
    await FallingEdge(clk)
    for _ in range(RESET_CYCLES):
        await RisingEdge(clk)
    await ReadOnly()
    got = _read(dut, p)
    assert got == (mt.reset_outputs(), 0), f"in reset: got {got}, want {mt.reset_outputs()}, mode 0"
    await FallingEdge(clk)
    rst.value = 1 - reset.active
    mode.value = 0  # the sequence's value before its first change
    base = _now()  # the falling edge before advancing edge 1

    def falling_before(edge: int) -> int:
        return base + (edge - 1) * PERIOD_NS

    pending = list(changes)
    while pending and pending[0][0] <= 1:
        mode.value = pending.pop(0)[1]
    await RisingEdge(clk)
    await ReadOnly()
    seen = [(1, *_read(dut, p))]
    end = falling_before(edges + 1)
    watched = [getattr(dut, p + name).value_change for name in WATCHED]
    while True:
        now = _now()
        wake_at = min(end, falling_before(pending[0][0]) if pending else end)
        timer = Timer(wake_at - now, unit="ns")
        fired = await First(*watched, timer)
        if fired is timer:
            if not pending or _now() >= end:
                break
            mode.value = pending.pop(0)[1]
            continue
        await ReadOnly()
        edge = (_now() - base) // PERIOD_NS + 1  # edge k rises half a period after its falling edge
        seen.append((edge, *_read(dut, p)))

    run = [Segment(e, nxt - e, o, m) for (e, o, m), (nxt, _, _) in
           zip(seen, [*seen[1:], (edges + 1, None, 0)], strict=True)]  # fmt: skip
    frames = measure_frames(run, mt)
    if "SYNCCORE_FRAMES_JSON" in os.environ:
        Path(os.environ["SYNCCORE_FRAMES_JSON"]).write_text(json.dumps([asdict(f) for f in frames]))
    per_frame = judge_frames(frames, mt, changes)
    per_run = compare_segments(run, mt, changes)
    shown = per_frame[:MAX_LINES] + ([f"... and {len(per_frame) - MAX_LINES} more"]
                                     if len(per_frame) > MAX_LINES else [])  # fmt: skip
    assert frames, "no whole frame seen"
    assert not per_frame and not per_run, "\n".join(
        ["frames measured against their modes:", *shown,
         "runs of outputs that differ from the model:", *per_run])  # fmt: skip
