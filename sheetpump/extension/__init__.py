"""The LibreOffice face: sheetpump's cell functions live in Calc, as a LibreOffice extension.

:mod:`.build` writes the extension from the declarations, :mod:`.typelib` its UNO type library,
:mod:`.runtime` is what its component calls, :mod:`.office` finds LibreOffice and its ``unopkg``, and
:mod:`.manager` installs through LibreOffice's extension manager where ``unopkg`` refuses (root).

Status: work in progress. Building, installing (``unopkg``, or the extension manager for root) and the
type library (read back by LibreOffice's own type manager) work; creating the Python component inside
LibreOffice 7.4 still fails (``std::bad_alloc`` from the Python loader, then a crash with the full
interface), so Calc does not compute the functions yet. See the branch's report.
"""
