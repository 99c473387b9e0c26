"""Test patterns for a first-light design: what each pattern draws, pixel by pixel.

A pattern is a function of the pixel's column ``x`` and row ``y`` inside the
picture (``width`` x ``height``: the active area divided by ``core.scale``,
so with scale 2 each picture pixel covers 2 x 2 pixels of the signal) and of
the colour depth; it gives the
level of each channel, 0 .. 2**bits - 1.  The emitted pattern generator
(``emit/first_light/pattern.py``) computes the same function in hardware; the simulated
display turns the colour pins back into an image.  Definitions:

``bars``
    Eight vertical bars of equal width: bar ``b = floor(8 * x / width)``;
    red is full when bit 0 of ``b`` is set, green for bit 1, blue for bit 2.
``grid``
    Full white on every 16th column and row (``x mod 16 == 0``,
    ``y mod 16 == 0``) and on the last column and row; black elsewhere.
``gradient``
    Red and blue rise with ``x``, green with ``y``: each channel takes the top
    ``bits`` bits of the coordinate written with as many bits as
    ``width - 1`` (``height - 1``) needs, padded with zeros below when the
    coordinate has fewer bits than the channel.
``checker``
    16 x 16 squares: full white where ``floor(x/16) + floor(y/16)`` is odd.
``edges``
    A one-pixel white frame on the outermost columns and rows, black inside:
    on a monitor it shows at once whether a porch is off by a pixel.

Several pixels per clock.  With ``core.pixels_per_clock = N`` the design draws N
pixels on each cycle: the core's ``x`` is the picture column of the group's first
pixel, and pixel ``i`` of the group (``0 .. N-1``, left to right) shows picture column
``x + i // scale``.  So ``max(1, N // scale)`` distinct columns are drawn per cycle
(:func:`columns_per_cycle`); with a scale of N or more all N pixels show column ``x``.
"""

from __future__ import annotations

from synccore.errors import Problem
from synccore.model import bits_for
from synccore.spec import Color, Spec

PATTERNS = ("bars", "grid", "gradient", "checker", "edges")
GRID_STEP = 16
"""Spacing of the grid lines and size of the checker squares (a power of two)."""
MIN_ACTIVE = 2 * GRID_STEP
"""Smallest active width and height a pattern is built for."""
PIPELINE_STAGES = 1
"""Clock cycles between x/y entering the pattern generator and its colour output."""


def pattern_problems(spec: Spec) -> list[Problem]:
    """Every reason the pattern design cannot be built for ``spec`` (empty when it can).

    Each problem names the field it is about and, when the spec was read from a file,
    where that file writes it, so a caller can raise them together as a ``SpecError``.
    """
    out = []
    scale = spec.core.scale
    need = MIN_ACTIVE * scale
    with_scale = f" with core.scale = {scale}" if scale > 1 else ""
    for label, active in (("horizontal", spec.horizontal.active), ("vertical", spec.vertical.active)):
        if active < need:
            path = f"{label}.active"
            out.append(Problem(spec.location(path), path, f"must be ≥ {need} for the "
                               f"test-pattern design{with_scale}, got {active}"))  # fmt: skip
    return out


def picture_size(spec: Spec) -> tuple[int, int]:
    """Width and height of the pattern's picture: the active area divided by core.scale.

    Interlaced: the whole frame's rows, both fields' (y counts them: 2 x line + field).
    """
    rows = spec.vertical.active * (2 if spec.interlaced else 1)
    return spec.horizontal.active // spec.core.scale, rows // spec.core.scale


def columns_per_cycle(spec: Spec) -> int:
    """Distinct picture columns the design draws on one cycle: pixels_per_clock // scale, at least 1."""
    return max(1, spec.core.pixels_per_clock // spec.core.scale)


def pixel_column(x: int, i: int, scale: int) -> int:
    """Picture column of pixel ``i`` of a group whose first pixel is at picture column ``x``."""
    return x + i // scale


def bar_bounds(width: int) -> list[int]:
    """First column of bars 1..7: ``ceil(k * width / 8)``."""
    return [-(-k * width // 8) for k in range(1, 8)]


def _top_bits(value: int, value_bits: int, bits: int) -> int:
    if value_bits >= bits:
        return value >> (value_bits - bits)
    return value << (bits - value_bits)


def levels(name: str, x: int, y: int, width: int, height: int, color: Color) -> tuple[int, int, int]:
    """(red, green, blue) levels of pattern ``name`` at column ``x``, row ``y``."""
    full = ((1 << color.red) - 1, (1 << color.green) - 1, (1 << color.blue) - 1)
    black = (0, 0, 0)
    if name == "bars":
        b = 8 * x // width
        return (full[0] if b & 1 else 0, full[1] if b & 2 else 0, full[2] if b & 4 else 0)
    if name == "grid":
        on = x % GRID_STEP == 0 or y % GRID_STEP == 0 or x == width - 1 or y == height - 1
        return full if on else black
    if name == "gradient":
        xb, yb = bits_for(width - 1), bits_for(height - 1)
        return (_top_bits(x, xb, color.red), _top_bits(y, yb, color.green),
                _top_bits(x, xb, color.blue))  # fmt: skip
    if name == "checker":
        return full if (x // GRID_STEP + y // GRID_STEP) % 2 else black
    if name == "edges":
        on = x in (0, width - 1) or y in (0, height - 1)
        return full if on else black
    raise ValueError(f"unknown pattern {name!r}; choose from {', '.join(PATTERNS)}")
