"""Mutated encoders fail, and the checker names the fault.

Each mutant is the emitted Verilog with one edit (a string replacement here), run on
Icarus with a stimulus like the main test's; the checker must name the fault's class
first (the earliest fault) and report nothing unrelated.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from synccore.emit.link.encoder import render_encoder
from synccore.verification.tools import Tool
from tests.link.encoder_bench import make_stimulus, simulate
from tests.link.encoder_check import findings
from tests.link.specs import variant

MUTANTS = {
    # name: (original text, mutated text, the classes the checker may report, the first first)
    "flipped XNOR": (
        "minimise[i] = ~(minimise[i - 1] ^ value[i]);",
        "minimise[i] = minimise[i - 1] ^ value[i];",
        ["transition-minimising stage", "DC balance"],  # the wrong q_m misleads the disparity
    ),
    "disparity off by one": (
        "disparity_next = disparity_now + q8_twice - balance_s1;",
        "disparity_next = disparity_now + q8_twice - balance_s1 + 5'd1;",
        ["DC balance"],
    ),
    "token swapped": (
        "TOKEN_01 = 10'b0010101011;",
        "TOKEN_01 = 10'b0101010100;",
        ["control token for C1C0=01"],
    ),
}


@pytest.mark.sim
@pytest.mark.parametrize("name", list(MUTANTS))
def test_mutant_is_named(name: str, tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    need_tool("icarus")
    original, mutated, classes = MUTANTS[name]
    spec = variant("framebuffer_320x240.yaml", ppc=1, ce=False)
    text = render_encoder(spec, "verilog")
    assert text.count(original) == 1
    stim = make_stimulus(30_000, ppc=1, has_ce=False, seed=5)
    found = findings(stim, simulate(spec, "icarus", stim, tmp_path, text.replace(original, mutated)), None)
    assert list(found)[0] == classes[0] and set(found) <= set(classes), found.summary()
    first = next(iter(found.values()))[0]
    if name == "flipped XNOR":
        assert first.startswith("transition-minimising stage: word decodes to 0x")
    elif name == "disparity off by one":
        assert first.startswith("DC balance: running disparity")
    else:
        assert first.startswith("control token for C1C0=01: got 0101010100, expected 0010101011")
