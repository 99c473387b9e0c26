"""Measurement bench: runs the harness of ``synccore.emit.bench.harness`` until it is done.

Runs inside the simulator (cocotb).  The clock lives in HDL and the harness
itself writes an event line whenever hsync, vsync or de changes, and raises
``done`` after the stop count the host gave it; Python wakes once per frame (to
report progress) and when the harness is done, so the simulator runs at its
free-running speed.  The host reads the event file.

This module imports nothing from synccore: loading the package (and its
dependencies) inside the simulator cost about a second of every run, longer
than a 1920x1080 frame takes in Verilator.  The host computes everything.

Environment: SYNCCORE_DEADLINE_NS (simulated time after which the run has
failed), SYNCCORE_PROGRESS (optional: a file that gets the number of frames
done).  The event file path and the stop count reach the harness as
plusargs/generics.
"""

from __future__ import annotations

import os
from pathlib import Path

import cocotb
from cocotb.triggers import First, RisingEdge, Timer


@cocotb.test()
async def measure(dut):
    deadline_ns = int(os.environ["SYNCCORE_DEADLINE_NS"])
    progress = Path(os.environ["SYNCCORE_PROGRESS"]) if "SYNCCORE_PROGRESS" in os.environ else None
    deadline = Timer(deadline_ns, unit="ns")
    done = RisingEdge(dut.done)
    # Without a progress file, Python does not watch frame_start at all: every watched
    # signal costs the simulator a comparison at every time step.
    wake = (done, RisingEdge(dut.frame_start), deadline) if progress else (done, deadline)
    count = 0
    while True:
        fired = await First(*wake)
        if fired is done:
            break
        if fired is deadline:
            raise AssertionError(f"the harness was not done after {deadline_ns} ns")
        count += 1
        if progress is not None:
            progress.write_text(str(count - 1))  # the frame that just began is not done
