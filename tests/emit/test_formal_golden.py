"""The property wrapper: its text is pinned, and every number in it is the timing model's."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

import synccore
from synccore.emit.formal import PROPERTY_NAMES, render_properties
from tests import golden_files
from tests import samples as timings
from tests.conftest import EXAMPLES

CASES = {
    "small_opts": (timings.SMALL_ALL_OPTIONS, True),
    "no_back_porch": (timings.NO_BACK_PORCH, True),
    "scaled_ppc_ports_only": (timings.SCALED_PPC, False),
}


@pytest.mark.parametrize("case", list(CASES))
def test_wrapper_text_is_pinned(case: str) -> None:
    text, internals = CASES[case]
    golden_files.check(f"formal/{case}_props.v", render_properties(synccore.loads(text), internals=internals))


@pytest.mark.parametrize("example", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_wrapper_numbers_are_the_models(example: Path) -> None:
    spec = synccore.load(example)
    t = synccore.timing(spec)
    text = render_properties(spec)
    found = re.findall(r"localparam \S* *(REF_\w+) *= \d+'[db](\d+);", text)
    values = {name: int(value) for name, value in found}
    assert values["REF_H_LAST"] == t.h_last
    assert values["REF_V_LAST"] == t.v_last
    assert values["REF_HS_FROM"] == t.h_sync_start
    assert values["REF_HS_TO"] == t.h_sync_stop
    assert values["REF_VS_V_FROM"] == t.v_sync_start
    assert values["REF_VS_V_TO"] == t.v_sync_stop
    assert (values["REF_LEAD_H"], values["REF_LEAD_V"]) == t.lead_reset
    assert values["REF_HS_ON"] == t.hsync_active_level


def test_every_output_has_a_named_assertion() -> None:
    text = render_properties(synccore.loads(timings.SMALL_ALL_OPTIONS))
    labels = re.findall(r"^\s+(\w+): assert", text, re.M)
    assert labels == [label for label in PROPERTY_NAMES if label in labels]
    assert set(labels) == set(PROPERTY_NAMES)  # with a lead: both invariants too
