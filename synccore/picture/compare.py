"""Comparing the simulated monitor's picture with the test pattern the design draws."""

from __future__ import annotations

import numpy as np

from synccore.model import Timing
from synccore.model.pattern import levels, picture_size
from synccore.picture.monitor import Monitor, count, to_8bit
from synccore.spec import Spec


def check_pattern(mon: Monitor, spec: Spec, pattern: str) -> None:
    """A problem when the picture is not ``pattern`` as ``spec``'s first-light design draws it."""
    if mon.image is None:
        return
    w, h = picture_size(spec)
    table = np.array([[levels(pattern, x, y, w, h, spec.color) for x in range(w)] for y in range(h)],
                     dtype=np.int64)  # fmt: skip
    t = Timing(spec)
    s = t.scale_shift
    ys, xs = np.arange(t.frame_rows) >> s, np.arange(spec.horizontal.active) >> s  # both fields' rows
    want = table[ys[:, None], xs[None, :]]
    bits = (spec.color.red, spec.color.green, spec.color.blue)
    want8 = np.stack([to_8bit(want[..., c], bits[c]) for c in range(3)], axis=-1)
    got = np.asarray(mon.image.convert("RGB"))
    if got.shape != want8.shape:
        mon.problems.append(f"the picture is {mon.image.width}x{mon.image.height}, the {pattern} pattern "
                            f"is {spec.horizontal.active}x{t.frame_rows}")  # fmt: skip
        return
    bad = np.argwhere((got != want8).any(axis=-1))
    if len(bad):
        y, x = (int(i) for i in bad[0])
        mon.problems.append(f"the picture differs from the {pattern} pattern on {count(len(bad), 'pixel')}, "
                            f"first at column {x}, line {y}: {tuple(int(c) for c in got[y, x])}, the "
                            f"pattern has {tuple(int(c) for c in want8[y, x])}")  # fmt: skip
