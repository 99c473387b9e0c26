"""Clock planning: from the board's oscillator to the core clock.

:mod:`.families` holds one data entry per FPGA family (its vendor's divider
ranges and frequency limits); :mod:`.solve` finds the closest legal
settings; :mod:`synccore.clocking.plan` (imported on its own, since it
depends on the timing model) turns a spec and a board into a plan, with
:mod:`synccore.clocking.adjust` finding a raster the route can reach when it
misses; :mod:`synccore.clocking.report` says it in words and
:mod:`synccore.clocking.advice` writes the adjusted timing as a spec.
:mod:`synccore.clocking.modes` plans several modes from one board clock (one PLL
output with clock-enable divides, or a setting per mode), and
:mod:`synccore.clocking.modes_report` says that in words.
"""

from synccore.clocking.families import FAMILIES, FAMILY_KEYS, Family, family
from synccore.clocking.solve import MONITOR_TOLERANCE, EnableSetting, Setting, solve, solve_enable

__all__ = [
    "FAMILIES",
    "FAMILY_KEYS",
    "MONITOR_TOLERANCE",
    "EnableSetting",
    "Family",
    "Setting",
    "family",
    "solve",
    "solve_enable",
]
