"""Running the first-light design in a simulator and reading back its pins.

The display bench (``templates/bench/view_bench.*.j2``) makes the clock in HDL,
resets the top level, and writes one line to a file whenever hsync, vsync, de
or a colour pin changes (sampled on the falling clock edge); Python reads the
file after the run and never wakes per cycle.  The simulators run directly
(no cocotb): ``iverilog``/``vvp``, ``ghdl``, and Verilator's ``--binary``
(built once per content hash in the synccore cache, as its builds are slow).

Two engines need no HDL simulator: ``builtin`` simulates the Amaranth model of
the design (:mod:`synccore.amaranth.first_light`) in Amaranth's simulator, and
``model`` computes the pins straight from the timing model (the same rules
:func:`synccore.model.Timing.outputs_at` applies, over a whole run at once) and
the pattern's Python definition, which is the quickest for large modes.
"""

from __future__ import annotations

import hashlib
import json
import shutil
import subprocess
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from synccore.emit.bench.view import BENCH, render_bench
from synccore.emit.files import core_artifacts, pattern_artifacts
from synccore.model import Timing
from synccore.model.pattern import levels, picture_size
from synccore.spec import Spec
from synccore.verification.simulate import VERILATOR_ARGS, cache_dir, locked
from synccore.verification.tools import INSTALL_HINT, build_env, find

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
    """Enough cycles for two vsync leading edges and the whole frame between them."""
    t = Timing(spec)
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


def _run(cmd: list[str], cwd: Path, env: dict[str, str] | None = None) -> None:
    import os

    full = dict(os.environ)
    full.update(env or {})
    proc = subprocess.run(cmd, cwd=cwd, env=full, capture_output=True, text=True)
    if proc.returncode != 0:
        raise ViewError(f"{' '.join(cmd[:2])} failed:\n{proc.stdout}{proc.stderr}")


def simulate(spec: Spec, pattern: str, *, engine: str, work_dir: Path,
             cycles: int | None = None) -> Pins:  # fmt: skip
    """Run the first-light design of ``spec`` with ``pattern`` on ``engine``; return its pins."""
    if engine not in VIEW_ENGINES:
        raise ValueError(f"unknown engine {engine!r}; choose from {', '.join(VIEW_ENGINES)}")
    n = cycles or cycles_needed(spec)
    bits = (spec.color.red, spec.color.green, spec.color.blue)
    period_s = float(1 / spec.pixel_clock_hz)
    if engine == "model":
        return model_pins(spec, pattern, n)
    if engine == "builtin":
        try:
            from synccore.amaranth.first_light import run_picture
        except ImportError:
            raise ViewError("engine 'builtin' needs Amaranth: install the PyPI package 'amaranth' "
                            "(pip install 'synccore[amaranth]'), or use --sim model") from None
        return read_screen(run_picture(spec, pattern, n), period_s=period_s, bits=bits)
    tool = find(engine)
    if tool is None:
        raise ViewError(f"simulator {engine!r} not found: {INSTALL_HINT[engine]}")
    language = tool.languages[0]
    work_dir.mkdir(parents=True, exist_ok=True)
    files = sources(spec, pattern, language)
    for name, text in files.items():
        (work_dir / name).write_text(text, encoding="utf-8")
    screen = (work_dir / "screen.txt").resolve()
    screen.unlink(missing_ok=True)
    names = list(files)
    if engine == "icarus":
        _run(["iverilog", "-g2005", "-s", BENCH, "-o", "view.vvp", *names], work_dir)
        _run(["vvp", "-n", "view.vvp", f"+synccore_screen={screen}", f"+synccore_stop={n}"], work_dir)
    elif engine == "ghdl":
        std = "--std=08"
        _run(["ghdl", "-a", std, *names], work_dir)
        _run(["ghdl", "-e", std, BENCH], work_dir)
        _run(["ghdl", "-r", std, BENCH, f"-gevents_path={screen}", f"-gstop_at={n}"], work_dir)
    else:
        key = hashlib.sha256(json.dumps(sorted(files.items())).encode()).hexdigest()[:24]
        build = cache_dir() / f"view-verilator-{key}"
        binary = build / "obj" / f"V{BENCH}"
        with locked(build):  # parallel runs of the same design build it once
            if not binary.is_file():
                shutil.rmtree(build, ignore_errors=True)
                build.mkdir(parents=True)
                for name, text in files.items():
                    (build / name).write_text(text, encoding="utf-8")
                _run(["verilator", "--binary", *VERILATOR_ARGS, "-j", "2", "--top-module", BENCH,
                      "-Mdir", "obj", *names], build, build_env(tool, cache_dir()))  # fmt: skip
        _run([str(binary), f"+synccore_screen={screen}", f"+synccore_stop={n}"], work_dir, tool.env)
    if not screen.is_file():
        raise ViewError(f"{engine}: the bench wrote no {screen.name}")
    return read_screen(screen.read_text(), period_s=period_s, bits=bits)


def read_screen(text: str, *, period_s: float, bits: tuple[int, int, int]) -> Pins:
    """Expand the bench's change records into one sample per cycle."""
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
        starts.append(int(parts[0]))
        values.append([int(p) for p in parts[1:7]])
    if total is None or not starts:
        raise ViewError("the display bench's record is cut short (no end line)")
    lengths = np.diff(np.array(starts + [total]))
    cols = np.repeat(np.array(values, dtype=np.int64), lengths, axis=0)
    return Pins(period_s, cols[:, 0], cols[:, 1], cols[:, 2], cols[:, 3], cols[:, 4], cols[:, 5], bits)


def model_pins(spec: Spec, pattern: str, cycles: int) -> Pins:
    """The pins of the first-light design computed from the timing model, without HDL.

    The top level's pins lag the core's by the output stage; since the monitor
    locks on the syncs, the pins are given here from the first cycle after reset.
    """
    t = Timing(spec)
    q = np.arange(cycles, dtype=np.int64)
    h, v = t.position(q)
    de = (h < t.h_active) & (v < t.v_active)
    hs = np.where(t.in_hsync(h), t.hsync_active_level, t.hsync_inactive_level)
    vs = np.where(t.in_vsync(q), t.vsync_active_level, t.vsync_inactive_level)
    w, ht = picture_size(spec)
    table = np.array([[levels(pattern, x, y, w, ht, spec.color) for x in range(w)] for y in range(ht)],
                     dtype=np.int64)  # fmt: skip
    rgb = np.zeros((cycles, 3), dtype=np.int64)
    s = t.scale_shift
    rgb[de] = table[v[de] >> s, h[de] >> s]
    return Pins(float(1 / spec.pixel_clock_hz), hs, vs, de.astype(np.int64), rgb[:, 0], rgb[:, 1],
                rgb[:, 2], (spec.color.red, spec.color.green, spec.color.blue))
