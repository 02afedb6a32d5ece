"""xlwings' own UDF machinery accepts every sheetpump cell function.

xlwings' Windows decorator module (``xlwings.udfs``) imports pywin32, which does not exist on Linux. We
give it minimal stand-ins for the three pywin32 modules it imports at the top, then run its real metadata
builder (``xlfunc``/``xlarg``) and its real VBA wrapper generator over every cell function. What this
cannot show: Excel's COM server calling into Python, and how Excel spills the results.
"""

from __future__ import annotations

import importlib
import io
import sys
import types

import pytest

from sheetpump import cells
from sheetpump.catalogue import CATALOGUE


@pytest.fixture(scope="module")
def udfs():
    saved = {n: sys.modules.get(n) for n in ("pythoncom", "pywintypes", "win32com", "win32com.client")}
    pythoncom = types.ModuleType("pythoncom")
    pythoncom.CoInitialize = lambda: None
    win32com = types.ModuleType("win32com")
    client = types.ModuleType("win32com.client")
    client.Dispatch = lambda *a, **k: None
    win32com.client = client
    sys.modules.update({"pythoncom": pythoncom, "pywintypes": types.ModuleType("pywintypes"),
                        "win32com": win32com, "win32com.client": client})
    sys.modules.pop("xlwings.udfs", None)
    try:
        yield importlib.import_module("xlwings.udfs")
    finally:
        sys.modules.pop("xlwings.udfs", None)
        for name, module in saved.items():
            if module is None:
                sys.modules.pop(name, None)
            else:
                sys.modules[name] = module


def _registered(udfs, calc):
    function = cells.cell_function(calc)
    return cells.decorate(function, calc, func=udfs.xlfunc, arg=udfs.xlarg)


@pytest.mark.parametrize("name", list(CATALOGUE))
def test_metadata_builder_accepts_cell_function(udfs, name):
    calc = CATALOGUE[name]
    info = _registered(udfs, calc).__xlfunc__
    assert info["name"] == name
    assert info["category"] == "sheetpump"
    assert info["sub"] is False
    names = [a["name"] for a in info["args"]]
    assert names == [a.name for a in calc.args] + ["unit"]
    for spec, arg in zip(info["args"], calc.args, strict=False):
        # help text reached the function wizard, ranges come in 2-D, positional only
        assert spec["doc"].startswith(arg.help)
        assert spec["options"] == {"ndim": 2}
        assert spec["vararg"] is False
        assert ("optional" in spec) == (arg.default is not None)
    assert info["args"][-1]["optional"] is None  # result unit: optional
    assert info["ret"]["doc"] == calc.help


def test_vba_wrapper_generated_for_every_function(udfs):
    module = types.ModuleType("sheetpump_cells_under_test")
    for name, calc in CATALOGUE.items():
        setattr(module, name, _registered(udfs, calc))
    out = io.StringIO()
    workbook = types.SimpleNamespace(Name="sheetpump.xlam")
    udfs.generate_vba_wrapper("sheetpump.cells", module, out, workbook)
    vba = out.getvalue()
    for name, calc in CATALOGUE.items():
        optional = ", ".join(f"Optional {a.name}" for a in calc.args if a.default is not None)
        required = ", ".join(a.name for a in calc.args if a.default is None)
        head = f"Function {name}({required}" + (f", {optional}" if optional else "") + ", Optional unit)"
        assert head in vba
        assert f'XLPy.CallUDF("sheetpump.cells", "{name}"' in vba


def test_module_exposes_one_function_per_declaration():
    assert sorted(cells.__all__) == sorted(CATALOGUE)
    for name in CATALOGUE:
        assert callable(getattr(cells, name))
