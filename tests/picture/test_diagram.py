"""Timing diagrams for every example: the figures placed in the drawing equal the spec.

Expected durations are computed here from the spec's numbers: a part of n pixels
lasts n / pixel clock; a part of n lines lasts n * (horizontal total / pixel clock).
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from click.testing import CliRunner
from PIL import Image

import synccore
from synccore.cli.main import main
from synccore.picture.diagram import PARTS, draw
from tests.conftest import EXAMPLES


def _svg_texts(path: Path) -> str:
    root = ET.parse(path).getroot()
    return "\n".join("".join(el.itertext()) for el in root.iter() if el.tag.endswith("text"))


@pytest.mark.parametrize("example", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_diagram_of_every_example(example: Path, tmp_path: Path) -> None:
    spec = synccore.load(example)
    svg = draw(spec, tmp_path / "t.svg")
    texts = _svg_texts(svg.path)
    clock = float(spec.pixel_clock_hz)
    panels = (("horizontal", spec.horizontal, "px"), ("vertical", spec.vertical, "lines"))
    for axis_name, axis, unit in panels:
        got = [lab for lab in svg.labels if lab.axis == axis_name]
        assert [lab.part for lab in got] == list(PARTS)
        sizes = (axis.active, axis.front_porch, axis.sync, axis.back_porch)
        assert [lab.count for lab in got] == list(sizes)
        for lab, n in zip(got, sizes, strict=True):
            if unit == "px":
                want = f"{n / clock * 1e6:.3f} µs"
            else:
                want = f"{n * spec.horizontal.total / clock * 1e3:.3f} ms"
            assert lab.duration == want
            assert f"{n} {'line' if unit == 'lines' and n == 1 else unit}" in texts and want in texts, \
                (lab, texts)
        assert f"({axis.sync_polarity})" in texts
    png = draw(spec, tmp_path / "t.png")
    with Image.open(png.path) as img:
        assert img.mode == "RGBA" and img.getpixel((0, 0))[3] == 0  # transparent background


def test_cli_show_diagram(tmp_path: Path) -> None:
    out = tmp_path / "d.svg"
    result = CliRunner().invoke(main, ["show", str(EXAMPLES[0]), "--diagram", str(out)])
    assert result.exit_code == 0, result.output
    assert out.is_file() and f"wrote {out}" in result.output
    result = CliRunner().invoke(main, ["show", str(EXAMPLES[0]), "--diagram", str(tmp_path / "d.pdf")])
    assert result.exit_code == 2
    assert "--diagram must name a .svg or .png file" in result.output


def test_deterministic_svg(tmp_path: Path) -> None:
    spec = synccore.load(EXAMPLES[0])
    a = draw(spec, tmp_path / "a.svg").path.read_text()
    b = draw(spec, tmp_path / "b.svg").path.read_text()
    assert a == b


def test_one_line_is_singular(tmp_path: Path) -> None:
    """DMT 800x600@60 has a vertical front porch of 1 line (samples.DMT_800x600, VESA DMT ID 09h)."""
    from tests import samples

    spec = synccore.loads(samples.DMT_800x600)
    svg = draw(spec, tmp_path / "t.svg")
    porch = next(lab for lab in svg.labels if lab.axis == "vertical" and lab.part == "front porch")
    # One line of 1056 pixels at 40 MHz: 26.4 us = 0.026 ms.
    assert porch.line == "front porch: 1 line, 0.026 ms"
    import re

    texts = _svg_texts(svg.path)
    assert re.search(r"\b1 line\b", texts) and not re.search(r"\b1 lines", texts)
    sync = next(lab for lab in svg.labels if lab.axis == "vertical" and lab.part == "sync")
    assert sync.amount == "4 lines"
