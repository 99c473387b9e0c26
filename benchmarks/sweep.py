"""Verify every library mode up to 1920x1080 on every simulator, in parallel.

Each mode of the built-in library (VESA DMT and CTA-861, what ``synccore modes``
lists) with at most 1920 active pixel clocks per line and 1080 active rows is
loaded through ``standard:`` and run through :func:`synccore.verify`, one
simulator at a time, on ``--jobs`` worker processes (the largest rasters first).
Builds are cached by content under ``$SYNCCORE_CACHE`` (default
``~/.cache/synccore/builds``), so a second sweep only runs.  Prints each failure
as it comes, then per simulator its wall time, the sum of its runs' times and how
many runs passed, then the total; exits 1 if any run failed.

    python benchmarks/sweep.py                         # everything (the benchmark)
    python benchmarks/sweep.py --limit 4 --sim icarus  # a quick look: the 4 smallest modes
    python benchmarks/sweep.py --match "CTA VIC 1" --frames 3

A benchmark, not a test: the figures go in the README.
"""

from __future__ import annotations

import argparse
import os
import re
import sys
import time
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass

import synccore
from synccore.timings.modes import Mode, library
from synccore.verification.tools import SIMULATORS, find

MAX_ACTIVE = (1920, 1080)


@dataclass(frozen=True)
class Outcome:
    source: str
    simulator: str
    ok: bool
    seconds: float
    problems: tuple[str, ...]


def spec_of(mode: Mode) -> synccore.Spec:
    """The spec of a library mode, as a user would write it (``standard:`` and a name)."""
    name = "m_" + re.sub(r"[^0-9a-z]+", "_", mode.source.lower()).strip("_")
    return synccore.loads(f'name: {name}\nstandard: "{mode.source}"\n', f"{name}.yaml")


def frame_cycles(mode: Mode) -> int:
    h, v = mode.horizontal, mode.vertical
    lines = v.active + v.front_porch + v.sync + v.back_porch
    return (h.active + h.front_porch + h.sync + h.back_porch) * lines * (2 if mode.interlaced else 1)


def chosen_modes(limit: int | None, match: str | None) -> list[Mode]:
    """The modes up to 1920x1080 active (filtered by ``match``), largest raster first;
    with ``limit``, only that many of the smallest."""
    modes = [m for m in library() if m.horizontal.active <= MAX_ACTIVE[0]
             and m.height <= MAX_ACTIVE[1]
             and (match is None or match.lower() in f"{m.name} {m.source}".lower())]  # fmt: skip
    modes.sort(key=frame_cycles)
    if limit is not None:
        modes = modes[:limit]
    return modes[::-1]


def verify_one(source: str, simulator: str, frames: int) -> Outcome:
    """One run in a worker process: the mode named by ``source`` on one simulator."""
    mode = next(m for m in library() if m.source == source)
    start = time.perf_counter()
    try:
        report = synccore.verify(spec_of(mode), engines=[simulator], frames=frames)
        ok, problems = report.ok, tuple(report.problems())
    except Exception as err:  # a run that cannot even start is a failed run, not a crash
        ok, problems = False, (f"{type(err).__name__}: {err}",)
    return Outcome(source, simulator, ok, time.perf_counter() - start, problems)


def sweep(modes: list[Mode], simulator: str, frames: int, jobs: int) -> tuple[list[Outcome], float]:
    start = time.perf_counter()
    with ProcessPoolExecutor(max_workers=jobs) as pool:
        futures = [pool.submit(verify_one, m.source, simulator, frames) for m in modes]
        outcomes = []
        for future in futures:
            outcome = future.result()
            outcomes.append(outcome)
            if not outcome.ok:
                print(f"FAIL {simulator} {outcome.source}: " + "; ".join(outcome.problems[:3]),
                      flush=True)  # fmt: skip
    return outcomes, time.perf_counter() - start


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sim", default=",".join(SIMULATORS),
                        help="simulators, comma-separated (default: %(default)s)")  # fmt: skip
    parser.add_argument("--jobs", type=int, default=2, help="worker processes (default: 2)")
    parser.add_argument("--frames", type=int, default=2, help="frames per run (at least 2)")
    parser.add_argument("--limit", type=int, help="only the N smallest modes (a quick run)")
    parser.add_argument("--match", help="only modes whose name or source contains this text")
    args = parser.parse_args()
    modes = chosen_modes(args.limit, args.match)
    simulators = args.sim.split(",")
    missing = [s for s in simulators if find(s) is None]
    if missing or not modes:
        print(f"simulator(s) not found: {', '.join(missing)}" if missing else "no mode matches")
        return 2
    cycles = sum(frame_cycles(m) for m in modes) * args.frames
    print(f"{len(modes)} modes up to {MAX_ACTIVE[0]}x{MAX_ACTIVE[1]} active, {args.frames} frames "
          f"each ({cycles / 1e6:.1f} M cycles per simulator), {args.jobs} workers, "
          f"{os.cpu_count()} cores, load {os.getloadavg()[0]:.1f} at start", flush=True)  # fmt: skip
    results = []
    start = time.perf_counter()
    for simulator in simulators:
        outcomes, wall = sweep(modes, simulator, args.frames, args.jobs)
        results += outcomes
        passed = sum(o.ok for o in outcomes)
        print(f"{simulator:<10} wall {wall:7.1f} s   runs {sum(o.seconds for o in outcomes):7.1f} s   "
              f"passed {passed}/{len(outcomes)}", flush=True)  # fmt: skip
    total = time.perf_counter() - start
    passed = sum(o.ok for o in results)
    modes_ok = sum(all(o.ok for o in results if o.source == m.source) for m in modes)
    print(f"{'total':<10} wall {total:7.1f} s   modes passed {modes_ok}/{len(modes)}, "
          f"runs passed {passed}/{len(results)}, load {os.getloadavg()[0]:.1f} at end")  # fmt: skip
    return 0 if passed == len(results) else 1


if __name__ == "__main__":
    sys.exit(main())
