"""Several modes from one board clock: one PLL output with ce divides, or a setting per mode.

Check values come from the standards (VESA DMT 1.0 rev. 13 and CTA-861's table of video
formats, figures from memory, the same as the library's entries cite) and from arithmetic done
here by hand, never from the planner; PLL settings
are checked against the vendors' formulas and limits typed in again in test_solve.py.
"""

from __future__ import annotations

import functools
import math
from fractions import Fraction

import pytest

from synccore import ModesPlan, Spec, ToolError, loads, plan_modes
from synccore.clocking import FAMILY_KEYS
from synccore.clocking.modes import RECONFIGURATION
from synccore.clocking.solve import Setting
from tests.clocking.test_solve import DOCUMENTED, documented_frequencies, within

MHZ = 10**6
TOL = Fraction(5, 1000)  # ±0.5 % on the pixel clock, VESA DMT (from memory)


def spec(name: str, mhz: str, h: tuple[int, int, int, int], v: tuple[int, int, int, int],
         pol: str, *, ce: bool = True) -> Spec:  # fmt: skip
    return loads(
        f"name: {name}\npixel_clock_hz: {mhz} MHz\n"
        f"horizontal: {{active: {h[0]}, front_porch: {h[1]}, sync: {h[2]}, back_porch: {h[3]}, "
        f"sync_polarity: {pol}}}\n"
        f"vertical: {{active: {v[0]}, front_porch: {v[1]}, sync: {v[2]}, back_porch: {v[3]}, "
        f"sync_polarity: {pol}}}\ncore: {{clock_enable: {str(ce).lower()}}}\n",
        source=f"{name}.yaml",
    )


# VESA DMT 1.0 rev. 13 (from memory): 04h 640x480@60 25.175 MHz 640/656/752/800 480/490/492/525 -/-;
# 09h 800x600@60 40.000 MHz 800/840/968/1056 600/601/605/628 +/+;
# 10h 1024x768@60 65.000 MHz 1024/1048/1184/1344 768/771/777/806 -/-.
VGA = spec("vga", "25.175", (640, 16, 96, 48), (480, 10, 2, 33), "negative")
SVGA = spec("svga", "40", (800, 40, 128, 88), (600, 1, 4, 23), "positive")
XGA = spec("xga", "65", (1024, 24, 136, 160), (768, 3, 6, 29), "negative")
# CTA-861 video formats (from memory): VIC 4 1280x720@60 74.25 MHz 1280/1390/1430/1650
# 720/725/730/750 +/+; VIC 16 1920x1080@60 148.5 MHz 1920/2008/2052/2200 1080/1084/1089/1125
# +/+; VIC 19 1280x720@50 74.25 MHz 1280/1720/1760/1980 720/725/730/750 +/+.
HD720 = spec("hd720", "74.25", (1280, 110, 40, 220), (720, 5, 5, 20), "positive", ce=False)
HD1080 = spec("hd1080", "148.5", (1920, 88, 44, 148), (1080, 4, 5, 36), "positive", ce=False)
HD720_50 = spec("hd720_50", "74.25", (1280, 440, 40, 220), (720, 5, 5, 20), "positive")

PLL_FAMILIES = [k for k in FAMILY_KEYS if k in DOCUMENTED]


def check_documented(s: Setting, f_in: Fraction) -> Fraction:
    """The setting's output by the vendor's formula, every frequency inside the documented limits."""
    doc = DOCUMENTED[s.family.key]
    pfd, vco, out = documented_frequencies(s.family.key, f_in, s.input_ratio, s.multiplier,
                                           s.output_ratio)  # fmt: skip
    assert within(f_in, doc["fin"]) and within(pfd, doc["pfd"])
    assert within(vco, doc["vco"]) and within(out, doc["out"])
    assert s.input_ratio in doc["D"] and s.multiplier in doc["M"] and s.output_ratio in doc["O"]
    return out


