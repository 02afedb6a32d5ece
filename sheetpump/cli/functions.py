"""``sheetpump functions``: list the cell functions (plain or ``--json``) from their declarations."""

from __future__ import annotations

import argparse
import json

from ..catalogue import CATALOGUE
from ..declarations import Calculation


def describe(calc: Calculation) -> dict[str, object]:
    """The machine-readable description of one cell function."""
    return {
        "name": calc.name,
        "help": calc.help,
        "arguments": [
            {"name": a.name, "kind": a.kind.name, "default_unit": a.kind.default, "help": a.help,
             "optional": a.default is not None, **({"default": a.default} if a.default is not None else {})}
            for a in calc.args
        ] + [{"name": "unit", "kind": "unit name", "default_unit": "", "optional": True,
              "help": f"Unit of the result (default {calc.result.default or 'plain number'})"}],
        "result_kind": calc.result.name,
        "result_unit": calc.result.default,
        "formula": calc.formula_source,
    }


def markdown() -> str:
    """The function table of the README (kept in sync with the declarations by a test)."""
    lines = ["| function | arguments [default unit] | result [default unit] | what it computes |",
             "| --- | --- | --- | --- |"]
    for calc in CATALOGUE.values():
        args = ", ".join(
            (f"{a.name} [{a.kind.default}]" if a.kind.default else a.name)
            + (f" = {a.default:g}" if a.default is not None else "")
            for a in calc.args
        )
        result = f"{calc.result.name} [{calc.result.default}]" if calc.result.default else calc.result.name
        lines.append(f"| `{calc.name}` | {args}, unit | {result} | {calc.help} |")
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    if args.markdown:
        print(markdown())
        return 0
    if args.json:
        print(json.dumps([describe(c) for c in CATALOGUE.values()], indent=2, ensure_ascii=False))
        return 0
    for calc in CATALOGUE.values():
        result = f" -> {calc.result.default}" if calc.result.default else ""
        print(f"{calc.signature_text()}{result}")
        print(f"    {calc.help}")
    return 0


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser("functions", help="list the cell functions with their arguments and units")
    parser.add_argument("--json", action="store_true", help="print a JSON list instead of text")
    parser.add_argument("--markdown", action="store_true", help="print the table used in the README")
    parser.set_defaults(run=run)
    return parser
