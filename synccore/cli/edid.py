"""``synccore edid``: read a display's EDID, or write one for a display you build.

Reading prints what the EDID declares (or ``--json``, one object); damage found is
listed after it and the exit status is 1.  Writing (``--write SPEC... -o out.bin``)
puts the specs' timings into an EDID 1.4 and writes, beside ``out.bin``, ``out.hex``
(a hex dump), ``out.mem`` (Verilog ``$readmemh``) and ``out.vhd`` (a VHDL package).
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import click

from synccore.cli._common import FAILED, fail, load_spec, save_all
from synccore.emit.edid_rom import render_vhdl_rom
from synccore.timings import edid, edid_write
from synccore.units import fixed

MAX_INPUT_BYTES = 1 << 20
"""Larger files are not EDIDs (256 blocks of 128 bytes hold 32 KiB; common practice)."""


def load_edid(path: str) -> edid.Edid:
    """The EDID in the file at ``path``, or one line on stderr and exit 2."""
    try:
        p = Path(path)
        if p.stat().st_size > MAX_INPUT_BYTES:
            fail(f"{path}: not an EDID: {p.stat().st_size} bytes is far too large")
        return edid.read(p.read_bytes())
    except OSError as exc:
        fail(f"{path}: cannot read: {exc.strerror or exc}")
    except edid.EdidError as exc:
        fail(f"{path}: {exc}")


def _timing_lines(d: edid.DetailedTiming, number: int) -> list[str]:
    h, v = d.horizontal, d.vertical
    mark = " (preferred)" if number == 1 else ""
    lines = [f"  {number}. {d.name}{mark}  [{d.where}]",
             f"     pixel clock {fixed(d.pixel_clock_hz / 1_000_000, 2)} MHz, "
             f"{d.sync_type} sync, hsync {h.sync_polarity}, vsync {v.sync_polarity}",
             f"     horizontal: active {h.active}, front porch {h.front_porch}, "
             f"sync {h.sync}, back porch {h.back_porch}",
             f"     vertical:   active {v.active}, front porch {v.front_porch}, "
             f"sync {v.sync}, back porch {v.back_porch}"]  # fmt: skip
    if d.image_size_mm != (0, 0):
        lines.append(f"     image {d.image_size_mm[0]} x {d.image_size_mm[1]} mm")
    if d.refusal:
        lines.append(f"     not usable for a spec: {d.refusal}")
    return lines


def _listed(label: str, items: tuple[edid.ListedTiming, ...]) -> list[str]:
    if not items:
        return []
    return [f"{label}:"] + [f"  {t.label}" + (f"  = {t.library}" if t.library
                                              else "  (not in the library)") for t in items]


def describe(e: edid.Edid) -> list[str]:
    """The lines ``synccore edid`` prints for ``e``."""
    out = [f"EDID {e.version}, manufacturer {e.manufacturer}, product code {e.product_code:04X}h, "
           f"serial number {e.serial_number}"]  # fmt: skip
    for label, value in (("monitor name", e.monitor_name), ("serial text", e.serial_text)):
        if value:
            out.append(f"{label}: {value}")
    w, h = e.image_size_cm
    out.append(f"image size: {w} x {h} cm" if w and h else "image size: not given")
    if e.range_limits:
        r = e.range_limits
        out.append(f"range limits: refresh {r.min_refresh_hz}-{r.max_refresh_hz} Hz, line rate "
                   f"{r.min_line_rate_hz // 1000}-{r.max_line_rate_hz // 1000} kHz, "
                   f"pixel clock up to {r.max_pixel_clock_hz // 1_000_000} MHz")  # fmt: skip
    out.append("detailed timings:" if e.all_detailed else "detailed timings: none")
    for n, d in enumerate(e.all_detailed, start=1):
        out.extend(_timing_lines(d, n))
    out += _listed("established timings", e.established)
    out += _listed("standard timings", e.standard)
    for c in e.cta:
        vics = ", ".join(f"{v.vic}{' (native)' if v.native else ''}"
                         + (f" {v.library.split()[-1]}" if v.library else "")
                         for v in c.videos)  # fmt: skip
        out.append(f"CTA-861 block {c.index} (revision {c.revision}): VICs {vics or 'none'}")
    return out


def _package_name(stem: str) -> str:
    word = re.sub(r"[^a-z0-9]+", "_", stem.lower()).strip("_")
    return f"{word or 'edid'}_rom_pkg" if word[:1].isalpha() else f"edid_{word}_rom_pkg"


def _write(specs: tuple[str, ...], out: str | None, cta: bool, name: str, force: bool) -> None:
    if not specs:
        fail("synccore edid --write: give at least one SPEC")
    if out is None:
        fail("synccore edid --write: give -o FILE.bin")
    loaded = [load_spec(s, single_mode="edid") for s in specs]
    try:
        data = edid_write.build(loaded, cta=cta, name=name)
    except edid_write.EdidWriteError as exc:
        fail(f"synccore edid --write: {exc}")
    target = Path(out)
    title = f"EDID for {', '.join(s.name for s in loaded)}"
    files = {target: data,
             target.with_suffix(".hex"): edid_write.hex_dump(data).encode(),
             target.with_suffix(".mem"): edid_write.readmemh(data).encode(),
             target.with_suffix(".vhd"): render_vhdl_rom(
                 data, package=_package_name(target.stem), title=title).encode()}  # fmt: skip
    save_all(dict(files), force=force, option="synccore edid --write")
    click.echo(f"wrote {', '.join(str(p) for p in files)} ({len(data)} bytes)", err=True)


@click.command("edid")
@click.argument("files", nargs=-1, metavar="FILE | SPEC...")
@click.option("--json", "as_json", is_flag=True, help="Print the EDID as one JSON object.")
@click.option("--write", "write", is_flag=True,
              help="Write an EDID 1.4 carrying the timings of SPEC... (the first preferred).")
@click.option("--out", "-o", "out", metavar="FILE.bin",
              help="With --write: the binary; .hex, .mem and .vhd are written beside it.")
@click.option("--cta", is_flag=True, help="With --write: add a CTA-861 extension (VICs).")
@click.option("--name", default="", help="With --write: the monitor name (13 characters).")
@click.option("--force", is_flag=True, help="With --write: replace files synccore did not write.")
def edid_command(files: tuple[str, ...], as_json: bool, write: bool, out: str | None,
                 cta: bool, name: str, force: bool) -> None:  # fmt: skip
    """Read a display's EDID (binary or hex dump), or --write one from specs."""
    if write:
        _write(files, out, cta, name, force)
        return
    if len(files) != 1:
        fail("synccore edid: give one FILE to read (or --write SPEC... -o FILE.bin)")
    e = load_edid(files[0])
    if as_json:
        click.echo(json.dumps(e.to_json(), indent=2))
    else:
        click.echo("\n".join(describe(e)))
    if e.problems:
        click.echo(f"{files[0]}: damaged EDID; what is shown above may be incomplete or wrong:",
                   err=True)  # fmt: skip
        fail((f"  {p}" for p in e.problems), code=FAILED)
