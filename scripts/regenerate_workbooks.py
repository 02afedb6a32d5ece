"""Regenerate every committed workbook under workbooks/ from the code that defines it.

Run after changing a generator: ``python scripts/regenerate_workbooks.py``. The tests fail while a
committed workbook differs from what its generator writes.
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from sheetpump.workbooks.example import write_worked_example  # noqa: E402

GENERATED = {
    "worked-example.xlsx": write_worked_example,
}


def main() -> None:
    for name, write in GENERATED.items():
        target = ROOT / "workbooks" / name
        write(target)
        print(target.relative_to(ROOT))


if __name__ == "__main__":
    main()
