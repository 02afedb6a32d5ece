"""The LibreOffice extension as files, and ``sheetpump extension``'s set-up errors (no LibreOffice needed).

Checked against the declarations (the catalogue) and against LibreOffice's own file conventions: the
manifest's media types and the configuration schemas of Calc's add-ins (``CalcAddIns``: AddInInfo /
AddInFunctions / Parameters, with DisplayName, Description, Category, CompatibilityName) and of jobs
(``Jobs``: Jobs / Events / JobList), as in LibreOffice's ``officecfg`` schema files. That a real Calc
computes with them is ``tests/test_extension.py``.
"""

from __future__ import annotations

import os
import stat
import sys
import xml.etree.ElementTree as ET
import zipfile
from pathlib import Path

import pytest

from sheetpump import SAFETY_CAUTION, SAFETY_CAUTION_SHORT, __version__
from sheetpump.catalogue import CATALOGUE
from sheetpump.cli import main
from sheetpump.extension import build
from sheetpump.extension.office import SOFFICE_ENV, office_environment
from sheetpump.extension.runtime import call
from sheetpump.extension.typelib import read_interface

OOR = "{http://openoffice.org/2001/registry}"
MANIFEST = "{http://openoffice.org/2001/manifest}"
EN = "{http://www.w3.org/XML/1998/namespace}lang"


@pytest.fixture(scope="module")
def oxt(tmp_path_factory: pytest.TempPathFactory) -> zipfile.ZipFile:
    path = build.build(tmp_path_factory.mktemp("oxt") / "sheetpump.oxt")
    with zipfile.ZipFile(path) as book:
        yield book


def _node(parent: ET.Element, name: str) -> ET.Element:
    found = [n for n in parent if n.get(f"{OOR}name") == name]
    assert len(found) == 1, name
    return found[0]


def _prop(node: ET.Element, name: str) -> str:
    value = _node(node, name).find("value")
    assert value is not None
    return value.text or ""


def test_manifest_lists_every_file(oxt: zipfile.ZipFile) -> None:
    manifest = ET.fromstring(oxt.read("META-INF/manifest.xml"))
    listed = {e.get(f"{MANIFEST}full-path") for e in manifest}
    # every file but the description (and its text) and the component (reached through sheetpump.components)
    assert listed == set(oxt.namelist()) - {"META-INF/manifest.xml", "description.xml", "description-en.txt",
                                            "sheetpump_calc.py"}
    description = ET.fromstring(oxt.read("description.xml"))
    versions = [e.get("value") for e in description.iter() if e.tag.endswith("version")]
    assert versions == [__version__]


def test_description_carries_the_caution(oxt: zipfile.ZipFile) -> None:
    # the Extension Manager shows the text named by extension-description/src (LibreOffice's description.xml)
    description = ET.fromstring(oxt.read("description.xml"))
    sources = [e.get("{http://www.w3.org/1999/xlink}href") for e in description.iter() if e.tag.endswith("}src")]
    assert len(sources) == 1
    assert SAFETY_CAUTION in oxt.read(sources[0]).decode()


def test_addins_xcu_describes_every_function(oxt: zipfile.ZipFile) -> None:
    root = ET.fromstring(oxt.read("Addins.xcu"))
    functions = _node(_node(_node(root, "AddInInfo"), build.IMPLEMENTATION), "AddInFunctions")
    assert [f.get(f"{OOR}name") for f in functions] == list(CATALOGUE)
    for f in functions:
        decl = CATALOGUE[f.get(f"{OOR}name")]
        assert _prop(f, "DisplayName") == decl.name
        assert _prop(f, "CompatibilityName") == decl.name  # the name in .xlsx files, as in Excel
        assert _node(f, "CompatibilityName").find("value").get(EN) == "en-US"
        assert _prop(f, "Description").startswith(decl.help)
        assert _prop(f, "Description").endswith(SAFETY_CAUTION_SHORT)  # Calc's function wizard shows it
        params = [(p.get(f"{OOR}name"), _prop(p, "Description")) for p in _node(f, "Parameters")]
        assert params == decl.argument_help()


def test_type_library_has_a_method_per_function(oxt: zipfile.ZipFile) -> None:
    methods = read_interface(oxt.read("sheetpump.rdb"), build.INTERFACE)
    assert [m[0] for m in methods] == list(CATALOGUE)
    for name, result, params in methods:
        assert result == "[][]any"
        assert params == [(p, "any") for p, _ in CATALOGUE[name].argument_help()]


