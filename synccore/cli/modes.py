"""Command-line commands for standard timings: ``synccore modes`` and ``synccore new``.

Kept apart from :mod:`synccore.cli.main` so the core commands stay small; cli.py
registers these with ``main.add_command``.
"""

from __future__ import annotations

import json
import re
from decimal import Decimal
from fractions import Fraction
from pathlib import Path
from typing import NoReturn

import click
from rich.table import Table

from synccore.cli._common import FAILED, console, fail, save
from synccore.cli.edid import load_edid
from synccore.spec import Axis, CoreOptions, Spec, parse_frequency
from synccore.timings import formulas, modeline, modes
from synccore.timings.writing import spec_text
from synccore.units import fixed, hz, in_unit


def _bad(message: str) -> NoReturn:
    fail(message)


@click.command("modes")
@click.argument("filter_words", nargs=-1, metavar="[FILTER]...")
@click.option("--max-clock", metavar="FREQ",
              help='Only modes whose pixel clock is at most FREQ, e.g. "100MHz".')
@click.option("--json", "as_json", is_flag=True,
              help="Print the entries as JSON, in the spec format's keys, for scripts.")
def modes_command(filter_words: tuple[str, ...], max_clock: str | None,
                  as_json: bool) -> None:  # fmt: skip
    """List the built-in standard timings (VESA DMT, CTA-861).

    FILTER words must all appear in the mode's name, source or note, e.g.
    `synccore modes 1920x1080`, `synccore modes cta @60`, `synccore modes rb`;
    a DMT ID may be written 55h or 0x55.
    """
    limit: Fraction | None = None
    if max_clock is not None:
        limit = parse_frequency(max_clock)
        if limit is None:
            _bad(f'--max-clock: must be a frequency like "100MHz", got {max_clock!r}')
    found = modes.search(" ".join(filter_words), max_clock_hz=limit)
    if as_json:
        click.echo(json.dumps([m.as_spec_keys() for m in found], indent=2))
        return
    if not found:
        fail("no library entry matches", code=FAILED)
    table = Table(title_justify="left")
    for head, right in (("mode", False), ("refresh Hz", True), ("pixel clock", True),
                        ("line rate kHz", True), ("TMDS bit rate", True), ("source", False),
                        ("note", False)):  # fmt: skip
        table.add_column(head, justify="right" if right else "left")
    for m in found:
        table.add_row(m.name, fixed(m.refresh_hz, 3), hz(m.pixel_clock_hz),
                      in_unit(m.line_rate_hz, "kHz"), _bits(m.tmds_bit_rate),
                      m.source + (f" = {', '.join(m.also)}" if m.also else ""), m.note)  # fmt: skip
    out = console()
    out.width = max(out.width, 140)  # one row per mode, even in a narrow pipe
    out.print(table)


def _bits(rate: Fraction) -> str:
    return hz(rate).replace("Hz", "bit/s")


# ----------------------------------------------------------------------- new

_SIZE = re.compile(r"\s*([0-9]+)\s*x\s*([0-9]+)\s*@\s*([0-9]+(?:\.[0-9]+)?)\s*\Z", re.IGNORECASE)


def _default_name(width: int, height: int, rate: str) -> str:
    return f"timing_{width}x{height}_{rate.replace('.', 'p')}"


@click.command("new")
@click.argument("mode", required=False)
@click.option("--out", "-o", "out", default="-", show_default=True, metavar="FILE",
              help="Where to write the spec; - writes to standard output.")
@click.option("--method", type=click.Choice(formulas.METHODS),
              help="Compute WIDTHxHEIGHT@RATE with a formula instead of the library.")
@click.option("--video-optimized", is_flag=True,
              help="With --method cvt-rb2: lower the clock by 1000/1001.")
@click.option("--modeline", "modeline_text", metavar="LINE",
              help='Start from an X.Org modeline, e.g. "74.25 1280 1390 1430 1650 720 725 '
                   '730 750 +hsync +vsync".')
@click.option("--edid", "edid_file", metavar="FILE",
              help="Start from a detailed timing of a display's EDID (binary or hex dump).")
@click.option("--pick", type=click.IntRange(min=1), metavar="N",
              help="With --edid: the Nth detailed timing (default 1, the preferred one).")
