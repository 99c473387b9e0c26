"""``synccore dac``: a resistor DAC per colour channel for a VGA output, designed and judged.

The channels and their bits come from the spec's ``color`` section, the one source of
truth the first-light design uses too.  Options, an optional design file (``--design``)
and its ``resistors`` (the network you built, judged instead of designing one) give the
settings (:mod:`synccore.analog.settings`).  Exit 0 when every aim is met, 1 when the
best network misses one, 2 on bad input.
"""

from __future__ import annotations

import json
from pathlib import Path

import click
from rich.console import Console
from rich.markup import escape

from synccore.analog import (
    CAUTIONS,
    SERIES,
    TOPOLOGIES,
    DacDesign,
    DesignError,
    Settings,
    as_json,
    channel_facts,
    check,
    design_text,
    inline,
    read,
    realise,
)
from synccore.analog.report import network_text
from synccore.cli._common import FAILED, console, fail, fail_spec, load_spec, save
from synccore.errors import SpecError
from synccore.spec import Spec

OPTION_LABELS = {"io": "--io", "load": "--load", "series": "--series", "topology": "--topology",
                 "pin_resistance": "--pin-resistance", "pin_current": "--pin-current",
                 "bank_current": "--bank-current"}  # fmt: skip


def channel_bits(spec: Spec) -> dict[str, int]:
    """The DAC's channels and bits: the spec's colour depth, as the first-light design has it."""
    return {"red": spec.color.red, "green": spec.color.green, "blue": spec.color.blue}


def dac_for(spec: Spec, design_file: str | None, given: dict[str, str | None]) -> DacDesign:
    """The design from a file's settings with the options on top; bad input exits 2."""
    try:
        base = read(design_file) if design_file is not None else Settings({})
        over = check({k: (v, None) for k, v in given.items() if v is not None}, OPTION_LABELS)
        return realise(base.merged(over), channel_bits(spec))
    except SpecError as err:
        fail_spec(err)
    except DesignError as err:
        fail(str(err))


def dac_from_option(spec: Spec, value: str) -> DacDesign:
    """``view --dac``: a design file's path, or the settings inline (``io=3.3V,series=E24``)."""
    if "=" in value and not Path(value).exists():
        try:
            return realise(inline(value, "--dac"), channel_bits(spec))
        except SpecError as err:
            fail_spec(err)
        except DesignError as err:
            fail(f"--dac: {err}")
    return dac_for(spec, value, {})


def print_design(d: DacDesign, out: Console) -> None:
    opts = d.options
    out.print(f"[bold]resistor DAC[/bold]: {opts.topology}, {opts.series} values, from "
              f"{float(opts.io_v):g} V into {float(opts.load_ohm):g} Ω, aiming at 0.7 V full scale "
              f"(VESA video level)")  # fmt: skip
    for name, choice in d.channels.items():
        out.print(f"[bold]{name}[/bold] ({choice.best.bits} bits)")
        rows = channel_facts(choice.best)
        width = max(len(label) for label, _ in rows)
        for label, value in rows:
            out.print(f"  {escape(label.ljust(width))}  {escape(value)}")
        if choice.runners_up:
            out.print("  runners-up")
            for r in choice.runners_up:
                figures = (f"full scale {float(r.full_scale_error) * 100:+.2f} %, "
                           f"|DNL| {float(r.worst_dnl):.3f} LSB")  # fmt: skip
                out.print(f"    {escape(network_text(r))}  ({figures})")
    out.print(f"[bold]bank[/bold]: {float(d.bank_current_a) * 1000:.2f} mA at most from the bank "
              "for all channels together (all on one bank)")  # fmt: skip
    for problem in d.problems:
        out.print(f"PROBLEM {escape(problem)}")


@click.command("dac")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--io", default=None, metavar="VOLTS", help="The bank's I/O voltage, e.g. 3.3V.")
@click.option("--load", default=None, metavar="OHMS", help="The monitor's termination (default 75).")
@click.option("--series", type=click.Choice(tuple(SERIES)), default=None,
              help="Resistor values from this IEC 60063 series (default E24).")
@click.option("--topology", type=click.Choice(TOPOLOGIES), default=None,
              help="Binary-weighted resistors or an R-2R ladder (default weighted).")
@click.option("--pin-resistance", default=None, metavar="OHMS",
              help="The pin's output resistance, in series with each resistor (default 0).")
@click.option("--pin-current", default=None, metavar="AMPS", help="Limit per pin to judge, e.g. 8mA.")
@click.option("--bank-current", default=None, metavar="AMPS", help="Limit for the bank, e.g. 48mA.")
@click.option("--design", "design_file", type=click.Path(dir_okay=False), default=None,
              help="A design file: settings, and the network you built to judge it.")
@click.option("--json", "as_json_out", is_flag=True, help="Print the design as JSON.")
@click.option("--draw", type=click.Path(dir_okay=False), help="Draw the networks into this .svg or .png.")
@click.option("--plot", type=click.Path(dir_okay=False),
              help="Plot level against code into this .svg or .png.")
@click.option("--save", "save_to", type=click.Path(dir_okay=False),
              help="Write the design file (for view --dac).")
@click.option("--force", is_flag=True, help="Replace --draw/--plot/--save files synccore did not write.")
def dac_command(spec: str, io: str | None, load: str | None, series: str | None, topology: str | None,
                pin_resistance: str | None, pin_current: str | None, bank_current: str | None,
                design_file: str | None, as_json_out: bool, draw: str | None, plot: str | None,
                save_to: str | None, force: bool) -> None:  # fmt: skip
    """Design (or judge) a VGA resistor DAC for SPEC's colour depth: 0.7 V into 75 Ω."""
    for option, target in (("--draw", draw), ("--plot", plot)):
        if target is not None and Path(target).suffix.lower() not in (".svg", ".png"):
            fail(f"{option} must name a .svg or .png file, got {target!r}")
    s = load_spec(spec)
    d = dac_for(s, design_file, {"io": io, "load": load, "series": series, "topology": topology,
                                 "pin_resistance": pin_resistance, "pin_current": pin_current,
                                 "bank_current": bank_current})  # fmt: skip
    _write_files(d, draw, plot, save_to, force)
    if as_json_out:
        click.echo(json.dumps(as_json(d), indent=2))
    else:
        out = console()
        print_design(d, out)
        for target in filter(None, (draw, plot, save_to)):
            out.print(f"wrote {target}")
        out.print(CAUTIONS, style="dim")
    if d.problems:
        raise SystemExit(FAILED)


def _write_files(d: DacDesign, draw: str | None, plot: str | None, design_file: str | None,
                 force: bool) -> None:  # fmt: skip
    from synccore.picture.dac import draw_schematic, plot_levels

    if draw is not None:
        save(draw, lambda path: draw_schematic(d, path), force=force, option="--draw")
    if plot is not None:
        save(plot, lambda path: plot_levels(d, path), force=force, option="--plot")
    if design_file is not None:
        save(design_file, design_text(d), force=force, option="--save")
