"""The LibreOffice face: sheetpump's cell functions live in Calc, as a LibreOffice extension.

:mod:`.build` writes the extension from the declarations, :mod:`.typelib` its UNO type library,
:mod:`.runtime` is what its component calls, :mod:`.office` finds LibreOffice and its ``unopkg``, and
:mod:`.manager` installs through LibreOffice's extension manager where ``unopkg`` refuses (root).

How a formula reaches sheetpump: Calc finds the function by its name (Addins.xcu), creates the
extension's Python component, and calls its method with each argument as a UNO ``any``; the method hands
them to :func:`.runtime.call`, which calls the declaration like the xlwings face does.

LibreOffice is started without an activated virtual environment (:func:`.office.office_environment`):
its embedded Python would take that environment's Python for its own and fail to load components.
"""
