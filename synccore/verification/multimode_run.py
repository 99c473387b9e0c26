"""Host side of the multi-mode switching bench: write the sequence, run the bench, read its frames."""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path

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
                  bench: str = "cycles") -> SwitchingRun:  # fmt: skip
    """Run ``changes`` seeded mode changes through ``spec``'s multi-mode core on ``simulator``.

    ``bench``: ``"cycles"`` reads every cycle (for small modes), ``"events"`` wakes only when
    an output changes (full-size modes; the clock enable held at 1).
    """
    mt = MultiTiming(spec)
    sequence, edges = switching_sequence(mt, seed=seed, changes=changes, unknown=True)
    run_dir.mkdir(parents=True, exist_ok=True)
    plan = run_dir / "switching.json"
    plan.write_text(json.dumps({"changes": sequence, "edges": edges}))
    frames_json = run_dir / "frames.json"
    frames_json.unlink(missing_ok=True)
    result = run_bench(spec, simulator=simulator, run_dir=run_dir, bench=BENCHES[bench], vhdl_std=vhdl_std,
                       core_text=core_text,
                       env={"SYNCCORE_SWITCHING": str(plan.resolve()),
                            "SYNCCORE_FRAMES_JSON": str(frames_json.resolve()),
                            "SYNCCORE_SEED": str(seed)})  # fmt: skip
    frames = json.loads(frames_json.read_text()) if frames_json.is_file() else []
    return SwitchingRun(sequence, edges, result, frames)
