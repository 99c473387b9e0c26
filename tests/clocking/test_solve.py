"""Clock planning: solver results against the vendors' published formulas and limits.

The limits below are typed in again from the vendors' documents, separately
from synccore/clocking/families.py, so that a slip in either shows up.
Figures marked "from memory" were recalled, not read from the document.
"""

from __future__ import annotations

import math
from fractions import Fraction

import pytest

from synccore.clocking import FAMILIES, MONITOR_TOLERANCE, solve, solve_enable

MHZ = 10**6

BOARD_CLOCKS_MHZ = ("12", "25", "27", "50", "100")
# Pixel clocks of common modes, VESA DMT as reproduced in the Linux kernel's
# drm_dmt_modes[] (drivers/gpu/drm/drm_edid.c): 640x480@60 25.175 MHz (04h),
# 800x600@60 40.000 (09h), 1024x768@60 65.000 (10h), 1280x720@60 74.250 (55h),
# 1280x1024@60 108.000 (23h), 1920x1080@60 148.500 (52h); 1280x800@60 reduced
# blanking 71.000 (1Bh).
PIXEL_CLOCKS_MHZ = ("25.175", "40", "65", "71", "74.25", "108", "148.5")


def mhz(text: str) -> Fraction:
    return Fraction(text) * MHZ


# family: input, PFD, VCO and output ranges in MHz (None: no bound stated), and
# the legal ratio sets of the input divider D, multiplier M and output divider O.
DOCUMENTED = {
    # Lattice DS1040 v3.4, sysCLOCK PLL Timing (f_IN, f_OUT, f_VCO, f_PFD) and sysCLOCK
    # PLLs ("output divider ... 1 to 6"); DIVR/DIVF widths of the SB_PLL40_CORE declaration
    "ice40": dict(fin=("10", "133"), pfd=("10", "133"), vco=("533", "1066"), out=("16", "275"),
                  D=range(1, 17), M=range(1, 129), O=[2, 4, 8, 16, 32, 64], feedback="vco"),
    # Lattice FPGA-TN-02200 (TN1263) / DS1044, ECP5 EHXPLLL: input, PFD, VCO, output
    # and divider ranges as quoted from the data sheet's sysCLOCK PLL timing table
    "ecp5": dict(fin=("8", "400"), pfd=("10", "400"), vco=("400", "800"), out=("3.125", "400"),
                 D=range(1, 129), M=range(1, 129), O=range(1, 129), feedback="output"),
    # Xilinx UG472 attribute ranges, as in Xilinx's unisim models MMCME2_ADV.v /
    # PLLE2_ADV.v; input, PFD and VCO ranges of DS181 v1.27 tables 37-38 (-1), as
    # quoted; output ranges from memory
    "xc7-mmcm": dict(fin=("10", "800"), pfd=("10", "450"), vco=("600", "1200"),
                     out=("4.69", "800"), D=range(1, 107),
                     M=[Fraction(n, 8) for n in range(16, 513)],
                     O=[Fraction(1)] + [Fraction(n, 8) for n in range(16, 1025)], feedback="vco"),
    "xc7-pll": dict(fin=("19", "800"), pfd=("19", "450"), vco=("800", "1600"), out=("6.25", "800"),
                    D=range(1, 57), M=range(2, 65), O=range(1, 129), feedback="vco"),
    # Gowin rPLL divider ranges from Gowin's primitive declaration (as in Yosys
    # techlibs/gowin/cells_sim.v); GW1NR-9 C6/I5 limits of DS117 table 4-21, as quoted
    "gowin": dict(fin=("3", "400"), pfd=("3", "400"), vco=("400", "1200"), out=("3.125", "600"),
                  D=range(1, 65), M=range(1, 65),
                  O=[2, 4, 8, 16, 32, 48, 64, 80, 96, 112, 128], feedback="output"),
    # Intel Cyclone IV handbook vol. 1 ch. 5 (counters 1-512) and vol. 3 table 1-25
    # (PFD 5-325, VCO 600-1300 MHz, as quoted); Cyclone 10 LP Device Datasheet, PLL
    # Specifications: PFD 5-325, VCO 600-1300 MHz, -C8 input up to 472.5 MHz; the
    # C8 limit of 402.5 MHz used on input and output is from memory
    "cyclone": dict(fin=("5", "402.5"), pfd=("5", "325"), vco=("600", "1300"),
                    out=(None, "402.5"), D=range(1, 513), M=range(1, 513), O=range(1, 513),
                    feedback="vco"),
}  # fmt: skip


