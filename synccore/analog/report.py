"""A DAC design as text lines, as JSON, and as a design file that reads back."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from synccore.analog.design import Channel, DacDesign
from synccore.analog.eseries import ohms
from synccore.units import fixed

CAUTIONS = (
    "Check the bank's drive strength and each resistor's power rating against their data sheets; "
    "keep the total current per bank inside the FPGA data sheet's limit; never connect a 5 V logic "
    "output to the monitor; the board's schematic and local practice come first."
)

HEADER = "# synccore dac design: the settings and the network chosen; `synccore view --dac` reads it"


def _ma(a: Fraction) -> str:
    return f"{fixed(a * 1000, 2)} mA"


def _mw(w: Fraction) -> str:
    return f"{fixed(w * 1000, 2)} mW"


def network_text(ch: Channel) -> str:
    """The values a builder needs: per bit for weighted, leg and rung for a ladder."""
    parts = {br.name: br.ohm for br in ch.network.branches}
    if "ladder0" in parts or "termination" in parts:
        return f"legs and termination {ohms(parts['termination'])}, rungs {_rung(ch, parts)}"
    return ", ".join(f"bit {i}: {ohms(r)}" for i, r in enumerate(ch.resistors))


def _rung(ch: Channel, parts: dict[str, Fraction]) -> str:
    return ohms(parts["ladder0"]) if ch.bits > 1 else "none"


def channel_facts(ch: Channel) -> list[tuple[str, str]]:
    """Label/value rows for one channel, in the order a reader checks them."""
    rows = [
        ("network", network_text(ch)),
        ("full scale", f"{fixed(ch.levels[-1], 4)} V ({fixed(ch.full_scale_error * 100, 2)} % from 0.7 V)"),
        ("linearity", f"|DNL| {fixed(ch.worst_dnl, 3)} LSB, |INL| {fixed(ch.worst_inl, 3)} LSB, "
                      + ("monotonic" if ch.monotonic else "NOT monotonic")),
        ("pin current", ", ".join(f"bit {i} {_ma(a)}" for i, a in enumerate(ch.pin_current_a))),
        ("from the bank", f"{_ma(ch.bank_current_a)} at most"),
        ("power", ", ".join(f"{name} {_mw(w)}" for name, w in ch.power_w.items())),
        ("levels", " ".join(fixed(v, 3) for v in ch.levels) + " V (code 0 first)"),
    ]  # fmt: skip
    return rows


def as_json(design: DacDesign) -> dict[str, Any]:
    """Per channel: ``resistors_ohm`` (bit 0 first), ``levels_v`` (code 0 first) and every figure."""
    opts = design.options
    return {
        "io_v": float(opts.io_v),
        "load_ohm": float(opts.load_ohm),
        "series": opts.series,
        "topology": opts.topology,
        "pin_resistance_ohm": float(opts.pin_ohm),
        "full_scale_target_v": float(opts.full_scale_v),
        "bank_current_a": float(design.bank_current_a),
        "meets": not design.problems,
        "problems": design.problems,
        "channels": {
            name: _channel_json(c.best) | {"runners_up": [_channel_json(r) for r in c.runners_up]}
            for name, c in design.channels.items()
        },
    }


def _channel_json(ch: Channel) -> dict[str, Any]:
    out: dict[str, Any] = {
        "bits": ch.bits,
        "resistors_ohm": [float(r) for r in ch.resistors],
        "levels_v": [float(v) for v in ch.levels],
        "full_scale_v": float(ch.levels[-1]),
        "full_scale_error": float(ch.full_scale_error),
        "dnl_lsb": [float(d) for d in ch.dnl],
        "inl_lsb": [float(d) for d in ch.inl],
        "monotonic": ch.monotonic,
        "pin_current_a": [float(a) for a in ch.pin_current_a],
        "bank_current_a": float(ch.bank_current_a),
        "power_w": {name: float(w) for name, w in ch.power_w.items()},
        "branches": [{"name": br.name, "from": br.a, "to": br.b, "ohm": float(br.ohm)}
                     for br in ch.network.branches],
        "problems": list(ch.problems),
    }  # fmt: skip
    return out


def design_text(design: DacDesign) -> str:
    """A design file (:mod:`synccore.analog.settings`) holding these settings and networks."""
    opts = design.options
    lines = [HEADER, f"io: {fixed(opts.io_v, 3)}V", f"load: {fixed(opts.load_ohm, 1)}",
             f"series: {opts.series}", f"topology: {opts.topology}",
             f"pin_resistance: {fixed(opts.pin_ohm, 1)}"]  # fmt: skip
    if opts.pin_current_a is not None:
        lines.append(f"pin_current: {fixed(opts.pin_current_a * 1000, 3)}mA")
    if opts.bank_current_a is not None:
        lines.append(f"bank_current: {fixed(opts.bank_current_a * 1000, 3)}mA")
    lines.append("resistors:  # bit 0 first")
    for name, c in design.channels.items():
        parts = {br.name: br.ohm for br in c.best.network.branches}
        if opts.topology == "r2r":
            lines.append(f"  {name}: {{leg: {_plain(parts['termination'])}, ladder: "
                         f"{_plain(parts.get('ladder0', parts['termination'] / 2))}}}")  # fmt: skip
        else:
            lines.append(f"  {name}: [{', '.join(_plain(r) for r in c.best.resistors)}]")
    return "\n".join(lines) + "\n"


def _plain(r: Fraction) -> str:
    return fixed(r, 2).rstrip("0").rstrip(".")
