"""Every command that writes a file: the same ownership rule, one clear line, never a traceback."""

from __future__ import annotations

from pathlib import Path

from click.testing import CliRunner

from synccore.cli import main

SPEC = 'name: porch_light\nstandard: "DMT 04h"\ncolor: {red: 3, green: 3, blue: 2}\n'


def _run(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    assert result.exception is None or isinstance(result.exception, SystemExit), result.exception
    return result.exit_code, result.stdout, result.stderr


def _spec(tmp_path: Path) -> str:
    (tmp_path / "s.yaml").write_text(SPEC)
    return str(tmp_path / "s.yaml")


def test_new_into_a_missing_folder_a_folder_and_a_user_file(tmp_path: Path) -> None:
    code, _, err = _run("new", "640x480@60 dmt", "-o", str(tmp_path / "deep" / "er" / "a.yaml"))
    assert code == 0, err
    code, _, err = _run("new", "640x480@60 dmt", "-o", str(tmp_path / "deep"))
    assert code == 2 and err.strip().endswith("exists and is not a regular file; refused")
    mine = tmp_path / "mine.yaml"
    mine.write_text("# my notes\n")
    code, _, err = _run("new", "640x480@60 dmt", "-o", str(mine))
    assert code == 2 and "was not written by synccore" in err and mine.read_text() == "# my notes\n"
    code, _, _ = _run("new", "640x480@60 dmt", "-o", str(mine), "--force")
    assert code == 0 and mine.read_text() != "# my notes\n"


def test_show_diagram_does_not_overwrite_a_user_file(tmp_path: Path) -> None:
    spec = _spec(tmp_path)
    art = tmp_path / "art.svg"
    art.write_text("<svg>mine</svg>")
    code, _, err = _run("show", spec, "--diagram", str(art))
    assert code == 2 and err.startswith(f"--diagram: {art}: exists and was not written by synccore")
    code, _, err = _run("show", spec, "--diagram", str(tmp_path / "missing" / "d.png"))
    assert code == 0 and (tmp_path / "missing" / "d.png").stat().st_size > 1000
    code, _, err = _run("show", spec, "--diagram", str(art), "--force")
    assert code == 0 and art.read_text().startswith("<?xml")


def test_view_out_suffix_and_user_file(tmp_path: Path) -> None:
    spec = _spec(tmp_path)
    code, _, err = _run("view", spec, "--sim", "model", "-o", str(tmp_path / "v.jpeg"))
    assert code == 2 and err.strip() == f"--out must name a .png file, got {str(tmp_path / 'v.jpeg')!r}"
    mine = tmp_path / "v.png"
    mine.write_bytes(b"not yours")
    code, _, err = _run("view", spec, "--sim", "model", "-o", str(mine))
    assert code == 2 and "was not written by synccore" in err and mine.read_bytes() == b"not yours"


def test_build_out_empty_and_unwritable(tmp_path: Path) -> None:
    spec = _spec(tmp_path)
    code, _, err = _run("build", spec, "--out", "")
    assert code == 2 and "name a folder" in err
    code, _, err = _run("build", spec, "--out", "/proc/synccore_here")
    assert code == 2 and err.count("\n") == 1 and "cannot" in err


def test_dac_outputs_follow_the_rule(tmp_path: Path) -> None:
    spec = _spec(tmp_path)
    mine = tmp_path / "dac.yaml"
    mine.write_text("io: 3.3V\n")
    code, _, err = _run("dac", spec, "--io", "3.3V", "--save", str(mine))
    assert code == 2 and err.startswith(f"--save: {mine}: exists and was not written by synccore")
    code, _, err = _run("dac", spec, "--io", "3.3V", "--save", str(tmp_path / "new.yaml"))
    assert code == 0, err
    code, _, err = _run("dac", spec, "--io", "2.5V", "--save", str(tmp_path / "new.yaml"))
    assert code == 0, err  # synccore's own, unchanged since: replaced without --force