def within(f: Fraction, bounds: tuple[str | None, str | None]) -> bool:
    low, high = bounds
    return (low is None or f >= mhz(low)) and (high is None or f <= mhz(high))


def documented_frequencies(key: str, f_in: Fraction, d: Fraction, m: Fraction, o: Fraction
                           ) -> tuple[Fraction, Fraction, Fraction]:  # fmt: skip
    """(PFD, VCO, output) by the vendor's formula for the family's feedback path."""
    pfd = f_in / d
    if DOCUMENTED[key]["feedback"] == "vco":
        vco = pfd * m
        return pfd, vco, vco / o
    out = pfd * m
    return pfd, out * o, out


GRID = [(k, b, p) for k in DOCUMENTED for b in BOARD_CLOCKS_MHZ for p in PIXEL_CLOCKS_MHZ]


@pytest.mark.parametrize("key", list(DOCUMENTED))
def test_every_grid_result_obeys_the_documented_formula_and_limits(key: str) -> None:
    doc = DOCUMENTED[key]
    fam = FAMILIES[key]
    solved = 0
    for board in BOARD_CLOCKS_MHZ:
        f_in = mhz(board)
        for pixel in PIXEL_CLOCKS_MHZ:
            target = mhz(pixel)
            settings = solve(fam, f_in, target, count=4)
            if not within(f_in, doc["fin"]):
                assert settings == [], (key, board)
                continue
            for s in settings:
                pfd, vco, out = documented_frequencies(
                    key, f_in, s.input_ratio, s.multiplier, s.output_ratio
                )
                assert s.input_ratio in doc["D"] and s.multiplier in doc["M"]
                assert s.output_ratio in doc["O"]
                assert (s.f_pfd, s.f_vco, s.f_out) == (pfd, vco, out)
                assert within(pfd, doc["pfd"]) and within(vco, doc["vco"])
                assert within(out, doc["out"])
                assert s.ppm == (out - target) / target * 10**6
            if settings:
                solved += 1
                errors = [abs(s.f_out - target) for s in settings]
                assert errors == sorted(errors)
                assert len({s.f_out for s in settings}) == len(settings)
    assert solved > 0


def test_vendor_parameter_encodings() -> None:
    """The values written into the primitives, per the vendors' encodings."""
    # iCE40 (TN1251, from memory): DIVR = D - 1, DIVF = M - 1, DIVQ = log2(O).
    s = solve(FAMILIES["ice40"], mhz("12"), mhz("25.175"))[0]
    p = s.parameters()
    assert p["DIVR"] == s.input_ratio - 1 and p["DIVF"] == s.multiplier - 1
    assert 2 ** p["DIVQ"] == s.output_ratio
    # FILTER_RANGE for a 12 MHz PFD is 1 (TN1251 table: 10-17 MHz, from memory)
    assert s.f_pfd == mhz("12") and p["FILTER_RANGE"] == 1
    # Gowin rPLL declaration ("0:1, 1:2 ... 63:64"): IDIV_SEL = D - 1, FBDIV_SEL = M - 1;
    # ODIV_SEL = O ("2/4/8/16/32/48/64/80/96/112/128").
    g = solve(FAMILIES["gowin"], mhz("27"), mhz("74.25"))[0]
    q = g.parameters()
    assert (q["IDIV_SEL"] + 1, q["FBDIV_SEL"] + 1, q["ODIV_SEL"]) == (
        g.input_ratio, g.multiplier, g.output_ratio)  # fmt: skip
    # ALTPLL takes the reduced ratio f_out / f_in as clk0_multiply_by / clk0_divide_by.
    c = solve(FAMILIES["cyclone"], mhz("50"), mhz("65"))[0]
    r = c.parameters()
    assert Fraction(r["clk0_multiply_by"], r["clk0_divide_by"]) == c.f_out / mhz("50")
    assert math.gcd(r["clk0_multiply_by"], r["clk0_divide_by"]) == 1


