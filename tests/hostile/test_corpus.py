"""Every broken or hostile input of the corpus, through every command it applies to.

For each: exit code 2, one line on stderr naming the file (and where it applies sheet!cell and field)
and no traceback; no output written; every input byte-for-byte unchanged. The bombs (and a sample of
the rest) run in a subprocess under a 1 GiB address-space limit and a timeout, so a bomb that inflated
would fail the test instead of the machine. Not errors: a macro-enabled workbook (read; its macros are
never run nor written back) and formula-injection texts in a datasheet (kept as text in every output).
"""

from __future__ import annotations

import json
import os
import re
import resource
import subprocess
import sys
import zipfile
from pathlib import Path
from xml.etree import ElementTree

import pytest

from sheetpump import demo
from sheetpump.cli import main
from sheetpump.files import sha256

from .corpus import CASES, INJECTIONS, MACRO, Case, injection_datasheet

ROOT = Path(__file__).resolve().parents[2]
MEMORY_LIMIT = 1 << 30  # 1 GiB of address space for a subprocess
TIMEOUT = 60  # seconds; every command here takes one or two


@pytest.fixture(scope="module")
def good(tmp_path_factory) -> dict[str, Path]:
    """The demo's valid application and its passing datasheet (read-only for the tests)."""
    folder = tmp_path_factory.mktemp("good")
    paths = demo.write_inputs(folder)
    return {"app": paths[0], "datasheet": paths[1], "folder": folder}


def commands(case: Case, x: Path, good: dict[str, Path], out: Path) -> list[list[str]]:
    """The command lines that apply to a case's file, each writing its outputs into ``out``."""
    a, d = str(good["app"]), str(good["datasheet"])
    c: list[list[str]] = []
    if case.role in ("file", "datasheet"):
        c += [["check", "--app", a, str(x), "--annotate", str(out / "annotated.xlsx"), "--junit",
               str(out / "junit.xml"), "--format", "json", "-o", str(out / "report.json")],
              ["compare", "--app", a, str(x), "-o", str(out / "comparison.xlsx")]]
    if case.role == "file":  # the same file as a series workbook
        c += [["select", "--app", a, str(x), "-o", str(out / "selection.xlsx"), "--junit", str(out / "junit.xml")]]
    if case.role in ("file", "application"):
        c += [["check", "--app", str(x), d, "-o", str(out / "report.txt")],
              ["compare", "--app", str(x), d, "-o", str(out / "comparison.xlsx")]]
    if case.role in ("file", "table"):
        c += [["evaluate", str(x), "-o", str(out / "evaluation.xlsx")]]
    if case.role == "file" or case.recalc:
        c += [["recalc", str(x), "-o", str(out / "recalculated.xlsx")]]
    return c


def fingerprints(*folders: Path) -> dict[Path, str]:
    return {p: sha256(p) for f in folders for p in sorted(f.rglob("*")) if p.is_file()}


def check_error(case: Case, x: Path, argv: list[str], code: int, err: str) -> None:
    """The one-line error of a refused input."""
    assert "Traceback" not in err, err
    if case.valid:
        assert code in (0, 1), (argv, err)
        return
    assert code == 2, (argv, code, err)
    lines = err.strip().splitlines()
    assert len(lines) == 1, lines
    line = lines[0]
    assert line.startswith("sheetpump: error: ")
    assert (case.names or x.name) in line, line
    for word in case.expect:
        assert word in line, (word, line)


def assert_no_output(argv: list[str], out: Path) -> None:
    written = [p.name for p in out.iterdir()] if out.exists() else []
    assert written == [], (argv, written)  # no output, and no stray temporary file


CORPUS_ERRORS = [c for c in CASES if not c.bomb]


def test_the_corpus_is_large_enough():
    assert len(CASES) >= 30


