"""The designer's choices and every figure it reports, held against an independent numpy solve."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

import numpy as np
import pytest

from synccore.analog import DacOptions, DesignError, as_json, design
from tests.analog import nodal

# VESA Video Signal Standard (VSIS) 1.0: 0.700 V reference white into 75 ohm (from memory).
VIDEO_V = 0.7
BITS_332 = {"red": 3, "green": 3, "blue": 2}


def _edges(ch: dict[str, Any], topology: str, load: float, pin: float) -> list[tuple[str, str, float]]:
    if topology == "weighted":
        return nodal.weighted_edges(ch["resistors_ohm"], load, pin)
    parts = {b["name"]: b["ohm"] for b in ch["branches"]}
    return nodal.ladder_edges(parts["termination"], parts.get("ladder0", 1.0), ch["bits"], load, pin)


def _check_figures(ch: dict[str, Any], topology: str, io: float, load: float, pin: float) -> None:
    """Every number of one channel of the JSON, recomputed from its resistors alone."""
    n = ch["bits"]
    edges = _edges(ch, topology, load, pin)
    volts = [nodal.solve(edges, {f"p{i}": io * (c >> i & 1) for i in range(n)}) for c in range(2**n)]
    levels = np.array([v["out"] for v in volts])
    np.testing.assert_allclose(ch["levels_v"], levels, rtol=1e-9, atol=1e-12)
    lsb = (levels[-1] - levels[0]) / (2**n - 1)  # endpoint LSB
    np.testing.assert_allclose(ch["dnl_lsb"], np.diff(levels) / lsb - 1, atol=1e-9)
    np.testing.assert_allclose(ch["inl_lsb"], (levels - levels[0] - np.arange(2**n) * lsb) / lsb, atol=1e-9)
    assert ch["monotonic"] == bool(np.all(np.diff(levels) > 0))
    assert ch["full_scale_error"] == pytest.approx(levels[-1] / VIDEO_V - 1, abs=1e-12)
    pin_edges = [(a, b, r) for a, b, r in edges if a.startswith("p")]
    worst = [max(abs(v[a] - v[b]) / r for v in volts) for a, b, r in pin_edges]
    np.testing.assert_allclose(ch["pin_current_a"], worst, rtol=1e-9)
    sourced = max(sum(max(0.0, (v[a] - v[b]) / r) for a, b, r in pin_edges) for v in volts)
    assert ch["bank_current_a"] == pytest.approx(sourced, rel=1e-9)
    load_power = max(v["out"] ** 2 / load for v in volts)
    assert ch["power_w"]["load"] == pytest.approx(load_power, rel=1e-9)


def test_done_criterion_332_at_3v3_e24() -> None:
    """The issue's bar: 3-3-2 at 3.3 V, E24, 0.7 V into 75 ohm within 2 %, monotonic, |DNL| < 0.5."""
    d = design(BITS_332, DacOptions(io_v=Fraction(33, 10)))
    data = as_json(d)
    assert data["meets"] and not data["problems"]
    for name, ch in data["channels"].items():
        assert abs(ch["full_scale_v"] - VIDEO_V) <= 0.02 * VIDEO_V, name
        assert ch["monotonic"] and max(abs(x) for x in ch["dnl_lsb"]) < 0.5, name
        assert all(_in_e24(r) for r in ch["resistors_ohm"]), ch["resistors_ohm"]
        _check_figures(ch, "weighted", 3.3, 75.0, 0.0)
        for runner in ch["runners_up"]:
            _check_figures(runner, "weighted", 3.3, 75.0, 0.0)


def _in_e24(r: float) -> bool:
    from tests.analog.test_eseries import IEC_E24

    while r >= 10:
        r /= 10
    return any(abs(r - e) < 1e-9 for e in IEC_E24)


@pytest.mark.parametrize(("topology", "series", "io", "pin"), [
    ("weighted", "E48", 2.5, 0.0), ("weighted", "E96", 1.8, 20.0), ("r2r", "E24", 3.3, 0.0),
    ("r2r", "E96", 3.3, 25.0), ("weighted", "E24", 3.3, 30.0),
])  # fmt: skip
def test_figures_for_other_settings(topology: str, series: str, io: float, pin: float) -> None:
    opts = DacOptions(io_v=Fraction(str(io)), series=series, topology=topology, pin_ohm=Fraction(str(pin)))
    data = as_json(design({"red": 4, "green": 4, "blue": 4}, opts))
    for ch in data["channels"].values():
        _check_figures(ch, topology, io, 75.0, pin)
        assert abs(ch["full_scale_error"]) <= 0.02


def test_finer_series_are_no_worse_at_full_scale() -> None:
    errors = {s: abs(design({"red": 3}, DacOptions(io_v=Fraction(33, 10), series=s)).channels["red"]
                     .best.full_scale_error) for s in ("E24", "E96")}  # fmt: skip
    assert errors["E96"] <= errors["E24"]


def test_weighted_network_is_exactly_linear_with_ideal_values() -> None:
    """With ideal (unrounded) values the weighted network has no DNL into any load (superposition)."""
    from synccore.analog import analyse, weighted

    r = Fraction(1950)
    net = weighted([r, r / 2, r / 4], Fraction(75), Fraction(0))
    ch = analyse("red", net, DacOptions(io_v=Fraction(33, 10)))
    assert ch.worst_dnl == 0 and ch.worst_inl == 0


def test_pin_limit_is_judged() -> None:
    d = design(BITS_332, DacOptions(io_v=Fraction(33, 10), pin_current_a=Fraction(4, 1000)))
    assert any("pin limit" in p for p in d.problems)
    d = design(BITS_332, DacOptions(io_v=Fraction(33, 10), bank_current_a=Fraction(20, 1000)))
    assert any(p.startswith("bank:") for p in d.problems)


@pytest.mark.parametrize(("opts", "says"), [
    (DacOptions(io_v=Fraction(6, 10)), "use a higher bank voltage"),
    (DacOptions(io_v=Fraction(8, 10), topology="r2r"), "reaches at most 0.700 V"),
    (DacOptions(io_v=Fraction(33, 10), pin_ohm=Fraction(5000)), "output resistance"),
])  # fmt: skip
def test_impossible_settings_are_refused(opts: DacOptions, says: str) -> None:
    with pytest.raises(DesignError, match=says):
        design({"red": 3}, opts)


def test_the_api_page_example_runs(capsys: pytest.CaptureFixture[str]) -> None:
    """docs/api.md's design_dac example, run as it stands from the repository root."""
    import os
    import re

    from tests.conftest import ROOT

    (code,) = re.findall(r"^```python3\n(.*?)^```$", (ROOT / "docs" / "api.md").read_text(encoding="utf-8"),
                         re.M | re.S)  # fmt: skip
    here = os.getcwd()
    os.chdir(ROOT)
    try:
        exec(compile(code, "docs/api.md", "exec"), {})
    finally:
        os.chdir(here)
    out = capsys.readouterr().out.splitlines()
    assert out[0] == "red [2000.0, 1000.0, 470.0] 0.7058122517248588 True" and out[-1] == "[]"
