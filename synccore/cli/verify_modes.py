"""``synccore verify`` for a multi-mode spec: a seeded switching sequence on each simulator."""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path
from typing import TYPE_CHECKING

from rich.console import Console
from rich.table import Table

from synccore.api import pick_engines
from synccore.cli._common import FAILED, fail
from synccore.errors import ToolError
from synccore.model import MultiTiming
from synccore.spec import Spec

if TYPE_CHECKING:
    from synccore.verification.multimode_run import SwitchingRun

CYCLES_BENCH_LIMIT = 20_000
"""Longest frame (cycles) the every-cycle bench takes; longer modes run the events bench."""
DEFAULT_CHANGES = 3
BUILTIN_CHANGES = 1
"""The built-in engine's changes on modes over ``CYCLES_BENCH_LIMIT`` cycles when ``--changes``
is not given: Amaranth's simulator runs 20 000 to 55 000 cycles a second here (2 cores shared
with other jobs), so one change among the example's modes (about 3.4 million cycles) took 62
to 153 s."""


def run_verify_modes(spec: Spec, *, engines: list[str] | None, changes: int | None, seed: int,
                     work_dir: str | None, out: Console) -> None:  # fmt: skip
    """Drive seeded mode changes (``changes``, default :data:`DEFAULT_CHANGES`) through the
    multi-mode core on each engine; print each frame's figures; exit 1 when a run fails."""
    try:
        engines = pick_engines(engines)
    except ToolError as err:
        fail(str(err))
    mt = MultiTiming(spec)
    longest = max(t.frame_cycles for t in mt.modes)
    bench = "cycles" if longest <= CYCLES_BENCH_LIMIT else "events"
    count = {e: changes or (BUILTIN_CHANGES if e == "builtin" and bench == "events" else DEFAULT_CHANGES)
             for e in engines}  # fmt: skip
    first = count[engines[0]]
    visits = min(first, mt.count - 1)
    tour = f"the first visit modes 1 to {visits}" if visits > 1 else "the first visits mode 1"
    out.print(f"{spec.name}: {mt.count} modes, {first} seeded mode change{'s' * (first != 1)} "
              f"(seed {seed}; {tour}), "
              f"{'every cycle read' if bench == 'cycles' else 'woken on every output change'}")  # fmt: skip
    if len(set(count.values())) > 1:
        out.print(f"builtin: {count['builtin']} change (its default on modes over "
                  f"{CYCLES_BENCH_LIMIT:,} cycles a frame, Amaranth's simulator being slow; "
                  "--changes sets it); its sequence begins as the others' does")  # fmt: skip
    failed = []
    with tempfile.TemporaryDirectory(prefix="synccore-modes-") as tmp:
        root = Path(work_dir) if work_dir else Path(tmp)
        runs = {}
        for engine in engines:
            start = time.monotonic()
            runs[engine] = run = _run(spec, engine, root / engine, seed=seed, changes=count[engine],
                                      bench=bench)  # fmt: skip
            seconds = time.monotonic() - start
            verdict = "ok" if run.passed else "FAIL"
            out.print(f"{engine}: {verdict}, {run.edges} cycles in {seconds:.1f} s, "
                      f"{len(run.frames)} whole frames measured")  # fmt: skip
            if not run.passed:
                failed.append((engine, _failure_lines(run.result.log.read_text())))
        shown = next(((e, r) for e, r in runs.items() if r.frames), None)
        if shown is not None:
            out.print(_frames_table(spec, mt, *shown))
            out.print(_agreement(shown[0], runs))
    for engine, lines in failed:
        for line in lines:
            print(f"FAIL {engine}: {line}", file=sys.stderr)
    if failed:
        sys.exit(FAILED)
    out.print("every frame is a whole frame of its mode, and every output matches the model")


def _run(spec: Spec, engine: str, run_dir: Path, *, seed: int, changes: int, bench: str) -> SwitchingRun:
    """One engine's switching run: a simulator's bench, or the Amaranth model (builtin)."""
    if engine == "builtin":
        from synccore.verification.multimode_builtin import run_builtin_switching

        return run_builtin_switching(spec, run_dir=run_dir, seed=seed, changes=changes, bench=bench,
                                     tour=True)  # fmt: skip
    from synccore.verification.multimode_run import run_switching

    return run_switching(spec, simulator=engine, run_dir=run_dir, seed=seed, changes=changes,
                         bench=bench, tour=True)  # fmt: skip


def _frames_table(spec: Spec, mt: MultiTiming, engine: str, run: SwitchingRun) -> Table:
    """One row per frame ``engine`` measured: its start, mode, lines and the widths of its pulses."""
    frames = run.frames
    table = Table(title=f"{spec.name}: frames measured by {engine} (widths in cycles)",
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


def _agreement(first: str, runs: dict[str, SwitchingRun]) -> str:
    """Which engines measured the same frames as ``first``: all of them when they drove the
    same sequence, else those that end before the sequences part (the built-in engine's
    shorter default begins as the others' does)."""
    base = runs[first]
    same, other, partial = [], [], []
    for engine, run in runs.items():
        frames_a, frames_b = _common(base, run)
        if frames_a != frames_b:
            other.append(engine)
        elif run.changes == base.changes:
            same.append(engine)
        else:
            partial.append(f"{engine} (its first {len(frames_b)}, while the sequences agree)")
    line = f"the same frames measured by: {', '.join(same + partial)}"
    return line + (f"; different frames: {', '.join(other)}" if other else "")


def _common(a: SwitchingRun, b: SwitchingRun) -> tuple[list[dict[str, object]], list[dict[str, object]]]:
    """The frames of ``a`` and ``b`` that end before their sequences of changes part."""
    if a.changes == b.changes:
        return a.frames, b.frames
    agree = next((i for i, (x, y) in enumerate(zip(a.changes, b.changes, strict=False)) if x != y),
                 min(len(a.changes), len(b.changes)))  # fmt: skip
    parting = [run.changes[agree][0] for run in (a, b) if agree < len(run.changes)]
    limit = min([*parting, a.edges, b.edges])  # a change from here on is not in both; nor is an edge

    def before(run: SwitchingRun) -> list[dict[str, object]]:
        return [f for f in run.frames
                if int(f["first_edge"]) + sum(f["lines"]) - 1 < limit]  # type: ignore[call-overload]

    return before(a), before(b)


def _failure_lines(log: str) -> list[str]:
    """The judged problems the bench wrote into its log (its assertion message)."""
    keep = [line.strip() for line in log.splitlines()
            if line.strip().startswith(("frame ", "edge ", "in reset", "no whole frame", "..."))]  # fmt: skip
    return keep[:30] or ["the bench did not finish; see its log"]
