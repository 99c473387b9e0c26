"""Formal properties of a core: a property wrapper with a reference counter, for Yosys/SymbiYosys."""

from synccore.emit.formal.context import PROPERTY_NAMES, FormalContext, build_formal_context
from synccore.emit.formal.verilog import render_properties

__all__ = ["PROPERTY_NAMES", "FormalContext", "build_formal_context", "render_properties"]
