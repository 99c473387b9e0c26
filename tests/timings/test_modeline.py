"""X.Org modeline import and export, both sync polarities, round trips."""

from __future__ import annotations

import re
from fractions import Fraction

import pytest
from click.testing import CliRunner
from hypothesis import given, settings
from hypothesis import strategies as st

from synccore import loads
from synccore.cli.main import main
from synccore.spec import Axis
from synccore.timings import modeline, modes

P, N = "positive", "negative"


def test_parse_full_line() -> None:
    # CTA-861 VIC 4 (1280x720p@60) written as a modeline (common practice).
    m = modeline.parse('Modeline "1280x720" 74.25 1280 1390 1430 1650 720 725 730 750 '
                       "+HSync +VSync")  # fmt: skip
    assert m.name == "1280x720"
    assert m.pixel_clock_hz == 74_250_000
    assert m.horizontal == Axis(1280, 110, 40, 220, P)
    assert m.vertical == Axis(720, 5, 5, 20, P)


def test_parse_bare_line_negative_polarities() -> None:
    # VESA DMT ID 04h (640x480@60) as a modeline, -hsync -vsync.
    m = modeline.parse("25.175 640 656 752 800 480 490 492 525 -hsync -vsync")
    assert m.name == "" and m.pixel_clock_hz == 25_175_000
    assert m.horizontal == Axis(640, 16, 96, 48, N)
    assert m.vertical == Axis(480, 10, 2, 33, N)


def test_mixed_polarities() -> None:
    m = modeline.parse("71 1280 1328 1360 1440 800 803 809 823 +HSync -VSync")
    assert (m.horizontal.sync_polarity, m.vertical.sync_polarity) == (P, N)
    m = modeline.parse("83.5 1280 1352 1480 1680 800 803 809 831 -hsync +vsync")
    assert (m.horizontal.sync_polarity, m.vertical.sync_polarity) == (N, P)


@pytest.mark.parametrize("line, message", [
    ("74.25 1280 1390 1430 1650 720 725 730", r"^expected a clock in MHz and eight numbers"),
    ("74.25 1280 1390 1430 1650 720 725 730 750 +hsync",
     r"^sync polarity must be given \(\+VSync or -VSync\)$"),
    ("74.25 1280 1390 1430 1650 720 725 730 750",
     r"^sync polarity must be given \(\+HSync or -HSync and \+VSync or -VSync\)$"),
    ("74.25 1280 1390 1430 1650 1080 1084 1094 1125 +hsync +vsync interlace",
     r"^interlaced modes are not supported, got flag 'interlace'$"),
    ("74.25 1280 1500 1430 1650 720 725 730 750 +hsync +vsync",
     r"^horizontal positions must rise: 0 < display <= sync start <= sync end <= total, "
     r"got 1280 1500 1430 1650$"),
    ("fast 1280 1390 1430 1650 720 725 730 750 +hsync +vsync",
     r"^clock must be a finite number in MHz, got 'fast'$"),
    ("74.25 1280 1390 1430 1650 720 725 730 750 +hsync +vsync +wobble",
     r"^unknown flag '\+wobble'$"),
])  # fmt: skip
def test_parse_errors(line: str, message: str) -> None:
    with pytest.raises(modeline.ModelineError, match=message):
        modeline.parse(line)


@pytest.mark.parametrize("m", [m for m in modes.library() if m.pixel_clock_hz.denominator == 1],
                         ids=lambda m: m.source)
def test_round_trip_every_whole_hz_library_entry(m: modes.Mode) -> None:
    line = modeline.format_line("x", m.pixel_clock_hz, m.horizontal, m.vertical)
    back = modeline.parse(line)
    assert (back.name, back.pixel_clock_hz, back.horizontal, back.vertical) == (
        "x", m.pixel_clock_hz, m.horizontal, m.vertical)


def test_format_line_text() -> None:
    assert modeline.format_line("vga", Fraction(25_175_000), Axis(640, 16, 96, 48, N),
                                Axis(480, 10, 2, 33, N)) == (
        'Modeline "vga" 25.175 640 656 752 800 480 490 492 525 -HSync -VSync')  # fmt: skip


def test_cli_round_trip(tmp_path) -> None:
    line = '"1920x1200R" 154 1920 1968 2000 2080 1200 1203 1209 1235 +hsync -vsync'
    out = tmp_path / "m.yaml"
    runner = CliRunner()
    r = runner.invoke(main, ["new", "--modeline", line, "-o", str(out), "--name", "wide"])
    assert r.exit_code == 0, r.output
    s = loads(out.read_text())
    assert s.horizontal == Axis(1920, 48, 32, 80, P) and s.vertical == Axis(1200, 3, 6, 26, N)
    r = runner.invoke(main, ["show", "--modeline", str(out)])
    assert r.exit_code == 0
    assert r.output == ('Modeline "wide" 154.000 1920 1968 2000 2080 1200 1203 1209 1235 '
                        "+HSync -VSync\n")  # fmt: skip


def test_cli_bad_modeline() -> None:
    r = CliRunner().invoke(main, ["new", "--modeline", "1 2 3"])
    assert r.exit_code == 2
    assert re.match(r"^--modeline: expected a clock in MHz and eight numbers",
                    r.stderr)


axis = st.builds(lambda a, f, s, b, p: Axis(a, f, s, b, p), st.integers(1, 5000),
                 st.integers(0, 500), st.integers(1, 500), st.integers(0, 500),
                 st.sampled_from([P, N]))  # fmt: skip


@settings(max_examples=200, deadline=None)
@given(h=axis, v=axis, clock=st.integers(1, 2_000_000_000))
def test_property_round_trip(h: Axis, v: Axis, clock: int) -> None:
    back = modeline.parse(modeline.format_line("m", Fraction(clock), h, v))
    assert (back.pixel_clock_hz, back.horizontal, back.vertical) == (clock, h, v)
