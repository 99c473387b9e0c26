"""Malformed VCD files for ``view --vcd``: one located line each (VcdError), never a traceback."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from synccore.picture.vcd import VcdError, read

MAP = {"clk": "clk", "hsync": "hs", "vsync": "vs", "red": "r"}
EXAMPLES = 5_000 if os.environ.get("SYNCCORE_SLOW") == "1" else 200


def _vcd(timescale: str = "1 ns", header_extra: str = "", body: str | None = None, size: str = "4") -> str:
    if body is None:
        steps = []
        for t in range(40):
            clk, hs = 1 if t % 2 == 0 else 0, 1 if t % 8 < 2 else 0
            steps.append(f"#{t * 5}\n{clk}!\n{hs}\"\n0#\nb{t % 16:04b} $\n")
        body = "$dumpvars\n0! 0\" 0# b0000 $\n$end\n" + "".join(steps)
    return (f"$date today $end\n$timescale {timescale} $end\n$scope module top $end\n"
            f"$var wire 1 ! clk $end\n$var wire 1 \" hs $end\n$var wire 1 # vs $end\n"
            f"$var wire {size} $ r [3:0] $end\n{header_extra}$upscope $end\n$enddefinitions $end\n{body}")


def _read(tmp_path: Path, text: str) -> object:
    path = tmp_path / "run.vcd"
    path.write_text(text, encoding="utf-8")
    return read(path, MAP)


def test_a_good_file_and_its_timescale(tmp_path: Path) -> None:
    pins = _read(tmp_path, _vcd())
    assert pins.period_s == pytest.approx(10e-9)  # type: ignore[attr-defined]
    # IEEE 1364-2005 18.2.3.5: the time units run from s down to fs; "as" (1e-18 s) as well, read
    # as written, never as ns
    pins = _read(tmp_path, _vcd(timescale="1 as"))
    assert pins.period_s == pytest.approx(10e-18)  # type: ignore[attr-defined]
    pins = _read(tmp_path, _vcd(timescale="100ps"))
    assert pins.period_s == pytest.approx(1e-9)  # type: ignore[attr-defined]


KINDS = {
    "zero timescale": (dict(timescale="0 ns"), "run.vcd:2:12: timescale '0 ns': expected 1, 10 or 100"),
    "unknown time unit": (dict(timescale="1 ks"), "timescale '1 ks'"),
    "truncated scope": (dict(header_extra="$scope module"), "expected $end to close $scope"),
    "unbalanced upscope": (dict(header_extra="$upscope $end\n$upscope $end\n"),
                           "$upscope without an open $scope"),
    "non-numeric size": (dict(size="four"), "variable size 'four'"),
    "zero width": (dict(size="0"), "variable size '0'"),
    "huge width": (dict(size="99999999"), "variable size '99999999'"),
    "wide colour": (dict(size="64"), "'r' is 64 bits wide; red takes at most 16"),
    "non-numeric time": (dict(body="#abc\n1!\n"), "run.vcd:10:1: timestamp '#abc'"),
    "time backwards": (dict(body="#10\n1!\n#5\n0!\n"), "timestamp #5 runs backwards (after #10)"),
    "non-finite real": (dict(body="#0\nrinf $\n"), "real value 'inf': expected a finite number"),
    "real on a pin": (dict(body="#0\nr1.5 $\n"), "'$' changes to a real value"),
    "bad vector": (dict(body="#0\nb10a2 $\n"), "vector value '10a2'"),
    "vector without code": (dict(body="#0\nb1010"), "the file ends inside a value change"),
    "value too wide": (dict(body="#0\nb11111 $\n#1\n1!\n#2\n0!\n#3\n1!\n#4\n0!\n#5\n1!\n#6\n0!\n"),
                       "run.vcd:11:1: a value of '$' is wider than its 4 bits"),
    "garbage": (dict(body="#0\n@@@\n"), "unexpected '@@@'"),
    "huge timestamp": (dict(body="#" + "9" * 5000 + "\n"), "timestamp '#999"),
}


@pytest.mark.parametrize("kind", sorted(KINDS))
def test_malformed_files_give_one_located_line(tmp_path: Path, kind: str) -> None:
    args, says = KINDS[kind]
    with pytest.raises(VcdError) as info:
        _read(tmp_path, _vcd(**args))  # type: ignore[arg-type]
    message = str(info.value)
    assert "\n" not in message and message.startswith(str(tmp_path / "run.vcd")), message
    assert says in message, message


def test_not_a_regular_file(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe.vcd"
    os.mkfifo(fifo)
    with pytest.raises(VcdError, match="not a regular file"):
        read(fifo, MAP)


@settings(max_examples=EXAMPLES, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(cut=st.integers(0, 2000), junk=st.binary(max_size=20), at=st.integers(0, 2000))
def test_damaged_files_never_crash(tmp_path: Path, cut: int, junk: bytes, at: int) -> None:
    """A good file cut short and with bytes spliced in: read, or one VcdError line."""
    data = _vcd().encode()
    data = data[:at] + junk + data[at:]
    data = data[: len(data) - cut]
    path = tmp_path / "run.vcd"
    path.write_bytes(data)
    try:
        read(path, MAP)
    except VcdError as err:
        assert "\n" not in str(err)
