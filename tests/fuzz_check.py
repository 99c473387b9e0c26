"""The allowed-error rule of the fuzzed readers, shared by benchmarks/fuzz.py and the replay tests.

A spec reader may read an input or raise :class:`SpecError` whose every problem is one line
that starts ``<source>:<line>:<col>: `` with the line inside the text.  The VCD reader may read
an input or raise :class:`VcdError`, one line starting ``<path>:<line>:<col>: `` or, for what
concerns the mapping as a whole (a signal not found or too wide, too few clock edges),
``<path>: ``.  A verdict is ``None`` when the rule holds, else the broken rule (a short text
whose digits and quoted values are blanked, so that one fault gives one signature).  Any other
exception propagates to the caller, which counts it as a crash.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from pathlib import Path

from synccore.errors import SpecError
from synccore.picture.vcd import VcdError

SPEC_NAME = "fuzz.yaml"
VCD_NAME = "run.vcd"
VCD_MAP = {"clk": "clk", "hsync": "hs", "vsync": "vs", "red": "r"}
"""The mapping the VCD reader is given (the seeds' names; the red pin is a 3-bit vector there)."""

_BREAKS = ("\n", "\r", "\x85", "\u2028", "\u2029")  # what YAML counts as a line break (YAML 1.1, 5.4)
WHOLE_FILE = ("no signal called", "several signals called", "bits wide;", "fewer than three falling edges")
"""VcdError messages about the mapping as a whole, which no line and column can place."""


def _blank(message: str) -> str:
    return re.sub(r"'[^']*'|\"[^\"]*\"|\d+", "_", message)[:90]


def spec_verdict(read: Callable[[], object], source: str, text: str) -> str | None:
    """Run one spec read; ``None`` when it read the text or refused it by the rule."""
    try:
        read()
    except SpecError as err:
        located = re.compile(re.escape(source) + r":(\d+):(\d+): \S")
        lines = sum(text.count(b) for b in _BREAKS) + 1  # an upper bound (CR LF counts twice)
        for problem in err.problems:
            line = str(problem)
            if line.splitlines() != [line]:
                return f"spec message is not one line: {_blank(line)}"
            m = located.match(line)
            if m is None:
                return f"spec message without file:line:col: {_blank(line)}"
            if not 1 <= int(m.group(1)) <= lines or int(m.group(2)) < 1:
                return f"spec message placed outside the text: {_blank(line[len(source):])}"
    return None


def vcd_verdict(read: Callable[[], object], path: Path) -> str | None:
    """Run one VCD read; ``None`` when it read the file or refused it by the rule."""
    try:
        read()
    except VcdError as err:
        line = str(err)
        if line.splitlines() != [line]:
            return f"vcd message is not one line: {_blank(line)}"
        rest = line[len(str(path)):] if line.startswith(str(path)) else None
        if rest is None:
            return f"vcd message does not name the file: {_blank(line)}"
        if re.match(r":\d+:\d+: \S", rest) is None and not any(w in rest for w in WHOLE_FILE):
            return f"vcd message without line:col: {_blank(rest)}"
    return None
