"""Design files and inline settings: every problem at once, located, one line each."""

from __future__ import annotations

import pytest

from synccore.analog import evaluate, inline, networks, read, realise
from synccore.errors import SpecError

BITS = {"red": 3, "green": 3, "blue": 2}


def _problems(text: str) -> list[str]:
    with pytest.raises(SpecError) as info:
        s = read("dac.yaml", text=text)
        networks(s, BITS, s.options())
    return [str(p) for p in info.value.problems]


def test_every_setting_problem_at_once() -> None:
    assert _problems("io: 5V\nload: -3\nseries: E12\ncolour: red\n") == [
        "dac.yaml:1:5: io: got '5V'; allowed: a bank voltage above 0 V and at most 3.6 V, e.g. 3.3V "
        "(never a 5 V logic output)",
        "dac.yaml:2:7: load: got -3; allowed: a resistance above 0 and at most 1M ohm, e.g. 75",
        "dac.yaml:3:9: series: got 'E12'; allowed: E24, E48, E96",
        "dac.yaml:4:9: colour: unknown setting; allowed: io, load, pin_resistance, pin_current, "
        "bank_current, "
        "series, topology, resistors",
    ]


def test_network_problems_located() -> None:
    text = "io: 3.3V\nresistors:\n  red: [2k, 1k]\n  green: [2k, x, 470]\n  cyan: [1]\n"
    assert _problems(text) == [
        "dac.yaml:3:3: resistors.blue: missing; give every channel",
        "dac.yaml:3:8: resistors.red: a list of 3 resistances, bit 0 first (the spec's colour depth gives "
        "this channel 3 bits)",
        "dac.yaml:4:15: resistors.green[1]: a resistance above 0 and at most 10M ohm, e.g. 2.2k",
        "dac.yaml:5:3: resistors.cyan: unknown channel; allowed: red, green, blue",
    ]


def test_ladder_values_and_units() -> None:
    s = read("dac.yaml", text="io: 3300mV\ntopology: r2r\nresistors:\n  red: {leg: 470R, ladder: 240}\n"
                              "  green: {leg: 470, ladder: 0.24k}\n  blue: {leg: 390, ladder: 160 ohm}\n")
    d = realise(s, BITS)
    assert [float(b.ohm) for b in d.channels["green"].best.network.branches if b.name == "ladder0"] == [240.0]
    assert not d.problems


def test_inline_settings() -> None:
    s = inline("io=2.5V, series=E96 ,topology=r2r", "--dac")
    assert s.options().series == "E96" and float(s.options().io_v) == 2.5
    with pytest.raises(SpecError) as info:
        inline("io=2.5V,series", "--dac")
    assert str(info.value) == "--dac: 'series' is not name=value; e.g. io=3.3V,series=E24"
    with pytest.raises(SpecError) as info:
        inline("io=1e400V", "--dac")
    assert "--dac io: got '1e400V'" in str(info.value)


def test_a_built_network_is_judged_not_replaced() -> None:
    s = read("dac.yaml", text="io: 3.3\nresistors:\n  red: [1k, 1k, 1k]\n  green: [2k, 1k, 470]\n"
                              "  blue: [820, 430]\n")  # fmt: skip
    d = evaluate(networks(s, BITS, s.options()) or {}, s.options())
    assert [float(r) for r in d.channels["red"].best.resistors] == [1000.0] * 3
    assert any(p.startswith("red: not monotonic: code 2 gives") for p in d.problems)