def check_serves(plan: ModesPlan) -> None:
    """Each mode's F / d within ±0.5 % of its pixel clock, by hand (pixels_per_clock is 1)."""
    shared = plan.shared
    assert shared is not None
    for s, d in zip(plan.specs, shared.divides, strict=True):
        assert abs(shared.f_clock / d - s.pixel_clock_hz) <= TOL * s.pixel_clock_hz


# ------------------------------------------------------- 720p and 1080p share one


@pytest.mark.parametrize("key", PLL_FAMILIES)
def test_720p_and_1080p_share_148_5_mhz_from_27_mhz(key: str) -> None:
    # 148.5 / 2 = 74.25 exactly (CTA-861 VIC 16 and VIC 4).  From 27 MHz, 148.5 = 27 x 11 / 2:
    # iCE40 27 x 22 / (1 x 4) (VCO 594); ECP5 27 x 11 / 2 (PFD 13.5); 7 series 27 x 33 / 6
    # (VCO 891); Gowin 27 x 11 / 2; Cyclone 27 x 44 / 8 (VCO 1188).  Exact, so the first
    # multiple (1 x 148.5 MHz) serves with divides 2 and 1.
    plan = plan_modes([HD720, HD1080], "27 MHz", key)
    assert plan.verdict == "common"
    shared = plan.shared
    assert shared is not None and shared.setting is not None
    assert shared.f_clock == Fraction("148.5") * MHZ
    assert check_documented(shared.setting, Fraction(27 * MHZ)) == shared.f_clock
    assert shared.divides == (2, 1)
    check_serves(plan)
    assert [s.name for s in plan.needs_clock_enable] == ["hd720"]  # divided by 2, no ce input


def test_ice40_setting_for_148_5_from_27_by_hand() -> None:
    # TN1251 (from memory): f_out = f_in x (DIVF + 1) / ((DIVR + 1) x 2**DIVQ).  PFD >= 10 MHz
    # allows DIVR + 1 of 1 or 2; 148.5 x 8 = 1188 MHz is above the 1066 MHz VCO, so DIVQ = 2
    # and VCO 594 MHz, reached with DIVR + 1 = 1 (the smaller divider on the tie) and DIVF + 1 = 22.
    plan = plan_modes([HD720, HD1080], "27MHz", "ice40")
    assert plan.shared is not None and plan.shared.setting is not None
    assert plan.shared.setting.counters() == {"DIVR": 0, "DIVF": 21, "DIVQ": 2}


# ------------------------------------------------------------ one pixel clock


def test_same_pixel_clock_one_setting_trivially() -> None:
    # 720p60 and 720p50 (CTA-861 VIC 4, VIC 19) both run at 74.25 MHz; from 27 MHz on iCE40
    # 27 x 22 / 8 = 74.25 exactly: the one plan's setting serves both undivided.
    plan = plan_modes([HD720, HD720_50], "27MHz", "ice40")
    assert plan.same_clock and plan.verdict == "common"
    assert plan.shared is not None and plan.shared.divides == (1, 1)
    assert plan.shared.setting == plan.plans[0].best
    assert plan.shared.f_clock == Fraction("74.25") * MHZ


def test_same_pixel_clock_missed_alone_served_divided() -> None:
    # From 12 MHz on iCE40 (DIVR + 1 = 1, since PFD >= 10 MHz; VCO = 12 x M in 533..1066, so
    # M = 45..88): 74.25 x 8 / 12 = 49.5, so 73.5 (-1.01 %) or 75 (+1.01 %), equally far;
    # the higher VCO (600 MHz, Xilinx UG949's advice the solver follows) gives 75: missed.
    # 2 x 74.25 = 148.5: out = 3 x M (q = 2) needs M = 49.5: 147 or 150, missed (q = 1 puts
    # the VCO below 533 MHz); 3 x 74.25 = 222.75: 3 x 74 = 222 (VCO 888), 222 / 3 = 74.0,
    # -0.337 %: within.
    plan = plan_modes([HD720, HD720_50], "12MHz", "ice40")
    assert not plan.plans[0].within_tolerance
    assert plan.plans[0].best is not None and plan.plans[0].best.f_out == 75 * MHZ
    assert plan.verdict == "common" and plan.shared is not None
    assert plan.shared.f_clock == 222 * MHZ and plan.shared.divides == (3, 3)
    assert plan.shared.setting is not None
    assert check_documented(plan.shared.setting, Fraction(12 * MHZ)) == 222 * MHZ
    check_serves(plan)


