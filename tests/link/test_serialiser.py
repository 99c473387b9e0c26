"""The serialisers, run in Icarus with our I/O primitive models, and linted for every family.

What the bench checks, per family and pixels per clock: every word's bits come out
bit 0 first, two per clk_serial cycle, on the lane of its channel (tmds_data_p[0] =
tmds0); the clock lane repeats 1111100000 (the symbol 0000011111 sent bit 0 first)
with its symbol boundaries on the data symbols' boundaries; each _n pin is the inverse
of its _p pin; and the delay from a word's clock edge to its first bit on the pins is
fixed (LATENCY_BITS, in bit periods = half clk_serial cycles).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

import synccore
from synccore.clocking import FAMILY_KEYS
from synccore.emit.link.serialiser import (
    ONE_PIXEL_FAMILIES,
    render_io_models,
    render_serialiser,
    serialiser_context,
)
from synccore.errors import ToolError
from synccore.verification.tools import Tool
from tests.hdl import ghdl_analyse, iverilog_compile, run
from tests.link.bench import Capture, run_bench

SPEC = """\
name: dvi
pixel_clock_hz: 25.175 MHz
core: {pixels_per_clock: PPC}
horizontal: {active: 640, front_porch: 16, sync: 96, back_porch: 48, sync_polarity: negative}
vertical: {active: 480, front_porch: 10, sync: 2, back_porch: 33, sync_polarity: negative}
"""

# Our design, with our models (which leave out the silicon's internal pipeline delays):
# shift-register families load one clk_serial cycle after the word edge and the DDR register
# sends a cycle later (4 bits); the hard serialisers capture the word on the next clk_pixel
# edge (10 bits at ppc 1) and start one clk_serial cycle after it (2 bits).
LATENCY_BITS = {"ecp5": 4, "ice40": 4, "cyclone": 4, "xc7-mmcm": 12, "xc7-pll": 12, "gowin": 12}

# bit 0 first: the symbol 0000011111 (DVI 1.0 clock channel: five ones, five zeros per pixel)
CLOCK_BITS = "1111100000"

CASES = [(key, ppc) for key in FAMILY_KEYS
         for ppc in ((1,) if key in ONE_PIXEL_FAMILIES else (1, 2, 4))]  # fmt: skip


def spec_of(ppc: int) -> synccore.Spec:
    return synccore.loads(SPEC.replace("PPC", str(ppc)), "dvi.yaml")


def _write(folder: Path, key: str, ppc: int) -> list[str]:
    spec = spec_of(ppc)
    (folder / "dvi_serialiser.v").write_text(render_serialiser(spec, key, "verilog"))
    (folder / "dvi_serialiser.vhd").write_text(render_serialiser(spec, key, "vhdl"))
    (folder / "io_models.v").write_text(render_io_models())
    return ["dvi_serialiser.v", "io_models.v"]


def _latency(cap: Capture, width: int) -> int:
    """The one delay (in bits) at which lane 0 carries every logged word; fails otherwise."""
    fits = []
    for lat in range(0, 8 * width):
        if all(cap.p.get(edge + lat + i, "x")[0] == str(words[0] >> i & 1)
               for edge, words in cap.words[2:-3] for i in range(width)):  # fmt: skip
            fits.append(lat)
    assert len(fits) == 1, f"lane 0 matches the words at latencies {fits}"
    return fits[0]


def _check_lanes(cap: Capture, width: int, lat: int) -> None:
    for edge, words in cap.words[2:-3]:
        for i in range(width):
            at = edge + lat + i
            got = cap.p[at]
            want = "".join(str(w >> i & 1) for w in words) + CLOCK_BITS[i % 10]
            assert got == want, f"bit {i} of the word at {edge}: pins {got}, expected {want}"
            inverse = "".join("1" if b == "0" else "0" for b in got)
            assert cap.n[at] == inverse, f"_n pins {cap.n[at]} are not the inverse of {got}"


@pytest.mark.sim
@pytest.mark.parametrize(("key", "ppc"), CASES)
def test_serial_streams(tmp_path: Path, key: str, ppc: int,
                        need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("iverilog")
    sources = _write(tmp_path, key, ppc)
    cap = run_bench(tmp_path, sources, ppc=ppc, ice40=key == "ice40")
    width = 10 * ppc
    lat = _latency(cap, width)
    _check_lanes(cap, width, lat)
    assert lat == LATENCY_BITS[key]


@pytest.mark.sim
@pytest.mark.parametrize(("key", "ppc"), CASES)
def test_verilog_lints_clean(tmp_path: Path, key: str, ppc: int,
                             need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    tool = need_tool("verilator")
    sources = _write(tmp_path, key, ppc)
    run(["verilator", "--lint-only", "-Wall", "--top-module", "dvi_serialiser", *sources],
        tmp_path, tool.env)  # fmt: skip
    (tmp_path / "both.v").write_text("".join((tmp_path / s).read_text() for s in sources))
    iverilog_compile(tmp_path / "both.v")


@pytest.mark.sim
@pytest.mark.parametrize("std", ["93", "08"])
@pytest.mark.parametrize(("key", "ppc"), CASES)
def test_vhdl_analyses_clean(tmp_path: Path, key: str, ppc: int, std: str,
                             need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("ghdl")
    _write(tmp_path, key, ppc)
    ghdl_analyse(tmp_path / "dvi_serialiser.vhd", std)


@pytest.mark.parametrize("key", ONE_PIXEL_FAMILIES)
def test_hard_serialisers_refuse_more_than_one_pixel_per_clock(key: str) -> None:
    with pytest.raises(ToolError, match=rf"^pixels_per_clock: the {key} serialiser takes one "
                       r"pixel per clock \(its hard serialiser loads 10 bits per clk_pixel "
                       r"cycle\), got 2$"):  # fmt: skip
        serialiser_context(spec_of(2), key)


def test_unknown_family_is_refused_with_the_choices() -> None:
    with pytest.raises(ToolError, match=r"^family: no serialiser for family 'ecp3'; choose one "
                       r"of ice40, ecp5, "):  # fmt: skip
        serialiser_context(spec_of(1), "ecp3")


def test_ports_follow_the_contract() -> None:
    roles = {key: [p.role for p in serialiser_context(spec_of(1), key).ports]
             for key in FAMILY_KEYS}  # fmt: skip
    tail = ["rst", "word0", "word1", "word2", "clk_p", "clk_n", "data_p", "data_n"]
    assert roles["ice40"] == ["clk_serial", "rst", "ce", *tail[1:]]
    for key in FAMILY_KEYS:
        if key != "ice40":
            assert roles[key] == ["clk_pixel", "clk_serial", *tail]
