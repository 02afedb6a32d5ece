"""Files: atomic writes, output guards and fingerprints. Inputs are only ever read; outputs appear whole
or not at all, never over an input, with the mode a normal write gives them.
"""

from __future__ import annotations

import contextlib
import errno
import hashlib
import os
import secrets
import stat
from collections.abc import Iterable, Iterator
from pathlib import Path

from .errors import InputError, Where

__all__ = ["atomic_path", "atomic_write", "check_outputs", "make_folder", "same_file", "sha256",
           "writable_folder"]

PathLike = str | os.PathLike[str]


def same_file(a: PathLike, b: PathLike) -> bool:
    """Whether ``a`` and ``b`` name the same file by any spelling.

    The same resolved path (``./sub/../x.xlsx``, a symlink to it) or, when both exist, the same device
    and inode (a hard link; a case-insensitive file system's other spelling).

    >>> same_file("x.xlsx", "./sub/../x.xlsx")
    True
    """
    if Path(a).resolve() == Path(b).resolve():
        return True
    try:
        return os.path.samefile(a, b)
    except OSError:  # one of them does not exist (or cannot be looked at): not the same file
        return False


def _stat(path: Path) -> os.stat_result | None:
    try:
        return path.stat()
    except OSError:
        return None


def _unwritable_folder(folder: Path) -> tuple[str, str] | None:
    """Why files cannot be created in ``folder`` (message, hint), or None when they can.

    A missing folder is created by the writer, so what counts is the nearest folder that exists: it must
    be a folder (not a file) and writable.
    """
    for above in (folder, *folder.parents):
        st = _stat(above)
        if st is None:
            continue
        if not stat.S_ISDIR(st.st_mode):
            return f"{above} is a file, not a folder", "give a path in a folder"
        if not os.access(above, os.W_OK | os.X_OK):
            return f"no permission to write in the folder {above}", "give a path in a folder you can write to"
        return None
    return None  # pragma: no cover (the root folder exists)


def _unwritable(target: Path) -> tuple[str, str] | None:
    """Why ``target`` cannot be written as a file (message, hint), or None when it can."""
    st = _stat(target)
    if st is not None and stat.S_ISDIR(st.st_mode):
        return "is a folder, not a file", "give a file name, e.g. one inside that folder"
    reason = _unwritable_folder(Path(os.path.abspath(target)).parent)
    return (f"cannot be written: {reason[0]}", reason[1]) if reason else None


def check_outputs(outputs: Iterable[tuple[str | None, PathLike]],
                  inputs: Iterable[tuple[str, PathLike]] = ()) -> None:
    """Refuse outputs that would destroy an input, clash with each other, or cannot be written.

    ``outputs`` are ``(option, path)`` pairs (the option names the output in the message, e.g.
    ``"--junit"``; None for none), ``inputs`` are ``(what, path)`` pairs, e.g. ``("the datasheet",
    "pump.xlsx")``. Raises :class:`~sheetpump.errors.InputError` naming the option and the path for the
    first output that is one of the inputs by any spelling (:func:`same_file`), is the same file as an
    earlier output, or cannot be written (a folder, in a read-only folder, under a file).
    Nothing is written here.

    >>> check_outputs([("-o", "report.txt"), ("--junit", "./report.txt")])
    Traceback (most recent call last):
    ...
    sheetpump.errors.InputError: ./report.txt (--junit): is the same file as -o report.txt (give each ...)
    """
    inputs = list(inputs)
    seen: list[tuple[str | None, PathLike]] = []
    for option, path in outputs:
        where = Where(file=str(path), field=option)
        for what, source in inputs:
            if same_file(path, source):
                hint = "give another file name"
                if str(path) != str(source):
                    hint = f"it is {source}; give another file name"
                raise InputError(f"would overwrite {what}, an input", where, hint)
        for other_option, other in seen:
            if same_file(path, other):
                label = f"{other_option} {other}" if other_option else str(other)
                raise InputError(f"is the same file as {label}", where, "give each output its own file name")
        reason = _unwritable(Path(path))
        if reason:
            raise InputError(reason[0], where, reason[1])
        seen.append((option, path))


