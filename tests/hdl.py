"""Running the real HDL tools on emitted text, for the tests."""

from __future__ import annotations

import os
import subprocess
from pathlib import Path

from synccore.verification.tools import Tool

GHDL_WARNINGS = ["-Wbinding", "-Wreserved", "-Wlibrary", "-Wbody", "-Wspecs", "-Wunused"]


def run(cmd: list[str], cwd: Path, env: dict[str, str] | None = None) -> str:
    """Run a tool; return its combined output; fail with that output if it exits non-zero."""
    full_env = dict(os.environ)
    full_env.update(env or {})
    proc = subprocess.run(cmd, cwd=cwd, env=full_env, capture_output=True, text=True, timeout=300)
    out = proc.stdout + proc.stderr
    assert proc.returncode == 0, f"{' '.join(cmd)} failed:\n{out}"
    return out


def verilator_lint(tool: Tool, source: Path) -> str:
    """Verilator --lint-only -Wall; any warning is an error (non-zero exit)."""
    return run(["verilator", "--lint-only", "-Wall", source.name], source.parent, tool.env)


def iverilog_compile(source: Path) -> str:
    out = run(["iverilog", "-g2001", "-Wall", "-o", os.devnull, source.name], source.parent)
    assert "warning" not in out.lower(), out
    return out


def ghdl_analyse(source: Path, std: str) -> str:
    work = source.parent / f"ghdl{std}"
    work.mkdir(exist_ok=True)
    return run(
        ["ghdl", "-a", f"--std={std}", f"--workdir={work.name}", *GHDL_WARNINGS, "-Werror",
         source.name],
        source.parent,
    )  # fmt: skip
