"""The types of a validated timing description, and the allowed values of the format.

This module imports nothing from synccore but :class:`~synccore.errors.Location`
(the earliest stage): every later stage may use it.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from synccore.errors import Location

MAX_AXIS = 65535
"""Largest total (pixels per line, lines per frame) accepted; beyond it no display exists."""

MAX_PIXEL_CLOCK_HZ = 10_000_000_000
"""10 GHz: well above any display link's pixel clock."""

POLARITIES = ("positive", "negative")
RESETS = ("sync_high", "sync_low", "async_high", "async_low")
VSYNC_ALIGNS = ("hsync", "line")
PIXELS_PER_CLOCK = (1, 2, 4, 8)
SCALES = (1, 2, 4)

BASE_PORTS = (
    "clk", "rst", "rst_n", "ce", "hsync", "vsync", "de", "hblank", "vblank",
    "x", "y", "line_start", "frame_start",
)  # fmt: skip

FORMULA_METHODS = ("cvt", "cvt-rb", "cvt-rb2", "gtf")

MIN_MODES = 2
MAX_MODES = 16
"""How many timings a multi-mode spec (``modes:``) may list: a 4-bit mode input at most."""

MULTI_MODE_PORTS = ("mode", "mode_active")
"""The ports a multi-mode core adds to :data:`BASE_PORTS`."""

FAMILY_NAMES = ("ice40", "ecp5", "xc7-mmcm", "xc7-pll", "gowin", "cyclone")
"""FPGA families whose PLL clock planning knows, in the order they are listed to users
(synccore.clocking.families holds their data and checks that it knows exactly these)."""


@dataclass(frozen=True)
class Axis:
    """One direction of the raster, in pixels (horizontal) or lines (vertical)."""

    active: int
    front_porch: int
    sync: int
    back_porch: int
    sync_polarity: str

    @property
    def total(self) -> int:
        return self.active + self.front_porch + self.sync + self.back_porch

    @property
    def blanking(self) -> int:
        return self.total - self.active

    @property
    def sync_start(self) -> int:
        """First pixel (line) of the sync pulse, counted from the first active one.

        The VESA order within a line (a frame): active, front porch, sync, back porch.
        This is the one place that order is written; everything else asks here or
        :class:`synccore.model.Timing`, which converts it to clock cycles.
        """
        return self.active + self.front_porch

    @property
    def sync_stop(self) -> int:
        """One past the last pixel (line) of the sync pulse, not wrapped."""
        return self.sync_start + self.sync


@dataclass(frozen=True)
class CoreOptions:
    """How the generated core is built; every option has a default."""

    pixels_per_clock: int = 1
    clock_enable: bool = False
    reset: str = "sync_high"
    lead: int = 0
    vsync_align: str = "hsync"
    scale: int = 1


@dataclass(frozen=True)
class Board:
    """The board's oscillator and FPGA family, when the spec gives them (for clock planning)."""

    clock_hz: Fraction | None = None
    family: str | None = None


@dataclass(frozen=True)
class Color:
    """Bits per colour channel of the test-pattern design; 4-4-4 unless the spec says."""

    red: int = 4
    green: int = 4
    blue: int = 4


@dataclass(frozen=True)
class ValueRange:
    """One datasheet range, ``min`` to ``max``, with ``typ`` when the datasheet gives one."""

    min: Fraction
    max: Fraction
    typ: Fraction | None = None

    def holds(self, value: int | Fraction) -> bool:
        return self.min <= value <= self.max


@dataclass(frozen=True)
class Fit:
    """What a spec fitted to datasheet ranges (``fit:``) started from.

    ``ranges`` are the fields the document gave as ``{min, typ, max}``, by dotted path
    (``"horizontal.front_porch"``, ``"pixel_clock_hz"``), in the document's order; a field
    the document gave as one number is fixed by the datasheet and has no entry.  Later
    stages (the clock plan's porch adjustment) stay inside them.  ``tolerance`` is the
    fit's ``tolerance_percent`` as a share (0.005 for 0.5 %) when the document gives it,
    None when it leaves it to the default.
    """

    ranges: tuple[tuple[str, ValueRange], ...]
    tolerance: Fraction | None = None

    def range_of(self, path: str) -> ValueRange | None:
        for key, r in self.ranges:
            if key == path:
                return r
        return None


