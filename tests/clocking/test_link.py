"""DVI link clock plans: both clocks from one PLL, every divider legal, errors by hand.

Boards as they come: ECP5 25 MHz, iCE40 12 MHz, Gowin 27 MHz, 7 series 100 MHz, Cyclone
50 MHz.  Rasters: VESA DMT 640x480@60 (DMT 04h, 25.175 MHz), 800x600@60 (DMT 09h,
40 MHz) and 1280x720@60 (CTA-861 VIC 4, 74.25 MHz) (from memory, as in the library).
"""

from __future__ import annotations

import json
from fractions import Fraction
from pathlib import Path

import pytest
from click.testing import CliRunner

from synccore import loads
from synccore.cli.main import main
from synccore.clocking.link import SERIAL_FACTOR, link_problems, plan_link
from synccore.clocking.link_io import CORE_TAPS
from synccore.errors import SpecError

MHZ = 10**6
BOARD = {"ecp5": 25, "ice40": 12, "gowin": 27, "xc7-mmcm": 100, "xc7-pll": 100, "cyclone": 50}
SPECS = {
    "640": "name: vga\nstandard: DMT 04h\ncore: {clock_enable: true}\n",
    "800": "name: svga\nstandard: DMT 09h\ncore: {clock_enable: true}\n",
    "720": "name: hd\nstandard: CTA VIC 4\ncore: {clock_enable: true}\n",
}
PIXEL = {"640": Fraction("25.175") * MHZ, "800": Fraction(40 * MHZ), "720": Fraction("74.25") * MHZ}

# (raster, family): the serial clock the best setting reaches, by hand computation from
# the family's formula (families.py), and the counters that give it.
HAND = {
    # ECP5, f = 25 MHz * CLKFB_DIV / CLKI_DIV (PFD >= 10 MHz allows CLKI_DIV 1 or 2)
    ("640", "ecp5"): (Fraction(25 * 5, 1) * MHZ, {"CLKI_DIV": 1, "CLKFB_DIV": 5, "CLKOP_DIV": 6}),
    ("800", "ecp5"): (Fraction(25 * 8) * MHZ, {"CLKI_DIV": 1, "CLKFB_DIV": 8, "CLKOP_DIV": 4}),
    ("720", "ecp5"): (Fraction(25 * 15) * MHZ, {"CLKI_DIV": 1, "CLKFB_DIV": 15, "CLKOP_DIV": 2}),
    # iCE40, f = 12 MHz * (DIVF + 1) / ((DIVR + 1) * 2**DIVQ)
    ("640", "ice40"): (Fraction(12 * 84, 8) * MHZ, {"DIVR": 0, "DIVF": 83, "DIVQ": 3}),
    ("800", "ice40"): (Fraction(12 * 67, 4) * MHZ, {"DIVR": 0, "DIVF": 66, "DIVQ": 2}),
    ("720", "ice40"): (Fraction(12 * 45, 2) * MHZ, {"DIVR": 0, "DIVF": 44, "DIVQ": 1}),
    # Gowin, f = 27 MHz * (FBDIV_SEL + 1) / (IDIV_SEL + 1)
    ("640", "gowin"): (Fraction(27 * 14, 3) * MHZ, {"IDIV_SEL": 2, "FBDIV_SEL": 13, "ODIV_SEL": 8}),
    ("800", "gowin"): (Fraction(27 * 37, 5) * MHZ, {"IDIV_SEL": 4, "FBDIV_SEL": 36, "ODIV_SEL": 4}),
    ("720", "gowin"): (Fraction(27 * 55, 4) * MHZ, {"IDIV_SEL": 3, "FBDIV_SEL": 54, "ODIV_SEL": 2}),
    # MMCM, f = 100 MHz * CLKFBOUT_MULT_F / (DIVCLK_DIVIDE * CLKOUT0_DIVIDE_F)
    ("640", "xc7-mmcm"): (Fraction(100 * Fraction("17.625"), 2 * 7) * MHZ,
                          {"DIVCLK_DIVIDE": 2, "CLKFBOUT_MULT_F": Fraction("17.625"),
                           "CLKOUT0_DIVIDE_F": 7}),
    ("800", "xc7-mmcm"): (Fraction(100 * 12, 6) * MHZ,
                          {"DIVCLK_DIVIDE": 1, "CLKFBOUT_MULT_F": 12, "CLKOUT0_DIVIDE_F": 6}),
    ("720", "xc7-mmcm"): (Fraction(100 * Fraction("37.125"), 5 * 2) * MHZ,
                          {"DIVCLK_DIVIDE": 5, "CLKFBOUT_MULT_F": Fraction("37.125"),
                           "CLKOUT0_DIVIDE_F": 2}),
    # PLLE2, f = 100 MHz * CLKFBOUT_MULT / (DIVCLK_DIVIDE * CLKOUT0_DIVIDE)
    ("640", "xc7-pll"): (Fraction(100 * 34, 3 * 9) * MHZ,
                         {"DIVCLK_DIVIDE": 3, "CLKFBOUT_MULT": 34, "CLKOUT0_DIVIDE": 9}),
    ("800", "xc7-pll"): (Fraction(100 * 16, 8) * MHZ,
                         {"DIVCLK_DIVIDE": 1, "CLKFBOUT_MULT": 16, "CLKOUT0_DIVIDE": 8}),
    ("720", "xc7-pll"): (Fraction(100 * 56, 5 * 3) * MHZ,
                         {"DIVCLK_DIVIDE": 5, "CLKFBOUT_MULT": 56, "CLKOUT0_DIVIDE": 3}),
    # Cyclone IV, f = 50 MHz * M / (N * C0)
    ("640", "cyclone"): (Fraction(50 * 141, 7 * 8) * MHZ, {"N": 7, "M": 141, "C0": 8}),
    ("800", "cyclone"): (Fraction(50 * 24, 6) * MHZ, {"N": 1, "M": 24, "C0": 6}),
    ("720", "cyclone"): (Fraction(50 * 156, 7 * 3) * MHZ, {"N": 7, "M": 156, "C0": 3}),
}

