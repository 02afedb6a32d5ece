"""The LibreOffice extension (``.oxt``), built from the declarations.

An ``.oxt`` is a zip holding:

- ``description.xml``: the extension's identifier and version (sheetpump's version);
- ``META-INF/manifest.xml``: what each file is;
- ``sheetpump.rdb``: the type library with the interface whose methods are the cell functions
  (:mod:`sheetpump.extension.typelib`); every argument is a UNO ``any``, which Calc treats as optional
  and through which it passes numbers, texts and whole ranges; every result is rows of ``any`` (one
  value as 1 x 1), so a range gives an array;
- ``Addins.xcu``: Calc's add-in configuration: per function its display name, description, category and
  *compatibility name*, and per argument its name and help (the texts of the xlwings face);
- ``Jobs.xcu``: runs the component's names job when a spreadsheet has been opened or saved (below);
- ``sheetpump.components``: registers the component (passively: nothing of it runs at install time);
- ``sheetpump_calc.py``: the Python component. It records where this sheetpump and its packages live
  (LibreOffice may run another Python than the one sheetpump is installed in), imports sheetpump on
  the first call, and hands each call to :func:`sheetpump.extension.runtime.call`.

The compatibility name is what makes one workbook work in Excel and in Calc: each function's
compatibility name (locale en-US) is its own name (``SP_GEOMETRIC_FLOW``), which is also what xlwings
registers in Excel, and is the name an add-in function has in Excel's files. LibreOffice 7.4 maps it
only in formulas typed or set through its API; in .xlsx files it reads ``SP_...`` as an unknown name and
writes ``ORG.SHEETPUMP.CALC.CELLFUNCTIONS.SP_...`` (its formula compiler has no add-in-to-Excel-name
step for OOXML; later versions have one). The component's names job closes that gap: after a
spreadsheet is loaded it enters every formula calling an ``SP_`` name again through the API, and after
Save / Save As to .xlsx it takes the programmatic prefix out of the file. With a LibreOffice that maps
the names itself, the job finds nothing to do.
"""

from __future__ import annotations

import os
import site
import sys
import zipfile
from pathlib import Path
from xml.sax.saxutils import escape

from .. import SAFETY_CAUTION, SAFETY_CAUTION_SHORT, __version__
from ..catalogue import CATALOGUE
from ..declarations import Calculation
from ..files import atomic_path
from .typelib import interface_library

__all__ = ["IDENTIFIER", "IMPLEMENTATION", "INTERFACE", "build", "contents", "recorded_paths"]

#: The extension's identifier (unopkg lists it), the component's service name and its interface.
IDENTIFIER = "org.sheetpump.declarations"
IMPLEMENTATION = "org.sheetpump.declarations.CellFunctions"
INTERFACE = "org.sheetpump.declarations.XCellFunctions"
#: The job that mends SP_ names in .xlsx formulas on opening and saving (see the component).
NAMES_JOB = "org.sheetpump.declarations.Names"
#: The document events it runs on: opening, and after Save and Save As (not after "save a copy", whose
#: target LibreOffice does not tell a job).
_JOB_EVENTS = ("OnLoadFinished", "OnSaveDone", "OnSaveAsDone")
#: Calc's own category for add-in functions: Calc knows a fixed list of categories and puts any other
#: name here too (so the category "sheetpump" of the xlwings face cannot be had in Calc 7.4).
CALC_CATEGORY = "Add-In"
CATEGORY = "sheetpump"

_COMPONENT = "sheetpump_calc.py"
_JOBS = "Jobs.xcu"
_COMPONENTS = "sheetpump.components"
_TYPES = "sheetpump.rdb"
_ADDINS = "Addins.xcu"
_DESCRIPTION = "description-en.txt"  # the text the Extension Manager shows under the name
_DATE = (2024, 1, 1, 0, 0, 0)  # fixed: the same sheetpump gives the same bytes


def parameters(calc: Calculation) -> list[str]:
    """The component method's parameter names: the declared arguments, then ``unit``."""
    return [name for name, _ in calc.argument_help()]


def recorded_paths() -> list[str]:
    """Where this sheetpump and its packages are: the folder holding ``sheetpump``, then site folders."""
    here = str(Path(__file__).resolve().parents[2])
    sites = [p for p in (*site.getsitepackages(), site.getusersitepackages()) if os.path.isdir(p)]
    return [here, *(p for p in sites if p != here)]


