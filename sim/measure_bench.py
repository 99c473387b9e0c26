"""Measurement bench: runs the harness of ``synccore.emit.bench.harness`` to the requested length.

Runs inside the simulator (cocotb).  The clock lives in HDL and the harness
itself writes an event line whenever hsync, vsync or de changes; Python wakes
only once per frame (to report progress) and when the harness is done, so the
simulator runs at its free-running speed.  The host reads the event file.

Environment: SYNCCORE_SPEC_JSON (the spec as written by synccore.spec.to_dict),
SYNCCORE_FRAMES, SYNCCORE_PROGRESS (a file that gets the number of frames done).
The event file path and the stop count reach the harness as plusargs/generics.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import cocotb
from cocotb.triggers import First, RisingEdge, Timer

from synccore.model import Timing, stop_count
from synccore.spec import from_dict

CLOCK_NS = 10
WORST_CE_SHARE = 0.25  # far below the harness's clock-enable share (3 of 4 cycles)


@cocotb.test()
async def measure(dut):
    spec = from_dict(json.loads(Path(os.environ["SYNCCORE_SPEC_JSON"]).read_text()))
    t = Timing(spec)
    frames = int(os.environ.get("SYNCCORE_FRAMES", "2"))
    stop = stop_count(t, frames)
    progress = Path(os.environ["SYNCCORE_PROGRESS"]) if "SYNCCORE_PROGRESS" in os.environ else None
    deadline = Timer(int((stop / WORST_CE_SHARE + 1000) * CLOCK_NS), unit="ns")
    done = RisingEdge(dut.done)
    frame = RisingEdge(dut.frame_start)
    count = 0
    while True:
        fired = await First(done, frame, deadline)
        if fired is done:
            break
        if fired is deadline:
            raise AssertionError(f"the harness did not reach {stop} cycles in time")
        count += 1
        if progress is not None:
            progress.write_text(str(count - 1))  # the frame that just began is not done