@dataclass(frozen=True)
class Spec:
    """A validated timing description."""

    name: str
    pixel_clock_hz: Fraction
    horizontal: Axis
    vertical: Axis
    core: CoreOptions = CoreOptions()
    port_prefix: str = ""
    interlaced: bool = False
    """Two fields per frame; ``vertical`` describes one field (see :mod:`synccore.model.timing`)."""
    source: str = "<string>"
    origin: str = ""
    """Where the timing came from when not given explicitly: a library entry, a formula, a fit."""
    notes: tuple[str, ...] = ()
    """What the resolution step adjusted or wants the user to know, one sentence each."""
    board: Board = Board()
    color: Color = Color()
    fit: Fit | None = None
    """The datasheet ranges and tolerance of a timing fitted with ``fit:``; None otherwise."""
    modes: tuple[Spec, ...] = ()
    """A multi-mode spec's timings, in the order of ``modes:`` (empty for a single-mode spec).

    Each is a whole single-mode spec (the shared name, core and ports, its own timing);
    the top-level timing fields of a multi-mode spec are those of mode 0."""
    locations: Mapping[str, Location] = field(default_factory=dict, compare=False, repr=False)
    """Where the source file writes each field, by dotted path (``"horizontal.active"``; ``""``
    is the whole document), filled by the validator so that later checks can point into the
    file.  Empty for a spec built in code; not part of equality, nor of :func:`to_dict`."""

    def location(self, path: str) -> Location | None:
        """Where the field at dotted ``path`` is written, else its nearest enclosing section.

        None when the spec has no locations (built in code or by :func:`from_dict`).
        """
        parts = path.split(".") if path else []
        while parts:
            found = self.locations.get(".".join(parts))
            if found is not None:
                return found
            parts.pop()
        return self.locations.get("")


def to_dict(spec: Spec) -> dict[str, Any]:
    """The validated spec as plain JSON-ready values (the clock as an exact "num/den" string)."""
    return {
        "name": spec.name,
        "pixel_clock_hz": f"{spec.pixel_clock_hz.numerator}/{spec.pixel_clock_hz.denominator}",
        "horizontal": vars(spec.horizontal).copy(),
        "vertical": vars(spec.vertical).copy(),
        "core": vars(spec.core).copy(),
        "port_prefix": spec.port_prefix,
        **({"interlaced": True} if spec.interlaced else {}),
        "source": spec.source,
        "color": vars(spec.color).copy(),
        **({"modes": [to_dict(m) for m in spec.modes]} if spec.modes else {}),
        "fit": None if spec.fit is None else {
            "ranges": {path: {k: _exact(v) for k, v in vars(r).items()}
                       for path, r in spec.fit.ranges},
            "tolerance": _exact(spec.fit.tolerance),
        },
    }


def _exact(value: Fraction | None) -> str | None:
    return None if value is None else f"{value.numerator}/{value.denominator}"


def _fraction(text: str | None) -> Fraction | None:
    return None if text is None else Fraction(text)


def _fit_from(data: dict[str, Any] | None) -> Fit | None:
    if data is None:
        return None
    ranges = tuple(
        (path, ValueRange(Fraction(r["min"]), Fraction(r["max"]), _fraction(r["typ"])))
        for path, r in data["ranges"].items()
    )
    return Fit(ranges, _fraction(data["tolerance"]))


def from_dict(data: dict[str, Any]) -> Spec:
    """Rebuild a spec written by :func:`to_dict` (trusted input: no validation)."""
    return Spec(
        name=data["name"],
        pixel_clock_hz=Fraction(data["pixel_clock_hz"]),
        horizontal=Axis(**data["horizontal"]),
        vertical=Axis(**data["vertical"]),
        core=CoreOptions(**data["core"]),
        port_prefix=data["port_prefix"],
        interlaced=data.get("interlaced", False),
        source=data["source"],
        color=Color(**data.get("color", {})),
        fit=_fit_from(data.get("fit")),
        modes=tuple(from_dict(m) for m in data.get("modes", ())),
    )
