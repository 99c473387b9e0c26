"""Stage 3: the timing model, the one oracle every emitter, bench and test relies on."""

from synccore.model.timing import Outputs, Timing, bits_for, timing

__all__ = ["Outputs", "Timing", "bits_for", "timing"]
