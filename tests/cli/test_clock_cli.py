"""The clock command, build --clock, the board section of the spec, and the porch adjustment."""

from __future__ import annotations

import json
import re
from fractions import Fraction
from pathlib import Path

import pytest
from click.testing import CliRunner

from synccore import __version__, loads
from synccore.cli.main import main
from synccore.clocking import FAMILIES, FAMILY_KEYS
from synccore.clocking.plan import make_plan
from synccore.spec.schema import json_schema

MHZ = 10**6

# VESA DMT 640x480@60 (DMT ID 04h, as reproduced in the Linux kernel's drm_dmt_modes[],
# drivers/gpu/drm/drm_edid.c): 25.175 MHz, 800 x 525 total, both syncs negative.
DMT_640 = """\
name: vga
pixel_clock_hz: 25.175 MHz
horizontal: {active: 640, front_porch: 16, sync: 96, back_porch: 48, sync_polarity: negative}
vertical: {active: 480, front_porch: 10, sync: 2, back_porch: 33, sync_polarity: negative}
"""
DMT_640_PIXEL_HZ = Fraction("25.175") * MHZ
DMT_640_REFRESH_HZ = DMT_640_PIXEL_HZ / (800 * 525)


def write(tmp_path: Path, text: str, name: str = "vga.yaml") -> str:
    path = tmp_path / name
    path.write_text(text)
    return str(path)


