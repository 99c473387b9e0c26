"""How long `synccore prove` takes per example, and what PDR on the ports alone can do.

For every file in examples/ and a 1920x1080 core (CTA-861 VIC 16 figures, one and
four pixels per clock): the whole `synccore prove SPEC` command (a fresh Python,
every SymbiYosys step) and the k-induction job alone; then, with --pdr, the same
core judged on its ports only by `abc pdr` (what `--core` falls back to for a core
whose counters are unknown), with a time limit.

    python benchmarks/prove_speed.py [--pdr] [--pdr-timeout SECONDS]

A benchmark, not a test: the figures go in the README.
"""

from __future__ import annotations

import argparse
import re
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import synccore
from synccore.verification.prove import prove_text

ROOT = Path(__file__).resolve().parent.parent
# CTA-861, VIC 16 (1920x1080p60): 148.5 MHz, 1920 88 44 148 / 1080 4 5 36, +/+ (from memory).
CTA_1080P = """\
name: bench_1080p
pixel_clock_hz: 148.5 MHz
horizontal: {active: 1920, front_porch: 88, sync: 44, back_porch: 148, sync_polarity: positive}
vertical:   {active: 1080, front_porch: 4,  sync: 5,  back_porch: 36,  sync_polarity: positive}
"""


def _specs(folder: Path) -> list[tuple[str, Path]]:
    specs = [(p.name, p) for p in sorted((ROOT / "examples").glob("*.yaml"))
             if not synccore.load(p).modes]  # a multi-mode core has no proof yet  # fmt: skip
    for ppc in (1, 4):
        path = folder / f"cta_1080p_ppc{ppc}.yaml"
        path.write_text(CTA_1080P + f"core: {{pixels_per_clock: {ppc}}}\n")
        specs.append((f"1920x1080 CTA VIC 16, {ppc} pixel(s)/clock", path))
    return specs


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--pdr", action="store_true", help="also time abc pdr on the ports alone")
    parser.add_argument("--pdr-timeout", type=float, default=120.0)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        print("| spec | raster (cycles x lines) | `synccore prove` wall | induction job | verdict |"
              + (" ports only, abc pdr |" if args.pdr else ""))
        print("|---|---|---|---|---|" + ("---|" if args.pdr else ""))
        for label, path in _specs(folder):
            spec = synccore.load(path)
            t = synccore.timing(spec)
            start = time.monotonic()
            run = subprocess.run([sys.executable, "-m", "synccore", "prove", str(path)],
                                 capture_output=True, text=True, check=False)  # fmt: skip
            wall = time.monotonic() - start
            job = re.search(r"smtbmc z3 (\w+) in ([\d.]+) s", run.stdout)
            verdict = run.stdout.split(":")[1].strip() if ":" in run.stdout else run.stderr.strip()
            row = (f"| {label} | {t.h_total} x {t.v_total} | {wall:.1f} s | "
                   f"{job[2] + ' s' if job else '-'} | {verdict} |")  # fmt: skip
            if args.pdr:
                result = prove_text(spec, synccore.render_verilog(spec).replace("h_pos", "h_count"),
                                    work_dir=folder / spec.name, timeout=args.pdr_timeout)  # fmt: skip
                row += f" {result.verdict} after {result.seconds:.1f} s |"
            print(row, flush=True)


if __name__ == "__main__":
    main()
