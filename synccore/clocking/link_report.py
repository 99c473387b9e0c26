"""A DVI link clock plan in words and as plain data: for the command line, JSON and headers."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from synccore.clocking.link import SERIAL_FACTOR, LinkPlan
from synccore.clocking.report import percent_text, ppm_text, route_text
from synccore.model import Timing
from synccore.units import fixed, hz

__all__ = ["io_text", "link_dict", "link_facts", "link_miss_text", "link_refusal", "raster_name",
           "rate_text"]


def rate_text(bits_per_second: Fraction) -> str:
    """A bit rate, e.g. ``742.5 Mbit/s``, ``1.485 Gbit/s``."""
    return hz(bits_per_second).replace("Hz", "bit/s")


def raster_name(plan: LinkPlan) -> str:
    """The spec's raster as a mode name: ``1920x1080@60``."""
    refresh = fixed(Timing(plan.spec).refresh_hz, 2).rstrip("0").rstrip(".")
    return f"{plan.spec.horizontal.active}x{plan.spec.vertical.active}@{refresh}"


def io_text(plan: LinkPlan) -> str:
    """The bit rate the link needs against the family's output path rating, in one sentence."""
    verdict = "within" if plan.fits_io else "EXCEEDS"
    return (f"{raster_name(plan)} needs {rate_text(plan.bit_rate_hz)} per lane; "
            f"{plan.family.key} {plan.io.path} is rated to {rate_text(plan.io.rate)}: "
            f"{verdict}")  # fmt: skip


def _core_text(plan: LinkPlan) -> str:
    tap, ppc = plan.core_tap, plan.pixels_per_clock
    div = plan.core_divider
    if tap.kind == "enable":
        return (f"on the serial clock, with a ce one cycle in {plan.core_factor} "
                f"(pixel clock / {ppc} = serial clock / {plan.core_factor})")  # fmt: skip
    if tap.kind == "divider":
        return f"CLKDIV {tap.param} \"{div}\" after the PLL (serial clock / {SERIAL_FACTOR})"
    return (f"second PLL output, {tap.param}={div} "
            f"(serial clock divider x {plan.core_factor})")  # fmt: skip


def link_facts(plan: LinkPlan) -> list[tuple[str, str]]:
    """The plan's figures as (label, text) rows."""
    t = Timing(plan.spec)
    rows = [
        ("board clock", hz(plan.f_board)),
        ("family", plan.family.title),
        ("limits from", plan.family.document),
        ("link", f"DVI, DDR outputs: serial clock = {SERIAL_FACTOR} x pixel clock"),
        ("pixel clock wanted", hz(t.pixel_clock_hz)),
        ("serial clock wanted", hz(t.pixel_clock_hz * SERIAL_FACTOR)),
    ]
    s = plan.setting
    if s is None or plan.serial_hz is None or plan.core_hz is None or plan.pixel_hz is None:
        rows.append(("setting", "none: no legal setting of the PLL reaches the serial clock"))
    else:
        assert plan.ppm is not None
        rows += [
            ("setting", route_text(s)),
            ("serial clock", hz(plan.serial_hz)),
            ("core clock", f"{hz(plan.core_hz)}, {_core_text(plan)}"),
            ("pixel clock reached",
             f"{hz(plan.pixel_hz)} ({ppm_text(plan.ppm)}, {percent_text(plan.ppm / 10**6)})"),
        ]  # fmt: skip
    pct = fixed(plan.tolerance * 100, 3).rstrip("0").rstrip(".")
    verdict = "within" if plan.within_tolerance else "OUTSIDE"
    rows += [
        ("tolerance", f"+/-{pct} % on the pixel clock, {plan.tolerance_source}: {verdict}"),
        ("bit rate per lane", io_text(plan)),
        ("I/O rating from", plan.io.source),
    ]
    if plan.suggestions:
        rows.append(("modes that fit", ", ".join(plan.suggestions)))
    rows += [("spec change", str(p)) for p in plan.problems]
    return rows


def _num(v: Fraction | int | None) -> int | float | None:
    if v is None:
        return None
    f = Fraction(v)
    return int(f) if f.denominator == 1 else float(f)


def link_dict(plan: LinkPlan) -> dict[str, Any]:
    """The plan as plain JSON-ready data (frequencies in Hz, rates in bit/s)."""
    t = Timing(plan.spec)
    s = plan.setting
    return {
        "spec": plan.spec.name,
        "link": "dvi",
        "family": plan.family.key,
        "input_clock_hz": _num(plan.f_board),
        "pixel_clock_hz": _num(t.pixel_clock_hz),
        "pixels_per_clock": plan.pixels_per_clock,
        "serial_factor": SERIAL_FACTOR,
        "core_clock": {"kind": plan.core_tap.kind, "param": plan.core_tap.param,
                       "divider": _num(plan.core_divider), "factor": plan.core_factor},
        "setting": None if s is None else {
            "primitive": s.family.primitive,
            "parameters": {k: _num(v) for k, v in s.parameters().items()},
            "pfd_hz": _num(s.f_pfd), "vco_hz": _num(s.f_vco)},
        "reached": {"serial_hz": _num(plan.serial_hz), "core_hz": _num(plan.core_hz),
                    "pixel_hz": _num(plan.pixel_hz)},
        "error_ppm": None if plan.ppm is None else round(float(plan.ppm), 3),
        "tolerance_ppm": _num(plan.tolerance * 10**6),
        "tolerance_source": plan.tolerance_source,
        "within_tolerance": plan.within_tolerance,
        "bit_rate_per_lane": _num(plan.bit_rate_hz),
        "io_limit": {"rate": _num(plan.io.rate), "path": plan.io.path,
                     "source": plan.io.source},
        "fits_io": plan.fits_io,
        "suggestions": list(plan.suggestions),
        "problems": [str(p) for p in plan.problems],
    }  # fmt: skip


def link_miss_text(plan: LinkPlan) -> str:
    """Why the link's pixel clock misses, in one phrase: reached, wanted, error, tolerance."""
    pct = fixed(plan.tolerance * 100, 3).rstrip("0").rstrip(".")
    if plan.pixel_hz is None or plan.ppm is None:
        return "no setting reaches the serial clock"
    return (f"pixel clock {hz(plan.pixel_hz)} for {hz(plan.wanted_pixel_hz)} wanted "
            f"({ppm_text(plan.ppm)}), outside +/-{pct} % ({plan.tolerance_source})")  # fmt: skip


def link_refusal(plan: LinkPlan, *, accept_clock_error: bool, accept_io_limit: bool,
                 ways: tuple[str, str] = ("accept_clock_error=True", "accept_io_limit=True"),
                 ) -> str | None:  # fmt: skip
    """Why ``plan`` may not be written as it is (one sentence, naming the way out), or None.

    ``ways`` names the two ways past a refusal (the API's keywords, or the command's options).
    """
    if plan.setting is None:
        return (f"no PLL setting of {plan.family.key} reaches the serial clock "
                f"{hz(plan.wanted_pixel_hz * SERIAL_FACTOR)} from {hz(plan.f_board)}")  # fmt: skip
    if not plan.within_tolerance and not accept_clock_error:
        return (f"the link's {link_miss_text(plan)}; choose another board clock or a timing the PLL "
                f"reaches, or pass {ways[0]} (most monitors lock a little off; some refuse)")  # fmt: skip
    if not plan.fits_io and not accept_io_limit:
        fits = f"; modes that fit: {', '.join(plan.suggestions)}" if plan.suggestions else ""
        return f"{io_text(plan)}{fits}; or pass {ways[1]} to write it anyway"
    return None