def writable_folder(option: str | None, folder: PathLike) -> None:
    """Refuse a folder output that is a file or cannot be created or written in (one line, InputError)."""
    folder = Path(folder)
    where = Where(file=str(folder), field=option)
    st = _stat(folder)
    if st is not None and not stat.S_ISDIR(st.st_mode):
        raise InputError("is a file, not a folder", where, "give a new or an existing folder")
    reason = _unwritable_folder(Path(os.path.abspath(folder)))
    if reason:
        raise InputError(f"cannot be written: {reason[0]}", where, reason[1])


def make_folder(folder: PathLike) -> Path:
    """Create ``folder`` (and missing folders above it) or refuse with one line naming it."""
    folder = Path(folder)
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        writable_folder(None, folder)  # the clear reason, where there is one
        raise InputError(f"cannot create the folder ({exc.strerror or exc})", Where(file=str(folder))) from None
    return folder


def _new_part(target: Path) -> Path:
    """Create an empty temporary file beside ``target``, with the mode a normal write would give.

    ``os.open(..., 0o666)`` lets the umask apply, as for any new file (``-rw-r--r--`` under umask 022);
    ``tempfile.mkstemp`` would make it ``-rw-------`` whatever the umask.
    """
    for _ in range(100):
        tmp = target.with_name(f".{target.name}.{secrets.token_hex(4)}.part")
        try:
            fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
        except FileExistsError:
            continue
        os.close(fd)
        return tmp
    raise FileExistsError(errno.EEXIST, "no free temporary name", str(target))  # pragma: no cover


@contextlib.contextmanager
def atomic_path(target: PathLike) -> Iterator[Path]:
    """Yield a temporary path beside ``target``; on success rename it over ``target``.

    If the body raises (or the process is killed), ``target`` keeps whatever it held before and the
    temporary file is removed (on a kill it may stay behind, named ``.<name>.*.part``). Missing folders
    above ``target`` are created. The output gets the mode a normal write gives a new file (the umask
    applies), or keeps the mode of the file it replaces. A target that cannot be written (a folder, in a
    read-only folder, under a file) raises :class:`~sheetpump.errors.InputError` naming it, before anything is written.
    """
    target = Path(target)
    reason = _unwritable(target)
    if reason:
        raise InputError(reason[0], Where(file=str(target)), reason[1])
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        tmp_path = _new_part(target)
    except OSError as exc:  # e.g. a read-only file system, or root-owned folder seen by os.access wrongly
        raise InputError(f"cannot be written ({exc.strerror or exc})", Where(file=str(target)),
                         "give a path in a folder you can write to") from None
    try:
        mode = stat.S_IMODE(os.stat(target).st_mode)  # replacing a file: keep its mode
    except OSError:
        mode = stat.S_IMODE(os.stat(tmp_path).st_mode)  # a new file: the umask's mode, as created
    try:
        yield tmp_path
        with open(tmp_path, "rb+") as handle:
            os.fsync(handle.fileno())
        os.chmod(tmp_path, mode)  # the body's writer may have made its own file
        try:
            os.replace(tmp_path, target)
        except OSError as exc:  # the target changed under us (became a folder, lost its permission)
            raise InputError(f"cannot be written ({exc.strerror or exc})", Where(file=str(target)),
                             "give another file name") from None
    finally:
        if tmp_path.exists():
            tmp_path.unlink()


def atomic_write(target: PathLike, data: bytes | str) -> Path:
    """Write ``data`` to ``target`` atomically (temporary file, then rename)."""
    payload = data.encode("utf-8") if isinstance(data, str) else data
    with atomic_path(target) as tmp:
        tmp.write_bytes(payload)
    return Path(target)


def sha256(path: PathLike) -> str:
    """SHA-256 of a file's bytes, as hex."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()
