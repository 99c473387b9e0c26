"""The EDID reader and writer against EDIDs assembled here byte by byte.

Layouts from the VESA E-EDID Standard Release A Rev. 2 (EDID 1.4) and CTA-861 (the
CTA extension, version 3); section numbers from memory.  Every byte below is put
together from the standard's field layout, named beside it.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from synccore.spec import Spec
from synccore.timings import edid, edid_write, modes


def _checksummed(block: bytearray) -> bytearray:
    block[127] = (-sum(block[:127])) % 256  # section 3.11: the 128 bytes sum to 0 mod 256
    return block


def _dtd_1080p(flags: int) -> bytes:
    """1920x1080, 148.5 MHz, blanking 280/45, porches 88/44 and 4/5 (section 3.10.2, Table 3.21)."""
    return bytes([
        0x02, 0x3A,  # bytes 0-1: 14850 x 10 kHz, little-endian
        0x80, 0x18, 0x71,  # bytes 2-4: h active 780h, h blank 118h (high nibbles in byte 4)
        0x38, 0x2D, 0x40,  # bytes 5-7: v active 438h, v blank 02Dh
        0x58, 0x2C, 0x45, 0x00,  # bytes 8-11: h front porch 88, h sync 44, v fp 4, v sync 5
        0x0F, 0x28, 0x21,  # bytes 12-14: image 20Fh x 128h mm = 527 x 296 mm
        0x00, 0x00,  # bytes 15-16: no border
        flags,  # byte 17 (Table 3.22)
    ])  # fmt: skip


def _dtd_720p_h_pos_v_neg() -> bytes:
    """1280x720, 74.25 MHz; byte 17 = 1Ah: digital separate (bits 4-3 = 11), vsync
    negative (bit 2 = 0), hsync positive (bit 1 = 1) (section 3.10.2, Table 3.22)."""
    return bytes([0x01, 0x1D, 0x00, 0x72, 0x51, 0xD0, 0x1E, 0x20, 0x6E, 0x28, 0x55, 0x00,
                  0, 0, 0, 0, 0, 0x1A])  # fmt: skip


def _base(ext_count: int = 1) -> bytearray:
    b = bytearray(128)
    b[0:8] = bytes([0x00, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0x00])  # section 3.3 header
    b[8:10] = bytes([0x04, 0x43])  # section 3.4.1: 'A'=1,'B'=2,'C'=3 in 5-bit fields -> 0443h
    b[10:12] = bytes([0x34, 0x12])  # section 3.4.2: product code 1234h little-endian
    b[12:16] = bytes([0x04, 0x03, 0x02, 0x01])  # section 3.4.3: serial 01020304h little-endian
    b[0x12:0x14] = bytes([1, 4])  # section 3.5: version 1, revision 4
    b[0x14] = 0xA5  # section 3.6.1: digital, 8 bits per colour, DisplayPort
    b[0x15:0x17] = bytes([52, 29])  # section 3.6.2: 52 x 29 cm
    b[0x23] = 0x21  # section 3.8: bit 5 = 640x480@60, bit 0 = 800x600@60
    b[0x24] = 0x08  # section 3.8: bit 3 = 1024x768@60
    b[0x26:0x36] = bytes([0x81, 0x80, 0xD1, 0xC0] + [0x01] * 12)  # section 3.9:
    # (1280/8)-31 = 81h, aspect 10b = 5:4, 60 Hz; (1920/8)-31 = D1h, aspect 11b = 16:9, 60 Hz
    b[0x36:0x48] = _dtd_1080p(0x1E)  # section 3.10.1: descriptor 1 is the preferred timing
    b[0x48:0x5A] = _dtd_720p_h_pos_v_neg()
    b[0x5A:0x6C] = bytes([0, 0, 0, 0xFD, 0x00,  # section 3.10.3.3: range limits, no offsets
                          56, 76, 30, 83,  # refresh 56-76 Hz, line rate 30-83 kHz
                          17,  # max pixel clock 17 x 10 MHz
                          0x01, 0x0A] + [0x20] * 6)  # range limits only, then padding
    b[0x6C:0x7E] = bytes([0, 0, 0, 0xFC, 0]) + b"TESTMON\n" + b" " * 5  # section 3.10.3.4
    b[0x7E] = ext_count  # section 3.11
    return _checksummed(b)


def _cta() -> bytearray:
    c = bytearray(128)
    c[0:4] = bytes([0x02, 0x03, 8, 0xF1])  # CTA-861 7.5: tag 02h, version 3, DTDs at 8, 1 native
    c[4:8] = bytes([0x43, 0x90, 0x04, 0x03])  # video data block (tag 2, length 3):
    # 90h = native VIC 16; 04h = VIC 4; 03h = VIC 3 (CTA-861 section 7.5.1)
    c[8:26] = bytes([0x8C, 0x0A, 0xD0, 0x8A, 0x20, 0xE0, 0x2D, 0x10, 0x10, 0x3E, 0x96, 0x00,
                     0, 0, 0, 0, 0, 0x18])  # 720x480, 27 MHz, both polarities negative
    return _checksummed(c)


def test_base_block_fields_decode_as_laid_out() -> None:
    e = edid.decode(bytes(_base(0)))
    assert e.problems == ()
    assert (e.manufacturer, e.product_code, e.serial_number) == ("ABC", 0x1234, 0x01020304)
    assert (e.version, e.digital, e.image_size_cm) == ("1.4", True, (52, 29))
    assert e.monitor_name == "TESTMON"
    assert e.range_limits == edid.RangeLimits(56, 76, 30_000, 83_000, 170_000_000)
    assert [(t.label, t.library) for t in e.established] == [
        ("640x480@60", "DMT 04h"), ("800x600@60", "DMT 09h"), ("1024x768@60", "DMT 10h")]
    assert [(t.label, t.library) for t in e.standard] == [
        ("1280x1024@60", "DMT 23h"), ("1920x1080@60", "DMT 52h")]


def test_detailed_timings_preferred_first_with_sync_flags() -> None:
    first, second = edid.decode(bytes(_base(0))).detailed
    assert first.pixel_clock_hz == 148_500_000
    assert (first.horizontal.active, first.horizontal.front_porch, first.horizontal.sync,
            first.horizontal.back_porch) == (1920, 88, 44, 148)  # fmt: skip
    assert (first.vertical.front_porch, first.vertical.sync, first.vertical.back_porch) == (4, 5, 36)
    assert first.image_size_mm == (527, 296)
    assert (first.sync_type, first.horizontal.sync_polarity, first.vertical.sync_polarity) == (
        "digital separate", "positive", "positive")
    assert (second.horizontal.sync_polarity, second.vertical.sync_polarity) == ("positive",
                                                                               "negative")
    assert first.refusal == "" and second.refusal == ""


@pytest.mark.parametrize(("flags", "reason"), [
    (0x9E, "interlaced"),  # byte 17 bit 7 (Table 3.22)
    (0x3E, "stereo"),  # bits 6-5 = 01, bit 0 = 0: field sequential (Table 3.22)
    (0x12, "digital composite sync"),  # bits 4-3 = 10
    (0x00, "analog composite sync"),  # bits 4-3 = 00
])  # fmt: skip
def test_descriptors_a_spec_cannot_hold_are_refused(flags: int, reason: str) -> None:
    b = _base(0)
    b[0x36:0x48] = _dtd_1080p(flags)
    d = edid.decode(bytes(_checksummed(b))).detailed[0]
    assert d.refusal.startswith(reason)


def test_cta_extension_videos_and_detailed_timings() -> None:
    e = edid.decode(bytes(_base(1) + _cta()))
    assert e.problems == ()
    (c,) = e.cta
    assert (c.revision, c.native_formats) == (3, 1)
    assert [(v.vic, v.native, v.library) for v in c.videos] == [
        (16, True, "CTA VIC 16 1920x1080@60"), (4, False, "CTA VIC 4 1280x720@60"),
        (3, False, "")]  # VIC 3 is not in the library
    (d,) = c.detailed
    assert (d.pixel_clock_hz, d.horizontal.active, d.horizontal.back_porch,
            d.vertical.back_porch, d.vertical.sync_polarity) == (27_000_000, 720, 60, 30,
                                                                 "negative")  # fmt: skip
    assert len(e.all_detailed) == 3
    j = e.to_json()
    assert j["detailed_timings"][0]["horizontal"] == {
        "active": 1920, "front_porch": 88, "sync": 44, "back_porch": 148,
        "sync_polarity": "positive"}  # fmt: skip
    assert j["cta_extensions"][0]["short_video_descriptors"][0] == {
        "vic": 16, "native": True, "library": "CTA VIC 16 1920x1080@60"}


def test_hex_text_forms_give_the_same_bytes() -> None:
    data = bytes(_base(0))
    plain = edid_write.hex_dump(data).encode()
    c_array = ("static const unsigned char edid[128] = { /* base */\n"
               + ", ".join(f"0x{b:02x}" for b in data) + "\n};\n").encode()  # fmt: skip
    offsets = "".join(f"{i:04x}: {data[i:i + 16].hex(' ')}\n" for i in range(0, 128, 16))
    for text in (plain, c_array, offsets.encode(), data.hex().encode()):
        assert edid.read_bytes(text) == data


@pytest.mark.parametrize(("damage", "expected"), [
    (lambda d: d[:100], "truncated: 100 of 128 bytes"),
    (lambda d: d[:127] + bytes([d[127] ^ 1]), "base block: checksum wrong"),
    (lambda d: bytes([0, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFE, 0]) + d[8:], "header: "),
    (lambda d: d[:128] + bytes([0x70]) + d[129:255] + bytes([(d[255] - 0x6E) % 256]),
     "extension block 1: unknown extension tag 70h"),
    (lambda d: d[:200], "extension block 1: truncated (72 of 128 bytes)"),
    (lambda d: d[:0x36] + bytes(18) + d[0x48:], "EDID 1.4 requires the preferred timing"),
])  # fmt: skip
def test_damage_is_reported_and_the_rest_still_read(damage, expected: str) -> None:  # type: ignore[no-untyped-def]
    e = edid.decode(damage(bytes(_base(1) + _cta())))
    assert any(p.startswith(expected) or expected in p for p in e.problems), e.problems
    assert e.manufacturer == "ABC"


@pytest.mark.parametrize(("raw", "message"), [
    (b"", "empty input"),
    (b"  \n", "empty input"),
    (b"hello world", "not an EDID: hex dump line 1"),
    (bytes(range(1, 200)), "not an EDID: it does not start with the header"),
])  # fmt: skip
def test_nothing_to_read_is_one_error(raw: bytes, message: str) -> None:
    with pytest.raises(edid.EdidError, match=message):
        edid.read(raw)


def _spec(m: modes.Mode) -> Spec:
    return Spec(name="t", pixel_clock_hz=m.pixel_clock_hz, horizontal=m.horizontal,
                vertical=m.vertical, interlaced=m.interlaced)  # fmt: skip


def test_every_library_mode_round_trips() -> None:
    written = 0
    for m in modes.library():
        try:
            data = edid_write.build([_spec(m)], cta=True)
        except edid_write.EdidWriteError as exc:
            # A DTD holds 12-bit actives and a 10-bit h front porch (section 3.10.2).
            assert "does not fit" in str(exc)
            assert m.horizontal.active > 4095 or m.horizontal.front_porch > 1023
            continue
        e = edid.decode(data)
        assert e.problems == (), m.source
        d = e.detailed[0]
        assert (d.horizontal, d.vertical) == (m.horizontal, m.vertical), m.source
        assert d.interlaced == m.interlaced, m.source  # byte 17 bit 7 (Table 3.22)
        # The clock is stored in 10 kHz steps (section 3.10.2): nearest step.
        assert abs(d.pixel_clock_hz - m.pixel_clock_hz) <= 5_000, m.source
        if m.family == "CTA":
            assert int(m.source.split()[2]) in [v.vic for v in e.cta[0].videos]
        written += 1
    assert written >= 90


def test_writer_range_limits_and_slots() -> None:
    lib = [_spec(modes.find("DMT 04h")), _spec(modes.find("1280x720@60 cta")),
           _spec(modes.find("1920x1080@60 cta"))]  # fmt: skip
    with pytest.raises(edid_write.EdidWriteError, match="base block holds 2"):
        edid_write.build(lib)
    e = edid.decode(edid_write.build(lib, cta=True, name="FPGA SINK"))
    assert e.problems == ()
    assert e.monitor_name == "FPGA SINK"
    assert e.range_limits == edid.RangeLimits(59, 60, 31_000, 68_000, 150_000_000)
    # 25.175 MHz / (800 x 525) = 59.94 Hz (floor 59); 148.5 MHz / (2200 x 1125) = 60 Hz exactly;
    # line rates 31.47 and 67.5 kHz; 148.5 MHz up to the next 10 MHz (section 3.10.3.3)
    assert [d.horizontal.active for d in e.all_detailed] == [640, 1280, 1920]
    assert [v.vic for v in e.cta[0].videos] == [4, 16]


@settings(max_examples=300, deadline=None)
@given(st.binary(max_size=600))
def test_random_bytes_never_crash(raw: bytes) -> None:
    try:
        edid.read(raw)
    except edid.EdidError:
        pass


@settings(max_examples=300, deadline=None)
@given(st.lists(st.tuples(st.integers(0, 255), st.integers(0, 255)), max_size=12),
       st.integers(0, 256))  # fmt: skip
def test_mutated_edids_never_crash(changes: list[tuple[int, int]], cut: int) -> None:
    data = bytearray(_base(1) + _cta())
    for at, value in changes:
        data[at] = value
    try:
        e = edid.decode(bytes(data[: len(data) - cut]))
    except edid.EdidError:
        return
    e.to_json()
    _ = [d.refusal for d in e.all_detailed] + [d.name for d in e.all_detailed]


@settings(max_examples=200, deadline=None)
@given(st.text(alphabet="0123456789abcdefABCDEFxX ,;:{}/*\n\t", max_size=400))
def test_random_hex_text_never_crashes(text: str) -> None:
    try:
        edid.read(text.encode())
    except edid.EdidError:
        pass


@pytest.mark.parametrize(("block", "at", "value", "expected"), [
    # section 3.10.3.3: range limits byte 4 bits 7-4 are reserved, 0
    (0, 0x5A + 4, 0x10, "base block, descriptor 3: range limits: reserved bits of byte 4 are "
                        "set (10h)"),
    # section 3.10.3: a display descriptor's byte 2 is reserved, 00h
    (0, 0x6C + 2, 0x01, "base block, descriptor 4: reserved bytes 2 or 4 of a display "
                        "descriptor are not 00h"),
    # section 3.4.1: bit 15 of the manufacturer ID is reserved, 0
    (0, 0x08, 0x84, "manufacturer ID: reserved bit 15 of bytes 08h-09h is set"),
    # CTA-861 section 7.5.1: short video descriptor code 0 is reserved
    (1, 7, 0x00, "CTA block 1: reserved short video descriptor codes [0]"),
])  # fmt: skip
def test_reserved_bits_are_reported(block: int, at: int, value: int, expected: str) -> None:
    blocks = [_base(1), _cta()]
    blocks[block][at] = value
    e = edid.decode(bytes(_checksummed(blocks[0]) + _checksummed(blocks[1])))
    assert e.problems == (expected,)
