"""The LibreOffice face: sheetpump's cell functions live in Calc, as a LibreOffice extension.

:mod:`.build` writes the extension from the declarations, :mod:`.typelib` its UNO type library,
:mod:`.runtime` is what its component calls, :mod:`.office` finds LibreOffice and its ``unopkg``, and
:mod:`.manager` installs through LibreOffice's extension manager where ``unopkg`` refuses (root).

LibreOffice is started without an activated virtual environment (:func:`.office.office_environment`):
its embedded Python would take that environment's Python for its own and fail to load components.
"""
