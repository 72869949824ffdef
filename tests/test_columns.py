"""The column reference is made from the column table, and the docs hold the same."""

import subprocess
import sys
from pathlib import Path

from timbersheets.columnref import markdown
from timbersheets.schedule import COLUMNS

REPO = Path(__file__).resolve().parent.parent


def test_every_column_has_a_meaning():
    blank = [name for name, col in COLUMNS.items() if not col.meaning.strip()]
    assert blank == [], f"columns without a meaning: {blank}"


def test_docs_column_reference_matches_the_code():
    on_disk = (REPO / "docs" / "columns.md").read_text(encoding="utf-8")
    assert on_disk == markdown(), "docs/columns.md is stale: run tools/write-column-reference"


def test_columns_command_prints_every_column():
    out = subprocess.run([sys.executable, "-m", "timbersheets.cli", "columns"], capture_output=True, text=True,
                         check=True).stdout
    heads = [line.split()[0] for line in out.splitlines() if line and not line.startswith(" ")]
    assert heads == list(COLUMNS)
    # the unit of a bare number and a default, as the table gives them
    assert "length [m]  (default: required, except on a beam that gives spans)" in out
    assert "defl_L  (default: 360)" in out
