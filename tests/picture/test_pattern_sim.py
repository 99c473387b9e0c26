"""The first-light design in real simulators: the PNG equals, pixel for pixel, an image
computed here with Pillow from the patterns' definitions (synccore/pattern.py's docstring),
drawn independently with rectangles and lines rather than per-pixel formulas.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import numpy as np
import pytest
from PIL import Image, ImageDraw

import synccore
from synccore.picture.monitor import watch
from synccore.picture.run import simulate
from synccore.verification.tools import Tool

WHITE = (255, 255, 255)
# Bars left to right, by the definition: red for bit 0 of the bar index, green bit 1, blue bit 2.
BAR_COLOURS = [(255 * (b & 1), 255 * (b >> 1 & 1), 255 * (b >> 2 & 1)) for b in range(8)]

SMALL = (
    "name: first_light\n"
    "pixel_clock_hz: 2 MHz\n"
    "horizontal: {active: 100, front_porch: 4, sync: 10, back_porch: 6, sync_polarity: negative}\n"
    "vertical: {active: 50, front_porch: 2, sync: 2, back_porch: 4, sync_polarity: positive}\n"
    "color: {red: 3, green: 3, blue: 2}\n"
)  # a made-up small timing, so each simulator run takes well under a second


def expected_image(pattern: str, w: int, h: int) -> Image.Image:
    """The picture a pattern should give, drawn with Pillow from the definition."""
    img = Image.new("RGB", (w, h), (0, 0, 0))
    d = ImageDraw.Draw(img)
    if pattern == "bars":
        for b in range(8):
            left = -(-b * w // 8)  # first column with 8x >= b*w
            right = -(-(b + 1) * w // 8) - 1
            d.rectangle([left, 0, right, h - 1], fill=BAR_COLOURS[b])
    elif pattern == "grid":
        for x in list(range(0, w, 16)) + [w - 1]:
            d.line([x, 0, x, h - 1], fill=WHITE)
        for y in list(range(0, h, 16)) + [h - 1]:
            d.line([0, y, w - 1, y], fill=WHITE)
    elif pattern == "edges":
        d.rectangle([0, 0, w - 1, h - 1], outline=WHITE)
    elif pattern == "checker":
        for top in range(0, h, 16):
            for left in range(0, w, 16):
                if (top // 16 + left // 16) % 2:
                    d.rectangle([left, top, min(left + 15, w - 1), min(top + 15, h - 1)], fill=WHITE)
    elif pattern == "gradient":
        return gradient_image(w, h, (3, 3, 2))
    else:
        raise AssertionError(pattern)
    return img


def gradient_image(w: int, h: int, bits: tuple[int, int, int]) -> Image.Image:
    """Red and blue rise with x, green with y (the definition), as three channels of lines."""

    def level(coord: int, coord_bits: int, channel_bits: int) -> int:
        # The coordinate's top bits (zero-padded below when it has fewer bits than the channel),
        # then the display's 8-bit value round(level * 255 / (2**bits - 1)).
        top = (coord >> (coord_bits - channel_bits) if coord_bits >= channel_bits
               else coord << (channel_bits - coord_bits))  # fmt: skip
        full = (1 << channel_bits) - 1
        return int(top * 255 / full + 0.5)

    xb, yb = max(1, (w - 1).bit_length()), max(1, (h - 1).bit_length())
    channels = []
    for index, (coord_bits, vertical) in enumerate(((xb, True), (yb, False), (xb, True))):
        plane = Image.new("L", (w, h), 0)
        draw = ImageDraw.Draw(plane)
        for c in range(w if vertical else h):
            value = level(c, coord_bits, bits[index])
            draw.line([c, 0, c, h - 1] if vertical else [0, c, w - 1, c], fill=value)
        channels.append(plane)
    return Image.merge("RGB", channels)


def _check(spec_text: str, pattern: str, engine: str, tmp_path: Path) -> None:
    spec = synccore.loads(spec_text)
    pins = simulate(spec, pattern, engine=engine, work_dir=tmp_path)
    mon = watch(pins)
    assert mon.problems == [], mon.problems
    assert mon.image is not None
    tmp_path.mkdir(parents=True, exist_ok=True)
    out = tmp_path / "view.png"
    mon.image.save(out)
    got = np.asarray(Image.open(out).convert("RGB"))
    want = np.asarray(expected_image(pattern, spec.horizontal.active, spec.vertical.active))
    assert got.shape == want.shape
    diff = np.argwhere((got != want).any(axis=-1))
    assert len(diff) == 0, f"{len(diff)} pixels differ, first at (row, col) {diff[0].tolist()}"


@pytest.mark.sim
@pytest.mark.parametrize("pattern", ["bars", "grid", "edges", "checker", "gradient"])
@pytest.mark.parametrize("engine", ["icarus", "ghdl"])
def test_png_equals_definition(engine: str, pattern: str, tmp_path: Path,
                               need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(engine)
    _check(SMALL, pattern, engine, tmp_path)


@pytest.mark.parametrize("pattern", ["bars", "grid", "edges", "checker", "gradient"])
@pytest.mark.parametrize("engine", ["builtin", "model"])
def test_png_without_hdl_simulator(engine: str, pattern: str, tmp_path: Path) -> None:
    """builtin: the Amaranth model of the design; model: the pins from the timing model."""
    if engine == "builtin":
        pytest.importorskip("amaranth")
    _check(SMALL, pattern, engine, tmp_path)
    _check(SMALL + "core: {lead: 3, clock_enable: true}\n", pattern, engine, tmp_path / "lead3")


@pytest.mark.sim
@pytest.mark.parametrize("engine", ["icarus", "ghdl"])
def test_lead_and_clock_enable_variants(engine: str, tmp_path: Path,
                                        need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(engine)
    text = SMALL + "core: {lead: 3, clock_enable: true, reset: sync_low}\nports: {prefix: lcd_}\n"
    _check(text, "bars", engine, tmp_path)
    text = SMALL + "core: {lead: 1}\n"
    _check(text, "edges", engine, tmp_path / "lead1")


@pytest.mark.sim
def test_png_on_verilator(tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    need_tool("verilator")
    _check(SMALL, "bars", "verilator", tmp_path)


@pytest.mark.sim
def test_standard_mode_on_icarus_is_named_and_pictured(tmp_path: Path,
                                                       need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    """The one larger run: DMT 640x480@60 (DMT ID 04h), placed by the syncs and the mode's porches."""
    need_tool("icarus")
    spec = synccore.loads('name: vga\nstandard: "DMT 0x04"\n')
    mon = watch(simulate(spec, "edges", engine="icarus", work_dir=tmp_path))
    assert mon.problems == []
    assert mon.mode is not None and mon.mode.name.startswith("640x480")
    assert mon.placed_by.startswith("the syncs")
    assert mon.image is not None
    assert np.array_equal(np.asarray(mon.image), np.asarray(expected_image("edges", 640, 480)))


