"""Fuzzing the two readers of user files: the timing description and the VCD.

For ``--seconds N`` per target, hypothesis draws inputs (no shrinking, no database): pure
random bytes, and mutations of valid seeds (byte flips, inserted and deleted runs, format
tokens, boundary numbers, splices of two seeds) so that most inputs get past the first
parse error.  The seeds are the files in ``examples/`` and ``tests/regressions/`` for the
spec, and for the VCD a small hand-written raster design dumped by a real Icarus run (when
``iverilog`` is on PATH) beside a hand-written file.

Targets:

* ``spec``: ``synccore.loads(text, "fuzz.yaml")`` and ``synccore.load(path)`` on the same bytes;
* ``vcd``: ``synccore.picture.vcd.read(path, mapping)``, what ``synccore view --vcd`` calls.

Only :class:`synccore.SpecError` (specs) and :class:`VcdError` (VCDs) may leave, with every
line of the message one located line (``fuzz.yaml:L:C: ...``; ``run.vcd:L:C: ...``, or
``run.vcd: ...`` for what concerns the whole mapping).  Anything else, a broken message, or
one input running longer than ``--hang`` seconds is a crash: its input is shrunk and written to
``tests/regressions/fuzz/<target>/<hash>.<ext>``, which the tests replay.

    python benchmarks/fuzz.py [--seconds 60] [--targets spec,vcd] [--hang 5]

A benchmark, not a test: the figures go in the README.
"""

from __future__ import annotations

import argparse
import hashlib
import os
import signal
import subprocess
import sys
import tempfile
import time
import traceback
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

from hypothesis import HealthCheck, Phase, given, settings
from hypothesis import strategies as st

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, os.fspath(ROOT))
from tests.fuzz_check import SPEC_NAME, VCD_MAP, VCD_NAME, spec_verdict, vcd_verdict  # noqa: E402

OUT = ROOT / "tests" / "regressions" / "fuzz"

SPEC_TOKENS = [
    b"&a ", b"*a", b"<<: ", b"!!int ", b"!!float ", b"!!str ", b"!!binary ", b"!x ", b"{", b"}", b"[", b"]",
    b"- ", b": ", b", ", b'"', b"'", b"\t", b"\n", b"\r", b"---\n", b"...\n", b"%YAML 1.1\n", b"? ", b"|",
    b">", b"#", b"1e999", b".nan", b"-.inf", b"0x", b"0o7", b"1_000", b" MHz", b" kHz", b" GHz", b" Hz",
    b" ms", b" us", b"standard: ", b"formula: ", b"fit: ", b"core: ", b"\xef\xbb\xbf", b"\xff", b"\x00",
    b"\xc2\x85", b"\xe2\x80\xa8", b"null", b"~", b"true", b"2001-01-01",
]  # fmt: skip
VCD_TOKENS = [
    b"$scope module m $end\n", b"$upscope $end\n", b"$end", b"$var wire 1 ! clk $end\n",
    b"$var real 64 % q $end\n", b"$timescale", b"$enddefinitions $end\n", b"$dumpvars\n", b"$comment",
    b"#", b"#0\n", b"b", b"r", b"x", b"z", b"1!", b"0!", b"b1111111111111111111 $\n", b"r1e308 $\n",
    b"rnan ", b"1 fs", b"100 as", b"\n", b" ", b"\t", b"\x00", b"\xff", b"-",
]  # fmt: skip
NUMBERS = [b"0", b"-1", b"1", b"4096", b"4097", b"65535", b"2147483648", b"18446744073709551616",
           b"99999999999999999999", b"1e308", b"1e-320", b"0.5", b"00", b"1" * 120]  # fmt: skip

SEED_DESIGN = """
`timescale 1ns / 1ps
// A made-up raster for the fuzzer's seed: 12 active + 2 + 3 + 3 clocks a line, 6 + 1 + 1 + 2 lines.
module seed;
    reg clk = 0;
    always #4 clk = ~clk;
    reg [4:0] h = 0;
    reg [3:0] v = 0;
    reg hs = 0, vs = 1;
    reg [2:0] r = 0;
    always @(posedge clk) begin
        h <= (h == 19) ? 0 : h + 1;
        if (h == 19) v <= (v == 9) ? 0 : v + 1;
        hs <= (h >= 14 && h < 17);
        vs <= !(v == 7);
        r <= (h < 12 && v < 6) ? h[2:0] : 0;
    end
    initial begin
        $dumpfile("seed.vcd");
        $dumpvars(0, seed);
        #(8 * 20 * 10 + 8);
        $finish;
    end
endmodule
"""

