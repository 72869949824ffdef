"""The job folder: project.toml (title block, code editions, revision)."""

from __future__ import annotations

import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from .errors import JobError

PROJECT_FIELDS = ("title", "number", "client", "location", "engineer", "designer", "checker", "revision", "date")
SUPPORTED_CODES = {"nbc": ("2020",), "o86": ("2019",)}
#: Where a job's outputs go (runner.job_dir), as the README and `run --help` say it.
OUTPUT_RULE = ("outputs/<job>/ beside the calcsheets/ folder that holds the job; for a job folder anywhere "
               "else, its own outputs/ subfolder")
REVISION_CHARS = set("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789.-_")


@dataclass
class Project:
    """A job: its folder, title block data and code editions."""

    folder: Path
    fields: dict[str, str]
    codes: dict[str, str]
    materials: Path | None = None
    extra: dict = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)

    @property
    def name(self) -> str:
        return self.folder.name

    @property
    def revision(self) -> str:
        return self.fields["revision"]

    @property
    def schedule_path(self) -> Path:
        for name in ("schedule.csv", "schedule.xlsx"):
            if (self.folder / name).exists():
                return self.folder / name
        return self.folder / "schedule.csv"


def load_project(folder: Path) -> Project:
    """Read ``folder/project.toml``. Raises JobError (exit 2) when it is unusable."""
    path = folder / "project.toml"
    if not folder.is_dir():
        raise JobError(str(folder), "is not a job folder", "Create one with: timbersheets new DIR")
    if not path.exists():
        raise JobError(str(path), "is missing", "Every job folder needs project.toml (timbersheets new DIR makes one)")
    try:
        doc = tomllib.loads(path.read_text(encoding="utf-8-sig"))
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
        raise JobError(str(path), f"is not valid TOML ({exc})") from None
    proj = doc.get("project")
    if not isinstance(proj, dict):
        raise JobError(str(path), "has no [project] table", f"Give [project] with {', '.join(PROJECT_FIELDS)}")
    fields = {k: str(proj.get(k, "")).strip() for k in PROJECT_FIELDS}
    if not fields["revision"]:
        raise JobError(str(path), "[project] revision is blank", 'Give a revision label, e.g. revision = "A"')
    if not set(fields["revision"]) <= REVISION_CHARS:
        raise JobError(str(path), f"[project] revision '{fields['revision']}' has characters a folder name cannot carry",
                       "Use letters, digits, '.', '-' or '_' (e.g. A, B, 0, 1.1)")
    codes = {k: str(v) for k, v in doc.get("codes", {}).items()}
    for key, allowed in SUPPORTED_CODES.items():
        codes.setdefault(key, allowed[0])
        if codes[key] not in allowed:
            raise JobError(str(path), f"[codes] {key} = '{codes[key]}' is not supported",
                           f"This version designs to {key.upper()} {', '.join(allowed)}")
    materials = None
    data = doc.get("data", {})
    if data.get("materials"):
        materials = (folder / str(data["materials"])).resolve()
        if not materials.exists():
            raise JobError(str(path), f"[data] materials file '{data['materials']}' does not exist",
                           "Give a path relative to the job folder")
    return Project(folder, fields, codes, materials, doc, placeholder_warnings(path, fields))


# What `timbersheets new` writes, and no real job keeps.
PLACEHOLDERS = {"title": "New project", "number": "0000"}


def placeholder_warnings(path: Path, fields: dict[str, str]) -> list[str]:
    """Title-block fields still holding the scaffold's text, or a blank title."""
    out = [f"{path}: [project] {key} is still the placeholder '{value}' written by timbersheets new; "
           "it prints on the cover and every title block"
           for key, value in PLACEHOLDERS.items() if fields[key] == value]
    if not fields["title"]:
        out.append(f"{path}: [project] title is blank; the cover and every title block print no project name")
    return out


PROJECT_TEMPLATE = '''# timbersheets job: title block data, code editions, revision.
[project]
title = "New project"
number = "0000"
client = ""
location = ""
engineer = ""      # engineer of record
designer = ""      # initials
checker = ""       # initials
revision = "A"
date = "{date}"

[codes]
nbc = "2020"
o86 = "2019"

# [data]
# materials = "firm-data.csv"   # the firm's data file (timbersheets data DIR --firm-file); wins over the built-in tables
'''

SCHEDULE_TEMPLATE = (
    "mark,type,material,species,grade,size,service,length,Ke,Lx,Ly,Lu,restraint,bearing,P_D,P_L,P_S,w_D,w_L,w_S,note\n"
    "C-1,compression,sawn,S-P-F,No.1,140x140,dry,3.0,1.0,3.0,3.0,,,,20,15,,,,,example post: replace with your members\n"
    "B-1,bending,sawn,S-P-F,No.1/No.2,38x235,dry,3.6,,,,0,,89,,,,0.24,0.76,,"
    "example floor joist at 400 mm centres (0.6 kPa dead and 1.9 kPa live); Lu = 0: top edge held by the nailed subfloor\n"
)
