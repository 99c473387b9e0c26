"""``view --edid``: the simulated monitor accepts or refuses like the display of that EDID would.

The EDIDs are written by ``synccore edid --write`` (read back and checked byte by byte in
tests/timings/test_edid.py). CTA-861 VIC 4 (1280x720@60, 74.25 MHz) and VIC 1 (640x480@60,
25.2 MHz) are the library's entries.
"""

from __future__ import annotations

from pathlib import Path

from click.testing import CliRunner

from synccore.cli import main

HD = 'name: hd\nstandard: "CTA VIC 4"\n'
VGA = 'name: vga\nstandard: "CTA VIC 1"\n'


def _write(tmp_path: Path, name: str, text: str) -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def _edid(tmp_path: Path, spec: Path, name: str) -> Path:
    out = tmp_path / name
    result = CliRunner().invoke(main, ["edid", "--write", str(spec), "-o", str(out)])
    assert result.exit_code == 0, result.output
    return out


def test_a_display_that_lists_the_timing_accepts_it(tmp_path: Path) -> None:
    hd = _write(tmp_path, "hd.yaml", HD)
    edid = _edid(tmp_path, hd, "hd.bin")
    result = CliRunner().invoke(main, ["view", str(hd), "--sim", "model", "--edid", str(edid),
                                       "-o", str(tmp_path / "a.png")])  # fmt: skip
    assert result.exit_code == 0, result.output
    assert f"note: the display of {edid} accepts this signal: listed: it is the EDID's detailed timing" \
        in result.output


def test_a_slower_display_refuses_and_says_why(tmp_path: Path) -> None:
    hd = _write(tmp_path, "hd.yaml", HD)
    edid = _edid(tmp_path, _write(tmp_path, "vga.yaml", VGA), "vga.bin")
    result = CliRunner().invoke(main, ["view", str(hd), "--sim", "model", "--edid", str(edid),
                                       "-o", str(tmp_path / "b.png")])  # fmt: skip
    assert result.exit_code == 1
    assert f"PROBLEM the display of {edid} refuses this signal: not one of the timings" in result.output
    assert "refused: too fast for the display's maximum pixel clock" in result.output


def test_edid_needs_a_spec(tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["view", "--edid", str(tmp_path / "x.bin")])
    assert result.exit_code == 2
    assert "--edid needs a SPEC" in result.output
