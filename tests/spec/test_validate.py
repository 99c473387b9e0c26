"""The validator: one bad input per rule, each with its full message pinned."""

from __future__ import annotations

import re
from fractions import Fraction
from pathlib import Path

import pytest

import synccore
from synccore import SpecError
from synccore.spec._yaml import MAX_FILE_BYTES

GOOD = """\
name: lobby_panel
pixel_clock_hz: 33300000
horizontal: {active: 800, front_porch: 40, sync: 128, back_porch: 88, sync_polarity: positive}
vertical:   {active: 480, front_porch: 13, sync: 3,   back_porch: 29, sync_polarity: negative}
"""


def problems(text: str, source: str = "panel.yaml") -> list[str]:
    with pytest.raises(SpecError) as info:
        synccore.loads(text, source)
    return str(info.value).splitlines()


def only(text: str) -> str:
    lines = problems(text)
    assert len(lines) == 1, lines
    return lines[0]


def test_good_spec_loads() -> None:
    spec = synccore.loads(GOOD, "panel.yaml")
    assert spec.name == "lobby_panel"
    assert spec.pixel_clock_hz == 33_300_000
    assert spec.horizontal.total == 1056 and spec.vertical.total == 525
    assert spec.core == synccore.CoreOptions()


@pytest.mark.parametrize(
    ("text", "hz"),
    [
        ("33300000", Fraction(33_300_000)),
        ('"33.3 MHz"', Fraction(33_300_000)),
        ('"25175 kHz"', Fraction(25_175_000)),
        ("25.175MHz", Fraction(25_175_000)),
        ("1.485e8", Fraction(148_500_000)),
        ('"74.175824 MHz"', Fraction(74_175_824)),
        ("0.5 GHz", Fraction(500_000_000)),
    ],
)
def test_pixel_clock_forms(text: str, hz: Fraction) -> None:
    spec = synccore.loads(GOOD.replace("33300000", text))
    assert spec.pixel_clock_hz == hz


@pytest.mark.parametrize(
    ("old", "new", "message"),
    [
        # missing key: located at the mapping that lacks it
        ("sync: 3,", "", r"panel\.yaml:4:13: vertical\.sync: required key is missing"),
        # unknown key, with the near name suggested
        ("sync: 128,", "snyc: 128,",
         r"panel\.yaml:3:44: horizontal\.snyc: unknown key \(did you mean 'sync'\?\); allowed "
         r"here: active, front_porch, sync, back_porch, sync_polarity"),
        # wrong type
        ("active: 800", "active: wide",
         r"panel\.yaml:3:22: horizontal\.active: must be a whole number, got 'wide'"),
        ("active: 800", "active: 800.5",
         r"panel\.yaml:3:22: horizontal\.active: must be a whole number, got 800\.5"),
        ("horizontal: {", "horizontal: [",
         r"panel\.yaml:\d+:\d+: YAML syntax: .*"),
        # zero and negative widths
        ("sync: 3,", "sync: 0,", r"panel\.yaml:4:50: vertical\.sync: must be ≥ 1, got 0"),
        ("back_porch: 88", "back_porch: -88",
         r"panel\.yaml:3:67: horizontal\.back_porch: must be ≥ 0, got -88"),
        ("active: 480", "active: 0", r"panel\.yaml:4:22: vertical\.active: must be ≥ 1, got 0"),
        # absurd sizes
        ("active: 800", "active: 70000",
         r"panel\.yaml:3:22: horizontal\.active: must be ≤ 65535, got 70000"),
        ("active: 800", "active: 65400",
         r"panel\.yaml:3:13: horizontal: total of 65656 pixels is more than 65535"),
        # choices
        ("sync_polarity: positive", "sync_polarity: postive",
         r"panel\.yaml:3:86: horizontal\.sync_polarity: must be one of positive, negative, got "
         r"'postive' \(did you mean 'positive'\?\)"),
        # names: keywords of either language, and non-identifiers
        ("name: lobby_panel", "name: module",
         r"panel\.yaml:1:7: name: is a Verilog keyword, got 'module'"),
        ("name: lobby_panel", "name: Entity",
         r"panel\.yaml:1:7: name: is a VHDL reserved word, got 'Entity'"),
        ("name: lobby_panel", "name: 2panel",
         r"panel\.yaml:1:7: name: must start with a letter and hold only letters, digits and "
         r"single underscores \(not at the end\), to be legal in both Verilog and VHDL, got "
         r"'2panel'"),
        ("name: lobby_panel", "name: lobby__panel", r"panel\.yaml:1:7: name: must start with .*"),
        ("name: lobby_panel", "name: h_pos",
         r"panel\.yaml:1:7: name: is a name used inside the generated core, got 'h_pos'"),
        ("name: lobby_panel", "name: HSYNC",
         r"panel\.yaml:1:7: name: clashes with port 'hsync' \(VHDL ignores case\), got 'HSYNC'"),
        # frequencies
        ("33300000", '"33.3 MHZZ"',
         r"panel\.yaml:2:17: pixel_clock_hz: must be a frequency in Hz or a string like "
         r"\"25\.175 MHz\" or \"25175 kHz\", got '33\.3 MHZZ'"),
        ("33300000", "0",
         r"panel\.yaml:2:17: pixel_clock_hz: must be above 0 and at most 10 GHz, got 0"),
        # a section given as a scalar
        ("vertical:   {active: 480, front_porch: 13, sync: 3,   back_porch: 29, "
         "sync_polarity: negative}", "vertical: 480",
         r"panel\.yaml:4:11: vertical: must be a mapping of active, front_porch, sync, "
         r"back_porch, sync_polarity, got 480"),
    ],
)  # fmt: skip
def test_each_rule_has_its_message(old: str, new: str, message: str) -> None:
    assert old in GOOD
    line = only(GOOD.replace(old, new, 1))
    assert re.fullmatch(message, line), line


