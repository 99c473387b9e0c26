"""Formal proof of a core against the timing model, for all time, with SymbiYosys from PyPI.

The property wrapper (:mod:`synccore.emit.formal`) puts a reference position
counter beside the core and asserts every output against it on every cycle, with
reset free to come at any moment.  A core synccore generated is proved by
k-induction (``smtbmc z3``) at a small depth: invariants tie the core's counters
to the reference, so no run through a whole frame is needed.  When induction
fails, ``abc pdr`` (IC3/PDR, which finds its own invariants and only real
counterexamples) looks for a run from reset that breaks a property.  A core edited
by hand is judged on its ports: by k-induction with the same invariants when it still
declares the generated counters (a pass proves its ports too), else by ``abc pdr``.
"""

from __future__ import annotations

import re
import shutil
import tempfile
from dataclasses import dataclass, field, replace
from pathlib import Path

from synccore.emit import render_verilog
from synccore.emit.formal import PROPERTY_NAMES, FormalContext, build_formal_context, render_properties
from synccore.errors import Problem, SpecError, ToolError
from synccore.model import Timing
from synccore.spec import Spec
from synccore.verification._sby import SbyRun, missing_programs, run_job, write_job
from synccore.verification._trace import TraceRow, read_steps, table_lines, trace_rows

FORMAL_HINT = "pip install 'synccore[formal]'"
INDUCTION = "smtbmc z3"
PDR = "abc pdr"


@dataclass(frozen=True)
class Attempt:
    """One SymbiYosys job of a proof: its engine, its verdict and its wall time."""

    engine: str
    depth: int
    status: str
    seconds: float
    folder: Path


@dataclass(frozen=True)
class ProofResult:
    """The outcome of :func:`prove`.

    ``verdict`` is ``PASS`` (every property holds for all time), ``FAIL`` (a property
    breaks; ``failed`` names it, ``trace`` shows the cycles before, ``vcd`` is the
    whole counterexample, ``from_reset`` says whether it starts at reset or is a
    counterexample to induction) or ``UNKNOWN`` (no proof and no counterexample
    within the time allowed).
    """

    name: str
    verdict: str
    method: str
    attempts: tuple[Attempt, ...]
    failed: tuple[str, ...] = ()
    trace: tuple[TraceRow, ...] = ()
    trace_text: tuple[str, ...] = ()
    vcd: Path | None = None
    from_reset: bool = True
    work_dir: Path | None = None
    note: str = ""
    labels: tuple[str, ...] = field(default=())

    @property
    def passed(self) -> bool:
        return self.verdict == "PASS"

    @property
    def properties(self) -> tuple[str, ...]:
        """The names of the properties the wrapper asserts on the core's ports."""
        return tuple(PROPERTY_NAMES[label] for label in self.labels)

    @property
    def seconds(self) -> float:
        return sum(a.seconds for a in self.attempts)


def formal_missing() -> str | None:
    """One line naming the missing proof tools and how to install them, or None."""
    missing = missing_programs()
    if not missing:
        return None
    return f"formal proof tools not found ({', '.join(missing)}): {FORMAL_HINT}"


INTERLACE_REFUSED = ("formal proofs are progressive only so far: verify an interlaced core "
                     "with synccore verify, got true")
"""Why an interlaced spec is not proved (its property wrapper has no fields yet)."""


def prove(spec: Spec, *, core: str | Path | None = None, depth: int = 2,
          work_dir: str | Path | None = None, timeout: float = 300.0) -> ProofResult:  # fmt: skip
    """Prove ``spec``'s Verilog core, or the core in the file ``core``, against the timing model.

    Without ``core`` the emitted core is proved by k-induction of ``depth`` steps with
    invariants on its counters (then by PDR if induction fails); with ``core`` (a core
    edited by hand, whose internals are unknown) its ports are proved by PDR.  Every
    output is asserted on every cycle against a reference counter, reset at any moment.
    ``work_dir``: keep the job folders there (default: a temporary folder, kept for the
    VCD).  ``timeout``: seconds allowed to each SymbiYosys job.  The verdict is a result
    (``result.passed``), not an exception.

    Raises :class:`ToolError` when the proof tools are missing (install them with
    ``pip install 'synccore[formal]'``) or a job cannot run (e.g. the core does not
    parse), ``FileNotFoundError`` for a missing ``core``, ``ValueError`` for depth < 1,
    :class:`SpecError` for an interlaced spec (the properties are progressive only so far).
    """
    text = Path(core).read_text(encoding="utf-8") if core is not None else None
    return prove_text(spec, text, depth=depth, timeout=timeout,
                      work_dir=Path(work_dir) if work_dir is not None else None)  # fmt: skip


def prove_text(spec: Spec, core_text: str | None, *, ports_only: bool = True, depth: int = 2,
               work_dir: Path | None = None, timeout: float = 300.0) -> ProofResult:  # fmt: skip
    """:func:`prove` of ``core_text`` (None: the emitted core).

    ``ports_only=False`` proves ``core_text`` as a generated core (k-induction with the
    invariants on ``h_pos``/``v_pos``/``h_lead``/``v_lead``): for a generated core's text
    mutated on purpose.
    """
    if depth < 1:
        raise ValueError(f"depth must be at least 1, got {depth}")
    if spec.interlaced:
        raise SpecError([Problem(spec.location("interlaced"), "interlaced", INTERLACE_REFUSED)])
    problem = formal_missing()
    if problem:
        raise ToolError(problem)
    temporary = work_dir is None
    folder = Path(tempfile.mkdtemp(prefix="synccore_prove_")) if work_dir is None else Path(work_dir)
    folder.mkdir(parents=True, exist_ok=True)
    # kept unless the proof passes: a failure's VCD and a job's log stay for the user
    result = _run(Timing(spec), core_text, ports_only=ports_only, depth=depth, folder=folder,
                  timeout=timeout)  # fmt: skip
    if temporary and result.passed:
        shutil.rmtree(folder, ignore_errors=True)
        return replace(result, work_dir=None)
    return result


