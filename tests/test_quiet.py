"""A user's console shows only the tool's own lines: no build-tool or plotting warnings."""

from __future__ import annotations

import re
import tomllib
import warnings

from conftest import REPO


def test_license_is_an_spdx_string_for_setuptools_77():
    # setuptools 77 deprecates the `project.license` table form (a warning on every install) in
    # favour of an SPDX expression string, which older setuptools cannot read (setuptools docs,
    # "Configuring setuptools using pyproject.toml", license).
    doc = tomllib.loads((REPO / "pyproject.toml").read_text(encoding="utf-8"))
    assert isinstance(doc["project"]["license"], str) and doc["project"]["license"] == "MIT"
    (setuptools,) = [r for r in doc["build-system"]["requires"] if r.startswith("setuptools")]
    assert tuple(int(p) for p in re.search(r">=\s*([\d.]+)", setuptools).group(1).split(".")) >= (77,)


def test_chart_without_designed_members_draws_without_warnings():
    from timbersheets.sheet.charts import utilization_chart

    errored = [{"mark": "X-1", "utilization": None, "status": "error"}]
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # matplotlib's "Tight layout not applied" is a UserWarning
        for members in ([], errored, [{"mark": "C-1", "utilization": 0.5, "status": "pass"}]):
            assert utilization_chart(members, "Test job rev A: governing utilization")[:4] == b"\x89PNG"


def test_unloaded_span_diagram_draws_without_warnings():
    from timbersheets.engineering.analysis import span_diagram
    from timbersheets.sheet.diagrams import shear_moment_png

    with warnings.catch_warnings():
        warnings.simplefilter("error")  # "Attempting to set identical low and high ylims"
        assert shear_moment_png(span_diagram(0.0, 3000.0, 200.0))[:4] == b"\x89PNG"

