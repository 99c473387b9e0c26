"""Stage 6: the command line.  Thin: it parses options, calls the stages, prints results."""

from __future__ import annotations

import json
import sys

import click
from rich.console import Console
from rich.table import Table

from ._version import __version__
from .build import core_artifacts, write_artifacts
from .cli_clock import board_options, build_clock_artifacts, clock, print_plan
from .errors import SpecError
from .model import Timing
from .report import figures, options, timing_table
from .schema import json_schema
from .spec import Spec, load

HARDWARE_CAUTION = (
    "Hardware: match the FPGA bank's I/O voltage to what the display input accepts "
    "(VGA syncs are TTL-level, VGA colour is 0-0.7 V into 75 ohm); check the parts' "
    "datasheets before wiring. See the README, 'Hardware cautions'."
)


def _console() -> Console:
    return Console(highlight=False, soft_wrap=True)


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
    for label, value in figures(t) + options(t):
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
def build(spec: str, out_dir: str, force: bool, with_clock: bool, board_clock: str | None,
          family: str | None, no_pll: bool) -> None:  # fmt: skip
    """Validate SPEC and write its core as OUT/<name>.v and OUT/<name>.vhd."""
    s = _load(spec)
    console = _console()
    if not with_clock and (board_clock or family or no_pll):
        _fail_line("--board-clock, --family and --no-pll need --clock")
    artifacts = core_artifacts(s)
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
    console.print(HARDWARE_CAUTION, style="dim")


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
def show(spec: str) -> None:
    """Validate SPEC and print its timing summary; writes nothing."""
    print_summary(_load(spec), _console())


@main.command()
def schema() -> None:
    """Print the JSON Schema of the timing description format."""
    click.echo(json.dumps(json_schema(), indent=2))


main.add_command(clock)
