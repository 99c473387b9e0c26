"""Timings used across the tests, as YAML text.

Sources: the 640x480, 800x600, 1280x720 and 1920x1080 figures are the
published standard modes (VESA DMT; CTA-861 VIC 4 and 16); the others are
made up for the tests (tiny, odd, huge), named as such.
"""

from __future__ import annotations


def _axis(a: tuple[int, int, int, int, str]) -> str:
    return (f"{{active: {a[0]}, front_porch: {a[1]}, sync: {a[2]}, back_porch: {a[3]}, "
            f"sync_polarity: {a[4]}}}")  # fmt: skip


def spec_text(
    name: str,
    clock: str,
    h: tuple[int, int, int, int, str],
    v: tuple[int, int, int, int, str],
    core: dict[str, object] | None = None,
    prefix: str | None = None,
    interlaced: bool = False,
) -> str:
    lines = [
        f"name: {name}",
        f"pixel_clock_hz: {clock}",
        f"horizontal: {_axis(h)}",
        f"vertical: {_axis(v)}",
        *(["interlaced: true"] if interlaced else []),
    ]
    if core:
        lines.append("core:")
        lines += [f"  {k}: {str(val).lower() if isinstance(val, bool) else val}"
                  for k, val in core.items()]  # fmt: skip
    if prefix is not None:
        lines += ["ports:", f"  prefix: {prefix}"]
    return "\n".join(lines) + "\n"


# VESA DMT, 640x480 at 60 Hz (DMT ID 04h): 25.175 MHz, 640 16 96 48 / 480 10 2 33, -/-.
DMT_640x480 = spec_text("dmt_640x480", "25.175 MHz",
                        (640, 16, 96, 48, "negative"), (480, 10, 2, 33, "negative"))  # fmt: skip
# VESA DMT, 800x600 at 60 Hz (DMT ID 09h): 40 MHz, 800 40 128 88 / 600 1 4 23, +/+.
DMT_800x600 = spec_text("dmt_800x600", "40 MHz",
                        (800, 40, 128, 88, "positive"), (600, 1, 4, 23, "positive"))  # fmt: skip
# CTA-861, VIC 4 (1280x720p60): 74.25 MHz, 1280 110 40 220 / 720 5 5 20, +/+.
CTA_720P = spec_text("cta_720p", "74.25 MHz",
                     (1280, 110, 40, 220, "positive"), (720, 5, 5, 20, "positive"))  # fmt: skip
# CTA-861, VIC 16 (1920x1080p60): 148.5 MHz, 1920 88 44 148 / 1080 4 5 36, +/+.
CTA_1080P = spec_text("cta_1080p", "148.5 MHz",
                      (1920, 88, 44, 148, "positive"), (1080, 4, 5, 36, "positive"))  # fmt: skip
# Made up: the smallest legal raster (1x1 active, one-cycle porches and syncs).
TINY = spec_text("tiny", "1 MHz", (1, 1, 1, 1, "positive"), (1, 1, 1, 1, "negative"))
# Made up: 8K-sized raster (7680x4320 active) to exercise wide counters.
HUGE = spec_text("huge", "2376 MHz",
                 (7680, 352, 176, 592, "positive"), (4320, 16, 20, 144, "positive"),
                 core={"pixels_per_clock": 8})  # fmt: skip
# Made up: small raster with zero back porches (sync pulses wrap to the next line/frame).
NO_BACK_PORCH = spec_text("no_back_porch", "1 MHz",
                          (12, 2, 3, 0, "negative"), (5, 1, 2, 0, "positive"))  # fmt: skip
# Made up: small raster with every core option turned on.
SMALL_ALL_OPTIONS = spec_text("small_opts", "10 MHz",
                              (16, 4, 4, 8, "positive"), (6, 2, 1, 3, "negative"),
                              core={"pixels_per_clock": 4, "clock_enable": True,
                                    "reset": "async_low", "lead": 3, "vsync_align": "line"},
                              prefix="lcd_")  # fmt: skip
# Made up: small raster, default options.
SMALL = spec_text("small_mode", "5 MHz",
                  (20, 3, 4, 5, "negative"), (8, 2, 2, 3, "positive"))  # fmt: skip
