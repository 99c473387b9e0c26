"""Driving the emitted TMDS encoder in the simulators, for the tests.

A stimulus is a stream of pixels (de, c0, c1, d) grouped ``ppc`` to a clock cycle,
with a reset and a clock enable per cycle.  The bench (``bench/encoder_bench.*.j2``,
laid out here, not in the package) makes the clock in HDL, reads one cycle's inputs
per line (Verilog ``$readmemh`` of stim.hex, VHDL textio of stim.txt), and writes
q_out of every cycle to out.txt: the simulators run free, Python reads the file after.

Cycle ``i`` of the file is applied after falling edge ``i`` and taken by rising edge
``i + 1``; line ``i`` of out.txt is q_out just before the inputs of cycle ``i`` are
applied.  Line 0 is never compared (nothing has been clocked in yet).
"""

from __future__ import annotations

import hashlib
import os
import shutil
import subprocess
from dataclasses import dataclass
from pathlib import Path

import jinja2
import numpy as np

from synccore.emit.link.encoder import encoder_module, render_encoder
from synccore.spec import Spec
from synccore.verification.simulate import VERILATOR_ARGS, cache_dir, locked
from synccore.verification.tools import build_env, find

SIMULATORS = ("icarus", "ghdl93", "ghdl08", "verilator")
BENCH = "enc_bench"
PIXEL_BITS = 11  # d[7:0], c0, c1, de
SKEWED_HIGH = (0xFF, 0xFE, 0xEF, 0xF7, 0x7F, 0xFB, 0xDF, 0xFD)  # seven or eight ones
SKEWED_LOW = (0x00, 0x01, 0x10, 0x08, 0x80, 0x04, 0x20, 0x02)  # none or one
_TEMPLATES = jinja2.Environment(
    loader=jinja2.FileSystemLoader(str(Path(__file__).parent / "bench")),
    undefined=jinja2.StrictUndefined, trim_blocks=True, lstrip_blocks=True,
    keep_trailing_newline=True,
)  # fmt: skip


@dataclass(frozen=True)
class Stimulus:
    """Per cycle: rst, ce; per pixel (cycle * ppc + k): de, c0, c1, d."""

    ppc: int
    rst: np.ndarray
    ce: np.ndarray
    de: np.ndarray
    c0: np.ndarray
    c1: np.ndarray
    d: np.ndarray

    @property
    def cycles(self) -> int:
        return len(self.rst)

    def packed(self) -> list[int]:
        """One number per cycle: pixel k in bits 11k .. 11k + 10, then ce, then rst."""
        pix = self.d | (self.c0 << 8) | (self.c1 << 9) | (self.de << 10)
        word = np.zeros(self.cycles, dtype=np.int64)
        for k in range(self.ppc):
            word |= pix[k :: self.ppc] << (PIXEL_BITS * k)
        top = PIXEL_BITS * self.ppc
        word |= (self.ce << top) | (self.rst << (top + 1))
        return [int(v) for v in word]


def _data_run(rng: np.random.Generator, length: int) -> np.ndarray:
    """Bytes of one active run: constant, random, skewed to many or few ones, or alternating."""
    kind = int(rng.integers(0, 6))
    if kind == 0:
        return np.full(length, int(rng.choice(SKEWED_HIGH + SKEWED_LOW)))
    if kind == 1:
        return np.full(length, int(rng.integers(0, 256)))
    if kind == 2:
        return rng.integers(0, 256, length)
    if kind in (3, 4):
        pool = np.array(SKEWED_HIGH if kind == 3 else SKEWED_LOW)
        mixed = rng.integers(0, 256, length)
        return np.where(rng.random(length) < 0.8, pool[rng.integers(0, len(pool), length)], mixed)
    pair = rng.integers(0, 256, 2)
    return pair[np.arange(length) % 2]


