"""The job folder: project.toml (title block, code editions, revision)."""

from __future__ import annotations

import os
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from ..engineering.edition import SUPPORTED_CODES  # noqa: F401 (read from here too)
from ..errors import JobError
from ..schedule.labels import label_problem

PROJECT_FIELDS = ("title", "number", "client", "location", "engineer", "designer", "checker", "revision", "date")
#: Where a job's outputs go (job_dir), as the README and `run --help` say it.
OUTPUT_RULE = ("outputs/<job>/ beside the job folder, or beside calcsheets/ when the job folder is in one "
               "(as in this repository)")
MAX_FIELD = 300  # characters in a title-block field


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


def job_dir(project: Project, out: Path | None) -> Path:
    """The folder holding a job's rev-<R>/ folders: `out`, else project.OUTPUT_RULE.

    The rule depends only on where the job folder is, never on where the command
    is run from, so run, diff and review always agree.
    """
    if out is not None:
        return out
    folder = project.folder.resolve()
    beside = folder.parent.parent if folder.parent.name == "calcsheets" else folder.parent
    return beside / "outputs" / folder.name


def load_project(folder: Path) -> Project:
    """Read ``folder/project.toml``. Raises JobError (exit 2) when it is unusable."""
    path = folder / "project.toml"
    if not folder.is_dir():
        raise JobError(str(folder), "is not a job folder", "Create one with: timbersheets new DIR")
    if not path.exists():
        raise JobError(str(path), "is missing", "Every job folder needs project.toml (timbersheets new DIR makes one)")
    if not path.is_file():
        raise JobError(str(path), "is not a file", "project.toml is a text file in the job folder")
    doc = _read_toml(path)
    proj = doc.get("project")
    if not isinstance(proj, dict):
        raise JobError(str(path), "has no [project] table", f"Give [project] with {', '.join(PROJECT_FIELDS)}")
    fields = {k: str(proj.get(k, "")).strip() for k in PROJECT_FIELDS}
    long = [k for k, v in fields.items() if len(v) > MAX_FIELD]
    if long:
        raise JobError(str(path), f"[project] {long[0]} is {len(fields[long[0]]):,} characters long",
                       f"A title-block field holds at most {MAX_FIELD} characters")
    problem = label_problem(fields["revision"])
    if problem:
        raise JobError(str(path), f"[project] revision '{fields['revision'][:50]}' {problem}",
                       'Give a short revision label, e.g. revision = "A" (letters, digits, ".", "-" or "_")')
    codes = {k: str(v) for k, v in _table(path, doc, "codes").items()}
    for key, allowed in SUPPORTED_CODES.items():
        codes.setdefault(key, allowed[0])
        if codes[key] not in allowed:
            raise JobError(str(path), f"[codes] {key} = '{codes[key][:50]}' is not supported",
                           f"This version designs to {key.upper()} {', '.join(allowed)}")
    materials = _materials(path, folder, _table(path, doc, "data").get("materials"))
    return Project(folder, fields, codes, materials, doc, placeholder_warnings(path, fields))


def _read_toml(path: Path) -> dict:
    try:
        return tomllib.loads(path.read_text(encoding="utf-8-sig"))
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
        raise JobError(str(path), f"is not valid TOML ({exc})", "Save it as UTF-8 text") from None
    except RecursionError:
        raise JobError(str(path), "nests arrays or tables too deeply to be a project file") from None


def _table(path: Path, doc: dict, name: str) -> dict:
    value = doc.get(name, {})
    if not isinstance(value, dict):
        raise JobError(str(path), f"'{name}' is a {type(value).__name__}, not a table",
                       f"Write it as a [{name}] table, e.g. [codes] then nbc = \"2020\"")
    return value


def _materials(path: Path, folder: Path, given: object) -> Path | None:
    """The firm materials file: inside the job folder or a firm folder named in the user's config."""
    if not given:
        return None
    materials = (folder / str(given)).resolve()
    allowed = [folder.resolve(), *firm_folders()]
    if not any(materials.is_relative_to(a) for a in allowed):
        raise JobError(str(path), f"[data] materials '{given}' is outside the job folder",
                       f"Keep it in the job folder, or name its folder in {user_config()} as "
                       "[data] firm_folders = [\"/path\"]")
    if not materials.is_file():
        raise JobError(str(path), f"[data] materials file '{given}' does not exist or is not a file",
                       "Give a path relative to the job folder")
    return materials


def user_config() -> Path:
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "timbersheets" / "config.toml"


def firm_folders() -> list[Path]:
    """Folders the user's config allows firm data files in (``[data] firm_folders``)."""
    path = user_config()
    if not path.is_file():
        return []
    doc = _read_toml(path)
    folders = _table(path, doc, "data").get("firm_folders", [])
    if not isinstance(folders, list):
        raise JobError(str(path), "[data] firm_folders is not a list of folders")
    return [Path(str(f)).expanduser().resolve() for f in folders]


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