# Made up: x and y divided by core.scale (with and without several pixels per clock).
SCALED = spec_text("scaled_mode", "5 MHz", (24, 3, 4, 5, "negative"), (8, 2, 2, 3, "positive"),
                   core={"scale": 2})  # fmt: skip
SCALED_PPC = spec_text("scaled_ppc", "10 MHz", (32, 4, 4, 8, "positive"), (8, 1, 1, 2, "negative"),
                       core={"pixels_per_clock": 2, "scale": 4, "clock_enable": True})  # fmt: skip
# CTA-861, VIC 5 (1920x1080i60): 74.25 MHz, 1920 88 44 148 / per field 540 2 5 15, +/+,
# 1125 lines per frame (CTA-861-G Table 1, from memory).
CTA_1080I = spec_text("cta_1080i", "74.25 MHz", (1920, 88, 44, 148, "positive"),
                      (540, 2, 5, 15, "positive"), interlaced=True)  # fmt: skip
# Made up: a small interlaced raster, vsync column + half a line wraps into the next line.
SMALL_INTERLACED = spec_text("small_il", "5 MHz", (20, 3, 4, 5, "negative"),
                             (6, 1, 2, 2, "positive"), interlaced=True)  # fmt: skip
# Made up: small interlaced raster with pixels per clock, clock enable, vsync at line start,
# and the shortest back porch (field 0's vsync ends on its last line).
SMALL_INTERLACED_OPTS = spec_text("small_il_opts", "10 MHz", (16, 4, 4, 8, "positive"),
                                  (5, 1, 2, 1, "negative"),
                                  core={"pixels_per_clock": 2, "clock_enable": True,
                                        "reset": "async_low", "vsync_align": "line"},
                                  prefix="tv_", interlaced=True)  # fmt: skip


# ------------------------------------------------------------------ multi-mode

Axis5 = tuple[int, int, int, int, str]


def multi_text(name: str, modes: list[tuple[str, Axis5, Axis5]],
               core: dict[str, object] | None = None, prefix: str | None = None) -> str:  # fmt: skip
    """A multi-mode spec: one ``modes:`` entry per (clock, horizontal, vertical)."""
    lines = [f"name: {name}", "modes:"]
    for clock, h, v in modes:
        lines += [f"  - pixel_clock_hz: {clock}", f"    horizontal: {_axis(h)}",
                  f"    vertical: {_axis(v)}"]  # fmt: skip
    if core:
        lines.append("core:")
        lines += [f"  {k}: {str(val).lower() if isinstance(val, bool) else val}"
                  for k, val in core.items()]  # fmt: skip
    if prefix is not None:
        lines += ["ports:", f"  prefix: {prefix}"]
    return "\n".join(lines) + "\n"


# Made up: three small modes of different line lengths, frame heights and polarities
# (-/-, +/+, -/+), small enough for the cycle-by-cycle switching bench.
SMALL_MODES: list[tuple[str, Axis5, Axis5]] = [
    ("10 MHz", (24, 2, 4, 2, "negative"), (6, 1, 2, 1, "negative")),
    ("12 MHz", (32, 4, 6, 6, "positive"), (8, 2, 2, 2, "positive")),
    ("15 MHz", (40, 4, 8, 4, "negative"), (10, 1, 3, 2, "positive")),
]
MULTI_SMALL = multi_text("mm_small", SMALL_MODES)
# Made up: the same modes with every option a multi-mode core has, and a port prefix.
MULTI_SMALL_OPTS = multi_text("mm_opts", SMALL_MODES,
                              core={"clock_enable": True, "reset": "async_low",
                                    "vsync_align": "line", "scale": 2},
                              prefix="pnl_")  # fmt: skip
# Made up: two modes (a one-bit mode input) and sixteen modes (four bits, all values used).
MULTI_TWO = multi_text("mm_two", SMALL_MODES[:2], core={"reset": "sync_low"})
MULTI_SIXTEEN = multi_text("mm_sixteen", [("10 MHz", (24 + 2 * i, 2, 4, 2, "negative"),
                                           (6 + i % 3, 1, 2, 1, "positive")) for i in range(16)],
                           core={"reset": "async_high", "clock_enable": True})  # fmt: skip