def test_component_and_jobs(oxt: zipfile.ZipFile) -> None:
    source = oxt.read("sheetpump_calc.py").decode()
    code = compile(source, "sheetpump_calc.py", "exec")  # valid Python; not run (needs LibreOffice's uno)
    assert code is not None
    for name, decl in CATALOGUE.items():
        args = ", ".join(p for p, _ in decl.argument_help())
        assert f"def {name}(self, {args}):" in source
    components = ET.fromstring(oxt.read("sheetpump.components"))
    names = {i.get("name") for i in components.iter() if i.tag.endswith("implementation")}
    assert names == {build.IMPLEMENTATION, build.NAMES_JOB}
    jobs = ET.fromstring(oxt.read("Jobs.xcu"))
    assert _prop(_node(_node(jobs, "Jobs"), "sheetpump"), "Service") == build.NAMES_JOB
    events = _node(jobs, "Events")
    for event in ("OnLoadFinished", "OnSaveDone", "OnSaveAsDone"):
        _node(_node(_node(events, event), "JobList"), "sheetpump")


def test_same_build_same_bytes(tmp_path: Path) -> None:
    a = build.build(tmp_path / "a.oxt").read_bytes()
    b = build.build(tmp_path / "b.oxt").read_bytes()
    assert a == b


def test_runtime_matches_the_declarations() -> None:
    flow = CATALOGUE["SP_GEOMETRIC_FLOW"]
    # Calc hands a range as a tuple of rows; numbers only, with texts, or with an empty cell (None)
    for displacement in (((16.0,), (28.0,)), ((16.0,), ("28 cm^3/rev",)), ((16.0,), (None,))):
        rows = [list(r) for r in displacement]
        want = flow(rows, 1450.0)
        got = call("SP_GEOMETRIC_FLOW", (displacement, 1450.0, None))
        if isinstance(want, str):  # the empty cell: the same #SP! text
            assert got == want and want.startswith("#SP! ")
            continue
        # a numbers-only range is converted as one array: the same arithmetic up to rounding (1e-12)
        assert [row[0] for row in got] == pytest.approx([row[0] for row in want], rel=1e-12, abs=0)
    assert call("SP_GEOMETRIC_FLOW", (((16.0,),), 1450.0, None)) == flow(16.0, 1450.0)  # one cell: a value
    assert call("SP_NOT_A_FUNCTION", ()).startswith("#SP! ")


def _fake_office(folder: Path, bridge: bytes | None) -> Path:
    folder.mkdir()
    for name in ("soffice", "unopkg"):
        (folder / name).write_text("#!/bin/sh\nexit 1\n")
        (folder / name).chmod(stat.S_IRWXU)
    if bridge is not None:
        (folder / "libpyuno.so").write_bytes(bridge)
    return folder / "soffice"


def _install(capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch, soffice: str) -> tuple[int, str]:
    monkeypatch.setenv(SOFFICE_ENV, soffice)
    code = main(["extension", "--install", "--profile", os.devnull])
    return code, capsys.readouterr().err


def test_no_office(capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    code, err = _install(capsys, monkeypatch, str(tmp_path / "nowhere" / "soffice"))
    assert code == 2 and "is not an executable file" in err


def test_office_without_python_bridge(capsys, monkeypatch, tmp_path: Path) -> None:
    code, err = _install(capsys, monkeypatch, str(_fake_office(tmp_path / "program", None)))
    assert code == 2 and "no Python bridge" in err and "python3-uno" in err


def test_office_with_another_python(capsys, monkeypatch, tmp_path: Path) -> None:
    other = (3, sys.version_info[1] + 1)
    soffice = _fake_office(tmp_path / "program", f"...libpython{other[0]}.{other[1]}.so.1.0...".encode())
    code, err = _install(capsys, monkeypatch, str(soffice))
    assert code == 2 and f"LibreOffice runs Python {other[0]}.{other[1]}" in err


def test_usage_error(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["extension"]) == 2
    assert "-o FILE.oxt, --install or --uninstall" in capsys.readouterr().err


def test_office_environment_leaves_out_the_virtual_environment(monkeypatch: pytest.MonkeyPatch) -> None:
    venv = os.path.join(os.sep, "some", "venv")
    monkeypatch.setenv("VIRTUAL_ENV", venv)
    monkeypatch.setenv("PATH", os.pathsep.join([os.path.join(venv, "bin"), "/usr/bin"]))
    env = office_environment()
    assert env["PATH"] == "/usr/bin" and "VIRTUAL_ENV" not in env


@pytest.mark.parametrize(("linked", "version"), [
    (b"\0libpython3.11.so.1.0\0", (3, 11)),  # Debian's python3-uno
    (b"\0python38.dll\0", (3, 8)),  # Windows
    (b"@executable_path/../Frameworks/LibreOfficePython.framework/Versions/3.9/LibreOfficePython", (3, 9)),
    (b"nothing to go by", None),
])
def test_python_of_the_bridge(tmp_path: Path, linked: bytes, version: tuple[int, int] | None) -> None:
    from sheetpump.extension.office import _bridge_python

    (tmp_path / "bridge").write_bytes(b"\x7fELF..." + linked + b"...")
    assert _bridge_python(tmp_path / "bridge") == version
