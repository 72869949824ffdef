"""Every data row is read by some code path, or is marked informative in the data (`use` column).

A value that lives in a data file but that no code reads is a second copy of something (or of nothing):
the code would go on using its own number while a checker verifies the file. The demo job's members and
a set of synthetic members (every species, grade, size category, service condition, member type and
loading the tables distinguish) are validated and designed with a data set whose rows record which of
their value columns were read. Source: the project's own data rule (DEVELOPERS.md, "Adding or changing
data"); nothing here is an engineering value.
"""

from __future__ import annotations

import csv
from dataclasses import replace
from importlib import resources

import pytest

import timbersheets.engineering.data as data_module
from timbersheets.engineering import columns, edition
from timbersheets.engineering.data import BUILTIN_FILES, TABLES, DataSet, informative
from timbersheets.engineering.loadpath import design_all
from timbersheets.schedule.read import load_schedule

from conftest import DEMO, write_schedule

#: The columns that hold the values of the tables a firm file cannot correct (catalogues).
CATALOGUE_VALUES = {"sizes_sawn.csv": ("b", "d"), "sizes_glulam.csv": ("width", "lamstock"),
                    "glulam_laminations.csv": ("thickness", "min_depth")}


class TrackedRow(dict):
    """A data row that notes when one of its value columns is read (key columns are only compared)."""

    def __init__(self, row: dict[str, str], reads: set, where: tuple[str, int], values: tuple[str, ...]) -> None:
        super().__init__(row)
        self._reads, self._where, self._values = reads, where, values

    def __getitem__(self, key):
        if key in self._values:
            self._reads.add(self._where)
        return super().__getitem__(key)

    def get(self, key, default=None):
        if key in self._values:
            self._reads.add(self._where)
        return super().get(key, default)


def tracked_data() -> tuple[DataSet, set[tuple[str, int]]]:
    data, reads = DataSet(), set()
    for name, file in data.files.items():
        values = TABLES[name].values if name in TABLES else CATALOGUE_VALUES[name]
        rows = tuple(TrackedRow(r, reads, (name, i), values) for i, r in enumerate(file.rows))
        data.files[name] = replace(file, rows=rows)
    return data, reads


def synthetic_rows(data: DataSet) -> list[dict[str, str]]:
    """Members that between them reach every row the design distinguishes."""
    rows: list[dict[str, str]] = []

    def add(**cells: str) -> None:
        rows.append({"mark": f"X-{len(rows) + 1}", "self_weight": "yes", **cells})

    category_size = {"dimension": "38x140", "beam-stringer": "140x241", "post-timber": "140x140"}
    loads = dict(P_D="5", P_L="4", P_S="6", P_W="3", P_E="2")
    seen = set()
    for r in data.files["sawn_strengths.csv"].rows:
        key = (dict.__getitem__(r, "species"), dict.__getitem__(r, "grade"), dict.__getitem__(r, "category"))
        if key in seen:
            continue
        seen.add(key)
        for service in ("dry", "wet"):
            add(type="compression", material="sawn", species=key[0], grade=key[1], size=category_size[key[2]],
                length="3.0", Ly="0", service=service, bears_on=f"sawn {key[0]} {key[1]}", **loads)
    glulam = {(dict.__getitem__(r, "species"), dict.__getitem__(r, "grade"))
              for r in data.files["glulam_strengths.csv"].rows}
    for species, grade in sorted(glulam):
        for service in ("dry", "wet"):
            add(type="compression", material="glulam", species=species, grade=grade, size="130x228", length="4.0",
                service=service, bears_on=f"glulam {species} {grade}", **loads)
            add(type="tension", material="glulam", species=species, grade=grade, size="130x228", length="4.0",
                service=service, P_D="5", P_S="8")
            # line loads on a long beam (shear method (b), C_V) and given forces (K_Le 'other')
            add(type="bending", material="glulam", species=species, grade=grade, size="auto", length="9.0", Lu="3.0",
                service=service, bearing="150", w_D="2", w_L="3", w_S="4")
            add(type="bending", material="glulam", species=species, grade=grade, size="130x456", length="9.0",
                Lu="9.0", service=service, M_D="20", M_L="20", V_D="9", V_L="9")
    for size in data.files["sizes_sawn.csv"].rows:
        b, d = dict.__getitem__(size, "b"), dict.__getitem__(size, "d")
        cells = dict(material="sawn", species="S-P-F", grade="No.1", size=f"{b}x{d}", length="3.0")
        add(type="tension", P_D="3", P_L="5", **cells)
        if int(d) >= int(b) and int(b) <= 102:
            add(type="bending", Lu="0", bearing="89", w_D="0.5", w_L="1.0", w_S="1.0", **cells)
            add(type="bending", Lu="3.0", w_D="0.5", w_W="1.0", **cells)
    for restraint in ("purlins", "blocking", "both-edges"):
        add(type="bending", material="sawn", species="D.Fir-L", grade="No.1/No.2", size="38x286", length="4.0",
            Lu="0" if restraint != "purlins" else "1.2", restraint=restraint, w_D="0.5", w_L="1.0",
            **({"Lu_bottom": "0"} if restraint == "both-edges" else {}))
    add(type="bending", material="sawn", species="S-P-F", grade="No.1/No.2", size="38x235", plies="3", K_H="1.4",
        length="4.0", Lu="0", w_D="1", w_L="2", net_area="0.8")
    add(type="bending", material="sawn", species="S-P-F", grade="No.1/No.2", size="auto", length="3.0", Lu="0",
        live_use="storage", w_D="0.5", w_L="2")
    add(type="compression", material="sawn", species="Hem-Fir", grade="No.1", size="140x241", length="3.0",
        K_H="1.2", P_D="5", P_L="3")
    add(type="tension", material="sawn", species="Hem-Fir", grade="No.1", size="140x241", length="3.0", K_H="1.2",
        P_D="5", P_L="3")
    return rows


