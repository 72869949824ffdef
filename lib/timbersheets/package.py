"""The combined package PDF (placeholder until the package layout lands)."""

from __future__ import annotations


def build_package(project, designs, data, outdir, sheets):
    return None
