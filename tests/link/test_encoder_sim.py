"""The emitted TMDS encoder, run in every simulator and compared word by word with the
independent reference (tests/link/tmds_reference.py, from DVI 1.0 section 3.2).

The stimulus holds long active runs of constant and skewed bytes (the running disparity
reaches -8 and +8, its bound), every control token, short and long blanking periods and
resets at random points; ppc = 2 chains two encoders through disparity_in/out in the
bench, as the link contract asks of the caller.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from synccore.verification.tools import Tool
from tests.link.encoder_bench import make_stimulus, simulate
from tests.link.encoder_check import expected, findings
from tests.link.specs import CONFIGS

TOOL_OF = {"icarus": "icarus", "ghdl93": "ghdl", "ghdl08": "ghdl", "verilator": "verilator"}
ALL_TOKENS = {(0, 0), (0, 1), (1, 0), (1, 1)}
RUNS = [
    *[("ppc1", sim) for sim in ("icarus", "ghdl93", "ghdl08", "verilator")],
    *[("ppc2", sim) for sim in ("icarus", "ghdl93", "ghdl08", "verilator")],
    *[("ppc1_ce", sim) for sim in ("icarus", "ghdl93", "ghdl08")],
    *[("ppc2_ce", sim) for sim in ("icarus", "ghdl08")],
]


@pytest.mark.sim
@pytest.mark.parametrize("config, simulator", RUNS)
def test_encoder_matches_the_reference(config: str, simulator: str, tmp_path: Path,
                                       need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(TOOL_OF[simulator])
    make_spec, cycles = CONFIGS[config]
    spec = make_spec()
    ppc = spec.core.pixels_per_clock
    stim = make_stimulus(cycles, ppc=ppc, has_ce=spec.core.clock_enable, seed=11)
    assert cycles * ppc >= (200_000 if config in ("ppc1", "ppc2") else 60_000)
    exp = expected(stim)
    # The stimulus is worth its name: both ends of the disparity, all four tokens, resets.
    assert {-8, 8} <= exp.reached
    blank = stim.de == 0
    assert set(zip(stim.c1[blank].tolist(), stim.c0[blank].tolist(), strict=True)) == ALL_TOKENS
    assert stim.rst[10:].sum() > 0
    got = simulate(spec, simulator, stim, tmp_path)
    found = findings(stim, got, exp)
    assert not found, found.summary()
    # Every word after the first reset was compared: none left unknown.
    assert (got[4:] >= 0).all()
