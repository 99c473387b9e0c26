"""Shared fixtures: example specs, spec writing, and access to the external HDL tools.

A test that needs a simulator or linter asks for it through ``need_tool``: when
the tool is missing it is skipped with the reason, except when
SYNCCORE_REQUIRE_TOOLS=1 (set by scripts/test in CI), where a missing tool is
a failure: CI must never go green by skipping the real simulators.
"""

from __future__ import annotations

import os
import re
import shutil
from collections.abc import Callable
from pathlib import Path

import pytest

from synccore.verification.tools import Tool, find

ROOT = Path(__file__).resolve().parent.parent
ALL_EXAMPLES = sorted((ROOT / "examples").glob("*.yaml"))
MULTI_MODE_EXAMPLES = [p for p in ALL_EXAMPLES if re.search(r"^modes:", p.read_text(), re.M)]
"""The examples with several timings (``modes:``): tests/emit, tests/cli and
tests/verification/test_multimode.py check each of them."""
EXAMPLES = [p for p in ALL_EXAMPLES if p not in MULTI_MODE_EXAMPLES]
"""The single-mode examples, which every single-mode product (first light, benches, formal) builds."""


def _missing(what: str) -> None:
    if os.environ.get("SYNCCORE_REQUIRE_TOOLS") == "1":
        pytest.fail(f"{what} is required (SYNCCORE_REQUIRE_TOOLS=1) but not found")
    pytest.skip(f"{what} not found")


@pytest.fixture
def need_tool() -> Callable[[str], Tool]:
    def get(name: str) -> Tool:
        tool = find(name)
        if tool is None:
            _missing(f"simulator {name}")
        assert tool is not None
        return tool

    return get


@pytest.fixture
def need_program() -> Callable[[str], str]:
    def get(name: str) -> str:
        path = shutil.which(name)
        if path is None:
            _missing(f"program {name}")
        assert path is not None
        return path

    return get


@pytest.fixture
def write_spec(tmp_path: Path) -> Callable[..., Path]:
    """Write YAML text to a file in a fresh folder and return its path."""

    def write(text: str, name: str = "spec.yaml") -> Path:
        path = tmp_path / name
        path.write_text(text, encoding="utf-8")
        return path

    return write
