"""Every input benchmarks/fuzz.py found crashing the VCD reader is replayed here.

The files under tests/regressions/fuzz/vcd/ are the fuzzer's shrunk inputs, byte for byte
(tests/regressions/fuzz/FOUND.txt says what each one did).  Each is read as ``view --vcd``
reads it, with the fuzzer's mapping, and must be read or refused by the rule in
tests/fuzz_check.py: VcdError only, one line placed at file:line:col (or naming the file, for
the mapping as a whole), within the hang limit.
"""

from __future__ import annotations

import shutil
import time
from pathlib import Path

import pytest

from synccore.picture.vcd import read
from tests.fuzz_check import VCD_MAP, VCD_NAME, vcd_verdict

FOLDER = Path(__file__).resolve().parent.parent / "regressions" / "fuzz" / "vcd"
FILES = sorted(FOLDER.glob("*.vcd"))
HANG_S = 5


def test_the_folder_is_not_empty() -> None:
    assert FILES, f"no regression inputs in {FOLDER}"


@pytest.mark.parametrize("found", FILES, ids=[p.name for p in FILES])
def test_replayed_input_is_read_or_refused_by_the_rule(found: Path, tmp_path: Path) -> None:
    path = tmp_path / VCD_NAME
    shutil.copyfile(found, path)
    start = time.perf_counter()
    assert vcd_verdict(lambda: read(path, VCD_MAP), path) is None
    assert time.perf_counter() - start < HANG_S
