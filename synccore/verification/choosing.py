"""Which engines a verification runs: the caller's names checked, or every one found here."""

from __future__ import annotations

from collections.abc import Sequence

from synccore.errors import ToolError
from synccore.verification.engines import ENGINES, available_engines, cocotb_missing
from synccore.verification.tools import INSTALL_HINT, unusable


def pick_engines(engines: Sequence[str] | None = None) -> list[str]:
    """The engines :func:`verify` runs for ``engines``; raises :class:`ToolError` if it cannot.

    ``None`` means every simulator found here (Icarus Verilog, GHDL, Verilator),
    or the built-in engine (Amaranth's simulator on the Amaranth model) when none
    is; :func:`synccore.verification.engines.unusable_engines` names those installed
    but unusable, with the fix.  Otherwise every name must be one of ``icarus``, ``ghdl``, ``verilator``,
    ``builtin`` and must be able to run here.
    """
    found = available_engines()
    if engines is None:
        # The real simulators check the emitted text; the built-in engine (much slower, and
        # checking the Amaranth model) is the fallback when none is installed.
        chosen = [e for e in found if e != "builtin"] or found
        if not chosen:
            raise ToolError("no engine found: install a simulator (see README) or Amaranth")
        return chosen
    if isinstance(engines, str):
        raise TypeError(f"engines must be a list of names, like [{engines!r}], not a string")
    names = list(engines)
    unknown = [n for n in names if n not in ENGINES]
    if unknown or not names:
        what = f"unknown engine {unknown[0]!r}" if unknown else "no engine named"
        raise ToolError(f"{what}; choose from {', '.join(ENGINES)}")
    missing = [n for n in names if n not in found]
    if missing:
        raise ToolError("; ".join(_not_found(n) for n in missing))
    return names


def _not_found(engine: str) -> str:
    """Why ``engine`` cannot run, in one line with its fix: installed but unusable, or missing."""
    if engine not in INSTALL_HINT:
        return f"engine {engine!r} not found: install the PyPI package 'amaranth'"
    why = unusable(engine)
    if why is not None:
        return f"engine {why}"
    if cocotb_missing():
        return (f"engine {engine!r} not found: {INSTALL_HINT[engine]}; the simulators also need "
                "cocotb: pip install synccore")  # fmt: skip
    return f"engine {engine!r} not found: {INSTALL_HINT[engine]}"
