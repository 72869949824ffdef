"""Writing files so that an interrupted run never leaves a half-written one."""

from __future__ import annotations

import csv
import io
import json
import math
import os
import tempfile
from pathlib import Path
from typing import Any


def write_atomic(path: Path, data: bytes | str) -> None:
    """Write `data` to a temporary file beside `path`, then rename it into place."""
    path.parent.mkdir(parents=True, exist_ok=True)
    raw = data.encode("utf-8") if isinstance(data, str) else data
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(raw)
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def write_json(path: Path, doc: Any) -> None:
    """Strict JSON: a NaN or infinity that reached the document is written as null, never bare."""
    write_atomic(path, json.dumps(finite(doc), indent=2, ensure_ascii=False, allow_nan=False) + "\n")


def finite(doc: Any) -> Any:
    """`doc` with every non-finite float replaced by None."""
    if isinstance(doc, float):
        return doc if math.isfinite(doc) else None
    if isinstance(doc, dict):
        return {k: finite(v) for k, v in doc.items()}
    if isinstance(doc, (list, tuple)):
        return [finite(v) for v in doc]
    return doc


def spreadsheet_safe(value: Any) -> Any:
    """Keep a text cell from becoming a formula in a spreadsheet (=, +, -, @, tab, CR).

    Numbers are left as they are; text that starts with a formula character gets a
    leading apostrophe, which spreadsheets show as plain text.
    """
    if isinstance(value, str) and value[:1] in ("=", "+", "-", "@", "\t", "\r"):
        return "'" + value
    return value


def write_csv(path: Path, header: list[str], rows: list[list[Any]]) -> None:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(header)
    for row in rows:
        writer.writerow([spreadsheet_safe(v) for v in row])
    write_atomic(path, buffer.getvalue())
