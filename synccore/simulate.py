"""Host side of simulation: build a core with cocotb's runner and run a bench from ``sim/``.

The benches themselves (code that runs inside the simulator) live in the
top-level ``sim/`` folder, shipped in the wheel as ``synccore/sim``.  They
read the spec path and options from environment variables set here.
"""

from __future__ import annotations

import contextlib
import os
import sys
from collections.abc import Iterator, Mapping
from dataclasses import dataclass
from pathlib import Path

from .build import core_artifacts
from .spec import Spec
from .tools import INSTALL_HINT, find

VHDL_STANDARDS = {"93": "--std=93", "08": "--std=08"}


def sim_dir() -> Path:
    """The benches folder: inside the installed package, or at the top of a source checkout."""
    here = Path(__file__).resolve().parent
    for candidate in (here / "sim", here.parent / "sim"):
        if (candidate / "contract_bench.py").is_file():
            return candidate
    raise FileNotFoundError("synccore sim folder not found")  # pragma: no cover


class SimulatorMissing(RuntimeError):
    """The requested simulator is not installed; the message says how to get it."""


@dataclass(frozen=True)
class SimResult:
    tests: int
    failed: int
    log: Path

    @property
    def passed(self) -> bool:
        return self.tests > 0 and self.failed == 0


@contextlib.contextmanager
def _environ(extra: Mapping[str, str]) -> Iterator[None]:
    saved = {k: os.environ.get(k) for k in extra}
    os.environ.update(extra)
    try:
        yield
    finally:
        for k, v in saved.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v


def run_bench(
    spec: Spec,
    spec_path: Path,
    *,
    simulator: str,
    build_dir: Path,
    bench: str = "contract_bench",
    vhdl_std: str = "08",
    env: Mapping[str, str] | None = None,
) -> SimResult:
    """Emit ``spec``'s core into ``build_dir``, build it on ``simulator`` and run ``bench``."""
    from cocotb_tools.check_results import get_results
    from cocotb_tools.runner import get_runner

    tool = find(simulator)
    if tool is None:
        raise SimulatorMissing(f"simulator {simulator!r} not found: {INSTALL_HINT[simulator]}")
    build_dir.mkdir(parents=True, exist_ok=True)
    language = tool.languages[0]
    suffix = ".v" if language == "verilog" else ".vhd"
    source = build_dir / (spec.name + suffix)
    for artifact in core_artifacts(spec):
        if artifact.name.endswith(suffix):
            source.write_text(artifact.text, encoding="utf-8")
    extra = dict(tool.env)
    extra.update(env or {})
    extra["SYNCCORE_SPEC"] = str(spec_path.resolve())
    bench_dir = str(sim_dir())
    if bench_dir not in sys.path:
        sys.path.insert(0, bench_dir)
    log = build_dir / "sim.log"
    with _environ(extra):
        runner = get_runner(simulator)
        build_args: list[str] = []
        test_args: list[str] = []
        if simulator == "ghdl":
            build_args = test_args = [VHDL_STANDARDS[vhdl_std]]
        runner.build(
            sources=[source],
            hdl_toplevel=spec.name,
            build_dir=build_dir,
            build_args=build_args,
            timescale=("1ns", "1ps"),
            always=True,
            log_file=build_dir / "build.log",
        )
        # The runner judges results itself (and exits) when it sees pytest; we judge them
        # here, the same way from the command line and from the tests.
        pytest_test = os.environ.pop("PYTEST_CURRENT_TEST", None)
        results = build_dir / "results.xml"
        results.unlink(missing_ok=True)
        try:
            runner.test(
                test_module=bench,
                hdl_toplevel=spec.name,
                hdl_toplevel_lang=language,
                build_dir=build_dir,
                test_dir=build_dir,
                test_args=test_args,
                extra_env=extra,
                timescale=("1ns", "1ps"),
                log_file=log,
                results_xml=str(results.resolve()),
            )
        except SystemExit:
            pass  # the simulator exited non-zero; the results file (if any) says more
        finally:
            if pytest_test is not None:
                os.environ["PYTEST_CURRENT_TEST"] = pytest_test
    if not results.is_file():
        return SimResult(0, 1, log)
    tests, failed = get_results(results)
    return SimResult(tests, failed, log)
