"""Interlaced library entries, verified on every engine against the formats' own figures.

Each interlaced entry of the mode library runs through Icarus, GHDL, Verilator and the
built-in engine; the run must pass the model's own comparison, and the figures it
measures (lines per frame and per field, active lines per field, where each field's
vsync starts, the field output, the interlaced rows) are checked against the figures
of the standard written here, with their sources.

Tiers (CI: 2 cores).  Measured on this project's machine (shared, two frames per run,
seconds): 480i Icarus 12, GHDL 8, Verilator 9, built-in 50; 576i Icarus 23, GHDL 12,
Verilator 14, built-in 63; 1080i@60 Icarus 69, GHDL 22, Verilator 19, built-in 220;
1080i@50 Verilator 21 (under load from other jobs, up to three times as long).  The
default tier runs 720x480i@60 on all four engines, 720x576i@50 on GHDL and Verilator and
1920x1080i@60 once on Verilator (about 125 s of CPU; 720x480i@59.94 is the example
console_480i, measured on the three simulators by test_measure.py);
``SYNCCORE_SLOW=1`` runs every entry on every engine.

The mutants below are interlaced cores with one fault each; each must fail naming the
quantity the fault breaks.
"""

from __future__ import annotations

import os
import re
from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path

import pytest

import synccore
from synccore.timings.modes import library
from synccore.verification.engines import run_engine
from synccore.verification.measure import Figure, compare, failures
from synccore.verification.tools import Tool
from tests import samples

pytestmark = pytest.mark.sim

SLOW = os.environ.get("SYNCCORE_SLOW") == "1"
ENGINES = ("icarus", "ghdl", "verilator", "builtin")


@dataclass(frozen=True)
class Format:
    """An interlaced format's own figures: per line in pixel clocks, per frame and field in lines."""

    h_active: int  # pixel clocks of picture per line (720 pixels sent twice for 480i/576i)
    h_front: int  # pixel clocks from the end of the picture to the hsync leading edge
    h_total: int  # pixel clocks per line
    frame_lines: int  # lines per frame (both fields)
    field_lines: tuple[int, int]  # the longer field (followed by the half-line vsync), the shorter
    active_per_field: int  # picture lines in each field
    field_rate: Fraction  # fields per second


# Sources.  CTA-861-G Table 1 ("Video Format Timings - Detailed Timing Information"),
# from memory (the table's text was not at hand): H active, H front porch, H total, V total
# per frame, V active per field, the field rates, and pixel repetition 2 for 480i/576i (720
# pixels, 1440 pixel clocks).  Looked up: 1080i has 1125 lines per frame, one field of 563
# lines and one of 562, a line rate of 33 750 Hz (Broadcast Engineering, "The 1920x1080/60i
# HDTV format", May 2003, Table 1) and 540 active lines per field (active video on lines
# 21-560 and 584-1123: K. Jack, Video Demystified, "1080i and 1080p Systems"); 625-line
# systems have 312.5 lines per field (ITWissen, "field"), 576 visible lines (AfterDawn,
# "Scanline"); 525-line systems have 480 lines in Rec. 601 digital video (AfterDawn,
# "Scanline").  A frame of an odd number of lines splits into fields of n and n + 1 lines.
FORMATS = {
    "1920x1080i@60": Format(1920, 88, 2200, 1125, (563, 562), 540, Fraction(60)),  # VIC 5
    "1920x1080i@59.94": Format(1920, 88, 2200, 1125, (563, 562), 540, Fraction(60000, 1001)),
    "1920x1080i@50": Format(1920, 528, 2640, 1125, (563, 562), 540, Fraction(50)),  # VIC 20
    "720x480i@60": Format(1440, 38, 1716, 525, (263, 262), 240, Fraction(60)),  # VIC 6/7
    "720x480i@59.94": Format(1440, 38, 1716, 525, (263, 262), 240, Fraction(60000, 1001)),
    "720x576i@50": Format(1440, 24, 1728, 625, (313, 312), 288, Fraction(50)),  # VIC 21/22
}  # fmt: skip

DEFAULT_TIER = {("720x480i@60", e) for e in ENGINES} | {
    ("720x576i@50", "ghdl"), ("720x576i@50", "verilator"), ("1920x1080i@60", "verilator")}  # fmt: skip
CASES = [(name, engine) for name in FORMATS for engine in ENGINES
         if SLOW or (name, engine) in DEFAULT_TIER]  # fmt: skip


def test_every_interlaced_library_entry_is_checked() -> None:
    """A new interlaced entry must bring its figures here."""
    assert sorted(m.name for m in library() if m.interlaced) == sorted(FORMATS)


def _one(figures: dict[str, Figure], key: str) -> str:
    values = figures[key].values
    assert len(values) == 1, (key, values)
    return str(values[0])


def _pair(text: str) -> tuple[str, str]:
    a, b = text.split(" / ")
    return a, b


