"""The command line with multi-mode specs: build, show, verify, and what is refused."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest
import yaml
from click.testing import CliRunner

from synccore.cli.main import main
from synccore.verification.tools import Tool
from tests import samples as timings
from tests.conftest import MULTI_MODE_EXAMPLES


def invoke(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.stdout, result.stderr


@pytest.mark.parametrize("example", MULTI_MODE_EXAMPLES, ids=[p.stem for p in MULTI_MODE_EXAMPLES])
def test_every_multi_mode_example_builds_and_shows(example: Path, tmp_path: Path) -> None:
    code, out, err = invoke("build", str(example), "--out", str(tmp_path / "out"))
    assert code == 0, err
    name = yaml.safe_load(example.read_text())["name"]
    listed = sorted(p.name for p in (tmp_path / "out").iterdir())
    assert listed == [".synccore-manifest.json", f"{name}.v", f"{name}.vhd"]
    assert "multi-mode display timing core" in (tmp_path / "out" / f"{name}.v").read_text().lower()
    code, out, _ = invoke("show", str(example))
    assert code == 0 and " mode 0 " in out and " mode 2 " in out and "3 modes:" in out


def test_show_modeline_gives_one_line_per_mode() -> None:
    example = MULTI_MODE_EXAMPLES[0]
    code, out, _ = invoke("show", "--modeline", str(example))
    assert code == 0
    # VESA DMT 04h, 09h and 10h as modelines (X.Org modeline order: clock, h edges, v edges).
    assert out.splitlines() == [
        'Modeline "field_console_mode0" 25.175 640 656 752 800 480 490 492 525 -HSync -VSync',
        'Modeline "field_console_mode1" 40.000 800 840 968 1056 600 601 605 628 +HSync +VSync',
        'Modeline "field_console_mode2" 65.000 1024 1048 1184 1344 768 771 777 806 -HSync -VSync',
    ]


@pytest.mark.parametrize("option", ["--pattern=bars", "--testbench", "--clock"])
def test_build_refuses_what_multi_mode_specs_lack(option: str, tmp_path: Path) -> None:
    code, _, err = invoke("build", str(MULTI_MODE_EXAMPLES[0]), "--out", str(tmp_path), option)
    assert code == 2
    assert "a multi-mode spec (modes:) builds its core only yet" in err
    assert not list(tmp_path.iterdir())


def test_verify_runs_the_builtin_engine(tmp_path: Path) -> None:
    spec = tmp_path / "small.yaml"
    spec.write_text(timings.MULTI_SMALL)
    code, out, err = invoke("verify", str(spec), "--sim", "builtin", "--changes", "6", "--seed", "3")
    assert code == 0, err
    assert "builtin: ok" in out and "frames measured by builtin" in out
    assert "every frame is a whole frame of its mode" in out


@pytest.mark.sim
def test_verify_runs_the_switching_sequence(tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    need_tool("icarus")
    spec = tmp_path / "small.yaml"
    spec.write_text(timings.MULTI_SMALL)
    code, out, err = invoke("verify", str(spec), "--sim", "icarus", "--changes", "6", "--seed", "3")
    assert code == 0, err
    assert "icarus: ok" in out and "every frame is a whole frame of its mode" in out


SINGLE_TIMING = [["prove"], ["fit", "--part", "ice40-hx8k"], ["view"], ["show", "--diagram", "d.svg"]]


@pytest.mark.parametrize("command", SINGLE_TIMING)
def test_single_timing_commands_refuse_a_multi_mode_spec(command: list[str]) -> None:
    code, _, err = invoke(*command, str(MULTI_MODE_EXAMPLES[0]))
    assert code == 2
    assert "multi-mode spec (modes:)" in err, err
