"""Emitters: every text synccore writes, laid out by Jinja templates from precomputed contexts."""

from synccore.emit.core.verilog import render_verilog
from synccore.emit.core.vhdl import render_vhdl

__all__ = ["render_verilog", "render_vhdl"]
