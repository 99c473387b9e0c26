"""Stage 2: validate located YAML values into a frozen :class:`Spec`.

The format is described once, as a table of :class:`Field` entries.  The same
table drives validation here and the JSON Schema in :mod:`synccore.schema`, so
the two can never disagree.  The validator walks the whole document and
collects every problem before raising, so a user can fix them all at once.
"""

from __future__ import annotations

import difflib
import re
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation
from fractions import Fraction
from pathlib import Path
from typing import Any

from . import loader
from .clocking.families import FAMILY_KEYS
from .errors import Location, Problem, SpecError
from .names import identifier_problem

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


@dataclass(frozen=True)
class Field:
    """One key of the format: its kind, constraints, default and one line of documentation."""

    name: str
    kind: str  # int | bool | choice | identifier | prefix | frequency | decimal | text | section
    doc: str
    required: bool = True
    default: Any = None
    minimum: int | None = None
    maximum: int | None = None
    choices: tuple[Any, ...] = ()
    fields: tuple[Field, ...] = ()
    ranged: bool = False  # may also be a datasheet range {min, typ, max} (needs a fit: section)


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

FORMULA_METHODS = ("cvt", "cvt-rb", "cvt-rb2", "gtf")

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
          required=False, choices=FAMILY_KEYS),
)  # fmt: skip

COLOR_FIELDS = (
    Field("red", "int", "bits of the red channel on the colour pins", required=False,
          default=4, minimum=1, maximum=8),
    Field("green", "int", "bits of the green channel", required=False, default=4,
          minimum=1, maximum=8),
    Field("blue", "int", "bits of the blue channel", required=False, default=4,
          minimum=1, maximum=8),
)  # fmt: skip

SPEC_FIELDS = (
    Field("name", "identifier", "module / entity name, legal in Verilog and VHDL"),
    Field("standard", "text", 'a library timing instead of the explicit keys: "1280x720@60", '
          '"DMT 0x55", "CTA VIC 4" (see synccore modes)', required=False),
    Field("formula", "section", "a formula timing instead of the explicit keys",
          required=False, fields=FORMULA_FIELDS),
    Field("fit", "section", "target for datasheet ranges given as {min, typ, max}",
          required=False, fields=FIT_FIELDS),
    Field("pixel_clock_hz", "frequency",
          'pixel clock: a number in Hz or a string with a unit ("25.175 MHz", "25175 kHz")',
          ranged=True),
    Field("horizontal", "section", "timing within a line, in pixels",
          fields=_axis_fields("pixels", "line")),
    Field("vertical", "section", "timing within a frame, in lines",
          fields=_axis_fields("lines", "frame")),
    Field("core", "section", "options of the generated core", required=False,
          fields=CORE_FIELDS),
    Field("ports", "section", "port naming", required=False, fields=PORT_FIELDS),
    Field("board", "section", "the board's clock, for clock planning", required=False,
          fields=BOARD_FIELDS),
    Field("color", "section", "colour depth of the test-pattern design (build --pattern)",
          required=False, fields=COLOR_FIELDS),
)  # fmt: skip


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
class Spec:
    """A validated timing description."""

    name: str
    pixel_clock_hz: Fraction
    horizontal: Axis
    vertical: Axis
    core: CoreOptions = CoreOptions()
    port_prefix: str = ""
    source: str = "<string>"
    origin: str = ""
    """Where the timing came from when not given explicitly: a library entry, a formula, a fit."""
    notes: tuple[str, ...] = ()
    """What the resolution step adjusted or wants the user to know, one sentence each."""
    board: Board = Board()
    color: Color = Color()


# ---------------------------------------------------------------- frequencies

_FREQUENCY = re.compile(
    r"\s*([0-9]+(?:\.[0-9]*)?(?:[eE][+-]?[0-9]+)?)\s*(hz|khz|mhz|ghz)?\s*\Z", re.IGNORECASE
)
_PLAIN = re.compile(r"\s*[0-9]+(?:\.[0-9]*)?\s*\Z")
_UNIT = {None: 1, "hz": 1, "khz": 10**3, "mhz": 10**6, "ghz": 10**9}


def parse_frequency(value: Any) -> Fraction | None:
    """A frequency in Hz from a number or a string with a unit, exactly; None if not one."""
    if isinstance(value, bool):
        return None
    if isinstance(value, (int, Fraction)):
        return Fraction(value)
    if isinstance(value, float):
        return Fraction(Decimal(repr(value)))
    if isinstance(value, str):
        match = _FREQUENCY.match(value)
        if not match:
            return None
        try:
            number = Decimal(match.group(1))
        except InvalidOperation:  # pragma: no cover - the pattern admits only numbers
            return None
        unit = match.group(2).lower() if match.group(2) else None
        return Fraction(number) * _UNIT[unit]
    return None


# ------------------------------------------------------------------ validator


class _Collector:
    def __init__(self) -> None:
        self.problems: list[Problem] = []

    def add(self, location: Location | None, path: str, message: str) -> None:
        self.problems.append(Problem(location, path, message))


