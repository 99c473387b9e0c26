"""Golden text of the clock wrappers and constraints, refreshed only on purpose.

Refresh them only after a deliberate change (see tests/golden_files.py), then read the diff.
"""

from __future__ import annotations

from fractions import Fraction
from pathlib import Path

import pytest

from synccore import loads
from synccore.clocking import FAMILIES
from synccore.clocking.plan import make_plan
from synccore.emit.files import clock_artifacts
from tests import golden_files

# VESA DMT 640x480@60 (DMT ID 04h, as in the Linux kernel's drm_dmt_modes[])
DMT_640 = """\
name: vga
pixel_clock_hz: 25.175 MHz
core: {clock_enable: true}
horizontal: {active: 640, front_porch: 16, sync: 96, back_porch: 48, sync_polarity: negative}
vertical: {active: 480, front_porch: 10, sync: 2, back_porch: 33, sync_polarity: negative}
"""

CASES = {
    "ice40_12mhz": ("ice40", 12),
    "ecp5_25mhz": ("ecp5", 25),
    "xc7-mmcm_100mhz": ("xc7-mmcm", 100),
    "gowin_27mhz": ("gowin", 27),
    "cyclone_50mhz": ("cyclone", 50),
    "ce_100mhz": (None, 100),
}


@pytest.mark.parametrize("case", list(CASES))
def test_golden(case: str) -> None:
    key, board_mhz = CASES[case]
    spec = loads(DMT_640, source="examples/vga.yaml")
    plan = make_plan(spec, f_board=Fraction(board_mhz * 10**6),
                     family=FAMILIES[key] if key else None)  # fmt: skip
    for a in clock_artifacts(plan):
        golden_files.check(Path("clocking", case, a.name), a.text)
