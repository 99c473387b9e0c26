"""``synccore clock A B ...``: several modes planned together from one board clock."""

from __future__ import annotations

import json
import re
from pathlib import Path

from click.testing import CliRunner

from synccore.cli.main import main

MHZ = 10**6

# CTA-861 video formats (from memory):
# VIC 4 1280x720@60 74.25 MHz 1280/1390/1430/1650 720/725/730/750 +/+;
# VIC 16 1920x1080@60 148.5 MHz 1920/2008/2052/2200 1080/1084/1089/1125 +/+.
HD720 = """\
name: hd720
pixel_clock_hz: 74.25 MHz
horizontal: {active: 1280, front_porch: 110, sync: 40, back_porch: 220, sync_polarity: positive}
vertical: {active: 720, front_porch: 5, sync: 5, back_porch: 20, sync_polarity: positive}
core: {clock_enable: true}
"""
HD1080 = """\
name: hd1080
pixel_clock_hz: 148.5 MHz
horizontal: {active: 1920, front_porch: 88, sync: 44, back_porch: 148, sync_polarity: positive}
vertical: {active: 1080, front_porch: 4, sync: 5, back_porch: 36, sync_polarity: positive}
"""
# VESA DMT 1.0 rev. 13 (from memory): 09h 800x600@60 40.000 MHz
# 800/840/968/1056 600/601/605/628 +/+; 10h 1024x768@60 65.000 MHz 1024/1048/1184/1344
# 768/771/777/806 -/-.
SVGA = """\
name: svga
pixel_clock_hz: 40 MHz
horizontal: {active: 800, front_porch: 40, sync: 128, back_porch: 88, sync_polarity: positive}
vertical: {active: 600, front_porch: 1, sync: 4, back_porch: 23, sync_polarity: positive}
"""
XGA = """\
name: xga
pixel_clock_hz: 65 MHz
horizontal: {active: 1024, front_porch: 24, sync: 136, back_porch: 160, sync_polarity: negative}
vertical: {active: 768, front_porch: 3, sync: 6, back_porch: 29, sync_polarity: negative}
"""


def write(tmp_path: Path, **texts: str) -> list[str]:
    paths = []
    for name, text in texts.items():
        path = tmp_path / f"{name}.yaml"
        path.write_text(text)
        paths.append(str(path))
    return paths


