"""The built-in engine on multi-mode specs: the Amaranth model under a switching sequence.

The same seeded sequences as the simulator benches (tests/verification/test_multimode.py):
every cycle compared with the model (``MultiTiming``) here in the test, every frame judged
against its own mode; a faulty model (the mode input in force at once, mid-frame) must fail
naming the fault; the command line runs builtin beside the simulators and prints the same
frames.  No simulator needed but for the comparison with Icarus; about 30 s in all here.  The
examples' full-size modes take 60 to 150 s on builtin here (one change, about 3.4 million
cycles, 2 shared cores): ``SYNCCORE_SLOW=1`` runs them.
"""

from __future__ import annotations

import os
import re
from collections.abc import Callable
from pathlib import Path

import pytest
from click.testing import CliRunner

import synccore
from synccore.amaranth.multi import MultiSyncCore, run_switching_builtin
from synccore.cli.main import main
from synccore.model import MultiTiming
from synccore.verification.multimode_builtin import run_builtin_switching
from synccore.verification.multimode_run import run_switching
from synccore.verification.switching import Segment, judge_frames, measure_frames, switching_sequence
from synccore.verification.tools import Tool
from tests import samples as timings
from tests.conftest import MULTI_MODE_EXAMPLES

SLOW = os.environ.get("SYNCCORE_SLOW") == "1"
CASES = {"small": timings.MULTI_SMALL, "opts": timings.MULTI_SMALL_OPTS,
         "two": timings.MULTI_TWO, "sixteen": timings.MULTI_SIXTEEN}  # fmt: skip
# Made up: three modes of 16 640 to 40 960 cycles a frame, over the every-cycle bench's limit
# (20 000), so that the command line takes the events bench and builtin's own default.
MULTI_MEDIUM = timings.multi_text("mm_medium", [
    ("10 MHz", (160, 8, 16, 16, "negative"), (120, 2, 3, 10, "negative")),
    ("12 MHz", (200, 10, 20, 26, "positive"), (150, 1, 2, 7, "positive")),
    ("8 MHz", (128, 4, 12, 16, "negative"), (96, 2, 2, 4, "positive")),
])  # fmt: skip


class ModeAtOnce(MultiSyncCore):
    """Faulty: the switch logic removed, the mode input drives the constants and mode_active
    straight, so a change takes effect at once, in the middle of a frame."""

    def _in_force(self, cur_mode: object) -> object:
        return self.mode


def _per_cycle(spec: synccore.Spec, seed: int, changes: int) -> tuple[MultiTiming, list, int, list]:
    mt = MultiTiming(spec)
    sequence, edges = switching_sequence(mt, seed=seed, changes=changes, unknown=True)
    seen = run_switching_builtin(spec, sequence, edges, every_cycle=True)
    assert not seen.reset_problems, seen.reset_problems
    ends = [s.edge for s in seen.seen[1:]] + [edges + 1]
    run = [Segment(s.edge, end - s.edge, s.outputs, s.mode) for s, end in zip(seen.seen, ends, strict=True)]
    return mt, sequence, edges, run


@pytest.mark.parametrize("name", list(CASES))
def test_every_cycle_and_every_frame_match_the_model(name: str) -> None:
    """20 seeded changes at random cycles: the outputs after every advancing edge are the
    model's, and every whole frame is one frame of the mode the model chose for it."""
    spec = synccore.loads(CASES[name], f"{name}.yaml")
    mt, sequence, edges, run = _per_cycle(spec, seed=7, changes=20)
    got = [(seg.outputs, seg.mode) for seg in run for _ in range(seg.length)]
    want = list(mt.outputs(sequence, edges))
    assert len(got) == len(want) == edges
    bad = [k + 1 for k, (g, w) in enumerate(zip(got, want, strict=True)) if g != w]
    assert not bad, f"{len(bad)} cycles differ; at edge {bad[0]}: {got[bad[0] - 1]}, want {want[bad[0] - 1]}"
    frames = measure_frames(run, mt)
    assert not judge_frames(frames, mt, sequence)
    model = {f.first_edge: f.mode for f in mt.frames(sequence, edges)}
    assert [f.mode for f in frames] == [model[f.first_edge] for f in frames]
    switches = sum(a.mode != b.mode for a, b in zip(frames, frames[1:], strict=False))
    assert len(sequence) == 20 and switches >= 5, switches
    if name == "small":
        assert {f.mode for f in frames} == {0, 1, 2}


