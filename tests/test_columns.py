"""The column reference is made from the column table, and the docs hold the same."""

from pathlib import Path

from timbersheets.schedule.columnref import markdown
from timbersheets.schedule.read import COLUMNS

REPO = Path(__file__).resolve().parent.parent


def test_every_column_has_a_meaning():
    blank = [name for name, col in COLUMNS.items() if not col.meaning.strip()]
    assert blank == [], f"columns without a meaning: {blank}"


def test_docs_column_reference_matches_the_code():
    on_disk = (REPO / "docs" / "columns.md").read_text(encoding="utf-8")
    assert on_disk == markdown(), "docs/columns.md is stale: run tools/write-column-reference"


def test_columns_command_prints_every_column(capsys):
    from timbersheets.cli import main

    assert main(["columns"]) == 0
    out = capsys.readouterr().out
    heads = [line.split()[0] for line in out.splitlines() if line and not line.startswith(" ")]
    assert heads == list(COLUMNS)
    # the unit of a bare number and a default, as the table gives them
    assert "length [m]  (default: required, except on a beam that gives spans)" in out
    assert "defl_L  (default: 360)" in out


DOCS = ["README.md", "DEVELOPERS.md", "docs/columns.md", "docs/results.md", "lib/timbersheets/data/README.md",
        "templates/latex/README.md"]


def test_the_docs_stand_alone():
    # nothing a user or contributor reads points outside the repository, and every relative link resolves
    import re

    for name in DOCS:
        path = REPO / name
        text = path.read_text(encoding="utf-8")
        assert "../shared" not in text and "/work/" not in text and "shared/" not in text, name
        for target in re.findall(r"\]\(([^)#\s]+)\)", text):
            if not target.startswith(("http://", "https://")):
                assert (path.parent / target).exists(), (name, target)


def test_results_reference_names_every_command():
    from timbersheets.cli import COMMANDS

    text = (REPO / "docs" / "results.md").read_text(encoding="utf-8")
    missing = [name for name in COMMANDS if f"`{name}`" not in text and f"`timbersheets {name}`" not in text]
    assert missing == []
