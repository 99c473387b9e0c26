"""Golden text of the benches: the measurement harness and the stand-alone self-checking bench.

One golden file per example, bench and language under tests/golden/bench/; refresh them
only after a deliberate change (see tests/golden_files.py), then read the diff.  That
the benches are correct HDL is shown by running them (tests/emit/test_testbench.py,
tests/verification/).
"""

from __future__ import annotations

from pathlib import Path

import pytest

import synccore
from synccore.emit.bench.harness import render_harness
from synccore.emit.bench.testbench import render_testbench
from tests import golden_files
from tests.conftest import EXAMPLES

LANGUAGES = {"verilog": ".v", "vhdl": ".vhd"}


@pytest.mark.parametrize("language", list(LANGUAGES))
@pytest.mark.parametrize("example", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_harness_golden(example: Path, language: str) -> None:
    text = render_harness(synccore.load(example), language)
    golden_files.check(f"bench/{example.stem}_harness{LANGUAGES[language]}", text)


# The stand-alone benches are progressive only so far: synccore.write refuses them for
# interlaced specs, so they have no golden text.
_PROGRESSIVE = [p for p in EXAMPLES if not synccore.load(p).interlaced]


@pytest.mark.parametrize("language", list(LANGUAGES))
@pytest.mark.parametrize("example", _PROGRESSIVE, ids=[p.stem for p in _PROGRESSIVE])
def test_testbench_golden(example: Path, language: str) -> None:
    text = render_testbench(synccore.load(example), language)
    golden_files.check(f"bench/{example.stem}_tb{LANGUAGES[language]}", text)


def test_testbench_frames_is_keyword_only() -> None:
    spec = synccore.load(EXAMPLES[0])
    with pytest.raises(TypeError):
        render_testbench(spec, "verilog", 3)  # type: ignore[misc]  # frames must be named
    assert "parameter FRAMES = 3;" in render_testbench(spec, "verilog", frames=3)
