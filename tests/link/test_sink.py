"""The simulated DVI sink: symbol boundaries from control tokens, decoding, and named link faults.

The lanes come from the timing model through the reference encoder (no HDL), then are
damaged the way a wrong transmitter would damage them; each fault must be named.
Check values: DVI 1.0 section 3.2 (channel 0 carries HSYNC/VSYNC as C0/C1, bit 0 of a
symbol first on the wire; the control tokens mark the blanking periods).
"""

from __future__ import annotations

import numpy as np
import pytest

import synccore
from synccore.model import tmds as model_tmds
from synccore.picture.compare import check_pattern
from synccore.picture.link import Lanes, receive, serial_bits, symbols
from synccore.picture.link_run import model_lanes
from synccore.picture.monitor import watch
from synccore.picture.run import cycles_needed, model_pins

SMALL = (
    "name: dvi_small\n"
    "pixel_clock_hz: 2 MHz\n"
    "horizontal: {active: 64, front_porch: 4, sync: 10, back_porch: 6, sync_polarity: negative}\n"
    "vertical: {active: 40, front_porch: 2, sync: 2, back_porch: 4, sync_polarity: positive}\n"
    "color: {red: 3, green: 3, blue: 2}\n"
)  # a made-up small timing


@pytest.fixture(scope="module")
def spec() -> synccore.Spec:
    return synccore.loads(SMALL, source="small.yaml")


@pytest.fixture(scope="module")
def lanes(spec: synccore.Spec) -> Lanes:
    return model_lanes(spec, "bars", cycles_needed(spec))


def _with(lanes: Lanes, words: np.ndarray) -> Lanes:
    return Lanes(lanes.period_s, words, lanes.source)


def test_clean_link_gives_the_model_pins(spec: synccore.Spec, lanes: Lanes) -> None:
    rec = receive(lanes)
    assert rec.problems == [] and rec.notes == []
    assert rec.pins is not None
    pins = model_pins(spec, "bars", cycles_needed(spec))
    np.testing.assert_array_equal(rec.pins.hsync, pins.hsync)
    np.testing.assert_array_equal(rec.pins.vsync, pins.vsync)
    np.testing.assert_array_equal(rec.pins.de, pins.de)
    mon = watch(rec.pins, spec=spec)
    check_pattern(mon, spec, "bars")
    assert mon.problems == []


def test_symbol_boundary_found_from_the_tokens(lanes: Lanes) -> None:
    """A stream that starts 3 bits into a symbol: the sink cuts it where the tokens are."""
    shifted = np.stack([symbols(serial_bits(w), 3, False) for w in lanes.words])
    rec = receive(_with(lanes, shifted))
    assert rec.problems == []
    assert rec.notes == [f"lane {k}: symbols start 7 bits into the stream (found from the control tokens)"
                         for k in range(3)]  # fmt: skip


def test_reversed_bit_order_is_named(lanes: Lanes) -> None:
    """Lane 0's tokens (four of them) are recognised read backwards; on lanes 1 and 2 the
    00 token read backwards is the 01 token (DVI 1.0 section 3.2.2's token table)."""
    reversed_words = np.stack([symbols(serial_bits(w), 0, True) for w in lanes.words])
    rec = receive(_with(lanes, reversed_words))
    assert rec.problems == [
        "lane 0: bit order reversed: the control tokens arrive bit 9 first; TMDS sends bit 0 of each "
        "symbol first (DVI 1.0, section 3.2)",
        *(f"lane {k}: bit order reversed: every control token reads C1C0 = 01, the 00 token bit 9 first; "
          "TMDS sends bit 0 of each symbol first (DVI 1.0, section 3.2)" for k in (1, 2))]  # fmt: skip


def test_swapped_lanes_are_named(lanes: Lanes) -> None:
    rec = receive(_with(lanes, lanes.words[[2, 1, 0]]))
    assert ("lanes swapped: the sync tokens (C0/C1 changing) arrive on lane 2; DVI carries HSYNC and "
            "VSYNC on channel 0 (tmds_data[0], blue)") in rec.problems  # fmt: skip


def test_skewed_lane_is_named(lanes: Lanes) -> None:
    words = lanes.words.copy()
    words[1] = np.roll(words[1], 1)  # lane 1 one symbol late
    rec = receive(_with(lanes, words))
    assert rec.problems == ["lane 1 is 1 symbol late against lane 0: the channels' data periods (de) do not "
                            "line up"]  # fmt: skip


def test_invalid_symbols_are_counted(lanes: Lanes) -> None:
    words = lanes.words.copy()
    sent = {int(w) for k in range(9) for w in model_tmds._WORD[k]} | set(model_tmds.CONTROL_TOKENS.values())
    bad = min(set(range(1024)) - sent)  # the reference encoder never sends it, from any disparity
    words[2, 500] = bad
    rec = receive(_with(lanes, words))
    assert rec.problems == [f"lane 2: 1 symbol no TMDS encoder sends, first at symbol 500 ({bad:#05x})"]


def test_no_tokens_no_picture(lanes: Lanes) -> None:
    rec = receive(_with(lanes, np.full_like(lanes.words, 0b0101010101)))
    assert rec.pins is None
    assert rec.problems[0].startswith("lane 0: no control token at any bit offset")
