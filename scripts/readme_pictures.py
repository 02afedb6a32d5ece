"""Regenerate the README's pictures of the demo comparison: its Summary sheet and its charts.

Runs the demo into a temporary folder, lets LibreOffice render the comparison workbook to PDF and
pdftoppm turn the pages into PNG (``scripts/render_pages.py``), and keeps two of them under
``docs/``. Needs LibreOffice Calc and poppler-utils (as CI installs them).

    python scripts/readme_pictures.py
"""

from __future__ import annotations

import shutil
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "scripts"))

from render_pages import render_pages  # noqa: E402

from sheetpump import demo  # noqa: E402

PICTURES = {1: "demo-summary.png", 7: "demo-charts.png"}  # page of the PDF (one page per sheet)


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        result = demo.run(Path(tmp) / "demo")
        pngs = [p for p in render_pages(result.comparison, Path(tmp) / "pages", trim=True, dpi=80)
                if p.suffix == ".png"]
        names = {int(p.stem.rsplit("-", 1)[1]): p for p in pngs}
        for page, name in PICTURES.items():
            target = ROOT / "docs" / name
            shutil.copyfile(names[page], target)
            print(target.relative_to(ROOT))


if __name__ == "__main__":
    main()
