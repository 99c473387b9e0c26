"""The DAC seen: a schematic per channel (schemdraw), levels against code, and the picture
as the monitor's 75 Ω input would show it.

The picture assumes the monitor turns its input voltage into light with the same gamma
(about 2.2, common practice) that the screen showing the PNG applies to the PNG's
values, so a PNG value is the input voltage over 0.7 V, times 255, clipped at white.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
from PIL import Image

from synccore.analog import DacDesign, Network
from synccore.analog.eseries import ohms
from synccore.model.tmds import eight_bit

GAMMA_NOTE = ("the analog picture assumes the monitor's gamma (about 2.2) equals the screen's "
              "showing the PNG: a PNG value is the input voltage over 0.7 V (common practice)")  # fmt: skip


def level_tables(design: DacDesign) -> dict[str, np.ndarray]:
    """Per channel, the 8-bit PNG value of each code's analog level (code 0 first)."""
    full = float(design.options.full_scale_v)
    return {
        name: np.clip(np.rint(np.array([float(v) for v in c.best.levels]) / full * 255), 0, 255)
        .astype(np.uint8)
        for name, c in design.channels.items()
    }


def analog_image(ideal: Image.Image, design: DacDesign, bits: dict[str, int]) -> Image.Image:
    """``ideal`` (the monitor's picture of the codes) with each code's value replaced by its level."""
    rgb = np.asarray(ideal.convert("RGB")).copy()
    tables = level_tables(design)
    for k, name in enumerate(("red", "green", "blue")):
        n = bits[name]
        lut = np.zeros(256, dtype=np.uint8)
        lut[eight_bit(np.arange(2**n), n).astype(np.uint8)] = tables[name]
        rgb[..., k] = lut[rgb[..., k]]
    return Image.fromarray(rgb, "RGB")


def side_by_side(ideal: Image.Image, analog: Image.Image, gap: int = 8) -> Image.Image:
    """The ideal picture on the left, the analog one on the right, on a grey ground."""
    w, h = ideal.size
    out = Image.new("RGB", (2 * w + gap, h), (128, 128, 128))
    out.paste(ideal, (0, 0))
    out.paste(analog, (w + gap, 0))
    return out


def draw_schematic(design: DacDesign, target: str | Path) -> None:
    """Each channel's network with its values, pins on the left, the monitor's load on the right."""
    import schemdraw
    import schemdraw.elements as elm

    schemdraw.use("svg" if Path(target).suffix.lower() == ".svg" else "matplotlib")
    with schemdraw.Drawing(show=False) as d:
        d.config(fontsize=11, unit=2.5)
        y = 0.0
        for name, choice in design.channels.items():
            net = choice.best.network
            _channel(d, elm, name, net, y)
            y -= 3.0 * net.bits + 2.0
        d.save(str(target))


def _channel(d: object, elm: object, name: str, net: Network, y: float) -> None:
    """One channel: per bit, the pin's label, its resistor, and the node it feeds."""
    parts = {br.name: br for br in net.branches}
    ladder = "termination" in parts
    out_x = 9.0
    for i in reversed(range(net.bits)):
        row = y - 3.0 * (net.bits - 1 - i)
        leg = parts[f"leg{i}" if ladder else f"R{i}"]
        d.add(elm.Dot(open=True).at((0, row)).label(f"{name}[{i}]", loc="left"))  # type: ignore[attr-defined]
        d.add(elm.Resistor().at((0, row)).right().label(ohms(leg.ohm) + " Ω"))  # type: ignore[attr-defined]
        node_x = 6.0 if ladder else out_x
        d.add(elm.Line().at((2.5, row)).to((node_x, row)))  # type: ignore[attr-defined]
        d.add(elm.Dot().at((node_x, row)))  # type: ignore[attr-defined]
        if ladder and i > 0:
            rung = parts[f"ladder{i - 1}"]
            d.add(elm.Resistor().at((node_x, row - 3.0)).up().toy(row)  # type: ignore[attr-defined]
                  .label(ohms(rung.ohm) + " Ω", loc="bottom"))  # fmt: skip
    bottom = y - 3.0 * (net.bits - 1)
    if ladder:
        term = parts["termination"]
        d.add(elm.Resistor().at((6.0, bottom)).down().label(ohms(term.ohm) + " Ω"))  # type: ignore[attr-defined]
        d.add(elm.Ground())  # type: ignore[attr-defined]
        d.add(elm.Line().at((6.0, y)).to((out_x, y)))  # type: ignore[attr-defined]
    else:
        d.add(elm.Line().at((out_x, y)).to((out_x, bottom)))  # type: ignore[attr-defined]
    load = parts["load"]
    d.add(elm.Line().at((out_x, y)).to((out_x + 2.0, y)))  # type: ignore[attr-defined]
    d.add(elm.Dot(open=True).label(f"{name} to monitor", loc="right"))  # type: ignore[attr-defined]
    d.add(elm.Resistor().at((out_x + 1.0, y)).down().label(f"{ohms(load.ohm)} Ω\nmonitor", loc="bottom"))  # type: ignore[attr-defined]
    d.add(elm.Ground())  # type: ignore[attr-defined]


def plot_levels(design: DacDesign, target: str | Path) -> None:
    """Level against code per channel: the ideal line beside the real steps."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    full = float(design.options.full_scale_v)
    fig, axes = plt.subplots(1, len(design.channels), figsize=(4 * len(design.channels), 3.4), squeeze=False)
    for ax, (name, choice) in zip(axes[0], design.channels.items(), strict=True):
        levels = [float(v) for v in choice.best.levels]
        codes = np.arange(len(levels))
        ax.plot(codes, codes * full / codes[-1], color="0.6", linestyle="--", label="ideal")
        ax.step(codes, levels, where="mid", color=name, label="into the load")
        ax.plot(codes, levels, "o", color=name, markersize=3)
        ax.set_title(f"{name}: {choice.best.bits} bits")
        ax.set_xlabel("code")
        ax.set_ylabel("level (V)")
        ax.grid(True, alpha=0.3)
        ax.legend(loc="upper left", fontsize=8)
    fig.tight_layout()
    fig.savefig(target, metadata={"Date": None} if str(target).endswith(".svg") else None)
    plt.close(fig)