def test_core_options() -> None:
    bad = GOOD + (
        "core:\n  pixels_per_clock: 3\n  clock_enable: yes please\n  reset: async\n"
        "  lead: -1\n  vsync_aling: line\n"
    )
    assert problems(bad) == [
        "panel.yaml:6:21: core.pixels_per_clock: must be one of 1, 2, 4, 8, got 3",
        "panel.yaml:7:17: core.clock_enable: must be true or false, got 'yes please'",
        "panel.yaml:8:10: core.reset: must be one of sync_high, sync_low, async_high, "
        "async_low, got 'async' (did you mean 'async_low'?)",
        "panel.yaml:9:9: core.lead: must be ≥ 0, got -1",
        "panel.yaml:10:3: core.vsync_aling: unknown key (did you mean 'vsync_align'?); "
        "allowed here: pixels_per_clock, clock_enable, reset, lead, vsync_align, scale",
    ]


def test_scale_rules() -> None:
    assert only(GOOD + "core: {scale: 3}\n") == (
        "panel.yaml:5:15: core.scale: must be one of 1, 2, 4, got 3")
    odd = GOOD.replace("active: 480", "active: 482")
    assert problems(odd + "core: {scale: 4}\n") == [
        "panel.yaml:4:22: vertical.active: must divide by core.scale = 4, got 482"]


def test_color_rules() -> None:
    assert problems(GOOD + "color: {red: 9, green: 0, bleu: 2}\n") == [
        "panel.yaml:5:14: color.red: must be ≤ 8, got 9",
        "panel.yaml:5:24: color.green: must be ≥ 1, got 0",
        "panel.yaml:5:27: color.bleu: unknown key (did you mean 'blue'?); allowed here: red, green, blue",
    ]


def test_not_divisible_by_pixels_per_clock() -> None:
    lines = problems(GOOD.replace("front_porch: 40", "front_porch: 42") + "core: {pixels_per_clock: 4}\n")
    assert lines == [
        "panel.yaml:3:40: horizontal.front_porch: must divide by core.pixels_per_clock = 4, got 42"
    ]