@click.option("--name", metavar="IDENT", help="Module / entity name (default from the mode).")
@click.option("--force", is_flag=True, help="Overwrite FILE if it exists.")
def new_command(mode: str | None, out: str, method: str | None, video_optimized: bool,
                modeline_text: str | None, edid_file: str | None, pick: int | None,
                name: str | None, force: bool) -> None:  # fmt: skip
    """Write a complete, editable timing description for MODE.

    MODE is a library name or source (`1280x720@60`, `DMT 55h` or `0x55`, `CTA VIC 16`,
    `1280x768@60 rb`; see `synccore modes`), or WIDTHxHEIGHT@RATE with --method.
    """
    notes: tuple[str, ...]
    if pick is not None and edid_file is None:
        _bad("--pick needs --edid")
    if edid_file is not None:
        if mode or method or modeline_text:
            _bad("--edid replaces MODE, --method and --modeline; give one")
        clock, h, v, default, origin, notes = _from_edid(edid_file, pick or 1)
    elif modeline_text is not None:
        if mode or method:
            _bad("--modeline replaces MODE and --method; give one")
        try:
            ml = modeline.parse(modeline_text)
        except modeline.ModelineError as exc:
            _bad(f"--modeline: {exc}")
            return
        rate = fixed(ml.pixel_clock_hz / (ml.horizontal.total * ml.vertical.total), 2)
        default = _default_name(ml.horizontal.active, ml.vertical.active, rate)
        origin = f"the modeline {ml.name!r}" if ml.name else "a modeline"
        clock, h, v, notes = ml.pixel_clock_hz, ml.horizontal, ml.vertical, ()
    elif mode is None:
        _bad("give MODE (e.g. 1280x720@60) or --modeline")
        return
    elif method is not None:
        m = _SIZE.match(mode)
        if not m:
            _bad(f"with --method, MODE must be WIDTHxHEIGHT@RATE, got {mode!r}")
            return
        width, height, rate = int(m.group(1)), int(m.group(2)), m.group(3)
        try:
            r = formulas.compute(method, width, height, Fraction(Decimal(rate)),
                                 video_optimized=video_optimized)  # fmt: skip
        except formulas.FormulaError as exc:
            _bad(str(exc))
            return
        default = _default_name(width, height, rate)
        origin = f"the {method.upper()} formula ({width}x{height}@{rate})"
        clock, h, v, notes = r.pixel_clock_hz, r.horizontal, r.vertical, r.notes
    else:
        if video_optimized:
            _bad("--video-optimized needs --method cvt-rb2")
        clock, h, v, default, origin, notes = _from_library(mode)
    # lead 1: the first-light pattern's one pipeline stage then meets de undelayed (docs/picture.md).
    spec = Spec(name=name or default, pixel_clock_hz=clock, horizontal=h, vertical=v,
                core=CoreOptions(lead=1))
    header = (f"Timing description written by `synccore new` from {origin}.",
              *(f"Note: {n}" for n in notes))  # fmt: skip
    _put_out(spec_text(spec, comments=header), out, force)


def _from_library(mode: str) -> tuple[Fraction, Axis, Axis, str, str, tuple[str, ...]]:
    """The library entry MODE names: its numbers, a name, where it came from, its note."""
    try:
        found = modes.find(mode)
    except modes.ModeLookupError as exc:
        _bad(f"MODE {exc}, got {mode!r}")
    default = _default_name(found.horizontal.active, found.vertical.active,
                            found.refresh_label)  # fmt: skip
    notes = (found.note,) if found.note else ()
    return (found.pixel_clock_hz, found.horizontal, found.vertical, default,
            f"{found.source} ({found.name})", notes)  # fmt: skip


def _from_edid(path: str, pick: int) -> tuple[Fraction, Axis, Axis, str, str, tuple[str, ...]]:
    """Detailed timing ``pick`` of the EDID at ``path``: its numbers, a name, where it came from."""
    found = load_edid(path)
    timings = found.all_detailed
    if not timings:
        _bad(f"--edid {path}: the EDID has no detailed timing")
    if pick > len(timings):
        _bad(f"--pick {pick}: the EDID has {len(timings)} detailed timing(s)")
    d = timings[pick - 1]
    if d.refusal:
        _bad(f"--edid {path}: detailed timing {pick} ({d.name}) is {d.refusal}")
    for problem in found.problems:
        click.echo(f"{path}: warning: {problem}", err=True)
    who = " ".join(x for x in (found.manufacturer, found.monitor_name) if x)
    origin = (f"detailed timing {pick}{' (preferred)' if pick == 1 else ''} ({d.where}) "
              f"of the EDID {Path(path).name} ({who})")  # fmt: skip
    notes = tuple(f"the EDID is damaged: {p}" for p in found.problems)
    rate = d.name.split("@")[1]
    default = _default_name(d.horizontal.active, d.vertical.active, rate)
    return Fraction(d.pixel_clock_hz), d.horizontal, d.vertical, default, origin, notes


def _put_out(text: str, out: str, force: bool) -> None:
    if out == "-":
        click.echo(text, nl=False)
        return
    save(out, text, force=force, option="-o")
    click.echo(f"wrote {out}", err=True)
