"""Stage 6: the command line.  Thin: it parses options, calls the stages, prints results."""

from __future__ import annotations

import json
import sys

import click
from rich.console import Console
from rich.table import Table

from ._version import __version__
from .build import core_artifacts, write_artifacts
from .errors import SpecError
from .model import Timing
from .modeline import format_line
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
def build(spec: str, out_dir: str, force: bool) -> None:  # fmt: skip
    """Validate SPEC and write its core as OUT/<name>.v and OUT/<name>.vhd."""
    s = _load(spec)
    console = _console()
    try:
        written = write_artifacts(core_artifacts(s), out_dir, force=force)
    except SpecError as err:
        _fail(err)
    print_summary(s, console)
    for path in written:
        console.print(f"wrote {path}")
    console.print(HARDWARE_CAUTION, style="dim")


@main.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--modeline", "as_modeline", is_flag=True,
              help="Print the timing as one X.Org modeline instead of the summary.")
def show(spec: str, as_modeline: bool) -> None:
    """Validate SPEC and print its timing summary; writes nothing."""
    s = _load(spec)
    if as_modeline:
        click.echo(format_line(s.name, s.pixel_clock_hz, s.horizontal, s.vertical))
        return
    print_summary(s, _console())


@main.command()
def schema() -> None:
    """Print the JSON Schema of the timing description format."""
    click.echo(json.dumps(json_schema(), indent=2))


# Standard timings (library, formulas, modelines) live in their own module.
from .cli_modes import modes_command, new_command  # noqa: E402

main.add_command(modes_command)
main.add_command(new_command)
