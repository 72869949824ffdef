"""Species and grade names, and the specified strengths a member uses."""

from __future__ import annotations

from dataclasses import dataclass, field

from .data import DataSet, Datum, combined_status
from .sections import Section, sawn_category

SAWN_SPECIES = {"D.Fir-L": "D.Fir-L", "DFL": "D.Fir-L", "Hem-Fir": "Hem-Fir", "HF": "Hem-Fir",
                "S-P-F": "S-P-F", "SPF": "S-P-F", "Northern": "Northern", "NOR": "Northern"}
GLULAM_SPECIES = {"D.Fir-L": "D.Fir-L", "DFL": "D.Fir-L", "Spruce-Pine": "Spruce-Pine", "SP": "Spruce-Pine"}

SAWN_GRADES = ("SS", "No.1", "No.2", "No.1/No.2", "No.3", "Stud", "No.3/Stud")
#: Dimension-lumber tables group grades with equal values (CSA O86 dimension lumber table).
DIMENSION_GRADE_GROUP = {"SS": "SS", "No.1": "No.1/No.2", "No.2": "No.1/No.2", "No.1/No.2": "No.1/No.2",
                         "No.3": "No.3/Stud", "Stud": "No.3/Stud", "No.3/Stud": "No.3/Stud"}
TIMBER_GRADES = ("SS", "No.1", "No.2")

SAWN_PROPERTIES = ("f_b", "f_v", "f_c", "f_cp", "f_t", "E", "E05")
GLULAM_PROPERTIES = ("f_b_pos", "f_b_neg", "f_v", "f_c", "f_cb", "f_cp", "f_tn", "f_tg", "E")


def canonical(name: str, table: dict[str, str]) -> str | None:
    """The table's name for `name`, accepting short forms and any letter case."""
    folded = {k.casefold(): v for k, v in table.items()}
    return folded.get(name.strip().casefold())


def canonical_grade(grade: str, allowed: tuple[str, ...]) -> str | None:
    folded = {g.casefold().replace(" ", ""): g for g in allowed}
    return folded.get(grade.strip().casefold().replace(" ", ""))


@dataclass
class Strengths:
    """Specified strengths (MPa) of one member with the data each came from."""

    material: str
    species: str
    grade: str  # as in the schedule
    table_grade: str  # as tabled (e.g. No.1/No.2)
    category: str  # dimension | beam-stringer | post-timber | glulam
    values: dict[str, Datum] = field(default_factory=dict)

    @property
    def description(self) -> str:
        names = {"dimension": "dimension lumber", "beam-stringer": "beams and stringers",
                 "post-timber": "posts and timbers", "glulam": "glued-laminated timber"}
        return f"{self.species} {self.grade} {names[self.category]}"


def sawn_table_grade(grade: str, category: str,
                     firm_grades: frozenset[tuple[str, str]] = frozenset()) -> str | None:
    """The tabled grade for a schedule grade, or None if the category has no such grade.

    `firm_grades` holds the (grade, category) pairs a firm data file adds; such a
    grade is its own tabled grade."""
    if (grade, category) in firm_grades:
        return grade
    if category == "dimension":
        return DIMENSION_GRADE_GROUP.get(grade)
    return grade if grade in TIMBER_GRADES else None


def strengths(data: DataSet, material: str, species: str, grade: str, section: Section) -> Strengths:
    """Look up every specified strength of the member (each with its provenance)."""
    if material == "glulam":
        out = Strengths(material, species, grade, grade, "glulam")
        for prop in GLULAM_PROPERTIES:
            out.values[prop] = data.glulam_strength(species, grade, prop)
        ratio = data.glulam_factor("E05_ratio")
        e05 = out.values["E"].value * ratio.value
        e = out.values["E"]
        out.values["E05"] = Datum(e05, f"E05 = {ratio.value:g} E of {species} {grade} glulam",
                                  f"{e.table}; {ratio.table}", f"{e.source}; {ratio.source}",
                                  combined_status(e, ratio), ratio.file, "E05", unit="MPa", parts=(e, ratio))
        return out
    category = sawn_category(section)
    table_grade = sawn_table_grade(grade, category, data.firm_sawn_grades)
    if table_grade is None:
        raise ValueError(f"grade {grade} is not tabled for {category}")
    out = Strengths(material, species, grade, table_grade, category)
    for prop in SAWN_PROPERTIES:
        out.values[prop] = data.sawn_strength(species, table_grade, category, prop)
    return out


SAWN_CATEGORIES = ("dimension", "beam-stringer", "post-timber")


def support_f_cp(data: DataSet, material: str, species: str, grade: str) -> Datum:
    """f_cp of a supporting member whose size the schedule does not give: the lowest over the size
    categories that table the grade (sawn), or the grade's own value (glulam)."""
    if material == "glulam":
        return data.glulam_strength(species, grade, "f_cp")
    found = [data.sawn_strength(species, g, c, "f_cp") for c in SAWN_CATEGORIES
             if (g := sawn_table_grade(grade, c)) is not None]
    if not found:
        raise ValueError(f"grade {grade} is not tabled for any sawn size")
    return min(found, key=lambda d: d.value)


def parse_support(text: str) -> tuple[str, str, str] | str:
    """`bears_on` as (material, species, grade) for timber, or 'steel' / 'concrete'. Raises ValueError."""
    words = text.split()
    if len(words) == 1 and words[0].casefold() in ("steel", "concrete"):
        return words[0].casefold()
    if len(words) != 3 or words[0].casefold() not in ("sawn", "glulam"):
        raise ValueError("is not 'steel', 'concrete' or 'sawn|glulam <species> <grade>'")
    material = words[0].casefold()
    species = canonical(words[1], GLULAM_SPECIES if material == "glulam" else SAWN_SPECIES)
    if species is None:
        raise ValueError(f"names a species that is not a {material} species")
    return material, species, words[2]
