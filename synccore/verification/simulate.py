"""Host side of simulation: build with cocotb's runner, run a bench from ``sim/``, collect results.

The benches (code that runs inside the simulator) live in the top-level
``sim/`` folder, shipped in the wheel as ``synccore/sim``.  Builds are cached
by the hash of everything that goes into them, so each core is compiled once
per machine (Verilator builds take tens of seconds); runs happen in their own
folders.
"""

from __future__ import annotations

import contextlib
import fcntl
import hashlib
import json
import os
import shutil
import subprocess
import sys
from collections.abc import Iterator, Mapping
from dataclasses import dataclass
from pathlib import Path

from synccore.emit.bench.harness import HARNESS_TOP, render_harness
from synccore.emit.files import core_artifacts
from synccore.spec import Spec, to_dict
from synccore.verification.tools import INSTALL_HINT, Tool, build_env, find

VHDL_STANDARDS = {"93": "--std=93", "08": "--std=08"}
_GENERIC = {"events": "events_path", "stop": "stop_at"}
VERILATOR_ARGS = ["--timing", "-CFLAGS", "-std=c++20 -fcoroutines", "-Wno-fatal", "-O2"]
VERILATOR_MAKE = ["OPT_FAST=-O2", "OPT_SLOW=-O1", "OPT_GLOBAL=-O2"]
"""C++ optimisation of the harness builds (Verilator's makefile defaults to -Os): the
measurement runs about a third faster."""
HARNESS_WATCHED = ("done", "frame_start")
"""The harness signals the measurement bench waits on: the only ones a Verilator harness
build makes visible to cocotb (the runner's ``--public-flat-rw`` makes every signal visible
and keeps Verilator from optimising them)."""


def sim_dir() -> Path:
    """The benches folder: inside the installed package, or at the top of a source checkout."""
    package = Path(__file__).resolve().parent.parent
    for candidate in (package / "sim", package.parent / "sim"):
        if (candidate / "contract_bench.py").is_file():
            return candidate
    raise FileNotFoundError("synccore sim folder not found")  # pragma: no cover


def cache_dir() -> Path:
    """Where builds are kept: $SYNCCORE_CACHE, else ~/.cache/synccore/builds."""
    env = os.environ.get("SYNCCORE_CACHE")
    return Path(env) if env else Path.home() / ".cache" / "synccore" / "builds"


class SimulatorMissing(RuntimeError):
    """The requested simulator is not installed; the message says how to get it."""


@dataclass(frozen=True)
class SimResult:
    tests: int
    failed: int
    log: Path
    run_dir: Path
    build_dir: Path

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


def _sources(spec: Spec, simulator: str, language: str, harness: bool, core_text: str | None
             ) -> dict[str, str]:  # fmt: skip
    suffix = ".v" if language == "verilog" else ".vhd"
    core = core_text
    if core is None:
        core = next(a.text for a in core_artifacts(spec) if a.name.endswith(suffix))
    files = {spec.name + suffix: core}
    if harness:
        files[HARNESS_TOP + suffix] = render_harness(spec, language)
        if simulator == "verilator":  # a Verilator control file: what cocotb may see
            files[HARNESS_TOP + ".vlt"] = "`verilator_config\n" + "".join(
                f'public_flat_rd -module "{HARNESS_TOP}" -var "{name}"\n'
                for name in HARNESS_WATCHED)
    return files


