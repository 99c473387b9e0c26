"""The specs the encoder tests use: examples, with ppc and ce varied where no example has the mix."""

from __future__ import annotations

import dataclasses

import synccore
from synccore.spec import Spec
from tests.conftest import ROOT

EXAMPLES = ROOT / "examples"


def variant(example: str, *, ppc: int, ce: bool) -> Spec:
    """``example`` (a file in examples/) with pixels_per_clock and clock_enable set."""
    spec = synccore.load(EXAMPLES / example)
    core = dataclasses.replace(spec.core, pixels_per_clock=ppc, clock_enable=ce)
    return dataclasses.replace(spec, core=core)


CONFIGS = {
    # name: (spec, cycles of the simulation)
    "ppc1": (lambda: variant("framebuffer_320x240.yaml", ppc=1, ce=False), 200_000),
    "ppc1_ce": (lambda: variant("lab_readout_640x480.yaml", ppc=1, ce=True), 60_000),
    "ppc2": (lambda: variant("monitor_1280x720.yaml", ppc=2, ce=False), 100_000),
    "ppc2_ce": (lambda: variant("monitor_1280x720.yaml", ppc=2, ce=True), 60_000),
}
