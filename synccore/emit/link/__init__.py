"""Emitters of the DVI/TMDS link: the TMDS encoder."""

from synccore.emit.link.encoder import ENCODER_LATENCY, encoder_module, render_encoder

__all__ = ["ENCODER_LATENCY", "encoder_module", "render_encoder"]
