"""A timing judged against an EDID: listed, inside the range limits, too fast."""

from __future__ import annotations

from dataclasses import replace
from fractions import Fraction

from synccore.spec import Axis, Spec
from synccore.timings import edid, edid_accept, edid_write, modes


def _spec(query: str) -> Spec:
    m = modes.find(query)
    return Spec(name="t", pixel_clock_hz=m.pixel_clock_hz, horizontal=m.horizontal,
                vertical=m.vertical)  # fmt: skip


def _sink() -> edid.Edid:
    # Range limits derived from 640x480@60 and 1280x720@60: 59-60 Hz, 31-45 kHz, 80 MHz.
    return edid.decode(edid_write.build([_spec("1280x720@60 cta"), _spec("DMT 04h")], cta=True))


def _judge(s: Spec) -> edid_accept.Verdict:
    return edid_accept.judge(_sink(), s.pixel_clock_hz, s.horizontal, s.vertical)


def test_a_listed_timing_is_accepted() -> None:
    v = _judge(_spec("DMT 04h"))
    assert v.accepted
    assert v.findings[0].startswith("listed: it is the EDID's detailed timing 640x480")


def test_a_listed_vic_is_named() -> None:
    s = _spec("1280x720@60 cta")
    e = edid.decode(edid_write.build([_spec("DMT 04h")], cta=True))
    e = replace(e, cta=(edid.CtaBlock(1, 3, 0, (edid.ShortVideo(4, False, ""),), ()),))
    v = edid_accept.judge(e, s.pixel_clock_hz, s.horizontal, s.vertical)
    assert v.findings[0].startswith("listed: the EDID lists VIC 4")


def test_unlisted_inside_the_limits_is_accepted() -> None:
    s = _spec("DMT 04h")
    # 640x480 with 2 more lines of back porch: 59.72 Hz, 31.47 kHz: inside 59-60 Hz, 31-45 kHz.
    v = edid_accept.judge(_sink(), s.pixel_clock_hz, s.horizontal,
                          Axis(480, 10, 2, 35, "negative"))  # fmt: skip
    assert v.accepted
    assert v.findings[0] == "not one of the timings the EDID lists"


def test_too_fast_is_refused_with_the_reason() -> None:
    v = _judge(_spec("1920x1080@60 cta"))
    assert not v.accepted
    assert "pixel clock 148.500 MHz is above the declared maximum 80 MHz" in v.findings
    assert v.findings[-1] == "refused: too fast for the display's maximum pixel clock"


def test_outside_the_refresh_range_is_refused() -> None:
    s = _spec("DMT 04h")
    v = edid_accept.judge(_sink(), Fraction(31_500_000), s.horizontal, s.vertical)  # 75 Hz
    assert not v.accepted
    assert v.findings[-1] == "refused: not listed and outside the range limits"
