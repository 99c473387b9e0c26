"""The analog end of a VGA output: a resistor DAC per colour channel, designed and judged.

:mod:`~synccore.analog.eseries` holds the IEC 60063 values, :mod:`~synccore.analog.network`
solves a network exactly by nodal analysis, :mod:`~synccore.analog.design` picks and judges
the resistors, :mod:`~synccore.analog.settings` reads the settings and design files, and
:mod:`~synccore.analog.report` writes text, JSON and design files.
"""

from synccore.analog.design import (
    TOPOLOGIES,
    VIDEO_FULL_SCALE_V,
    Channel,
    ChannelChoice,
    DacDesign,
    DacOptions,
    DesignError,
    analyse,
    design,
    evaluate,
)
from synccore.analog.eseries import SERIES
from synccore.analog.network import Branch, Network, node_voltages, r2r, weighted
from synccore.analog.report import CAUTIONS, as_json, channel_facts, design_text, network_text
from synccore.analog.settings import Settings, check, design_dac, inline, networks, read, realise

__all__ = [
    "CAUTIONS", "SERIES", "TOPOLOGIES", "VIDEO_FULL_SCALE_V",
    "Branch", "Channel", "ChannelChoice", "DacDesign", "DacOptions", "DesignError", "Network",
    "Settings", "analyse", "as_json", "channel_facts", "check", "design", "design_dac", "design_text",
    "evaluate", "inline", "network_text", "networks", "node_voltages", "r2r", "read", "realise", "weighted",
]  # fmt: skip
