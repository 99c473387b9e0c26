"""The built-in mode library: arithmetic of every entry, published values, lookup, CLI."""

from __future__ import annotations

import json
import re
from decimal import Decimal
from fractions import Fraction

import pytest
from click.testing import CliRunner

from synccore import loads
from synccore.cli.main import main
from synccore.errors import SpecError
from synccore.spec import Axis
from synccore.timings import modes

P, N = "positive", "negative"

# Check values: (source, pixel clock in Hz, horizontal, vertical), each axis as
# (active, front porch, sync, back porch, polarity) in the published tables' own
# terms.  Sources: VESA DMT v1.0 rev 13 (DMT ID) and CTA-861 (VIC), as reproduced
# in the Linux kernel's drivers/gpu/drm/drm_edid.c tables (start/end/total
# positions there; the porches below were worked out from them by hand).
PUBLISHED = [
    # VESA DMT v1.0 rev 13, DMT ID 04h: 640x480@60
    ("DMT 04h", 25_175_000, (640, 16, 96, 48, N), (480, 10, 2, 33, N)),
    # VESA DMT v1.0 rev 13, DMT ID 09h: 800x600@60
    ("DMT 09h", 40_000_000, (800, 40, 128, 88, P), (600, 1, 4, 23, P)),
    # VESA DMT v1.0 rev 13, DMT ID 10h: 1024x768@60
    ("DMT 10h", 65_000_000, (1024, 24, 136, 160, N), (768, 3, 6, 29, N)),
    # VESA DMT v1.0 rev 13, DMT ID 23h: 1280x1024@60
    ("DMT 23h", 108_000_000, (1280, 48, 112, 248, P), (1024, 1, 3, 38, P)),
    # VESA DMT v1.0 rev 13, DMT ID 55h: 1280x720@60
    ("DMT 55h", 74_250_000, (1280, 110, 40, 220, P), (720, 5, 5, 20, P)),
    # VESA DMT v1.0 rev 13, DMT ID 3Ah: 1680x1050@60 (CVT)
    ("DMT 3Ah", 146_250_000, (1680, 104, 176, 280, N), (1050, 3, 6, 30, P)),
    # VESA DMT v1.0 rev 13, DMT ID 44h: 1920x1200@60 reduced blanking (CVT-RB)
    ("DMT 44h", 154_000_000, (1920, 48, 32, 80, P), (1200, 3, 6, 26, N)),
    # VESA DMT v1.0 rev 13, DMT ID 45h: 1920x1200@60 (CVT)
    ("DMT 45h", 193_250_000, (1920, 136, 200, 336, N), (1200, 3, 6, 36, P)),
    # VESA DMT v1.0 rev 13, DMT ID 4Ch: 2560x1600@60 reduced blanking (CVT-RB)
    ("DMT 4Ch", 268_500_000, (2560, 48, 32, 80, P), (1600, 3, 6, 37, N)),
    # VESA DMT v1.0 rev 13, DMT ID 57h: 4096x2160@60 reduced blanking v2 (CVT-RB2)
    ("DMT 57h", 556_744_000, (4096, 8, 32, 40, P), (2160, 48, 8, 6, N)),
    # CTA-861, VIC 4: 1280x720p@60
    ("CTA VIC 4", 74_250_000, (1280, 110, 40, 220, P), (720, 5, 5, 20, P)),
    # CTA-861, VIC 16: 1920x1080p@60
    ("CTA VIC 16", 148_500_000, (1920, 88, 44, 148, P), (1080, 4, 5, 36, P)),
    # CTA-861, VIC 17: 720x576p@50
    ("CTA VIC 17", 27_000_000, (720, 12, 64, 68, N), (576, 5, 5, 39, N)),
    # CTA-861, VIC 19: 1280x720p@50
    ("CTA VIC 19", 74_250_000, (1280, 440, 40, 220, P), (720, 5, 5, 20, P)),
    # CTA-861, VIC 31: 1920x1080p@50
    ("CTA VIC 31", 148_500_000, (1920, 528, 44, 148, P), (1080, 4, 5, 36, P)),
    # CTA-861, VIC 93: 3840x2160p@24
    ("CTA VIC 93", 297_000_000, (3840, 1276, 88, 296, P), (2160, 8, 10, 72, P)),
    # CTA-861, VIC 97: 3840x2160p@60
    ("CTA VIC 97", 594_000_000, (3840, 176, 88, 296, P), (2160, 8, 10, 72, P)),
    # CTA-861, VIC 102: 4096x2160p@60
    ("CTA VIC 102", 594_000_000, (4096, 88, 88, 128, P), (2160, 8, 10, 72, P)),
    # CTA-861, VIC 2 at 59.94 Hz: 720x480p, 27.000 MHz
    ("CTA VIC 2 (1000/1001)", 27_000_000, (720, 16, 62, 60, N), (480, 9, 6, 30, N)),
]


