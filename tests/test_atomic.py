"""Outputs appear whole or not at all: a crash or a kill mid-write leaves the earlier output intact.

Every command writes through :func:`sheetpump.files.atomic_path` (a temporary file beside the target,
renamed over it when complete). Here the writers are made to fail half-way — by an exception in-process,
and by SIGKILL of a real process in the middle of writing — and the old output must be byte-for-byte
what it was, with no partial file in its place.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import zipfile
from pathlib import Path

import openpyxl
import pytest

from sheetpump import demo
from sheetpump.cli import main
from sheetpump.files import atomic_path, atomic_write, sha256

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def inputs(tmp_path_factory) -> list[Path]:
    return demo.write_inputs(tmp_path_factory.mktemp("demo"))


@pytest.fixture
def old_output(inputs, tmp_path, capsys) -> Path:
    """A comparison workbook written by a first, complete run."""
    out = tmp_path / "comparison.xlsx"
    assert main(["compare", "--app", str(inputs[0]), *map(str, inputs[1:3]), "-o", str(out)]) in (0, 1)
    capsys.readouterr()
    return out


def _leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".part"))


def test_atomic_write_keeps_the_old_file_when_the_body_fails(tmp_path):
    target = tmp_path / "report.txt"
    target.write_text("old report\n")
    with pytest.raises(RuntimeError), atomic_path(target) as tmp:
        tmp.write_text("half a new rep")
        raise RuntimeError("crash mid-write")
    assert target.read_text() == "old report\n"
    assert _leftovers(tmp_path) == []
    atomic_write(target, "new report\n")
    assert target.read_text() == "new report\n" and _leftovers(tmp_path) == []


def test_compare_crashing_mid_write_keeps_the_old_comparison(inputs, old_output, monkeypatch, capsys):
    from sheetpump.workbooks import comparison_book as comparison

    before = sha256(old_output)

    def crash(*args, **kwargs):
        raise RuntimeError("writer crashed half-way")

    # the Findings sheet is written after the Summary, duty, curve and chart sheets: half-way
    monkeypatch.setattr(comparison, "write_findings", crash)
    with pytest.raises(RuntimeError):
        main(["compare", "--app", str(inputs[0]), *map(str, inputs[1:]), "-o", str(old_output)])
    assert sha256(old_output) == before
    assert _leftovers(old_output.parent) == []
    assert openpyxl.load_workbook(old_output).sheetnames[0] == "Summary"  # still a whole workbook


def test_annotate_crashing_in_save_keeps_the_old_copy(inputs, tmp_path, monkeypatch, capsys):
    target = tmp_path / "annotated.xlsx"
    assert main(["check", "--app", str(inputs[0]), str(inputs[1]), "--annotate", str(target)]) in (0, 1)
    before = sha256(target)

    def half_save(self, filename):
        Path(filename).write_bytes(b"PK\x03\x04 half a workbook")
        raise OSError("disk full")

    monkeypatch.setattr(openpyxl.Workbook, "save", half_save)
    with pytest.raises(OSError):
        main(["check", "--app", str(inputs[0]), str(inputs[2]), "--annotate", str(target)])
    assert sha256(target) == before and _leftovers(tmp_path) == []
    capsys.readouterr()


_KILLER = r"""
import os, signal, sys
import xlsxwriter.workbook as wb
from sheetpump.cli import main

original_store = wb.Workbook._store_workbook

def store_then_die(self):
    # XlsxWriter assembles the zip in the temporary file; die when half of it is there.
    import zipfile
    original_write = zipfile.ZipFile.write
    count = [0]
    def write(zself, *a, **k):
        count[0] += 1
        if count[0] == 6:  # five parts are in the temporary file
            zself.fp.flush()
            os.kill(os.getpid(), signal.SIGKILL)
        return original_write(zself, *a, **k)
    zipfile.ZipFile.write = write
    return original_store(self)

wb.Workbook._store_workbook = store_then_die
sys.exit(main(sys.argv[1:]))
"""


def test_sigkill_mid_write_keeps_the_old_comparison(inputs, old_output):
    before = sha256(old_output)
    env = {**os.environ, "PYTHONPATH": os.pathsep.join(filter(None, (str(ROOT), os.environ.get("PYTHONPATH"))))}
    proc = subprocess.run([sys.executable, "-c", _KILLER, "compare", "--app", str(inputs[0]),
                           *map(str, inputs[1:]), "-o", str(old_output)],
                          capture_output=True, timeout=120, cwd=ROOT, env=env)
    assert proc.returncode == -signal.SIGKILL, proc.stderr.decode()[-2000:]
    assert sha256(old_output) == before
    with zipfile.ZipFile(old_output) as z:
        assert z.testzip() is None
    # The killed writer's temporary file may stay behind, named so that nobody takes it for the output.
    for name in _leftovers(old_output.parent):
        assert name.startswith(".comparison.xlsx.") and name.endswith(".part")
