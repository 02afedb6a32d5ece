"""``python -m sheetpump``: the command line, as the ``sheetpump`` command (:mod:`sheetpump.cli`)."""

from .cli import entry

entry()
