"""Host side of the multi-mode switching bench: write the sequence, run the bench, read its frames."""

from __future__ import annotations

import json
from dataclasses import dataclass, replace
from pathlib import Path

from synccore.emit import render_verilog
from synccore.emit.bench.multi_clock import CLOCKED_SUFFIX, render_clocked_verilog
from synccore.model import Change, MultiTiming
from synccore.spec import Spec
from synccore.verification.simulate import SimResult, run_bench
from synccore.verification.switching import switching_sequence

BENCHES = {"cycles": "multimode_bench", "events": "multimode_events_bench"}
"""Every cycle read by Python (small modes, irregular clock enable), or only the output changes."""


@dataclass(frozen=True)
class SwitchingRun:
    """One run of the switching bench: the sequence it drove, the verdict, the frames it measured."""

    changes: list[Change]
    edges: int
    result: SimResult
    frames: list[dict[str, object]]  # FrameFigures as written by the bench (empty if none)

    @property
    def passed(self) -> bool:
        return self.result.passed


def run_switching(spec: Spec, *, simulator: str, run_dir: Path, seed: int = 1, changes: int = 20,
                  vhdl_std: str = "08", core_text: str | None = None,
                  bench: str = "cycles", tour: bool = False) -> SwitchingRun:  # fmt: skip
    """Run ``changes`` seeded mode changes through ``spec``'s multi-mode core on ``simulator``.

    ``bench``: ``"cycles"`` reads every cycle (for small modes), ``"events"`` wakes only when
    an output changes (full-size modes; the clock enable held at 1).  ``tour``: the first
    changes visit every mode in turn (see :func:`~synccore.verification.switching.switching_sequence`).
    """
    mt = MultiTiming(spec)
    sequence, edges = switching_sequence(mt, seed=seed, changes=changes, unknown=True, tour=tour)
    run_dir.mkdir(parents=True, exist_ok=True)
    plan = run_dir / "switching.json"
    plan.write_text(json.dumps({"changes": sequence, "edges": edges}))
    frames_json = run_dir / "frames.json"
    frames_json.unlink(missing_ok=True)
    env = {"SYNCCORE_SWITCHING": str(plan.resolve()), "SYNCCORE_FRAMES_JSON": str(frames_json.resolve()),
           "SYNCCORE_SEED": str(seed)}  # fmt: skip
    top = spec
    if simulator == "icarus" and bench == "events":
        # Icarus runs cocotb's clock slowly: the clock goes into a Verilog wrapper around the core.
        core = core_text if core_text is not None else render_verilog(spec)
        core_text = core + render_clocked_verilog(spec)
        top = replace(spec, name=spec.name + CLOCKED_SUFFIX)
        env["SYNCCORE_HDL_CLOCK"] = "1"
    result = run_bench(top, simulator=simulator, run_dir=run_dir, bench=BENCHES[bench],
                       vhdl_std=vhdl_std, core_text=core_text, env=env)  # fmt: skip
    frames = json.loads(frames_json.read_text()) if frames_json.is_file() else []
    return SwitchingRun(sequence, edges, result, frames)
