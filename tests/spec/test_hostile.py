"""Hostile input to the reader: only SpecError leaves it, every problem one located line, no hang.

The kinds come from the robustness campaign (deep nesting, self-referencing aliases, huge and
non-finite numbers, explicit tags with bad values, huge exponents in unit strings, duplicate
keys, odd keys, long names); the generated documents come from hypothesis.  The default tier
runs a few hundred examples; ``SYNCCORE_SLOW=1`` runs 10 000 (the campaign's slow tier).
"""

from __future__ import annotations

import os
import re
import time

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import synccore
from synccore.errors import SpecError

SLOW = os.environ.get("SYNCCORE_SLOW") == "1"
EXAMPLES = 10_000 if SLOW else 300
LOCATED = re.compile(r"^hostile\.yaml:\d+:\d+: ")

BASE = """\
name: hall_sign
pixel_clock_hz: 25175000
horizontal: {active: 640, front_porch: 16, sync: 96, back_porch: 48, sync_polarity: negative}
vertical: {active: 480, front_porch: 10, sync: 2, back_porch: 33, sync_polarity: negative}
"""


def _problems(text: str) -> list[str]:
    start = time.perf_counter()
    try:
        synccore.loads(text, source="hostile.yaml")
    except SpecError as err:
        lines = [str(p) for p in err.problems]
    else:
        lines = []
    assert time.perf_counter() - start < 5, "the reader took more than 5 s"
    for line in lines:
        assert "\n" not in line and "\r" not in line, line
    return lines


KINDS = {
    "deep flow lists": "name: " + "[" * 3000 + "]" * 3000 + "\n",
    "deep block lists": "name:\n" + "".join("  " * i + "- \n" for i in range(200)),
    "self-referencing alias": "a: &a [*a]\n",
    "alias bomb": "a: &a [1,1,1,1,1,1,1,1,1,1]\nb: &b [*a,*a,*a,*a,*a,*a,*a,*a,*a,*a]\n"
                  "c: &c [*b,*b,*b,*b,*b,*b,*b,*b,*b,*b]\nd: &d [*c,*c,*c,*c,*c,*c,*c,*c,*c,*c]\n"
                  "e: [*d,*d,*d,*d,*d,*d,*d,*d,*d,*d]\n",
    "5000-digit integer": BASE.replace("25175000", "9" * 5000),
    "nan clock": BASE.replace("25175000", ".nan"),
    "inf clock": BASE.replace("25175000", "-.inf"),
    "1e400 clock": BASE.replace("25175000", "1.0e+400"),
    "bad !!int": BASE.replace("active: 640", "active: !!int x"),
    "bad !!float": BASE.replace("25175000", "!!float abc"),
    "bad !!bool": BASE.replace("name: hall_sign", "name: !!bool maybe"),
    "bad !!timestamp": BASE.replace("25175000", "!!timestamp 2001-99-99"),
    "implicit bad date": BASE.replace("25175000", "2001-13-45"),
    "!!binary": BASE.replace("name: hall_sign", "name: !!binary aGVsbG8="),
    "!!set": BASE + "core: !!set {a, b}\n",
    "python tag": BASE.replace("name: hall_sign", "name: !!python/name:os.system ''"),
    "long name": BASE.replace("hall_sign", "a" * 300),
    "enormous exponent": BASE.replace("25175000", '"1e100000000 Hz"'),
    "negative enormous exponent": BASE.replace("25175000", '"1e-100000000 MHz"'),
    "NUL in name": BASE.replace("name: hall_sign", 'name: "a\\0b"'),
    "newline in key": BASE + '"bad\\nkey": 1\n',
    "duplicate nested key": BASE.replace("sync: 96,", "sync: 96, sync: 97,"),
    "formula nan refresh": "name: a\nformula: {method: cvt, width: 640, height: 480, refresh: .nan}\n",
    "formula huge refresh": "name: a\nformula: {method: cvt, width: 640, height: 480, refresh: '1e999999'}\n",
    "tab indentation": "name: a\n\thorizontal: 1\n",
    "two documents": BASE + "---\n" + BASE,
    "only a comment": "# nothing\n",
    "a list at the top": "- 1\n- 2\n",
    "complex key": BASE + "? [a, b]\n: 1\n",
}