def run_bench(
    spec: Spec,
    *,
    simulator: str,
    run_dir: Path,
    bench: str = "contract_bench",
    harness: bool = False,
    vhdl_std: str = "08",
    env: Mapping[str, str] | None = None,
    waves: bool = False,
    core_text: str | None = None,
    harness_args: dict[str, str | int] | None = None,
) -> SimResult:
    """Build ``spec``'s core (with the measurement harness if asked) and run ``bench`` on it.

    ``core_text`` replaces the emitted core (used to show that benches catch faulty cores).
    ``harness_args`` go to the harness as plusargs ``+synccore_<name>=<value>`` (Verilog) or
    generics (VHDL).
    """
    from cocotb_tools.runner import get_runner

    tool = find(simulator)
    if tool is None:
        raise SimulatorMissing(f"simulator {simulator!r} not found: {INSTALL_HINT[simulator]}")
    language = tool.languages[0]
    files = _sources(spec, simulator, language, harness, core_text)
    top = HARNESS_TOP if harness else spec.name
    args = _arguments(simulator, language, harness=harness, vhdl_std=vhdl_std,
                      harness_args=harness_args or {})  # fmt: skip
    build_dir = _build_dir(simulator, args, waves=waves, top=top, files=files, run_dir=run_dir)
    extra = _run_environment(spec, tool, run_dir, env or {})
    bench_dir = str(sim_dir())
    if bench_dir not in sys.path:
        sys.path.insert(0, bench_dir)
    log = run_dir / "sim.log"
    results = run_dir / "results.xml"
    results.unlink(missing_ok=True)

    with _environ(extra):
        runner = get_runner(simulator)
        _build(runner, build_dir, files, top, args, waves)
        _test(runner, simulator=simulator, bench=bench, top=top, language=language,
              build_dir=build_dir, run_dir=run_dir, args=args, extra=extra, log=log,
              results=results, waves=waves)  # fmt: skip
    return _verdict(results, log, run_dir, build_dir)


@dataclass(frozen=True)
class _Arguments:
    """What the runner passes to the simulator, and the harness settings in its language's form."""

    build: list[str]
    make: list[str]  # Verilator: variables for its makefile; non-empty: we build, not the runner
    test: list[str]
    plusargs: list[str]  # Verilog: +synccore_<name>=<value>
    parameters: dict[str, object]  # VHDL: generics


def _arguments(simulator: str, language: str, *, harness: bool, vhdl_std: str,
               harness_args: dict[str, str | int]) -> _Arguments:  # fmt: skip
    plusargs: list[str] = []
    parameters: dict[str, object] = {}
    for name, value in harness_args.items():
        if language == "verilog":
            plusargs.append(f"+synccore_{name}={value}")
        else:
            parameters[_GENERIC[name]] = value
    build_args: list[str] = []
    make: list[str] = []
    test_args: list[str] = []
    if simulator == "ghdl":
        build_args = test_args = [VHDL_STANDARDS[vhdl_std]]
    elif simulator == "verilator" and harness:
        build_args = list(VERILATOR_ARGS)
        make = list(VERILATOR_MAKE)
    return _Arguments(build_args, make, test_args, plusargs, parameters)


def _build_dir(simulator: str, args: _Arguments, *, waves: bool, top: str,
               files: dict[str, str], run_dir: Path) -> Path:  # fmt: skip
    """The build folder: in the cache, named by the hash of everything that goes into the build."""
    key = hashlib.sha256(
        json.dumps([simulator, args.build, args.make, waves, top, sorted(files.items())]).encode()
    ).hexdigest()[:24]
    # Wave files land in the build folder: a run that records them builds privately.
    return run_dir / "build" if waves else cache_dir() / f"{simulator}-{key}"


def _run_environment(spec: Spec, tool: Tool, run_dir: Path, env: Mapping[str, str]
                     ) -> dict[str, str]:  # fmt: skip
    """The variables the run sees: the tool's, the caller's, and where the spec is (as JSON)."""
    run_dir.mkdir(parents=True, exist_ok=True)
    spec_json = run_dir / "spec.json"
    spec_json.write_text(json.dumps(to_dict(spec)))
    extra = build_env(tool, cache_dir())
    extra.update(env)
    extra["SYNCCORE_SPEC_JSON"] = str(spec_json)
    return extra


def _test(runner: object, *, simulator: str, bench: str, top: str, language: str,
          build_dir: Path, run_dir: Path, args: _Arguments, extra: dict[str, str], log: Path,
          results: Path, waves: bool) -> None:  # fmt: skip
    """Run ``bench`` on the built ``top``; the verdict is left in the ``results`` file."""
    # GHDL keeps its work library in the build folder and must run there.
    test_dir = build_dir if simulator == "ghdl" else run_dir
    # The runner judges results itself (and exits) when it sees pytest; we judge them
    # here, the same way from the command line and from the tests.
    pytest_test = os.environ.pop("PYTEST_CURRENT_TEST", None)
    try:
        with locked(build_dir) if simulator == "ghdl" else contextlib.nullcontext():
            runner.test(  # type: ignore[attr-defined]
                test_module=bench,
                hdl_toplevel=top,
                hdl_toplevel_lang=language,
                build_dir=build_dir,
                test_dir=test_dir,
                test_args=args.test,
                extra_env=extra,
                timescale=("1ns", "1ps"),
                log_file=log,
                results_xml=str(results.resolve()),
                waves=waves,
                plusargs=args.plusargs,
                parameters=args.parameters,
            )
    except SystemExit:
        pass  # the simulator exited non-zero; the results file (if any) says more
    finally:
        if pytest_test is not None:
            os.environ["PYTEST_CURRENT_TEST"] = pytest_test


