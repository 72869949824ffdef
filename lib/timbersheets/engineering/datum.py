"""A tabled value and where it came from: :class:`Datum`, the built-in tables' keys, a data file.

The lowest floor of the data: :mod:`timbersheets.engineering.firmdata` corrects these and
:mod:`timbersheets.engineering.data` (the :class:`~timbersheets.engineering.data.DataSet`) reads them.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path

UNVERIFIED = "memory-unverified"
#: Statuses that count as checked: read in a published source, or verified by the firm.
VERIFIED_STATUSES = ("sourced", "verified")


@dataclass(frozen=True)
class TableSpec:
    """How the rows of one built-in table are keyed, and which columns hold values."""

    keys: tuple[str, ...]
    values: tuple[str, ...]
    unit: str = "-"  # unit of the values, unless the row has a `unit` column
    firm_may_add: bool = False  # a firm file may add rows (new species and grades)


#: Every built-in table a firm file may correct, with the columns that identify a row.
TABLES = {
    "sawn_strengths.csv": TableSpec(("species", "grade", "category", "property"), ("value",), "MPa", True),
    "glulam_strengths.csv": TableSpec(("species", "grade", "property"), ("value",), "MPa", True),
    "glulam_factors.csv": TableSpec(("name",), ("value",)),
    "service_factors.csv": TableSpec(("material", "category", "property", "service"), ("value",)),
    "size_factors_sawn.csv": TableSpec(("factor", "thickness_min", "thickness_max", "larger_dim_max"), ("value",)),
    "bearing_factors.csv": TableSpec(("bearing_length",), ("value",)),
    "bearing_size_factors.csv": TableSpec(("width_over_depth",), ("value",)),
    "resistance_factors.csv": TableSpec(("action",), ("phi",)),
    "duration_factors.csv": TableSpec(("class",), ("K_D",)),
    "nbc2020_uls_combinations.csv": TableSpec(("id",), ("D", "L", "S", "W", "E")),
    "sls_combinations.csv": TableSpec(("check", "load"), ("factor",)),
    "lateral_restraint_sawn.csv": TableSpec(("restraint",), ("d_over_b_max",)),
    "bending_effective_length.csv": TableSpec(("case",), ("factor",)),
    "system_factors.csv": TableSpec(("case", "applies_to"), ("value",)),
    "densities.csv": TableSpec(("material", "species", "service"), ("density",)),
    "clause_values.csv": TableSpec(("name", "applies_to"), ("value",)),
}


def key_text(table: str, row: Mapping[str, str]) -> str:
    """The row's key as a firm file writes it: ``species=S-P-F; grade=No.1/No.2; …``."""
    spec = TABLES.get(table)
    if spec is None:
        return ""
    return "; ".join(f"{k}={row.get(k, '').strip()}" for k in spec.keys)


@dataclass(frozen=True)
class Datum:
    """One data value and where it came from."""

    value: float
    label: str  # e.g. "f_t S-P-F No.1/No.2 dimension"
    table: str  # e.g. "O86-14 Table 6.3.1A"
    source: str
    status: str
    file: str
    symbol: str = ""  # the O86 symbol the value stands for (f_t, K_Sc, phi …)
    data: str = ""  # the built-in table the value belongs to (sawn_strengths.csv …)
    key: str = ""  # the row's key in that table (see key_text)
    column: str = "value"
    unit: str = "-"
    edition: str = ""
    firm: str = ""  # the firm file that supplied the value, if one did
    builtin: float | None = None  # the built-in value, when the firm's value differs from it
    verified_by: str = ""
    verified_on: str = ""
    parts: tuple["Datum", ...] = ()  # the tabled values a derived value is computed from

    @property
    def verified(self) -> bool:
        return self.status in VERIFIED_STATUSES

    @property
    def warning(self) -> str:
        if self.firm:
            return f"{self.label}: {self.status} in firm file {self.firm} ({self.table})"
        return f"{self.label}: memory, unverified ({self.table}; {self.file})"

    @property
    def status_text(self) -> str:
        if self.firm and self.verified:
            return f"verified by {self.verified_by} {self.verified_on}".strip()
        return "unverified" if not self.verified else self.status

    @property
    def correction(self) -> str:
        """A note when the firm's value differs from the built-in one, else ''."""
        if self.builtin is None:
            return ""
        return (f"{self.label} = {self.value:g} from firm file {self.firm} differs from the built-in "
                f"value {self.builtin:g}")

    def record(self) -> dict[str, object]:
        """The value and its provenance, for results.json."""
        out: dict[str, object] = {"item": self.label, "symbol": self.symbol, "value": self.value, "unit": self.unit,
                                  "table": self.table, "source": self.source, "status": self.status,
                                  "file": self.file}
        if self.firm:
            out.update(verified_by=self.verified_by, verified_on=self.verified_on)
        if self.builtin is not None:
            out["builtin_value"] = self.builtin
        return out

    def tabled(self) -> tuple["Datum", ...]:
        """The tabled values behind this one (itself, or the parts of a derived value)."""
        return tuple(p for part in self.parts for p in part.tabled()) if self.parts else (self,)


@dataclass(frozen=True)
class DataFile:
    name: str
    path: Path
    sha256: str
    rows: tuple[dict[str, str], ...]


def _table(row: dict[str, str]) -> str:
    """'O86-14 Table 6.3.1A' or 'O86-14 Cl. 5.1.4': where in the standard a row comes from."""
    edition = row.get("edition", "").strip()
    if row.get("table", "").strip():
        ref = row["table"].strip()
        ref = f"Table {ref}" if ref[0].isdigit() else ref
    elif row.get("clause", "").strip():
        ref = f"Cl. {row['clause'].strip()}"
    else:
        ref = ""
    return " ".join(p for p in (edition, ref) if p)
