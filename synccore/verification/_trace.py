"""A counterexample as a short table: the cycles before a failed property, core beside reference.

Reads the VCD that Yosys-SMTBMC writes for a trace (one time stamp per step,
the step number in ``smt_step``) and keeps the wrapper's own signals: the free
inputs, the core's outputs (``core_*``), what the reference expects (``exp_*``)
and the reference's position.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from synccore.model import Timing

OUTPUTS = ("hsync", "vsync", "de", "hblank", "vblank", "x", "y", "line_start", "frame_start")


@dataclass(frozen=True)
class TraceRow:
    """One cycle of a counterexample."""

    step: int
    reset: int  # the reset port's level
    ce: int | None
    where: str  # the reference's position (column, line) in cycles, or "reset"
    got: dict[str, int]
    want: dict[str, int]


def read_steps(path: Path) -> list[dict[str, int]]:
    """The top scope's signals at each step of an SMTBMC trace, in order."""
    names: dict[str, str] = {}
    depth = 0
    steps: dict[int, dict[str, int]] = {}
    values: dict[str, int] = {}
    step = -1
    body = False
    for raw in path.read_text().splitlines():
        line = raw.strip()
        if not body:
            parts = line.split()
            if line.startswith("$scope"):
                depth += 1
            elif line.startswith("$upscope"):
                depth -= 1
            elif line.startswith("$var") and len(parts) >= 5:
                if parts[4] == "smt_step":
                    names[parts[3]] = "smt_step"
                elif depth == 1:
                    names[parts[3]] = parts[4]
            elif line.startswith("$enddefinitions"):
                body = True
            continue
        if line.startswith("#"):
            if step >= 0:
                steps[step] = dict(values)
            continue
        ident, value = _change(line)
        if ident in names:
            name = names[ident]
            if name == "smt_step":
                step = value
            else:
                values[name] = value
    if step >= 0:
        steps[step] = dict(values)
    return [steps[k] for k in sorted(steps)]


def _change(line: str) -> tuple[str, int]:
    if line.startswith(("b", "B")):
        bits, _, ident = line[1:].partition(" ")
        return ident.strip(), int(bits.replace("x", "0").replace("z", "0") or "0", 2)
    if line[:1] in "01xz" and len(line) > 1:
        return line[1:].strip(), 1 if line[0] == "1" else 0
    return "", 0


def trace_rows(t: Timing, steps: list[dict[str, int]], *, reset_port: str, ce_port: str | None,
               reset_async: bool, last: int | None = None, before: int = 6) -> list[TraceRow]:  # fmt: skip
    """The rows of the ``before`` cycles up to step ``last`` (the last step when None)."""
    if not steps:
        return []
    end = len(steps) - 1 if last is None or last >= len(steps) else last
    if last is None:  # no step named (a counterexample to induction): end at the first mismatch
        end = next((k for k in range(1, len(steps)) if _mismatch(t, steps[k], reset_async)), end)
    rows = []
    for k in range(max(1, end - before), end + 1):  # step 0: before the first edge, unchecked
        s = steps[k]
        idle = _idle(s, reset_async)
        got = {o: s.get(f"core_{o}", 0) for o in OUTPUTS}
        want = _expected(t, s, reset_async)
        where = "reset" if idle else f"({s.get('ref_h', 0)}, {s.get('ref_v', 0)})"
        rows.append(TraceRow(k, s.get(reset_port, 0), s.get(ce_port) if ce_port else None,
                             where, got, want))  # fmt: skip
    return rows


def _idle(s: dict[str, int], reset_async: bool) -> bool:
    """Whether the reference shows the reset values on this step."""
    return not s.get("ref_run", 0) or bool(reset_async and s.get("reset_now", 0))


def _expected(t: Timing, s: dict[str, int], reset_async: bool) -> dict[str, int]:
    resets = t.reset_outputs()
    idle = _idle(s, reset_async)
    return {o: getattr(resets, o) if idle else s.get(f"exp_{o}", 0) for o in OUTPUTS}


def _mismatch(t: Timing, s: dict[str, int], reset_async: bool) -> bool:
    return any(s.get(f"core_{o}", 0) != want for o, want in _expected(t, s, reset_async).items())


def table_lines(rows: list[TraceRow], *, reset_name: str) -> list[str]:
    """The rows as text: one line per cycle; ``a!=b`` where the core shows a and the reference b."""
    has_ce = any(r.ce is not None for r in rows)
    head = ["step", reset_name, *(["ce"] if has_ce else []), "reference", *OUTPUTS]
    body = []
    for r in rows:
        cells = [str(r.step), str(r.reset), *([str(r.ce)] if has_ce else []), r.where]
        for o in OUTPUTS:
            g, w = r.got[o], r.want[o]
            cells.append(str(g) if g == w else f"{g}!={w}")
        body.append(cells)
    widths = [max(len(row[i]) for row in [head, *body]) for i in range(len(head))]
    return ["  ".join(c.rjust(w) for c, w in zip(row, widths, strict=True)) for row in [head, *body]]
