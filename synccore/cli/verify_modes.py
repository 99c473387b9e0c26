"""``synccore verify`` for a multi-mode spec: a seeded switching sequence on each simulator."""

from __future__ import annotations

import sys
from pathlib import Path
from typing import TYPE_CHECKING

from rich.console import Console
from rich.table import Table

from synccore.cli._common import FAILED, fail
from synccore.errors import ToolError
from synccore.model import MultiTiming
from synccore.spec import Spec
from synccore.verification.choosing import pick_engines
from synccore.verification.modes_verify import CYCLES_BENCH_LIMIT, agreement, change_counts, run_modes

if TYPE_CHECKING:
    from synccore.verification.multimode_run import SwitchingRun

def run_verify_modes(spec: Spec, *, engines: list[str] | None, changes: int | None, seed: int,
                     work_dir: str | None, out: Console) -> None:  # fmt: skip
    """Drive seeded mode changes (``changes``, default :data:`DEFAULT_CHANGES`) through the
    multi-mode core on each engine; print each frame's figures; exit 1 when a run fails."""
    try:
        engines = pick_engines(engines)
    except ToolError as err:
        fail(str(err))
    mt = MultiTiming(spec)
    bench, count = change_counts(spec, engines, changes)
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
    report = run_modes(spec, engines, changes=changes, seed=seed,
                       work_dir=Path(work_dir) if work_dir else None)  # fmt: skip
    for engine, run in report.runs.items():
        verdict = "ok" if run.passed else "FAIL"
        out.print(f"{engine}: {verdict}, {run.edges} cycles in {report.seconds[engine]:.1f} s, "
                  f"{len(run.frames)} whole frames measured")  # fmt: skip
    shown = next(((e, r) for e, r in report.runs.items() if r.frames), None)
    if shown is not None:
        out.print(_frames_table(spec, mt, *shown))
        out.print(agreement(shown[0], report.runs))
    for line in report.problems():
        print(f"FAIL {line}", file=sys.stderr)
    if not report.ok:
        sys.exit(FAILED)
    out.print("every frame is a whole frame of its mode, and every output matches the model")


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
