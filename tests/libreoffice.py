"""LibreOffice Calc as the outside reference for workbooks that sheetpump writes.

Tests write a workbook, let LibreOffice (headless ``soffice``) load it, recompute every formula and save it
again, then read the recomputed values back with openpyxl. Because LibreOffice is an independent spreadsheet
engine, agreement between its values and ours is evidence that the formulas we write mean what we think.

Recalculation is forced, not hoped for: by default LibreOffice shows the values cached in an .xlsx (its
``OOXMLRecalcMode`` default is "never recalculate", and it ignores ``<calcPr fullCalcOnLoad="1"/>``, which
XlsxWriter writes). Every call therefore runs ``soffice`` with a fresh, throw-away user profile
(``-env:UserInstallation=file:///...``) whose ``registrymodifications.xcu`` sets
``org.openoffice.Office.Calc/Formula/Load`` ``OOXMLRecalcMode`` and ``ODFRecalcMode`` to 0 ("always
recalculate"). A fresh profile per call also means no lock on a shared profile, so calls may run in
parallel, and a start costs about a second either way.

Several files can be converted by one ``soffice`` start (:func:`recalculate_many`, :func:`to_pdf_many`);
tests should do that in a module-scoped fixture.

Missing LibreOffice: tests marked with :data:`needs_soffice` are skipped with a clear reason, unless the
environment variable ``SHEETPUMP_REQUIRE_SOFFICE=1`` is set (CI sets it), in which case they run and fail
with :class:`LibreOfficeMissingError`, so CI cannot pass by skipping. ``SHEETPUMP_SOFFICE`` may name the
executable when it is not on ``PATH``.

>>> recalc_mode_value("always"), recalc_mode_value("never")
(0, 1)
"""

from __future__ import annotations

import os
import shutil
import signal
import subprocess
import tempfile
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Any, Literal, TypeVar

import openpyxl
import pytest

__all__ = [
    "REQUIRE_ENV",
    "SOFFICE_ENV",
    "LibreOfficeError",
    "LibreOfficeMissingError",
    "convert_many",
    "formula_cells",
    "needs_soffice",
    "read_values",
    "recalc_mode_value",
    "recalculate",
    "recalculate_many",
    "recalculated_values",
    "require_soffice",
    "soffice_command",
    "soffice_path",
    "to_pdf",
    "to_pdf_many",
]

#: Set to 1 to make a missing LibreOffice an error instead of a skip (CI does).
REQUIRE_ENV = "SHEETPUMP_REQUIRE_SOFFICE"
#: Optional path of the soffice executable, when it is not on PATH.
SOFFICE_ENV = "SHEETPUMP_SOFFICE"

#: Seconds one soffice run may take before it is killed: a start is ~1 s, a first start on a cold CI
#: machine a few seconds; a hung start (e.g. a dialog nobody can answer) must not hang the test run.
DEFAULT_TIMEOUT = 120.0

# Places soffice lives when it is not on PATH (macOS app bundle, Windows default install).
_KNOWN_PLACES = (
    "/Applications/LibreOffice.app/Contents/MacOS/soffice",
    r"C:\Program Files\LibreOffice\program\soffice.exe",
)

Recalc = Literal["always", "never", "default"]
_RECALC_VALUES = {"always": 0, "never": 1}  # officecfg Calc.xcs: 0 always, 1 never, 2 ask

# The PDF export filter; SinglePageSheets puts each whole sheet on one page sized to its used range.
_PDF_FILTER = "calc_pdf_Export"
_PDF_SINGLE_PAGE = 'calc_pdf_Export:{"SinglePageSheets":{"type":"boolean","value":"true"}}'


class LibreOfficeMissingError(RuntimeError):
    """soffice is not installed (or not where SHEETPUMP_SOFFICE says)."""


class LibreOfficeError(RuntimeError):
    """A soffice run failed, timed out, or did not produce the expected file."""


# --------------------------------------------------------------------------------------------- finding it