@pytest.mark.parametrize("case", CORPUS_ERRORS, ids=[c.name for c in CORPUS_ERRORS])
def test_in_process(case: Case, good, tmp_path, capsys):
    inputs = tmp_path / "inputs"
    inputs.mkdir()
    x = case.build(inputs, good)
    before = fingerprints(inputs, good["folder"])
    for argv in commands(case, x, good, tmp_path / "out"):
        out = tmp_path / "out"
        out.mkdir(exist_ok=True)
        code = main(argv)
        _, err = capsys.readouterr()
        check_error(case, x, argv, code, err)
        if not case.valid:
            assert_no_output(argv, out)
        for p in out.iterdir():
            p.unlink()
    assert fingerprints(inputs, good["folder"]) == before


def _limit() -> None:
    resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT, MEMORY_LIMIT))


def run_bounded(argv: list[str]) -> tuple[int, str]:
    """Run ``sheetpump`` in a subprocess with 1 GiB of address space and a timeout."""
    env = {k: v for k, v in os.environ.items() if k in ("PATH", "HOME", "LANG", "PYTHONPATH", "TMPDIR")}
    env["OPENBLAS_NUM_THREADS"] = env["OMP_NUM_THREADS"] = "1"  # thread pools reserve address space
    env["PYTHONPATH"] = os.pathsep.join(filter(None, (str(ROOT), env.get("PYTHONPATH"))))
    proc = subprocess.run([sys.executable, "-m", "sheetpump", *argv], capture_output=True, text=True,
                          timeout=TIMEOUT, preexec_fn=_limit, cwd=ROOT, env=env)
    return proc.returncode, proc.stderr


def test_the_memory_limit_binds(tmp_path):
    """The limit is real: a subprocess that tries to hold 2 GiB fails (so a bomb that inflated would)."""
    proc = subprocess.run([sys.executable, "-c", "b = bytearray(2 << 30)"], capture_output=True,
                          preexec_fn=_limit, timeout=TIMEOUT)
    assert proc.returncode != 0 and b"MemoryError" in proc.stderr


# The bombs, and one case of each other role as a sample of the whole in a real process.
SAMPLE = [c for c in CASES if c.bomb] + [
    next(c for c in CASES if c.role == role and not c.bomb) for role in ("file", "datasheet", "application", "table")]


@pytest.mark.parametrize("case", SAMPLE, ids=[c.name for c in SAMPLE])
def test_bounded_subprocess(case: Case, good, tmp_path):
    inputs = tmp_path / "inputs"
    inputs.mkdir()
    x = case.build(inputs, good)
    assert x.stat().st_size < 8 << 20  # the bombs are small on disk
    before = fingerprints(inputs, good["folder"])
    out = tmp_path / "out"
    for argv in commands(case, x, good, out):
        out.mkdir(exist_ok=True)
        code, err = run_bounded(argv)  # raises TimeoutExpired if it does not finish
        assert "MemoryError" not in err, err
        check_error(case, x, argv, code, err)
        if not case.valid:
            assert_no_output(argv, out)
        for p in out.iterdir():
            p.unlink()
    assert fingerprints(inputs, good["folder"]) == before


# ------------------------------------------------------------------------------------ macro workbook


def _parts(path: Path) -> dict[str, bytes]:
    with zipfile.ZipFile(path) as z:
        return {n: z.read(n) for n in z.namelist()}


def _no_macros(path: Path) -> None:
    parts = _parts(path)
    assert not [n for n in parts if "vba" in n.lower()], list(parts)
    assert b"macroEnabled" not in parts["[Content_Types].xml"]
    assert b"vbaProject" not in parts.get("xl/_rels/workbook.xml.rels", b"")


