"""Stage 4: emitters, one per target language, fed by one precomputed context."""

from .verilog import render_verilog
from .vhdl import render_vhdl

__all__ = ["render_verilog", "render_vhdl"]
