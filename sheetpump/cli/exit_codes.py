"""The exit codes of every ``sheetpump`` command, defined once (not a command itself).

0 all good; 1 a rule failed (with ``--strict``, warned) or, for ``evaluate``, a plausibility flag fired;
2 bad input or usage (one line naming the file, sheet, cell and field, never a traceback).
"""

from __future__ import annotations

__all__ = ["EXIT_FAIL", "EXIT_INPUT", "EXIT_OK"]

EXIT_OK = 0
EXIT_FAIL = 1
EXIT_INPUT = 2
