"""``sheetpump rules``: list the checker's rules by their stable ids (``--markdown`` for the README)."""

from __future__ import annotations

import argparse

from ..checks import DUTY_SUBJECTS, NOT_CHECKED_WHEN, RULES


def _not_checked(rule: str) -> str:
    when = NOT_CHECKED_WHEN.get(rule)
    if not when:
        return "never"
    return when + ("" if rule.split(".")[0] in DUTY_SUBJECTS else " (does not lower the verdict)")


def markdown() -> str:
    """The rule table of the README (kept in sync with the checker by a test)."""
    lines = ["| rule id | what it checks | not checked when |", "| --- | --- | --- |"]
    lines += [f"| `{rule}` | {text} | {_not_checked(rule)} |" for rule, text in RULES.items()]
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    if args.markdown:
        print(markdown())
    else:
        width = max(len(r) for r in RULES)
        for rule, text in RULES.items():
            print(f"{rule:<{width}}  {text}")
            if rule in NOT_CHECKED_WHEN:  # the state a rule takes when the datasheet does not state enough
                print(f"{'':<{width}}  not checked when: {_not_checked(rule)}")
    return 0


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser("rules", help="list the checker's rules by their ids")
    parser.add_argument("--markdown", action="store_true", help="print the table used in the README")
    parser.set_defaults(run=run)
    return parser
