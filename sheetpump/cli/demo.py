"""``sheetpump demo``: check and compare the bundled, invented demo and say where the results are.

    sheetpump demo [-o DIR]
"""

from __future__ import annotations

import argparse

from .. import SAFETY_CAUTION
from ..files import writable_folder


def run(args: argparse.Namespace) -> int:
    from ..demo import run as run_demo

    if args.output is not None:
        writable_folder("--output", args.output)
    result = run_demo(args.output)
    print(f"sheetpump demo: an invented baling press and {len(result.verdicts)} invented pumps")
    for label, verdict in result.verdicts.items():
        print(f"  {verdict:4}  {label}")
    print(f"inputs:      {result.folder / 'inputs'}")
    print(f"comparison:  {result.comparison}")
    if result.selection is not None:
        for name, model in (result.proposals or {}).items():
            print(f"  series {name}: {'proposed ' + model if model else 'no size passes'}")
        print(f"selection:   {result.selection}")
    print(f"report:      {result.report}")
    print(SAFETY_CAUTION)
    return 0


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser("demo", help="check and compare the bundled demo (invented machine and pumps)")
    parser.add_argument("-o", "--output", metavar="DIR",
                        help="folder for the results (default: a new folder sheetpump-demo in the current one)")
    parser.set_defaults(run=run)
    return parser
