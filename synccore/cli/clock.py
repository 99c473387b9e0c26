"""The ``clock`` command and the ``build --clock`` options: from the board clock to the core clock.

Thin, like :mod:`synccore.cli.main`: it picks the board clock and family
(options first, then the spec's ``board`` section), asks
:func:`synccore.api.plan_clock` for a plan and prints it; ``--write`` writes the
plan's adjusted timing as a spec (:func:`synccore.api.adjusted_text`).  Bad input
is one line on stderr, naming the option, and exit status 2.
"""

from __future__ import annotations

import json
import shlex
from collections.abc import Callable
from fractions import Fraction
from pathlib import Path
from typing import Any, TypeVar

import click
from rich.console import Console
from rich.markup import escape

from synccore.api import adjusted_text, plan_clock, plan_dvi_link, plan_modes
from synccore.cli._common import console, fail, fail_spec, save
from synccore.clocking import FAMILY_KEYS
from synccore.clocking.link import LinkPlan
from synccore.clocking.link_report import link_dict, link_facts
from synccore.clocking.modes_report import (
    MODE_COLUMNS,
    modes_dict,
    modes_facts,
    modes_table,
    table_lines,
    verdict_facts,
)
from synccore.clocking.plan import ClockPlan
from synccore.clocking.report import (
    adjustment_facts,
    miss_text,
    plan_dict,
    plan_facts,
    ppm_text,
    route_text,
    tolerance_text,
)
from synccore.errors import Problem, SpecError, ToolError
from synccore.spec import Spec
from synccore.timings import load
from synccore.units import fixed, hz

ACCEPT_OPTION = "--accept-clock-error"
"""The ``build`` option that writes a clock plan outside the tolerance anyway."""

F = TypeVar("F", bound=Callable[..., Any])


class BadOption(Exception):
    """An option value that cannot be used; its text is the one line shown to the user."""


def board_options(func: F) -> F:
    """The options that name the board clock and the route, shared by ``clock`` and ``build``."""
    func = click.option(
        "--no-pll", is_flag=True, help="Use a clock enable from the board clock instead of a PLL."
    )(func)
    func = click.option(
        "--family",
        default=None,
        metavar="FAMILY",
        help="FPGA family whose PLL makes the core clock: "
        + ", ".join(FAMILY_KEYS)
        + " (default: the spec's board.family).",
    )(func)
    func = click.option("--board-clock", default=None, metavar="FREQ",
                        help='Board oscillator, e.g. "12MHz" (default: the spec\'s '
                             "board.clock_hz).")(func)  # fmt: skip
    return func


def resolve(spec: Spec, board_clock: str | None, family: str | None, no_pll: bool
            ) -> tuple[str | Fraction, str | None]:  # fmt: skip
    """The board clock and family from the options, falling back on the spec's board section."""
    board: str | Fraction
    if board_clock is not None:
        board = board_clock
    elif spec.board.clock_hz is not None:
        board = spec.board.clock_hz
    else:
        raise BadOption("--board-clock: no board clock given; pass --board-clock or set "
                        "board.clock_hz in the spec")  # fmt: skip
    if no_pll and family is not None:
        raise BadOption(f"--family: {family} cannot go with --no-pll (the clock-enable route "
                        "uses no PLL); pass one or the other")  # fmt: skip
    if no_pll:
        return board, None
    return board, family if family is not None else spec.board.family


_OPTION = {"board_clock_hz": "--board-clock", "family": "--family"}
"""The option that gave each argument of :func:`synccore.api.plan_clock`."""


def plan_for(spec: Spec, board_clock: str | None, family: str | None, no_pll: bool, *,
             strict: bool) -> ClockPlan:  # fmt: skip
    """The plan for the options; :class:`BadOption` naming the option when it cannot be made."""
    board, key = resolve(spec, board_clock, family, no_pll)
    try:
        return plan_clock(spec, board, key, strict=strict)
    except ToolError as err:
        if err.subject in _OPTION:
            raise BadOption(f"{_OPTION[err.subject]}: {err.message}") from None
        raise BadOption(f"--clock: {err}; run 'synccore clock' for details") from None