# The pixel clock's error in ppm, hand computation: (serial / 5 - pixel) / pixel * 1e6.
# 640: ECP5 25/25.175 - 1 = -6951.3; iCE40 and Gowin 25.2/25.175 - 1 = +993.0;
# MMCM and Cyclone (125.892857/5)/25.175 - 1 = +141.9; PLLE2 (125.925926/5)/25.175 - 1 = +404.6.
# 800: iCE40 40.2/40 - 1 = +5000 (exactly the 0.5 % edge); Gowin 39.96/40 - 1 = -1000.
# 720: ECP5 75/74.25 - 1 = +10101.0; iCE40 54/74.25 - 1 = -272727.3; PLLE2 74.6667/74.25 - 1
# = +5611.7; Cyclone 74.285714/74.25 - 1 = +481.0.
HAND_PPM = {
    ("640", "ecp5"): -6951.3, ("640", "ice40"): 993.0, ("640", "gowin"): 993.0,
    ("640", "xc7-mmcm"): 141.9, ("640", "xc7-pll"): 404.6, ("640", "cyclone"): 141.9,
    ("800", "ice40"): 5000.0, ("800", "gowin"): -1000.0,
    ("720", "ecp5"): 10101.0, ("720", "ice40"): -272727.3, ("720", "xc7-pll"): 5611.7,
    ("720", "cyclone"): 481.0,
}  # fmt: skip


def plan(raster: str, key: str):  # type: ignore[no-untyped-def]
    return plan_link(loads(SPECS[raster]), f_board=Fraction(BOARD[key] * MHZ), family=key)


@pytest.mark.parametrize(("raster", "key"), sorted(HAND))
def test_planned_clocks(raster: str, key: str) -> None:
    p = plan(raster, key)
    s = p.setting
    assert s is not None and s.legal()
    serial, counters = HAND[(raster, key)]
    assert s.f_out == serial and p.serial_hz == serial
    assert s.counters() == counters
    # serial = 5 x pixel exactly; core = pixel / ppc
    assert p.pixel_hz is not None and p.serial_hz == SERIAL_FACTOR * p.pixel_hz
    assert p.core_hz == p.pixel_hz
    tap = CORE_TAPS[key]
    if tap.kind == "output":  # both outputs divide the same VCO
        assert p.core_divider in tap.ratios
        assert p.core_hz == s.f_vco / p.core_divider
        assert p.family.output_range.holds(p.core_hz)
    expected_ppm = HAND_PPM.get((raster, key), 0.0)
    assert p.ppm is not None and float(p.ppm) == pytest.approx(expected_ppm, abs=0.05)
    assert p.within_tolerance == (abs(expected_ppm) <= 5000)
    assert p.bit_rate_hz == 10 * PIXEL[raster]