@pytest.mark.parametrize("source, clock, h, v", PUBLISHED, ids=[p[0] for p in PUBLISHED])
def test_entry_matches_published_table(source: str, clock: int, h: tuple, v: tuple) -> None:
    m = modes.find(source)
    assert m.pixel_clock_hz == clock
    assert m.horizontal == Axis(*h)
    assert m.vertical == Axis(*v)


# Vertical frequencies of DMT entries: pixel clock / (H total x V total) of the timings
# in the Linux kernel's drm_dmt_modes[] (drivers/gpu/drm/drm_edid.c), e.g. 04h
# 25.175 MHz / (800 x 525), 1Ch 83.5 MHz / (1680 x 831).  The DMT document's own
# "Ver Frequency" column was not seen.
@pytest.mark.parametrize("source, hz", [
    ("DMT 04h", "59.940"),
    ("DMT 05h", "72.809"),
    ("DMT 08h", "56.250"),
    ("DMT 09h", "60.317"),
    ("DMT 1Ch", "59.810"),
])  # fmt: skip
def test_dmt_vertical_frequency(source: str, hz: str) -> None:
    m = modes.find(source)
    assert abs(m.refresh_hz - Fraction(Decimal(hz))) < Fraction(1, 2000)


@pytest.mark.parametrize("m", modes.library(), ids=lambda m: m.source)
def test_every_entry_adds_up(m: modes.Mode) -> None:
    for a in (m.horizontal, m.vertical):
        assert a.total == a.active + a.front_porch + a.sync + a.back_porch
        assert a.front_porch >= 0 and a.sync > 0 and a.back_porch >= 0
        assert a.sync_polarity in (P, N)
    if m.interlaced:
        # Two fields of v.total and v.total + 1 lines per frame: 1080i 1125, 480i 525, 576i
        # 625 lines (CTA-861-G Table 1, from memory); the rate counts fields.
        frame = m.horizontal.total * (2 * m.vertical.total + 1)
        assert m.refresh_hz == m.pixel_clock_hz * 2 / frame
    else:
        assert m.refresh_hz == m.pixel_clock_hz / (m.horizontal.total * m.vertical.total)
    nominal = m.nominal_refresh_hz
    if m.family == "CTA":
        # CTA-861 formats run at exactly their rate, or 1000/1001 of it, which the
        # name rounds to 23.976, 29.97 or 59.94 (common practice).
        assert abs(m.refresh_hz - nominal) < Fraction(1, 2000)
    else:
        # DMT names a mode by its nominal rate; the rate it runs at may differ by
        # about 1 %: 640x480@72 runs at 72.809 Hz (DMT ID 05h: 31.5 MHz / (832 x 520), as
        # in the kernel's drm_dmt_modes[]).
        assert abs(m.refresh_hz / nominal - 1) < Fraction(12, 1000)


def test_library_covers_the_range_asked_for() -> None:
    names = {m.name for m in modes.library()}
    for wanted in ("640x480@60", "800x600@60", "1024x768@60", "1280x1024@60",
                   "1920x1080@60", "2560x1600@60", "3840x2160@24", "3840x2160@25",
                   "3840x2160@30", "3840x2160@50", "3840x2160@60", "4096x2160@60",
                   "1920x1080@59.94", "1920x1080@23.976"):  # fmt: skip
        assert wanted in names
    assert any(m.reduced_blanking for m in modes.library())


def test_identical_duplicates_are_one_choice() -> None:
    # DMT 55h and CTA VIC 4 are the same timing: no ambiguity.
    assert modes.find("1280x720@60").horizontal == modes.find("CTA VIC 4").horizontal


def test_alias_vic_is_found() -> None:
    assert modes.find("CTA VIC 3").source == "CTA VIC 2"


def test_ambiguous_name_is_refused_with_candidates() -> None:
    with pytest.raises(modes.ModeLookupError, match=re.escape(
            "is ambiguous: it matches DMT 16h (reduced blanking (CVT-RB)), DMT 17h; name "
            "the source instead (e.g. 'DMT 16h') or add dmt, cta, rb or std")):
        modes.find("1280x768@60")
    assert modes.find("1280x768@60 rb").source == "DMT 16h"
    assert modes.find("1280x768@60 std").source == "DMT 17h"


