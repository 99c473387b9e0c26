"""``synccore show`` and ``synccore schema``: a timing's summary, the format's JSON Schema."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import click
from rich.console import Console
from rich.table import Table

from synccore.cli._common import FAILED, console, fail, load_spec, save
from synccore.cli.edid import load_edid
from synccore.model import Timing
from synccore.model.report import figures, options, timing_table
from synccore.spec import Spec
from synccore.spec.schema import json_schema
from synccore.timings.edid_accept import judge
from synccore.timings.modeline import format_line


def print_summary(spec: Spec, console: Console) -> None:
    """The timing table and derived figures of a spec, as terminal tables (one per mode of a
    multi-mode spec)."""
    if spec.modes:
        for i, mode in enumerate(spec.modes):
            _print_one(mode, console, f"{spec.name} mode {i}  ({spec.source})")
        console.print(f"{len(spec.modes)} modes: the core reads its mode input on the last cycle "
                      "of each frame and switches at the frame boundary (docs/multimode.md)")
        return
    _print_one(spec, console, f"{spec.name}  ({spec.source})")


def _print_one(spec: Spec, console: Console, title: str) -> None:
    t = Timing(spec)
    rows = timing_table(t)
    table = Table(title=title, title_justify="left")
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


@click.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--modeline", "as_modeline", is_flag=True,
              help="Print the timing as one X.Org modeline instead of the summary.")
@click.option("--diagram", type=click.Path(dir_okay=False),
              help="Also draw the horizontal and vertical timing to scale into this .svg or .png.")
@click.option("--edid", "edid_file", type=click.Path(dir_okay=False), metavar="FILE",
              help="Also judge the timing against a display's EDID; exit 1 if it would refuse.")
@click.option("--force", is_flag=True, help="Replace a --diagram file synccore did not write.")
def show(spec: str, as_modeline: bool, diagram: str | None, edid_file: str | None, force: bool) -> None:
    """Validate SPEC and print its timing summary; writes nothing unless --diagram is given."""
    s = load_spec(spec)
    if s.modes and (diagram or edid_file):
        fail("--diagram and --edid take one timing; a multi-mode spec (modes:) has several")
    verdict = None
    if edid_file is not None:
        verdict = judge(load_edid(edid_file), s.pixel_clock_hz, s.horizontal, s.vertical)
    if diagram is not None:
        from synccore.picture.diagram import draw

        if Path(diagram).suffix.lower() not in (".svg", ".png"):
            fail(f"--diagram must name a .svg or .png file, got {diagram!r}")
        def render(path: Path) -> None:
            draw(s, path)

        save(diagram, render, force=force, option="--diagram")
    if as_modeline:
        for i, m in enumerate(s.modes or (s,)):
            name = f"{s.name}_mode{i}" if s.modes else s.name
            click.echo(format_line(name, m.pixel_clock_hz, m.horizontal, m.vertical))
        return
    print_summary(s, console(wide_pipe=True))
    if diagram is not None:
        console(wide_pipe=True).print(f"wrote {diagram}")
    if verdict is not None:
        click.echo(f"display ({edid_file}): {'accepts' if verdict.accepted else 'refuses'} "
                   "this timing")  # fmt: skip
        click.echo("".join(f"  {f}\n" for f in verdict.findings), nl=False)
        if not verdict.accepted:
            sys.exit(FAILED)


@click.command()
def schema() -> None:
    """Print the JSON Schema of the timing description format."""
    click.echo(json.dumps(json_schema(), indent=2))