# ------------------------------------------------------- 640x480, 800x600, 1024x768


def joint_bands(targets: list[Fraction], limit: Fraction) -> list[tuple[Fraction, Fraction]]:
    """Every interval of F <= limit where each target is F / d (whole d) within ±0.5 %.

    Pure arithmetic over the divides, no PLL: for each divide of the first target, the
    intersection with the bands of the others.
    """
    bands: list[tuple[Fraction, Fraction]] = []
    first, *rest = targets
    for d in range(1, int(limit / (first * (1 - TOL))) + 1):
        low, high = d * first * (1 - TOL), min(d * first * (1 + TOL), limit)
        for t in rest:
            ds = range(max(1, math.floor(low / (t * (1 + TOL)))),
                       math.ceil(high / (t * (1 - TOL))) + 1)
            fits = [(max(low, e * t * (1 - TOL)), min(high, e * t * (1 + TOL))) for e in ds]
            fits = [(a, b) for a, b in fits if a <= b]
            if not fits:
                break
            (low, high), = fits  # bands of ±0.5 % around multiples of >= 25 MHz never overlap twice
        else:
            bands.append((low, high))
    return bands


DMT_MHZ = [Fraction("65"), Fraction("40"), Fraction("25.175")]


def test_no_clock_up_to_800_mhz_serves_all_three_dmt_modes() -> None:
    # 65 and 40 MHz meet only near 520 MHz (65 x 8 = 40 x 13) and 717 MHz (65 x 11 ~ 40 x 18);
    # 25.175 MHz misses both: 520 / 25.175 = 20.66, 717 / 25.175 = 28.5.
    assert joint_bands([f * MHZ for f in DMT_MHZ], Fraction(800 * MHZ)) == []
    two = joint_bands([f * MHZ for f in DMT_MHZ[:2]], Fraction(800 * MHZ))
    assert two == [(65 * 8 * (1 - TOL) * MHZ, 40 * 13 * (1 + TOL) * MHZ),  # 517.4 .. 522.6
                   (40 * 18 * (1 - TOL) * MHZ, 65 * 11 * (1 + TOL) * MHZ)]  # 716.4 .. 718.575


@pytest.mark.parametrize("board", ["12MHz", "100MHz"])
@pytest.mark.parametrize("key", PLL_FAMILIES)
def test_three_dmt_modes_need_a_setting_each(key: str, board: str) -> None:
    # Every family's output ends at or below 800 MHz, so by the arithmetic above no shared
    # output exists; each mode then has its own route: a setting within tolerance, or one
    # output with a ce divide serving it alone, both checked by hand here.
    plan = plan_modes([VGA, SVGA, XGA], board, key)
    assert plan.shared is None
    f_in = Fraction(board.removesuffix("MHz")) * MHZ
    if not within(f_in, DOCUMENTED[key]["fin"]):
        assert plan.verdict == "outside" and len(plan.outside) == 3
        return
    assert plan.verdict == "reconfigure"
    for i, s in enumerate(plan.specs):
        setting, route = plan.own_setting(i), plan.own(i)
        if setting is None or route is None:
            assert plan.plans[i] in plan.outside
            continue
        out = check_documented(setting, f_in)
        divide = getattr(route, "divide", 1)
        assert divide == 1 or plan.alone[i] is not None
        assert abs(out / divide - s.pixel_clock_hz) <= TOL * s.pixel_clock_hz or \
            plan.plans[i] in plan.outside


