"""Marks and revision labels: they become file and folder names, so they are bounded."""

from __future__ import annotations

import re

MAX_LABEL = 40  # characters; a mark or revision is a short code, and file names have limits
_LABEL = re.compile(r"[A-Za-z0-9._-]+")


def label_problem(text: str) -> str:
    """Why `text` cannot be a mark or revision label (a file or folder name), or ''."""
    if not text:
        return "is blank"
    if len(text) > MAX_LABEL:
        return f"is {len(text)} characters long; at most {MAX_LABEL}"
    if not _LABEL.fullmatch(text):
        return "has characters a file name cannot carry (letters, digits, '.', '-' and '_' only)"
    if set(text) == {"."}:
        return "is only dots, which a folder name cannot be"
    return ""
