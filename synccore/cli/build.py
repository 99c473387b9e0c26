"""``synccore build``: validate a spec and write its files (core, benches, pattern, clock)."""

from __future__ import annotations

import click

from synccore.api import write
from synccore.cli._common import console, fail, fail_spec, load_spec
from synccore.cli.clock import (
    ACCEPT_OPTION,
    board_options,
    build_plan,
    link_plan_for,
    print_link,
    print_plan,
    refusal,
)
from synccore.cli.show import print_summary
from synccore.cli.verify import run_verify
from synccore.clocking.link_report import link_refusal
from synccore.errors import SpecError, ToolError
from synccore.model.pattern import PATTERNS
from synccore.spec import Spec

CAUTIONS = {
    "monitor": "Hardware (monitor): match the FPGA bank's I/O voltage to the display input: VGA "
               "syncs take TTL-like levels and VGA colour 0-0.7 V into 75 ohm, so size the resistor "
               "DAC for that load and the bank's voltage; a DVI/HDMI transmitter takes what its "
               "datasheet gives. See the README, 'Hardware cautions'.",
    "panel": "Hardware (LCD panel): drive its inputs at the logic level its datasheet gives, and "
             "follow the datasheet for the supply sequence and the backlight supply (often a boost "
             "converter at tens of volts). See the README, 'Hardware cautions'.",
    "tmds": "Hardware (TMDS link): TMDS is a DC-coupled current-mode link terminated at the sink "
            "(50 ohm to 3.3 V per line); drive the pairs only from pins and the I/O standard the pin "
            "file names (or a level-shifting circuit), keep the connector's 5 V and hot-plug lines off "
            "the FPGA's pins, and follow the board's schematic. See docs/dvi.md.",
}  # fmt: skip


def display_kind(spec: Spec) -> str:
    """``"panel"`` or ``"monitor"``: which display the spec's signals look made for.

    The rule: a spec is a panel's when it is driven by data enable rather than by a
    monitor's timing: when it was fitted to datasheet ranges (``fit:``), or when it
    gives its own numbers and no library mode of its active size matches its rates,
    polarities and sync widths as the simulated monitor matches them
    (:func:`synccore.picture.naming.spec_mode`).  A library mode (``standard:``), a
    CVT or GTF formula, or numbers that match a library mode are a monitor's.
    """
    from synccore.picture.naming import spec_mode

    if spec.origin.startswith("fitted"):
        return "panel"
    if spec.origin or spec_mode(spec) is not None:
        return "monitor"
    return "panel"


def cautions(spec: Spec, *, tmds: bool = False) -> list[str]:
    """The hardware cautions that fit what ``spec`` drives; only the link's when ``tmds``
    (a TMDS link is written: the VGA and panel levels do not apply)."""
    return [CAUTIONS["tmds"]] if tmds else [CAUTIONS[display_kind(spec)]]


@click.command()
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--out", "-o", "out_dir", required=True, type=click.Path(file_okay=False),
              help="Folder for the generated files (created if missing).")
@click.option("--force", is_flag=True,
              help="Overwrite files in the folder even if synccore did not generate them.")
@click.option("--clock", "with_clock", is_flag=True,
              help="Also write the clock wrapper OUT/<name>_clock.v/.vhd and its constraints; "
                   "with --pattern also the board top OUT/<name>_board.* and its pin file.")
@board_options
@click.option(ACCEPT_OPTION, "accept_clock_error", is_flag=True,
              help="With --clock: write the wrapper even when the clock reached is outside "
                   "the display's tolerance (otherwise refused, with the command that fixes it).")
@click.option("--testbench", "with_testbench", is_flag=True,
              help="Also write self-checking test benches OUT/<name>_tb.v and OUT/<name>_tb.vhd.")
@click.option("--verify", "then_verify", is_flag=True,
              help="Then run the core in every simulator found and measure it (see `verify`).")
@click.option("--pattern", type=click.Choice(PATTERNS), default=None,
              help="Also write a test-pattern generator and a first-light top level "
                   "(OUT/<name>_pattern.*, OUT/<name>_top.*).")
@click.option("--link", type=click.Choice(("dvi",)), default=None,
              help="Write the first-light design for a DVI/HDMI display: TMDS encoders, the "
                   "family's serialiser, the link clocks and the top OUT/<name>_dvi.* with its "
                   "pin file (needs --family and --board-clock, or the spec's board section).")
@click.option("--accept-io-limit", "accept_io_limit", is_flag=True,
              help="With --link: write the design even when the link's bit rate exceeds the "
                   "family's I/O rating.")
