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

from synccore.picture.run import Pins

ROLES = ("clk", "hsync", "vsync", "de", "red", "green", "blue")
REQUIRED = ("clk", "hsync", "vsync")
_UNITS = {"s": 1.0, "ms": 1e-3, "us": 1e-6, "ns": 1e-9, "ps": 1e-12, "fs": 1e-15}


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


Changes = dict[object, tuple[list[int], list[int]]]


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
    return wanted


def _vcd(path: Path) -> tuple[float, dict[str, tuple[object, int]], Callable[[set[object]], Changes]]:
    text = path.read_text(encoding="utf-8", errors="replace")
    head, sep, body = text.partition("$enddefinitions")
    if not sep:
        raise VcdError(f"{path}: not a VCD file (no $enddefinitions)")
    scale = 1e-9
    m = re.search(r"\$timescale\s+([0-9]+)\s*([munpf]?s)\s+\$end", head)
    if m:
        scale = int(m.group(1)) * _UNITS[m.group(2)]
    scope: list[str] = []
    names: dict[str, tuple[object, int]] = {}
    tokens = head.split()
    i = 0
    while i < len(tokens):
        tok = tokens[i]
        if tok == "$scope":
            scope.append(tokens[i + 2])
            i += 3
        elif tok == "$upscope":
            scope.pop()
            i += 1
        elif tok == "$var":
            size, code, name = int(tokens[i + 2]), tokens[i + 3], tokens[i + 4]
            names[".".join([*scope, name])] = (code, size)
            i += 5
        else:
            i += 1

    def load(codes: set[object]) -> Changes:
        changes: Changes = {c: ([], []) for c in codes}
        now = 0
        body_tokens = body.split()
        j = 0
        while j < len(body_tokens):
            tok = body_tokens[j]
            c0 = tok[0]
            if c0 == "#":
                now = int(tok[1:])
            elif c0 in "bBrR":
                code = body_tokens[j + 1]
                if code in changes:
                    changes[code][0].append(now)
                    changes[code][1].append(_value(tok[1:]) if c0 in "bB" else int(float(tok[1:])))
                j += 1
            elif c0 in "01xXzZuU":
                code = tok[1:]
                if code in changes:
                    changes[code][0].append(now)
                    changes[code][1].append(1 if c0 == "1" else 0)
            j += 1
        return changes

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
