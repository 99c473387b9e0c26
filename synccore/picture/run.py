"""Running the first-light design in a simulator and reading back its pins.

The display bench (``templates/bench/view_bench.*.j2``) makes the clock in HDL,
resets the top level, and writes one line to a file whenever hsync, vsync, de
or a colour pin changes (sampled on the falling clock edge); Python reads the
file after the run and never wakes per cycle.  With ``core.pixels_per_clock = N``
each clock cycle carries N pixels: the reader spreads every cycle over N pixel
periods (syncs and de held, pixel ``i`` of the cycle in period ``i``), so the
:class:`Pins` always hold one sample per pixel clock and the simulated monitor
works at the pixel rate whatever N is.  The simulators run directly
(no cocotb): ``iverilog``/``vvp``, ``ghdl``, and Verilator's ``--binary``
(built once per content hash in the synccore cache, as its builds are slow).

Two engines need no HDL simulator: ``builtin`` simulates the Amaranth model of
the design (:mod:`synccore.amaranth.first_light`) in Amaranth's simulator, and
``model`` computes the pins straight from the timing model (the same rules
:func:`synccore.model.Timing.outputs_at` applies, over a whole run at once) and
the pattern's Python definition, which is the quickest for large modes.

:func:`simulate_board` runs the board top instead, from its clock pin (Icarus): the
board bench drives the oscillator's frequency, the vendor's PLL primitive is
replaced by a behavioural model that derives its output clock from the
primitive's parameters, and the pixel clock the pins were sampled on is measured.
"""

from __future__ import annotations

import hashlib
import json
import shutil
import subprocess
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from synccore.clocking.plan import ClockPlan
from synccore.emit.bench.view import (
    BENCH,
    BOARD_BENCH,
    PLL_MODELS,
    render_bench,
    render_board_bench,
    render_pll_models,
)
from synccore.emit.files import board_artifacts, clock_artifacts, core_artifacts, pattern_artifacts
from synccore.model import Timing
from synccore.model.pattern import levels, picture_size, pixel_column
from synccore.spec import Spec
from synccore.verification.simulate import VERILATOR_ARGS, cache_dir, locked
from synccore.verification.tools import INSTALL_HINT, Tool, build_env, find

VIEW_ENGINES = ("icarus", "ghdl", "verilator", "builtin", "model")
CLOCK_NS = 10


class ViewError(RuntimeError):
    """A simulator is missing or failed; the message says which and why."""


@dataclass(frozen=True)
class Pins:
    """The sampled pins of a display interface, one entry per pixel clock cycle."""

    period_s: float  # the pixel clock period the samples stand for
    hsync: np.ndarray
    vsync: np.ndarray
    de: np.ndarray | None
    red: np.ndarray
    green: np.ndarray
    blue: np.ndarray
    bits: tuple[int, int, int]

    @property
    def cycles(self) -> int:
        return len(self.hsync)


def cycles_needed(spec: Spec) -> int:
    """Enough core clock cycles for two vsync leading edges and the whole frame between them;
    interlaced: both fields from reset and the next field 0's vsync, three vsyncs (picture/weave.py)."""
    t = Timing(spec)
    if t.interlaced:
        return t.frame_cycles + t.vsync_starts()[0] + 2 * t.h_total
    return (t.v_sync_start + t.v_total + 3) * t.h_total


def sources(spec: Spec, pattern: str, language: str) -> dict[str, str]:
    """File name -> text of the core, the pattern generator, the top level and the bench."""
    suffix = ".v" if language == "verilog" else ".vhd"
    files = {a.name: a.text for a in core_artifacts(spec) + pattern_artifacts(spec, pattern)
             if a.name.endswith(suffix)}  # fmt: skip
    order = [f"{spec.name}{suffix}", f"{spec.name}_pattern{suffix}", f"{spec.name}_top{suffix}"]
    out = {name: files[name] for name in order}
    out[BENCH + suffix] = render_bench(spec, pattern, language)
    return out


def run_tool(cmd: list[str], cwd: Path, env: dict[str, str] | None = None) -> None:
    import os

    full = dict(os.environ)
    full.update(env or {})
    proc = subprocess.run(cmd, cwd=cwd, env=full, capture_output=True, text=True)
    if proc.returncode != 0:
        raise ViewError(f"{' '.join(cmd[:2])} failed:\n{proc.stdout}{proc.stderr}")


def simulator(engine: str) -> Tool:
    """The simulator called ``engine``; :class:`ViewError` with the install hint when absent."""
    tool = find(engine)
    if tool is None:
        raise ViewError(f"simulator {engine!r} not found: {INSTALL_HINT[engine]}")
    return tool


