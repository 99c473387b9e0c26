"""``synccore verify``: run the core in the simulators found and measure it against the spec."""

from __future__ import annotations

import sys
from pathlib import Path

import click
from rich.console import Console
from rich.table import Table

from synccore.api import verify
from synccore.cli._common import FAILED, console, fail, load_spec
from synccore.errors import ToolError
from synccore.model import Timing
from synccore.spec import Spec
from synccore.verification.choosing import pick_engines


def _engines_option(value: str | None) -> list[str] | None:
    from synccore.verification.engines import ENGINES

    if value is None:
        return None
    names = [v.strip() for v in value.split(",") if v.strip()]
    bad = [n for n in names if n not in ENGINES]
    if bad or not names:
        raise click.BadParameter(
            f"unknown engine {bad[0] if bad else value!r}; choose from {', '.join(ENGINES)}"
        )
    return names


def run_verify(spec: Spec, *, engines: list[str] | None, frames: int, waves: bool,
               work_dir: str | None, out: Console) -> None:  # fmt: skip
    """Measure ``spec`` on ``engines`` (None: the simulators found), print the table; exit 1 on a mismatch."""
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn

    from synccore.verification.engines import ENGINE_LANGUAGE, unusable_engines

    chosen_by_user = engines is not None
    try:
        engines = pick_engines(engines)
    except ToolError as err:
        fail(str(err))
    if not chosen_by_user:
        for line in unusable_engines():
            out.print(f"note: {line}")
        if engines == ["builtin"]:
            out.print("note: no HDL simulator can run here, so only the Amaranth model is measured; "
                      "install iverilog or ghdl (apt-get install iverilog ghdl) to check the emitted "
                      "text")  # fmt: skip
    t = Timing(spec)
    with Progress(TextColumn("{task.description:<10}"), BarColumn(), MofNCompleteColumn(),
                  TextColumn("frames"), TimeElapsedColumn(), console=out,
                  transient=False) as bar:  # fmt: skip
        tasks = {e: bar.add_task(e, total=frames) for e in engines}
        report = verify(spec, engines=engines, frames=frames, waves=waves,
                        work_dir=Path(work_dir) if work_dir else None,
                        progress=lambda e, n: bar.update(tasks[e], completed=min(n, frames)))  # fmt: skip
    table = Table(title=f"{spec.name}: measured over {frames} frames "
                        f"({t.frame_cycles} cycles each)", title_justify="left")  # fmt: skip
    table.add_column("quantity")
    table.add_column("spec", justify="right")
    ran = [r for r in report.runs if r.figures is not None]
    for r in ran:
        table.add_column(f"{r.engine}\n{ENGINE_LANGUAGE[r.engine]}", justify="right")
    table.add_column("")
    for row in report.rows:
        want = f"{row.want} {row.unit}".strip()
        table.add_row(row.label, want, *(row.got[r.engine] for r in ran),
                      "ok" if row.ok else "[bold red]FAIL[/]")  # fmt: skip
    out.print(table)
    for r in report.runs:
        speed = f"{r.cycles / r.seconds / 1e6:.2f} M cycles/s" if r.seconds and r.cycles else ""
        out.print(f"{r.engine}: {r.seconds:.1f} s {speed}".rstrip())
        for w in r.waves:
            out.print(f"  waves: {w}")
    if "builtin" in engines:
        out.print("builtin: Amaranth's simulator ran the Amaranth model of this timing, "
                      "not the emitted Verilog/VHDL text.")  # fmt: skip
    if not report.ok:
        for line in report.problems():
            click.echo(f"FAIL {line}", err=True)
        sys.exit(FAILED)
    out.print("all measured figures match the spec")


@click.command(name="verify")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--sim", "sims", metavar="LIST",
              help="Engines to run, comma-separated: icarus, ghdl, verilator, builtin "
                   "(default: every simulator found; builtin when there is none).")
@click.option("--frames", default=2, show_default=True, type=click.IntRange(2, 1000),
              help="Frames to simulate.")
@click.option("--waves", is_flag=True, help="Write waveform files (FST/VCD/GHW) of each run.")
@click.option("--work-dir", type=click.Path(file_okay=False),
              help="Keep run folders here (default: a temporary folder; with --waves, "
                   "./<name>_verify).")
@click.option("--changes", type=click.IntRange(1, 1000),
              help="Multi-mode specs: mode changes driven; the first visit every mode in turn, "
                   "the rest come at random cycles (default 3; 1 for the built-in engine on "
                   "modes over 20 000 cycles a frame).")
@click.option("--seed", default=1, show_default=True, type=int,
              help="Multi-mode specs: seed of the switching sequence.")
def verify_command(spec: str, sims: str | None, frames: int, waves: bool,
                   work_dir: str | None, changes: int | None, seed: int) -> None:  # fmt: skip
    """Generate SPEC's core, run it in every simulator found, and measure it against the spec.

    A multi-mode spec (modes:) is run through a seeded sequence of mode changes instead:
    every frame measured against its own mode, every output against the model."""
    engines = _engines_option(sims)
    s = load_spec(spec)
    if s.modes:
        from synccore.cli.verify_modes import run_verify_modes

        if waves:
            fail("--waves: not for multi-mode specs yet")
        run_verify_modes(s, engines=engines, changes=changes, seed=seed, work_dir=work_dir,
                         out=console(wide_pipe=True))  # fmt: skip
        return
    run_verify(s, engines=engines, frames=frames, waves=waves, work_dir=work_dir,
               out=console(wide_pipe=True))
