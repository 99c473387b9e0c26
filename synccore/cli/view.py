"""``synccore view``: see the picture before the board (simulated monitor)."""

from __future__ import annotations

import tempfile
from collections.abc import Callable
from fractions import Fraction
from pathlib import Path
from typing import TYPE_CHECKING, TypeVar

import click
from rich.table import Table

from synccore.analog import CAUTIONS, network_text
from synccore.cli._common import FAILED, console, fail, fail_spec, load_spec, save
from synccore.cli.clock import ACCEPT_OPTION, board_options, build_plan, link_plan_for, refusal
from synccore.errors import SpecError
from synccore.spec import Spec
from synccore.units import hz

T = TypeVar("T")

if TYPE_CHECKING:  # the picture modules load numpy and Pillow: only when the command runs
    from PIL.Image import Image

    from synccore.clocking.plan import ClockPlan
    from synccore.picture.monitor import Monitor
    from synccore.picture.run import Pins

MONITOR_CAUTION = (
    "This is a simulated monitor. Before wiring a real one, check the FPGA bank's I/O "
    "voltage against the display input, size any resistor DAC for 0-0.7 V into 75 ohm, "
    "and follow the panel's and backlight supply's datasheets."
)
"""The caution when no spec says what the pins drive (``--vcd`` alone)."""
VCD_HINT = ("give the SPEC too (synccore view SPEC --vcd ...) to check that the design places the "
            "picture where its spec's porches do")  # fmt: skip


@click.command(name="view")
@click.argument("spec", required=False, type=click.Path(dir_okay=False))
@click.option("--sim", "engine", default="icarus", show_default=True,
              type=click.Choice(("icarus", "ghdl", "verilator", "builtin", "model")),
              help="Engine running the first-light design: a simulator; builtin, its Amaranth "
                   "model in Amaranth's simulator; model, the pins computed from the timing "
                   "model (quickest, no HDL).")
@click.option("--pattern", default="bars", show_default=True,
              type=click.Choice(("bars", "grid", "gradient", "checker", "edges")))
@click.option("--out", "-o", "out_png", type=click.Path(dir_okay=False),
              help="PNG of the visible frame (default: <name>_view.png).")
@click.option("--monitor-range", metavar="H,V",
              help="Rates the monitor accepts, e.g. 30-83kHz,56-76Hz.")
@click.option("--vcd", type=click.Path(dir_okay=False, exists=True),
              help="Read the pins from your own simulation's VCD (or .fst) instead (needs --map).")
@click.option("--map", "mapping", metavar="LIST",
              help="With --vcd: pin=signal pairs, e.g. clk=top.clk,hsync=top.vga_hs,"
                   "vsync=top.vga_vs,de=top.de,red=top.r,green=top.g,blue=top.b.")
@click.option("--work-dir", type=click.Path(file_okay=False),
              help="Keep the simulation folder here (default: a temporary folder).")
@click.option("--link", type=click.Choice(("dvi",)), default=None,
              help="Send the picture over a TMDS link (DVI signalling) and receive it as a DVI "
                   "sink does: symbol boundaries from the control tokens, decoding, then the monitor. "
                   "Alone it runs the link core's words; with --board, the serial lanes of the whole "
                   "DVI top.")
@click.option("--board", "whole_board", is_flag=True,
              help="Simulate the board top from its clock pin (Icarus): the PLL as a model that "
                   "derives its clock from the primitive's parameters, the reset held until lock. "
                   "With --link dvi: the DVI top, its serialiser's I/O primitives as models, the "
                   "TMDS pins sampled at the bit rate.")
@board_options
@click.option(ACCEPT_OPTION, "accept_clock_error", is_flag=True,
              help="With --board: simulate even when the planned clock is outside the tolerance.")
@click.option("--edid", "edid_file", type=click.Path(dir_okay=False), metavar="FILE",
              help="Accept or refuse the signal as the display whose EDID this is would: its "
                   "listed timings, range limits and maximum pixel clock (needs SPEC).")