def test_ice40_from_12_mhz_by_hand() -> None:
    # iCE40 from 12 MHz: out = 12 x M / 2**q with M = 45..88 (VCO 533..1066 MHz).
    # 25.175: q = 5, M = 67: 804 / 32 = 25.125 (-0.199 %), within.
    # 40: q = 4, M = 53: 39.75 (-0.625 %) or 54: 40.5: the plan misses; 2 x 40 = 80 needs
    # M = 53.3 (q = 3): 79.5, missed too; 3 x 40 = 120 = 12 x 80 / 8 exactly: ce every 3.
    # 65: q = 4, M = 87: 1044 / 16 = 65.25 (+0.385 %), within.
    plan = plan_modes([VGA, SVGA, XGA], "12MHz", "ice40")
    reached = [p.best.f_out if p.best else None for p in plan.plans]
    assert reached == [Fraction("25.125") * MHZ, Fraction("39.75") * MHZ, Fraction("65.25") * MHZ]
    assert [p.within_tolerance for p in plan.plans] == [True, False, True]
    alone = plan.alone[1]
    assert alone is not None and alone.f_clock == 120 * MHZ and alone.divides == (3,)
    assert plan.verdict == "reconfigure" and plan.outside == ()


def test_clock_enable_route_from_100_mhz_by_hand() -> None:
    # 100 / 4 = 25.0 (-0.695 %), 100 / 3 = 33.3 (-16.7 %), 100 / 2 = 50 (-23.1 %): the
    # board clock serves none of them; no PLL to reconfigure.
    plan = plan_modes([VGA, SVGA, XGA], 100 * MHZ, None)
    assert [p.enable.divide for p in plan.plans if p.enable] == [4, 3, 2]
    assert plan.verdict == "outside" and plan.shared is None and len(plan.outside) == 3


def test_clock_enable_route_serves_when_every_divide_does() -> None:
    # 148.5 MHz board: 148.5 / 2 = 74.25 and 148.5 / 1 (CTA-861 VIC 4 and 16): exact.
    plan = plan_modes([HD720, HD1080], "148.5MHz", None)
    assert plan.verdict == "common" and plan.shared is not None
    assert plan.shared.setting is None and plan.shared.divides == (2, 1)


# ------------------------------------------------------------- 800x600 with 1024x768


def test_800x600_and_1024x768_share_520_mhz_on_the_7_series() -> None:
    # 65 x 8 = 40 x 13 = 520 MHz; lower multiples of 65 have no joint band (see
    # joint_bands).  MMCM from 100 MHz: 100 / 5 x 52 = 1040 MHz VCO, / 2 = 520 exactly.
    plan = plan_modes([SVGA, XGA], "100MHz", "xc7-mmcm")
    assert plan.verdict == "common" and plan.shared is not None
    assert plan.shared.f_clock == 520 * MHZ and plan.shared.divides == (13, 8)
    check_serves(plan)


@pytest.mark.parametrize("key", ["ice40", "ecp5", "cyclone"])
def test_800x600_and_1024x768_beyond_the_output_limit(key: str) -> None:
    # The first joint band starts at 517.4 MHz, above these outputs' limits (275, 400,
    # 402.5 MHz: test_solve.DOCUMENTED).
    assert float(DOCUMENTED[key]["out"][1]) < 517.4
    assert plan_modes([SVGA, XGA], "100MHz", key).shared is None


def test_max_core_clock_bounds_the_search() -> None:
    # Below 517.4 MHz there is no joint band, so a 500 MHz bound leaves a setting per mode.
    plan = plan_modes([SVGA, XGA], "100MHz", "xc7-mmcm", max_core_clock_hz="500MHz")
    assert plan.shared is None and plan.verdict == "reconfigure"
    assert plan.max_core_clock == 500 * MHZ


# --------------------------------------------------------------- brute force