def run(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.stdout, result.stderr


def one_line_error(args: list[str], pattern: str) -> None:
    code, out, err = run(*args)
    assert code == 2 and out == "", (code, out, err)
    assert re.fullmatch(pattern + r"\n", err), err


def test_two_cta_modes_share_one_pll_output(tmp_path: Path) -> None:
    # 148.5 MHz = 27 MHz x 22 / 4 on iCE40 (VCO 594 MHz; TN1251's formula, from memory);
    # 148.5 / 2 = 74.25: divides 2 and 1, no error.
    specs = write(tmp_path, hd720=HD720, hd1080=HD1080)
    code, out, err = run("clock", *specs, "--board-clock", "27MHz", "--family", "ice40")
    assert code == 0 and err == ""
    lines = out.splitlines()
    header = next(i for i, line in enumerate(lines) if line.startswith("mode "))
    assert lines[header].split() == ["mode", "pixel", "clock", "wanted", "reached", "error",
                                     "divide", "tolerance", "within"]  # fmt: skip
    assert lines[header + 1].split() == ["hd720", "74.250", "MHz", "74.250", "MHz", "0.000", "%",
                                         "2", "+/-0.5", "%", "yes"]  # fmt: skip
    assert lines[header + 2].split() == ["hd1080", "148.500", "MHz", "148.500", "MHz", "0.000",
                                         "%", "1", "+/-0.5", "%", "yes"]  # fmt: skip
    assert re.search(r"^verdict +one PLL configuration serves every mode: one PLL output, "
                     r"148\.500 MHz", out, re.M)  # fmt: skip
    assert re.search(r"^setting +DIVR=0 DIVF=21 DIVQ=2 ", out, re.M)
    # hd1080 has no ce input, but it is not divided: no note for it
    assert "core.clock_enable" not in out


def test_json(tmp_path: Path) -> None:
    specs = write(tmp_path, hd720=HD720, hd1080=HD1080)
    code, out, _ = run("clock", *specs, "--board-clock", "27MHz", "--family", "ecp5", "--json")
    assert code == 0
    data = json.loads(out)
    assert data["verdict"] == "common" and data["family"] == "ecp5"
    assert data["board_clock_hz"] == 27 * MHZ
    # ECP5 with feedback from CLKOP: 27 / 2 x 11 = 148.5 (FPGA-TN-02200's formula, from memory)
    assert data["shared"]["clock_hz"] == 148_500_000 and data["shared"]["divides"] == [2, 1]
    assert [m["spec"] for m in data["modes"]] == ["hd720", "hd1080"]
    assert [m["reached_pixel_hz"] for m in data["modes"]] == [74_250_000, 148_500_000]
    assert all(m["within_tolerance"] and m["error_ppm"] == 0 for m in data["modes"])
    # each mode's own plan is there too: 74.25 MHz is not reachable alone from 27 MHz on
    # ECP5 (27 x 11 / 4 needs a 6.75 MHz PFD, below 10 MHz), but 148.5 / 2 is.
    assert data["modes"][0]["plan"]["within_tolerance"] is False


def test_modes_needing_a_setting_each(tmp_path: Path) -> None:
    # 800x600 and 1024x768 meet only near 65 x 8 = 40 x 13 = 520 MHz, above iCE40's 275 MHz.
    specs = write(tmp_path, svga=SVGA, xga=XGA)
    code, out, _ = run("clock", *specs, "--board-clock", "100MHz", "--family", "ice40")
    assert code == 0
    assert re.search(r"^verdict +no single PLL output up to 275\.000 MHz serves every mode", out,
                     re.M)  # fmt: skip
    assert re.search(r"^reconfiguration +ice40: from memory", out, re.M)
    assert re.search(r"^setting svga +DIVR=", out, re.M)
    assert re.search(r"^setting xga +DIVR=", out, re.M)


def test_520_mhz_with_a_note_and_bounded_by_max_core_clock(tmp_path: Path) -> None:
    specs = write(tmp_path, svga=SVGA, xga=XGA)
    args = ["clock", *specs, "--board-clock", "100MHz", "--family", "xc7-mmcm", "--json"]
    data = json.loads(run(*args)[1])
    assert data["shared"]["clock_hz"] == 520 * MHZ and data["shared"]["divides"] == [13, 8]
    assert data["needs_clock_enable"] == ["svga", "xga"]
    text = run(*args[:-1])[1]
    assert "the core runs at up to 520.000 MHz (every mode)" in text
    assert "set core.clock_enable: true in svga, xga" in text
    bounded = json.loads(run(*args, "--max-core-clock", "500MHz")[1])
    assert bounded["verdict"] == "reconfigure" and bounded["max_core_clock_hz"] == 500 * MHZ


def test_board_section_of_the_specs(tmp_path: Path) -> None:
    board = "board: {clock_hz: 27 MHz, family: gowin}\n"
    specs = write(tmp_path, hd720=HD720 + board, hd1080=HD1080 + board)
    data = json.loads(run("clock", *specs, "--json")[1])
    assert data["family"] == "gowin" and data["board_clock_hz"] == 27 * MHZ
    other = write(tmp_path, hd1080=HD1080 + "board: {clock_hz: 12 MHz}\n")
    one_line_error(["clock", specs[0], other[0]],
                   r"--board-clock: the specs name different board clocks \(.*hd720\.yaml: "
                   r"27\.000 MHz, .*hd1080\.yaml: 12\.000 MHz\); pass --board-clock")


def test_bad_options_are_one_line(tmp_path: Path) -> None:
    specs = write(tmp_path, svga=SVGA, xga=XGA)
    one_line_error(["clock", *specs], r"--board-clock: no board clock given; pass --board-clock "
                                      r"or set board\.clock_hz in the specs")  # fmt: skip
    one_line_error(["clock", *specs, "--board-clock", "fast"],
                   r"--board-clock: must be a frequency like \"12MHz\" or \"27 MHz\", got 'fast'")
    one_line_error(["clock", *specs, "--board-clock", "12MHz", "--family", "ice41"],
                   r"--family: unknown FPGA family 'ice41'; choose from ice40, .*")
    one_line_error(["clock", *specs, "--board-clock", "12MHz", "--no-pll", "--max-core-clock",
                    "100MHz"], r"--max-core-clock: applies to a PLL only: .*")  # fmt: skip
    one_line_error(["clock", *specs, "--board-clock", "12MHz", "--family", "ice40",
                    "--max-core-clock", "0"], r"--max-core-clock: must be a frequency .*")
    one_line_error(["clock", *specs, "--board-clock", "12MHz", "--write", "x.yaml"],
                   r"--write: not available when planning several modes \(several SPEC files or a "
                   r"multi-mode spec\); give one single-mode SPEC for it")
    one_line_error(["clock", *specs, "--board-clock", "12MHz", "--link", "dvi"],
                   r"--link: not available when planning several modes .*")
    one_line_error(["clock", specs[0], "--board-clock", "12MHz", "--max-core-clock", "99MHz"],
                   r"--max-core-clock: applies only when planning several SPEC files together")


def test_every_bad_spec_is_reported(tmp_path: Path) -> None:
    bad = write(tmp_path, a=SVGA.replace("40 MHz", "-1 MHz"), b=XGA.replace("active: 1024", "active: x"))
    code, out, err = run("clock", *bad, "--board-clock", "12MHz")
    assert code == 2 and out == ""
    lines = err.splitlines()
    assert len(lines) == 2
    assert re.match(r".*a\.yaml:2:\d+: pixel_clock_hz: ", lines[0])
    assert re.match(r".*b\.yaml:3:\d+: horizontal\.active: ", lines[1])


def test_a_multi_mode_spec_plans_its_modes_as_the_files_would(tmp_path: Path) -> None:
    """The modes of one spec (modes:) are planned as the same timings given as two files."""
    multi = tmp_path / "pair.yaml"
    multi.write_text("name: pair\nmodes:\n  - standard: 800x600@60\n  - standard: 1024x768@60\n"
                     "core: {clock_enable: true}\n")  # fmt: skip
    args = ["--board-clock", "100MHz", "--family", "xc7-mmcm", "--json"]
    together = json.loads(run("clock", str(multi), *args)[1])
    apart = json.loads(run("clock", *write(tmp_path, svga=SVGA, xga=XGA), *args)[1])
    # 520 MHz = 40 MHz x 13 = 65 MHz x 8 (VESA DMT 09h, 10h pixel clocks, from memory)
    assert together["shared"] == apart["shared"]
    assert together["shared"]["divides"] == [13, 8]
    text = run("clock", str(multi), *args[:-1])[1]
    assert re.search(r"^pair mode 0 \(800x600\) +40\.000 MHz", text, re.M)
    assert re.search(r"^pair mode 1 \(1024x768\) +65\.000 MHz", text, re.M)
    one_line_error(["clock", str(multi), "--board-clock", "12MHz", "--write", "x.yaml"],
                   r"--write: not available when planning several modes .*")
