"""Pictures of a workbook: LibreOffice prints it to PDF, poppler's pdftoppm turns each page into a PNG.

Used to put pictures of the comparison workbook in the README::

    python scripts/render_pages.py BOOK.xlsx OUTDIR [--dpi 110] [--trim] [--crop X,Y,W,H] [--page-setup]
    python scripts/render_pages.py --help

Formulas are recomputed by LibreOffice before printing (the harness in tests/libreoffice.py forces it), so
a picture shows what a spreadsheet shows, not values cached in the file. By default each sheet becomes
one page sized to its used range; ``--page-setup`` keeps the workbook's own print setup instead.
``--trim`` cuts the white border (leaving ``--margin`` pixels); ``--crop`` cuts a fixed box, in pixels at
the chosen resolution, measured from the top left. Pages without ink (an empty sheet) give no picture
unless ``--keep-blank``. The paths written (the PDF, then the pictures) are printed, one per line.

Needs ``soffice`` (Debian: libreoffice-calc-nogui) and ``pdftoppm``/``pdfinfo`` (Debian: poppler-utils).
"""

from __future__ import annotations

import argparse
import os
import re
import shutil
import subprocess
import sys
import tempfile
from collections.abc import Sequence
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from tests.libreoffice import DEFAULT_TIMEOUT, LibreOfficeError, LibreOfficeMissingError, to_pdf  # noqa: E402

__all__ = ["RenderError", "page_count", "pdf_to_pngs", "render_pages", "trim_box"]

Box = tuple[int, int, int, int]  # x, y, width, height in pixels

# A pixel this light (of 255) or lighter counts as paper when trimming; anti-aliased grid lines are ~200.
_PAPER = 250


class RenderError(RuntimeError):
    """A tool is missing or a step failed; the message says which and what it printed."""


def _tool(name: str) -> str:
    found = shutil.which(name)
    if found is None:
        raise RenderError(f"{name} not found: install poppler-utils (Debian: apt-get install poppler-utils)")
    return found


def _run(command: list[str], timeout: float) -> str:
    try:
        done = subprocess.run(command, capture_output=True, text=True, timeout=timeout, check=False)
    except subprocess.TimeoutExpired:
        raise RenderError(f"{Path(command[0]).name} did not finish within {timeout:g} s") from None
    if done.returncode != 0:
        raise RenderError(f"{' '.join(command)} failed (exit status {done.returncode}):\n{done.stderr}")
    return done.stdout


def page_count(pdf: str | os.PathLike[str], *, timeout: float = 60.0) -> int:
    """Number of pages of a PDF, from poppler's pdfinfo."""
    info = _run([_tool("pdfinfo"), str(pdf)], timeout)
    match = re.search(r"^Pages:\s+(\d+)", info, re.MULTILINE)
    if match is None:
        raise RenderError(f"pdfinfo gave no page count for {pdf}:\n{info}")
    return int(match.group(1))


def _read_pgm(path: Path) -> np.ndarray:
    """A binary 8-bit PGM (P5, what ``pdftoppm -gray`` writes) as a 2-D uint8 array."""
    data = path.read_bytes()
    match = re.match(rb"P5\s+(\d+)\s+(\d+)\s+(\d+)\s", data)
    if match is None or int(match.group(3)) != 255:
        raise RenderError(f"{path} is not an 8-bit binary PGM")
    width, height = int(match.group(1)), int(match.group(2))
    return np.frombuffer(data, dtype=np.uint8, count=width * height, offset=match.end()).reshape(height, width)


def trim_box(gray: np.ndarray, margin: int = 8) -> Box | None:
    """The box around everything darker than paper, widened by ``margin`` pixels; None for a blank page.

    >>> page = np.full((10, 20), 255, dtype=np.uint8)
    >>> page[3:5, 6:9] = 0
    >>> trim_box(page, margin=1)
    (5, 2, 5, 4)
    """
    ink = gray < _PAPER
    rows, cols = np.flatnonzero(ink.any(axis=1)), np.flatnonzero(ink.any(axis=0))
    if rows.size == 0:
        return None
    top, bottom = max(int(rows[0]) - margin, 0), min(int(rows[-1]) + margin, gray.shape[0] - 1)
    left, right = max(int(cols[0]) - margin, 0), min(int(cols[-1]) + margin, gray.shape[1] - 1)
    return left, top, right - left + 1, bottom - top + 1


def _pdftoppm(pdf: Path, page: int, prefix: Path, dpi: int, *, gray: bool, box: Box | None, timeout: float) -> Path:
    command = [_tool("pdftoppm"), "-r", str(dpi), "-f", str(page), "-l", str(page), "-singlefile"]
    command += ["-gray"] if gray else ["-png"]
    if box is not None:
        x, y, w, h = box
        command += ["-x", str(x), "-y", str(y), "-W", str(w), "-H", str(h)]
    _run([*command, str(pdf), str(prefix)], timeout)
    made = prefix.with_name(prefix.name + (".pgm" if gray else ".png"))
    if not made.is_file():
        raise RenderError(f"pdftoppm wrote no {made.name} for page {page} of {pdf}")
    return made


