"""The timing model, the one oracle every emitter, bench and test relies on.

:class:`Timing` holds every timing rule; :mod:`synccore.model.contract` names the
conventions the benches, the measurement and the Amaranth engine share.
"""

from synccore.model.contract import (
    FIELD_MONITOR,
    LFSR_SEED,
    MONITOR_FIELDS,
    RESET_CYCLES,
    Event,
    ResetPort,
    decode,
    monitor_fields,
    parse_events,
    reset_port,
    stop_count,
)
from synccore.model.fields import bits_for
from synccore.model.multimode import Change, Frame, MultiTiming, multi_timing
from synccore.model.timing import Outputs, Timing, timing

__all__ = [
    "FIELD_MONITOR",
    "LFSR_SEED",
    "MONITOR_FIELDS",
    "RESET_CYCLES",
    "Change",
    "Frame",
    "MultiTiming",
    "Event",
    "Outputs",
    "ResetPort",
    "Timing",
    "bits_for",
    "decode",
    "monitor_fields",
    "multi_timing",
    "parse_events",
    "reset_port",
    "stop_count",
    "timing",
]