def _localized(name: str, text: str) -> str:
    return f'<prop oor:name="{name}"><value xml:lang="en-US">{escape(text)}</value></prop>'


def addins_xcu() -> str:
    """Calc's add-in configuration for every declared function."""
    out = ['<?xml version="1.0" encoding="UTF-8"?>',
           '<oor:component-data xmlns:oor="http://openoffice.org/2001/registry" '
           'xmlns:xs="http://www.w3.org/2001/XMLSchema" oor:name="CalcAddIns" oor:package="org.openoffice.Office">',
           '<node oor:name="AddInInfo">',
           f'<node oor:name="{IMPLEMENTATION}" oor:op="replace">',
           '<node oor:name="AddInFunctions">']
    for calc in CATALOGUE.values():
        out.append(f'<node oor:name="{calc.name}" oor:op="replace">')
        out.append(_localized("DisplayName", calc.name))
        out.append(_localized("Description", f"{calc.help} [{calc.result.name}"
                              + (f", default {calc.result.default}]" if calc.result.default else "]")
                              + f" {SAFETY_CAUTION_SHORT}"))
        out.append(f'<prop oor:name="Category"><value>{CALC_CATEGORY}</value></prop>')
        # (CategoryDisplayName, in the schema but ignored by Calc, is left out.)
        out.append(_localized("CompatibilityName", calc.name))
        out.append('<node oor:name="Parameters">')
        for name, text in calc.argument_help():
            out.append(f'<node oor:name="{name}" oor:op="replace">{_localized("DisplayName", name)}'
                       f'{_localized("Description", text)}</node>')
        out.append("</node></node>")
    out.append("</node></node></node></oor:component-data>")
    return "\n".join(out) + "\n"


def jobs_xcu() -> str:
    """LibreOffice's job configuration: run the names job on opening and after saving a document."""
    events = "".join(f'<node oor:name="{e}" oor:op="fuse"><node oor:name="JobList">'
                     f'<node oor:name="sheetpump" oor:op="replace"/></node></node>' for e in _JOB_EVENTS)
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            '<oor:component-data xmlns:oor="http://openoffice.org/2001/registry" '
            'xmlns:xs="http://www.w3.org/2001/XMLSchema" oor:name="Jobs" oor:package="org.openoffice.Office">\n'
            '<node oor:name="Jobs"><node oor:name="sheetpump" oor:op="replace">'
            f'<prop oor:name="Service"><value>{NAMES_JOB}</value></prop></node></node>\n'
            f'<node oor:name="Events">{events}</node>\n</oor:component-data>\n')


def description_text() -> str:
    """What the Extension Manager shows under the extension's name: what it is, and the caution."""
    return ("sheetpump's cell functions (SP_...) in LibreOffice Calc: hydraulic gear pump datasheets "
            f"checked against a machine's duty cycle.\n\n{SAFETY_CAUTION}\n")


def description_xml() -> str:
    """The extension's description: identifier, version, name, and the text with the caution."""
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            '<description xmlns="http://openoffice.org/extensions/description/2006" '
            'xmlns:xlink="http://www.w3.org/1999/xlink">\n'
            f'  <identifier value="{IDENTIFIER}"/>\n'
            f'  <version value="{__version__}"/>\n'
            '  <display-name><name lang="en">sheetpump cell functions</name></display-name>\n'
            f'  <extension-description><src lang="en" xlink:href="{_DESCRIPTION}"/></extension-description>\n'
            '</description>\n')


def components_xml() -> str:
    """The component's registration (passive: LibreOffice reads it, nothing runs at install time)."""
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            '<components xmlns="http://openoffice.org/2010/uno-components">\n'
            f' <component loader="com.sun.star.loader.Python" uri="{_COMPONENT}">\n'
            f'  <implementation name="{IMPLEMENTATION}"><service name="{IMPLEMENTATION}"/></implementation>\n'
            f'  <implementation name="{NAMES_JOB}"><service name="{NAMES_JOB}"/></implementation>\n'
            ' </component>\n</components>\n')


