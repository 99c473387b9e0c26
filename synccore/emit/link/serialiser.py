"""The TMDS serialiser ``<name>_serialiser``: three 10-bit words (x ppc) and the clock lane -> pins.

One language-neutral context (:class:`SerialiserContext`, built in
``_serialiser_context``) holds every number the templates need; the views
(``_serialiser_views``) turn it into Verilog or VHDL pieces, and
``templates/link/serialiser.{v,vhd}.j2`` lay them out, choosing the family's
body by booleans. The DDR output register models for simulation are in
``templates/bench/io_models.v.j2`` (:func:`render_io_models`).
"""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.link._serialiser_context import (
    ONE_PIXEL_FAMILIES,
    SHIFT_FAMILIES,
    Port,
    SerialiserContext,
    module_name,
    serialiser_context,
)
from synccore.emit.link._serialiser_views import LANGUAGES, render
from synccore.spec import Spec

IO_MODELS = "synccore_io_models"
"""The file stem of the I/O primitive models (``synccore_io_models.v``)."""


def render_serialiser(spec: Spec, family_key: str, language: str) -> str:
    """The serialiser of ``spec`` for ``family_key`` as ``language`` ("verilog" | "vhdl") text.

    Raises ToolError (one line) for an unknown family, or for ppc != 1 on the families whose
    hard serialiser takes one pixel per clock (xc7-mmcm, xc7-pll, gowin)."""
    return render(serialiser_context(spec, family_key), language)


def render_io_models() -> str:
    """Behavioural Verilog models of the I/O primitives the serialisers use; not for synthesis."""
    return environment().get_template("bench/io_models.v.j2").render(mark=GENERATED_MARK)


__all__ = [
    "IO_MODELS",
    "LANGUAGES",
    "ONE_PIXEL_FAMILIES",
    "SHIFT_FAMILIES",
    "Port",
    "SerialiserContext",
    "module_name",
    "render_io_models",
    "render_serialiser",
    "serialiser_context",
]