@functools.cache
def documented_outputs(key: str, f_in: Fraction) -> frozenset[Fraction]:
    """Every output frequency a documented setting of ``key`` reaches from ``f_in``."""
    doc = DOCUMENTED[key]
    outs = set()
    if not within(f_in, doc["fin"]):
        return frozenset()
    for d in doc["D"]:
        if not within(f_in / d, doc["pfd"]):
            continue
        for m in doc["M"]:
            for o in doc["O"]:
                _, vco, out = documented_frequencies(key, f_in, Fraction(d), Fraction(m),
                                                     Fraction(o))  # fmt: skip
                if within(vco, doc["vco"]) and within(out, doc["out"]):
                    outs.add(out)
    return frozenset(outs)


def brute_force(key: str, f_in: Fraction, targets: list[Fraction]) -> list[Fraction]:
    """Every documented output that serves all targets (F / d within ±0.5 % for a whole d)."""
    return sorted(f for f in documented_outputs(key, f_in) if all(
        any(abs(f / e - t) <= TOL * t for e in (max(1, math.floor(f / t)), math.ceil(f / t)))
        for t in targets))  # fmt: skip


@pytest.mark.parametrize("key", ["ice40", "gowin", "xc7-pll"])
@pytest.mark.parametrize("modes", [(HD720, HD1080), (SVGA, XGA), (VGA, SVGA), (HD720, HD720_50)])
@pytest.mark.parametrize("board", [12, 27, 100])
def test_search_against_brute_force(key: str, modes: tuple[Spec, ...], board: int) -> None:
    """The lowest multiple of the fastest clock that a serving output lies near, and the
    best worst error there, as a brute force over every documented setting finds them."""
    f_in = Fraction(board * MHZ)
    targets = [s.pixel_clock_hz for s in modes]
    serving = brute_force(key, f_in, targets)
    plan = plan_modes(list(modes), f_in, key)
    if not serving:
        assert plan.shared is None
        return
    assert plan.shared is not None and plan.shared.f_clock in serving
    top = max(targets)

    def multiple(f: Fraction) -> int:
        return round(f / top)

    first = min(multiple(f) for f in serving)
    assert multiple(plan.shared.f_clock) == first

    def worst(f: Fraction) -> Fraction:
        return max(min(abs(f / e - t) / t for e in (max(1, math.floor(f / t)), math.ceil(f / t)))
                   for t in targets) / TOL  # fmt: skip

    assert plan.shared.worst == min(worst(f) for f in serving if multiple(f) == first)


# ------------------------------------------------------------------- inputs


def test_bad_inputs() -> None:
    with pytest.raises(TypeError, match="sequence of Spec"):
        plan_modes(VGA, "12MHz", "ice40")  # type: ignore[arg-type]
    with pytest.raises(TypeError, match="non-empty"):
        plan_modes([], "12MHz", "ice40")
    with pytest.raises(ToolError) as err:
        plan_modes([VGA], "twelve", "ice40")
    assert err.value.subject == "board_clock_hz"
    with pytest.raises(ToolError) as err:
        plan_modes([VGA], "12MHz", "ice41")
    assert err.value.subject == "family" and "choose from ice40" in str(err.value)
    with pytest.raises(ToolError) as err:
        plan_modes([VGA], "12MHz", None, max_core_clock_hz="100MHz")
    assert err.value.subject == "max_core_clock_hz"
    with pytest.raises(ToolError) as err:
        plan_modes([VGA, XGA], "12MHz", "ice40", max_core_clock_hz="60MHz")
    assert str(err.value) == ("max_core_clock_hz: must be at least the fastest mode's core "
                              "clock, 65.000 MHz (xga), got 60.000 MHz")


def test_reconfiguration_notes_name_every_family_and_a_document() -> None:
    assert tuple(RECONFIGURATION) == FAMILY_KEYS
    for text in RECONFIGURATION.values():
        assert text.startswith("from memory") and " see " in text
