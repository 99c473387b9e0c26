"""The one golden-file check of the suite.

A golden file pins emitted text.  Refresh goldens only on purpose, then read the diff:

    SYNCCORE_UPDATE_GOLDEN=1 python -m pytest tests/emit tests/link tests/picture/test_pattern.py
"""

from __future__ import annotations

import os
from pathlib import Path

GOLDEN = Path(__file__).resolve().parent / "golden"
"""Root of every golden file; one folder per product (cores at the top, clocking/, bench/)."""

UPDATE = os.environ.get("SYNCCORE_UPDATE_GOLDEN") == "1"


def check(relative: str | Path, text: str) -> None:
    """Assert that ``text`` equals the golden file at ``relative`` (below tests/golden/)."""
    golden = GOLDEN / relative
    if UPDATE:
        golden.parent.mkdir(parents=True, exist_ok=True)
        golden.write_text(text)
    assert golden.is_file(), f"no golden file {golden}; run with SYNCCORE_UPDATE_GOLDEN=1"
    assert text == golden.read_text(), f"{golden} differs; refresh it on purpose if intended"
