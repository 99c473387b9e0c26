"""synccore: display timing cores for FPGAs.

A YAML timing description is validated into a :class:`Spec`, derived into a
:class:`Timing` (the reference model every test checks against), and emitted
as Verilog-2001 and VHDL cores.
"""

from synccore._version import __version__
from synccore.emit import render_verilog, render_vhdl
from synccore.errors import Location, Problem, SpecError
from synccore.model import Outputs, Timing, timing
from synccore.spec import Axis, CoreOptions, Spec
from synccore.spec.schema import json_schema
from synccore.timings import load, loads

__all__ = [
    "Axis",
    "CoreOptions",
    "Location",
    "Outputs",
    "Problem",
    "Spec",
    "SpecError",
    "Timing",
    "__version__",
    "json_schema",
    "load",
    "loads",
    "render_verilog",
    "render_vhdl",
    "timing",
]