def test_unknown_name_suggests_sizes() -> None:
    with pytest.raises(modes.ModeLookupError,
                       match=r"^no library entry is 1024x768@61; this size exists as "
                             r"1024x768@60, 1024x768@70, "):
        modes.find("1024x768@61")


def test_spec_with_standard() -> None:
    s = loads("name: hd\nstandard: CTA VIC 16\n")
    assert s.pixel_clock_hz == 148_500_000
    assert s.origin == "CTA VIC 16 (1920x1080@60)"


def test_spec_standard_problems_are_located() -> None:
    with pytest.raises(SpecError) as info:
        loads("name: hd\nstandard: 1280x768@60\nhorizontal: {}\n", "s.yaml")
    lines = str(info.value).splitlines()
    assert re.match(r"^s\.yaml:2:11: standard: is ambiguous: .*, got '1280x768@60'$", lines[0])
    assert re.match(r"^s\.yaml:3:1: horizontal: cannot be given together with standard "
                    r"\(at s\.yaml:2:1\), which supplies it; remove one$", lines[1])
    assert len(lines) == 2


def test_cli_modes_filter_and_clock_limit() -> None:
    r = CliRunner().invoke(main, ["modes", "--max-clock", "30MHz", "--json"])
    assert r.exit_code == 0
    entries = json.loads(r.output)
    assert entries and all(Fraction(e["pixel_clock_hz"]) <= 30_000_000 for e in entries)
    e = entries[0]
    assert set(e["horizontal"]) == {"active", "front_porch", "sync", "back_porch",
                                    "sync_polarity"}  # fmt: skip
    assert {"pixel_clock_hz", "vertical", "source"} <= set(e)
    fractional = [e for e in entries if "pixel_clock_exact_hz" in e]
    assert fractional and all(isinstance(e["pixel_clock_hz"], int) for e in entries)
    r = CliRunner().invoke(main, ["modes", "cta", "2160"])
    assert r.exit_code == 0 and "CTA VIC 97" in r.output and "DMT" not in r.output
    assert "5.940 Gbit/s" in r.output  # TMDS: 10 bits per pixel clock at 594 MHz


def test_cli_modes_bad_clock() -> None:
    r = CliRunner().invoke(main, ["modes", "--max-clock", "fast"])
    assert r.exit_code == 2
    assert re.search(r'^--max-clock: must be a frequency like "100MHz", got \'fast\'$',
                     r.stderr, re.M)


@pytest.mark.parametrize("m", modes.library(), ids=lambda m: m.source)
def test_new_writes_a_spec_that_loads_as_the_entry(m: modes.Mode, tmp_path) -> None:
    out = tmp_path / "t.yaml"
    r = CliRunner().invoke(main, ["new", m.source, "-o", str(out)])
    assert r.exit_code == 0, r.output
    s = loads(out.read_text(), str(out))
    assert (s.horizontal, s.vertical) == (m.horizontal, m.vertical)
    # Clocks that are not whole Hz (1000/1001 variants) are written rounded to 1 Hz.
    assert abs(s.pixel_clock_hz - m.pixel_clock_hz) <= Fraction(1, 2)


def test_new_output_passes_show(tmp_path) -> None:
    out = tmp_path / "hd.yaml"
    runner = CliRunner()
    assert runner.invoke(main, ["new", "1280x720@60", "-o", str(out)]).exit_code == 0
    r = runner.invoke(main, ["show", str(out)])
    assert r.exit_code == 0 and "74.250 MHz" in r.output
    r = runner.invoke(main, ["new", "1280x720@60", "-o", str(out)])
    assert r.exit_code == 0  # synccore's own file, unchanged: replaced
    out.write_text(out.read_text() + "# my edit\n")
    r = runner.invoke(main, ["new", "1280x720@60", "-o", str(out)])
    assert r.exit_code == 2 and "was not written by synccore (or was changed since); pass --force" in r.stderr


def test_new_to_stdout() -> None:
    r = CliRunner().invoke(main, ["new", "DMT 04h", "-o", "-"])
    assert r.exit_code == 0
    assert r.output.startswith("# Timing description written by `synccore new` from DMT 04h "
                               "(640x480@60).\n")
    assert loads(r.output).pixel_clock_hz == 25_175_000
    # Either spelling of the ID, in any case, writes the same spec.
    for spelling in ("DMT 0x04", "dmt 04H", "DMT 0X4"):
        assert CliRunner().invoke(main, ["new", spelling, "-o", "-"]).output == r.output