def soffice_path() -> str | None:
    """Path of the LibreOffice ``soffice`` executable, or None when it is not installed.

    Looks at ``$SHEETPUMP_SOFFICE``, then ``soffice`` and ``libreoffice`` on PATH, then the usual install
    places on macOS and Windows.
    """
    named = os.environ.get(SOFFICE_ENV)
    if named:
        return named if os.path.isfile(named) and os.access(named, os.X_OK) else None
    for name in ("soffice", "libreoffice"):
        found = shutil.which(name)
        if found:
            return found
    for place in _KNOWN_PLACES:
        if os.path.isfile(place):
            return place
    return None


def _required() -> bool:
    return os.environ.get(REQUIRE_ENV, "").strip().lower() in {"1", "true", "yes"}


def _missing_reason() -> str:
    named = os.environ.get(SOFFICE_ENV)
    where = f"{SOFFICE_ENV}={named!r} is not an executable file" if named else "soffice is not on PATH"
    return (
        f"LibreOffice Calc is needed as the outside reference but {where} "
        "(Debian: apt-get install libreoffice-calc-nogui)"
    )


def _soffice() -> str:
    found = soffice_path()
    if found is None:
        raise LibreOfficeMissingError(_missing_reason())
    return found


def require_soffice() -> str:
    """soffice's path for a test or fixture: skip without it, or fail when SHEETPUMP_REQUIRE_SOFFICE=1.

    Called in a fixture's setup, a failure shows as an ERROR in pytest's summary.
    """
    found = soffice_path()
    if found is not None:
        return found
    if _required():
        pytest.fail(f"{_missing_reason()}; {REQUIRE_ENV}=1 forbids skipping", pytrace=False)
    pytest.skip(_missing_reason())


_T = TypeVar("_T")


class _NeedsSoffice:
    """Marks a test (function or class) as needing LibreOffice.

    As a decorator: ``@needs_soffice``. For a whole module: ``pytestmark = needs_soffice.marks``.
    Adds the ``libreoffice`` marker (so ``-m "not libreoffice"`` deselects) and, when soffice is absent
    and SHEETPUMP_REQUIRE_SOFFICE is not set, a skip with the reason. With the variable set nothing is
    skipped: the test runs and fails with :class:`LibreOfficeMissingError`.
    """

    @property
    def marks(self) -> list[pytest.MarkDecorator]:
        marks = [pytest.mark.libreoffice]
        if soffice_path() is None and not _required():
            marks.append(pytest.mark.skip(reason=_missing_reason()))
        return marks

    def __call__(self, obj: _T) -> _T:
        for mark in self.marks:
            obj = mark(obj)
        return obj


needs_soffice = _NeedsSoffice()


# ----------------------------------------------------------------------------------------- the profile


def recalc_mode_value(recalc: Recalc) -> int | None:
    """The ``OOXMLRecalcMode``/``ODFRecalcMode`` value for a mode; None for "default" (leave it alone).

    >>> recalc_mode_value("default") is None
    True
    """
    if recalc == "default":
        return None
    try:
        return _RECALC_VALUES[recalc]
    except KeyError:
        raise ValueError(f"recalc must be 'always', 'never' or 'default', not {recalc!r}") from None


def _registry_xml(recalc: Recalc) -> str:
    value = recalc_mode_value(recalc)
    items = []
    if value is not None:
        for prop in ("OOXMLRecalcMode", "ODFRecalcMode"):
            items.append(
                '<item oor:path="/org.openoffice.Office.Calc/Formula/Load">'
                f'<prop oor:name="{prop}" oor:op="fuse"><value>{value}</value></prop></item>'
            )
    return (
        '<?xml version="1.0" encoding="UTF-8"?>\n'
        '<oor:items xmlns:oor="http://openoffice.org/2001/registry" '
        'xmlns:xs="http://www.w3.org/2001/XMLSchema" '
        'xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance">\n' + "\n".join(items) + "\n</oor:items>\n"
    )


def _make_profile(root: Path, recalc: Recalc) -> Path:
    user = root / "user"
    user.mkdir(parents=True)
    (user / "registrymodifications.xcu").write_text(_registry_xml(recalc), encoding="utf-8")
    return root


def soffice_command(soffice: str, profile: Path, target: str, out_dir: Path, inputs: Sequence[Path]) -> list[str]:
    """The soffice command line that converts ``inputs`` to ``target`` in ``out_dir``."""
    return [
        soffice,
        f"-env:UserInstallation={profile.resolve().as_uri()}",
        "--headless",
        "--norestore",
        "--nolockcheck",
        "--convert-to",
        target,
        "--outdir",
        str(out_dir),
        *(str(path) for path in inputs),
    ]


