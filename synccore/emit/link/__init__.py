"""The DVI/TMDS link emitters (issue 11): the serialiser and the DVI top's pin files here."""

from synccore.emit.link.dvi_pins import dvi_pin_suffix, render_dvi_pins
from synccore.emit.link.serialiser import render_io_models, render_serialiser, serialiser_context

__all__ = [
    "dvi_pin_suffix",
    "render_dvi_pins",
    "render_io_models",
    "render_serialiser",
    "serialiser_context",
]