def _exhaustive_best(key: str, f_in: int, target: int) -> Fraction | None:
    """Smallest |error| over every legal setting, by brute force with integer arithmetic."""
    doc = DOCUMENTED[key]
    lo = {k: mhz(doc[k][0]) if doc[k][0] else Fraction(0) for k in ("pfd", "vco", "out")}
    hi = {k: mhz(doc[k][1]) for k in ("pfd", "vco", "out")}
    best: Fraction | None = None
    for d in doc["D"]:
        pfd = Fraction(f_in, d)
        if not lo["pfd"] <= pfd <= hi["pfd"]:
            continue
        for m in doc["M"]:
            if doc["feedback"] == "vco":
                vco = pfd * m
                if not lo["vco"] <= vco <= hi["vco"]:
                    continue
                for o in doc["O"]:
                    out = vco / o
                    if lo["out"] <= out <= hi["out"]:
                        err = abs(out - target)
                        best = err if best is None or err < best else best
            else:
                out = pfd * m
                if not lo["out"] <= out <= hi["out"]:
                    continue
                if any(lo["vco"] <= out * o <= hi["vco"] for o in doc["O"]):
                    err = abs(out - target)
                    best = err if best is None or err < best else best
    return best


EXHAUSTIVE = [("ice40", b, p) for b in BOARD_CLOCKS_MHZ for p in PIXEL_CLOCKS_MHZ]
EXHAUSTIVE += [("gowin", b, p) for b in BOARD_CLOCKS_MHZ for p in PIXEL_CLOCKS_MHZ]
EXHAUSTIVE += [("ecp5", b, p) for b in ("12", "25", "27") for p in PIXEL_CLOCKS_MHZ]
EXHAUSTIVE += [("xc7-pll", b, p) for b in ("25", "27", "50") for p in ("25.175", "74.25", "148.5")]
EXHAUSTIVE += [("cyclone", "12", p) for p in ("25.175", "74.25", "148.5")]
EXHAUSTIVE += [("xc7-mmcm", "12", p) for p in ("25.175", "65", "148.5")]  # PFD >= 10 MHz: D = 1


@pytest.mark.parametrize(("key", "board", "pixel"), EXHAUSTIVE)
def test_no_legal_setting_is_closer(key: str, board: str, pixel: str) -> None:
    f_in, target = int(mhz(board)), int(mhz(pixel))
    expected = _exhaustive_best(key, f_in, target)
    got = solve(FAMILIES[key], Fraction(f_in), Fraction(target), count=1)
    if expected is None:
        assert got == []
    else:
        assert abs(got[0].f_out - target) == expected


def test_exact_clocks_from_27_mhz() -> None:
    """74.25 MHz = 27 MHz x 11 / 4 exactly: the trade's reason for 27 MHz video oscillators."""
    for key in ("xc7-mmcm", "xc7-pll", "gowin", "cyclone"):
        best = solve(FAMILIES[key], mhz("27"), mhz("74.25"))[0]
        assert best.f_out == mhz("74.25"), key
    # ECP5 with feedback from CLKOP: the output is 27 MHz x CLKFB_DIV / CLKI_DIV, and
    # CLKI_DIV = 4 would put the PFD at 6.75 MHz, under the data sheet's 10 MHz; with
    # CLKI_DIV 1 or 2 the nearest are 27 x 5 / 2 = 67.5 and 27 x 3 = 81 MHz.
    ecp5 = solve(FAMILIES["ecp5"], mhz("27"), mhz("74.25"))[0]
    assert ecp5.f_pfd >= mhz("10") and ecp5.f_out in (mhz("67.5"), mhz("81"))


def test_640x480_at_25_000_mhz_is_0_7_percent_slow() -> None:
    """Common practice: 640x480@60 at 25.000 MHz instead of 25.175 MHz (VESA DMT) is 0.7 % slow."""
    # 100 MHz with ce every 4th cycle is exactly 25.000 MHz
    ce = solve_enable(mhz("100"), mhz("25.175"))
    assert ce.divide == 4 and ce.f_out == mhz("25")
    assert round(float(ce.error) * 100, 1) == -0.7
    assert abs(ce.error) > MONITOR_TOLERANCE  # outside the ±0.5 % of VESA DMT (from memory)


def test_monitor_tolerance_is_half_a_percent() -> None:
    # VESA DMT: ±0.5 % on the pixel clock (from memory)
    assert MONITOR_TOLERANCE == Fraction(5, 1000)


@pytest.mark.parametrize(("board", "pixel", "divide"), [
    ("100", "25.175", 4), ("50", "25.175", 2), ("100", "40", 3), ("27", "25.175", 1),
])  # fmt: skip
def test_clock_enable_division(board: str, pixel: str, divide: int) -> None:
    # the nearest whole division: 100 MHz / 3 = 33.3 MHz is nearer 40 MHz than 100 / 2 = 50
    ce = solve_enable(mhz(board), mhz(pixel))
    assert ce.divide == divide
    assert ce.f_out == mhz(board) / divide