def test_macro_workbook_is_read_and_its_macros_never_written(good, tmp_path, capsys):
    x = MACRO(tmp_path, good)
    assert "xl/vbaProject.bin" in _parts(x)
    before = fingerprints(tmp_path, good["folder"])
    out = tmp_path / "out"
    code = main(["check", "--app", str(good["app"]), str(x), "--annotate", str(out / "annotated.xlsx")])
    assert code in (0, 1), capsys.readouterr().err
    _no_macros(out / "annotated.xlsx")
    code = main(["compare", "--app", str(good["app"]), str(x), "-o", str(out / "comparison.xlsx")])
    assert code in (0, 1), capsys.readouterr().err
    _no_macros(out / "comparison.xlsx")
    code = main(["evaluate", str(x), "-o", str(out / "evaluation.xlsx")])
    assert code in (0, 1), capsys.readouterr().err
    _no_macros(out / "evaluation.xlsx")
    for p in out.iterdir():
        p.unlink()
    out.rmdir()
    assert fingerprints(tmp_path, good["folder"]) == before


def test_recalc_copy_of_a_macro_workbook_has_no_macros(good, tmp_path, capsys):
    x = MACRO(tmp_path, good)
    code = main(["recalc", str(x), "-o", str(tmp_path / "recalculated.xlsx")])
    assert code == 0, capsys.readouterr().err
    _no_macros(tmp_path / "recalculated.xlsx")


# ---------------------------------------------------------------------------------- formula injection

_FORMULA = re.compile(r"<f(?: [^>]*)?>(.*?)</f>", re.S)
_SHEET_REF = re.compile(r"'[^']*'!")


def _assert_text_only(path: Path, keys: tuple[str, ...] = tuple(INJECTIONS)) -> None:
    """No injection text inside any formula of a workbook; each of them stored as a string."""
    parts = _parts(path)
    texts = b"".join(v for n, v in parts.items() if n.startswith("xl/worksheets/") or n == "xl/sharedStrings.xml")
    for name, data in parts.items():
        if not name.startswith("xl/worksheets/sheet"):
            continue
        for formula in _FORMULA.findall(data.decode()):
            for quoted in re.findall(r"'([^']*)'!", formula):
                assert re.fullmatch(r"[\w .&-]*", quoted), (name, formula)  # a plain sheet name only
            bare = _SHEET_REF.sub("", formula)
            for word in ("HYPERLINK", "cmd", "|", "@"):
                assert word not in bare, (name, formula)
    from html import escape

    for text in (INJECTIONS[k] for k in keys):
        # in a shared string (<t>) or an inline string: the XML-escaped text itself
        assert escape(text, quote=False).encode() in texts or escape(text).encode() in texts, text


def test_formula_injection_stays_text(good, tmp_path, capsys):
    x = injection_datasheet(tmp_path / "injection.xlsx")
    before = fingerprints(tmp_path, good["folder"])
    out = tmp_path / "out"
    code = main(["check", "--app", str(good["app"]), str(x), "--annotate", str(out / "annotated.xlsx"),
                 "--junit", str(out / "junit.xml"), "--format", "json", "-o", str(out / "report.json")])
    assert code in (0, 1), capsys.readouterr().err
    code = main(["compare", "--app", str(good["app"]), str(x), "-o", str(out / "comparison.xlsx")])
    assert code in (0, 1), capsys.readouterr().err
    _assert_text_only(out / "annotated.xlsx")
    _assert_text_only(out / "comparison.xlsx", ("supplier", "model"))  # the note is not shown there
    report = json.loads((out / "report.json").read_text())
    dumped = json.dumps(report, ensure_ascii=False)
    for text in (INJECTIONS["supplier"], INJECTIONS["model"]):
        assert json.dumps(text, ensure_ascii=False)[1:-1] in dumped
    suites = ElementTree.parse(out / "junit.xml").getroot().findall("testsuite")
    label = f"{INJECTIONS['supplier']} {INJECTIONS['model']}"
    assert [s.get("name") for s in suites] == [label]  # parsed back exactly: escaped, not markup
    raw = (out / "junit.xml").read_text()
    assert '=HYPERLINK(&quot;http' in raw
    for p in out.iterdir():
        p.unlink()
    out.rmdir()
    assert fingerprints(tmp_path, good["folder"]) == before
