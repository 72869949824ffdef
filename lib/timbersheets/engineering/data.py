"""Data tables with provenance: strengths, factors, combinations, sizes.

Each value is a :class:`Datum` that knows the file, table and row it came from
and whether it has been verified against the standard. A firm may point a job at
its own data file (``[data] materials`` in project.toml, read by
:mod:`timbersheets.engineering.firmdata`); its values win over the built-in ones, in any
table. Every value a member uses travels with the check result that read it
(:mod:`timbersheets.engineering.checks.context`), so the sheet and results.json can list the
unverified ones.
"""

from __future__ import annotations

import csv
import hashlib
from collections.abc import Mapping
from dataclasses import replace
from functools import cached_property
from importlib import resources
from pathlib import Path

from ..errors import DataError
from .datum import (TABLES, UNVERIFIED, VERIFIED_STATUSES, DataFile, Datum, TableSpec,  # noqa: F401 (read from here too)
                    _table, key_text)

BUILTIN_FILES = (
    "sawn_strengths.csv",
    "glulam_strengths.csv",
    "glulam_factors.csv",
    "service_factors.csv",
    "size_factors_sawn.csv",
    "bearing_factors.csv",
    "resistance_factors.csv",
    "duration_factors.csv",
    "nbc2020_uls_combinations.csv",
    "sizes_sawn.csv",
    "sizes_glulam.csv",
    "glulam_laminations.csv",
    "sls_combinations.csv",
    "lateral_restraint_sawn.csv",
    "bending_effective_length.csv",
    "bearing_size_factors.csv",
    "system_factors.csv",
    "densities.csv",
    "clause_values.csv",
)

#: The `use` column's marker for a row no code path reads: it documents the standard (a table the schedule
#: takes a value from instead, a size offered on special order). Tables without informative rows have no
#: `use` column; a blank `use` means the row is read.
INFORMATIVE = "informative"


def informative(row: Mapping[str, str]) -> bool:
    """Whether a data row is marked as documentation only (its `use` column)."""
    return (row.get("use") or "").strip() == INFORMATIVE


def combined_status(*datums: Datum) -> str:
    """A derived value is only as verified as the least verified of its inputs."""
    for d in datums:
        if not d.verified:
            return d.status
    return "verified" if any(d.status == "verified" for d in datums) else "sourced"


def _read(path: Path, name: str) -> DataFile:
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise DataError(str(path), f"cannot be read ({exc.strerror})") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[:exc.start].count(b"\n") + 1
        raise DataError(str(path), f"is not UTF-8 text (line {line}, byte {exc.start}); save it as CSV UTF-8") from None
    rows = tuple(csv.DictReader(text.splitlines()))
    return DataFile(name, path, hashlib.sha256(raw).hexdigest(), rows)


def builtin_files() -> dict[str, DataFile]:
    """Every built-in data file, by name."""
    base = resources.files("timbersheets") / "data"
    return {name: _read(Path(str(base / name)), name) for name in BUILTIN_FILES}


