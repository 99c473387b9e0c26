"""The built-in engine's switching run: the Amaranth multi-mode core judged as the benches judge.

The simulator runs (``sim/multimode_bench.py``, ``sim/multimode_events_bench.py``) and this
one drive the same seeded sequence (:func:`~synccore.verification.switching.switching_sequence`)
and judge with the same functions: every frame measured against its own mode
(:func:`~synccore.verification.switching.judge_frames`) and the outputs against the model
(:class:`~synccore.model.MultiTiming`): on every cycle with ``bench="cycles"``, at both ends
of every run of unchanged outputs with ``bench="events"``.  The verdict is written to a
log in the benches' words, so a :class:`SwitchingRun` reads the same whichever engine ran.
It checks the Amaranth model (:mod:`synccore.amaranth.multi`), not the emitted text.
"""

from __future__ import annotations

import json
from collections.abc import Callable
from dataclasses import asdict
from pathlib import Path

from synccore.model import MultiTiming
from synccore.spec import Spec
from synccore.verification.multimode_run import SwitchingRun
from synccore.verification.simulate import SimResult
from synccore.verification.switching import (
    Sample,
    Segment,
    compare_cycles,
    compare_segments,
    judge_frames,
    measure_frames,
    switching_sequence,
)

MAX_LINES = 24  # per-frame problems shown, as in the benches


def run_builtin_switching(spec: Spec, *, run_dir: Path, seed: int = 1, changes: int = 20,
                          bench: str = "cycles", tour: bool = False,
                          core: Callable[[Spec], object] | None = None) -> SwitchingRun:  # fmt: skip
    """Run ``changes`` seeded mode changes through the Amaranth model of ``spec``'s core.

    ``bench`` as for :func:`~synccore.verification.multimode_run.run_switching`: ``"cycles"``
    knows every cycle (x watched too), ``"events"`` only the runs of unchanged outputs other
    than x.  The clock enable, when the core has one, is irregular in both.  ``core`` builds
    the component to run (default :class:`~synccore.amaranth.multi.MultiSyncCore`; tests pass
    faulty ones).
    """
    from synccore.amaranth.multi import run_switching_builtin

    mt = MultiTiming(spec)
    sequence, edges = switching_sequence(mt, seed=seed, changes=changes, unknown=True, tour=tour)
    run_dir.mkdir(parents=True, exist_ok=True)
    result = run_switching_builtin(spec, sequence, edges, every_cycle=bench == "cycles",
                                   core=core)  # fmt: skip
    seen = result.seen
    ends = [s.edge for s in seen[1:]] + [edges + 1]
    run = [Segment(s.edge, end - s.edge, s.outputs, s.mode) for s, end in zip(seen, ends, strict=True)]
    frames = measure_frames(run, mt)
    per_frame = judge_frames(frames, mt, sequence)
    if bench == "cycles":
        samples: list[Sample] = [(s.outputs, s.mode) for s in run for _ in range(s.length)]
        per_output = compare_cycles(samples, mt, sequence)
        heading = "outputs that differ from the model:"
    else:
        per_output = compare_segments(run, mt, sequence)
        heading = "runs of outputs that differ from the model:"
    lines = [f"in reset: {line}" for line in result.reset_problems]
    if not frames:
        lines.append("no whole frame seen")
    if per_frame or per_output:
        shown = per_frame[:MAX_LINES] + ([f"... and {len(per_frame) - MAX_LINES} more"]
                                         if len(per_frame) > MAX_LINES else [])  # fmt: skip
        lines += ["frames measured against their modes:", *shown, heading, *per_output]
    log = run_dir / "builtin.log"
    log.write_text("\n".join([f"builtin: {len(sequence)} changes, {edges} advancing edges, "
                              f"{len(frames)} whole frames", *lines]) + "\n")  # fmt: skip
    verdict = SimResult(tests=1, failed=1 if lines else 0, log=log, run_dir=run_dir, build_dir=run_dir)
    # As the benches hand them over (through JSON), so that runs compare equal.
    return SwitchingRun(sequence, edges, verdict, json.loads(json.dumps([asdict(f) for f in frames])))