def manifest_xml() -> str:
    entries = [("application/vnd.sun.star.uno-typelibrary;type=RDB", _TYPES),
               ("application/vnd.sun.star.configuration-data", _ADDINS),
               ("application/vnd.sun.star.configuration-data", _JOBS),
               ("application/vnd.sun.star.uno-components", _COMPONENTS)]
    lines = "".join(f' <manifest:file-entry manifest:media-type="{t}" manifest:full-path="{p}"/>\n'
                    for t, p in entries)
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            '<manifest:manifest xmlns:manifest="http://openoffice.org/2001/manifest">\n'
            f"{lines}</manifest:manifest>\n")


_COMPONENT_HEAD = '''\
"""sheetpump's cell functions in LibreOffice Calc: the extension's component.

Written by `sheetpump extension` (sheetpump {version}, Python {python}); rebuild rather than edit.
{caution}
"""

import os
import re
import shutil
import site
import sys
import zipfile

import uno
import unohelper
from com.sun.star.lang import XServiceInfo
from com.sun.star.task import XJob
from org.sheetpump.declarations import XCellFunctions

PATHS = {paths!r}
BUILT_WITH = "sheetpump {version} in Python {python} ({executable})"
IMPLEMENTATION = {implementation!r}
NAMES_JOB = {names_job!r}
NAMES = frozenset({names!r})
_state = {{}}


def _load():
    for path in reversed(PATHS):
        if path not in sys.path:
            site.addsitedir(path)  # also runs the folder's .pth files (an editable install)
    for path in reversed(PATHS[:1]):
        if path in sys.path:
            sys.path.remove(path)
        sys.path.insert(0, path)
    try:
        from sheetpump.extension.runtime import call
    except Exception as exc:  # gone, moved, or built for another Python
        text = str(exc).splitlines()[0][:160] if str(exc) else type(exc).__name__
        _state["problem"] = ("#SP! sheetpump could not be loaded from " + PATHS[0] + " (" + text
                             + "); built with " + BUILT_WITH
                             + ": run 'sheetpump extension --install' again from the Python where it is installed")
        return None
    _state["call"] = call
    return call


def _call(name, values):
    call = _state.get("call") or _load()
    out = _state["problem"] if call is None else call(name, values)
    # Every method returns sequence<sequence<any>> (rows): a range result as it is, one value as 1 x 1,
    # which Calc shows in a single cell. (pyuno turns a returned tuple into that declared type; a
    # result declared "any" could not carry a range, and uno.Any is refused as a return value.)
    return out if type(out) is tuple else ((out,),)


class _Service(unohelper.Base, XServiceInfo):
    NAME = ""  # the implementation's name, which is also its one service name

    def __init__(self, ctx=None):
        self.ctx = ctx

    def getImplementationName(self):
        return self.NAME

    def supportsService(self, name):
        return name == self.NAME

    def getSupportedServiceNames(self):
        return (self.NAME,)


class CellFunctions(_Service, XCellFunctions):
    NAME = IMPLEMENTATION
'''