# ----------------------------------------------------------------------------------------- converting


def _run(command: list[str], timeout: float) -> subprocess.CompletedProcess[str]:
    # Own process group, so a timeout kills soffice.bin too, not only the soffice shell wrapper.
    with subprocess.Popen(
        command,
        stdin=subprocess.DEVNULL,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        start_new_session=True,
    ) as proc:
        try:
            out, err = proc.communicate(timeout=timeout)
        except subprocess.TimeoutExpired:
            _kill_group(proc)
            out, err = proc.communicate()
            raise LibreOfficeError(
                f"soffice did not finish within {timeout:g} s: {' '.join(command)}\nstdout:\n{out}\nstderr:\n{err}"
            ) from None
        return subprocess.CompletedProcess(command, proc.returncode, out, err)


def _kill_group(proc: subprocess.Popen[str]) -> None:
    try:
        if hasattr(os, "killpg"):
            os.killpg(proc.pid, signal.SIGKILL)
        else:  # pragma: no cover - Windows
            proc.kill()
    except ProcessLookupError:
        pass


def convert_many(
    paths: Iterable[str | os.PathLike[str]],
    out_dir: str | os.PathLike[str],
    target: str,
    *,
    extension: str,
    recalc: Recalc = "always",
    timeout: float = DEFAULT_TIMEOUT,
) -> list[Path]:
    """Convert files with one soffice start; return the written files, in the order given.

    ``target`` is soffice's ``--convert-to`` argument (``"xlsx"``, ``"pdf"``, ``"pdf:filter:options"``)
    and ``extension`` the suffix it produces. Inputs are never touched: soffice writes into a private
    folder inside ``out_dir`` and each result is then renamed into place, so ``out_dir`` sees whole files
    only. Raises :class:`LibreOfficeError` (with soffice's output) when soffice fails, times out or leaves
    a file out, and ``ValueError`` when two outputs would share a name or an output would replace an input.
    """
    inputs = [Path(path) for path in paths]
    if not inputs:
        return []
    out = Path(out_dir)
    targets = [out / f"{path.stem}.{extension}" for path in inputs]
    if len({t.name for t in targets}) != len(targets):
        raise ValueError(f"two inputs would give the same output name in {out}: {[p.name for p in inputs]}")
    for path, final in zip(inputs, targets, strict=True):
        if not path.is_file():
            raise LibreOfficeError(f"no such workbook: {path}")
        if final.resolve() == path.resolve():
            raise ValueError(f"converting {path} into {out} would replace the input; choose another folder")
    soffice = _soffice()
    out.mkdir(parents=True, exist_ok=True)

    with tempfile.TemporaryDirectory(prefix="sheetpump-lo-") as tmp:
        profile = _make_profile(Path(tmp) / "profile", recalc)
        staging = Path(tempfile.mkdtemp(prefix=".soffice-", dir=out))  # same file system: rename is atomic
        try:
            command = soffice_command(soffice, profile, target, staging, [p.resolve() for p in inputs])
            result = _run(command, timeout)
            produced = [staging / final.name for final in targets]
            lost = [p.name for p in produced if not p.is_file()]
            if result.returncode != 0 or lost:
                raise LibreOfficeError(
                    f"soffice failed (exit status {result.returncode}); outputs not written: {lost}\n"
                    f"command: {' '.join(command)}\nstdout:\n{result.stdout}\nstderr:\n{result.stderr}"
                )
            for made, final in zip(produced, targets, strict=True):
                os.replace(made, final)
        finally:
            shutil.rmtree(staging, ignore_errors=True)
    return targets


def recalculate_many(
    paths: Iterable[str | os.PathLike[str]],
    out_dir: str | os.PathLike[str],
    *,
    recalc: Recalc = "always",
    timeout: float = DEFAULT_TIMEOUT,
) -> list[Path]:
    """Load each workbook in LibreOffice, recompute every formula, save as .xlsx in ``out_dir``.

    One soffice start for all of them. ``recalc="never"`` keeps the cached values and ``"default"``
    leaves LibreOffice's own setting (which also keeps them); both exist to show that the setting matters.
    """
    return convert_many(paths, out_dir, "xlsx", extension="xlsx", recalc=recalc, timeout=timeout)