@pytest.mark.parametrize("bench", ["cycles", "events"])
def test_the_run_passes_and_reaches_every_mode(bench: str, tmp_path: Path) -> None:
    spec = synccore.loads(timings.MULTI_SMALL, "small.yaml")
    run = run_builtin_switching(spec, run_dir=tmp_path, seed=7, changes=20, bench=bench, tour=True)
    assert run.passed, run.result.log.read_text()
    assert {f["mode"] for f in run.frames} == {0, 1, 2}


@pytest.mark.parametrize("bench", ["cycles", "events"])
def test_mode_at_once_fails_naming_the_fault(bench: str, tmp_path: Path) -> None:
    spec = synccore.loads(timings.MULTI_SMALL, "mut.yaml")
    run = run_builtin_switching(spec, run_dir=tmp_path, seed=7, bench=bench, core=ModeAtOnce)
    assert not run.passed
    log = run.result.log.read_text()
    assert "mode_active changed mid-frame" in log, log[:3000]
    assert re.search(r"frame \d+ \(edge \d+\): a torn frame: line count \d+, mode \d expects \d+", log)


def test_the_cli_runs_builtin_and_says_its_default(tmp_path: Path) -> None:
    """Modes over 20 000 cycles a frame: builtin drives one change unless told otherwise."""
    path = tmp_path / "medium.yaml"
    path.write_text(MULTI_MEDIUM)
    result = CliRunner().invoke(main, ["verify", str(path), "--sim", "builtin"])
    assert result.exit_code == 0, result.output
    assert "3 modes, 1 seeded mode change " in result.stdout
    assert re.search(r"^builtin: ok, \d+ cycles in [\d.]+ s, \d+ whole frames measured$",
                     result.stdout, re.M)  # fmt: skip
    assert "frames measured by builtin" in result.stdout
    assert "every frame is a whole frame of its mode" in result.stdout


SLOW_ONLY = pytest.mark.skipif(not SLOW, reason="60 to 150 s on builtin; SYNCCORE_SLOW=1 runs it")


@SLOW_ONLY
@pytest.mark.parametrize("example", MULTI_MODE_EXAMPLES, ids=[p.stem for p in MULTI_MODE_EXAMPLES])
def test_example_switches_on_builtin(example: Path, tmp_path: Path) -> None:
    """The example's real modes (420 000 to 1 083 264 cycles a frame), one change."""
    spec = synccore.load(example)
    run = run_builtin_switching(spec, run_dir=tmp_path, seed=2, changes=1, bench="events", tour=True)
    assert run.passed, run.result.log.read_text()
    assert {f["mode"] for f in run.frames} == {0, 1}


@pytest.mark.sim
@pytest.mark.parametrize("name", ["small", "opts"])
def test_builtin_and_icarus_measure_the_same_frames(name: str, tmp_path: Path,
                                                   need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    """The same seed drives the same sequence on both, and both measure the same frames
    (with an irregular clock enable on "opts": frames are counted in advancing edges)."""
    need_tool("icarus")
    spec = synccore.loads(CASES[name], f"{name}.yaml")
    builtin = run_builtin_switching(spec, run_dir=tmp_path / "builtin", seed=5, changes=20)
    icarus = run_switching(spec, simulator="icarus", run_dir=tmp_path / "icarus", seed=5, changes=20)
    assert builtin.passed and icarus.passed, icarus.result.log.read_text()[-3000:]
    assert (builtin.changes, builtin.edges) == (icarus.changes, icarus.edges)
    assert builtin.frames == icarus.frames and len(builtin.frames) > 20
