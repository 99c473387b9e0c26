"""Cycle-by-cycle port contract bench: every output on every cycle against the reference model.

Runs inside the simulator (cocotb).  The clock is driven from Python, which is
slow, so this bench is for small modes; it checks reset values, the first
output cycle after reset, and — with clock_enable — an irregular ce pattern.

Environment: SYNCCORE_SPEC_JSON (the spec as written by synccore.spec.to_dict),
SYNCCORE_CYCLES (cycles after reset, default one frame plus two lines),
SYNCCORE_SEED (ce pattern seed).
"""

from __future__ import annotations

import json
import os
import random
from dataclasses import fields
from pathlib import Path

import cocotb
from cocotb.clock import Clock
from cocotb.triggers import FallingEdge, ReadOnly, RisingEdge

from synccore.model import RESET_CYCLES, Outputs, Timing, reset_port
from synccore.spec import from_dict


def _read(dut, prefix: str, interlaced: bool) -> Outputs:
    values = {}
    for f in fields(Outputs):
        if f.name == "field" and not interlaced:  # the port exists on interlaced cores only
            values[f.name] = 0
            continue
        handle = getattr(dut, prefix + f.name)
        values[f.name] = int(handle.value)
    return Outputs(**values)


@cocotb.test()
async def port_contract(dut):
    spec = from_dict(json.loads(Path(os.environ["SYNCCORE_SPEC_JSON"]).read_text()))
    t = Timing(spec)
    core = spec.core
    p = spec.port_prefix
    cycles = int(os.environ.get("SYNCCORE_CYCLES", t.frame_cycles + 2 * t.h_total))
    rng = random.Random(int(os.environ.get("SYNCCORE_SEED", "1")))
    clk = getattr(dut, p + "clk")
    reset = reset_port(core.reset)
    rst = getattr(dut, p + reset.base)
    ce = getattr(dut, p + "ce") if core.clock_enable else None

    rst.value = reset.active
    if ce is not None:
        ce.value = 1
    Clock(clk, 10, unit="ns").start()
    await FallingEdge(clk)  # the first rising edge at time 0 is not a 0->1 edge in VHDL

    for _ in range(RESET_CYCLES):
        await RisingEdge(clk)
        await ReadOnly()
        got = _read(dut, p, spec.interlaced)
        assert got == t.reset_outputs(), f"in reset: got {got}, want {t.reset_outputs()}"

    advanced = 0
    mismatches = []
    for cycle in range(cycles):
        await FallingEdge(clk)
        rst.value = 1 - reset.active
        enable = True
        if ce is not None:
            enable = rng.random() < 0.6
            ce.value = int(enable)
        await RisingEdge(clk)
        await ReadOnly()
        if enable:
            advanced += 1
        want = t.outputs_at(advanced - 1)
        got = _read(dut, p, spec.interlaced)
        if got != want:
            diff = {
                f.name: (getattr(got, f.name), getattr(want, f.name))
                for f in fields(Outputs)
                if getattr(got, f.name) != getattr(want, f.name)
            }
            mismatches.append(f"cycle {cycle} (position {advanced - 1}): got/want {diff}")
            if len(mismatches) >= 10:
                break
    assert not mismatches, "outputs differ from the reference model:\n" + "\n".join(mismatches)
    assert advanced > 0
