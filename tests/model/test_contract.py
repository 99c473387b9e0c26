"""The bench contract: the reset port, the event records and the length of a measurement."""

from __future__ import annotations

import pytest

import synccore
from synccore.model import MONITOR_FIELDS, Event, decode, parse_events, reset_port, stop_count
from tests import samples


@pytest.mark.parametrize(("reset", "base", "active"), [
    ("sync_high", "rst", 1), ("async_high", "rst", 1), ("sync_low", "rst_n", 0), ("async_low", "rst_n", 0),
])  # fmt: skip
def test_reset_port(reset: str, base: str, active: int) -> None:
    # Common practice: an active-low reset carries the suffix _n.
    assert reset_port(reset) == (base, active)


def test_reset_port_refuses_an_unknown_choice() -> None:
    with pytest.raises(ValueError, match=r"^core.reset must be one of sync_high, async_high, sync_low, "
                                         r"async_low, got 'async'$"):  # fmt: skip
        reset_port("async")


def test_the_core_and_its_benches_name_the_same_reset_port() -> None:
    from synccore.emit.bench.harness import harness_context
    from synccore.emit.bench.testbench import testbench_context

    spec = synccore.loads(samples.SMALL_ALL_OPTIONS)  # async_low with the prefix lcd_
    assert harness_context(spec).reset_port == testbench_context(spec).reset_port == "lcd_rst_n"
    assert harness_context(spec).reset_active == 0
    assert "lcd_rst_n" in synccore.render_verilog(spec)


def test_decode_unpacks_fields_least_significant_first() -> None:
    # Layout by hand from the field widths: adv bits 0-31, hsync 32, vsync 33, de 34, hblank 35,
    # vblank 36, frame_start 37, line_start 38, x 39-54, y 55-70, x_last 71-86,
    # step_faults 87-102, line_starts 103-118, frame_starts 119-134.
    assert sum(bits for _, bits in MONITOR_FIELDS) == 135
    word = 5 | 1 << 32 | 1 << 34 | 1 << 38 | 7 << 39 | 3 << 55 | 9 << 71 | 2 << 87 | 4 << 103 | 1 << 119
    assert decode(word) == Event(adv=5, hsync=1, vsync=0, de=1, hblank=0, vblank=0, frame_start=0,
                                 line_start=1, x=7, y=3, x_last=9, step_faults=2, line_starts=4,
                                 frame_starts=1)  # fmt: skip


def test_parse_events_skips_a_line_cut_short() -> None:
    text = "1 1 0 1 0 0 1 1 0 0 0 0 1 1\n17 1 0 0 1 0 0 0 16 0 15 0 1 1\n33 0 1\n"
    events = parse_events(text)
    assert [e.adv for e in events] == [1, 17]
    assert events[1] == Event(17, 1, 0, 0, 1, 0, 0, 0, 16, 0, 15, 0, 1, 1)


def test_stop_count() -> None:
    # SMALL is 32 x 15 = 480 cycles per frame (20+3+4+5, 8+2+2+3): 2 frames and 2 lines
    # are 960 + 64 = 1024 edges.
    t = synccore.timing(synccore.loads(samples.SMALL))
    assert stop_count(t, 2) == 1024