def make_stimulus(cycles: int, *, ppc: int, has_ce: bool, seed: int) -> Stimulus:
    """Blanking periods (every token, short and long, syncs toggling in some) and active
    runs (1 pixel to thousands), resets at random points, an irregular ce when ``has_ce``."""
    rng = np.random.default_rng(seed)
    n = cycles * ppc
    de, c0, c1, d = (np.zeros(n, dtype=np.int64) for _ in range(4))
    pos = 0
    while pos < n:
        length = int(rng.choice([1, 2, 3, int(rng.integers(4, 30)), int(rng.integers(50, 400))]))
        end = min(n, pos + length)
        c = int(rng.integers(0, 4))
        c0[pos:end], c1[pos:end] = c & 1, c >> 1
        if rng.random() < 0.2:  # a sync edge inside the blanking period
            c0[pos + (end - pos) // 2 : end] ^= 1
        pos = end
        length = int(rng.choice([int(rng.integers(1, 9)), int(rng.integers(20, 300)),
                                 int(rng.integers(500, 3000))]))  # fmt: skip
        end = min(n, pos + length)
        de[pos:end] = 1
        d[pos:end] = _data_run(rng, end - pos)
        c0[pos:end], c1[pos:end] = rng.integers(0, 2, 2)  # ignored while de = 1
        pos = end
    rst = np.zeros(cycles, dtype=np.int64)
    rst[:3] = 1
    for at in rng.integers(10, cycles, max(1, cycles // 20000)):
        rst[at : at + int(rng.integers(1, 4))] = 1
    ce = np.ones(cycles, dtype=np.int64)
    if has_ce:
        ce = (rng.random(cycles) < 0.7).astype(np.int64)
        for at in rng.integers(0, cycles, max(1, cycles // 5000)):
            ce[at : at + int(rng.integers(5, 40))] = 0
    return Stimulus(ppc, rst, ce, de, c0, c1, d)


def bench_text(spec: Spec, language: str, cycles: int) -> str:
    ppc = spec.core.pixels_per_clock
    pixels = [{
        "index": k, "d_lsb": PIXEL_BITS * k, "d_msb": PIXEL_BITS * k + 7, "c0": PIXEL_BITS * k + 8,
        "c1": PIXEL_BITS * k + 9, "de": PIXEL_BITS * k + 10, "q_lsb": 10 * k, "q_msb": 10 * k + 9,
        "disparity_in": "disparity" if k == 0 else f"disparity_{k - 1}",
    } for k in range(ppc)]  # fmt: skip
    top = PIXEL_BITS * ppc
    suffix = "v" if language == "verilog" else "vhd"
    return _TEMPLATES.get_template(f"encoder_bench.{suffix}.j2").render(
        cycles=cycles, module=encoder_module(spec), pixels=pixels, chained=ppc > 1,
        has_ce=spec.core.clock_enable, last=ppc - 1, ce_bit=top, rst_bit=top + 1,
        stim_bits=top + 2, stim_msb=top + 1, out_msb=10 * ppc - 1,
    )  # fmt: skip


def _run(cmd: list[str], cwd: Path, env: dict[str, str] | None = None) -> None:
    full = None if env is None else {**os.environ, **env}
    proc = subprocess.run(cmd, cwd=cwd, env=full, capture_output=True, text=True, timeout=300)
    assert proc.returncode == 0, f"{' '.join(cmd)} failed:\n{proc.stdout}{proc.stderr}"


def simulate(spec: Spec, simulator: str, stim: Stimulus, work: Path,
             encoder_text: str | None = None) -> np.ndarray:  # fmt: skip
    """Run ``stim`` through the emitted encoder (or ``encoder_text``, a mutant) on
    ``simulator``; q_out per cycle and pixel, shape (cycles, ppc), -1 where unknown."""
    language = "vhdl" if simulator.startswith("ghdl") else "verilog"
    suffix = "vhd" if language == "vhdl" else "v"
    enc = encoder_text if encoder_text is not None else render_encoder(spec, language)
    files = {f"{encoder_module(spec)}.{suffix}": enc,
             f"{BENCH}.{suffix}": bench_text(spec, language, stim.cycles)}  # fmt: skip
    work.mkdir(parents=True, exist_ok=True)
    for name, text in files.items():
        (work / name).write_text(text)
    packed = stim.packed()
    (work / "stim.hex").write_text("".join(f"{v:x}\n" for v in packed))
    (work / "stim.txt").write_text("".join(f"{v}\n" for v in packed))
    if simulator == "icarus":
        _run(["iverilog", "-g2005", "-s", BENCH, "-o", "bench.vvp", *files], work)
        _run(["vvp", "-n", "bench.vvp"], work)
    elif simulator.startswith("ghdl"):
        std = f"--std={simulator[4:]}"
        _run(["ghdl", "-a", std, *files], work)
        _run(["ghdl", "-e", std, BENCH], work)
        _run(["ghdl", "-r", std, BENCH], work)
    else:
        _run([str(_verilator_binary(files))], work, _verilator_env())
    return read_output(work / "out.txt", stim)


def _verilator_env() -> dict[str, str]:
    tool = find("verilator")
    assert tool is not None
    return tool.env


def _verilator_binary(files: dict[str, str]) -> Path:
    """Build the bench once per content (Verilator builds take many seconds) in the synccore cache."""
    tool = find("verilator")
    assert tool is not None
    key = hashlib.sha256(repr(sorted(files.items())).encode()).hexdigest()[:24]
    build = cache_dir() / f"tmds-encoder-{key}"
    binary = build / "obj" / f"V{BENCH}"
    with locked(build):
        if not binary.is_file():
            shutil.rmtree(build, ignore_errors=True)
            build.mkdir(parents=True)
            for name, text in files.items():
                (build / name).write_text(text)
            _run(["verilator", "--binary", *VERILATOR_ARGS, "-j", "2", "--top-module", BENCH,
                  "-Mdir", "obj", *files], build, build_env(tool, cache_dir()))  # fmt: skip
    return binary


def read_output(path: Path, stim: Stimulus) -> np.ndarray:
    lines = path.read_text().split()
    assert len(lines) == stim.cycles, f"{path.name}: {len(lines)} lines for {stim.cycles} cycles"
    out = np.full((stim.cycles, stim.ppc), -1, dtype=np.int64)
    for i, text in enumerate(lines):
        if text.lstrip("-").isdigit() and not text.startswith("-"):
            value = int(text)
            for k in range(stim.ppc):
                out[i, k] = (value >> (10 * k)) & 0x3FF
    return out