def _check(dpi: int, margin: int, crop: Box | None) -> None:
    if dpi <= 0 or margin < 0:
        raise ValueError(f"dpi must be positive and margin not negative (got dpi={dpi}, margin={margin})")
    if crop is not None and (crop[2] <= 0 or crop[3] <= 0 or crop[0] < 0 or crop[1] < 0):
        raise ValueError(f"crop box {crop} needs x, y >= 0 and a positive width and height")


def pdf_to_pngs(
    pdf: str | os.PathLike[str],
    out_dir: str | os.PathLike[str],
    *,
    dpi: int = 110,
    trim: bool = False,
    margin: int = 8,
    crop: Box | None = None,
    skip_blank: bool = True,
    timeout: float = 60.0,
) -> list[Path]:
    """Each page of a PDF as ``out_dir/<name>-<page>.png``; return the pictures' paths in page order.

    ``crop`` (x, y, width, height in pixels at ``dpi``) wins over ``trim``. With ``skip_blank`` a page
    without any ink (LibreOffice prints an empty sheet as a sliver of a page) gives no picture. Each file
    appears whole: pictures are made in a private folder and renamed into place.
    """
    _check(dpi, margin, crop)
    pdf = Path(pdf)
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    pictures = []
    with tempfile.TemporaryDirectory(prefix=".render-", dir=out) as tmp:
        for page in range(1, page_count(pdf, timeout=timeout) + 1):
            box = crop
            if trim or skip_blank:
                gray = _pdftoppm(pdf, page, Path(tmp) / f"gray-{page}", dpi, gray=True, box=None, timeout=timeout)
                ink = trim_box(_read_pgm(gray), margin)
                if ink is None and skip_blank:
                    continue
                if box is None and trim:
                    box = ink
            made = _pdftoppm(pdf, page, Path(tmp) / f"page-{page}", dpi, gray=False, box=box, timeout=timeout)
            final = out / f"{pdf.stem}-{page}.png"
            os.replace(made, final)
            pictures.append(final)
    return pictures


def render_pages(
    xlsx_path: str | os.PathLike[str],
    out_dir: str | os.PathLike[str],
    *,
    dpi: int = 110,
    single_page_sheets: bool = True,
    trim: bool = False,
    margin: int = 8,
    crop: Box | None = None,
    skip_blank: bool = True,
    timeout: float = DEFAULT_TIMEOUT,
) -> list[Path]:
    """Print a workbook to ``out_dir/<name>.pdf`` with LibreOffice, then each page to a PNG beside it.

    Returns the PDF's path followed by the pictures' (see :func:`pdf_to_pngs`). With
    ``single_page_sheets`` each sheet is one page sized to its used range; otherwise the workbook's own
    print setup applies.
    """
    _check(dpi, margin, crop)  # fail before the slow LibreOffice step on bad options or without poppler
    _tool("pdftoppm")
    pdf = to_pdf(xlsx_path, out_dir, single_page_sheets=single_page_sheets, timeout=timeout)
    pictures = pdf_to_pngs(
        pdf, out_dir, dpi=dpi, trim=trim, margin=margin, crop=crop, skip_blank=skip_blank, timeout=timeout
    )
    return [pdf, *pictures]


def _box(text: str) -> Box:
    try:
        x, y, w, h = (int(part) for part in text.split(","))
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not X,Y,WIDTH,HEIGHT in whole pixels") from None
    return x, y, w, h


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Pictures (PNG) of a workbook's pages, via LibreOffice.")
    parser.add_argument("book", type=Path, help="the .xlsx workbook")
    parser.add_argument("outdir", type=Path, help="folder for the PDF and the PNG pictures")
    parser.add_argument("--dpi", type=int, default=110, help="resolution of the pictures (default 110)")
    parser.add_argument("--trim", action="store_true", help="cut the white border around each page")
    parser.add_argument("--margin", type=int, default=8, help="pixels of white kept by --trim (default 8)")
    parser.add_argument("--crop", type=_box, metavar="X,Y,W,H", help="cut this box (pixels) from each page")
    parser.add_argument(
        "--page-setup", action="store_true", help="keep the workbook's print setup, not one page per sheet"
    )
    parser.add_argument("--keep-blank", action="store_true", help="also picture pages without any ink")
    parser.add_argument("--timeout", type=float, default=DEFAULT_TIMEOUT, help="seconds per tool run")
    args = parser.parse_args(argv)
    if not args.book.is_file():
        print(f"render_pages: no such workbook: {args.book}", file=sys.stderr)
        return 2
    try:
        paths = render_pages(
            args.book,
            args.outdir,
            dpi=args.dpi,
            single_page_sheets=not args.page_setup,
            trim=args.trim,
            margin=args.margin,
            crop=args.crop,
            skip_blank=not args.keep_blank,
            timeout=args.timeout,
        )
    except (RenderError, LibreOfficeError, LibreOfficeMissingError, ValueError) as error:
        print(f"render_pages: {error}", file=sys.stderr)
        return 2
    for path in paths:
        print(path)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