HAND_VCD = b"""$date hand-written seed $end
$timescale 10 ps $end
$scope module seed $end
$var wire 1 ! clk $end
$var wire 1 " hs $end
$var wire 1 # vs $end
$var wire 3 $ r [2:0] $end
$upscope $end
$enddefinitions $end
$dumpvars
0! 0" 1# b000 $
$end
#0
1!
#50
0!
b101 $
#100
1!
1"
#150
0!
0#
#200
1!
b1 $
#250
0!
"""


class Hang(BaseException):
    """Raised by the alarm when one input runs too long (a BaseException: no reader catches it)."""


@dataclass
class Target:
    """One reader under fuzzing: how to run an input and which seeds and tokens to mutate."""

    name: str
    ext: str
    seeds: list[bytes]
    tokens: list[bytes]
    run: Callable[[bytes], str | None]
    """``None`` when the input was read or refused by the rules, else the crash's signature."""


@dataclass
class Tally:
    tried: int = 0
    refused: int = 0
    crashes: dict[str, bytes] = field(default_factory=dict)


def _guarded(work: Callable[[], str | None], hang: float) -> str | None:
    """The verdict of ``work``; an exception that escapes it, or a hang, is a crash signature."""
    def ring(_sig: int, _frame: object) -> None:
        raise Hang()

    old = signal.signal(signal.SIGALRM, ring)
    signal.setitimer(signal.ITIMER_REAL, hang)
    try:
        return work()
    except Hang:
        return f"hang: more than {hang} s"
    except Exception as exc:  # noqa: BLE001 - every escaping exception is what we look for
        frames = [f for f in traceback.extract_tb(exc.__traceback__) if "synccore" in f.filename]
        where = f"{Path(frames[-1].filename).name}:{frames[-1].lineno}" if frames else "?"
        return f"{type(exc).__name__} at {where}: {str(exc)[:60]}"
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)


def _mutations(target: Target) -> st.SearchStrategy[bytes]:
    """A seed with up to eight edits, or another seed spliced in."""
    op = st.tuples(st.integers(0, 6), st.integers(0, 1 << 20), st.integers(1, 64),
                   st.binary(min_size=1, max_size=16), st.sampled_from(target.tokens),
                   st.sampled_from(NUMBERS))  # fmt: skip

    def apply(seed: bytes, ops: list[tuple[int, int, int, bytes, bytes, bytes]], other: bytes) -> bytes:
        data = bytearray(seed)
        for kind, at, span, junk, token, number in ops:
            at %= len(data) + 1
            if kind == 0 and data:
                data[at % len(data)] ^= 1 << (span % 8)
            elif kind == 1:
                data[at:at] = junk
            elif kind == 2:
                del data[at:at + span]
            elif kind == 3:
                data[at:at] = token
            elif kind == 4:  # a number where a number was
                digits = [i for i, c in enumerate(data) if 48 <= c <= 57]
                if digits:
                    i = digits[at % len(digits)]
                    j = i
                    while j < len(data) and 48 <= data[j] <= 57:
                        j += 1
                    data[i:j] = number
            elif kind == 5:
                data[at:at] = data[at:at + span]
            else:
                data[at:] = other[at % (len(other) + 1):]
        return bytes(data)

    return st.builds(apply, st.sampled_from(target.seeds), st.lists(op, max_size=8),
                     st.sampled_from(target.seeds))  # fmt: skip


def fuzz(target: Target, seconds: float, hang: float) -> Tally:
    """Draw inputs for ``seconds``; every distinct crash keeps its first input."""
    tally = Tally()
    inputs = st.one_of(st.binary(max_size=512), _mutations(target), _mutations(target))
    end = time.monotonic() + seconds

    @settings(max_examples=500, phases=[Phase.generate], database=None, deadline=None,
              suppress_health_check=list(HealthCheck))  # fmt: skip
    @given(inputs)
    def one(data: bytes) -> None:
        if time.monotonic() > end:
            return
        tally.tried += 1
        crash = _guarded(lambda: target.run(data), hang)
        if crash is not None and crash not in tally.crashes:
            tally.crashes[crash] = data
            print(f"  crash: {crash}", flush=True)

    while time.monotonic() < end:
        one()
    return tally


