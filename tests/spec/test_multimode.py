"""Multi-mode specs (``modes:``): reading, one bad input per rule with its whole message, schema."""

from __future__ import annotations

import jsonschema
import pytest
import yaml

import synccore
from synccore import SpecError
from synccore.spec import from_dict, to_dict
from synccore.spec.schema import json_schema
from tests import samples as timings

# VESA DMT 640x480@60 (DMT ID 04h) and 800x600@60 (DMT ID 09h) from the library; a made-up
# small mode written out.
GOOD = """\
name: bench_screen
modes:
  - standard: DMT 04h
  - standard: 800x600@60
  - pixel_clock_hz: 10 MHz
    horizontal: {active: 24, front_porch: 2, sync: 4, back_porch: 2, sync_polarity: negative}
    vertical: {active: 6, front_porch: 1, sync: 2, back_porch: 1, sync_polarity: positive}
core:
  clock_enable: true
"""

MODE = (
    "    horizontal: {active: 24, front_porch: 2, sync: 4, back_porch: 2, sync_polarity: negative}\n"
    "    vertical: {active: 6, front_porch: 1, sync: 2, back_porch: 1, sync_polarity: positive}\n"
)


def problems(text: str) -> list[str]:
    with pytest.raises(SpecError) as info:
        synccore.loads(text, "m.yaml")
    return str(info.value).splitlines()


def test_good_multi_mode_spec() -> None:
    spec = synccore.loads(GOOD, "m.yaml")
    assert len(spec.modes) == 3
    # The top level is mode 0 (VESA DMT 640x480@60: 25.175 MHz, 800 x 525 in all).
    assert spec.pixel_clock_hz == 25_175_000 and spec.horizontal.total == 800
    assert spec.modes[1].horizontal.total == 1056 and spec.modes[1].vertical.total == 628  # DMT 09h
    assert spec.modes[2].pixel_clock_hz == 10_000_000
    assert all(m.core.clock_enable and m.name == "bench_screen" for m in spec.modes)
    assert [m.origin for m in spec.modes] == ["DMT 04h (640x480@60)", "DMT 09h (800x600@60)", ""]
    assert str(spec.modes[2].location("vertical.sync")) == "m.yaml:7:49"
    assert str(spec.location("core.clock_enable")) == "m.yaml:9:17"
    back = from_dict(to_dict(spec))  # the benches read it so (origin and notes stay behind)
    assert [(m.pixel_clock_hz, m.horizontal, m.vertical, m.core) for m in back.modes] == [
        (m.pixel_clock_hz, m.horizontal, m.vertical, m.core) for m in spec.modes]


def test_timing_keys_at_the_top_are_refused() -> None:
    assert problems(GOOD.replace("modes:", "pixel_clock_hz: 1 MHz\nmodes:")) == [
        "m.yaml:2:1: pixel_clock_hz: cannot be given together with modes (at m.yaml:3:1): each mode "
        "gives its own timing; move it into the modes",
    ]


def test_too_few_modes() -> None:
    assert problems("name: a\nmodes:\n  - standard: DMT 04h\n") == [
        "m.yaml:3:3: modes: must hold 2 to 16 entries, got 1",
    ]


def test_too_many_modes() -> None:
    text = "name: a\nmodes:\n" + "  - pixel_clock_hz: 1 MHz\n" * 17
    lines = problems(text)
    assert lines[0] == "m.yaml:3:3: modes: must hold 2 to 16 entries, got 17"


def test_modes_must_be_a_list_of_mappings() -> None:
    assert problems("name: a\nmodes: 3\n") == [
        "m.yaml:2:8: modes: must be a list of mappings of standard, formula, fit, pixel_clock_hz, "
        "horizontal, vertical, interlaced, got 3",
    ]
    assert problems("name: a\nmodes: [{standard: DMT 04h}, 5]\n") == [
        "m.yaml:2:30: modes[1]: must be a mapping of standard, formula, fit, pixel_clock_hz, "
        "horizontal, vertical, interlaced, got 5",
    ]


def test_a_mode_problem_is_located_in_its_mode() -> None:
    text = "name: a\nmodes:\n  - standard: DMT 04h\n  - standard: 640x480@61\n"
    assert problems(text) == [
        "m.yaml:4:15: modes[1].standard: no library entry is 640x480@61; this size exists as "
        "640x480@59.94, 640x480@60, 640x480@72, 640x480@75, 640x480@85, got '640x480@61'",
    ]
    text = ("name: a\nmodes:\n  - standard: DMT 04h\n  - pixel_clock_hz: 1 MHz\n"
            + MODE.replace("sync: 4,", "sync: 40,"))  # fmt: skip
    assert problems(text) == [
        "m.yaml:5:52: modes[1].horizontal.sync: must be less than half the total (68 pixels): a "
        "pulse of 40 cannot be told from its inverse, got 40",
    ]


def test_interlaced_mode_is_refused() -> None:
    # CTA-861 VIC 5 (1920x1080i60) from the library.
    assert problems("name: a\nmodes:\n  - standard: DMT 04h\n  - standard: CTA VIC 5\n") == [
        "m.yaml:4:15: modes[1].interlaced: multi-mode cores take progressive timings only yet: "
        "must be false, got an interlaced timing",
    ]


def test_zero_back_porches_are_refused() -> None:
    zero = MODE.replace("back_porch: 2", "back_porch: 0").replace("back_porch: 1", "back_porch: 0")
    text = "name: a\nmodes:\n  - standard: DMT 04h\n  - pixel_clock_hz: 1 MHz\n" + zero
    assert problems(text) == [
        "m.yaml:5:67: modes[1].horizontal.back_porch: multi-mode: must be at least 1 so that hsync "
        "ends inside its line (a mode switch must not cut a pulse), got 0",
        "m.yaml:6:64: modes[1].vertical.back_porch: multi-mode: must be at least 1 so that vsync "
        "ends inside its frame (a mode switch must not cut a pulse), got 0",
    ]


def test_core_options_the_multi_mode_core_lacks() -> None:
    text = GOOD.replace("  clock_enable: true", "  pixels_per_clock: 2\n  lead: 1")
    assert problems(text) == [
        "m.yaml:9:21: core.pixels_per_clock: multi-mode cores carry one pixel per clock yet: must "
        "be 1, got 2",
        "m.yaml:10:9: core.lead: multi-mode cores have no lead yet: must be 0, got 1",
    ]


def test_the_mode_ports_may_not_clash_with_the_name() -> None:
    assert problems(GOOD.replace("name: bench_screen", "name: mode_active")) == [
        "m.yaml:1:7: name: clashes with port 'mode_active' (VHDL ignores case), got 'mode_active'",
    ]


def test_schema_takes_a_multi_mode_spec_and_refuses_a_mix() -> None:
    schema = json_schema()
    jsonschema.validate(yaml.safe_load(GOOD), schema)
    jsonschema.validate(yaml.safe_load(timings.MULTI_SMALL_OPTS), schema)
    mixed = yaml.safe_load(GOOD)
    mixed["standard"] = "DMT 04h"
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(mixed, schema)
    one = yaml.safe_load(GOOD)
    one["modes"] = one["modes"][:1]
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(one, schema)