@click.option("--force", is_flag=True, help="Replace an -o file synccore did not write.")
@click.option("--dac", metavar="FILE|LIST", default=None,
              help="Also show the picture as a resistor DAC would give it into 75 ohms: a design "
                   "file (synccore dac --save) or settings inline, e.g. io=3.3V,series=E24 (needs SPEC).")
def view_command(spec: str | None, engine: str, pattern: str, out_png: str | None,
                 monitor_range: str | None, vcd: str | None, mapping: str | None,
                 work_dir: str | None, link: str | None, whole_board: bool, board_clock: str | None,
                 family: str | None, no_pll: bool, accept_clock_error: bool,
                 edid_file: str | None, force: bool, dac: str | None) -> None:  # fmt: skip
    """Simulate SPEC's first-light design and look at it as a monitor would: rates, mode, PNG.

    With ``--vcd`` the pins come from your own simulation; SPEC, when given too, is the
    timing that design is meant to send, and de is checked against its porches.  With
    ``--board`` the whole board top runs, from the oscillator pin through the PLL.
    """
    from synccore.picture.compare import check_pattern
    from synccore.picture.monitor import watch

    rng = _monitor_range(monitor_range)
    s = None
    clock_notes: list[str] = []
    clock_problems: list[str] = []
    _check_options(engine, vcd, link, whole_board, bool(board_clock or family or no_pll
                                                        or accept_clock_error))  # fmt: skip
    _need_spec(spec, edid_file, dac, out_png)
    if whole_board:
        if spec is None:
            raise click.UsageError("--board needs a SPEC")
        s = _load(spec)
        title, pins = (_link_board if link else _board)(s, spec, pattern, board_clock, family, no_pll,
                                                        accept_clock_error, work_dir, clock_notes,
                                                        clock_problems)  # fmt: skip
    elif link:
        if spec is None:
            raise click.UsageError("--link needs a SPEC")
        s = _load(spec)
        title = f"{s.name} ({pattern}) over a DVI link on {engine}"
        pins = _receive(s, pattern, engine, work_dir, clock_notes, clock_problems)
    elif vcd:
        s = load_spec(spec, single_mode="view") if spec is not None else None
        pins = _pins_from_vcd(vcd, mapping)
        title = f"{vcd}"
    else:
        if spec is None:
            raise click.UsageError("give a SPEC, or --vcd with --map")
        if (s := _load(spec, woven=True)).interlaced:
            return _view_woven(s, pattern, engine, work_dir, out_png, force, bool(edid_file or dac or rng))
        title = f"{s.name} ({pattern}) on {engine}"
        pins = _simulate(s, pattern, engine, work_dir)
    name = s.name if s is not None and not vcd else Path(vcd or "view").stem
    mon = watch(pins, monitor_range=rng, spec=s)
    mon.notes[:0] = clock_notes
    mon.problems[:0] = clock_problems
    if s is not None and not vcd:
        check_pattern(mon, s, pattern)
    if s is None and mon.offset is not None and mon.offset != (0, 0):
        mon.notes.append(VCD_HINT)
    if edid_file is not None and s is not None:
        _judge_edid(mon, s, pins, edid_file)
    image = _through_dac(mon, s, dac) if dac is not None and s is not None else mon.image
    target = Path(out_png or f"{name}_view.png")
    _show(mon, title, target, s, tmds=link is not None, image=image, force=force)
    if mon.problems:
        fail((f"PROBLEM {problem}" for problem in mon.problems), code=FAILED)


