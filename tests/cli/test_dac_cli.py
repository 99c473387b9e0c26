"""``synccore dac`` and ``view --dac`` end to end."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
from click.testing import CliRunner
from PIL import Image

from synccore.cli import main

SPEC = "name: shelf_clock\nstandard: 640x480@60 dmt\ncolor: {red: 3, green: 3, blue: 2}\n"


def _spec(tmp_path: Path) -> Path:
    path = tmp_path / "s.yaml"
    path.write_text(SPEC, encoding="utf-8")
    return path


def _run(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.stdout, result.stderr


def test_text_report_with_cautions(tmp_path: Path) -> None:
    code, out, _ = _run("dac", str(_spec(tmp_path)), "--io", "3.3V")
    assert code == 0
    assert "red (3 bits)" in out and "blue (2 bits)" in out
    assert "network        bit 0: 2k, bit 1: 1k, bit 2: 470" in out
    assert "runners-up" in out
    assert "never connect a 5 V logic output" in out and "data sheet" in out


def test_json_gives_resistors_and_levels(tmp_path: Path) -> None:
    code, out, _ = _run("dac", str(_spec(tmp_path)), "--io", "3.3V", "--json", "--topology", "r2r")
    assert code == 0
    data = json.loads(out)
    assert set(data["channels"]) == {"red", "green", "blue"}
    blue = data["channels"]["blue"]
    assert len(blue["resistors_ohm"]) == 2 and len(blue["levels_v"]) == 4 and blue["levels_v"][0] == 0.0


def test_drawings_and_design_file_round_trip(tmp_path: Path) -> None:
    spec = _spec(tmp_path)
    draw, plot, save = tmp_path / "net.svg", tmp_path / "levels.png", tmp_path / "dac.yaml"
    code, out, err = _run("dac", str(spec), "--io", "2.5V", "--series", "E96", "--draw", str(draw),
                          "--plot", str(plot), "--save", str(save))  # fmt: skip
    assert code == 0, err
    svg = draw.read_text(encoding="utf-8")
    assert "red[2]" in svg and "75 Ω" in svg
    assert Image.open(plot).size[0] > 400
    code, again, err = _run("dac", str(spec), "--design", str(save))
    assert code == 0, err
    def facts(text: str) -> list[str]:
        rows = ("  network", "  full scale", "  levels")
        return [line for line in text.splitlines() if line.startswith(rows)]

    assert facts(again) == facts(out) and len(facts(out)) == 9


def test_a_poor_network_exits_1_with_problems(tmp_path: Path) -> None:
    design = tmp_path / "mine.yaml"
    design.write_text("io: 3.3V\nresistors:\n  red: [1k, 1k, 1k]\n  green: [2k, 1k, 470]\n"
                      "  blue: [820, 430]\n")
    code, out, _ = _run("dac", str(_spec(tmp_path)), "--design", str(design))
    assert code == 1
    assert "PROBLEM red: full scale 0.606 V is -13.41 % from 0.700 V (aim: within 2 %)" in out


def test_bad_input_is_one_line_each_exit_2(tmp_path: Path) -> None:
    code, _, err = _run("dac", str(_spec(tmp_path)), "--io", "5V", "--pin-current", "lots")
    assert code == 2
    assert err.splitlines() == [
        "--io: got '5V'; allowed: a bank voltage above 0 V and at most 3.6 V, e.g. 3.3V "
        "(never a 5 V logic output)",
        "--pin-current: got 'lots'; allowed: a current above 0 and at most 1 A, e.g. 8mA",
    ]
    code, _, err = _run("dac", str(_spec(tmp_path)))
    assert code == 2 and err.startswith("io: give the bank's I/O voltage")
    code, _, err = _run("dac", str(_spec(tmp_path)), "--io", "3.3", "--draw", str(tmp_path / "x.pdf"))
    assert code == 2 and "--draw must name a .svg or .png file" in err


def test_view_shows_the_analog_picture_beside_the_ideal(tmp_path: Path) -> None:
    spec = _spec(tmp_path)
    design = tmp_path / "mine.yaml"
    design.write_text("io: 3.3V\nresistors:\n  red: [2k, 1k, 1k]\n  green: [2k, 1k, 470]\n"
                      "  blue: [820, 430]\n")
    png = tmp_path / "v.png"
    args = ["view", str(spec), "--sim", "model", "--dac", str(design), "-o", str(png)]
    result = CliRunner().invoke(main, args)
    assert result.exit_code == 1, result.output  # red's hand-made network misses the aims
    assert "PROBLEM DAC red: full scale" in result.output
    image = np.asarray(Image.open(png).convert("RGB")).astype(int)
    w = (image.shape[1] - 8) // 2
    ideal, analog = image[:, :w], image[:, w + 8:]
    assert ideal.shape == analog.shape
    # red's full white bar: 3.3 V into 2k || 1k || 1k || 75 ohm; PNG value = V / 0.7 V x 255 (the gamma note)
    g = 1 / 2000 + 1 / 1000 + 1 / 1000
    want = round(3.3 * g / (g + 1 / 75) / 0.7 * 255)
    assert analog[..., 0].max() == want and ideal[..., 0].max() == 255
    code, _, err = _run("view", str(spec), "--sim", "model", "--dac", "io=9V", "-o", str(png))
    assert code == 2 and "--dac io: got '9V'" in err
