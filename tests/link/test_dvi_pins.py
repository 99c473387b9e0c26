"""The DVI top's pin files: every port of <name>_dvi, placeholders, the TMDS I/O standard."""

from __future__ import annotations

from fractions import Fraction

import pytest

from synccore.clocking import FAMILY_KEYS
from synccore.emit.link.dvi_pins import dvi_pin_suffix, render_dvi_pins
from synccore.errors import ToolError
from tests.link.test_serialiser import spec_of

PORTS = ["board_clk", "reset_n", "tmds_clk_p", "tmds_clk_n",
         *(f"tmds_data_{s}[{i}]" for s in "pn" for i in range(3))]  # fmt: skip

# the TMDS standard in each vendor's spelling (from memory: UG471 TMDS_33; Gowin UG289
# LVCMOS33D; ECP5 and Cyclone single-ended 3.3 V pairs); iCE40 has none in its .pcf
STANDARD = {"ecp5": "IO_TYPE=LVCMOS33 ", "gowin": "IO_TYPE=LVCMOS33D", "xc7-mmcm": "TMDS_33",
            "xc7-pll": "TMDS_33", "cyclone": '"3.3-V LVCMOS"', "ice40": "set_io"}  # fmt: skip


@pytest.mark.parametrize("key", FAMILY_KEYS)
def test_every_port_has_a_placeholder_and_the_tmds_standard(key: str) -> None:
    text = render_dvi_pins(spec_of(1), key, f_board=Fraction(27 * 10**6))
    body = [line for line in text.splitlines() if line and not line.startswith(("#", "//"))]
    assert sum("TODO_PIN" in line for line in body) == len(PORTS)
    for port in PORTS:
        assert port in text
    tmds_lines = [line for line in body if "tmds_" in line]
    assert tmds_lines and all(STANDARD[key] in line or "TODO_PIN" in line for line in tmds_lines)
    assert any(STANDARD[key] in line for line in tmds_lines)
    assert "50 ohm" in text and "TMDS" in text
    assert dvi_pin_suffix(key) in {".pcf", ".lpf", ".cst", ".xdc", ".qsf"}


def test_unknown_family_is_refused() -> None:
    with pytest.raises(ToolError, match=r"^family: no pin file for family 'ecp3'; choose one"):
        dvi_pin_suffix("ecp3")
