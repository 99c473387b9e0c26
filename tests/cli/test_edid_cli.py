"""``synccore edid`` and ``synccore new --edid`` end to end."""

from __future__ import annotations

import json
import subprocess
from collections.abc import Callable
from pathlib import Path

import pytest
import yaml
from click.testing import CliRunner

from synccore.cli.main import main
from synccore.timings import edid


def invoke(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.stdout, result.stderr


@pytest.fixture
def written(tmp_path: Path) -> Path:
    for mode, name in (("1280x720@60 cta", "a"), ("DMT 04h", "b")):
        code, _, err = invoke("new", mode, "-o", str(tmp_path / f"{name}.yaml"))
        assert code == 0, err
    code, _, err = invoke("edid", "--write", str(tmp_path / "a.yaml"), str(tmp_path / "b.yaml"),
                          "-o", str(tmp_path / "sink.bin"), "--cta", "--name", "FPGA SINK")
    assert code == 0, err
    return tmp_path


def test_write_then_read(written: Path) -> None:
    data = (written / "sink.bin").read_bytes()
    assert len(data) == 256
    code, out, err = invoke("edid", str(written / "sink.hex"))
    assert code == 0, err
    assert "monitor name: FPGA SINK" in out
    assert "1. 1280x720@60.00 (preferred)" in out
    assert "hsync negative, vsync negative" in out  # DMT 04h: both negative (library)
    assert "VICs 4 (native) 1280x720@60" in out
    assert edid.read_bytes((written / "sink.mem").read_bytes()) == data


def test_json_uses_the_spec_keys(written: Path) -> None:
    code, out, _ = invoke("edid", str(written / "sink.bin"), "--json")
    assert code == 0
    first = json.loads(out)["detailed_timings"][0]
    assert first["pixel_clock_hz"] == 74_250_000
    assert first["horizontal"] == {"active": 1280, "front_porch": 110, "sync": 40,
                                   "back_porch": 220, "sync_polarity": "positive"}  # fmt: skip


def test_new_from_edid_picks_a_descriptor(written: Path) -> None:
    out = written / "from.yaml"
    code, _, err = invoke("new", "--edid", str(written / "sink.bin"), "--pick", "2",
                          "-o", str(out))  # fmt: skip
    assert code == 0, err
    text = out.read_text()
    assert "detailed timing 2 (base block, descriptor 2) of the EDID sink.bin" in text
    spec = yaml.safe_load(text)
    assert spec["horizontal"]["active"] == 640
    assert spec["vertical"]["sync_polarity"] == "negative"
    code, _, err = invoke("show", str(out))
    assert code == 0, err
    code, _, err = invoke("new", "--edid", str(written / "sink.bin"), "--pick", "9")
    assert code == 2 and "--pick 9: the EDID has 2 detailed timing(s)" in err


def test_damaged_edid_is_shown_and_marked(written: Path) -> None:
    data = bytearray((written / "sink.bin").read_bytes())
    data[20] ^= 0x01
    bad = written / "bad.bin"
    bad.write_bytes(bytes(data))
    code, out, err = invoke("edid", str(bad))
    assert code == 1
    assert "monitor name: FPGA SINK" in out
    assert "damaged EDID" in err and "base block: checksum wrong" in err


@pytest.mark.parametrize(("content", "message"), [
    (b"", "empty input: no EDID bytes"),
    (b"not an edid at all\n", "not an EDID: hex dump line 1 has 'not', not hex bytes"),
])  # fmt: skip
def test_bad_input_is_one_line(tmp_path: Path, content: bytes, message: str) -> None:
    path = tmp_path / "x.bin"
    path.write_bytes(content)
    code, _, err = invoke("edid", str(path))
    assert code == 2
    assert err.splitlines() == [f"{path}: {message}"]
    assert "Traceback" not in err


def test_missing_file(tmp_path: Path) -> None:
    code, _, err = invoke("edid", str(tmp_path / "none.bin"))
    assert code == 2 and "cannot read" in err


@pytest.mark.sim
def test_rom_files_load_in_ghdl_and_icarus(written: Path,
                                           need_program: Callable[[str], str]) -> None:  # fmt: skip
    ghdl = need_program("ghdl")
    iverilog = need_program("iverilog")
    vvp = need_program("vvp")
    subprocess.run([ghdl, "-a", "--std=08", "sink.vhd"], cwd=written, check=True)
    data = (written / "sink.bin").read_bytes()
    (written / "rom.v").write_text(
        "module t; reg [7:0] m [0:255]; integer i, s;\n"
        'initial begin $readmemh("sink.mem", m); s = 0;\n'
        "for (i = 0; i < 256; i = i + 1) s = s + m[i];\n"
        '$display("%0d %0d %0d", m[0], m[1], s); end endmodule\n')  # fmt: skip
    subprocess.run([iverilog, "-o", "rom.vvp", "rom.v"], cwd=written, check=True)
    run = subprocess.run([vvp, "rom.vvp"], cwd=written, check=True, capture_output=True,
                         text=True)  # fmt: skip
    assert run.stdout.split()[:3] == [str(data[0]), str(data[1]), str(sum(data))]


def test_show_judges_against_the_edid(written: Path) -> None:
    code, out, _ = invoke("show", str(written / "a.yaml"), "--edid", str(written / "sink.bin"))
    assert code == 0
    assert "display (" in out and "accepts this timing" in out
    code, _, _ = invoke("new", "1920x1080@60 cta", "-o", str(written / "big.yaml"))
    code, out, _ = invoke("show", str(written / "big.yaml"), "--edid", str(written / "sink.bin"))
    assert code == 1
    assert "refused: too fast for the display's maximum pixel clock" in out