class DataSet:
    """All data tables of one run: built-in files plus an optional firm file."""

    def __init__(self, materials: Path | None = None) -> None:
        from .firmdata import merge, read_firm

        self.builtin = builtin_files()
        self.firm = read_firm(materials, self.builtin) if materials else None
        self.files: dict[str, DataFile] = merge(self.builtin, self.firm) if self.firm else dict(self.builtin)

    # -- provenance -----------------------------------------------------------
    @cached_property
    def hash(self) -> str:
        """One hash over every data file in use (order-independent names)."""
        digest = hashlib.sha256()
        for name in sorted(self.files):
            digest.update(f"{name}:{self.files[name].sha256}\n".encode())
        if self.firm:
            digest.update(f"firm:{self.firm.sha256}\n".encode())
        return "sha256:" + digest.hexdigest()

    def manifest(self) -> list[dict[str, object]]:
        """Which data files were used, with their hashes (for results.json)."""
        items: list[dict[str, object]] = [{"file": f"timbersheets/data/{f.name}", "sha256": f.sha256}
                                          for f in self.builtin.values()]
        if self.firm:
            items.append(self.firm.summary())
        return items

    def _datum(self, file: DataFile, row: dict[str, str], label: str, column: str = "value",
               symbol: str = "") -> Datum:
        from .firmdata import provenance

        try:
            value = float(row[column])
        except (KeyError, ValueError):
            raise DataError(file.name, f"{label}: '{row.get(column)}' is not a number") from None
        spec = TABLES.get(file.name)
        unit = row.get("unit", "").strip() or (spec.unit if spec else "-")
        base = Datum(value, label, _table(row), row.get("source", "").strip(), row.get("status", "").strip(),
                     file.name, symbol or label.split(" ")[0], file.name, key_text(file.name, row), column, unit,
                     row.get("edition", "").strip())
        return provenance(base, row, spec)

    def value_datums(self, datum: Datum) -> list[Datum]:
        """The values a checker ticks for `datum`: itself, the parts of a derived value, or
        each load factor of a combination row."""
        memo = self.__dict__.setdefault("_values_memo", {})
        token = (datum.data, datum.key, datum.column, datum.label)
        if token not in memo:
            memo[token] = self._value_datums(datum)
        return memo[token]

    def _value_datums(self, datum: Datum) -> list[Datum]:
        out = []
        for d in datum.tabled():
            spec = TABLES.get(d.data)
            if spec is None or d.column in spec.values:
                out.append(d)
                continue
            file = self.files[d.data]
            row = next(r for r in file.rows if key_text(d.data, r) == d.key)
            out += [self._datum(file, row, f"{d.label}, factor on {c}", c, c) for c in spec.values]
        return out

    def all_datums(self) -> list[Datum]:
        """Every value of every table a firm file can supply, in file order."""
        out = []
        for name, spec in TABLES.items():
            file = self.files[name]
            for row in file.rows:
                label = " ".join(row.get(k, "").strip() for k in spec.keys)
                out += [self._datum(file, row, f"{label} {c}" if len(spec.values) > 1 else label, c, c)
                        for c in spec.values]
        return out

    def _find(self, file_name: str, label: str, column: str = "value", **key: str) -> Datum:
        memo = self.__dict__.setdefault("_memo", {})
        token = (file_name, label, column, tuple(sorted(key.items())))
        if token not in memo:
            memo[token] = self._search(file_name, label, column, **key)
        return memo[token]

    def _search(self, file_name: str, label: str, column: str = "value", **key: str) -> Datum:
        file = self.files[file_name]
        for row in file.rows:
            if all(row.get(k, "").strip() == v for k, v in key.items()):
                return self._datum(file, row, label, column)
        raise DataError(file_name, f"no value for {label}")

    # -- strengths ------------------------------------------------------------
    def sawn_strength(self, species: str, grade: str, category: str, prop: str) -> Datum:
        label = f"{prop} {species} {grade} {category}"
        return self._find("sawn_strengths.csv", label, species=species, grade=grade, category=category, property=prop)

    def glulam_strength(self, species: str, grade: str, prop: str) -> Datum:
        label = f"{prop} {species} {grade} glulam"
        return self._find("glulam_strengths.csv", label, species=species, grade=grade, property=prop)

    def glulam_factor(self, name: str) -> Datum:
        return self._find("glulam_factors.csv", f"glulam {name}", name=name)

    def glulam_grades(self) -> dict[str, set[str]]:
        """Glulam stress grades by species: the built-in ones and any a firm file adds."""
        out: dict[str, set[str]] = {}
        for row in self.files["glulam_strengths.csv"].rows:
            out.setdefault(row["species"], set()).add(row["grade"])
        return out

    def species(self, material: str) -> set[str]:
        """Species with specified strengths for `material` (sawn or glulam), firm ones included."""
        return {row["species"] for row in self.files[f"{material}_strengths.csv"].rows}

    @cached_property
    def firm_sawn_grades(self) -> frozenset[tuple[str, str]]:
        """(grade, category) pairs a firm file adds to the sawn strengths."""
        return frozenset((r["grade"], r["category"]) for r in self.files["sawn_strengths.csv"].rows if r.get("_added"))

    # -- factors --------------------------------------------------------------
    def service_factor(self, material: str, category: str, prop: str, service: str) -> Datum:
        label = f"{prop} {material} {category} {service} service"
        return self._find("service_factors.csv", label, material=material, category=category, property=prop, service=service)

    def system_factor_limit(self, applies_to: str) -> Datum:
        """The largest tabled K_H for `applies_to` (compression, tension, bending, shear)."""
        file = self.files["system_factors.csv"]
        rows = [r for r in file.rows if r["applies_to"] == applies_to]
        row = max(rows, key=lambda r: float(r["value"]))
        return self._datum(file, row, f"K_H at most {float(row['value']):g} for {applies_to}", symbol="K_H")

    def glulam_system_factor(self) -> Datum:
        """K_H of glulam members (the schedule may not give another)."""
        return self._find("system_factors.csv", "K_H glulam", case="glulam", applies_to="all")

    def clause_value(self, name: str, applies_to: str = "all") -> Datum:
        """A value the standard states in a clause rather than a table: a limit (C_c_max, C_B_max,
        net_area_min) or the value of a factor where it does not apply (K_B_end); `applies_to` sawn,
        glulam or all."""
        symbol = {"C_c_max": "C_c,max", "C_B_max": "C_B,max", "K_B_end": "K_B", "net_area_min": "A_n/A_g"}.get(name, name)
        words = {"K_B_end": "at end bearings", "net_area_min": "least"}.get(name, "")
        label = " ".join(w for w in (symbol, applies_to if applies_to != "all" else "", words) if w)
        return replace(self._find("clause_values.csv", label, name=name, applies_to=applies_to), symbol=symbol)

    def resistance_factor(self, action: str) -> Datum:
        return self._find("resistance_factors.csv", f"phi {action}", "phi", action=action)

    def density(self, material: str, species: str, service: str) -> Datum:
        """Density for the member's own weight (kg/m³), by material, species and service condition."""
        return self._find("densities.csv", f"rho {material} {species} {service}", "density", material=material,
                          species=species, service=service)

    def duration_factor(self, cls: str) -> Datum:
        return self._find("duration_factors.csv", f"K_D {cls} term", "K_D", **{"class": cls})

    def size_factor_sawn(self, factor: str, thickness: float, larger: float) -> Datum:
        """K_Zb or K_Zt of dimension lumber: the row whose bound covers `larger` (mm)."""
        file = self.files["size_factors_sawn.csv"]
        rows = [
            r for r in file.rows
            if r["factor"] == factor and float(r["thickness_min"]) <= thickness <= float(r["thickness_max"])
        ]
        rows.sort(key=lambda r: float(r["larger_dim_max"]))
        for row in rows:
            if larger <= float(row["larger_dim_max"]):
                label = f"{factor} {thickness:g} mm thick, {larger:g} mm"
                return self._datum(file, row, label)
        raise DataError(file.name, f"no {factor} row for {thickness:g} mm thick, {larger:g} mm wide")

    # -- bending members -------------------------------------------------------
    def lateral_restraints(self) -> list[tuple[str, Datum]]:
        """Depth-to-width limits for K_L = 1.0 (sawn), loosest restraint first."""
        file = self.files["lateral_restraint_sawn.csv"]
        out = [(r["restraint"], self._datum(file, r, f"d/b limit, {r['description']}", "d_over_b_max", "d/b"))
               for r in file.rows]
        return sorted(out, key=lambda item: item[1].value)

    def bending_effective_length(self, case: str) -> Datum:
        """Factor on the unsupported length L_u giving L_e, for a loading case."""
        return self._find("bending_effective_length.csv", f"K_Le {case}", "factor", case=case)

    def bearing_size_factor(self, width_over_depth: float) -> tuple[float, list[Datum]]:
        """K_Zcp for a width/depth ratio: the table rows, linear between them."""
        file = self.files["bearing_size_factors.csv"]
        rows = sorted(((float(r["width_over_depth"]), self._datum(file, r, f"K_Zcp at width/depth {r['width_over_depth']}",
                                                                  symbol="K_Zcp")) for r in file.rows),
                      key=lambda item: item[0])
        (r0, d0), (r1, d1) = rows[0], rows[-1]
        if width_over_depth <= r0:
            return d0.value, [d0]
        if width_over_depth >= r1:
            return d1.value, [d1]
        share = (width_over_depth - r0) / (r1 - r0)
        return d0.value + share * (d1.value - d0.value), [d0, d1]

    def sls_factors(self) -> list[tuple[str, str, Datum]]:
        """(check, load type, factor) of the serviceability combinations."""
        file = self.files["sls_combinations.csv"]
        return [(r["check"], r["load"], self._datum(file, r, f"SLS combination {r['check']} {r['load']}", "factor"))
                for r in file.rows]

    def glulam_widest_board(self, width: float) -> Datum:
        """Width of the widest single board of a standard glulam width (for K_Zbg), mm.

        A width made from one lamstock board counts as one board of the finished
        width; a width made from two boards side by side (``89+140``) counts as
        its wider lamstock board.
        """
        file = self.files["sizes_glulam.csv"]
        for row in file.rows:
            if float(row["width"]) == width:
                pieces = [float(p) for p in row["lamstock"].split("+")]
                value = max(pieces) if len(pieces) > 1 else width
                return Datum(value, f"b_lam widest board of {width:g} mm glulam (lamstock {row['lamstock']})",
                             row.get("edition", ""), row.get("source", "").strip(), row.get("status", "").strip(),
                             file.name, "b_lam", file.name, f"width={row['width']}", "lamstock", "mm")
        raise DataError(file.name, f"no standard glulam width {width:g} mm")

    # -- combinations and sizes ----------------------------------------------
    @cached_property
    def combination_rows(self) -> tuple[dict[str, str], ...]:
        return self.files["nbc2020_uls_combinations.csv"].rows

    @cached_property
    def sawn_sizes(self) -> tuple[tuple[str, int, int], ...]:
        return tuple((r["category"], int(r["b"]), int(r["d"])) for r in self.files["sizes_sawn.csv"].rows)

    @cached_property
    def glulam_widths(self) -> tuple[int, ...]:
        return tuple(sorted(int(r["width"]) for r in self.files["sizes_glulam.csv"].rows))

    @cached_property
    def lamination(self) -> tuple[float, float]:
        row = self.files["glulam_laminations.csv"].rows[0]
        return float(row["thickness"]), float(row["min_depth"])

    # -- recording -------------------------------------------------------------
    @staticmethod
    def warnings_for(used: list[Datum]) -> list[str]:
        """One line per unverified value used; the load combinations together on one line
        (one line per provenance, when a firm file supplies some of them)."""
        seen: dict[str, None] = {}
        combos: dict[tuple[str, str, str, str], dict[str, Datum]] = {}
        for d in (t for u in used for t in u.tabled()):  # a derived value: the tabled values behind it
            if d.verified:
                continue
            if d.label.startswith("NBC combination "):
                combos.setdefault((d.firm, d.status, d.table, d.file), {}).setdefault(d.label.split(" ", 2)[2], d)
            else:
                seen[d.warning] = None
        for group in combos.values():
            first = next(iter(group.values()))
            seen[replace(first, label=f"NBC combinations {', '.join(group)}").warning] = None
        return list(seen)


_DEFAULT: DataSet | None = None


def default_data() -> DataSet:
    """The built-in data set, read once per process (used for validation)."""
    global _DEFAULT
    if _DEFAULT is None:
        _DEFAULT = DataSet()
    return _DEFAULT
