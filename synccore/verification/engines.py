"""Verification: run a core on every engine, measure it, and judge it against the spec.

Engines are the real simulators (Icarus Verilog and Verilator on the Verilog
text, GHDL on the VHDL text, each through cocotb with the measurement harness)
and ``builtin``, Amaranth's simulator on the Amaranth model of the same timing.
"""

from __future__ import annotations

import contextlib
import functools
import tempfile
import threading
import time
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass, field
from pathlib import Path

from synccore.model import Event, Timing, parse_events, stop_count
from synccore.spec import Spec
from synccore.verification.measure import Figure, Row, compare, failures, measure
from synccore.verification.tools import SIMULATORS, cocotb_problem, find, unusable

ENGINES = (*SIMULATORS, "builtin")
ENGINE_LANGUAGE = {"icarus": "Verilog", "ghdl": "VHDL-2008", "verilator": "Verilog",
                   "builtin": "Amaranth model"}  # fmt: skip

CLOCK_NS = 10
"""The harness's clock period."""
WORST_CE_SHARE = 0.25
"""Far below the harness's clock-enable share (3 of 4 cycles): the deadline's margin."""

Progress = Callable[[str, int], None]
"""Called with (engine, frames done) as a run goes."""


@dataclass
class EngineRun:
    engine: str
    figures: dict[str, Figure] | None = None
    error: str | None = None
    seconds: float = 0.0
    cycles: int = 0
    log: Path | None = None
    waves: list[Path] = field(default_factory=list)


@dataclass
class Report:
    spec: Spec
    runs: list[EngineRun]
    rows: list[Row]

    @property
    def ok(self) -> bool:
        return bool(self.runs) and all(r.error is None for r in self.runs) and all(
            row.ok for row in self.rows
        )

    def problems(self) -> list[str]:
        out = [f"{r.engine}: {r.error}" for r in self.runs if r.error]
        return out + failures(self.rows)


def cocotb_missing() -> bool:
    """True when cocotb (needed to run the real simulators) cannot load here."""
    return _cocotb_problem() is not None


@functools.cache
def _cocotb_problem() -> str | None:
    return cocotb_problem()


def available_engines() -> list[str]:
    """Engines that can run here, in the order of :data:`ENGINES`."""
    import importlib.util

    out = [] if cocotb_missing() else [name for name in SIMULATORS if find(name) is not None]
    if importlib.util.find_spec("amaranth") is not None:
        out.append("builtin")
    return out


def unusable_engines() -> list[str]:
    """One line per simulator that is installed but cannot run here: why, and the fix."""
    return [line for line in (unusable(name) for name in SIMULATORS) if line is not None]


def _poll(path: Path, engine: str, progress: Progress, stop: threading.Event) -> None:
    last = -1
    while not stop.wait(0.2):
        try:
            done = int(path.read_text() or "0")
        except (OSError, ValueError):
            continue
        if done != last:
            progress(engine, done)
            last = done


def run_engine(
    spec: Spec,
    engine: str,
    *,
    frames: int,
    work_dir: Path,
    waves: bool = False,
    progress: Progress | None = None,
    core_text: str | None = None,
) -> EngineRun:
    """Run one engine on ``spec`` for ``frames`` frames and measure what it did."""
    t = Timing(spec)
    run = EngineRun(engine)
    start = time.perf_counter()
    run_dir = work_dir / engine
    run_dir.mkdir(parents=True, exist_ok=True)
    events: list[Event] | None
    if engine == "builtin":
        events = _run_builtin(spec, run, run_dir, frames=frames, waves=waves, progress=progress)
    else:
        events = _run_simulator(spec, t, run, run_dir, frames=frames, waves=waves,
                                progress=progress, core_text=core_text)  # fmt: skip
    run.seconds = time.perf_counter() - start
    if events is None:
        return run
    run.cycles = events[-1].adv if events else 0
    run.figures = measure(events, t)
    if progress is not None:
        progress(engine, frames)
    return run


def _run_builtin(spec: Spec, run: EngineRun, run_dir: Path, *, frames: int, waves: bool,
                 progress: Progress | None) -> list[Event]:  # fmt: skip
    """The events of the Amaranth model in Amaranth's simulator (waves as VCD if asked)."""
    from synccore.amaranth.core import run_builtin

    vcd = run_dir / "waves.vcd" if waves else None
    events = run_builtin(spec, frames=frames, vcd=vcd,
                         progress=(lambda n: progress("builtin", n)) if progress else None)  # fmt: skip
    if vcd is not None:
        run.waves.append(vcd)
    return events


def _run_simulator(spec: Spec, t: Timing, run: EngineRun, run_dir: Path, *, frames: int,
                   waves: bool, progress: Progress | None, core_text: str | None
                   ) -> list[Event] | None:  # fmt: skip
    """The events the harness wrote in a real simulator; None (and ``run.error``) if it failed."""
    from synccore.verification.simulate import run_bench

    engine = run.engine
    events_file = run_dir / "events.txt"
    progress_file = run_dir / "progress.txt"
    progress_file.write_text("0")
    events_file.unlink(missing_ok=True)
    stop = stop_count(t, frames)
    env = {"SYNCCORE_DEADLINE_NS": str(int((stop / WORST_CE_SHARE + 1000) * CLOCK_NS))}
    if progress is not None:  # the bench wakes once per frame only when someone listens
        env["SYNCCORE_PROGRESS"] = str(progress_file)
    with _polling(progress_file, engine, progress):
        result = run_bench(
            spec,
            simulator=engine,
            run_dir=run_dir,
            bench="measure_bench",
            harness=True,
            waves=waves,
            core_text=core_text,
            env=env,
            harness_args={"events": str(events_file.resolve()), "stop": stop},
        )
    run.log = result.log
    if waves:
        run.waves += sorted(p for folder in (result.run_dir, result.build_dir)
                            if folder.is_dir() for p in folder.iterdir()
                            if p.suffix in (".fst", ".vcd", ".ghw"))  # fmt: skip
    if not result.passed or not events_file.is_file():
        run.error = f"simulation failed; see {result.log}"
        return None
    return parse_events(events_file.read_text())


@contextlib.contextmanager
def _polling(path: Path, engine: str, progress: Progress | None) -> Iterator[None]:
    """While the block runs, report the frame count the bench writes to ``path``."""
    if progress is None:
        yield
        return
    stop = threading.Event()
    poller = threading.Thread(target=_poll, args=(path, engine, progress, stop), daemon=True)
    poller.start()
    try:
        yield
    finally:
        stop.set()
        poller.join()


def verify(
    spec: Spec,
    *,
    engines: Sequence[str],
    frames: int = 2,
    work_dir: Path | None = None,
    waves: bool = False,
    progress: Progress | None = None,
) -> Report:
    """Run ``spec`` on each engine and compare every measured figure with the reference model."""
    if frames < 2:
        raise ValueError("verification needs at least 2 frames")
    runs = []
    if waves and work_dir is None:
        work_dir = Path.cwd() / f"{spec.name}_verify"  # waves must outlive the run
    with tempfile.TemporaryDirectory(prefix="synccore-verify-") as tmp:
        base = work_dir or Path(tmp)
        for engine in engines:
            runs.append(run_engine(spec, engine, frames=frames, work_dir=base, waves=waves,
                                   progress=progress))  # fmt: skip
    measured = {r.engine: r.figures for r in runs if r.figures is not None}
    return Report(spec, runs, compare(Timing(spec), measured))
