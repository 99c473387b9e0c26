"""Stage 4: emitters, one per target language, fed by one precomputed context."""

from synccore.emit.core.verilog import render_verilog
from synccore.emit.core.vhdl import render_vhdl

__all__ = ["render_verilog", "render_vhdl"]
