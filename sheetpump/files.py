"""Files: atomic writes and fingerprints. Inputs are only ever read; outputs appear whole or not at all."""

from __future__ import annotations

import contextlib
import hashlib
import os
import tempfile
from collections.abc import Iterator
from pathlib import Path

__all__ = ["atomic_path", "atomic_write", "sha256"]


@contextlib.contextmanager
def atomic_path(target: str | os.PathLike[str]) -> Iterator[Path]:
    """Yield a temporary path beside ``target``; on success rename it over ``target``.

    If the body raises (or the process is killed), ``target`` keeps whatever it held before and the
    temporary file is removed (on a kill it may stay behind, named ``.<name>.*.part``).
    """
    target = Path(target)
    target.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=target.parent)
    os.close(fd)
    tmp_path = Path(tmp)
    try:
        yield tmp_path
        with open(tmp_path, "rb+") as handle:
            os.fsync(handle.fileno())
        os.replace(tmp_path, target)
    finally:
        if tmp_path.exists():
            tmp_path.unlink()


def atomic_write(target: str | os.PathLike[str], data: bytes | str) -> Path:
    """Write ``data`` to ``target`` atomically (temporary file, then rename)."""
    payload = data.encode("utf-8") if isinstance(data, str) else data
    with atomic_path(target) as tmp:
        tmp.write_bytes(payload)
    return Path(target)


def sha256(path: str | os.PathLike[str]) -> str:
    """SHA-256 of a file's bytes, as hex."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()
