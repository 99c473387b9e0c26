"""Timing diagrams drawn to scale with matplotlib: one panel for a line, one for a frame.

Each panel shows the four parts in VESA order (active, front porch, sync, back
porch) as blocks whose widths are to scale, labelled with their size in pixels
or lines and in µs or ms, and below them the sync as a drawn waveform of its
polarity and de (high on active pixels; blank is its inverse).  The
background is transparent; every text sits on a light rounded box and every
line carries a light outline under its colour, so the drawing reads on light
and dark pages alike.

:func:`draw` returns the labels it placed, so tests check the numbers in the
drawing, not only that a file exists; SVG files keep the labels as text.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from synccore.model import Timing
from synccore.spec import Axis, Spec

if TYPE_CHECKING:
    from matplotlib.axes import Axes

PARTS = ("active", "front porch", "sync", "back porch")
_FILL = {"active": "#4c9f70", "front porch": "#d9a441", "sync": "#c8553d", "back porch": "#5b7bb4"}


@dataclass(frozen=True)
class Label:
    """One labelled part of a diagram."""

    axis: str  # "horizontal" | "vertical"
    part: str  # one of PARTS
    count: int  # pixels or lines
    unit: str  # "px" | "lines"
    duration: str  # "25.422 µs" or "15.253 ms"

    @property
    def amount(self) -> str:
        """"96 px", "1 line", "33 lines": the count with its unit (px is an abbreviation)."""
        unit = "line" if self.unit == "lines" and self.count == 1 else self.unit
        return f"{self.count} {unit}"

    @property
    def text(self) -> str:
        return f"{self.part}\n{self.amount}\n{self.duration}"

    @property
    def line(self) -> str:
        return f"{self.part}: {self.amount}, {self.duration}"


@dataclass(frozen=True)
class Diagram:
    labels: tuple[Label, ...]
    path: Path


def _sizes(a: Axis) -> tuple[int, int, int, int]:
    return a.active, a.front_porch, a.sync, a.back_porch


def labels(spec: Spec) -> tuple[Label, ...]:
    """The labels of both panels, computed from the spec alone."""
    t = Timing(spec)
    pixel_s = 1 / spec.pixel_clock_hz
    line_s = 1 / t.line_rate_hz
    out = []
    for part, n in zip(PARTS, _sizes(spec.horizontal), strict=True):
        out.append(Label("horizontal", part, n, "px", f"{float(n * pixel_s) * 1e6:.3f} µs"))
    for part, n in zip(PARTS, _sizes(spec.vertical), strict=True):
        out.append(Label("vertical", part, n, "lines", f"{float(n * line_s) * 1e3:.3f} ms"))
    return tuple(out)


_INK = "#202020"
_BOX = {"boxstyle": "round,pad=0.2", "facecolor": "white", "edgecolor": "none", "alpha": 0.85}
"""The light rounded box under every text."""


def draw(spec: Spec, path: str | Path) -> Diagram:
    """Draw ``spec``'s horizontal and vertical timing into ``path`` (.svg or .png)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    path = Path(path)
    if path.suffix.lower() not in (".svg", ".png"):
        raise ValueError(f"the diagram file must end in .svg or .png, got {path.name!r}")
    t = Timing(spec)
    marks = labels(spec)
    with plt.rc_context({"svg.fonttype": "none", "svg.hashsalt": "synccore", "font.size": 9}):
        fig, panels = plt.subplots(2, 1, figsize=(11, 6.5))
        for ax, (axis_name, a) in zip(panels, (("horizontal", spec.horizontal),
                                               ("vertical", spec.vertical)), strict=True):  # fmt: skip
            _blocks(ax, [m for m in marks if m.axis == axis_name], a.total)
            _waveforms(ax, axis_name, a, t.sync_span(axis_name))
            _frame_axes(ax, axis_name, a.total)
        fig.suptitle(f"{spec.name}: {float(spec.pixel_clock_hz) / 1e6:.3f} MHz pixel clock",
                     color=_INK, bbox=_BOX)  # fmt: skip
        fig.tight_layout()
        fig.subplots_adjust(left=0.14)
        path.parent.mkdir(parents=True, exist_ok=True)
        fig.savefig(path, transparent=True, metadata={"Date": None} if path.suffix == ".svg" else None)
        plt.close(fig)
    return Diagram(marks, path)


def _blocks(ax: Axes, parts: list[Label], total: int) -> None:
    """The four parts as blocks to scale, each labelled inside, or above with a leader when narrow."""
    from matplotlib.patches import Rectangle

    start = 0
    stacked = 0
    for m in parts:
        ax.add_patch(Rectangle((start, 2.2), m.count, 1.0, facecolor=_FILL[m.part],
                                   edgecolor=_INK, linewidth=0.8))  # fmt: skip
        middle = start + m.count / 2
        if m.count >= total / 5:  # room inside the block
            ax.text(middle, 2.7, m.text, ha="center", va="center", color=_INK, fontsize=8, bbox=_BOX)
        else:  # narrow: one line above, stacked, with a leader
            y = 3.5 + 0.45 * stacked
            stacked += 1
            ax.plot([middle, middle], [3.2, y], color=_INK, linewidth=0.6)
            ax.text(middle, y, m.line, ha="right" if middle > total / 2 else "left",
                    va="bottom", color=_INK, fontsize=8, bbox=_BOX)  # fmt: skip
        start += m.count


def _waveforms(ax: Axes, axis_name: str, a: Axis, sync: tuple[int, int]) -> None:
    """The sync (drawn with its polarity, from the model's pulse bounds) and de below the blocks."""
    from matplotlib import patheffects

    halo = [patheffects.withStroke(linewidth=3, foreground="white")]
    total = a.total
    sync_start, sync_end = sync
    on, off = (1.0, 0.0) if a.sync_polarity == "positive" else (0.0, 1.0)
    sync_name = "hsync" if axis_name == "horizontal" else "vsync"
    xs = [0, sync_start, sync_start, sync_end, sync_end, total]
    ys = [off, off, on, on, off, off]
    ax.plot(xs, [y * 0.8 + 1.0 for y in ys], color="#c8553d", linewidth=2,
            path_effects=halo + [patheffects.Normal()])  # fmt: skip
    de_xs = [0, a.active, a.active, total]
    de_ys = [1, 1, 0, 0]
    ax.plot(de_xs, [y * 0.8 - 0.2 for y in de_ys], color="#4c9f70", linewidth=2,
            path_effects=halo + [patheffects.Normal()])  # fmt: skip
    for y, name in ((1.4, f"{sync_name} ({a.sync_polarity})"), (0.2, "de (blank = not de)")):
        ax.text(-total * 0.01, y, name, ha="right", va="center", color=_INK, bbox=_BOX)


def _frame_axes(ax: Axes, axis_name: str, total: int) -> None:
    """Title, limits, the count axis in light grey, and no other spines."""
    unit = "pixels" if axis_name == "horizontal" else "lines"
    ax.set_title(f"{axis_name}: {total} {unit} per "
                 f"{'line' if axis_name == 'horizontal' else 'frame'}",
                 color=_INK, loc="left", bbox=_BOX)  # fmt: skip
    ax.set_xlim(-total * 0.02, total * 1.02)
    ax.set_ylim(-0.5, 5.4)
    ax.set_yticks([])
    ax.set_xlabel(unit, color=_INK, bbox=_BOX)
    ax.tick_params(colors="#808080")
    ax.spines["bottom"].set_color("#808080")
    for tick in ax.get_xticklabels():
        tick.set_bbox(_BOX)
    for spine in ("left", "right", "top"):
        ax.spines[spine].set_visible(False)
