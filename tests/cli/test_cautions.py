"""Hardware cautions that fit the output: a monitor's timing or a panel's, TMDS when asked for."""

from __future__ import annotations

from pathlib import Path

import synccore
from synccore.cli.build import CAUTIONS, cautions, display_kind
from tests import samples
from tests.conftest import EXAMPLES

BY_NAME = {p.stem: p for p in EXAMPLES}


def test_library_and_formula_timings_are_a_monitors() -> None:
    for stem in ("framebuffer_320x240", "standard_1080p5994", "formula_cvt_rb2"):
        assert display_kind(synccore.load(BY_NAME[stem])) == "monitor", stem


def test_explicit_numbers_of_a_standard_mode_are_a_monitors() -> None:
    # DMT 800x600@60 written out by hand (samples.DMT_800x600: VESA DMT ID 09h, from memory).
    assert display_kind(synccore.loads(samples.DMT_800x600)) == "monitor"
    # 25 MHz for DMT 640x480's 25.175 MHz (0.7 % slow, within the monitor's 1 %).
    assert display_kind(synccore.load(BY_NAME["lab_readout_640x480"])) == "monitor"


def test_fitted_or_unmatched_timings_are_a_panels() -> None:
    assert display_kind(synccore.load(BY_NAME["panel_ranges"])) == "panel"  # fit: datasheet ranges
    assert display_kind(synccore.load(BY_NAME["hobby_panel_800x480"])) == "panel"  # no 800x480 mode
    # DMT 640x480 with the hsync polarity flipped matches no library mode: a panel's numbers.
    flipped = samples.DMT_640x480.replace("negative", "positive", 1)
    assert flipped != samples.DMT_640x480
    assert display_kind(synccore.loads(flipped)) == "panel"


def test_cautions_name_what_fits_once() -> None:
    panel = synccore.load(BY_NAME["hobby_panel_800x480"])
    monitor = synccore.load(BY_NAME["framebuffer_320x240"])
    assert cautions(panel) == [CAUTIONS["panel"]]
    assert cautions(monitor) == [CAUTIONS["monitor"]]
    assert cautions(monitor, tmds=True) == [CAUTIONS["tmds"]]
    assert "75 ohm" in CAUTIONS["monitor"] and "75 ohm" not in CAUTIONS["panel"]
    assert "backlight" in CAUTIONS["panel"] and "backlight" not in CAUTIONS["monitor"]


def test_build_prints_the_panels_caution_only(tmp_path: Path) -> None:
    from click.testing import CliRunner

    from synccore.cli.main import main

    result = CliRunner().invoke(main, ["build", str(BY_NAME["hobby_panel_800x480"]), "--out",
                                       str(tmp_path), "--pattern", "bars"])  # fmt: skip
    assert result.exit_code == 0, result.output
    flat = " ".join(result.stdout.split())
    assert flat.count("Hardware (") == 1
    assert " ".join(CAUTIONS["panel"].split()) in flat
    assert "75 ohm" not in flat
