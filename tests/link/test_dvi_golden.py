"""Golden text of the DVI design: every file `build --link dvi` writes, for two jobs.

* the lab-readout example (clock enable, one pixel per clock) on an iCE40 with a 12 MHz board
  clock: the core runs on the serial clock and advances on ce;
* the 1280x720 monitor example (two pixels per clock: chained encoders) on an ECP5 with a
  25 MHz board clock.

Refresh on purpose only: SYNCCORE_UPDATE_GOLDEN=1 python -m pytest tests/link/test_dvi_golden.py
"""

from __future__ import annotations

from fractions import Fraction

import pytest

import synccore
from synccore.clocking.link import plan_link
from synccore.emit.files import dvi_artifacts
from synccore.emit.link.encoder import encoder_module
from tests import golden_files
from tests.conftest import EXAMPLES

BY_NAME = {p.stem: p for p in EXAMPLES}
JOBS = [("lab_readout_640x480", "ice40", 12_000_000), ("monitor_1280x720", "ecp5", 25_000_000)]


@pytest.mark.parametrize(("example", "family", "f_board"), JOBS, ids=[j[1] for j in JOBS])
def test_dvi_design_text_is_pinned(example: str, family: str, f_board: int) -> None:
    spec = synccore.load(BY_NAME[example])
    plan = plan_link(spec, f_board=Fraction(f_board), family=family)
    artifacts = dvi_artifacts(plan, "bars")
    names = [a.name for a in artifacts]
    assert len(names) == len(set(names))
    for a in artifacts:
        if a.name.startswith(encoder_module(spec) + "."):  # pinned by test_encoder_emit.py
            continue
        golden_files.check(f"link/{family}/{a.name}", a.text)
