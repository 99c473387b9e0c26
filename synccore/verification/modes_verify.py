"""Verifying a multi-mode core: one seeded switching sequence on each engine, every frame judged.

The simulators run the emitted core in a cocotb bench (:mod:`.multimode_run`), the built-in
engine runs the Amaranth model (:mod:`.multimode_builtin`); both judge every frame against its
own mode and the switching rule of :class:`synccore.model.MultiTiming`.
"""

from __future__ import annotations

import tempfile
import time
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from synccore.model import MultiTiming
from synccore.spec import Spec

if TYPE_CHECKING:  # the benches' host side is imported when a run starts, not with the API
    from synccore.verification.multimode_run import SwitchingRun

CYCLES_BENCH_LIMIT = 20_000
"""Longest frame (cycles) the every-cycle bench takes; longer modes run the events bench."""
DEFAULT_CHANGES = 3
BUILTIN_CHANGES = 1
"""The built-in engine's changes on modes over ``CYCLES_BENCH_LIMIT`` cycles when ``changes``
is not given: Amaranth's simulator runs 20 000 to 55 000 cycles a second here (2 cores shared
with other jobs), so one change among the example's modes (about 3.4 million cycles) took 62
to 153 s."""


@dataclass(frozen=True)
class ModesReport:
    """What :func:`verify_modes` found: each engine's run, its changes and wall time."""

    spec: Spec
    seed: int
    bench: str  # "cycles": every cycle read; "events": woken on every output change
    runs: dict[str, SwitchingRun]
    seconds: dict[str, float]
    failures: dict[str, list[str]]  # each failed engine's judged problems, read from its log

    @property
    def ok(self) -> bool:
        """Every engine ran and every frame was a whole frame of its mode, matching the model."""
        return all(run.passed for run in self.runs.values())

    def problems(self) -> list[str]:
        """``engine: problem`` for each problem a failed run judged (its bench's own words)."""
        return [f"{engine}: {line}" for engine, lines in self.failures.items() for line in lines]


def change_counts(spec: Spec, engines: list[str], changes: int | None) -> tuple[str, dict[str, int]]:
    """The bench (``"cycles"`` or ``"events"``) and the changes each engine drives."""
    longest = max(t.frame_cycles for t in MultiTiming(spec).modes)
    bench = "cycles" if longest <= CYCLES_BENCH_LIMIT else "events"
    count = {e: changes or (BUILTIN_CHANGES if e == "builtin" and bench == "events" else DEFAULT_CHANGES)
             for e in engines}  # fmt: skip
    return bench, count


def run_modes(spec: Spec, engines: list[str], *, changes: int | None = None, seed: int = 1,
              work_dir: Path | None = None) -> ModesReport:  # fmt: skip
    """Drive seeded mode changes through ``spec``'s multi-mode core on each of ``engines``."""
    bench, count = change_counts(spec, engines, changes)
    runs: dict[str, SwitchingRun] = {}
    seconds: dict[str, float] = {}
    failed: dict[str, list[str]] = {}
    with tempfile.TemporaryDirectory(prefix="synccore-modes-") as tmp:
        root = work_dir if work_dir is not None else Path(tmp)
        for engine in engines:
            start = time.monotonic()
            runs[engine] = run = _run(spec, engine, root / engine, seed=seed, changes=count[engine],
                                      bench=bench)  # fmt: skip
            seconds[engine] = time.monotonic() - start
            if not run.passed:  # read now: without work_dir the folder goes
                log = run.result.log
                failed[engine] = failure_lines(log.read_text() if log.is_file() else "")
    return ModesReport(spec, seed, bench, runs, seconds, failed)


def _run(spec: Spec, engine: str, run_dir: Path, *, seed: int, changes: int, bench: str) -> SwitchingRun:
    """One engine's switching run: a simulator's bench, or the Amaranth model (builtin)."""
    if engine == "builtin":
        from synccore.verification.multimode_builtin import run_builtin_switching

        return run_builtin_switching(spec, run_dir=run_dir, seed=seed, changes=changes, bench=bench,
                                     tour=True)  # fmt: skip
    from synccore.verification.multimode_run import run_switching

    return run_switching(spec, simulator=engine, run_dir=run_dir, seed=seed, changes=changes,
                         bench=bench, tour=True)  # fmt: skip


def agreement(first: str, runs: dict[str, SwitchingRun]) -> str:
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


def failure_lines(log: str) -> list[str]:
    """The judged problems the bench wrote into its log (its assertion message)."""
    keep = [line.strip() for line in log.splitlines()
            if line.strip().startswith(("frame ", "edge ", "in reset", "no whole frame", "..."))]  # fmt: skip
    return keep[:30] or ["the bench did not finish; see its log"]