_COMPONENT_TAIL = """

# LibreOffice before 7.5 does not map an add-in's compatibility name in .xlsx formulas (only in formulas
# typed or set through its API): reading, an SP_ name becomes an unknown name (#NAME?); writing, the
# function is stored under its programmatic name ORG.SHEETPUMP.CALC.CELLFUNCTIONS.SP_... This job, run by
# LibreOffice on opening and after saving a spreadsheet, mends both: it enters such formulas again
# through the API, and takes the prefix out of the saved .xlsx.
_NAME = re.compile(r"(?<![\\w.])([A-Za-z_][\\w.]*)(?=\\()")
_PREFIX = (IMPLEMENTATION + ".").upper().encode("ascii")
_IN_FORMULAS = 0  # a search descriptor's SearchType: 0 formulas, 1 values, 2 notes


def _named(formula):
    return _NAME.sub(lambda m: m.group(1).upper() if m.group(1).upper() in NAMES else m.group(1), formula)


def _enter_again(model):
    for sheet in model.Sheets:
        arrays = set()
        search = sheet.createSearchDescriptor()  # Calc finds the candidates: formulas containing "sp_"
        search.SearchString = "SP_"
        search.SearchType = _IN_FORMULAS
        found = sheet.findAll(search)
        if found is None:
            continue
        cells = found.Cells.createEnumeration()
        while cells.hasMoreElements():
            cell = cells.nextElement()
            if cell.getType().value != "FORMULA":  # a text that mentions SP_ stays as it is
                continue
            formula = cell.getFormula()
            mended = _named(formula)
            if mended == formula:
                continue
            cursor = sheet.createCursorByRange(cell)
            cursor.collapseToCurrentArray()
            where = cursor.RangeAddress
            if where.StartColumn == where.EndColumn and where.StartRow == where.EndRow:
                cell.setFormula(mended)  # not part of an array formula
                continue
            key = (where.StartColumn, where.StartRow, where.EndColumn, where.EndRow)
            if key not in arrays:
                arrays.add(key)
                # a cell of an array formula gives it in braces, {=...} (the range's getArrayFormula does
                # not serve: for a formula with an unknown name it keeps the file's "," separators)
                cursor.setArrayFormula(mended[1:-1] if mended.startswith("{") else mended)


def _rename_in_file(url):
    path = uno.fileUrlToSystemPath(url)
    if not path.lower().endswith((".xlsx", ".xlsm")) or not os.path.isfile(path):
        return
    with zipfile.ZipFile(path) as book:
        parts = [(info, book.read(info)) for info in book.infolist()]
    if not any(_PREFIX in data for _, data in parts):
        return
    temporary = path + ".sheetpump-tmp"
    with zipfile.ZipFile(temporary, "w", zipfile.ZIP_DEFLATED) as book:
        for info, data in parts:
            if info.filename.startswith("xl/") and info.filename.endswith(".xml"):
                data = data.replace(_PREFIX, b"")
            book.writestr(info, data)
    shutil.copymode(path, temporary)
    os.replace(temporary, path)


class Names(_Service, XJob):
    NAME = NAMES_JOB

    def execute(self, arguments):
        try:
            environment = {a.Name: a.Value for a in dict((a.Name, a.Value) for a in arguments)["Environment"]}
            model, event = environment.get("Model"), environment.get("EventName")
            if model is None or not model.supportsService("com.sun.star.sheet.SpreadsheetDocument"):
                return None
            if event == "OnLoadFinished":
                modified = model.isModified()
                _enter_again(model)
                model.setModified(modified)  # the same formulas as in the file: nothing to save
            elif model.getURL():
                _rename_in_file(model.getURL())
        except Exception as exc:  # never disturb opening or saving a document
            print("sheetpump extension:", exc, file=sys.stderr)
        return None


g_ImplementationHelper = unohelper.ImplementationHelper()
g_ImplementationHelper.addImplementation(CellFunctions, IMPLEMENTATION, (IMPLEMENTATION,))
g_ImplementationHelper.addImplementation(Names, NAMES_JOB, (NAMES_JOB,))
"""


def component_py() -> str:
    """The Python component: one method per declared function, each handing its arguments on."""
    text = _COMPONENT_HEAD.format(
        version=__version__, python=".".join(map(str, sys.version_info[:3])), executable=sys.executable,
        paths=recorded_paths(), implementation=IMPLEMENTATION, caution=SAFETY_CAUTION, names_job=NAMES_JOB,
        names=sorted(CATALOGUE))
    methods = []
    for calc in CATALOGUE.values():
        names = ", ".join(parameters(calc))
        methods.append(f"\n    def {calc.name}(self, {names}):\n"
                       f"        return _call({calc.name!r}, ({names},))\n")
    return text + "".join(methods) + _COMPONENT_TAIL


def type_library() -> bytes:
    """The ``.rdb`` holding the interface of the cell functions: ``any`` arguments, rows of ``any`` results."""
    return interface_library(INTERFACE, [(calc.name, parameters(calc)) for calc in CATALOGUE.values()],
                             result="[][]any")


def contents() -> dict[str, bytes]:
    """Every file of the extension by its path inside the ``.oxt``."""
    return {
        "META-INF/manifest.xml": manifest_xml().encode(),
        "description.xml": description_xml().encode(),
        _DESCRIPTION: description_text().encode(),
        _TYPES: type_library(),
        _ADDINS: addins_xcu().encode(),
        _JOBS: jobs_xcu().encode(),
        _COMPONENTS: components_xml().encode(),
        _COMPONENT: component_py().encode(),
    }


def build(target: str | os.PathLike[str]) -> Path:
    """Write the extension to ``target`` (atomically) and return its path."""
    with atomic_path(target) as tmp:
        with zipfile.ZipFile(tmp, "w", zipfile.ZIP_DEFLATED) as oxt:
            for name, data in contents().items():
                oxt.writestr(zipfile.ZipInfo(name, _DATE), data, zipfile.ZIP_DEFLATED)
    return Path(target)

