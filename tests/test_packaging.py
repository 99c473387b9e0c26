"""The wheel carries the templates and the benches, and works from a plain install."""

from __future__ import annotations

import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


@pytest.mark.sim
def test_wheel_carries_templates_and_benches(tmp_path: Path) -> None:
    subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "--quiet", "-w", str(tmp_path), str(ROOT)],
        check=True, capture_output=True,
    )  # fmt: skip
    (wheel,) = tmp_path.glob("synccore-*.whl")
    names = set(zipfile.ZipFile(wheel).namelist())
    assert "synccore/templates/core/core.v.j2" in names
    assert "synccore/templates/core/core.vhd.j2" in names
    assert "synccore/sim/contract_bench.py" in names
    assert "synccore/sim/measure_bench.py" in names
    assert "synccore/templates/bench/_bench.v.j2" in names
    assert "synccore/templates/bench/harness.vhd.j2" in names
    assert "synccore/timings/data/modes.yaml" in names
    # Installed without the checkout around it, it still finds its templates.
    target = tmp_path / "site"
    with zipfile.ZipFile(wheel) as z:
        z.extractall(target)
    code = (
        "import synccore\n"
        "assert synccore.__file__.startswith(sys.argv[1]), synccore.__file__\n"
        "from synccore.emit._jinja import templates_dir\n"
        "from synccore.verification.simulate import sim_dir\n"
        "assert str(templates_dir()).startswith(sys.argv[1])\n"
        "assert str(sim_dir()).startswith(sys.argv[1])\n"
    )
    subprocess.run([sys.executable, "-c", "import sys\n" + code, str(target)], check=True,
                   cwd=tmp_path, env={"PYTHONPATH": str(target), "PATH": "/usr/bin:/bin"})  # fmt: skip


def _readme_first_command() -> str:
    """The first shell command of the README, as written."""
    text = (ROOT / "README.md").read_text()
    block = text.split("```sh\n", 1)[1].split("```", 1)[0]
    (command,) = [line for line in block.splitlines() if line.strip() and not line.startswith("#")]
    return command


def _system_python() -> str:
    """The system's own interpreter (Debian's /usr/bin/python3), not the one running the tests."""
    for candidate in ("/usr/bin/python3", "/usr/local/bin/python3"):
        if Path(candidate).is_file() and not Path(candidate).resolve().is_relative_to(Path(sys.prefix)):
            return candidate
    pytest.fail("no system python3 found (/usr/bin/python3)")


@pytest.mark.sim
def test_readme_first_command_works_from_the_system_python(tmp_path: Path) -> None:
    """In a copy of the checkout, with a fresh virtual environment made from the system Python."""
    import os
    import shlex
    import shutil

    from tests.golden_files import GOLDEN

    command = _readme_first_command()
    assert command == "./scripts/synccore build examples/lab_readout_640x480.yaml --out build/"
    checkout = tmp_path / "checkout"
    junk = shutil.ignore_patterns(".git", ".venv", "build", "__pycache__", "*.egg-info", ".*_cache",
                                  ".hypothesis", "*_view.png")  # fmt: skip
    shutil.copytree(ROOT, checkout, ignore=junk)
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "VIRTUAL_ENV", "PYTHONHOME")}
    env |= {"SYNCCORE_VENV": str(tmp_path / "venv"), "PYTHON": _system_python(),
            "PATH": "/usr/local/bin:/usr/bin:/bin"}  # fmt: skip
    run = subprocess.run(shlex.split(command), cwd=checkout, env=env, capture_output=True, text=True,
                         timeout=300, check=False)  # fmt: skip
    assert run.returncode == 0, run.stdout + run.stderr
    assert (tmp_path / "venv" / "bin" / "python").resolve() == Path(_system_python()).resolve()
    for suffix in (".v", ".vhd"):
        written = (checkout / "build" / f"lab_readout{suffix}").read_text()
        assert written == (GOLDEN / f"lab_readout_640x480{suffix}").read_text(), suffix
