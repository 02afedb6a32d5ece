"""Regenerate every committed file that is derived from code: the workbooks under workbooks/ and the
function table in README.md.

Run after changing a generator or a declaration: ``python scripts/regenerate.py``. The tests fail while
a committed file differs from what its generator writes.
"""

from __future__ import annotations

import re
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from sheetpump import demo  # noqa: E402
from sheetpump.cli import functions, rules  # noqa: E402
from sheetpump.workbooks.example import write_worked_example  # noqa: E402
from sheetpump.workbooks.size_series import write_series_template  # noqa: E402
from sheetpump.workbooks.templates import write_template  # noqa: E402

GENERATED = {
    "worked-example.xlsx": write_worked_example,
    "datasheet-template.xlsx": lambda path: write_template("datasheet", path),
    "application-template.xlsx": lambda path: write_template("application", path),
    "series-template.xlsx": write_series_template,
}


def update_readme() -> None:
    readme = ROOT / "README.md"
    text = new = readme.read_text(encoding="utf-8")
    for block, table in (("functions", functions.markdown()), ("rules", rules.markdown())):
        new = re.sub(rf"(<!-- {block}:start -->\n).*?(\n<!-- {block}:end -->)",
                     lambda m, t=table: m.group(1) + t + m.group(2), new, flags=re.S)
    if new != text:
        readme.write_text(new, encoding="utf-8")
    print("README.md")


def main() -> None:
    for name, write in GENERATED.items():
        target = ROOT / "workbooks" / name
        target.parent.mkdir(parents=True, exist_ok=True)
        write(target)
        print(target.relative_to(ROOT))
    for path in [*demo.write_inputs(ROOT / "workbooks" / "demo"), *demo.write_series(ROOT / "workbooks" / "demo")]:
        print(path.relative_to(ROOT))
    update_readme()


if __name__ == "__main__":
    main()