@pytest.mark.parametrize(("name", "engine"), CASES, ids=[f"{n}-{e}" for n, e in CASES])
def test_library_entry_measures_as_the_standard(name: str, engine: str, tmp_path: Path,
                                                need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    if engine != "builtin":
        need_tool(engine)
    spec = synccore.loads(f'name: tv\nstandard: "{name}"\n', "tv.yaml")
    run = run_engine(spec, engine, frames=2, work_dir=tmp_path)
    assert run.error is None and run.figures is not None, run.error
    assert not failures(compare(synccore.timing(spec), {engine: run.figures}))
    f, std = run.figures, FORMATS[name]
    assert int(_one(f, "line_total")) == std.h_total
    assert int(_one(f, "frame_total")) == std.frame_lines
    assert _pair(_one(f, "field_lines")) == tuple(str(n) for n in std.field_lines)
    assert sum(std.field_lines) == std.frame_lines
    per_field = (str(std.active_per_field),) * 2
    assert _pair(_one(f, "v_active")) == per_field  # de lines
    assert _pair(_one(f, "line_start")) == per_field
    # Two fields per frame, evenly spaced: a vsync every half frame (262.5, 312.5, 562.5
    # lines), which is what puts the second field's vsync half a line off the first's.
    half_frame = Fraction(std.frame_lines, 2)
    assert _pair(_one(f, "vsync_spacing")) == (f"{float(half_frame):.1f}",) * 2
    late, on_edge = (int(v) for v in _pair(_one(f, "vsync_offset")))
    assert on_edge == std.h_active + std.h_front  # with the hsync leading edge
    assert (late - on_edge) % std.h_total == std.h_total // 2  # half a line later
    assert _one(f, "field") == "0 / 1"
    rows = 2 * std.active_per_field
    assert _one(f, "y_range") == f"0..{rows - 2} by 2 / 1..{rows - 1} by 2"
    assert _one(f, "x_range") == f"0..{std.h_active - 1} / 0..{std.h_active - 1}"
    rate = Fraction(spec.pixel_clock_hz) / (std.h_total * half_frame)
    assert rate == std.field_rate


# ---------------------------------------------------------------- mutants

def _sub(pattern: str, repl: str) -> Callable[[str], str]:
    return lambda text: re.sub(pattern, repl, text)


MUTANTS = {
    # field 0's vsync taken at the hsync column like field 1's: no half-line offset
    "vsync not offset by half a line": (
        _sub(r"if \(h_at_vsync_f0\) begin", "if (h_at_sync_start) begin"),
        ["vsync edge in line (field 0 / 1)", "vsync to the next vsync (field 0 / 1)"],
    ),
    # field 0 ends where field 1 does: both fields the same line count
    "fields of equal length": (
        _sub(r"\(v_pos == V_LAST_F0\)", "(v_pos == V_LAST)"),
        ["lines per field (field 0 / 1)", "lines per frame"],
    ),
    "field output stuck at 0": (
        _sub(r"field <= fld;", "field <= 1'b0;"),
        ["field output (field 0 / 1)"],
    ),
    # the field's line as the row: y not 2 x line + field
    "y not interlaced": (
        _sub(r"y <= \{v_pos\[(\d+):0\], fld\};", r"y <= {1'b0, v_pos[\1:0]};"),
        ["y range (field 0 / 1)"],
    ),
    "frame_start in both fields": (
        _sub(r"frame_start <= h_at_zero && v_at_zero && !fld;",
             "frame_start <= h_at_zero && v_at_zero;"),
        ["frame_start per frame (field 0 / 1)"],
    ),
}  # fmt: skip


@pytest.mark.parametrize("mutant", list(MUTANTS))
def test_interlaced_mutants_fail_naming_the_quantity(mutant: str, tmp_path: Path,
                                                     need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    spec = synccore.loads(samples.SMALL_INTERLACED, "mut.yaml")
    good = synccore.render_verilog(spec)
    mutate, quantities = MUTANTS[mutant]
    bad = mutate(good)
    assert bad != good, "the mutation did not apply; the emitted text changed"
    run = run_engine(spec, "icarus", frames=2, work_dir=tmp_path, core_text=bad)
    assert run.figures is not None, run.error
    lines = failures(compare(synccore.timing(spec), {"icarus": run.figures}))
    named = {line.split(":")[0] for line in lines}
    for quantity in quantities:
        assert quantity in named, (quantity, lines)


def test_unmutated_small_interlaced_core_passes(tmp_path: Path,
                                                need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    """The mutants' base core passes, so their failures come from the mutations."""
    need_tool("icarus")
    spec = synccore.loads(samples.SMALL_INTERLACED, "mut.yaml")
    run = run_engine(spec, "icarus", frames=2, work_dir=tmp_path)
    assert run.figures is not None, run.error
    assert not failures(compare(synccore.timing(spec), {"icarus": run.figures}))