def build(spec: str, out_dir: str, force: bool, with_clock: bool, board_clock: str | None,
          family: str | None, no_pll: bool, accept_clock_error: bool, with_testbench: bool,
          then_verify: bool, pattern: str | None, link: str | None,
          accept_io_limit: bool) -> None:  # fmt: skip
    """Validate SPEC and write its core as OUT/<name>.v and OUT/<name>.vhd."""
    s = load_spec(spec)
    out = console(wide_pipe=True)
    if s.modes and (link or with_clock or with_testbench or pattern):
        fail("a multi-mode spec (modes:) builds its core only yet: drop --clock, --link, "
             "--testbench and --pattern")  # fmt: skip
    if link is not None:
        _build_link(s, spec, out_dir, force, board_clock, family, no_pll, with_clock, accept_clock_error,
                    accept_io_limit, with_testbench, pattern or "bars")  # fmt: skip
        if then_verify:
            run_verify(s, engines=None, frames=2, waves=False, work_dir=None, out=out)
        return
    if accept_io_limit:
        fail("--accept-io-limit needs --link")
    if not with_clock and (board_clock or family or no_pll or accept_clock_error):
        fail(f"--board-clock, --family, --no-pll and {ACCEPT_OPTION} need --clock or --link")
    plan = build_plan(s, board_clock, family, no_pll) if with_clock else None
    if plan is not None and not plan.within_tolerance and not accept_clock_error:
        fail(refusal(plan, spec, board_clock))
    try:
        written = write(s, out_dir, testbench=with_testbench, pattern=pattern, clock=plan,
                        accept_clock_error=accept_clock_error, force=force)  # fmt: skip
    except SpecError as err:
        fail_spec(err)
    except ToolError as err:
        fail(str(err))
    print_summary(s, out)
    if plan is not None:
        print_plan(plan, out)
    for path in written:
        out.print(f"wrote {path}")
    if pattern is not None and plan is not None:
        out.print(f"first-light design: synthesise {s.name}_board (board clock to pins, pattern "
                  f"{pattern}) after filling in the pins of its pin file; see it first with "
                  f"`synccore view {spec} --pattern {pattern}`")  # fmt: skip
    elif pattern is not None:
        out.print(f"first-light design: synthesise {s.name}_top (pattern {pattern}); "
                      f"see it first with `synccore view {spec} --pattern {pattern}`")  # fmt: skip
    for caution in cautions(s):
        out.print(caution, style="dim")
    if then_verify and s.modes:
        from synccore.cli.verify_modes import run_verify_modes

        run_verify_modes(s, engines=None, changes=3, seed=1, work_dir=None, out=out)
    elif then_verify:
        run_verify(s, engines=None, frames=2, waves=False, work_dir=None, out=out)


def _build_link(s: Spec, spec: str, out_dir: str, force: bool, board_clock: str | None,
                family: str | None, no_pll: bool, with_clock: bool, accept_clock_error: bool,
                accept_io_limit: bool, with_testbench: bool, pattern: str) -> None:  # fmt: skip
    """``build --link dvi``: plan the link's clocks, refuse what cannot work, write the design."""
    if with_clock or no_pll:
        fail("--link dvi plans its own clocks through the family's PLL: drop --clock and --no-pll")
    plan = link_plan_for(s, board_clock, family)
    if plan.problems:
        fail_spec(SpecError(list(plan.problems)))
    out = console(wide_pipe=True)
    why = link_refusal(plan, accept_clock_error=accept_clock_error, accept_io_limit=accept_io_limit,
                       ways=(ACCEPT_OPTION, "--accept-io-limit"))  # fmt: skip
    if why is not None:
        fail(why)
    try:
        written = write(s, out_dir, testbench=with_testbench, pattern=pattern, link=plan,
                        accept_clock_error=accept_clock_error, accept_io_limit=accept_io_limit,
                        force=force)  # fmt: skip
    except SpecError as err:
        fail_spec(err)
    except ToolError as err:
        fail(str(err))
    print_summary(s, out)
    print_link(plan, out)
    for path in written:
        out.print(f"wrote {path}")
    out.print(f"first-light DVI design: synthesise {s.name}_dvi (board clock to TMDS pins, pattern "
              f"{pattern}) after filling in the pins of its pin file; see it first with "
              f"`synccore view {spec} --link dvi --pattern {pattern}`")  # fmt: skip
    for caution in cautions(s, tmds=True):
        out.print(caution, style="dim")
