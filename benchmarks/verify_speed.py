"""How close `synccore verify` runs to each simulator's free-running speed.

For a 1920x1080 core (CTA-861 VIC 16 figures) over 2 frames, on each simulator:
the measurement run through cocotb (clock and event log in HDL, Python woken
once per frame), then the same harness run free with no Python at all, for the
same simulated time.  Both are timed as whole simulator runs (start-up
included, build excluded; the verify side also reads and measures the events).
Prints cycles per second and the ratio free/cocotb (1.0: verify runs as fast as
the simulator on its own), by wall time and by CPU time (user + system of this
process and its children: steadier than wall time on a shared machine).  The
free Verilator run is compiled with the same C++ flags as verify's build.

    python benchmarks/verify_speed.py [--frames N] [--sim icarus,ghdl,verilator] [--repeat N]

A benchmark, not a test: the figures go in the README.
"""

from __future__ import annotations

import argparse
import os
import re
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import synccore
from synccore.emit.bench.harness import HARNESS_TOP, render_harness
from synccore.verification.engines import run_engine
from synccore.verification.simulate import VERILATOR_ARGS, VERILATOR_MAKE
from synccore.verification.tools import find

SPEC = """\
name: bench_1080p
pixel_clock_hz: 148.5 MHz
horizontal: {active: 1920, front_porch: 88, sync: 44, back_porch: 148, sync_polarity: positive}
vertical:   {active: 1080, front_porch: 4,  sync: 5,  back_porch: 36,  sync_polarity: positive}
"""
CLOCK_NS = 10


def sim_end_ns(log: Path) -> int:
    """Simulated time at the end of a cocotb run, from its summary line."""
    match = re.search(r"TESTS=\d+ PASS=\d+ FAIL=\d+ SKIP=\d+\s+([\d.]+)", log.read_text())
    if not match:
        raise RuntimeError(f"no summary in {log}")
    return int(float(match.group(1)))


def cpu_seconds() -> float:
    """User + system time of this process and its finished children so far."""
    own, children = (resource.getrusage(w) for w in (resource.RUSAGE_SELF, resource.RUSAGE_CHILDREN))
    return own.ru_utime + own.ru_stime + children.ru_utime + children.ru_stime


def timed(cmd: list[str], cwd: Path, env: dict[str, str] | None = None) -> tuple[float, float]:
    """Wall and CPU seconds of one run of ``cmd``."""
    full = dict(os.environ)
    full.update(env or {})
    start, cpu = time.perf_counter(), cpu_seconds()
    subprocess.run(cmd, cwd=cwd, env=full, check=True, stdout=subprocess.DEVNULL)
    return time.perf_counter() - start, cpu_seconds() - cpu


def free_run(sim: str, spec: synccore.Spec, stop_ns: int, work: Path) -> tuple[float, float]:
    """Wall and CPU seconds the harness takes to run free (no cocotb) for ``stop_ns``."""
    tool = find(sim)
    assert tool is not None
    work.mkdir(parents=True, exist_ok=True)
    if sim == "ghdl":
        core = work / f"{spec.name}.vhd"
        core.write_text(synccore.render_vhdl(spec))
        (work / "harness.vhd").write_text(render_harness(spec, "vhdl"))
        subprocess.run(["ghdl", "-a", "--std=08", core.name, "harness.vhd"], cwd=work, check=True)
        subprocess.run(["ghdl", "-e", "--std=08", HARNESS_TOP], cwd=work, check=True)
        return timed(["ghdl", "-r", "--std=08", HARNESS_TOP, f"--stop-time={stop_ns}ns"], work)
    core = work / f"{spec.name}.v"
    core.write_text(synccore.render_verilog(spec))
    (work / "harness.v").write_text(render_harness(spec, "verilog"))
    define = f"SYNCCORE_STOP_NS={stop_ns}"
    if sim == "icarus":
        subprocess.run(["iverilog", "-g2005", f"-D{define}", "-s", HARNESS_TOP, "-o", "free.vvp",
                        core.name, "harness.v"], cwd=work, check=True)  # fmt: skip
        return timed(["vvp", "-n", "free.vvp"], work)
    subprocess.run(["verilator", "--binary", *VERILATOR_ARGS, "-MAKEFLAGS", " ".join(VERILATOR_MAKE),
                    f"-D{define}", "--top-module", HARNESS_TOP, "-Mdir", "obj", core.name,
                    "harness.v"],
                   cwd=work, check=True, env={**os.environ, **tool.env},
                   stdout=subprocess.DEVNULL)  # fmt: skip
    return timed([f"obj/V{HARNESS_TOP}"], work, tool.env)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--frames", type=int, default=2)
    parser.add_argument("--sim", default="icarus,ghdl,verilator")
    parser.add_argument("--repeat", type=int, default=2, help="runs of each kind; the best counts")
    args = parser.parse_args()
    spec = synccore.loads(SPEC, "bench_1080p.yaml")
    t = synccore.timing(spec)
    print(f"{spec.name}: {t.frame_cycles} cycles per frame, {args.frames} frames; "
          f"load average {os.getloadavg()[0]:.1f} ({os.cpu_count()} cores)")  # fmt: skip
    print(f"{'simulator':<10} {'verify':>8} {'M cyc/s':>8} {'free':>7} {'M cyc/s':>8} {'ratio':>6}"
          f"   {'CPU: verify':>11} {'free':>6} {'ratio':>6}")  # fmt: skip
    with tempfile.TemporaryDirectory() as tmp:
        for sim in args.sim.split(","):
            if find(sim) is None:
                print(f"{sim:<10} not found")
                continue
            # First run fills the build cache; the others are timed: the whole simulator run
            # through cocotb (start-up included, build excluded), plus reading the events.
            run_engine(spec, sim, frames=args.frames, work_dir=Path(tmp) / "warm")
            runs = []
            for attempt in range(args.repeat):
                start, cpu = time.perf_counter(), cpu_seconds()
                run = run_engine(spec, sim, frames=args.frames, work_dir=Path(tmp) / f"t{attempt}")
                runs.append((time.perf_counter() - start, cpu_seconds() - cpu))
                assert run.figures is not None and run.log is not None, run.error
            stop_ns = sim_end_ns(run.log)
            cycles = stop_ns / CLOCK_NS
            free = [free_run(sim, spec, stop_ns, Path(tmp) / f"free-{sim}-{attempt}")
                    for attempt in range(args.repeat)]  # fmt: skip
            wall, free_wall = min(w for w, _ in runs), min(w for w, _ in free)
            cpu, free_cpu = min(c for _, c in runs), min(c for _, c in free)
            print(f"{sim:<10} {wall:>7.2f}s {cycles / wall / 1e6:>8.3f} {free_wall:>6.2f}s "
                  f"{cycles / free_wall / 1e6:>8.3f} {free_wall / wall:>6.2f}   {cpu:>10.2f}s "
                  f"{free_cpu:>5.2f}s {free_cpu / cpu:>6.2f}", flush=True)  # fmt: skip
    print(f"load average at the end: {os.getloadavg()[0]:.1f} ({os.cpu_count()} cores)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