def _run(t: Timing, core_text: str | None, *, ports_only: bool, depth: int, folder: Path,
         timeout: float) -> ProofResult:  # fmt: skip
    if core_text is not None and ports_only:
        return _run_edited(t, core_text, depth=depth, folder=folder, timeout=timeout)
    core = render_verilog(t.spec) if core_text is None else core_text
    attempt, run = _job(t, folder / "induction", core, INDUCTION, depth, internals=True, timeout=timeout)
    method = f"k-induction (smtbmc z3, depth {depth}) with invariants on the core's counters"
    if run.status != "UNKNOWN":
        return _result(t, method, (attempt,), run, folder)
    # Induction failed: PDR on the ports finds a run from reset that breaks a property
    # (or proves them all, when only the invariants were too weak at this depth).
    second, pdr = _job(t, folder / "pdr", core, PDR, depth, internals=False, timeout=timeout)
    if pdr.status in ("PASS", "FAIL"):
        return _result(t, f"{method}; induction failed, then PDR (abc pdr)", (attempt, second), pdr, folder)
    note = (f"PDR found no run from reset that breaks it ({pdr.status.lower()}); the trace starts "
            f"from a state that satisfies every property for {depth} cycles")  # fmt: skip
    return replace(_result(t, method, (attempt, second), run, folder), note=note)


def _run_edited(t: Timing, core_text: str, *, depth: int, folder: Path, timeout: float) -> ProofResult:
    """A core edited by hand: its ports by PDR, after a quick try of the generated core's invariants.

    When the file still declares the generated core's counters (same names, same
    widths), k-induction with the invariants on them is tried first: if it passes,
    every port property is proved (the invariants are proved with them).  Otherwise,
    or if it fails, PDR judges the ports alone and finds any counterexample from reset.
    """
    attempts: tuple[Attempt, ...] = ()
    if _has_counters(build_formal_context(t, internals=True), core_text):
        first, run = _job(t, folder / "induction", core_text, INDUCTION, depth, internals=True,
                          timeout=timeout)  # fmt: skip
        if run.status == "PASS":
            method = (f"k-induction (smtbmc z3, depth {depth}) with invariants on the counters "
                      "the edited core still declares")  # fmt: skip
            return _result(t, method, (first,), run, folder)
        attempts = (first,)
    attempt, run = _job(t, folder / "pdr", core_text, PDR, depth, internals=False, timeout=timeout)
    return _result(t, "PDR on the core's ports (abc pdr)", (*attempts, attempt), run, folder)


def _has_counters(ctx: FormalContext, text: str) -> bool:
    """Whether ``text`` declares every counter the invariants read, with the generated widths."""
    for _, signal, msb in ctx.internal_wires:
        if not re.search(rf"\breg\s*\[\s*{msb}\s*:\s*0\s*\]\s*{signal}\s*;", text):
            return False
    return True


def _job(t: Timing, folder: Path, core: str, engine: str, depth: int, *, internals: bool,
         timeout: float) -> tuple[Attempt, SbyRun]:  # fmt: skip
    folder.mkdir(parents=True, exist_ok=True)
    ctx = build_formal_context(t, internals=internals)
    (folder / "core.v").write_text(core)
    (folder / "props.v").write_text(render_properties(t.spec, internals=internals))
    connect = tuple((wire, signal) for wire, signal, _ in ctx.internal_wires)
    write_job(folder, top=ctx.name, engine=engine, depth=depth, connect=connect)
    run = run_job(folder, timeout=timeout)
    if run.status == "ERROR":
        raise ToolError(f"the proof could not run ({engine}): {run.error.rstrip('.')}; log: {run.log}")
    return Attempt(engine, depth, run.status, run.seconds, folder), run


def _result(t: Timing, method: str, attempts: tuple[Attempt, ...], run: SbyRun, folder: Path) -> ProofResult:
    ctx = build_formal_context(t, internals=False)
    if run.status == "PASS":
        return ProofResult(t.spec.name, "PASS", method, attempts, work_dir=folder, labels=ctx.labels)
    if run.status in ("TIMEOUT", "UNKNOWN") and run.trace is None:
        return ProofResult(t.spec.name, "UNKNOWN", method, attempts, work_dir=folder, labels=ctx.labels,
                           note=f"no verdict ({run.status.lower()})")  # fmt: skip
    names = tuple(PROPERTY_NAMES.get(label, label) for label in run.failed)
    rows: list[TraceRow] = []
    if run.trace is not None and run.trace.is_file():
        steps = read_steps(run.trace)
        ce = ctx.port["ce"] if ctx.has_ce else None
        rows = trace_rows(t, steps, reset_port=ctx.port["reset"], ce_port=ce,
                          reset_async=ctx.reset_async, last=run.step)  # fmt: skip
    return ProofResult(
        t.spec.name, "FAIL", method, attempts, failed=names, trace=tuple(rows),
        trace_text=tuple(table_lines(rows, reset_name=ctx.port["reset"])) if rows else (),
        vcd=run.trace, from_reset=not run.induction, work_dir=folder, labels=ctx.labels,
    )  # fmt: skip
