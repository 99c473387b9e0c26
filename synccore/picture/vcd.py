"""Reading a VCD (IEEE 1364 value change dump) or an FST file into sampled display pins.

Only what the simulated monitor needs: the value changes of the signals the
user maps (``hsync=top.vga_hs,...``), sampled on every falling edge of the
mapped clock, one sample per pixel clock cycle (registered outputs have
settled half a cycle after the rising edge).  Signals are named by their
dotted scope path; a mapped name may also be the bare signal name when that is
unique.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from pathlib import Path

import numpy as np

from synccore.errors import SpecError
from synccore.picture import vcd_text
from synccore.picture.run import Pins
from synccore.spec import read_bounded

ROLES = ("clk", "hsync", "vsync", "de", "red", "green", "blue")
REQUIRED = ("clk", "hsync", "vsync")
MAX_VCD_BYTES = 1 << 30
"""Largest VCD read (1 GiB); a few frames of a display's pins are tens of megabytes."""
PIN_BITS = {"clk": 1, "hsync": 1, "vsync": 1, "de": 1, "red": 16, "green": 16, "blue": 16}
"""Widest signal each pin may be mapped to."""


class VcdError(ValueError):
    """The file or the mapping cannot be read; the message says why."""


def parse_map(text: str) -> dict[str, str]:
    """``"clk=top.clk,hsync=top.hs"`` -> {"clk": "top.clk", "hsync": "top.hs"}."""
    out = {}
    for item in text.split(","):
        if not item.strip():
            continue
        role, sep, name = item.partition("=")
        role = role.strip()
        if not sep or not name.strip():
            raise VcdError(f"a mapping item must look like hsync=top.vga_hs, got {item.strip()!r}")
        if role not in ROLES:
            raise VcdError(f"unknown pin {role!r} in the mapping; choose from {', '.join(ROLES)}")
        out[role] = name.strip()
    missing = [r for r in REQUIRED if r not in out]
    if missing:
        raise VcdError(f"the mapping needs {', '.join(missing)}")
    return out


def _value(text: str) -> int:
    bits = text.lower()
    if any(c in bits for c in "xzuw-"):
        return 0
    return int(bits, 2) if bits else 0


Changes = vcd_text.Changes


def read(path: str | Path, mapping: dict[str, str]) -> Pins:
    """Sample the mapped signals of the VCD or FST file at ``path`` on the clock's falling edges."""
    path = Path(path)
    if path.suffix.lower() == ".fst":
        scale, names, load = _fst(path)
    else:
        scale, names, load = _vcd(path)
    wanted = _resolve(path, names, mapping)
    changes = load({key for key, _ in wanted.values()})
    return _sample(path, scale, wanted, changes, mapping)


def _resolve(path: Path, names: dict[str, tuple[object, int]], mapping: dict[str, str]
             ) -> dict[str, tuple[object, int]]:  # fmt: skip
    wanted: dict[str, tuple[object, int]] = {}
    for role, name in mapping.items():
        if name in names:
            wanted[role] = names[name]
            continue
        hits = [full for full in names if full.endswith("." + name) or full == name]
        if len(hits) != 1:
            why = "several signals" if hits else "no signal"
            raise VcdError(f"{path}: {why} called {name!r} (for {role})")
        wanted[role] = names[hits[0]]
    for role, (_, bits) in wanted.items():
        if bits > PIN_BITS[role]:
            raise VcdError(f"{path}: {mapping[role]!r} is {bits} bits wide; {role} takes at most "
                           f"{PIN_BITS[role]}")  # fmt: skip
    return wanted


def _vcd(path: Path) -> tuple[float, dict[str, tuple[object, int]], Callable[[set[object]], Changes]]:
    try:
        data = read_bounded(path, MAX_VCD_BYTES)
    except SpecError as err:
        raise VcdError(str(err)) from None
    try:
        scale, names, start = vcd_text.parse_header(path, data)
    except vcd_text.VcdFormatError as err:
        raise VcdError(str(err)) from None
    widths = {code: bits for code, bits in names.values()}

    def load(codes: set[object]) -> Changes:
        try:
            return vcd_text.load_changes(path, data, start, codes, widths)
        except vcd_text.VcdFormatError as err:
            raise VcdError(str(err)) from None

    return scale, names, load


def _fst(path: Path) -> tuple[float, dict[str, tuple[object, int]], Callable[[set[object]], Changes]]:
    """FST through pylibfst (the picture extra), the reader of the FST format's own library."""
    try:
        import pylibfst
    except ImportError:
        raise VcdError("reading FST needs the PyPI package 'pylibfst' "
                       "(pip install 'synccore[picture]'), or write a VCD instead") from None
    lib = pylibfst.lib
    handle = lib.fstReaderOpen(str(path).encode())
    if handle == pylibfst.ffi.NULL:
        raise VcdError(f"{path}: not an FST file")
    scale = 10.0 ** int(lib.fstReaderGetTimescale(handle))
    _, signals = pylibfst.get_scopes_signals2(handle)
    names = {re.sub(r"\s*\[[^]]*\]$", "", name): (sig.handle, int(sig.length))
             for name, sig in signals.by_name.items()}  # fmt: skip

    def load(codes: set[object]) -> Changes:
        changes: Changes = {c: ([], []) for c in codes}
        for code in codes:
            lib.fstReaderSetFacProcessMask(handle, code)

        def seen(_data: object, time: int, facidx: int, value: object) -> None:
            if facidx in changes:
                changes[facidx][0].append(int(time))
                changes[facidx][1].append(_value(pylibfst.string(value)))

        pylibfst.fstReaderIterBlocks(handle, seen)
        lib.fstReaderClose(handle)
        return changes

    return scale, names, load


def _sample(path: Path, scale: float, wanted: dict[str, tuple[object, int]], changes: Changes,
            mapping: dict[str, str]) -> Pins:  # fmt: skip
    clk_times, clk_vals = changes[wanted["clk"][0]]
    t = np.array(clk_times, dtype=np.int64)
    v = np.array(clk_vals, dtype=np.int64)
    falling = t[1:][(v[:-1] == 1) & (v[1:] == 0)]
    if len(falling) < 3:
        raise VcdError(f"{path}: the clock {mapping['clk']!r} has fewer than three falling edges")
    period = float(np.median(np.diff(falling))) * scale

    def sample(role: str) -> np.ndarray | None:
        if role not in wanted:
            return None
        times, vals = changes[wanted[role][0]]
        if not times:
            return np.zeros(len(falling), dtype=np.int64)
        idx = np.searchsorted(np.array(times, dtype=np.int64), falling, side="right") - 1
        arr = np.array(vals, dtype=np.int64)
        return np.where(idx >= 0, arr[np.maximum(idx, 0)], 0)

    zeros = np.zeros(len(falling), dtype=np.int64)
    bits = tuple(wanted[r][1] if r in wanted else 1 for r in ("red", "green", "blue"))
    hs, vs = sample("hsync"), sample("vsync")
    assert hs is not None and vs is not None
    red, green, blue = (sample(r) for r in ("red", "green", "blue"))
    return Pins(period, hs, vs, sample("de"), red if red is not None else zeros,
                green if green is not None else zeros, blue if blue is not None else zeros,
                (bits[0], bits[1], bits[2]))  # fmt: skip
