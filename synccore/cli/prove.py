"""``synccore prove``: prove the core against the timing model for all time, or show how it breaks."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import click

from synccore.api import ProofResult, prove
from synccore.cli._common import FAILED, fail, fail_spec, load_spec
from synccore.errors import SpecError, ToolError
from synccore.verification.prove import formal_missing


def _as_json(result: ProofResult) -> str:
    data = {
        "name": result.name,
        "verdict": result.verdict,
        "method": result.method,
        "seconds": round(result.seconds, 3),
        "attempts": [{"engine": a.engine, "depth": a.depth, "status": a.status,
                      "seconds": round(a.seconds, 3)} for a in result.attempts],
        "properties": list(result.properties),
        "failed": list(result.failed),
        "from_reset": result.from_reset,
        "trace": [{"step": r.step, "reset": r.reset, "ce": r.ce, "reference": r.where,
                   "core": r.got, "expected": r.want} for r in result.trace],
        "vcd": str(result.vcd) if result.vcd else None,
        "note": result.note,
    }  # fmt: skip
    return json.dumps(data, indent=2)


def _print(result: ProofResult) -> None:
    took = ", ".join(f"{a.engine} {a.status.lower()} in {a.seconds:.1f} s" for a in result.attempts)
    if result.passed:
        click.echo(f"{result.name}: PASS: every output equals the timing model on every cycle, "
                   "for all time, with reset at any moment")  # fmt: skip
    elif result.verdict == "FAIL":
        click.echo(f"{result.name}: FAIL: {', '.join(result.failed) or 'a property'}")
    else:
        click.echo(f"{result.name}: UNKNOWN: neither proved nor broken ({result.note})")
    click.echo(f"  method: {result.method}")
    click.echo(f"  properties: {', '.join(result.properties)}")
    click.echo(f"  time: {result.seconds:.1f} s ({took})")
    if result.verdict != "FAIL":
        return
    start = ("a run from reset (step 0 is the first cycle, with reset asserted)" if result.from_reset
             else "a counterexample to induction (it starts from a state that satisfies every "
                  "property for the depth)")  # fmt: skip
    click.echo(f"  counterexample: {start}; a!=b: the core shows a, the reference says b")
    for line in result.trace_text:
        click.echo(f"    {line}")
    if result.note:
        click.echo(f"  note: {result.note}")
    if result.vcd:
        click.echo(f"  VCD: {result.vcd}")


@click.command(name="prove")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--core", "core", type=click.Path(dir_okay=False, exists=True),
              help="A core edited by hand (Verilog) to prove against SPEC, on its ports only "
                   "(default: the core synccore generates from SPEC).")
@click.option("--depth", default=2, show_default=True, type=click.IntRange(1, 1000),
              help="Steps of k-induction.")
@click.option("--timeout", default=300.0, show_default=True, type=click.FloatRange(1, None),
              help="Seconds allowed to each SymbiYosys job.")
@click.option("--json", "as_json", is_flag=True, help="Print the result as JSON.")
@click.option("--work-dir", type=click.Path(file_okay=False),
              help="Keep the proof's files here (default: a temporary folder, kept on failure).")
def prove_command(spec: str, core: str | None, depth: int, timeout: float, as_json: bool,
                  work_dir: str | None) -> None:  # fmt: skip
    """Prove SPEC's Verilog core against the timing model for all time (SymbiYosys, k-induction)."""
    s = load_spec(spec, single_mode="prove")
    missing = formal_missing()
    if missing:
        fail(missing)
    try:
        result = prove(s, core=Path(core) if core else None, depth=depth, timeout=timeout,
                       work_dir=Path(work_dir) if work_dir else None)  # fmt: skip
    except ToolError as err:
        fail(str(err))
    except SpecError as err:  # an interlaced spec: not proved yet
        fail_spec(err)
    if as_json:
        click.echo(_as_json(result))
    else:
        _print(result)
    if not result.passed:
        sys.exit(FAILED)
