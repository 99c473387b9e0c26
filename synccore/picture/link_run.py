"""Running the DVI design's link core in a simulator and reading back its TMDS symbols.

The link bench (``templates/bench/link_bench.*.j2``) runs ``<name>_tmds`` (the
first-light design, colour to 8 bits, the TMDS encoders) and writes the symbols of
every cycle; :func:`simulate_link` reads them as the three lanes' symbol streams,
one symbol per pixel.  The family's serialiser is a vendor primitive (ODDRX1F,
OSERDESE2, OSER10, SB_IO, ALTDDIO_OUT) with no open simulation model, so the sink
reads the encoders' parallel words, turned into each lane's bit stream bit 0
first, as the serialiser sends them; :mod:`synccore.picture.link` finds the
symbol boundary from the control tokens all the same.

The ``model`` engine needs no HDL: the pins of the timing model and the pattern
(:func:`synccore.picture.run.model_pins`) through the reference encoder
(:func:`synccore.model.tmds.encode_stream`).

The serial lanes themselves come from :mod:`synccore.picture.link_serial`, which runs the
whole DVI top with behavioural models of those primitives (``view --link dvi --board``).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from synccore.emit.bench.link_view import LINK_BENCH, render_link_bench
from synccore.emit.files import core_artifacts, link_artifacts, pattern_artifacts
from synccore.model.tmds import eight_bit, encode_stream
from synccore.picture.link import Lanes
from synccore.picture.run import ViewError, cycles_needed, model_pins, run_bench, simulator
from synccore.spec import Spec

LINK_ENGINES = ("icarus", "ghdl", "verilator", "model")
WORDS_SOURCE = "encoder words (the serialiser is a vendor primitive without an open model)"


def link_sources(spec: Spec, pattern: str, language: str) -> dict[str, str]:
    """File name -> text of everything under the link core, and the link bench, in order."""
    suffix = ".v" if language == "verilog" else ".vhd"
    files = {a.name: a.text for a in core_artifacts(spec) + pattern_artifacts(spec, pattern)
             + link_artifacts(spec, pattern) if a.name.endswith(suffix)}  # fmt: skip
    n = spec.name
    order = [n, f"{n}_pattern", f"{n}_top", f"{n}_tmds_encoder", f"{n}_tmds"]
    out = {name + suffix: files[name + suffix] for name in order}
    out[LINK_BENCH + suffix] = render_link_bench(spec, pattern, language)
    return out


def read_symbols(text: str, pixels_per_clock: int) -> np.ndarray:
    """The bench's lines as a (3, n) array of symbols, one column per pixel, in time order."""
    body, _, tail = text.rpartition("end ")
    if not tail.strip().isdigit():
        raise ViewError("the link bench's record is cut short (no end line)")
    values = np.array(body.split(), dtype=np.int64)
    if len(values) % (3 * pixels_per_clock):
        raise ViewError("the link bench's record has a partial line")
    return values.reshape(-1, 3).T.copy()  # per cycle: pixel 0 lanes 0..2, pixel 1 lanes 0..2, ...


def model_lanes(spec: Spec, pattern: str, cycles: int) -> Lanes:
    """The lanes of the DVI design computed from the timing model and the reference encoder."""
    pins = model_pins(spec, pattern, cycles)
    de = pins.de if pins.de is not None else np.ones_like(pins.hsync)
    lanes = []
    for k, (level, bits) in enumerate(((pins.blue, spec.color.blue), (pins.green, spec.color.green),
                                       (pins.red, spec.color.red))):  # fmt: skip
        table = np.array([eight_bit(v, bits) for v in range(1 << bits)], dtype=np.int64)
        zero = np.zeros_like(pins.hsync)
        c0, c1 = (pins.hsync, pins.vsync) if k == 0 else (zero, zero)
        words, _ = encode_stream(de, c0, c1, table[level])
        lanes.append(words)
    return Lanes(pins.period_s, np.stack(lanes), "the timing model through the reference encoder")


def simulate_link(spec: Spec, pattern: str, *, engine: str, work_dir: Path,
                  cycles: int | None = None) -> Lanes:  # fmt: skip
    """Run the link core of ``spec`` with ``pattern`` on ``engine``; return the lanes' symbols.

    ``cycles`` counts core clock cycles (default :func:`~synccore.picture.run.cycles_needed`).
    """
    if engine not in LINK_ENGINES:
        raise ViewError(f"the DVI link runs on {', '.join(LINK_ENGINES)}, not {engine!r}")
    n = cycles or cycles_needed(spec)
    if engine == "model":
        return model_lanes(spec, pattern, n)
    tool = simulator(engine)
    files = link_sources(spec, pattern, tool.languages[0])
    text = run_bench(tool, files, LINK_BENCH, work_dir, record="symbols.txt",
                     plusarg="synccore_symbols", generic="symbols_path", stop=n)  # fmt: skip
    words = read_symbols(text, spec.core.pixels_per_clock)
    return Lanes(float(1 / spec.pixel_clock_hz), words, WORDS_SOURCE)