def _view_woven(s: Spec, pattern: str, engine: str, work_dir: str | None, out_png: str | None,
                force: bool, judged: bool) -> None:  # fmt: skip
    """An interlaced spec: its first-light design's two fields woven into one frame (picture/weave.py).
    ``judged``: --edid, --dac or --monitor-range was given, which do not apply yet."""
    from synccore.picture.weave import view_interlaced

    if judged:
        fail("--edid, --dac and --monitor-range do not apply to an interlaced spec yet")

    mon = _in_folder(work_dir, "synccore-view-",
                     lambda folder: view_interlaced(s, pattern, engine=engine, work_dir=folder))
    _show(mon, f"{s.name} ({pattern}, interlaced, woven) on {engine}", Path(out_png or f"{s.name}_view.png"),
          s, image=mon.image, force=force)  # fmt: skip
    if mon.problems:
        fail((f"PROBLEM {problem}" for problem in mon.problems), code=FAILED)


def _check_options(engine: str, vcd: str | None, link: str | None, whole_board: bool,
                   board_given: bool) -> None:  # fmt: skip
    """One line and exit 2 for options that do not go together."""
    if not whole_board and board_given:
        fail(f"--board-clock, --family, --no-pll and {ACCEPT_OPTION} need --board")
    if link and (vcd or engine == "builtin"):
        fail("--link dvi simulates the link core on icarus, ghdl, verilator or model (with --board, "
             "the whole DVI top on icarus); drop --vcd and --sim builtin")  # fmt: skip
    if whole_board and (vcd or engine != "icarus"):
        fail("--board: the board top runs in Icarus only (the PLL models are Verilog); "
             "drop --vcd and --sim")  # fmt: skip


def _judge_edid(mon: Monitor, s: Spec, pins: Pins, edid_file: str) -> None:
    """The display of ``edid_file`` accepts (a note) or refuses (a problem) the signal: the
    spec's raster at the pixel clock the pins were sampled on (measured with --board)."""
    from fractions import Fraction

    from synccore.cli.edid import load_edid
    from synccore.timings.edid_accept import judge

    clock = Fraction(round(1 / pins.period_s))
    verdict = judge(load_edid(edid_file), clock, s.horizontal, s.vertical)
    said = "accepts" if verdict.accepted else "refuses"
    line = f"the display of {edid_file} {said} this signal: " + "; ".join(verdict.findings)
    (mon.notes if verdict.accepted else mon.problems).append(line)


def _need_spec(spec: str | None, edid_file: str | None, dac: str | None, out_png: str | None) -> None:
    if out_png is not None and Path(out_png).suffix.lower() != ".png":
        fail(f"--out must name a .png file, got {out_png!r}")
    if edid_file is not None and spec is None:
        fail("--edid needs a SPEC: the timing the display judges")
    if dac is not None and spec is None:
        fail("--dac needs a SPEC: its colour depth gives the DAC's bits")


def _through_dac(mon: Monitor, s: Spec, dac: str) -> Image | None:
    """The ideal picture on the left, the DAC's levels into 75 ohms on the right."""
    from synccore.cli.dac import channel_bits, dac_from_option
    from synccore.picture.dac import GAMMA_NOTE, analog_image, side_by_side

    design = dac_from_option(s, dac)
    for name, choice in design.channels.items():
        ch = choice.best
        mon.notes.append(f"DAC {name}: {network_text(ch)}; full scale {float(ch.levels[-1]):.3f} V "
                         f"into {float(design.options.load_ohm):g} ohms")  # fmt: skip
    mon.problems += [f"DAC {p}" for p in design.problems]
    if mon.image is None:
        return None
    mon.notes.append("left: the codes as an ideal DAC gives them; right: " + GAMMA_NOTE)
    mon.notes.append(CAUTIONS)
    return side_by_side(mon.image, analog_image(mon.image, design, channel_bits(s)))


def _monitor_range(text: str | None) -> tuple[tuple[float, float], tuple[float, float]] | None:
    """The rates ``--monitor-range`` gives, or None when it is not given."""
    from synccore.picture.monitor import parse_range

    if not text:
        return None
    try:
        return parse_range(text)
    except ValueError as err:
        raise click.BadParameter(str(err), param_hint="--monitor-range") from None