def build_plan(spec: Spec, board_clock: str | None, family: str | None,
               no_pll: bool) -> ClockPlan:  # fmt: skip
    """For ``build --clock``: a plan with a setting that reaches the core clock; exits on bad input."""
    try:
        return plan_for(spec, board_clock, family, no_pll, strict=True)
    except BadOption as err:
        fail(str(err))


def _print_facts(rows: list[tuple[str, str]], out: Console) -> None:
    # plain lines, never wrapped, so that scripts can grep them
    width = max(len(label) for label, _ in rows)
    for label, value in rows:
        out.print(f"[bold]{escape(label.ljust(width))}[/bold]  {escape(value)}")


def print_plan(plan: ClockPlan, out: Console) -> None:
    """The plan, its runners-up and any suggested adjustment, as terminal text."""
    _print_facts(plan_facts(plan), out)
    if len(plan.settings) > 1:
        out.print("[bold]runners-up[/bold]")
        for s in plan.settings[1:]:
            out.print(f"  {escape(route_text(s))}  ({escape(ppm_text(s.ppm))})")
    if plan.within_tolerance:
        return
    pct = fixed(plan.tolerance * 100, 1)
    if plan.best is None:
        out.print("No setting reaches the core clock.")
    else:
        out.print(f"No setting is within +/-{pct} % of the pixel clock.")
    if plan.adjustment is None:
        where = "datasheet ranges" if plan.spec.fit is not None else "porch bounds"
        out.print(f"No raster within the {where} gives a reachable clock within "
                  f"{tolerance_text(plan)} either.")  # fmt: skip
        return
    out.print("Adjusting the blanking keeps line rate and refresh on target "
              "(write it as a spec with --write FILE):")  # fmt: skip
    _print_facts(adjustment_facts(plan), out)


def _frequency_arg(f: Fraction) -> str:
    """A frequency as an option value, e.g. ``12MHz``, ``25.175MHz``."""
    return fixed(f / 10**6, 6).rstrip("0").rstrip(".") + "MHz"


def plan_options(plan: ClockPlan, board_clock: str | None) -> str:
    """The ``clock``/``build`` options that make ``plan`` again, as shell words."""
    board = board_clock if board_clock is not None else _frequency_arg(plan.f_board)
    route = "--no-pll" if plan.family is None else f"--family {plan.family.key}"
    return f"--board-clock {shlex.quote(board)} {route}"


def adjusted_path(spec_path: str) -> str:
    """Where ``build`` suggests writing the adjusted spec: beside the spec, ``_adjusted``."""
    p = Path(spec_path)
    return str(p.with_name(f"{p.stem}_adjusted.yaml"))


def refusal(plan: ClockPlan, spec_path: str, board_clock: str | None, *,
            option: str = "--clock", then: str = "build") -> str:  # fmt: skip
    """The line ``build --clock`` (``view --board``) refuses an out-of-tolerance plan with, and the fix."""
    opts = plan_options(plan, board_clock)
    if plan.adjustment is None:
        return (f"{option}: {miss_text(plan)}; no blanking adjustment brings it within "
                f"tolerance either (see `synccore clock {shlex.quote(spec_path)} {opts}`): "
                f"choose another board clock or family, or pass {ACCEPT_OPTION}")  # fmt: skip
    fixed_spec = adjusted_path(spec_path)
    return (f"{option}: {miss_text(plan)}; fix it with `synccore clock "
            f"{shlex.quote(spec_path)} {opts} --write {shlex.quote(fixed_spec)}`, then {then} "
            f"{shlex.quote(fixed_spec)}; or pass {ACCEPT_OPTION}")  # fmt: skip