def recalculate(
    xlsx_path: str | os.PathLike[str],
    out_dir: str | os.PathLike[str],
    *,
    recalc: Recalc = "always",
    timeout: float = DEFAULT_TIMEOUT,
) -> Path:
    """Recompute a workbook in LibreOffice and save it as ``out_dir/<name>.xlsx``; return that path."""
    return recalculate_many([xlsx_path], out_dir, recalc=recalc, timeout=timeout)[0]


def to_pdf_many(
    paths: Iterable[str | os.PathLike[str]],
    out_dir: str | os.PathLike[str],
    *,
    single_page_sheets: bool = False,
    recalc: Recalc = "always",
    timeout: float = DEFAULT_TIMEOUT,
) -> list[Path]:
    """Print workbooks to PDF with LibreOffice (formulas recomputed first); one soffice start.

    ``single_page_sheets`` puts each whole sheet on one page sized to it (good for pictures); otherwise
    the workbook's own page setup applies.
    """
    target = f"pdf:{_PDF_SINGLE_PAGE}" if single_page_sheets else f"pdf:{_PDF_FILTER}"
    return convert_many(paths, out_dir, target, extension="pdf", recalc=recalc, timeout=timeout)


def to_pdf(
    xlsx_path: str | os.PathLike[str],
    out_dir: str | os.PathLike[str],
    *,
    single_page_sheets: bool = False,
    timeout: float = DEFAULT_TIMEOUT,
) -> Path:
    """Print a workbook to ``out_dir/<name>.pdf`` with LibreOffice; return that path."""
    return to_pdf_many([xlsx_path], out_dir, single_page_sheets=single_page_sheets, timeout=timeout)[0]


# ------------------------------------------------------------------------------------------ reading back

Cell = tuple[str, str]


def _is_formula(value: Any) -> bool:
    # openpyxl gives a formula as "=..." text, or as an ArrayFormula / DataTableFormula object.
    if isinstance(value, str):
        return value.startswith("=")
    return type(value).__name__ in {"ArrayFormula", "DataTableFormula"}


def formula_cells(xlsx_path: str | os.PathLike[str]) -> list[Cell]:
    """(sheet, cell) of every formula in a workbook, as written (not as LibreOffice saved it)."""
    book = openpyxl.load_workbook(xlsx_path, data_only=False)
    try:
        return [
            (sheet.title, cell.coordinate)
            for sheet in book.worksheets
            for row in sheet.iter_rows()
            for cell in row
            if _is_formula(cell.value)
        ]
    finally:
        book.close()


def read_values(
    original: str | os.PathLike[str],
    recalculated: str | os.PathLike[str],
    *,
    formulas_only: bool = True,
) -> dict[Cell, Any]:
    """Values LibreOffice saved, keyed by (sheet, cell) such as ``("Data", "C1")``.

    With ``formulas_only`` (the default) only the cells that hold a formula in ``original`` are given,
    every one of them (an empty result is None); otherwise every non-empty cell of ``recalculated``.
    An error result comes back as its text, e.g. ``"#DIV/0!"``.
    """
    book = openpyxl.load_workbook(recalculated, data_only=True)
    try:
        if formulas_only:
            return {(sheet, ref): book[sheet][ref].value for sheet, ref in formula_cells(original)}
        return {
            (sheet.title, cell.coordinate): cell.value
            for sheet in book.worksheets
            for row in sheet.iter_rows()
            for cell in row
            if cell.value is not None
        }
    finally:
        book.close()


def recalculated_values(
    xlsx_path: str | os.PathLike[str],
    *,
    formulas_only: bool = True,
    recalc: Recalc = "always",
    timeout: float = DEFAULT_TIMEOUT,
) -> dict[Cell, Any]:
    """Recompute a workbook in LibreOffice and return its values by (sheet, cell); see :func:`read_values`.

    The recomputed copy lives in a temporary folder and is removed afterwards.
    """
    with tempfile.TemporaryDirectory(prefix="sheetpump-recalc-") as tmp:
        done = recalculate(xlsx_path, tmp, recalc=recalc, timeout=timeout)
        return read_values(xlsx_path, done, formulas_only=formulas_only)
