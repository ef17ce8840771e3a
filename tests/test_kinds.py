"""The registry of kinds of balance (balance.kinds): what a kind must provide, and how a
worksheet naming a kind that cannot be balanced (yet) is read and refused.

Expectations: joulebook's contract (README, "Worksheet format"; DEVELOPERS.md, "Adding a
kind of balance"); common practice, no source.
"""

from __future__ import annotations

from importlib import import_module

import pytest

from balance import api
from balance.errors import InputError
from balance.kinds import KINDS, RESERVED, kind_of
from balance.record.format import SECTION_KINDS
from balance.worksheet import SECTIONS, Worksheet
from tests.helpers import sample


@pytest.mark.parametrize("name", list(KINDS))
def test_every_kind_names_a_module_that_balances_it(name):
    kind = KINDS[name]
    module = import_module(kind.module)
    for function in ("prepare", "solve", "as_json"):
        assert callable(getattr(module, function)), function
    # its sections are worksheet sections, and the record has an entry kind for each
    assert set(kind.sections) <= set(SECTIONS) and set(kind.sections) <= set(SECTION_KINDS)


def test_the_closed_kind_solves_and_files_a_sample():
    ws = sample("n2-buffer-into-receiver.toml")
    kind = kind_of(ws.system.kind)
    result = kind.solve(kind.prepare(ws))
    assert kind.as_json(result) == api.as_json(result) == result.as_json()


@pytest.mark.parametrize("name", list(RESERVED))
def test_a_reserved_kind_is_read_as_typed_but_not_balanced(name):
    ws = Worksheet.from_dict({"system": {"kind": name}})  # kept, as the app keeps what is typed
    assert ws.system.kind == name
    with pytest.raises(InputError) as caught:
        api.prepare(ws)
    assert caught.value.field == "system.kind" and str(caught.value) == f"system.kind: {RESERVED[name]}"
    solved = api.attempt(ws)  # what a record files for it
    assert (solved.error_kind, solved.error) == ("InputError", f"system.kind: {RESERVED[name]}")


def test_an_unknown_kind_is_refused_when_read():
    with pytest.raises(InputError) as caught:
        Worksheet.from_dict({"system": {"kind": "semi-open"}})
    assert str(caught.value) == "system.kind: expected one of 'closed', 'steady-flow', 'transient'; got 'semi-open'"


@pytest.mark.parametrize("name", list(KINDS))
def test_the_apps_steps_of_a_kind_edit_every_section_it_reads_once(name):
    from tui.steps import STEPS_BY_KIND

    steps = STEPS_BY_KIND[name]
    edited = [section for step in steps for section in step.sections]
    assert sorted(edited) == sorted(KINDS[name].sections)
    assert [s.number for s in steps] == list(range(1, len(steps) + 1))
