"""The format, described once as a table of :class:`Field` entries.

The same table drives validation (:mod:`synccore.spec._check`) and the JSON Schema
(:mod:`synccore.spec.schema`), so the two can never disagree.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from synccore.spec._types import (
    FAMILY_NAMES,
    FORMULA_METHODS,
    MAX_AXIS,
    MAX_MODES,
    MIN_MODES,
    PIXELS_PER_CLOCK,
    POLARITIES,
    RESETS,
    SCALES,
    VSYNC_ALIGNS,
)


@dataclass(frozen=True)
class Field:
    """One key of the format: its kind, constraints, default and one line of documentation."""

    name: str
    kind: str  # int | bool | choice | identifier | prefix | frequency | decimal | text | section | list
    doc: str
    required: bool = True
    default: Any = None
    minimum: int | None = None
    maximum: int | None = None
    choices: tuple[Any, ...] = ()
    fields: tuple[Field, ...] = ()
    ranged: bool = False  # may also be a datasheet range {min, typ, max} (needs a fit: section)
    # A list holds minimum..maximum entries, each a mapping of ``fields``.


def _axis_fields(unit: str, what: str) -> tuple[Field, ...]:
    return (
        Field("active", "int", f"visible {unit} per {what}", minimum=1, maximum=MAX_AXIS),
        Field("front_porch", "int", f"blank {unit} after the active ones, before sync",
              minimum=0, maximum=MAX_AXIS, ranged=True),
        Field("sync", "int", f"{unit} during the sync pulse", minimum=1, maximum=MAX_AXIS,
              ranged=True),
        Field("back_porch", "int", f"blank {unit} after sync, before the next active ones",
              minimum=0, maximum=MAX_AXIS, ranged=True),
        Field("sync_polarity", "choice", "positive: the sync line is high during the pulse",
              choices=POLARITIES),
    )  # fmt: skip


CORE_FIELDS = (
    Field("pixels_per_clock", "choice", "pixels carried by each clock cycle",
          required=False, default=1, choices=PIXELS_PER_CLOCK),
    Field("clock_enable", "bool", "add a ce input; the core advances only on cycles with ce=1",
          required=False, default=False),
    Field("reset", "choice", "reset input style: sync or async, active high (rst) or low (rst_n)",
          required=False, default="sync_high", choices=RESETS),
    Field("lead", "int", "cycles by which x and y run ahead of the syncs and de",
          required=False, default=0, minimum=0),
    Field("vsync_align", "choice",
          "hsync: vsync edges coincide with the hsync leading edge; line: with the line start",
          required=False, default="hsync", choices=VSYNC_ALIGNS),
    Field("scale", "choice",
          "divide x and y by this, e.g. 2 for a 320x240 picture on a 640x480 signal",
          required=False, default=1, choices=SCALES),
)  # fmt: skip


FORMULA_FIELDS = (
    Field("method", "choice", "cvt (standard blanking), cvt-rb, cvt-rb2 (reduced blanking "
          "v1, v2) or gtf", choices=FORMULA_METHODS),
    Field("width", "int", "active pixels per line", minimum=16, maximum=MAX_AXIS),
    Field("height", "int", "active lines per frame", minimum=2, maximum=MAX_AXIS),
    Field("refresh", "frequency", "frames per second, e.g. 60 or 59.94"),
    Field("video_optimized", "bool", "cvt-rb2 only: lower the clock by 1000/1001",
          required=False, default=False),
)  # fmt: skip

FIT_FIELDS = (
    Field("refresh", "frequency", "target refresh in Hz; default: that of the typical values",
          required=False),
    Field("pixel_clock_hz", "frequency", "the fixed pixel clock the board makes, if fixed",
          required=False),
    Field("tolerance_percent", "decimal", "how far from the target still counts as met",
          required=False, default=0.5),
)  # fmt: skip

PORT_FIELDS = (
    Field("prefix", "prefix", "text put before every port name, e.g. vga_",
          required=False, default=""),
)

BOARD_FIELDS = (
    Field("clock_hz", "frequency",
          'the board oscillator feeding the FPGA, e.g. "12 MHz"; used by clock planning',
          required=False),
    Field("family", "choice",
          "FPGA family whose PLL makes the core clock; leave out to divide the board "
          "clock with a clock enable instead",
          required=False, choices=FAMILY_NAMES),
)  # fmt: skip

COLOR_FIELDS = (
    Field("red", "int", "bits of the red channel on the colour pins", required=False,
          default=4, minimum=1, maximum=8),
    Field("green", "int", "bits of the green channel", required=False, default=4,
          minimum=1, maximum=8),
    Field("blue", "int", "bits of the blue channel", required=False, default=4,
          minimum=1, maximum=8),
)  # fmt: skip

def _timing_fields(what: str) -> tuple[Field, ...]:
    """The keys that give one timing: a library entry, a formula, ranges or explicit numbers."""
    return (
        Field("standard", "text", f'a library timing instead of the explicit keys{what}: '
              '"1280x720@60", "DMT 55h", "CTA VIC 4" (see synccore modes)', required=False),
        Field("formula", "section", "a formula timing instead of the explicit keys",
              required=False, fields=FORMULA_FIELDS),
        Field("fit", "section", "target for datasheet ranges given as {min, typ, max}",
              required=False, fields=FIT_FIELDS),
        Field("pixel_clock_hz", "frequency",
              'pixel clock: a number in Hz or a string with a unit ("25.175 MHz", "25175 kHz")',
              ranged=True),
        Field("horizontal", "section", "timing within a line, in pixels",
              fields=_axis_fields("pixels", "line")),
        Field("vertical", "section", "timing within a frame, in lines (within one field when "
              "interlaced)", fields=_axis_fields("lines", "frame")),
        Field("interlaced", "bool", "two fields per frame (CTA-861 interlace): vertical gives "
              "the second field; the first has one more back-porch line and its vsync half a "
              "line later", required=False, default=False),
    )  # fmt: skip


MODE_FIELDS = _timing_fields(" of this mode")
"""One entry of ``modes:``: a whole timing, written as a single-mode spec writes it."""

TIMING_KEYS = ("standard", "formula", "fit", "pixel_clock_hz", "horizontal", "vertical",
               "interlaced")  # fmt: skip
"""The keys a multi-mode spec gives per mode, never at the top level."""

SPEC_FIELDS = (
    Field("name", "identifier", "module / entity name, legal in Verilog and VHDL"),
    *_timing_fields(""),
    Field("core", "section", "options of the generated core", required=False,
          fields=CORE_FIELDS),
    Field("ports", "section", "port naming", required=False, fields=PORT_FIELDS),
    Field("board", "section", "the board's clock, for clock planning", required=False,
          fields=BOARD_FIELDS),
    Field("color", "section", "colour depth of the test-pattern design (build --pattern)",
          required=False, fields=COLOR_FIELDS),
    Field("modes", "list", f"several timings for one core ({MIN_MODES} to {MAX_MODES}), each "
          "given as a single-mode spec gives its timing; a mode input chooses among them at "
          "frame boundaries (see docs/multimode.md)", required=False, minimum=MIN_MODES,
          maximum=MAX_MODES, fields=MODE_FIELDS),
)  # fmt: skip

SHARED_FIELDS = tuple(f for f in SPEC_FIELDS if f.name not in TIMING_KEYS)
"""The top-level keys of a multi-mode spec: everything but the timing, which each mode gives."""
