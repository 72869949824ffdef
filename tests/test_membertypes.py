"""A member type is one record: adding one makes it validated, designed and rendered."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from conftest import member_row, write_schedule
from timbersheets.engineering.membertypes import MemberType, member_types
from timbersheets.engineering.sizing import design_sized
from timbersheets.schedule.read import load_schedule
from timbersheets.sheet.sections import Sheet

REPO = Path(__file__).resolve().parent.parent

# A post that must state its weak-axis bracing and takes no bearing length; it reuses the axial
# routine in compression and shows only the length row of the member section.
STRUT = MemberType("strut", "strut", "axial.ipynb", "axial", axial="compression", bends=False,
                   checks=("compression",), plies=False, sections=("length",), requires=("Ly",),
                   refuses=("bearing",), blank={"Lx": "length", "Ly": "length"})


@pytest.fixture
def with_strut(monkeypatch):
    monkeypatch.setitem(member_types(), "strut", STRUT)


def rows(tmp_path, *cells_list):
    schedule = load_schedule(write_schedule(tmp_path, [member_row(f"S-{i}", **c) for i, c in enumerate(cells_list)]))
    return {m.mark: m for m in schedule.members}, {r.mark: [str(e) for e in r.errors] for r in schedule.rejected}


def test_a_toy_type_is_validated_by_its_record(tmp_path, with_strut):
    members, rejected = rows(tmp_path, dict(type="strut", Ly="1.5"), dict(type="strut", Ly=""),
                             dict(type="strut", Ly="1.5", bearing="89"), dict(type="arch"))
    assert list(members) == ["S-0"]
    assert "column 'Ly'" in rejected["S-1"][0] and "a strut member needs it" in rejected["S-1"][0]
    assert "column 'bearing'" in rejected["S-2"][0] and "does not apply to a strut member" in rejected["S-2"][0]
    assert "strut" in rejected["S-3"][0]  # the allowed types come from the registry
    assert members["S-0"].Lx == members["S-0"].length  # its blank rule: Lx = the member length


def test_a_toy_type_is_designed_and_rendered(tmp_path, data, with_strut):
    members, _ = rows(tmp_path, dict(type="strut", Ly="1.5"), dict(type="compression", Ly="1.5"))
    strut, post = design_sized(members["S-0"], data), design_sized(members["S-1"], data)
    assert strut.errors == [] and strut.checks
    # same routine and same sense as the compression type, so the same check results
    assert [c.check for c in strut.checks] == ["compression"] * len(strut.checks)
    assert [c.utilization for c in strut.checks] == [c.utilization for c in post.checks]
    sheet = Sheet(strut, data, {"nbc": "2020", "o86": "2019"})
    member = sheet.member_section().markdown
    assert "strut member" in member and "Lx = 3000 mm" in member
    assert "A_n =" not in member  # the record shows no net-area row
    assert "A_n =" in Sheet(post, data, {"nbc": "2020", "o86": "2019"}).member_section().markdown
    assert "Compression" in sheet.checks_section().markdown
    assert sheet.diagram() == [] and sheet.serviceability_section().markdown == ""


def test_every_type_runs_only_the_checks_its_record_names(data):
    demo = load_schedule(REPO / "calcsheets" / "kestrel-cove-boathouse" / "schedule.csv")
    seen: dict[str, set[str]] = {}
    for m in demo.members:
        d = design_sized(m, data)
        seen.setdefault(m.type, set()).update(c.check for c in d.checks)
    assert set(seen) == set(member_types()), "the demo job has a member of every type"
    for name, checks in seen.items():
        assert checks <= set(member_types()[name].checks), (name, checks)


def test_each_template_serves_the_types_that_name_it():
    for path in sorted((REPO / "templates").glob("*.ipynb")):
        meta = json.loads(path.read_text(encoding="utf-8"))["metadata"]["timbersheets"]
        named = sorted(t.name for t in member_types().values() if t.template == path.name)
        assert sorted(meta["types"]) == named, path.name