def run(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.stdout, result.stderr


# ------------------------------------------------------------------ the spec


def test_board_section_is_read() -> None:
    spec = loads(DMT_640 + "board: {clock_hz: 12 MHz, family: ice40}\n")
    assert spec.board.clock_hz == 12 * MHZ and spec.board.family == "ice40"
    assert loads(DMT_640).board.clock_hz is None


def test_board_family_must_be_known() -> None:
    with pytest.raises(Exception) as err:
        loads(DMT_640 + "board: {clock_hz: 12 MHz, family: ice41}\n")
    assert re.fullmatch(
        r"<string>:5:35: board\.family: must be one of ice40, ecp5, xc7-mmcm, xc7-pll, gowin, "
        r"cyclone, got 'ice41' \(did you mean 'ice40'\?\)",
        str(err.value),
    )


def test_schema_lists_the_board_section() -> None:
    board = json_schema()["properties"]["board"]
    assert set(board["properties"]) == {"clock_hz", "family"}
    assert board["properties"]["family"]["enum"] == list(FAMILY_KEYS)


# ------------------------------------------------------------ the 0.7 % check


def test_clock_reports_640x480_at_25_000_mhz_as_0_7_percent_slow(tmp_path: Path) -> None:
    spec = write(tmp_path, DMT_640)
    code, out, _ = run("clock", spec, "--board-clock", "100MHz", "--no-pll", "--json")
    assert code == 0
    data = json.loads(out)
    assert data["best"] == {"route": "clock_enable", "divide": 4, "reached_hz": 25_000_000,
                            "error_ppm": data["best"]["error_ppm"]}  # fmt: skip
    # common practice: 0.7 % slow; VESA DMT allows ±0.5 % (from memory)
    assert round(data["best"]["error_ppm"] / 10**4, 1) == -0.7
    assert data["within_tolerance"] is False
    assert data["refresh_hz"] == pytest.approx(25e6 / (800 * 525))
    code, out, _ = run("clock", spec, "--board-clock", "100MHz", "--no-pll")
    assert re.search(
        r"^pixel clock reached\s+25\.000 MHz \(-6951\.3 ppm, -0\.695 %\)\s*$", out, re.M
    )
    assert re.search(r"OUTSIDE\s*$", out, re.M)
    assert "No setting is within +/-0.5 % of the pixel clock." in out


def test_family_with_no_pll_is_refused_not_dropped(tmp_path: Path) -> None:
    spec = write(tmp_path, DMT_640)
    code, out, err = run("clock", spec, "--board-clock", "100MHz", "--no-pll", "--family", "ice40")
    assert code != 0 and out == ""
    assert err.strip() == ("--family: ice40 cannot go with --no-pll (the clock-enable "
                           "route uses no PLL); pass one or the other")  # fmt: skip


def test_adjustment_keeps_refresh_on_target(tmp_path: Path) -> None:
    """From 25 MHz no route reaches 25.175 MHz; a shorter line at 25.000 MHz keeps ~59.94 Hz."""
    spec = loads(DMT_640)
    plan = make_plan(spec, f_board=Fraction(25 * MHZ), family=None)
    adj = plan.adjustment
    assert adj is not None
    h = spec.horizontal
    # only the front porch moves: back porch, sync and the vertical axis as they were
    assert (adj.horizontal.sync, adj.horizontal.back_porch) == (h.sync, h.back_porch)
    assert adj.vertical == spec.vertical
    reached = adj.route.f_out / (adj.h_total * 525)
    assert reached == adj.refresh_hz
    # a whole number of pixels per line: refresh lands within half a pixel of a line (~0.06 %)
    assert abs(reached - DMT_640_REFRESH_HZ) / DMT_640_REFRESH_HZ <= Fraction(1, 2 * adj.h_total)
    assert adj.h_total == 794  # 25.000 MHz / (59.94 Hz x 525 lines) = 794.4 pixels
    assert adj.horizontal.front_porch == 16 - (800 - 794)


def test_within_tolerance_offers_no_adjustment() -> None:
    plan = make_plan(loads(DMT_640), f_board=Fraction(12 * MHZ), family=FAMILIES["ice40"])
    assert plan.within_tolerance and plan.adjustment is None


# --------------------------------------------------------------- the command


def test_clock_json_names_every_divider(tmp_path: Path) -> None:
    spec = write(tmp_path, DMT_640 + "board: {clock_hz: 12 MHz, family: ice40}\n")
    code, out, _ = run("clock", spec, "--json")
    assert code == 0
    data = json.loads(out)
    assert data["family"] == "ice40" and data["input_clock_hz"] == 12 * MHZ
    best = data["best"]
    assert set(best["parameters"]) == {"DIVR", "DIVF", "DIVQ", "FILTER_RANGE"}
    # reached = f_in * (DIVF + 1) / ((DIVR + 1) * 2**DIVQ)   (TN1251, from memory)
    p = best["parameters"]
    reached = Fraction(12 * MHZ) * (p["DIVF"] + 1) / ((p["DIVR"] + 1) * 2 ** p["DIVQ"])
    assert best["reached_hz"] == reached
    assert best["vco_hz"] == Fraction(12 * MHZ) * (p["DIVF"] + 1) / (p["DIVR"] + 1)
    assert len(data["runners_up"]) == 3
    assert data["refresh_hz"] == pytest.approx(float(reached / (800 * 525)))


@pytest.mark.parametrize("key", FAMILY_KEYS)
def test_clock_json_for_every_family(tmp_path: Path, key: str) -> None:
    spec = write(tmp_path, DMT_640)
    code, out, _ = run("clock", spec, "--board-clock", "27 MHz", "--family", key, "--json")
    assert code == 0
    data = json.loads(out)
    fam = FAMILIES[key]
    assert data["family"] == key and data["best"]["primitive"] == fam.primitive
    names = {fam.input_divider.param, fam.multiplier.param, fam.output_divider.param}
    assert set(data["best"]["counters"]) == names


def test_unknown_family_is_one_line(tmp_path: Path) -> None:
    code, out, err = run("clock", write(tmp_path, DMT_640), "--board-clock", "12MHz",
                         "--family", "spartan")  # fmt: skip
    assert code == 2 and out == ""
    assert re.fullmatch(r"--family: unknown FPGA family 'spartan'; choose from ice40, ecp5, "
                        r"xc7-mmcm, xc7-pll, gowin, cyclone\n", err)  # fmt: skip


def test_bad_board_clock_is_one_line(tmp_path: Path) -> None:
    code, _, err = run("clock", write(tmp_path, DMT_640), "--board-clock", "fast")
    assert code == 2
    assert re.fullmatch(r'--board-clock: must be a frequency like "12MHz" or "27 MHz", '
                        r"got 'fast'\n", err)  # fmt: skip


def test_missing_board_clock_is_one_line(tmp_path: Path) -> None:
    code, _, err = run("clock", write(tmp_path, DMT_640))
    assert code == 2
    assert re.fullmatch(r"--board-clock: no board clock given; pass --board-clock or set "
                        r"board\.clock_hz in the spec\n", err)  # fmt: skip


def test_input_outside_the_range_says_so(tmp_path: Path) -> None:
    # PLLE2 input at least 19 MHz (CLKIN_FREQ_MIN in Xilinx's unisim model PLLE2_ADV.v):
    # 12 MHz is too slow
    code, out, _ = run("clock", write(tmp_path, DMT_640), "--board-clock", "12MHz",
                       "--family", "xc7-pll")  # fmt: skip
    assert code == 0
    assert re.search(r"^setting\s+none: the board clock is outside the PLLE2_BASE input range "
                     r"19\.000 MHz to 800\.000 MHz", out, re.M)  # fmt: skip


def test_core_clock_with_pixels_per_clock(tmp_path: Path) -> None:
    text = DMT_640.replace("name: vga\n", "name: vga\ncore: {pixels_per_clock: 2}\n")
    code, out, _ = run("clock", write(tmp_path, text), "--board-clock", "25MHz", "--family",
                       "xc7-mmcm", "--json")  # fmt: skip
    data = json.loads(out)
    assert data["core_clock_hz"] == pytest.approx(25.175e6 / 2)
    assert abs(data["best"]["reached_hz"] - 25.175e6 / 2) < 25.175e6 / 2 * 0.005


# ------------------------------------------------------------------- build


def test_build_clock_writes_wrapper_and_constraints(tmp_path: Path) -> None:
    spec = write(tmp_path, DMT_640 + "board: {clock_hz: 12 MHz, family: ice40}\n")
    out = tmp_path / "out"
    code, _, err = run("build", spec, "-o", str(out), "--clock")
    assert code == 0, err
    assert sorted(p.name for p in out.iterdir()) == [".synccore-manifest.json", "vga.v", "vga.vhd",
                                                     "vga_clock.sdc", "vga_clock.v", "vga_clock.vhd"]
    sdc = (out / "vga_clock.sdc").read_text()
    assert "create_clock -name board_clk -period 83.333 [get_ports {clk_in}]" in sdc
    assert re.search(r"^create_clock -name core_clk -period [0-9.]+ \[get_nets \{clk\}\]$", sdc,
                     re.M)  # fmt: skip
    text = (out / "vga_clock.v").read_text()
    assert "SB_PLL40_CORE #(" in text and '.FEEDBACK_PATH("SIMPLE")' in text


def test_build_clock_xdc_for_xilinx(tmp_path: Path) -> None:
    spec = write(tmp_path, DMT_640)
    out = tmp_path / "out"
    code, _, err = run("build", spec, "-o", str(out), "--clock", "--board-clock", "100MHz",
                       "--family", "xc7-mmcm")  # fmt: skip
    assert code == 0, err
    xdc = (out / "vga_clock.xdc").read_text()
    assert "create_clock -period 10.000 -name board_clk [get_ports clk_in]" in xdc


def test_build_without_board_clock_writes_nothing(tmp_path: Path) -> None:
    out = tmp_path / "out"
    code, _, err = run("build", write(tmp_path, DMT_640), "-o", str(out), "--clock")
    assert code == 2 and not out.exists()
    assert err.startswith("--board-clock: no board clock given")


def test_clock_enable_route_needs_the_ce_input(tmp_path: Path) -> None:
    out = tmp_path / "out"
    # 100.7 MHz / 4 = 25.175 MHz exactly: within tolerance, so only the ce input is missing
    code, _, err = run("build", write(tmp_path, DMT_640), "-o", str(out), "--clock",
                       "--board-clock", "100.7MHz", "--no-pll")  # fmt: skip
    assert code == 2 and not out.exists()
    assert re.fullmatch(r".*/vga\.yaml:1:1: core\.clock_enable: must be true for the clock-enable "
                        r"route \(ce every 4 cycles of 100\.700 MHz\), got false\n", err)  # fmt: skip
    text = DMT_640.replace("name: vga\n", "name: vga\ncore: {clock_enable: true}\n")
    code, _, err = run("build", write(tmp_path, text, "ce.yaml"), "-o", str(out), "--clock",
                       "--board-clock", "100.7MHz", "--no-pll")  # fmt: skip
    assert code == 0, err
    assert "module vga_clock" in (out / "vga_clock.v").read_text()


def test_board_options_need_clock(tmp_path: Path) -> None:
    out = tmp_path / "out"
    code, _, err = run("build", write(tmp_path, DMT_640), "-o", str(out), "--family", "ice40")
    assert code == 2 and not out.exists()
    assert re.fullmatch(r"--board-clock, --family, --no-pll and --accept-clock-error need "
                        r"--clock or --link\n", err)  # fmt: skip


def test_adjustment_through_a_pll_uses_a_legal_setting(tmp_path: Path) -> None:
    """iCE40 from 25 MHz misses 25.175 MHz by 0.7 %; the suggested line length fixes refresh."""
    spec = write(tmp_path, DMT_640)
    code, out, _ = run("clock", spec, "--board-clock", "25MHz", "--family", "ice40", "--json")
    data = json.loads(out)
    assert code == 0 and data["within_tolerance"] is False
    adj = data["adjustment"]
    p = adj["setting"]["parameters"]
    # f_out = f_in * (DIVF + 1) / ((DIVR + 1) * 2**DIVQ) (TN1251, from memory);
    # VCO 533-1066 MHz (DS1040 v3.4, sysCLOCK PLL Timing)
    f_in = Fraction(25 * MHZ)
    vco = f_in * (p["DIVF"] + 1) / (p["DIVR"] + 1)
    assert 533 * MHZ <= vco <= 1066 * MHZ
    reached = vco / 2 ** p["DIVQ"]
    assert adj["setting"]["reached_hz"] == reached == adj["pixel_clock_hz"]
    refresh = reached / (adj["h_total"] * adj["v_total"])
    assert adj["refresh_hz"] == pytest.approx(float(refresh))
    # VESA DMT's ±0.5 % (from memory), on refresh and on line rate
    assert abs(refresh - DMT_640_REFRESH_HZ) / DMT_640_REFRESH_HZ < Fraction(5, 1000)
    assert abs(reached / adj["h_total"] / (DMT_640_PIXEL_HZ / 800) - 1) < Fraction(5, 1000)
    hor = adj["horizontal"]
    assert (hor["active"], hor["sync"], hor["back_porch"]) == (640, 96, 48)
    assert adj["h_total"] == 640 + 96 + 48 + hor["front_porch"]
    assert adj["moved"] == ["horizontal.front_porch"]


def test_board_section_validates_against_the_schema() -> None:
    jsonschema = pytest.importorskip("jsonschema")
    import yaml

    doc = yaml.safe_load(DMT_640 + "board: {clock_hz: 12 MHz, family: gowin}\n")
    jsonschema.validate(doc, json_schema())
    doc["board"]["family"] = "ice41"
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(doc, json_schema())


@pytest.mark.parametrize("key", [*FAMILY_KEYS, None])
def test_clock_files_are_deterministic(tmp_path: Path, key: str | None) -> None:
    """Same input, same text; no absolute paths, no timestamps."""
    from synccore.emit.files import clock_artifacts

    source = write(tmp_path, DMT_640)
    spec = loads(Path(source).read_text(), source=source)
    first = clock_artifacts(make_plan(spec, f_board=Fraction(27 * MHZ),
                                      family=FAMILIES[key] if key else None))  # fmt: skip
    second = clock_artifacts(make_plan(spec, f_board=Fraction(27 * MHZ),
                                       family=FAMILIES[key] if key else None))  # fmt: skip
    assert [a.text for a in first] == [a.text for a in second]
    for a in first:
        assert str(tmp_path) not in a.text
        assert a.text.splitlines()[0].endswith(
            f"Generated by synccore {__version__} from vga.yaml; do not edit, regenerate instead."
        )
        assert a.text.isascii()


def test_slow_board_clock_without_pll_says_a_pll_is_needed(tmp_path: Path) -> None:
    code, out, _ = run("clock", write(tmp_path, DMT_640), "--board-clock", "12MHz")
    assert code == 0
    assert re.search(r"^note\s+the board clock is slower than the core clock: this needs a PLL",
                     out, re.M)  # fmt: skip


# ------------------------------------------------- the advice that is applied

# VESA DMT 800x600@60 (DMT ID 09h), the library's entry, taken from the published table as
# reproduced in the Linux kernel's drm_dmt_modes[]: 40.000 MHz, 1056 x 628 total.
SVGA = """\
name: svga
standard: DMT 09h
core: {reset: sync_low, lead: 1}
ports: {prefix: vga_}
board: {clock_hz: 12 MHz, family: ice40}
color: {red: 3, green: 3, blue: 2}
"""
SVGA_PIXEL_HZ = 40 * MHZ
SVGA_H_TOTAL, SVGA_V_TOTAL = 1056, 628
# iCE40 from 12 MHz: f_out = 12 MHz * (DIVF + 1) / ((DIVR + 1) * 2**DIVQ) (TN1251, from
# memory) moves in steps of 0.75 MHz at DIVQ = 4 (VCO 533-1066 MHz, DS1040): 39.75 MHz is
# the nearest, -0.625 %, outside VESA DMT's +/-0.5 % (from memory).
ICE40_NEAREST_HZ = Fraction(12 * MHZ) * 53 / 16


def test_800x600_from_12mhz_on_ice40_end_to_end(tmp_path: Path) -> None:
    spec = write(tmp_path, SVGA, "svga.yaml")
    out = tmp_path / "out"
    code, _, err = run("build", spec, "-o", str(out), "--clock")
    assert code == 2 and not out.exists()
    fixed_spec = str(tmp_path / "svga_adjusted.yaml")
    assert err == (
        "--clock: the clock reached, 39.750 MHz, is -0.625 % from the pixel clock 40.000 MHz, "
        "outside +/-0.5 %, VESA DMT (from memory); fix it with `synccore clock "
        f"{spec} --board-clock 12MHz --family ice40 --write {fixed_spec}`, then build "
        f"{fixed_spec}; or pass --accept-clock-error\n"
    )
    # the command it names, as it names it
    code, _, err = run("clock", spec, "--board-clock", "12MHz", "--family", "ice40",
                       "--write", fixed_spec)  # fmt: skip
    assert code == 0 and err == f"wrote {fixed_spec} (adjusted from {spec})\n"
    adjusted = loads(Path(fixed_spec).read_text(), source=fixed_spec)
    original = loads(SVGA)
    assert (adjusted.core, adjusted.port_prefix, adjusted.board, adjusted.color) == (
        original.core, original.port_prefix, original.board, original.color)
    # at 39.75 MHz the line that keeps the DMT line rate is 39.75 / 40 x 1056 = 1049.4 pixels
    assert adjusted.pixel_clock_hz == ICE40_NEAREST_HZ
    assert adjusted.horizontal.total == round(ICE40_NEAREST_HZ * SVGA_H_TOTAL / SVGA_PIXEL_HZ)
    assert adjusted.vertical.total == SVGA_V_TOTAL
    for a, o in ((adjusted.horizontal, original.horizontal), (adjusted.vertical, original.vertical)):
        assert (a.active, a.sync, a.back_porch, a.sync_polarity) == (o.active, o.sync,
                                                                     o.back_porch, o.sync_polarity)
    plan = make_plan(adjusted, f_board=Fraction(12 * MHZ), family=FAMILIES["ice40"])
    assert plan.within_tolerance and plan.best is not None and plan.best.error == 0
    refresh = SVGA_PIXEL_HZ / (SVGA_H_TOTAL * SVGA_V_TOTAL)  # 60.317 Hz
    assert abs(plan.refresh_hz / refresh - 1) < Fraction(5, 1000)  # type: ignore[operator]
    text = Path(fixed_spec).read_text()
    assert "outside +/-0.5 %, VESA DMT (from memory)" in text
    assert "within +/-0.5 %, VESA DMT (from memory)" in text
    assert "horizontal.front_porch: 40 -> 33" in text
    assert "Back porches and sync widths kept" in text
    code, _, err = run("build", fixed_spec, "-o", str(out), "--clock")
    assert code == 0, err
    assert "DIVF=52" in (out / "svga_clock.v").read_text()


def test_build_accepts_the_clock_error_when_asked(tmp_path: Path) -> None:
    spec = write(tmp_path, SVGA, "svga.yaml")
    out = tmp_path / "out"
    code, stdout, err = run("build", spec, "-o", str(out), "--clock", "--accept-clock-error")
    assert code == 0, err
    assert "svga_clock.v" in {p.name for p in out.iterdir()}
    assert re.search(r"^tolerance\s+\+/-0\.5 % on the pixel clock, VESA DMT \(from memory\): "
                     r"OUTSIDE", stdout, re.M)  # fmt: skip
    code, _, err = run("build", spec, "-o", str(out), "--accept-clock-error")
    assert code == 2 and "need --clock" in err


def test_write_refuses_an_existing_file_and_a_plan_with_nothing_to_adjust(tmp_path: Path) -> None:
    spec = write(tmp_path, SVGA, "svga.yaml")
    there = tmp_path / "there.yaml"
    there.write_text("# mine\n")
    code, out, err = run("clock", spec, "--write", str(there))
    assert code == 2 and out == "" and there.read_text() == "# mine\n"
    assert err == (f"--write: {there}: exists and was not written by synccore (or was changed since); "
                   "pass --force to overwrite it\n")
    code, _, err = run("clock", spec, "--write", str(there), "--force")
    assert code == 0 and there.read_text().startswith("# Timing description written by")
    # 640x480 from 12 MHz on iCE40 is within tolerance (test_within_tolerance_offers_no_adjustment)
    vga = write(tmp_path, DMT_640, "vga.yaml")
    target = tmp_path / "vga_adjusted.yaml"
    code, _, err = run("clock", vga, "--board-clock", "12MHz", "--family", "ice40",
                       "--write", str(target))  # fmt: skip
    assert code == 2 and not target.exists()
    assert re.fullmatch(r"--write: nothing to adjust: the clock reached, [0-9.]+ MHz, is within "
                        r"\+/-0\.5 % of the pixel clock, VESA DMT \(from memory\)\n", err)  # fmt: skip
    code, _, err = run("clock", vga, "--force")
    assert code == 2 and err == "--force needs --write\n"


def test_write_refuses_when_no_adjustment_lands_within_tolerance(tmp_path: Path) -> None:
    from tests.clocking.test_adjust import PANEL_AT_ITS_MAXIMUM

    spec = write(tmp_path, PANEL_AT_ITS_MAXIMUM, "panel.yaml")
    target = tmp_path / "panel_adjusted.yaml"
    # ECP5 from 25 MHz reaches only 25 or 37.5 MHz near 35 (test_adjust.py says why)
    code, _, err = run("clock", spec, "--board-clock", "25MHz", "--family", "ecp5",
                       "--write", str(target))  # fmt: skip
    assert code == 2 and not target.exists()
    assert re.fullmatch(r"--write: no adjustment: the clock reached, [0-9.]+ MHz, is [-+0-9.]+ % "
                        r"from the pixel clock 35\.000 MHz, outside \+/-0\.5 %, VESA DMT \(from "
                        r"memory\), and no raster within the datasheet ranges brings refresh "
                        r"within it; try another board clock or family\n", err)  # fmt: skip
    out = tmp_path / "out"
    code, _, err = run("build", spec, "-o", str(out), "--clock", "--board-clock", "25MHz",
                       "--family", "ecp5")  # fmt: skip
    assert code == 2 and not out.exists()
    assert "no blanking adjustment brings it within tolerance either" in err
    assert err.endswith("choose another board clock or family, or pass --accept-clock-error\n")


def test_a_panel_adjustment_is_written_inside_its_datasheet(tmp_path: Path) -> None:
    from tests.clocking.test_adjust import PANEL_AT_ITS_MAXIMUM

    spec = write(tmp_path, PANEL_AT_ITS_MAXIMUM, "panel.yaml")
    target = tmp_path / "panel_adjusted.yaml"
    code, _, err = run("clock", spec, "--board-clock", "27MHz", "--family", "gowin",
                       "--write", str(target))  # fmt: skip
    assert code == 0, err
    text = target.read_text()
    assert "Datasheet ranges of the input spec, all kept" in text
    adjusted = loads(text)
    # the made-up datasheet's minimums (front porch 16, back porch 40) and clock maximum
    assert adjusted.horizontal.front_porch >= 16 and adjusted.horizontal.back_porch >= 40
    assert adjusted.pixel_clock_hz <= 35 * MHZ
    plan = make_plan(adjusted, f_board=Fraction(27 * MHZ), family=FAMILIES["gowin"])
    assert plan.within_tolerance