@pytest.fixture(scope="module")
def reads(tmp_path_factory, monkeypatch_module):
    data, reads = tracked_data()
    monkeypatch_module.setattr(data_module, "_DEFAULT", data)  # validation and the column bounds read it too
    columns._columns()
    designs = []
    for path in (DEMO / "schedule.csv",
                 write_schedule(tmp_path_factory.mktemp("rows"), synthetic_rows(data))):
        schedule = load_schedule(path, data)
        designs += design_all(schedule.entries, data, path.name)
    return reads, designs


@pytest.fixture(scope="module")
def monkeypatch_module():
    patch = pytest.MonkeyPatch()
    yield patch
    patch.undo()


def test_the_synthetic_members_design(reads):
    # the set must design, or it reaches nothing: a few may be refused (a grade not tabled for a size)
    _, designs = reads
    failed = [d for d in designs if d.errors]
    assert len(failed) < 0.1 * len(designs), sorted({d.errors[0].split(": ", 1)[1][:90] for d in failed})


def test_every_data_row_is_read_or_informative(reads):
    read, _ = reads
    unread = []
    for name in BUILTIN_FILES:
        rows = data_module.builtin_files()[name].rows
        unread += [f"{name} row {i + 2}: {dict(r)}" for i, r in enumerate(rows)
                   if (name, i) not in read and not informative(r)]
    assert not unread, "\n".join(unread)


def test_informative_rows_are_not_read(reads):
    # a row marked informative that the code reads would leave a value off the checker's list
    read, _ = reads
    wrong = [(name, i) for name in BUILTIN_FILES
             for i, r in enumerate(data_module.builtin_files()[name].rows) if informative(r) and (name, i) in read]
    assert not wrong


def test_unregistered_data_files_are_informative_or_revision_notes(reads):
    # files outside BUILTIN_FILES are not read through DataSet: each row is informative, or (the O86:19
    # revisions) applies to some member designed here
    _, designs = reads
    folder = resources.files("timbersheets") / "data"
    notes = " ".join(n for d in designs for n in edition.revision_notes(d))
    for entry in folder.iterdir():
        if not entry.name.endswith(".csv") or entry.name in BUILTIN_FILES:
            continue
        rows = list(csv.DictReader(entry.read_text(encoding="utf-8").splitlines()))
        if entry.name == "o86_revisions.csv":
            assert all(r["topic"] in notes for r in rows), [r["topic"] for r in rows if r["topic"] not in notes]
        else:
            assert all(informative(r) for r in rows), entry.name