def _describe(value: Any) -> str:
    if isinstance(value, (loader.Located)):
        return "a list" if isinstance(value.value, list) else "a mapping"
    if value is None:
        return "nothing"
    return repr(value)


def _check_value(f: Field, node: loader.Node, path: str, out: _Collector) -> Any:
    """Return the checked Python value of one field, or None after recording a problem."""
    where = node.location
    if f.kind == "section":
        if not isinstance(node, loader.Located) or not isinstance(node.value, dict):
            out.add(where, path, f"must be a mapping of {_names(f.fields)}, got {_describe_node(node)}")
            return None
        return _check_section(f.fields, node, path, out)
    if not isinstance(node, loader.Scalar):
        out.add(where, path, f"must be a single value, got {_describe(node)}")
        return None
    value = node.value
    if f.kind == "int":
        if isinstance(value, bool) or not isinstance(value, int):
            out.add(where, path, f"must be a whole number, got {value!r}")
            return None
        if f.minimum is not None and value < f.minimum:
            out.add(where, path, f"must be ≥ {f.minimum}, got {value}")
            return None
        if f.maximum is not None and value > f.maximum:
            out.add(where, path, f"must be ≤ {f.maximum}, got {value}")
            return None
        return value
    if f.kind == "bool":
        if not isinstance(value, bool):
            out.add(where, path, f"must be true or false, got {value!r}")
            return None
        return value
    if f.kind == "choice":
        if value not in f.choices or isinstance(value, bool):
            allowed = ", ".join(str(c) for c in f.choices)
            hint = _near(str(value), [str(c) for c in f.choices])
            out.add(where, path, f"must be one of {allowed}, got {value!r}{hint}")
            return None
        return value
    if f.kind == "decimal":
        number = parse_frequency(value)  # a plain non-negative number, no unit
        if number is None or isinstance(value, str) and not _PLAIN.match(value):
            out.add(where, path, f"must be a number ≥ 0, got {value!r}")
            return None
        return number
    if f.kind == "text":
        if not isinstance(value, str) or not value.strip():
            out.add(where, path, f"must be text, got {value!r}")
            return None
        return value
    if f.kind == "identifier":
        if not isinstance(value, str):
            out.add(where, path, f"must be a name, got {value!r}")
            return None
        reason = identifier_problem(value)
        if reason:
            out.add(where, path, f"{reason}, got {value!r}")
            return None
        return value
    if f.kind == "prefix":
        if value is None:
            return ""
        if not isinstance(value, str):
            out.add(where, path, f"must be text, got {value!r}")
            return None
        if value and identifier_problem(value + "x") and identifier_problem(value.rstrip("_") + "_x"):
            out.add(where, path,
                    "must start with a letter and hold only letters, digits and single "
                    f"underscores, got {value!r}")  # fmt: skip
            return None
        return value
    if f.kind == "frequency":
        hz = parse_frequency(value)
        if hz is None:
            out.add(where, path,
                    'must be a frequency in Hz or a string like "25.175 MHz" or "25175 kHz", '
                    f"got {value!r}")  # fmt: skip
            return None
        if hz <= 0 or hz > MAX_PIXEL_CLOCK_HZ:
            out.add(where, path, f"must be above 0 and at most 10 GHz, got {value!r}")
            return None
        return hz
    raise AssertionError(f"unknown field kind {f.kind!r}")  # pragma: no cover


def _describe_node(node: loader.Node) -> str:
    if isinstance(node, loader.Scalar):
        return repr(node.value)
    return _describe(node)


def _names(fields: tuple[Field, ...]) -> str:
    return ", ".join(f.name for f in fields)


def _near(word: str, options: list[str]) -> str:
    close = difflib.get_close_matches(word, options, n=1, cutoff=0.6)
    return f" (did you mean {close[0]!r}?)" if close else ""


def _join(path: str, name: str) -> str:
    return f"{path}.{name}" if path else name