def test_ecp5_core_divider_stays_legal_at_8_pixels_per_clock() -> None:
    # CLKOS_DIV = CLKOP_DIV * 40 <= 128 leaves CLKOP_DIV <= 3: the search keeps to those,
    # where the unconstrained best for 200 MHz is CLKOP_DIV = 4 (VCO 800 MHz).
    text = SPECS["800"].replace("{clock_enable: true}", "{pixels_per_clock: 8}")
    p = plan_link(loads(text), f_board=Fraction(25 * MHZ), family="ecp5")
    assert plan("800", "ecp5").setting.output_ratio == 4  # type: ignore[union-attr]
    assert p.setting is not None and p.setting.output_ratio == 3
    assert p.serial_hz == 200 * MHZ and p.ppm == 0
    assert p.core_divider is not None and p.core_divider <= 128
    assert p.core_hz is not None and p.serial_hz == p.core_hz * 40


def test_1080p_on_ecp5_exceeds_the_io_rating_with_suggestions() -> None:
    p = plan_link(loads("name: fhd\nstandard: CTA VIC 16\n"), f_board=Fraction(25 * MHZ),
                  family="ecp5")  # fmt: skip
    assert p.bit_rate_hz == 1485 * MHZ  # 148.5 MHz x 10 (CTA-861 VIC 16, from memory)
    assert not p.fits_io and not p.ok
    assert p.suggestions and all(isinstance(n, str) for n in p.suggestions)
    # every suggestion fits the rating: 800x600@75 is 49.5 MHz (DMT 0Bh, from memory)
    assert p.suggestions[0] == "800x600@75"


def test_same_size_at_lower_refresh_comes_first() -> None:
    # 720p60 on Cyclone C8 (640 Mbit/s): 1280x720@24 (59.4 MHz, CTA VIC 60) fits first
    p = plan("720", "cyclone")
    assert not p.fits_io and p.suggestions[0] == "1280x720@24"


def test_ppc_refused_on_gowin_and_xc7() -> None:
    text = SPECS["720"].replace("{clock_enable: true}", "{pixels_per_clock: 2}")
    for key in ("gowin", "xc7-mmcm", "xc7-pll"):
        with pytest.raises(SpecError, match=r"core.pixels_per_clock: must be 1 for a DVI link "
                                            rf"on {key} \(its 10:1 serialiser"):  # fmt: skip
            plan_link(loads(text), f_board=Fraction(BOARD[key] * MHZ), family=key)


def test_ice40_needs_clock_enable_as_a_located_problem() -> None:
    spec = loads("name: vga\nstandard: DMT 04h\ncore: {clock_enable: false}\n")
    problems = link_problems(spec, "ice40")
    assert len(problems) == 1 and problems[0].location is not None
    assert str(problems[0]) == (
        "<string>:3:22: core.clock_enable: must be true for a DVI link on ice40 (the core runs "
        "on the 125.875 MHz serial clock and advances on a ce one cycle in 5), got false")
    p = plan_link(spec, f_board=Fraction(12 * MHZ), family="ice40")
    assert p.problems == tuple(problems) and not p.ok
    assert link_problems(spec, "ecp5") == []


def test_cli_prints_and_json_parses(tmp_path: Path) -> None:
    path = tmp_path / "fhd.yaml"
    path.write_text("name: fhd\nstandard: CTA VIC 16\n")
    args = ["clock", str(path), "--link", "dvi", "--board-clock", "25MHz", "--family", "ecp5"]
    r = CliRunner().invoke(main, args)
    assert r.exit_code == 0, r.output
    assert "1920x1080@60 needs 1.485 Gbit/s per lane; ecp5 ODDRX1F" in r.output
    assert "EXCEEDS" in r.output and "modes that fit" in r.output
    r = CliRunner().invoke(main, [*args, "--json"])
    data = json.loads(r.output)
    assert data["fits_io"] is False and data["bit_rate_per_lane"] == 1485 * MHZ
    assert data["suggestions"][0] == "800x600@75"


def test_cli_refuses_ppc_in_one_line(tmp_path: Path) -> None:
    path = tmp_path / "p.yaml"
    path.write_text("name: hd\nstandard: CTA VIC 4\ncore: {pixels_per_clock: 2}\n")
    r = CliRunner().invoke(main, ["clock", str(path), "--link", "dvi", "--board-clock",
                                  "27MHz", "--family", "gowin"])  # fmt: skip
    assert r.exit_code == 2
    assert r.output.strip().endswith("core.pixels_per_clock: must be 1 for a DVI link on gowin "
                                     "(its 10:1 serialiser takes one 10-bit symbol per pixel "
                                     "clock), got 2")  # fmt: skip