# The VESA DMT document names each timing "DMT ID: 04h": two hex digits followed by h,
# with upper-case hex digits, e.g. 1Ah (from memory).
DMT_ID_FORM = re.compile(r"DMT [0-9A-F]{2}h")


def test_dmt_ids_are_written_as_the_standard_writes_them() -> None:
    dmt = [m for m in modes.library() if m.family == "DMT"]
    assert dmt and all(DMT_ID_FORM.fullmatch(m.source) for m in dmt)
    assert modes.find("1280x768@120").source == "DMT 1Ah"
    assert modes.dmt_source(0x04) == "DMT 04h" and modes.dmt_source(0x1A) == "DMT 1Ah"


@pytest.mark.parametrize("spelling", ["DMT 1Ah", "DMT 1ah", "dmt 1AH", "DMT 0x1A", "DMT 0x1a",
                                      "dmt 0X1A", "DMT ID 1Ah", " DMT 0x1A "])  # fmt: skip
def test_dmt_id_is_found_in_either_form(spelling: str) -> None:
    assert modes.find(spelling).source == "DMT 1Ah"
    s = loads(f"name: a\nstandard: {spelling!r}\n")
    assert s.origin == "DMT 1Ah (1280x768@120)"


def test_unknown_dmt_id_is_named_in_the_standard_form() -> None:
    with pytest.raises(modes.ModeLookupError, match=r"^no library entry has the source 'DMT FEh'$"):
        modes.find("DMT 0xfe")


@pytest.mark.parametrize("words", ["DMT 04h", "dmt 0x04", "0X04", "04H", "4h", "0x4"])
def test_search_takes_a_dmt_id_in_either_form(words: str) -> None:
    assert [m.source for m in modes.search(words)] == ["DMT 04h"]


def test_cli_modes_filter_by_dmt_id() -> None:
    for words in (["DMT", "0x1a"], ["dmt", "1AH"]):
        r = CliRunner().invoke(main, ["modes", *words, "--json"])
        assert r.exit_code == 0, r.output
        assert [e["source"] for e in json.loads(r.output)] == ["DMT 1Ah"]
    r = CliRunner().invoke(main, ["modes", "0x55"])
    assert r.exit_code == 0 and "1280x720@60" in r.output and "DMT 55h" in r.output


@pytest.mark.parametrize(("query", "clock", "h_total", "frame_lines", "fields_per_s"), [
    # CTA-861-G Table 1 (from memory): pixel clock, total pixel clocks per line, lines per
    # frame, field rate; 480i and 576i with pixel repetition 2 (1440 clocks per active line).
    ("CTA VIC 5", 74_250_000, 2200, 1125, 60),
    ("CTA VIC 20", 74_250_000, 2640, 1125, 50),
    ("CTA VIC 6", 27_027_000, 1716, 525, 60),
    ("CTA VIC 7", 27_027_000, 1716, 525, 60),
    ("CTA VIC 21", 27_000_000, 1728, 625, 50),
    ("CTA VIC 22", 27_000_000, 1728, 625, 50),
])  # fmt: skip
def test_interlaced_entries(query: str, clock: int, h_total: int, frame_lines: int,
                            fields_per_s: int) -> None:  # fmt: skip
    m = modes.find(query)
    assert m.interlaced
    assert m.pixel_clock_hz == clock and m.horizontal.total == h_total
    assert 2 * m.vertical.total + 1 == frame_lines
    # The brief's cross-check: clock / (H total x frame lines) x 2 = fields per second.
    assert Fraction(clock, h_total * frame_lines) * 2 == fields_per_s == m.refresh_hz
    assert m.width == (720 if h_total < 2000 else 1920)


@pytest.mark.parametrize(("name", "source"), [
    ("1920x1080i@60", "CTA VIC 5"), ("1920x1080i@59.94", "CTA VIC 5 (1000/1001)"),
    ("720x480i@59.94", "CTA VIC 6 (1000/1001)"), ("720x576i@50", "CTA VIC 21"),
])  # fmt: skip
def test_interlaced_names(name: str, source: str) -> None:
    assert modes.find(name).source == source
    # The per-field size is not a progressive mode's name.
    with pytest.raises(modes.ModeLookupError, match="no library entry is 1920x540@50"):
        modes.find("1920x540@50")