def _check_section(
    fields: tuple[Field, ...], node: loader.Located, path: str, out: _Collector
) -> dict[str, Any] | None:
    given: dict[str, loader.Node] = node.value
    known = {f.name: f for f in fields}
    result: dict[str, Any] = {}
    ok = True
    suggested: set[str] = set()
    for key in given:
        if key not in known:
            close = difflib.get_close_matches(key, [k for k in known if k not in given], n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            suggested.update(close)
            out.add(node.key_locations[key], _join(path, key),
                    f"unknown key{hint}; allowed here: {_names(fields)}")  # fmt: skip
            ok = False
    for f in fields:
        if f.name not in given:
            if f.name in suggested:  # already reported as a misspelling
                ok = False
            elif f.required:
                out.add(node.location, _join(path, f.name), "required key is missing")
                ok = False
            elif f.kind == "section":
                result[f.name] = {}
            else:
                result[f.name] = f.default
            continue
        value = _check_value(f, given[f.name], _join(path, f.name), out)
        if value is None:
            ok = False
        result[f.name] = value
    return result if ok else None


def _where(doc: loader.Located, *path: str) -> Location:
    """The location of the value at a dotted path, or of the nearest enclosing mapping."""
    node: loader.Node = doc
    for key in path:
        if not isinstance(node, loader.Located) or not isinstance(node.value, dict):
            break
        if key not in node.value:
            return node.location
        node = node.value[key]
    return node.location


def validate(doc: loader.Node, *, source: str = "<string>") -> Spec:
    """Check a located document against the format; raise :class:`SpecError` with every problem."""
    out = _Collector()
    if not isinstance(doc, loader.Located) or not isinstance(doc.value, dict):
        loc = doc.location
        raise SpecError([Problem(loc, "", f"must be a mapping of {_names(SPEC_FIELDS)}, "
                                          f"got {_describe_node(doc)}")])  # fmt: skip
    from .resolve import resolve  # late import: resolve builds on this module's helpers

    resolved = resolve(doc)
    out.problems.extend(resolved.problems)
    values = _check_section(SPEC_FIELDS, resolved.doc, "", out)
    if values is None or out.problems:
        raise SpecError(out.problems)

    h = Axis(**values["horizontal"])
    v = Axis(**values["vertical"])
    core = CoreOptions(**values["core"]) if values["core"] else CoreOptions()
    prefix: str = (values["ports"] or {}).get("prefix", "") or ""
    _check_cross(resolved.doc, values["name"], h, v, core, prefix, out)
    if out.problems:
        raise SpecError(out.problems)
    return Spec(
        name=values["name"],
        pixel_clock_hz=values["pixel_clock_hz"],
        horizontal=h,
        vertical=v,
        core=core,
        port_prefix=prefix,
        source=source,
        origin=resolved.origin,
        notes=resolved.notes,
        board=Board(**values["board"]) if values["board"] else Board(),
        color=Color(**values["color"]) if values["color"] else Color(),
    )


def _check_cross(
    doc: loader.Located,
    name: str,
    h: Axis,
    v: Axis,
    core: CoreOptions,
    prefix: str,
    out: _Collector,
) -> None:
    """Rules that involve more than one field."""
    for axis, label, unit in ((h, "horizontal", "pixels"), (v, "vertical", "lines")):
        if axis.total > MAX_AXIS:
            out.add(_where(doc, label), label,
                    f"total of {axis.total} {unit} is more than {MAX_AXIS}")  # fmt: skip
    n = core.pixels_per_clock
    if n > 1:
        for key in ("active", "front_porch", "sync", "back_porch"):
            value = getattr(h, key)
            if value % n:
                out.add(_where(doc, "horizontal", key), f"horizontal.{key}",
                        f"must divide by core.pixels_per_clock = {n}, got {value}")  # fmt: skip
    if core.scale > 1:
        for axis, label in ((h, "horizontal"), (v, "vertical")):
            if axis.active % core.scale:
                out.add(_where(doc, label, "active"), f"{label}.active",
                        f"must divide by core.scale = {core.scale}, got {axis.active}")  # fmt: skip
    frame_cycles = (h.total // n) * v.total
    if core.lead >= frame_cycles and frame_cycles > 0:
        out.add(_where(doc, "core", "lead"), "core.lead",
                f"must be less than one frame ({frame_cycles} cycles), got {core.lead}")  # fmt: skip
    port_names = [p for p in BASE_PORTS]
    for port in port_names:
        full = prefix + port
        reason = identifier_problem(full)
        if reason:
            out.add(_where(doc, "ports", "prefix"), "ports.prefix",
                    f"makes port {full!r} illegal: {reason}")  # fmt: skip
            break
    clash = [p for p in port_names if (prefix + p).lower() == name.lower()]
    if clash:
        out.add(_where(doc, "name"), "name",
                f"clashes with port {prefix + clash[0]!r} (VHDL ignores case), got {name!r}")  # fmt: skip


def load(path: str | Path) -> Spec:
    """Read, parse and validate one timing description file."""
    return validate(loader.load_file(path), source=str(path))


def loads(text: str, source: str = "<string>") -> Spec:
    """Parse and validate a timing description given as YAML text."""
    return validate(loader.load_text(text, source), source=source)


def to_dict(spec: Spec) -> dict[str, Any]:
    """The validated spec as plain JSON-ready values (the clock as an exact "num/den" string)."""
    return {
        "name": spec.name,
        "pixel_clock_hz": f"{spec.pixel_clock_hz.numerator}/{spec.pixel_clock_hz.denominator}",
        "horizontal": vars(spec.horizontal).copy(),
        "vertical": vars(spec.vertical).copy(),
        "core": vars(spec.core).copy(),
        "port_prefix": spec.port_prefix,
        "source": spec.source,
        "color": vars(spec.color).copy(),
    }


def from_dict(data: dict[str, Any]) -> Spec:
    """Rebuild a spec written by :func:`to_dict` (trusted input: no validation)."""
    return Spec(
        name=data["name"],
        pixel_clock_hz=Fraction(data["pixel_clock_hz"]),
        horizontal=Axis(**data["horizontal"]),
        vertical=Axis(**data["vertical"]),
        core=CoreOptions(**data["core"]),
        port_prefix=data["port_prefix"],
        source=data["source"],
        color=Color(**data.get("color", {})),
    )
