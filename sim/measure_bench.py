"""Measurement bench: records the harness's monitor vector at every edge of hsync, vsync or de.

Runs inside the simulator (cocotb) on the top level made by
``synccore.emit.harness``.  The clock lives in HDL, and Python wakes only when
a sync or de changes, so the simulator runs near its free-running speed.

Environment: SYNCCORE_SPEC_JSON (the spec as written by synccore.spec.to_dict),
SYNCCORE_FRAMES, SYNCCORE_EVENTS (output file), SYNCCORE_PROGRESS (a file that
gets the number of frames done).
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import cocotb
from cocotb.triggers import First, ReadOnly, Timer

from synccore.model import Timing
from synccore.spec import from_dict

CLOCK_NS = 10
WORST_CE_SHARE = 0.25  # far below the harness's clock-enable share (3 of 4 cycles)


@cocotb.test()
async def measure(dut):
    spec = from_dict(json.loads(Path(os.environ["SYNCCORE_SPEC_JSON"]).read_text()))
    t = Timing(spec)
    frames = int(os.environ.get("SYNCCORE_FRAMES", "2"))
    stop = frames * t.frame_cycles + 2 * t.h_total
    progress = Path(os.environ["SYNCCORE_PROGRESS"]) if "SYNCCORE_PROGRESS" in os.environ else None

    mon = dut.mon
    edges = First(dut.hsync.value_change, dut.vsync.value_change, dut.de.value_change)

    async def watchdog() -> None:
        # A dead core must not hang the run: give up well after the expected end.
        await Timer(int((stop / WORST_CE_SHARE + 1000) * CLOCK_NS), unit="ns")
        raise AssertionError(f"the run did not reach {stop} cycles: a sync or de stopped moving")

    cocotb.start_soon(watchdog())
    words: list[int] = []
    frames_done = 0
    adv = 0
    while adv < stop:
        await edges
        await ReadOnly()
        word = mon.value.to_unsigned()
        words.append(word)
        adv = word & 0xFFFFFFFF
        if progress is not None and adv // t.frame_cycles > frames_done:
            frames_done = adv // t.frame_cycles
            progress.write_text(str(frames_done))
    Path(os.environ["SYNCCORE_EVENTS"]).write_text(json.dumps(words))