def test_lead_longer_than_a_frame() -> None:
    line = only(GOOD + "core: {lead: 554400}\n")
    assert line == "panel.yaml:5:14: core.lead: must be less than one frame (554400 cycles), got 554400"


def test_prefix_rules() -> None:
    assert synccore.loads(GOOD + "ports: {prefix: vga_}\n").port_prefix == "vga_"
    assert synccore.loads(GOOD + "ports: {prefix: Vga}\n").port_prefix == "Vga"
    line = only(GOOD + "ports: {prefix: 9v}\n")
    assert line == (
        "panel.yaml:5:17: ports.prefix: must start with a letter and hold only letters, digits "
        "and single underscores, got '9v'"
    )


def test_every_problem_reported_at_once() -> None:
    text = GOOD.replace("sync: 128", "sync: 0").replace("active: 480", "active: -1").replace(
        "lobby_panel", "wire"
    )
    assert len(problems(text)) == 3


def test_yaml_syntax_error_is_located() -> None:
    line = only("name: a\nhorizontal: {active: 1\n")
    assert re.fullmatch(r"panel\.yaml:3:1: YAML syntax: expected ',' or '}', but got .*", line)


def test_alias_bomb_refused() -> None:
    bomb = "a: &a [x, x, x, x, x, x, x, x, x, x]\n"
    for i, name in enumerate("bcdefgh"):
        prev = "abcdefgh"[i]
        bomb += f"{name}: &{name} [" + ", ".join([f"*{prev}"] * 10) + "]\n"
    line = only(bomb)
    assert re.fullmatch(
        r"panel\.yaml:\d+:\d+: document expands to more than 20000 values \(aliases nested too "
        r"deep\?\); refused",
        line,
    )


def test_file_size_limit(tmp_path: Path) -> None:
    path = tmp_path / "big.yaml"
    path.write_text(GOOD + "#" * MAX_FILE_BYTES)
    with pytest.raises(SpecError, match=rf"^{re.escape(str(path))}:1:1: file is larger than"):
        synccore.load(path)


def test_python_tags_are_refused() -> None:
    line = only(GOOD.replace("name: lobby_panel", "name: !!python/object:os.system x"))
    assert line == ("panel.yaml:1:7: name: explicit tag 'tag:yaml.org,2002:python/object:os.system' is not "
                    "read here; allowed: !!str, !!int, !!float, !!bool, !!null")


def test_duplicate_keys() -> None:
    line = only(GOOD + "name: other\n")
    assert line == "panel.yaml:5:1: name: duplicate key (first given at panel.yaml:1:1); the first is used"


def test_top_level_must_be_mapping() -> None:
    assert only("- 1\n- 2\n").startswith("panel.yaml:1:1: must be a mapping of name, ")


def test_empty_and_multi_document_files() -> None:
    assert only("") == "panel.yaml:1:1: file holds no YAML document"
    assert only(GOOD + "---\nname: x\n") == (
        "panel.yaml:6:1: file holds more than one YAML document; give one timing per file"
    )


def test_missing_file() -> None:
    with pytest.raises(SpecError, match=r"^nope\.yaml: cannot read: No such file"):
        synccore.load("nope.yaml")


def test_sync_of_half_the_total_is_refused() -> None:
    """Found by the differential campaign (tests/verification/test_differential.py): a raster of
    2 x 2 with one-line syncs measures as the opposite polarity; a monitor takes the shorter level
    as the pulse (common practice), so a pulse of half the total or more is refused."""
    text = GOOD.replace("vertical:   {active: 480, front_porch: 13, sync: 3,   back_porch: 29",
                        "vertical:   {active: 1, front_porch: 0, sync: 1,   back_porch: 0")
    assert only(text) == ("panel.yaml:4:47: vertical.sync: must be less than half the total (2 lines): "
                          "a pulse of 1 cannot be told from its inverse, got 1")