def _pins_from_vcd(vcd: str, mapping: str | None) -> Pins:
    """The pins recorded in the user's own VCD (or FST), found through ``--map``."""
    from synccore.picture.vcd import VcdError, parse_map, read

    if not mapping:
        raise click.UsageError("--vcd needs --map, e.g. --map clk=top.clk,hsync=top.hs,vsync=top.vs")
    try:
        return read(vcd, parse_map(mapping))
    except VcdError as err:
        fail(str(err))


def _load(spec: str, *, woven: bool = False) -> Spec:
    """The spec, if it loads and its first-light pattern can be drawn; exit 2 otherwise.
    ``woven``: the caller weaves an interlaced spec's fields; the others refuse it."""
    from synccore.model.pattern import pattern_problems

    s = load_spec(spec, single_mode="view")
    if s.interlaced and not woven:
        fail("--board and --link are progressive only so far: view an interlaced spec without "
             "them (its two fields woven into one frame)")  # fmt: skip
    problems = pattern_problems(s)
    if problems:
        fail_spec(SpecError(problems))
    return s


def _simulate(s: Spec, pattern: str, engine: str, work_dir: str | None) -> Pins:
    """The pins of the first-light design run on ``engine``, in ``work_dir`` or a temporary one."""
    from synccore.picture.run import simulate

    return _in_folder(work_dir, "synccore-view-",
                      lambda folder: simulate(s, pattern, engine=engine, work_dir=folder))


def _receive(s: Spec, pattern: str, engine: str, work_dir: str | None, notes: list[str],
             problems: list[str]) -> Pins:  # fmt: skip
    """The pins a DVI sink decodes from the link core's lanes; its findings go to ``problems``."""
    from synccore.picture.link import receive
    from synccore.picture.link_run import simulate_link

    lanes = _in_folder(work_dir, "synccore-link-",
                       lambda folder: simulate_link(s, pattern, engine=engine, work_dir=folder))
    rec = receive(lanes)
    notes += [f"the sink read {lanes.source}", *rec.notes]
    problems += rec.problems
    if rec.pins is None:
        fail((f"PROBLEM {problem}" for problem in problems), code=FAILED)
    return rec.pins


def _board(s: Spec, spec: str, pattern: str, board_clock: str | None, family: str | None,
           no_pll: bool, accept_clock_error: bool, work_dir: str | None, notes: list[str],
           problems: list[str]) -> tuple[str, Pins]:  # fmt: skip
    """``--board``: the title and the pins of the board top run from its clock pin."""
    plan = build_plan(s, board_clock, family, no_pll)
    if not plan.within_tolerance and not accept_clock_error:
        fail(refusal(plan, spec, board_clock, option="--board", then="view"))
    title = f"{s.name}_board ({pattern}) from its {hz(plan.f_board)} pin on icarus"
    return title, _simulate_board(plan, pattern, work_dir, notes, problems)


