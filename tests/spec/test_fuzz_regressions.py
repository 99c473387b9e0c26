"""Every input benchmarks/fuzz.py found crashing the spec reader is replayed here.

The files under tests/regressions/fuzz/spec/ are the fuzzer's shrunk inputs, byte for byte
(tests/regressions/fuzz/FOUND.txt says what each one did).  Each goes through ``loads`` and
``load`` and must be read or refused by the rule in tests/fuzz_check.py: SpecError only, every
problem one line at file:line:col, within the hang limit.
"""

from __future__ import annotations

import shutil
import time
from pathlib import Path

import pytest

import synccore
from tests.fuzz_check import SPEC_NAME, spec_verdict

FOLDER = Path(__file__).resolve().parent.parent / "regressions" / "fuzz" / "spec"
FILES = sorted(FOLDER.glob("*.yaml"))
HANG_S = 5


def test_the_folder_is_not_empty() -> None:
    assert FILES, f"no regression inputs in {FOLDER}"


@pytest.mark.parametrize("found", FILES, ids=[p.name for p in FILES])
def test_replayed_input_is_read_or_refused_by_the_rule(found: Path, tmp_path: Path) -> None:
    data = found.read_bytes()
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        text = data.decode("latin-1")
    path = tmp_path / SPEC_NAME
    shutil.copyfile(found, path)
    start = time.perf_counter()
    assert spec_verdict(lambda: synccore.loads(text, SPEC_NAME), SPEC_NAME, text) is None
    assert spec_verdict(lambda: synccore.load(path), str(path), text) is None
    assert time.perf_counter() - start < HANG_S