def _verdict(results: Path, log: Path, run_dir: Path, build_dir: Path) -> SimResult:
    """The counts of the results file; one failure when the run left none."""
    from cocotb_tools.check_results import get_results

    if not results.is_file():
        return SimResult(0, 1, log, run_dir, build_dir)
    tests, failed = get_results(results)
    return SimResult(tests, failed, log, run_dir, build_dir)


@contextlib.contextmanager
def locked(folder: Path) -> Iterator[None]:
    folder.parent.mkdir(parents=True, exist_ok=True)
    with open(folder.parent / f"{folder.name}.lock", "w") as lock:
        fcntl.flock(lock, fcntl.LOCK_EX)
        try:
            yield
        finally:
            fcntl.flock(lock, fcntl.LOCK_UN)


def _build(runner: object, build_dir: Path, files: dict[str, str], top: str,
           args: _Arguments, waves: bool) -> None:  # fmt: skip
    """Build once per content hash; concurrent builders of the same folder wait for each other."""
    done = build_dir / ".synccore-built"
    with locked(build_dir):
        if done.is_file():
            return
        if build_dir.exists():
            shutil.rmtree(build_dir)
        src = build_dir / "src"
        src.mkdir(parents=True)
        paths = []
        for name, text in files.items():
            (src / name).write_text(text, encoding="utf-8")
            paths.append(src / name)
        if args.make:
            _build_verilator(build_dir, paths, top, args, waves)
            done.write_text("ok\n")
            return
        runner.build(  # type: ignore[attr-defined]
            sources=paths,
            hdl_toplevel=top,
            build_dir=build_dir,
            build_args=args.build,
            timescale=("1ns", "1ps"),
            always=True,
            waves=waves,
            log_file=build_dir / "build.log",
        )
        done.write_text("ok\n")


def _build_verilator(build_dir: Path, sources: list[Path], top: str, args: _Arguments,
                     waves: bool) -> None:  # fmt: skip
    """Build a Verilator model that cocotb's runner can run, the way the runner would, but
    with only the control file's signals visible (no ``--public-flat-rw``), the C++ compiled
    with ``args.make`` instead of -Os, and tracing only when waves are asked for."""
    import cocotb_tools.config

    verilator = shutil.which("verilator")  # the tool's PATH is in force here (run_bench)
    if verilator is None:
        raise SimulatorMissing(f"verilator not found: {INSTALL_HINT['verilator']}")
    libs = cocotb_tools.config.libs_dir
    main = cocotb_tools.config.share_dir / "lib" / "verilator" / "verilator.cpp"
    trace = ["--trace"] if waves else []
    commands = [
        [verilator, "-cc", "--exe", "-Mdir", str(build_dir), "--top-module", top, "--vpi",
         "--prefix", "Vtop", "-o", top, "-LDFLAGS",
         f"-Wl,-rpath,{libs} -L{libs} -lcocotbvpi_verilator", *trace, *args.build,
         "--timescale", "1ns/1ps", str(main), *map(str, sources)],
        ["make", "-j", str(os.cpu_count() or 1), "-C", str(build_dir), "-f", "Vtop.mk",
         f"VM_TRACE={int(waves)}", *args.make],
    ]  # fmt: skip
    with open(build_dir / "build.log", "w") as log:
        for command in commands:
            code = subprocess.run(command, cwd=build_dir, stdout=log, stderr=subprocess.STDOUT,
                                  check=False).returncode  # fmt: skip
            if code:
                raise RuntimeError(f"Verilator build failed (exit {code}); see {log.name}")
