"""``synccore verify`` for a multi-mode spec: a seeded switching sequence on each simulator."""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

from rich.console import Console
from rich.table import Table

from synccore.api import pick_engines
from synccore.cli._common import FAILED, fail
from synccore.errors import ToolError
from synccore.model import MultiTiming
from synccore.spec import Spec

CYCLES_BENCH_LIMIT = 20_000
"""Longest frame (cycles) the every-cycle bench takes; longer modes run the events bench."""


def run_verify_modes(spec: Spec, *, engines: list[str] | None, changes: int, seed: int,
                     work_dir: str | None, out: Console) -> None:  # fmt: skip
    """Drive ``changes`` seeded mode changes through the multi-mode core on each simulator;
    print each frame's figures; exit 1 when a run fails."""
    from synccore.verification.multimode_run import run_switching

    if engines is not None and "builtin" in engines:
        fail("builtin: the Amaranth engine has no multi-mode core yet; "
             "verify a multi-mode spec with icarus, ghdl or verilator")  # fmt: skip
    try:
        engines = pick_engines(engines)
    except ToolError as err:
        fail(str(err))
    if engines == ["builtin"]:
        fail("no HDL simulator found: a multi-mode core is verified in icarus, ghdl or verilator")
    mt = MultiTiming(spec)
    longest = max(t.frame_cycles for t in mt.modes)
    bench = "cycles" if longest <= CYCLES_BENCH_LIMIT else "events"
    out.print(f"{spec.name}: {mt.count} modes, {changes} seeded mode changes (seed {seed}; the "
              f"first visit modes 1 to {mt.count - 1}), "
              f"{'every cycle read' if bench == 'cycles' else 'woken on every output change'}")  # fmt: skip
    failed = []
    with tempfile.TemporaryDirectory(prefix="synccore-modes-") as tmp:
        root = Path(work_dir) if work_dir else Path(tmp)
        runs = {}
        for engine in engines:
            start = time.monotonic()
            run = run_switching(spec, simulator=engine, run_dir=root / engine, seed=seed,
                                changes=changes, bench=bench, tour=True)  # fmt: skip
            runs[engine] = run
            seconds = time.monotonic() - start
            verdict = "ok" if run.passed else "FAIL"
            out.print(f"{engine}: {verdict}, {run.edges} cycles in {seconds:.1f} s, "
                      f"{len(run.frames)} whole frames measured")  # fmt: skip
            if not run.passed:
                failed.append((engine, _failure_lines(run.result.log.read_text())))
        shown = next((r for r in runs.values() if r.frames), None)
        if shown is not None:
            out.print(_frames_table(spec, mt, shown.frames))
    for engine, lines in failed:
        for line in lines:
            print(f"FAIL {engine}: {line}", file=sys.stderr)
    if failed:
        sys.exit(FAILED)
    out.print("every frame is a whole frame of its mode, and every output matches the model")


def _frames_table(spec: Spec, mt: MultiTiming, frames: list[dict[str, object]]) -> Table:
    """One row per measured frame: its start, mode, lines and the widths of its pulses."""
    table = Table(title=f"{spec.name}: frames measured by the first simulator (widths in cycles)",
                  title_justify="left")
    for head in ("frame", "first cycle", "mode", "lines", "line", "hsync", "vsync", "de run"):
        table.add_column(head, justify="right")
    for f in frames:
        mode = int(f["mode"])  # type: ignore[call-overload]
        t = mt.modes[mode] if mode < mt.count else None
        cells = []
        for key in ("lines", "hsyncs", "vsyncs", "de_runs"):
            values = sorted(set(f[key]))  # type: ignore[call-overload]
            cells.append(" / ".join(map(str, values)) or "-")
        count = len(f["lines"])  # type: ignore[arg-type]
        lines = str(count) if t is None or count == t.v_total else f"[bold red]{count}[/]"
        table.add_row(str(f["index"]), str(f["first_edge"]), str(mode), lines, *cells)
    return table


def _failure_lines(log: str) -> list[str]:
    """The judged problems the bench wrote into its log (its assertion message)."""
    keep = [line.strip() for line in log.splitlines()
            if line.strip().startswith(("frame ", "edge ", "in reset", "no whole frame", "..."))]  # fmt: skip
    return keep[:30] or ["the bench did not finish; see its log"]