@pytest.mark.parametrize("kind", sorted(KINDS))
def test_each_kind_is_refused_cleanly(kind: str) -> None:
    lines = _problems(KINDS[kind])
    assert lines, f"{kind}: accepted"
    for line in lines:
        assert LOCATED.match(line) or line.startswith("hostile.yaml:"), line


def test_the_other_problems_still_reported_with_a_duplicate_key() -> None:
    text = BASE.replace("sync: 2,", "sync: 2, sync: 3,").replace("front_porch: 16", "front_porch: -1")
    lines = _problems(text)
    assert any("vertical.sync: duplicate key" in line for line in lines)
    assert any("horizontal.front_porch: must be ≥ 0" in line for line in lines), lines


def test_an_empty_tagged_number_is_refused_with_its_reason() -> None:
    """Found by benchmarks/fuzz.py: PyYAML's float constructor indexed an empty value (IndexError)."""
    assert _problems("!!float") == [
        "hostile.yaml:1:1: '' is not a valid !!float value; write the value without the tag, or a valid one",
        "hostile.yaml:1:1: must be a mapping of name, standard, formula, fit, pixel_clock_hz, horizontal, "
        "vertical, interlaced, core, ports, board, color, modes, got <refused>",
    ]
    lines = _problems(BASE.replace("25175000", "!!float"))
    assert lines == ["hostile.yaml:2:17: pixel_clock_hz: '' is not a valid !!float value; write the value "
                     "without the tag, or a valid one"], lines


def test_merge_keys_share_porches() -> None:
    text = ("name: hall_sign\npixel_clock_hz: 25175000\n"
            "x-wide: &wide {front_porch: 16, back_porch: 48, sync_polarity: negative}\n"
            "horizontal: {<<: *wide, active: 640, sync: 96}\n"
            "vertical: {active: 480, front_porch: 10, sync: 2, back_porch: 33, sync_polarity: negative}\n")
    spec = synccore.loads(text)
    assert (spec.horizontal.front_porch, spec.horizontal.back_porch) == (16, 48)


_scalar = st.one_of(
    st.integers(-10**6, 10**12).map(str), st.sampled_from([".nan", ".inf", "-.inf", "1e400", "!!int x", "~",
                                                           "!!float y", "'1e9999 Hz'", "&a 1", "*a", "*b"]),
    st.text(st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=12).map(repr),
)  # fmt: skip
_key = st.sampled_from(["name", "horizontal", "vertical", "pixel_clock_hz", "active", "sync", "front_porch",
                        "back_porch", "sync_polarity", "core", "formula", "standard", "fit", "<<", "x-a"])


@st.composite
def _documents(draw: st.DrawFn, depth: int = 0) -> str:
    """Near-valid YAML: real keys, hostile values, flow collections nested a few levels."""
    if depth > 3 or draw(st.booleans()):
        return draw(_scalar)
    if draw(st.booleans()):
        items = draw(st.lists(_documents(depth + 1), max_size=4))
        return "[" + ", ".join(items) + "]"
    pairs = draw(st.lists(st.tuples(_key, _documents(depth + 1)), max_size=5))
    return "{" + ", ".join(f"{k}: {v}" for k, v in pairs) + "}"


@settings(max_examples=EXAMPLES, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(top=st.lists(st.tuples(_key, _documents()), max_size=6))
def test_generated_documents(top: list[tuple[str, str]]) -> None:
    text = "".join(f"{k}: {v}\n" for k, v in top)
    for line in _problems(text):
        assert line.startswith("hostile.yaml:"), (text, line)


@settings(max_examples=EXAMPLES, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.binary(max_size=300))
def test_arbitrary_bytes(data: bytes) -> None:
    for line in _problems(BASE + data.decode("utf-8", "replace")):
        assert line.startswith("hostile.yaml"), line
