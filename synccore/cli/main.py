"""Stage 6: the command line.  Thin: it parses options, calls the stages, prints results."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import click
from rich.console import Console
from rich.table import Table

from synccore._version import __version__
from synccore.cli.clock import board_options, build_clock_artifacts, clock, print_plan
from synccore.emit.files import core_artifacts, pattern_artifacts, testbench_artifacts, write_artifacts
from synccore.errors import SpecError
from synccore.model import Timing
from synccore.model.pattern import PATTERNS, pattern_problems
from synccore.model.report import figures, options, timing_table
from synccore.spec import Spec
from synccore.spec.schema import json_schema
from synccore.timings import load
from synccore.timings.modeline import format_line

HARDWARE_CAUTION = (
    "Hardware: match the FPGA bank's I/O voltage to what the display input accepts "
    "(VGA syncs are TTL-level, VGA colour is 0-0.7 V into 75 ohm); check the parts' "
    "datasheets before wiring. See the README, 'Hardware cautions'."
)


def _console() -> Console:
    # Piped or captured output gets room for the verification table's engine columns.
    return Console(highlight=False, soft_wrap=True, width=None if sys.stdout.isatty() else 140)


def _fail(err: SpecError) -> None:
    for problem in err.problems:
        click.echo(str(problem), err=True)
    sys.exit(2)


def _fail_line(message: str) -> None:
    click.echo(message, err=True)
    sys.exit(2)


def _load(path: str) -> Spec:
    try:
        return load(path)
    except SpecError as err:
        _fail(err)
        raise AssertionError from err  # pragma: no cover - _fail exits


def print_summary(spec: Spec, console: Console) -> None:
    """The timing table and derived figures of a spec, as terminal tables."""
    t = Timing(spec)
    rows = timing_table(t)
    table = Table(title=f"{spec.name}  ({spec.source})", title_justify="left")
    for i, head in enumerate(rows[0]):
        table.add_column(head, justify="left" if i == 0 else "right")
    for row in rows[1:]:
        table.add_row(*row)
    console.print(table)
    facts = Table(show_header=False, box=None, pad_edge=False)
    facts.add_column(style="bold")
    facts.add_column()
    origin = [("timing from", spec.origin)] if spec.origin else []
    origin += [("note", n) for n in spec.notes]
    for label, value in origin + figures(t) + options(t):
        facts.add_row(label, value)
    console.print(facts)


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="synccore")
def main() -> None:
    """Display timing cores for FPGAs: YAML timing in, Verilog and VHDL sync generators out."""


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--out", "-o", "out_dir", required=True, type=click.Path(file_okay=False),
              help="Folder for the generated files (created if missing).")
@click.option("--force", is_flag=True,
              help="Overwrite files in the folder even if synccore did not generate them.")
@click.option("--clock", "with_clock", is_flag=True,
              help="Also write the clock wrapper OUT/<name>_clock.v/.vhd and its constraints.")
@board_options
@click.option("--testbench", "with_testbench", is_flag=True,
              help="Also write self-checking test benches OUT/<name>_tb.v and OUT/<name>_tb.vhd.")
@click.option("--verify", "then_verify", is_flag=True,
              help="Then run the core in every simulator found and measure it (see `verify`).")
@click.option("--pattern", type=click.Choice(PATTERNS), default=None,
              help="Also write a test-pattern generator and a first-light top level "
                   "(OUT/<name>_pattern.*, OUT/<name>_top.*).")
def build(spec: str, out_dir: str, force: bool, with_clock: bool, board_clock: str | None,
          family: str | None, no_pll: bool, with_testbench: bool, then_verify: bool,
          pattern: str | None) -> None:  # fmt: skip
    """Validate SPEC and write its core as OUT/<name>.v and OUT/<name>.vhd."""
    s = _load(spec)
    console = _console()
    if not with_clock and (board_clock or family or no_pll):
        _fail_line("--board-clock, --family and --no-pll need --clock")
    artifacts = core_artifacts(s)
    if with_testbench:
        artifacts += testbench_artifacts(s)
    if pattern is not None:
        problems = pattern_problems(s)
        if problems:
            _fail(SpecError(problems))
        artifacts += pattern_artifacts(s, pattern)
    plan = None
    try:
        if with_clock:
            plan, extra = build_clock_artifacts(s, board_clock, family, no_pll)
            artifacts += extra
        written = write_artifacts(artifacts, out_dir, force=force)
    except SpecError as err:
        _fail(err)
    print_summary(s, console)
    if plan is not None:
        print_plan(plan, console)
    for path in written:
        console.print(f"wrote {path}")
    if pattern is not None:
        console.print(f"first-light design: synthesise {s.name}_top (pattern {pattern}); "
                      f"see it first with `synccore view {spec} --pattern {pattern}`")  # fmt: skip
    console.print(HARDWARE_CAUTION, style="dim")
    if then_verify:
        _run_verify(s, engines=None, frames=2, waves=False, work_dir=None, console=console)


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--modeline", "as_modeline", is_flag=True,
              help="Print the timing as one X.Org modeline instead of the summary.")
@click.option("--diagram", type=click.Path(dir_okay=False),
              help="Also draw the horizontal and vertical timing to scale into this .svg or .png.")
def show(spec: str, as_modeline: bool, diagram: str | None) -> None:
    """Validate SPEC and print its timing summary; writes nothing unless --diagram is given."""
    s = _load(spec)
    if diagram is not None:
        from synccore.picture.diagram import draw

        if Path(diagram).suffix.lower() not in (".svg", ".png"):
            _fail_line(f"--diagram must name a .svg or .png file, got {diagram!r}")
        draw(s, diagram)
    if as_modeline:
        click.echo(format_line(s.name, s.pixel_clock_hz, s.horizontal, s.vertical))
        return
    print_summary(s, _console())
    if diagram is not None:
        _console().print(f"wrote {diagram}")


@main.command()
def schema() -> None:
    """Print the JSON Schema of the timing description format."""
    click.echo(json.dumps(json_schema(), indent=2))


# Standard timings (library, formulas, modelines) live in their own module.
from synccore.cli.modes import modes_command, new_command  # noqa: E402

main.add_command(modes_command)
main.add_command(new_command)


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


def _run_verify(spec: Spec, *, engines: list[str] | None, frames: int, waves: bool,
                work_dir: str | None, console: Console) -> None:  # fmt: skip
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn

    from synccore.verification.engines import ENGINE_LANGUAGE, available_engines, cocotb_missing, verify
    from synccore.verification.tools import INSTALL_HINT

    found = available_engines()
    if engines is None:
        # The real simulators check the emitted text; the built-in engine (much slower, and
        # checking the Amaranth model) is the fallback when none is installed.
        engines = [e for e in found if e != "builtin"] or found
        if not engines:
            click.echo("no engine found: install a simulator (see README) or Amaranth", err=True)
            sys.exit(2)
    missing = [e for e in engines if e not in found]
    if missing:
        for e in missing:
            hint = INSTALL_HINT.get(e, "install the PyPI package 'amaranth'")
            if e in INSTALL_HINT and cocotb_missing():
                hint = "the simulators run through cocotb: pip install 'synccore[sim]'"
            click.echo(f"engine {e!r} not found: {hint}", err=True)
        sys.exit(2)
    t = Timing(spec)
    with Progress(TextColumn("{task.description:<10}"), BarColumn(), MofNCompleteColumn(),
                  TextColumn("frames"), TimeElapsedColumn(), console=console,
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
    console.print(table)
    for r in report.runs:
        speed = f"{r.cycles / r.seconds / 1e6:.2f} M cycles/s" if r.seconds and r.cycles else ""
        console.print(f"{r.engine}: {r.seconds:.1f} s {speed}".rstrip())
        for w in r.waves:
            console.print(f"  waves: {w}")
    if "builtin" in engines:
        console.print("builtin: Amaranth's simulator ran the Amaranth model of this timing, "
                      "not the emitted Verilog/VHDL text.")  # fmt: skip
    if not report.ok:
        for line in report.problems():
            click.echo(f"FAIL {line}", err=True)
        sys.exit(1)
    console.print("all measured figures match the spec")


@main.command(name="verify")
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
def verify_command(spec: str, sims: str | None, frames: int, waves: bool,
                   work_dir: str | None) -> None:  # fmt: skip
    """Generate SPEC's core, run it in every simulator found, and measure it against the spec."""
    engines = _engines_option(sims)
    s = _load(spec)
    _run_verify(s, engines=engines, frames=frames, waves=waves, work_dir=work_dir,
                console=_console())


main.add_command(clock)

# The picture before the board: simulated monitor.
from synccore.cli.view import view_command  # noqa: E402

main.add_command(view_command)
