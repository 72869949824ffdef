"""The package works outside this checkout: what it imports is declared, what it reads is shipped."""

import ast
import json
import os
import subprocess
import sys
import tomllib
from importlib.metadata import packages_distributions
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parent.parent
PYPROJECT = tomllib.loads((REPO / "pyproject.toml").read_text(encoding="utf-8"))


def _imports(source: str) -> set[str]:
    names = set()
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, ast.Import):
            names |= {a.name.split(".")[0] for a in node.names}
        elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
            names.add(node.module.split(".")[0])
    return names


def _shipped_imports() -> set[str]:
    """Top-level modules imported by the library and by the templates' code cells."""
    names = set()
    for path in (REPO / "lib").rglob("*.py"):
        names |= _imports(path.read_text(encoding="utf-8"))
    for path in (REPO / "templates").glob("*.ipynb"):
        for cell in json.loads(path.read_text(encoding="utf-8"))["cells"]:
            if cell["cell_type"] == "code":
                source = "".join(cell["source"])
                names |= _imports("\n".join(ln for ln in source.splitlines() if not ln.lstrip().startswith("%")))
    return names - set(sys.stdlib_module_names) - {"timbersheets"}


def _requirement_names(requirements: list[str]) -> set[str]:
    import re

    return {re.split(r"[<>=!~ \[;]", r, maxsplit=1)[0].lower().replace("_", "-") for r in requirements}


def test_every_direct_import_is_a_declared_dependency():
    declared = _requirement_names(PYPROJECT["project"]["dependencies"])
    dists = packages_distributions()
    missing = {}
    for module in sorted(_shipped_imports()):
        names = {d.lower().replace("_", "-") for d in dists.get(module, [module])}
        if not names & declared:
            missing[module] = sorted(names)
    assert missing == {}, f"imported but not in [project] dependencies: {missing}"


def test_test_only_and_lab_tools_are_extras():
    declared = _requirement_names(PYPROJECT["project"]["dependencies"])
    extras = PYPROJECT["project"]["optional-dependencies"]
    assert "pypdf" not in declared and "pypdf" in _requirement_names(extras["dev"])
    assert "pypdf" not in _shipped_imports()
    assert "jupyterlab" in _requirement_names(extras["lab"]) and "jupyterlab" not in declared


def test_private_apis_are_held_below_the_next_major():
    by_name = {r.split(">")[0].split("<")[0]: r for r in PYPROJECT["project"]["dependencies"]}
    assert "<2" in by_name["handcalcs"] and "<3" in by_name["papermill"]


def test_every_library_package_is_listed():
    """The package list is explicit (templates/ is mapped in); a new sub-package must be added to it."""
    listed = set(PYPROJECT["tool"]["setuptools"]["packages"])
    on_disk = {".".join(p.relative_to(REPO / "lib").parts) for p in (REPO / "lib" / "timbersheets").rglob("*")
               if p.is_dir() and p.name != "__pycache__" and any(p.iterdir())}
    # templates/ folders too: setuptools warns "Package would be ignored" on every install for a folder
    # of package data that is importable but not listed (setuptools docs, "Package Discovery")
    templates = {"timbersheets.templates." + ".".join(p.relative_to(REPO / "templates").parts)
                 for p in (REPO / "templates").rglob("*") if p.is_dir() and p.name != "__pycache__" and any(p.iterdir())}
    assert on_disk | templates | {"timbersheets", "timbersheets.templates"} == listed
    assert PYPROJECT["tool"]["setuptools"]["package-dir"]["timbersheets.templates"] == "templates"


def test_importing_the_library_builds_no_unit_registry():
    """Nor imports pint (0.3 s): the design's own conversions are exact SI factors; a unit that is
    not one of them (feet) builds the registry."""
    code = ("import sys, timbersheets.schedule.read, timbersheets.job.results, timbersheets.engineering.units as u; "
            "a = u.registry.cache_info().currsize; u.convert(1.0, 'm', 'mm'); u.convert(2.0, 'kN*m', 'N*mm'); "
            "print(a, u.registry.cache_info().currsize, 'pint' in sys.modules, round(u.convert(1.0, 'ft', 'mm'), 9), "
            "u.registry.cache_info().currsize)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.split() == ["0", "0", "False", "304.8", "1"]  # 1 ft = 304.8 mm exactly (international foot)


def test_the_exact_conversion_factors_are_pints():
    """Each factor the design uses without pint is the one pint's definitions give (SI prefixes)."""
    import math

    from timbersheets.engineering.units import EXACT_FACTORS, registry, unit

    for (a, b), factor in EXACT_FACTORS.items():
        assert math.isclose(float(registry().Quantity(1.0, unit(a)).to(unit(b)).magnitude), factor, rel_tol=1e-12), (a, b)


@pytest.mark.pipeline
def test_a_wheel_installed_elsewhere_builds_a_sheet(tmp_path):
    """Build the wheel, install it outside the checkout, and run a job from another folder."""
    wheels, site, elsewhere = tmp_path / "wheels", tmp_path / "site", tmp_path / "elsewhere"
    elsewhere.mkdir()
    subprocess.run([sys.executable, "-m", "pip", "wheel", "-q", "--no-deps", "-w", str(wheels), str(REPO)], check=True)
    wheel = next(wheels.glob("timbersheets-*.whl"))
    subprocess.run([sys.executable, "-m", "pip", "install", "-q", "--no-deps", "--target", str(site), str(wheel)],
                   check=True)
    env = {k: v for k, v in os.environ.items() if k != "TIMBERSHEETS_TEMPLATES"} | {"PYTHONPATH": str(site)}
    where = subprocess.run([sys.executable, "-c", "from timbersheets.build.notebooks import templates_dir; "
                            "print(templates_dir())"], cwd=elsewhere, env=env, capture_output=True, text=True,
                           check=True).stdout.strip()
    assert Path(where) == site / "timbersheets" / "templates"
    job = elsewhere / "job"
    job.mkdir()
    for name in ("project.toml", "schedule.csv"):
        (job / name).write_bytes((REPO / "calcsheets" / "kestrel-cove-boathouse" / name).read_bytes())
    run = subprocess.run([sys.executable, "-m", "timbersheets.cli", "run", "job", "--only", "C-3", "--jobs", "1",
                          "--out", "out"], cwd=elsewhere, env=env, capture_output=True, text=True)
    assert run.returncode in (0, 1), run.stderr
    results = json.loads((elsewhere / "out" / "rev-A" / "results.json").read_text())
    c3 = next(m for m in results["members"] if m["mark"] == "C-3")
    assert c3["status"] == "pass" and c3["errors"] == []
    assert (elsewhere / "out" / "rev-A" / "sheets" / "C-3.pdf").stat().st_size > 10_000
