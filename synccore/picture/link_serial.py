"""Running the whole DVI top in Icarus and reading its TMDS pins as serial lanes.

The serial DVI bench (``templates/bench/dvi_bench.v.j2``) drives ``<name>_dvi`` from its
board clock pin.  The vendor primitives under it run as behavioural models: the PLL
(``bench/pll_models.v.j2``, each output derived from the primitive's parameters by the
vendor's formula) and the DDR / 10:1 output and differential buffers
(``bench/io_models.v.j2``).  The bench samples the ``_p`` pins in the middle of every bit
(a quarter serial period after each serial clock edge), checks each ``_n`` pin against
its ``_p`` pin, and writes the bits ten to a line without knowing where a symbol starts:
the simulated sink (:func:`synccore.picture.link.receive`) finds the boundary from the
control tokens, as a DVI receiver does.  The serial and core clocks are measured on the
sampling times.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from synccore.clocking.link import LinkPlan
from synccore.emit.bench.dvi_view import DVI_BENCH, render_dvi_bench
from synccore.emit.bench.view import PLL_MODELS, render_pll_models
from synccore.emit.files import core_artifacts, dvi_artifacts, pattern_artifacts
from synccore.emit.link.serialiser import IO_MODELS, render_io_models
from synccore.model.tmds import WORD_BITS
from synccore.picture.link import Lanes, lanes_from_bits, serial_bits
from synccore.picture.run import ViewError, cycles_needed, run_bench, simulator

SERIAL_SOURCE = "the serial lanes (the DVI top's _p pins, sampled at the bit rate)"
EXTRA_PIXELS = 64
"""Pixel periods recorded beyond the picture's needs: the cut to whole symbols loses one."""


@dataclass(frozen=True)
class SerialRun:
    """The lanes sampled on the DVI top's pins, and the clocks measured there."""

    lanes: Lanes
    f_serial_hz: float  # the serial clock the pins were sampled on
    f_pixel_hz: float  # f_serial_hz / 5: one 10-bit symbol per pixel, two bits per serial cycle
    f_core_hz: float  # the core clock (iCE40: the rate of the core's ce pulses)
    mismatches: int  # samples where an _n pin was not the inverse of its _p pin


def dvi_sources(plan: LinkPlan, pattern: str) -> dict[str, str]:
    """File name -> Verilog text of the DVI top with everything under it, the models and bench."""
    spec = plan.spec
    files = {a.name: a.text for a in core_artifacts(spec) + pattern_artifacts(spec, pattern)
             + dvi_artifacts(plan, pattern) if a.name.endswith(".v")}  # fmt: skip
    n = spec.name
    order = [n, f"{n}_pattern", f"{n}_top", f"{n}_tmds_encoder", f"{n}_tmds", f"{n}_serialiser",
             f"{n}_link_clock", f"{n}_dvi"]  # fmt: skip
    out = {name + ".v": files[name + ".v"] for name in order}
    out[PLL_MODELS + ".v"] = render_pll_models()
    out[IO_MODELS + ".v"] = render_io_models()
    out[DVI_BENCH + ".v"] = render_dvi_bench(plan, pattern)
    return out


def read_bits(text: str) -> tuple[np.ndarray, np.ndarray, dict[str, list[float]]]:
    """The bench's record: the data lanes' bits (3, m), the clock lane's bits, the figures."""
    chunks: list[list[int]] = []
    figures: dict[str, list[float]] = {}
    for line in text.splitlines():
        parts = line.split()
        if not parts:
            continue
        if parts[0].isdigit():
            chunks.append([int(p) for p in parts])
        else:
            figures[parts[0]] = [float(p) for p in parts[1:]]
    if "end" not in figures or not chunks or any(len(c) != 4 for c in chunks):
        raise ViewError("the serial DVI bench's record is cut short or malformed")
    words = np.array(chunks, dtype=np.int64).T  # (4, lines): ten bits each, the first in bit 0
    bits = np.stack([serial_bits(words[k]) for k in range(4)])
    return bits[:3], bits[3], figures


def _rate(figure: list[float], per_sample: float) -> float:
    first_ns, last_ns, count = figure
    if count < 2 or last_ns <= first_ns:
        raise ViewError("the serial DVI bench measured no clock")
    return (count - 1) * per_sample / ((last_ns - first_ns) * 1e-9)


def simulate_dvi(plan: LinkPlan, pattern: str, *, work_dir: Path,
                 cycles: int | None = None) -> SerialRun:  # fmt: skip
    """Run ``plan``'s DVI top (board clock pin -> PLL model -> ... -> TMDS pins) in Icarus.

    ``cycles`` counts core clock cycles to record (default
    :func:`~synccore.picture.run.cycles_needed`); the lanes' period is the measured pixel
    period, not the spec's.
    """
    tool = simulator("icarus")  # the PLL and I/O models are Verilog
    if plan.setting is None:
        raise ViewError("the link plan has no PLL setting to simulate")
    spec = plan.spec
    pixels = (cycles or cycles_needed(spec)) * spec.core.pixels_per_clock + EXTRA_PIXELS
    text = run_bench(tool, dvi_sources(plan, pattern), DVI_BENCH, work_dir, record="bits.txt",
                     plusarg="synccore_bits", generic="bits_path", stop=pixels)  # fmt: skip
    bits, clock_bits, figures = read_bits(text)
    if "serial" not in figures or "core" not in figures:
        raise ViewError("the serial DVI bench's record has no clock measurement")
    f_serial = _rate(figures["serial"], 0.5)  # a sample on each edge: two per serial cycle
    f_core = _rate(figures["core"], 1.0)
    f_pixel = f_serial * 2 / WORD_BITS
    lanes = lanes_from_bits(bits, 1 / f_pixel, SERIAL_SOURCE, clock_bits=clock_bits)
    return SerialRun(lanes, f_serial, f_pixel, f_core, int(figures.get("mismatch", [0])[0]))
