"""An EDID as a VHDL constant array, for a sink's I2C EEPROM emulation.

The bytes come from :func:`synccore.timings.edid_write.build`; the template
(``templates/edid/rom.vhd.j2``) only lays out the rows computed here.
"""

from __future__ import annotations

from synccore._version import __version__
from synccore.emit._jinja import environment

BYTES_PER_ROW = 8


def render_vhdl_rom(data: bytes, *, package: str, title: str) -> str:
    """A VHDL package holding ``data`` as the constant ``edid_rom`` (x"..." literals)."""
    items = [f'x"{b:02X}"' for b in data]
    rows = []
    for i in range(0, len(items), BYTES_PER_ROW):
        last = i + BYTES_PER_ROW >= len(items)
        rows.append(", ".join(items[i:i + BYTES_PER_ROW]) + ("" if last else ",")
                    + f"  -- {i:03X}h")  # fmt: skip
    return environment().get_template("edid/rom.vhd.j2").render(
        title=title, version=__version__, length=len(data), name="edid_rom",
        package=package, last=len(data) - 1, rows=rows)  # fmt: skip
