"""Regenerate the README's pictures of the demo comparison: pages as a user prints them.

Runs the demo into a temporary folder, exports the comparison workbook with LibreOffice's plain PDF
export (a fresh profile with default settings, no filter options: what File > Export as PDF gives, with
the workbook's own page setup), finds each sheet's pages by the header every page prints
("sheet: Summary"), and keeps some of them under ``docs/`` as PNG (poppler's pdftoppm). Needs LibreOffice
Calc and poppler-utils (as CI installs them).

    python scripts/readme_pictures.py
"""

from __future__ import annotations

import re
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "scripts"))

from render_pages import pdf_to_pngs  # noqa: E402

from sheetpump import demo  # noqa: E402
from tests.libreoffice import to_pdf_many  # noqa: E402

#: picture -> (sheet, which of its pages, 1-based)
PICTURES = {
    "demo-summary.png": ("Summary", 1),
    "demo-duty.png": ("Duty 1", 1),
    "demo-charts.png": ("Charts", 1),
    "demo-envelopes.png": ("Charts", 4),
    "demo-findings.png": ("Findings", 1),
}


def sheet_pages(pdf: Path) -> dict[str, list[int]]:
    """The PDF's pages (1-based) of each sheet, from the header line ``sheet: NAME`` of each page."""
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True,
                          check=True).stdout
    pages: dict[str, list[int]] = {}
    for number, page in enumerate(text.split("\f"), start=1):
        found = re.search(r"sheet: (\S+(?: \d+)?)", page)
        if found:
            pages.setdefault(found.group(1), []).append(number)
    return pages


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        result = demo.run(Path(tmp) / "demo")
        pdf = to_pdf_many([result.comparison], Path(tmp) / "pdf", recalc="default")[0]
        pages = sheet_pages(pdf)
        pngs = {int(p.stem.rsplit("-", 1)[1]): p
                for p in pdf_to_pngs(pdf, Path(tmp) / "pages", dpi=72, skip_blank=False)}
        for name, (sheet, k) in PICTURES.items():
            target = ROOT / "docs" / name
            target.write_bytes(pngs[pages[sheet][k - 1]].read_bytes())
            print(target.relative_to(ROOT))


if __name__ == "__main__":
    main()
