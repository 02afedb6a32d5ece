"""``sheetpump extension``: the cell functions as a LibreOffice Calc extension (build, install, remove)."""

from __future__ import annotations

import argparse
import tempfile
from pathlib import Path

from .. import __version__
from ..errors import InputError
from ..extension.build import IDENTIFIER, build
from ..extension.office import find_office, python_mismatch


def run(args: argparse.Namespace) -> int:
    profile = Path(args.profile) if args.profile else None
    if not (args.install or args.uninstall):
        if not args.output:
            raise InputError("say what to do: -o FILE.oxt, --install or --uninstall")
        print(f"wrote {build(args.output)}")
        return 0
    office = find_office()
    if args.uninstall:
        installed = office.manage("list", IDENTIFIER, profile=profile)
        if not installed:
            print("the sheetpump extension is not installed; nothing to remove")
            return 0
        office.manage("remove", IDENTIFIER, profile=profile)
        print(f"removed the sheetpump extension {installed} from LibreOffice (restart LibreOffice)")
        return 0
    mismatch = python_mismatch(office)
    if mismatch:
        raise InputError(mismatch)
    installed = office.manage("list", IDENTIFIER, profile=profile)
    if installed and installed != __version__:
        raise InputError(f"LibreOffice already has the sheetpump extension {installed} (this is sheetpump "
                         f"{__version__})", hint="remove it first: sheetpump extension --uninstall")
    with tempfile.TemporaryDirectory(prefix="sheetpump-oxt-") as tmp:
        oxt = build(Path(args.output) if args.output else Path(tmp) / "sheetpump.oxt")
        office.manage("add", IDENTIFIER, oxt.resolve(), profile=profile)
    print(f"installed the sheetpump extension {__version__} in LibreOffice (restart LibreOffice); "
          "try =SP_GEOMETRIC_FLOW(16;1450) in Calc")
    return 0


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser("extension", help="build or install the cell functions as a LibreOffice Calc extension")
    parser.add_argument("-o", "--output", metavar="FILE.oxt", help="write the extension to this file")
    action = parser.add_mutually_exclusive_group()
    action.add_argument("--install", action="store_true",
                        help="build and install it for the current user (LibreOffice's unopkg)")
    action.add_argument("--uninstall", action="store_true", help="remove it from LibreOffice")
    parser.add_argument("--profile", metavar="FOLDER",
                        help="a LibreOffice user profile folder to use instead of the user's own")
    parser.set_defaults(run=run)
    return parser
