"""The table of rules, built from the rule code: each rule function is declared with :func:`rule`.

A rule's id is stable (reports, CI and spreadsheets refer to it): its subject, a dot and what it checks
(``pressure.peak``), or its subject alone (``rotation``). Its text says in a line what it checks, and
``not_checked`` says when it can give ``not checked`` (empty: never). :data:`RULES` lists the rules by
subject in the order of :data:`SUBJECTS`, and within a subject in the order they are declared: the order
of ``sheetpump rules`` and of the README's table, whatever order the rule modules are imported in.

>>> @rule("cleanliness.example", "an example of a rule", not_checked="never in the real table")
... def example(ctx):
...     return None
>>> RULES.pop("cleanliness.example"), NOT_CHECKED_WHEN.pop("cleanliness.example"), example.rule_id
('an example of a rule', 'never in the real table', 'cleanliness.example')
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TypeVar

__all__ = ["NOT_CHECKED_WHEN", "RULES", "SUBJECTS", "rule"]

#: The subjects of the rules (a rule id before its dot), in the order the table lists them.
SUBJECTS = ("speed", "pressure", "flow", "inlet", "viscosity", "temperature", "cleanliness", "torque", "rotation",
            "performance")

#: Every rule id with a short description, by subject (:data:`SUBJECTS`), then in the order declared.
RULES: dict[str, str] = {}

#: When each rule can give ``not checked`` (the README's table says it; a rule missing here: never).
NOT_CHECKED_WHEN: dict[str, str] = {}

F = TypeVar("F", bound=Callable[..., object])


def _subject(rule_id: str) -> int:
    return SUBJECTS.index(rule_id.split(".")[0])


def rule(rule_id: str, text: str, *, not_checked: str = "") -> Callable[[F], F]:
    """Declare a rule function: enter ``rule_id`` with its ``text`` (and when it is not checked) in the
    table, and mark the function with ``rule_id``. A rule function takes the check's context and gives
    the rule's one finding for the pump. An id declared twice, or of a subject not in :data:`SUBJECTS`,
    is an error."""
    if rule_id in RULES:
        raise ValueError(f"rule {rule_id!r} is declared twice")
    if rule_id.split(".")[0] not in SUBJECTS:
        raise ValueError(f"rule {rule_id!r} has a subject not in SUBJECTS")

    def declare(function: F) -> F:
        ordered = sorted([*RULES.items(), (rule_id, text)], key=lambda item: _subject(item[0]))  # stable
        RULES.clear()
        RULES.update(ordered)
        if not_checked:
            NOT_CHECKED_WHEN[rule_id] = not_checked
        function.rule_id = rule_id  # type: ignore[attr-defined]
        return function
    return declare