@pytest.mark.sim
def test_view_cli_on_ghdl(tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    from click.testing import CliRunner

    from synccore.cli.main import main

    need_tool("ghdl")
    spec = tmp_path / "small.yaml"
    spec.write_text(SMALL)
    out = tmp_path / "seen.png"
    result = CliRunner().invoke(main, ["view", str(spec), "--sim", "ghdl", "--pattern", "grid",
                                       "-o", str(out), "--work-dir", str(tmp_path / "run")])  # fmt: skip
    assert result.exit_code == 0, result.output
    # A made-up timing that matches no library mode: the caution is a panel's, not VGA's.
    assert "no standard mode" in result.output and "Hardware (LCD panel)" in result.output
    got = np.asarray(Image.open(out).convert("RGB"))
    assert np.array_equal(got, np.asarray(expected_image("grid", 100, 50)))


# ---------------------------------------------------------------------------------------
# Several pixels per clock: the pins carry N pixels a cycle, the reader spreads them out.
# ---------------------------------------------------------------------------------------
WIDE = (
    "name: wide\n"
    "pixel_clock_hz: 2 MHz\n"
    "horizontal: {active: 120, front_porch: 8, sync: 16, back_porch: 16, sync_polarity: negative}\n"
    "vertical: {active: 40, front_porch: 2, sync: 2, back_porch: 4, sync_polarity: positive}\n"
    "color: {red: 3, green: 3, blue: 2}\n"
)  # a made-up small timing whose figures divide by 8; 120 columns put the bar edges
# (15, 30, 45, ...) and the last column (119) inside a group of 2, 4 or 8 pixels


def _wide(ppc: int, extra: str = "") -> str:
    return WIDE + f"core: {{pixels_per_clock: {ppc}{extra}}}\n"


@pytest.mark.sim
@pytest.mark.parametrize("pattern", ["bars", "grid", "edges", "checker", "gradient"])
@pytest.mark.parametrize("ppc", [2, 4])
@pytest.mark.parametrize("engine", ["icarus", "ghdl"])
def test_png_at_several_pixels_per_clock(engine: str, ppc: int, pattern: str, tmp_path: Path,
                                         need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(engine)
    _check(_wide(ppc), pattern, engine, tmp_path)


@pytest.mark.sim
@pytest.mark.parametrize("engine", ["icarus", "ghdl"])
def test_lead_and_clock_enable_at_several_pixels_per_clock(
    engine: str, tmp_path: Path, need_tool: Callable[[str], Tool]
) -> None:
    need_tool(engine)
    _check(_wide(8, ", lead: 3, clock_enable: true, reset: async_low"), "bars", engine, tmp_path)
    _check(_wide(4, ", lead: 1") + "ports: {prefix: lcd_}\n", "edges", engine, tmp_path / "lead1")


@pytest.mark.sim
@pytest.mark.parametrize("ppc, pattern", [(2, "checker"), (4, "bars")])
def test_png_at_several_pixels_per_clock_on_verilator(ppc: int, pattern: str, tmp_path: Path,
                                                      need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("verilator")
    _check(_wide(ppc), pattern, "verilator", tmp_path)


@pytest.mark.parametrize("pattern", ["bars", "grid", "edges", "checker", "gradient"])
@pytest.mark.parametrize("ppc", [2, 4, 8])
@pytest.mark.parametrize("engine", ["builtin", "model"])
def test_png_at_several_pixels_per_clock_without_hdl_simulator(engine: str, ppc: int, pattern: str,
                                                               tmp_path: Path) -> None:  # fmt: skip
    if engine == "builtin":
        pytest.importorskip("amaranth")
    _check(_wide(ppc), pattern, engine, tmp_path)
    _check(_wide(ppc, ", lead: 3, clock_enable: true"), pattern, engine, tmp_path / "lead3")


@pytest.mark.parametrize("ppc, scale", [(4, 2), (2, 4), (8, 2)])
@pytest.mark.parametrize("engine", [pytest.param("icarus", marks=pytest.mark.sim),
                                    pytest.param("ghdl", marks=pytest.mark.sim), "builtin", "model"])
def test_scaled_picture_at_several_pixels_per_clock(engine: str, ppc: int, scale: int, tmp_path: Path,
                                                    need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    """Each picture pixel covers scale x scale signal pixels, whether a cycle holds 1, 2 or 4 of them."""
    if engine == "builtin":
        pytest.importorskip("amaranth")
    elif engine != "model":
        need_tool(engine)
    # 120 / 2 = 60 and 120 / 4 = 30 picture columns are too few for the design at scale 4 (32):
    # this raster is 160 x 128, giving 80 x 64 or 40 x 32 picture pixels.
    text = WIDE.replace("active: 120", "active: 160").replace("active: 40", "active: 128")
    spec = synccore.loads(text + f"core: {{pixels_per_clock: {ppc}, scale: {scale}, lead: 1}}\n")
    mon = watch(simulate(spec, "grid", engine=engine, work_dir=tmp_path))
    assert mon.problems == [] and mon.image is not None
    w, h = 160 // scale, 128 // scale
    want = expected_image("grid", w, h).resize((160, 128), Image.Resampling.NEAREST)
    assert np.array_equal(np.asarray(mon.image), np.asarray(want))


def test_reader_spreads_each_cycle_over_its_pixels() -> None:
    """Two cycles of a 2-pixel bench record become four pixel periods, pixel 0 first."""
    from synccore.picture.run import ViewError, read_screen

    text = "0 1 0 1 7 6 3 1 2 0\n1 0 1 0 0 0 0 0 0 0\nend 2\n"  # written here by hand
    pins = read_screen(text, period_s=1e-8, bits=(3, 3, 2), pixels_per_clock=2)
    assert pins.hsync.tolist() == [1, 1, 0, 0] and pins.vsync.tolist() == [0, 0, 1, 1]
    assert pins.de is not None and pins.de.tolist() == [1, 1, 0, 0]
    assert (pins.red.tolist(), pins.green.tolist(), pins.blue.tolist()) == ([7, 1, 0, 0], [6, 2, 0, 0],
                                                                            [3, 0, 0, 0])  # fmt: skip
    with pytest.raises(ViewError, match="has 8 values, expected 9 for 2 pixel"):
        read_screen("0 1 0 1 7 6 3 1 2\nend 1\n", period_s=1e-8, bits=(3, 3, 2), pixels_per_clock=2)
