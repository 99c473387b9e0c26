"""Multi-mode switching bench: a seeded sequence of mode changes, every cycle and every frame judged.

Runs inside the simulator (cocotb).  The clock is driven from Python (every cycle is
read), so this bench is for small modes.  It holds reset, checks the reset values, then
drives the ``mode`` input with the changes of the sequence (each from its advancing
edge on) and records every output and ``mode_active`` after every advancing edge.  The
run is then judged by ``synccore.verification.switching``: each frame measured against
the mode it is in (named problems: torn frames, short lines, runt pulses), and every
cycle against the model (``synccore.model.MultiTiming``).

Environment: SYNCCORE_SPEC_JSON (the spec as written by synccore.spec.to_dict, with its
modes), SYNCCORE_SWITCHING (a JSON file: {"changes": [[edge, value], ...], "edges": n}),
SYNCCORE_SEED (the clock-enable pattern), SYNCCORE_FRAMES_JSON (optional: where to write
the per-frame figures).
"""

from __future__ import annotations

import bisect
import json
import os
import random
from dataclasses import asdict, fields
from pathlib import Path

import cocotb
from cocotb.clock import Clock
from cocotb.triggers import FallingEdge, ReadOnly, RisingEdge

from synccore.model import RESET_CYCLES, MultiTiming, Outputs, reset_port
from synccore.spec import from_dict
from synccore.verification.switching import compare_cycles, judge_frames, measure_frames, segments

MAX_LINES = 24  # per-frame problems shown; the first frames that fail say the most
PORTS = [f.name for f in fields(Outputs) if f.name != "field"]


def _read(dut, prefix: str) -> tuple[Outputs, int]:
    values = {name: int(getattr(dut, prefix + name).value) for name in PORTS}
    return Outputs(**values), int(getattr(dut, prefix + "mode_active").value)


@cocotb.test()
async def switching(dut):
    spec = from_dict(json.loads(Path(os.environ["SYNCCORE_SPEC_JSON"]).read_text()))
    mt = MultiTiming(spec)
    plan = json.loads(Path(os.environ["SYNCCORE_SWITCHING"]).read_text())
    changes = [(int(e), int(v)) for e, v in plan["changes"]]
    edges = int(plan["edges"])
    at = [e for e, _ in changes]
    rng = random.Random(int(os.environ.get("SYNCCORE_SEED", "1")))
    p = spec.port_prefix
    clk = getattr(dut, p + "clk")
    reset = reset_port(spec.core.reset)
    rst = getattr(dut, p + reset.base)
    mode = getattr(dut, p + "mode")
    ce = getattr(dut, p + "ce") if spec.core.clock_enable else None

    rst.value = reset.active
    mode.value = mt.count - 1  # held during reset: reset still starts a frame of mode 0
    if ce is not None:
        ce.value = 1
    Clock(clk, 10, unit="ns").start()
    await FallingEdge(clk)  # the first rising edge at time 0 is not a 0->1 edge in VHDL
    for _ in range(RESET_CYCLES):
        await RisingEdge(clk)
        await ReadOnly()
        got = _read(dut, p)
        assert got == (mt.reset_outputs(), 0), f"in reset: got {got}, want {mt.reset_outputs()}, mode 0"

    samples = []
    while len(samples) < edges:
        await FallingEdge(clk)
        rst.value = 1 - reset.active
        enable = ce is None or rng.random() < 0.6
        if ce is not None:
            ce.value = int(enable)
        i = bisect.bisect_right(at, len(samples) + 1) - 1  # the value from the next advancing edge on
        mode.value = changes[i][1] if i >= 0 else 0
        await RisingEdge(clk)
        await ReadOnly()
        if enable:
            samples.append(_read(dut, p))

    frames = measure_frames(segments(samples), mt)
    if "SYNCCORE_FRAMES_JSON" in os.environ:
        Path(os.environ["SYNCCORE_FRAMES_JSON"]).write_text(json.dumps([asdict(f) for f in frames]))
    per_frame = judge_frames(frames, mt, changes)
    per_cycle = compare_cycles(samples, mt, changes)
    assert frames, "no whole frame seen"
    shown = per_frame[:MAX_LINES] + ([f"... and {len(per_frame) - MAX_LINES} more"]
                                     if len(per_frame) > MAX_LINES else [])  # fmt: skip
    assert not per_frame and not per_cycle, "\n".join(
        ["frames measured against their modes:", *shown,
         "outputs that differ from the model:", *per_cycle])  # fmt: skip