def _link_board(s: Spec, spec: str, pattern: str, board_clock: str | None, family: str | None,
                no_pll: bool, accept_clock_error: bool, work_dir: str | None, notes: list[str],
                problems: list[str]) -> tuple[str, Pins]:  # fmt: skip
    """``--link dvi --board``: the DVI top from its clock pin, its TMDS pins read by the sink;
    the title and the pins the sink decodes (its findings and the clocks measured go to
    ``notes`` and ``problems``)."""
    from synccore.clocking.link_report import io_text, link_refusal
    from synccore.picture.link import receive
    from synccore.picture.link_serial import simulate_dvi

    if no_pll:
        fail("--link dvi plans its own clocks through the family's PLL: drop --no-pll")
    plan = link_plan_for(s, board_clock, family)
    if plan.problems:
        fail_spec(SpecError(list(plan.problems)))
    # beyond the I/O rating is a finding of the view, not a refusal
    why = link_refusal(plan, accept_clock_error=accept_clock_error, accept_io_limit=True,
                       ways=(ACCEPT_OPTION, ""))  # fmt: skip
    if why is not None:
        fail(why)
    assert plan.serial_hz is not None and plan.pixel_hz is not None  # a setting exists
    run = _in_folder(work_dir, "synccore-dvi-",
                     lambda folder: simulate_dvi(plan, pattern, work_dir=folder))
    for label, measured, planned in (("serial clock", run.f_serial_hz, plan.serial_hz),
                                     ("pixel clock", run.f_pixel_hz, plan.pixel_hz)):  # fmt: skip
        _measured_clock(f"{label} measured on the DVI top", measured, planned, plan.f_board,
                        "the PLL's parameters", notes, problems)  # fmt: skip
    if run.mismatches:
        problems.append(f"{run.mismatches} samples where a TMDS _n pin was not the inverse of its _p pin")
    if not plan.fits_io:
        problems.append(io_text(plan))
    rec = receive(run.lanes)
    notes += [f"the sink read {run.lanes.source}", *rec.notes]
    problems += rec.problems
    if rec.pins is None:
        fail((f"PROBLEM {problem}" for problem in problems), code=FAILED)
    return f"{s.name}_dvi ({pattern}) from its board clock pin, serial lanes on icarus", rec.pins


def _simulate_board(plan: ClockPlan, pattern: str, work_dir: str | None, notes: list[str],
                    problems: list[str]) -> Pins:  # fmt: skip
    """The pins of the board top; the pixel clock it measured goes to ``notes`` or ``problems``."""
    from synccore.picture.run import simulate_board

    run = _in_folder(work_dir, "synccore-board-",
                     lambda folder: simulate_board(plan, pattern, work_dir=folder))
    assert plan.best is not None  # build_plan exits on a plan without a setting
    _measured_clock("core clock measured on the board top", run.f_core_hz, plan.best.f_out,
                    plan.f_board, "the clock primitive's parameters", notes, problems)  # fmt: skip
    return run.pins


def _in_folder(work_dir: str | None, prefix: str, run: Callable[[Path], T]) -> T:
    """``run`` in ``work_dir``, or in a temporary folder removed afterwards; one line and
    exit 2 when the simulator is missing or fails."""
    from synccore.picture.run import ViewError

    try:
        if work_dir:
            return run(Path(work_dir))
        with tempfile.TemporaryDirectory(prefix=prefix) as tmp:
            return run(Path(tmp))
    except ViewError as err:
        fail(str(err))


def _measured_clock(what: str, measured: float, planned: Fraction, f_board: Fraction, source: str,
                    notes: list[str], problems: list[str]) -> None:  # fmt: skip
    """A clock measured in a board simulation: a note when it is the planned one, else a problem."""
    line = f"{what}: {measured / 1e6:.6f} MHz from the {hz(f_board)} pin (planned {hz(planned)})"
    # the models round each edge to 1 fs: a few parts in 10^8 at most
    if abs(measured - float(planned)) > float(planned) * 1e-6:
        problems.append(f"{line}: {source} do not give the planned clock")
    else:
        notes.append(line)


def _show(mon: Monitor, title: str, target: Path, spec: Spec | None, *, tmds: bool = False,
          image: Image | None = None, force: bool = False) -> None:  # fmt: skip
    """The monitor's summary table and notes, the PNG of the visible frame, the caution."""
    out = console()
    table = Table(title=f"simulated monitor: {title}", title_justify="left", show_header=False)
    table.add_column(style="bold")
    table.add_column()
    for label, value in mon.summary():
        table.add_row(label, value)
    out.print(table)
    for note in mon.notes:
        out.print(f"note: {note}")
    if image is not None:
        save(target, image.save, force=force, option="--out")
        out.print(f"wrote {target}")
    if spec is None:
        out.print(MONITOR_CAUTION, style="dim")
    else:
        from synccore.cli.build import cautions

        out.print("This is a simulated monitor. " + " ".join(cautions(spec, tmds=tmds)), style="dim")
