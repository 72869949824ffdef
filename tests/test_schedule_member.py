"""`Member` declares one typed field per schedule column, in the column table's order."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import pytest

from timbersheets.engineering.columns import COLUMNS, field_type
from timbersheets.engineering.member import Member
from timbersheets.schedule.read import load_schedule

REPO = Path(__file__).resolve().parent.parent
BOOKKEEPING = ("row", "given", "carried", "warnings", "entered")  # what the reader knows beyond the cells


def test_the_member_fields_are_the_column_table():
    fields = dataclasses.fields(Member)
    assert [f.name for f in fields] == [*COLUMNS, *BOOKKEEPING]
    for f in fields[:len(COLUMNS)]:
        assert f.type == field_type(COLUMNS[f.name]), f.name  # the type the column's kind gives


def test_a_member_serves_no_column_it_does_not_declare():
    demo = load_schedule(REPO / "calcsheets" / "kestrel-cove-boathouse" / "schedule.csv")
    m = demo.members[0]
    with pytest.raises(AttributeError):
        m.w_Q  # noqa: B018 (no such column: no fallback lookup)
    with pytest.raises(dataclasses.FrozenInstanceError):
        m.length = 1.0  # type: ignore[misc]
    with pytest.raises(TypeError):
        m.values["length"] = 1.0  # type: ignore[index]


def test_every_demo_value_has_its_declared_type():
    # The fields' types are what the reader returns: a quantity is a float in compute units, a count an int.
    python = {"str": str, "float": float, "int": int}
    demo = load_schedule(REPO / "calcsheets" / "kestrel-cove-boathouse" / "schedule.csv")
    for m in demo.members:
        for name, col in COLUMNS.items():
            base = field_type(col).removesuffix(" | None")
            value = getattr(m, name)
            if value is None:
                assert field_type(col).endswith("| None"), (m.mark, name)
            elif base in python:
                assert isinstance(value, python[base]), (m.mark, name, value)
            else:
                assert isinstance(value, (tuple, str)), (m.mark, name, value)


def test_a_changed_copy_leaves_the_member_as_it_was():
    demo = load_schedule(REPO / "calcsheets" / "kestrel-cove-boathouse" / "schedule.csv")
    m = demo.members[0]
    heavier = m.with_values({"P_D": m.P_D + 1000.0})
    assert heavier.P_D == m.P_D + 1000.0 and heavier.values["P_D"] == heavier.P_D
    assert m.values["P_D"] == m.P_D != heavier.P_D
    assert Member.from_params(m.params()) == m
