"""The four ways a spec gives its timing, their conflicts, the schema, and the examples."""

from __future__ import annotations

import re
from pathlib import Path

import jsonschema
import pytest
import yaml
from click.testing import CliRunner

from synccore import load, loads
from synccore.cli.main import main
from synccore.errors import SpecError
from synccore.spec.schema import json_schema

EXAMPLES = sorted((Path(__file__).parents[2] / "examples").glob("*.yaml"))


def problems(text: str) -> list[str]:
    with pytest.raises(SpecError) as info:
        loads(text, "s.yaml")
    return str(info.value).splitlines()


def test_standard_and_formula_together() -> None:
    lines = problems("name: a\nstandard: 1280x720@60\n"
                     "formula: {method: cvt, width: 640, height: 480, refresh: 60}\n")  # fmt: skip
    assert lines == ["s.yaml:3:1: formula: cannot be combined with standard (at s.yaml:2:1); "
                     "give one"]  # fmt: skip


def test_fit_with_standard() -> None:
    lines = problems("name: a\nstandard: 1280x720@60\nfit: {refresh: 60}\n")
    assert lines == ["s.yaml:3:1: fit: applies to datasheet ranges only; cannot be combined "
                     "with standard"]  # fmt: skip


def test_standard_must_be_text() -> None:
    lines = problems("name: a\nstandard: [1280, 720]\n")
    assert re.match(r"^s\.yaml:2:11: standard: must be a mode name like '1280x720@60' or a "
                    r"source like 'DMT 55h', got a list$", lines[0])
    assert len(lines) == 1


def test_every_problem_is_still_collected() -> None:
    lines = problems("name: 9bad\nstandard: 1280x777@60\ncore: {lead: -1}\n")
    assert [ln.split(": ")[1] for ln in lines] == ["name", "standard", "core.lead"]


def test_fit_without_ranges() -> None:
    lines = problems("name: a\npixel_clock_hz: 25 MHz\n"
                     "horizontal: {active: 640, front_porch: 16, sync: 96, back_porch: 48, "
                     "sync_polarity: negative}\n"
                     "vertical: {active: 480, front_porch: 10, sync: 2, back_porch: 33, "
                     "sync_polarity: negative}\nfit: {refresh: 60}\n")  # fmt: skip
    assert lines == ["s.yaml:5:1: fit: has nothing to choose: give at least one value as a "
                     "range {min, typ, max}"]  # fmt: skip


def test_missing_timing_still_reported() -> None:
    lines = problems("name: a\n")
    assert lines == ["s.yaml:1:1: horizontal: required key is missing",
                     "s.yaml:1:1: pixel_clock_hz: required key is missing",
                     "s.yaml:1:1: vertical: required key is missing"]  # fmt: skip


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_examples_match_the_schema_and_build(path: Path, tmp_path: Path) -> None:
    jsonschema.validate(yaml.safe_load(path.read_text()), json_schema())
    runner = CliRunner()
    r = runner.invoke(main, ["show", str(path)])
    assert r.exit_code == 0, r.output
    doc = yaml.safe_load(path.read_text())
    if {"standard", "formula", "fit"} & set(doc):
        assert "timing from" in r.output
    r = runner.invoke(main, ["build", str(path), "-o", str(tmp_path)])
    assert r.exit_code == 0, r.output
    s = load(path)
    assert (tmp_path / f"{s.name}.v").exists() and (tmp_path / f"{s.name}.vhd").exists()


def test_schema_refuses_two_timing_sources() -> None:
    doc = {"name": "a", "standard": "1280x720@60", "pixel_clock_hz": 1}
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(doc, json_schema())