def run_bench(tool: Tool, files: dict[str, str], bench: str, work_dir: Path, *, record: str,
              plusarg: str, generic: str, stop: int) -> str:  # fmt: skip
    """Run ``bench`` (one of ``files``, all in the tool's language) on ``tool`` for ``stop``
    cycles in ``work_dir``; the text of the record file the bench writes.

    The bench takes the record's path as the plusarg ``plusarg`` (Verilog) or the generic
    ``generic`` (VHDL), and the cycle count as ``synccore_stop`` / ``stop_at``.  Verilator
    builds are kept in the synccore cache by content, as they are slow.
    """
    work_dir.mkdir(parents=True, exist_ok=True)
    for name, text in files.items():
        (work_dir / name).write_text(text, encoding="utf-8")
    out = (work_dir / record).resolve()
    out.unlink(missing_ok=True)
    names = list(files)
    if tool.name == "icarus":
        run_tool(["iverilog", "-g2005", "-s", bench, "-o", "bench.vvp", *names], work_dir)
        run_tool(["vvp", "-n", "bench.vvp", f"+{plusarg}={out}", f"+synccore_stop={stop}"], work_dir)
    elif tool.name == "ghdl":
        std = "--std=08"
        run_tool(["ghdl", "-a", std, *names], work_dir)
        run_tool(["ghdl", "-e", std, bench], work_dir)
        run_tool(["ghdl", "-r", std, bench, f"-g{generic}={out}", f"-gstop_at={stop}"], work_dir)
    else:
        binary = _verilator_binary(tool, files, bench)
        run_tool([str(binary), f"+{plusarg}={out}", f"+synccore_stop={stop}"], work_dir, tool.env)
    if not out.is_file():
        raise ViewError(f"{tool.name}: the bench wrote no {out.name}")
    return out.read_text()


def _verilator_binary(tool: Tool, files: dict[str, str], bench: str) -> Path:
    """The Verilator build of ``files``, made once per content hash in the synccore cache."""
    key = hashlib.sha256(json.dumps(sorted(files.items())).encode()).hexdigest()[:24]
    build = cache_dir() / f"view-verilator-{key}"
    binary = build / "obj" / f"V{bench}"
    with locked(build):  # parallel runs of the same design build it once
        if not binary.is_file():
            shutil.rmtree(build, ignore_errors=True)
            build.mkdir(parents=True)
            for name, text in files.items():
                (build / name).write_text(text, encoding="utf-8")
            run_tool(["verilator", "--binary", *VERILATOR_ARGS, "-j", "2", "--top-module", bench,
                      "-Mdir", "obj", *files], build, build_env(tool, cache_dir()))  # fmt: skip
    return binary


def simulate(spec: Spec, pattern: str, *, engine: str, work_dir: Path,
             cycles: int | None = None) -> Pins:  # fmt: skip
    """Run the first-light design of ``spec`` with ``pattern`` on ``engine``; return its pins.

    ``cycles`` counts core clock cycles (default :func:`cycles_needed`); the pins hold
    ``cycles * pixels_per_clock`` samples, one per pixel clock.
    """
    if engine not in VIEW_ENGINES:
        raise ValueError(f"unknown engine {engine!r}; choose from {', '.join(VIEW_ENGINES)}")
    n = cycles or cycles_needed(spec)
    bits = (spec.color.red, spec.color.green, spec.color.blue)
    period_s = float(1 / spec.pixel_clock_hz)
    ppc = spec.core.pixels_per_clock
    if engine == "model":
        return model_pins(spec, pattern, n)
    if engine == "builtin":
        try:
            from synccore.amaranth.first_light import run_picture
        except ImportError:
            raise ViewError("engine 'builtin' needs Amaranth: install the PyPI package 'amaranth' "
                            "(pip install 'synccore[amaranth]'), or use --sim model") from None
        return read_screen(run_picture(spec, pattern, n), period_s=period_s, bits=bits,
                           pixels_per_clock=ppc)  # fmt: skip
    tool = simulator(engine)
    files = sources(spec, pattern, tool.languages[0])
    text = run_bench(tool, files, BENCH, work_dir, record="screen.txt",
                     plusarg="synccore_screen", generic="events_path", stop=n)  # fmt: skip
    return read_screen(text, period_s=period_s, bits=bits, pixels_per_clock=ppc)


@dataclass(frozen=True)
class BoardRun:
    """The pins of a board-top simulation and the pixel clock measured on them."""

    pins: Pins
    f_core_hz: float  # the core clock the samples were taken on, measured in the simulation
    f_pixel_hz: float  # f_core_hz * pixels_per_clock


def board_sources(plan: ClockPlan, pattern: str) -> dict[str, str]:
    """File name -> Verilog text of the board top with everything under it, the models and bench."""
    spec = plan.spec
    files = {a.name: a.text for a in core_artifacts(spec) + pattern_artifacts(spec, pattern)
             + clock_artifacts(plan) + board_artifacts(plan, pattern) if a.name.endswith(".v")}
    order = [f"{spec.name}.v", f"{spec.name}_pattern.v", f"{spec.name}_top.v",
             f"{spec.name}_clock.v", f"{spec.name}_board.v"]  # fmt: skip
    out = {name: files[name] for name in order}
    out[PLL_MODELS + ".v"] = render_pll_models()  # unused on the clock-enable route
    out[BOARD_BENCH + ".v"] = render_board_bench(plan, pattern)
    return out


