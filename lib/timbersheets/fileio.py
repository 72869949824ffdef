"""Writing files so that an interrupted run never leaves a half-written one."""

from __future__ import annotations

import csv
import hashlib
import io
import json
import math
import os
import re
import shutil
import stat
import tempfile
from collections.abc import Iterator
from contextlib import contextmanager
from functools import lru_cache
from pathlib import Path
from typing import Any, BinaryIO

from .errors import OutputError


def write_atomic(path: Path, data: bytes | str, mode: int | None = None) -> None:
    """Write `data` to a temporary file beside `path`, fsync it, then rename it into place.

    The file gets `mode`, else the mode of the file it replaces, else what the umask
    allows (never mkstemp's private 0600). On any failure the temporary file is
    removed; a full disk or a read-only folder becomes an OutputError naming the folder.
    """
    raw = data.encode("utf-8") if isinstance(data, str) else data
    with _staged(path, mode) as (handle, _tmp):
        handle.write(raw)


def copy_atomic(src: Path, dst: Path) -> None:
    """Copy `src` to `dst` the same way, keeping the source's mode (a private file stays private)."""
    with open(src, "rb") as source, _staged(dst, stat.S_IMODE(os.fstat(source.fileno()).st_mode)) as (handle, _):
        shutil.copyfileobj(source, handle, 1 << 20)


@contextmanager
def _staged(path: Path, mode: int | None) -> Iterator[tuple[BinaryIO, str]]:
    tmp = None
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        if mode is None:
            mode = stat.S_IMODE(path.stat().st_mode) if path.is_file() else _umask_mode()
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.{os.getpid()}.", suffix=".part", dir=path.parent)
        os.fchmod(fd, mode)
        with os.fdopen(fd, "wb") as handle:
            yield handle, tmp
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp, path)
        tmp = None
    except OSError as exc:
        raise OutputError(path.parent, exc) from None
    finally:
        if tmp is not None:
            Path(tmp).unlink(missing_ok=True)


_PART = re.compile(r"^\..+\.(\d+)\.[^.]+\.part$")


def remove_stale_parts(folder: Path) -> int:
    """Remove the temporary files of writers that were killed (their process is gone); how many."""
    from .lifetime import pid_alive

    removed = 0
    for path in folder.rglob(".*.part") if folder.is_dir() else ():
        match = _PART.match(path.name)
        if match and not pid_alive(int(match.group(1))):
            path.unlink(missing_ok=True)
            removed += 1
    return removed


def _umask_mode() -> int:
    """0666 less the process umask: what open() would give a new file."""
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


def write_json(path: Path, doc: Any) -> None:
    """Strict JSON: a NaN or infinity that reached the document is written as null, never bare."""
    try:
        text = json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False)
    except ValueError:  # a NaN or infinity: only then the copy without them (a fifth of the write)
        text = json.dumps(finite(doc), indent=2, ensure_ascii=False, allow_nan=False)
    write_atomic(path, text + "\n")


def finite(doc: Any) -> Any:
    """`doc` with every non-finite float replaced by None."""
    if isinstance(doc, float):
        return doc if math.isfinite(doc) else None
    if isinstance(doc, dict):
        return {k: finite(v) for k, v in doc.items()}
    if isinstance(doc, (list, tuple)):
        return [finite(v) for v in doc]
    return doc


#: A number, maybe signed, maybe with a unit: what a spreadsheet shows as typed (-5 kN, -1, +0.25 kN/m).
_PLAIN_NUMBER = re.compile(r"[+-]?\d[\d.,]*(?:[eE][+-]?\d+)?(?: ?[A-Za-z°%·²³]+(?:[/*·][A-Za-z°%·²³]+)*)?")


def spreadsheet_safe(value: Any) -> Any:
    """Keep a text cell from becoming a formula in a spreadsheet.

    Text starting with =, @, tab or CR, or with + or - and not a plain number
    (``-5 kN`` and mark ``-1`` stay as they are), gets a leading apostrophe, which
    spreadsheets show as plain text. Numbers are left as they are.
    """
    if not isinstance(value, str) or not value:
        return value
    if value[0] in ("=", "@", "\t", "\r") or (value[0] in "+-" and value not in "+-"
                                                 and not _PLAIN_NUMBER.fullmatch(value)):
        return "'" + value
    return value


def write_csv(path: Path, header: list[str], rows: list[list[Any]]) -> None:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(header)
    for row in rows:
        writer.writerow([spreadsheet_safe(v) for v in row])
    write_atomic(path, buffer.getvalue())


def file_hash(path: Path) -> str:
    """SHA-256 of a file, read once per version of it (templates are hashed for every member)."""
    st = path.stat()
    return _file_hash(str(path), st.st_mtime_ns, st.st_size)


@lru_cache(maxsize=64)
def _file_hash(path: str, mtime_ns: int, size: int) -> str:
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()


@lru_cache(maxsize=1)
def library_fingerprint() -> str:
    """A hash of the library's own source and data: any change re-executes members (and re-sizes them)."""
    from . import __version__

    root = Path(__file__).resolve().parent
    digest = hashlib.sha256(__version__.encode())
    for path in sorted(root.rglob("*")):
        if path.suffix in (".py", ".csv", ".toml") and "__pycache__" not in path.parts:
            digest.update(path.relative_to(root).as_posix().encode())
            digest.update(path.read_bytes())
    return digest.hexdigest()
