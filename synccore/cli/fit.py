"""The ``fit`` command: will the core (or its first-light design) fit a part, at its clock.

Thin: it loads the spec, asks :func:`synccore.api.fit` and prints Yosys's cell counts
and nextpnr's Fmax against the needed clock, with the margin; when the clock is missed,
the pixels_per_clock that meets it and the fit at that setting.  Exit status 0 when the
spec's clocks are met, 1 when one is missed, 2 for bad input or a missing wheel.
"""

from __future__ import annotations

import json

import click

from synccore.api import fit
from synccore.cli._common import FAILED, fail, fail_spec, load_spec
from synccore.errors import SpecError, ToolError
from synccore.verification.fit import ClockFit, FitReport, FitResult
from synccore.verification.parts import PARTS, find_part


def _clock_line(c: ClockFit) -> str:
    if c.fmax_mhz is None:
        return (f"  {c.net}: needs {c.needed_mhz:.3f} MHz, no timed path in the domain "
                f"(nextpnr's constraint {c.constraint_mhz:.2f} MHz)")  # fmt: skip
    verdict = "met" if c.met else "MISSED"
    return (f"  {c.net}: Fmax {c.fmax_mhz:.1f} MHz (nextpnr), needs {c.needed_mhz:.3f} MHz: "
            f"margin {c.margin_mhz:+.1f} MHz ({c.margin_pct:+.1f} %), {verdict}")  # fmt: skip


def _result_lines(r: FitResult) -> list[str]:
    per = "pixel" if r.pixels_per_clock == 1 else "pixels"
    cached = " (cached)" if r.cached else f" (synthesis {r.synth_s:.1f} s, place and route {r.pnr_s:.1f} s)"
    return [f"{r.top} on {r.part_name} ({r.part}), {r.pixels_per_clock} {per} per clock{cached}",
            f"  LUTs {r.luts}, flip-flops {r.ffs}, carry cells {r.carry} (Yosys stat)",
            *(_clock_line(c) for c in r.clocks)]  # fmt: skip


def _text(report: FitReport) -> list[str]:
    lines = _result_lines(report.result)
    if report.result.met:
        return lines
    if report.suggested_ppc is None:
        return [*lines, f"  {report.note}" if report.note else "  no pixels_per_clock suggested"]
    retry = report.retry
    assert retry is not None
    verdict = "meets it" if retry.met else "still misses it"
    return [*lines, f"pixels_per_clock {report.suggested_ppc} would meet the clock; refitted, "
                    f"it {verdict}:", *_result_lines(retry)]  # fmt: skip


@click.command("fit")
@click.argument("spec_path", metavar="SPEC", type=click.Path(dir_okay=False))
@click.option("--part", required=True, metavar="PART",
              help="FPGA part: " + ", ".join(PARTS) + " (or the vendor's name, e.g. LFE5U-25F).")
@click.option("--top", is_flag=True, help="Fit the first-light design (board top with its PLL).")
@click.option("--link", type=click.Choice(["dvi"]), default=None,
              help="With --top: fit the DVI top instead.")
@click.option("--board-clock", default=None, metavar="FREQ",
              help="With --top: the board oscillator (default: the spec's board.clock_hz).")
@click.option("--family", default=None, metavar="FAMILY",
              help="With --top: the FPGA family; must be the part's.")
@click.option("--accept-clock-error", is_flag=True,
              help="With --top: fit a clock plan outside the monitors' tolerance anyway.")
@click.option("--seed", default=1, show_default=True, type=int, help="nextpnr's placement seed.")
@click.option("--json", "as_json", is_flag=True, help="Print the figures as JSON.")
def fit_command(spec_path: str, part: str, top: bool, link: str | None, board_clock: str | None,
                family: str | None, accept_clock_error: bool, seed: int, as_json: bool) -> None:  # fmt: skip
    """Synthesise SPEC's core with Yosys, place and route it with nextpnr, report the fit."""
    spec = load_spec(spec_path, single_mode="fit")
    try:
        chosen = find_part(part)
        if family is not None and family != chosen.family:
            fail(f"--family: {family!r} is not the family of {chosen.name} ({chosen.family})")
        report = fit(spec, chosen.key, top=top or link is not None, link=link,
                     board_clock_hz=board_clock, accept_clock_error=accept_clock_error,
                     seed=seed)  # fmt: skip
    except SpecError as err:
        fail_spec(err)
    except ToolError as err:
        fail(f"--{err.subject.replace('_', '-')}: {err.message}" if err.subject else str(err))
    if as_json:
        click.echo(json.dumps(report.to_dict(), indent=2))
    else:
        for line in _text(report):
            click.echo(line)
    if not report.result.met:
        raise SystemExit(FAILED)