def write_adjusted(plan: ClockPlan, spec_path: str, target: str, board_clock: str | None,
                   force: bool) -> None:  # fmt: skip
    """Write the adjusted spec to ``target`` whole (never half), or one line and exit 2."""
    command = (f"synccore build {shlex.quote(target)} -o OUT --clock "
               f"{plan_options(plan, board_clock)}")  # fmt: skip
    try:
        text = adjusted_text(plan, command=command)
    except ToolError as err:
        fail(f"--write: {err}")
    save(target, text, force=force, option="--write")
    click.echo(f"wrote {target} (adjusted from {spec_path})", err=True)


def link_plan_for(spec: Spec, board_clock: str | None, family: str | None) -> LinkPlan:
    """The DVI link plan for the options; one line (or the spec's problems) and exit 2."""
    try:
        board, key = resolve(spec, board_clock, family, False)
        return plan_dvi_link(spec, board, key)
    except BadOption as err:
        fail(str(err))
    except SpecError as err:
        fail_spec(err)
    except ToolError as err:
        fail(f"{_OPTION.get(err.subject, '--link')}: {err.message}")


def print_link(plan: LinkPlan, out: Console) -> None:
    """The link plan as terminal text: both clocks, the I/O verdict, suggestions."""
    _print_facts(link_facts(plan), out)
    if plan.setting is not None and len(plan.settings) > 1:
        out.print("[bold]runners-up[/bold]")
        for s in plan.settings[1:]:
            out.print(f"  {escape(route_text(s))}  ({escape(ppm_text(s.ppm))})")


def run_link(spec: Spec, board_clock: str | None, family: str | None, as_json: bool,
             write_to: str | None) -> None:  # fmt: skip
    """``clock --link dvi``: print the link plan (text or JSON)."""
    if write_to is not None:
        fail("--write: not available with --link")
    plan = link_plan_for(spec, board_clock, family)
    if as_json:
        click.echo(json.dumps(link_dict(plan), indent=2))
    else:
        print_link(plan, console())


_MODES_OPTION = {**_OPTION, "max_core_clock_hz": "--max-core-clock"}
"""The option that gave each argument of :func:`synccore.api.plan_modes`."""


def load_specs(paths: tuple[str, ...]) -> list[Spec]:
    """The spec at each of ``paths``, or every problem of all of them and exit 2."""
    specs: list[Spec] = []
    problems: list[Problem] = []
    for path in paths:
        try:
            specs.append(load(path))
        except SpecError as err:
            problems += err.problems
    if problems:
        fail(str(p) for p in problems)
    return specs


def _agreed(paths: tuple[str, ...], option: str, what: str, values: list[Any],
            show: Callable[[Any], str] = str) -> Any:  # fmt: skip
    """The one value the specs that give one agree on (None if none gives one)."""
    given = [(path, v) for path, v in zip(paths, values, strict=True) if v is not None]
    if len({v for _, v in given}) > 1:
        listed = ", ".join(f"{path}: {show(v)}" for path, v in given)
        raise BadOption(f"{option}: the specs name different {what} ({listed}); pass {option}")
    return given[0][1] if given else None


def resolve_modes(specs: list[Spec], paths: tuple[str, ...], board_clock: str | None,
                  family: str | None, no_pll: bool) -> tuple[str | Fraction, str | None]:  # fmt: skip
    """As :func:`resolve` for several specs: their board sections must agree where they speak."""
    if no_pll and family is not None:
        raise BadOption(f"--family: {family} cannot go with --no-pll (the clock-enable route "
                        "uses no PLL); pass one or the other")  # fmt: skip
    board: str | Fraction | None = board_clock
    if board is None:
        board = _agreed(paths, "--board-clock", "board clocks",
                        [s.board.clock_hz for s in specs], hz)  # fmt: skip
    if board is None:
        raise BadOption("--board-clock: no board clock given; pass --board-clock or set "
                        "board.clock_hz in the specs")  # fmt: skip
    if no_pll:
        return board, None
    if family is None:
        family = _agreed(paths, "--family", "families", [s.board.family for s in specs])
    return board, family