def shrink(target: Target, data: bytes, crash: str, hang: float, budget: float) -> bytes:
    """The input cut down, a chunk at a time, for as long as it gives the same crash (ddmin)."""
    end = time.monotonic() + budget
    parts = 2
    while len(data) > 1 and time.monotonic() < end:
        size = -(-len(data) // parts)
        for start in range(0, len(data), size):
            smaller = data[:start] + data[start + size:]
            if _guarded(lambda s=smaller: target.run(s), hang) == crash:  # type: ignore[misc]
                data, parts = smaller, max(parts - 1, 2)
                break
        else:
            if parts >= len(data):
                break
            parts = min(parts * 2, len(data))
    return data


def _spec_target(work: Path) -> Target:
    import synccore

    path = work / SPEC_NAME

    def run(data: bytes) -> str | None:
        try:
            text = data.decode("utf-8")
        except UnicodeDecodeError:
            text = data.decode("latin-1")  # loads() takes any text: every byte as one character
        path.write_bytes(data)
        return (spec_verdict(lambda: synccore.loads(text, SPEC_NAME), SPEC_NAME, text)
                or spec_verdict(lambda: synccore.load(path), str(path), text))  # fmt: skip

    seeds = [p.read_bytes() for p in sorted((ROOT / "examples").glob("*.yaml"))]
    seeds += [p.read_bytes() for p in sorted((ROOT / "tests" / "regressions").rglob("*.yaml"))]
    return Target("spec", "yaml", seeds, SPEC_TOKENS, run)


def _vcd_seeds(work: Path) -> list[bytes]:
    seeds = [HAND_VCD]
    try:
        (work / "seed.v").write_text(SEED_DESIGN)
        subprocess.run(["iverilog", "-o", "seed.vvp", "seed.v"], cwd=work, check=True, capture_output=True)
        subprocess.run(["vvp", "-n", "seed.vvp"], cwd=work, check=True, capture_output=True)
        seeds.append((work / "seed.vcd").read_bytes())
    except (OSError, subprocess.CalledProcessError) as exc:
        print(f"  no Icarus seed ({exc}); the hand-written VCD only", file=sys.stderr)
    return seeds + [p.read_bytes() for p in sorted((OUT / "vcd").glob("*.vcd"))]


def _vcd_target(work: Path) -> Target:
    from synccore.picture.vcd import read

    path = work / VCD_NAME

    def run(data: bytes) -> str | None:
        path.write_bytes(data)
        return vcd_verdict(lambda: read(path, VCD_MAP), path)

    return Target("vcd", "vcd", _vcd_seeds(work), VCD_TOKENS, run)


def _keep(target: Target, data: bytes, crash: str) -> Path:
    digest = hashlib.sha256(data).hexdigest()[:16]
    folder = OUT / target.name
    folder.mkdir(parents=True, exist_ok=True)
    path = folder / f"{digest}.{target.ext}"
    path.write_bytes(data)
    with (OUT / "FOUND.txt").open("a", encoding="utf-8") as log:
        log.write(f"{target.name}/{path.name}: {crash}\n")
    return path


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seconds", type=float, default=60.0, help="fuzzing time per target")
    parser.add_argument("--targets", default="spec,vcd")
    parser.add_argument("--hang", type=float, default=5.0, help="seconds one input may take")
    parser.add_argument("--shrink", type=float, default=30.0, help="seconds spent shrinking each crash")
    args = parser.parse_args()
    makers = {"spec": _spec_target, "vcd": _vcd_target}
    found = 0
    with tempfile.TemporaryDirectory(prefix="synccore-fuzz-") as tmp:
        for name in args.targets.split(","):
            target = makers[name](Path(tmp))
            print(f"{name}: {len(target.seeds)} seeds, {args.seconds:g} s", flush=True)
            start = time.monotonic()
            tally = fuzz(target, args.seconds, args.hang)
            spent = time.monotonic() - start
            print(f"{name}: {tally.tried} inputs in {spent:.0f} s, {tally.tried / spent:.0f} inputs/s, "
                  f"{len(tally.crashes)} crash(es)")  # fmt: skip
            for crash, data in tally.crashes.items():
                small = shrink(target, data, crash, args.hang, args.shrink)
                kept = _keep(target, small, crash).relative_to(ROOT)
                print(f"  {crash}\n    -> {kept} ({len(small)} bytes)")
            found += len(tally.crashes)
    return 1 if found else 0


if __name__ == "__main__":
    sys.exit(main())
