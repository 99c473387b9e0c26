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