def run_modes(loaded: list[Spec], paths: tuple[str, ...], board_clock: str | None,
              family: str | None, no_pll: bool, max_core_clock: str | None,
              as_json: bool) -> None:  # fmt: skip
    """``clock A B ...``: plan the modes together (each mode of a multi-mode spec) and print
    the table and verdict (or JSON)."""
    specs = [mode for spec in loaded for mode in spec.modes or (spec,)]
    if len(paths) != len(specs):  # a multi-mode spec: one path per mode, for the messages
        paths = tuple(f"{s.name} mode {i}" for i, s in enumerate(specs))
    try:
        board, key = resolve_modes(specs, paths, board_clock, family, no_pll)
        plan = plan_modes(specs, board, key, max_core_clock_hz=max_core_clock)
    except BadOption as err:
        fail(str(err))
    except ToolError as err:
        fail(f"{_MODES_OPTION.get(err.subject, '--board-clock')}: {err.message}")
    if as_json:
        click.echo(json.dumps(modes_dict(plan), indent=2))
        return
    out = console()
    _print_facts(modes_facts(plan), out)
    for line in table_lines(MODE_COLUMNS, modes_table(plan)):
        out.print(escape(line))
    _print_facts(verdict_facts(plan), out)


@click.command()
@click.argument("specs", metavar="SPEC...", nargs=-1, required=True,
                type=click.Path(dir_okay=False))
@board_options
@click.option("--link", "link", type=click.Choice(["dvi"]), default=None,
              help="Plan a link's clocks instead: dvi (serial clock = 5 x pixel clock and "
                   "the core clock, from one PLL).")
@click.option("--json", "as_json", is_flag=True, help="Print the plan as JSON.")
@click.option("--write", "write_to", default=None, metavar="FILE",
              help="Write the adjusted timing (porches and the reached pixel clock) as a "
                   "complete, commented spec to FILE.")
@click.option("--force", is_flag=True, help="With --write: overwrite FILE if it exists.")
@click.option("--max-core-clock", default=None, metavar="FREQ",
              help="With several SPEC files: the fastest clock the core may run at in your "
                   "part, bounding the shared PLL output searched (default: the PLL's limit).")
def clock(specs: tuple[str, ...], board_clock: str | None, family: str | None, no_pll: bool,
          link: str | None, as_json: bool, write_to: str | None, force: bool,
          max_core_clock: str | None) -> None:  # fmt: skip
    """Plan the core clock of SPEC from the board clock: PLL settings or a clock enable.

    With several SPEC files, or a multi-mode SPEC (the modes one display is driven at),
    plan them together:
    whether one PLL configuration serves every mode through clock-enable divides, or
    each mode needs its own PLL setting.
    """
    loaded = load_specs(specs)
    if len(loaded) > 1 or loaded[0].modes:
        for given, option in ((link, "--link"), (write_to, "--write"), (force or None, "--force")):
            if given is not None:
                fail(f"{option}: not available when planning several modes (several SPEC files or a "
                     "multi-mode spec); give one single-mode SPEC for it")  # fmt: skip
        run_modes(loaded, specs, board_clock, family, no_pll, max_core_clock, as_json)
        return
    if max_core_clock is not None:
        fail("--max-core-clock: applies only when planning several SPEC files together")
    spec, s = specs[0], loaded[0]
    if force and write_to is None:
        fail("--force needs --write")
    if link is not None:
        if no_pll:
            fail("--no-pll: a DVI link needs a PLL")
        run_link(s, board_clock, family, as_json, write_to)
        return
    try:
        plan = plan_for(s, board_clock, family, no_pll, strict=False)
    except BadOption as err:
        fail(str(err))
    if write_to is not None:
        write_adjusted(plan, spec, write_to, board_clock, force)
    if as_json:
        click.echo(json.dumps(plan_dict(plan), indent=2))
        return
    out = console()
    print_plan(plan, out)
    if plan.family is None and plan.enable is not None and plan.enable.divide > 1:
        if not s.core.clock_enable:
            out.print("Note: set core.clock_enable: true in the spec to use this route.")
