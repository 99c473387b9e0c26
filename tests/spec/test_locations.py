"""Where the file writes each field: kept on the Spec for checks after validation."""

from __future__ import annotations

import synccore
from synccore.errors import Location
from synccore.spec import from_dict, to_dict

# Block style, so every field has its own line; columns are 1-based.
TEXT = """\
name: lobby_panel
pixel_clock_hz: 33300000
horizontal:
  active: 800
  front_porch: 40
  sync: 128
  back_porch: 88
  sync_polarity: positive
vertical: {active: 480, front_porch: 13, sync: 3, back_porch: 29, sync_polarity: negative}
core:
  lead: 1
"""


def test_each_given_field_is_located_at_its_value() -> None:
    spec = synccore.loads(TEXT, "p.yaml")
    assert spec.location("name") == Location("p.yaml", 1, 7)
    assert spec.location("horizontal") == Location("p.yaml", 4, 3)  # the mapping's first key
    assert spec.location("horizontal.active") == Location("p.yaml", 4, 11)
    assert spec.location("horizontal.sync_polarity") == Location("p.yaml", 8, 18)
    assert spec.location("vertical.active") == Location("p.yaml", 9, 20)
    assert spec.location("core.lead") == Location("p.yaml", 11, 9)


def test_a_field_left_to_its_default_is_found_through_its_section() -> None:
    spec = synccore.loads(TEXT, "p.yaml")
    assert spec.location("core.scale") == spec.location("core") == Location("p.yaml", 11, 3)
    assert spec.location("color.red") == spec.location("") == Location("p.yaml", 1, 1)
    assert "core.scale" not in spec.locations and "color" not in spec.locations


def test_a_library_timing_is_located_at_its_standard_value() -> None:
    spec = synccore.loads("name: vga\nstandard: DMT 04h\n", "s.yaml")
    assert spec.location("horizontal.active") == Location("s.yaml", 2, 11)
    assert spec.location("pixel_clock_hz") == Location("s.yaml", 2, 11)


def test_locations_do_not_change_what_the_spec_is() -> None:
    spec = synccore.loads(TEXT, "p.yaml")
    moved = synccore.loads("\n\n" + TEXT, "p.yaml")
    assert moved.location("horizontal.active") == Location("p.yaml", 6, 11)
    assert moved == spec and hash(moved) == hash(spec)
    again = from_dict(to_dict(spec))
    assert again == spec and again.locations == {} and again.location("horizontal.active") is None
    assert to_dict(again) == to_dict(spec)