def simulate_board(plan: ClockPlan, pattern: str, *, work_dir: Path,
                   cycles: int | None = None) -> BoardRun:  # fmt: skip
    """Run ``plan``'s board top (clock pin -> PLL model -> reset -> pins) in Icarus.

    ``cycles`` counts core clock cycles after the core leaves reset (default
    :func:`cycles_needed`).  The pins' period is the measured one, not the spec's.
    """
    tool = simulator("icarus")  # the PLL models are Verilog
    spec = plan.spec
    n = cycles or cycles_needed(spec)
    record = run_bench(tool, board_sources(plan, pattern), BOARD_BENCH, work_dir, record="screen.txt",
                       plusarg="synccore_screen", generic="events_path", stop=n)  # fmt: skip
    lines = record.splitlines()
    times = [line.split() for line in lines if line.startswith("time ")]
    if len(times) != 1 or n < 2:
        raise ViewError("the board bench's record has no clock measurement")
    first_ns, last_ns = float(times[0][1]), float(times[0][2])
    f_core = (n - 1) / ((last_ns - first_ns) * 1e-9)
    ppc = spec.core.pixels_per_clock
    bits = (spec.color.red, spec.color.green, spec.color.blue)
    text = "\n".join(line for line in lines if not line.startswith("time "))
    pins = read_screen(text, period_s=1 / (f_core * ppc), bits=bits, pixels_per_clock=ppc)
    return BoardRun(pins, f_core, f_core * ppc)


def read_screen(text: str, *, period_s: float, bits: tuple[int, int, int],
                pixels_per_clock: int = 1) -> Pins:  # fmt: skip
    """Expand the bench's change records into one sample per pixel clock.

    A record is ``<cycle> <hsync> <vsync> <de>`` and then ``<red> <green> <blue>`` of
    each of the cycle's ``pixels_per_clock`` pixels, pixel 0 first.
    """
    n = pixels_per_clock
    fields = 3 + 3 * n
    starts: list[int] = []
    values: list[list[int]] = []
    total = None
    for line in text.splitlines():
        parts = line.split()
        if not parts:
            continue
        if parts[0] == "end":
            total = int(parts[1])
            break
        if len(parts) != 1 + fields:
            raise ViewError(f"the display bench's record {line!r} has {len(parts) - 1} values, "
                            f"expected {fields} for {n} pixel(s) per clock")  # fmt: skip
        starts.append(int(parts[0]))
        values.append([int(p) for p in parts[1:]])
    if total is None or not starts:
        raise ViewError("the display bench's record is cut short (no end line)")
    lengths = np.diff(np.array(starts + [total]))
    cols = np.repeat(np.array(values, dtype=np.int64), lengths, axis=0)  # one row per cycle
    per_pixel = cols[:, 3:].reshape(-1, n, 3).reshape(-1, 3)  # cycle-major, pixel 0 first
    hs, vs, de = (np.repeat(cols[:, k], n) for k in range(3))
    return Pins(period_s, hs, vs, de, per_pixel[:, 0], per_pixel[:, 1], per_pixel[:, 2], bits)


def model_pins(spec: Spec, pattern: str, cycles: int) -> Pins:
    """The pins of the first-light design computed from the timing model, without HDL.

    ``cycles`` counts core clock cycles; the pins hold one sample per pixel clock
    (``cycles * pixels_per_clock``), pixel ``i`` of a cycle showing picture column
    :func:`~synccore.model.pattern.pixel_column` of the cycle's first column.
    The top level's pins lag the core's by the output stage; since the monitor
    locks on the syncs, the pins are given here from the first cycle after reset.
    """
    t = Timing(spec)
    n = t.ppc
    q = np.arange(cycles, dtype=np.int64)
    h, v = t.position(q)
    de = np.repeat((h < t.h_active) & (v < t.v_active), n)
    hs = np.repeat(np.where(t.in_hsync(h), t.hsync_active_level, t.hsync_inactive_level), n)
    vs = np.repeat(np.where(t.in_vsync(q), t.vsync_active_level, t.vsync_inactive_level), n)
    w, ht = picture_size(spec)
    table = np.array([[levels(pattern, x, y, w, ht, spec.color) for x in range(w)] for y in range(ht)],
                     dtype=np.int64)  # fmt: skip
    s = t.scale_shift
    first = (h * n) >> s  # picture column of each cycle's first pixel
    offsets = np.array([pixel_column(0, i, spec.core.scale) for i in range(n)], dtype=np.int64)
    column = np.add.outer(first, offsets).reshape(-1)
    row = np.repeat((v * t.fields + t.field_of(q)) >> s, n)  # interlaced: 2 x line + field
    rgb = np.zeros((cycles * n, 3), dtype=np.int64)
    rgb[de] = table[row[de], column[de]]
    return Pins(float(1 / spec.pixel_clock_hz), hs, vs, de.astype(np.int64), rgb[:, 0], rgb[:, 1],
                rgb[:, 2], (spec.color.red, spec.color.green, spec.color.blue))
